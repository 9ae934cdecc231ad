//! Pure helpers for the editor shell: undoable edit commands ([`commands`]), drawing geometry,
//! ray picking and the view camera ([`pick`]), recovery copies of unsaved work ([`recovery`]).
//! No bevy types; the app turns these into pictures and input.

pub mod commands;
pub mod pick;
pub mod recovery;

pub use commands::*;
