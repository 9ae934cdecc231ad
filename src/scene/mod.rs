//! Stage 1, the scene: what a planner lays out and loads, read and written as RON, and checked.
//!
//! - [`model`]: site and ground, support types, posts, bearers, decks, braces, settings.
//! - [`geometry`]: plan rectangles shared by elements and loads.
//! - [`loads`]: applied loads tagged G / Q / W, and the load-class presets.
//! - [`combination`]: partial factors and what each combination is checked for.
//! - [`io`]: scene files, with `file:line:col` errors and atomic saves.
//! - [`validate`](mod@validate): every problem at once, with element ids; resolves ids to indices and
//!   sets up the member lines the solver works on ([`Model`]).
//! - [`bracing`]: what the braces make — braced planes, diaphragms, and where each post is held.
//! - [`catalogue`]: the component catalogue (jacks, sole plates, sections, decking, friction),
//!   every value with its source; shipped in `assets/` and extended by the user's files.
//! - [`standing`]: what each post stands on (ground, existing structure, a post below, a bearer,
//!   a deck) and the top-down order loads flow in.
//! - [`layout`]: the generator of regular scaffolds and birdcages.
//! - [`demo`]: the built-in demo scenes.

pub mod bracing;
pub mod catalogue;
pub mod combination;
pub mod demo;
pub mod geometry;
pub mod io;
pub mod layout;
pub mod loads;
pub mod model;
pub mod standing;
pub mod validate;

pub use combination::{Combination, Factors};
pub use geometry::Rect;
pub use loads::{Case, Intensity, Load, LoadKind, PlanDirection};
pub use model::{AnalysisSettings, BeamMethod, Bearer, Brace, Deck, ElementKind, Post, Scene, Site, SupportType};
pub use validate::{validate, Model, Problem, ValidationError};
