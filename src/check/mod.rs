//! Stage 3, check: combinations per plate, utilisation, uplift, stability and the equilibrium proof.
//!
//! - [`analysis`]: [`analyse`], one call from a scene to every result ([`Analysis`]).
//! - [`actions`]: which variable load items are independent and which are alternatives.
//! - [`plates`]: each plate under each combination and method pass — maximum, minimum,
//!   utilisation of the jack and the ground, status.
//! - [`bearing`]: the area each plate's load spreads over in the ground.
//! - [`permanent`]: the parts of the permanent load that press each plate down and that lift it.
//! - [`horizontal`]: the horizontal load path in words, and the brace forces at each plate.
//! - [`spare`]: the spare-capacity map — the largest extra load at every point of every deck.
//! - [`stability`]: overturning of each structure in both forms, the kentledge that reaches the
//!   targets, and the hold-down each lifting plate needs.
//! - [`sliding`]: base shear against friction, per plate and per structure.
//! - [`equilibrium`](mod@equilibrium): ΣF and ΣM of every load item against its reactions.

pub mod actions;
pub mod analysis;
pub mod bearing;
pub mod equilibrium;
pub mod horizontal;
pub mod permanent;
pub mod plates;
pub mod sliding;
pub mod spare;
pub mod stability;

pub use analysis::{analyse, Analysis, AnalysisError, ArrangementAt, LiftResult, PlateResult, METHODS_AGREE};
pub use equilibrium::{equilibrium, CaseEquilibrium};
pub use bearing::{bearing_area, Bearing, BearsOn, Ground};
pub use plates::{capacities, combine, combine_envelope, MethodEnvelope, PlateCombination, PostCapacity, Status, METHOD_TIE_RELATIVE, UPLIFT_TOLERANCE_KN};
