//! Stage 2, solve: every load carried down to the base plates, one load item at a time.
//!
//! - [`load_path`]: the driver. Vertical items go deck strip → bearer → post → base plate;
//!   horizontal items go to the plates through the braced base. Every share is kept.
//! - [`arrangement`]: imposed loads split into cells, each placed only where it is unfavourable.
//! - [`beam`]: one member's load shared among its supports by segment moment balance.
//! - [`continuous`]: the same member continuous over its supports (direct stiffness method).
//! - [`braced`]: horizontal loads down the braced planes, through the diaphragms, to the plates.
//! - [`tee_heads`]: bearers on a single post must balance, or stay within a stated head moment
//!   capacity, with either arm loaded alone.
//! - [`influence`]: the reaction at every post for a unit load anywhere on a deck.
//! - [`passes`]: the method passes (simple spans, continuous, mixtures) the envelope needs.
//! - [`items`]: what the solver hands on — load items, their reactions and the trace.
//!
//! Nothing here combines or checks; that is [`crate::check`].

pub mod arrangement;
pub mod beam;
pub mod braced;
pub mod continuous;
pub mod influence;
pub mod items;
pub mod load_path;
pub mod passes;
pub mod tee_heads;

pub use items::{Action, Alternative, Arranged, Cell, CellPlace, Contribution, Item, Resultant, Route, Solution, Variant, SELF_WEIGHT_ID};
pub use load_path::{solve, solve_methods, solve_pass, SolveError};
pub use passes::{method_passes, Behaviour, MethodPass};
