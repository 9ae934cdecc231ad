//! Stage 3, check: combinations per plate, utilisation, uplift, stability and the equilibrium proof.
//!
//! - [`analysis`]: [`analyse`], one call from a scene to every result ([`Analysis`]).
//! - [`actions`]: which variable load items are independent and which are alternatives.
//! - [`plates`]: each plate under each combination and method pass — maximum, minimum,
//!   utilisation of the jack and the ground, status.
//! - [`horizontal`]: the horizontal load path in words, and the brace forces at each plate.
//! - [`spare`]: the spare-capacity map — the largest extra load at every point of every deck.
//! - [`stability`]: overturning and the kentledge that would reach the target.
//! - [`equilibrium`](mod@equilibrium): ΣF and ΣM of every load item against its reactions.

pub mod actions;
pub mod analysis;
pub mod equilibrium;
pub mod horizontal;
pub mod plates;
pub mod spare;
pub mod stability;

pub use analysis::{analyse, Analysis, AnalysisError, ArrangementAt, LiftResult, PlateResult, METHODS_AGREE};
pub use equilibrium::{equilibrium, CaseEquilibrium};
pub use plates::{bearing_area, capacities, combine, combine_envelope, Bearing, PostCapacity, MethodEnvelope, PlateCombination, Status, METHOD_TIE_RELATIVE, UPLIFT_TOLERANCE_KN};
