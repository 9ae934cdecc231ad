//! # plateload — base-plate loads of scaffolds and falsework
//!
//! The engine behind the editor and the command line. It holds no display code. Data flows one
//! way:
//!
//! - **model** ([`Scene`]): site and ground, support types, posts, bearers, decks, braces,
//!   loads tagged G / Q / W, combinations — plain data, read and written as RON by [`io`].
//! - **validate** ([`validate()`]): every problem at once, with element ids; resolves ids to
//!   indices and sets up member lines ([`Model`]).
//! - **solve** ([`solve()`]): each load item is carried deck strip → bearer → post → base plate,
//!   by segment moment balance ([`beam`]) or over continuous members ([`continuous`]) — both, in
//!   separate method passes, by default; horizontal loads go to the plates through the rigid
//!   braced base ([`rigid_base`]). Every share is kept for tracing ([`trace`]).
//! - **check** ([`analyse`]): combinations, the worse method pass at every plate, uplift,
//!   utilisation of jack and ground, equilibrium proof per case and pass, stability ([`stability`]).
//! - **export**: the support-load schedule ([`schedule`]), JSON ([`json`]) and the printable
//!   HTML report ([`report`]).
//! - **editing** (for the editor shell): undoable commands ([`edit`]), drawing geometry, ray
//!   picking and the view camera ([`pick`]), recovery copies of unsaved work ([`recovery`]).
//!
//! Units: m, kN, kPa, kN·m. Results are a planning aid; see [`CAUTION`].
#![warn(missing_docs)]

pub mod analysis;
pub mod beam;
pub mod check;
pub mod combination;
pub mod continuous;
pub mod demo;
pub mod edit;
mod fxhash;
pub mod io;
pub mod json;
pub mod layout;
pub mod loads;
pub mod model;
pub mod palette;
pub mod pick;
pub mod recovery;
pub mod report;
pub mod rigid_base;
pub mod schedule;
pub mod solve;
pub mod stability;
pub mod trace;
pub mod validate;

pub use analysis::{analyse, Analysis, AnalysisError, CaseEquilibrium, PlateResult};
pub use check::Status;
pub use combination::{Combination, Factors};
pub use loads::{Case, Intensity, Load, LoadKind, PlanDirection};
pub use model::{AnalysisSettings, BeamMethod, Bearer, Brace, Deck, Post, Rect, Scene, Site, SupportType};
pub use solve::{solve, Solution, SolveError};
pub use validate::{validate, Model, Problem, ValidationError};

/// The caution shown with every result: in the editor, the command line and every export.
pub const CAUTION: &str = "PLANNING AID ONLY: these results are for planning. The design must be checked by a competent temporary-works designer against local codes and site data.";
