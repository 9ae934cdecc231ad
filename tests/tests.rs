//! The engine against outside references, end to end.

// Shared scene builders and the demo scenes.
mod util;

// Load paths: beam-formula cases carried through whole scenes, rigid base, stability.
mod solve;
// Horizontal loads down the braced bays: hand calculations, refusals, diaphragms, combinations.
mod braced;
// Combinations, utilisation, bearing, schedule and JSON.
mod check;
// Overturning, kentledge, sliding, hold-down and ground bearing against hand calculations.
mod stability;
// Scene files: syntax errors with positions, round trips, atomic saves.
mod io;
// The component catalogue: shipped values against their sources, user catalogues, loader errors.
mod catalogue;
// Loads through lifts: spliced standards, transfer members, existing structures.
mod lifts;
// Imposed loads in their worst arrangement.
mod arrangements;
// The spare-capacity map over the decks.
mod spare;
// Continuous members, the method envelope and its outputs.
mod continuous;
// Validation: every problem at once, with element ids.
mod validation;
// The command line run as a user would.
mod cli;
// The printable report, checked in headless Chromium too.
mod report;
// Fuzzing of the loader and validator, properties of generated scenes, degenerate inputs.
mod hardening;
// Inputs that once broke something.
mod regression;
// The pictures of the editor's view, pixel by pixel (needs the editor and a display).
#[cfg(feature = "viewer")]
mod render;
