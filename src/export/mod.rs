//! Stage 4, export: what is handed on — the findings at a glance, the support-load schedule (CSV),
//! JSON, the printable report, the trace of one plate's load, and the colour ramp shared with the
//! editor's view.

pub mod findings;
pub mod json;
pub mod palette;
pub mod report;
pub mod schedule;
pub mod spare;
pub mod trace;
