//! # plateload — base-plate loads of scaffolds and falsework
//!
//! The engine behind the editor and the command line. It holds no display code. Data flows one
//! way, one folder per stage; a stage never imports from a later one:
//!
//! 1. **[`scene`]** — what the planner lays out and loads ([`Scene`]): site and ground, support
//!    types, posts, bearers, decks, braces, loads tagged G / Q / W, combinations; read and
//!    written as RON ([`scene::io`]); validated with every problem listed by element id
//!    ([`validate()`]), which resolves ids to indices ([`Model`]).
//! 2. **[`solve`](mod@solve)** — each load item carried deck strip → bearer → post → base plate
//!    ([`solve::load_path`]), by segment moment balance ([`solve::beam`]) or over continuous
//!    members ([`solve::continuous`]), both in separate method passes by default; horizontal
//!    loads down the braced planes and diaphragms ([`solve::braced`]). Every share is kept for
//!    tracing.
//! 3. **[`check`]** — combinations per plate, the worse method pass at every plate, uplift,
//!    utilisation of jack and ground ([`check::plates`]), stability ([`check::stability`]) and the
//!    equilibrium proof ([`check::equilibrium`](mod@check::equilibrium)); [`analyse`] runs stages 1–3 in one call.
//! 4. **[`export`]** — the support-load schedule, JSON, the printable report, the trace of one
//!    plate, and the colour ramp shared with the view.
//!
//! Beside them, **[`edit`]** holds the editor's pure helpers: undoable commands, drawing geometry,
//! ray picking, recovery copies; and **[`format`](mod@format)** writes numbers for every stage's
//! output (never a negative zero).
//!
//! To find where a number is computed: loads and their values come from `scene/`, reactions
//! from `solve/`, maxima, minima, utilisations and factors of safety from `check/`, and only
//! formatting in `export/`.
//!
//! Units: m, kN, kPa, kN·m. Results are a planning aid; see [`CAUTION`].
#![warn(missing_docs)]

pub mod check;
pub mod edit;
pub mod export;
pub mod format;
pub mod scene;
pub mod solve;
pub mod workers;

pub use check::{analyse, Analysis, AnalysisError, CaseEquilibrium, PlateResult, Status};
pub use scene::{
    validate, AnalysisSettings, BeamMethod, Bearer, Brace, Case, Combination, Deck, Factors, Intensity, Load, LoadKind, Model, PlanDirection, Post, Problem, Rect, Scene,
    Site, SupportType, ValidationError,
};
pub use solve::{solve, Solution, SolveError};

/// The caution shown with every result: in the editor, the command line and every export.
pub const CAUTION: &str = "PLANNING AID ONLY: these results are for planning. The design must be checked by a competent temporary-works designer against local codes and site data.";
