//! Load combinations: partial factors per case and what each combination is checked for.

use serde::{Deserialize, Serialize};

/// Partial factors applied to each load case.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Factors {
    /// Permanent load where it increases the effect checked.
    pub g_unfavourable: f64,
    /// Permanent load where it reduces the effect checked.
    pub g_favourable: f64,
    /// Imposed load where unfavourable (taken as 0 where favourable).
    pub q: f64,
    /// Horizontal load where unfavourable (taken as 0 where favourable).
    pub w: f64,
}

impl Factors {
    /// The factor on a load of `case` where it is unfavourable.
    pub fn unfavourable(&self, case: crate::Case) -> f64 {
        match case {
            crate::Case::G => self.g_unfavourable,
            crate::Case::Q => self.q,
            crate::Case::W => self.w,
        }
    }
}

/// A combination of the load cases.
///
/// Permanent load is applied everywhere at once, with the unfavourable or favourable factor,
/// whichever gives the larger (for the maximum) or smaller (for the minimum) base load. Each
/// imposed and each horizontal load is taken independently, only where it makes the base load
/// worse — so patterns of partial loading are covered without listing them.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Combination {
    /// Name shown in outputs.
    pub name: String,
    /// Partial factors.
    pub factors: Factors,
    /// Whether the combined load is compared with the safe working load and allowable bearing
    /// pressure (true for working-load capacities).
    #[serde(default)]
    pub checks_capacity: bool,
    /// Whether a negative minimum base load is reported as uplift.
    #[serde(default)]
    pub checks_uplift: bool,
    /// Where the factors come from.
    #[serde(default)]
    pub source: String,
    /// Combination factors ψ0 of accompanying variable actions (EN 1990 expression 6.10): when
    /// set, each variable case is taken in turn as the leading action at its full factor, the
    /// other accompanying at factor × ψ0, and the worse governs at every plate. The notional
    /// load follows the vertical load it comes from and is never reduced. Default: none (every
    /// variable action at its full factor).
    #[serde(default)]
    pub psi0: Option<Psi0>,
}

/// Combination factors ψ0 of accompanying variable actions.
// source: EN 1990 expression 6.10 and Annex A1 Table A1.1 (recommended values for buildings, e.g.
// wind 0.6, imposed 0.7 — from memory; REFERENCES §3 marks ψ0 = 0.7 as from memory). No value is
// assumed here: the planner states them.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Psi0 {
    /// ψ0 of the imposed loads (case Q) when a horizontal load leads.
    pub imposed: f64,
    /// ψ0 of wind and identified horizontal forces (case W) when an imposed load leads.
    pub horizontal: f64,
}

impl Combination {
    /// The default set: an unfactored service combination for working-load capacities, a
    /// factored strength combination, and a stability combination with favourable permanent load.
    pub fn defaults() -> Vec<Combination> {
        vec![
            Combination {
                name: "service".into(),
                // common practice, no source: safe working loads and presumed allowable bearing
                // pressures are working (unfactored) values, compared with unfactored loads.
                factors: Factors { g_unfavourable: 1.0, g_favourable: 1.0, q: 1.0, w: 1.0 },
                checks_capacity: true,
                checks_uplift: true,
                source: "unfactored; working-load capacities (common practice)".into(),
                psi0: None,
            },
            Combination {
                name: "factored".into(),
                // source: EN 1990 Annex A1 Table A1.2(B), STR/GEO set B, recommended values
                factors: Factors { g_unfavourable: 1.35, g_favourable: 1.0, q: 1.5, w: 1.5 },
                checks_capacity: false,
                checks_uplift: false,
                source: "EN 1990 Table A1.2(B) recommended values; National Annex may differ".into(),
                psi0: None,
            },
            Combination {
                name: "stability".into(),
                // source: EN 1990 Annex A1 Table A1.2(A), EQU, recommended values
                factors: Factors { g_unfavourable: 1.10, g_favourable: 0.90, q: 1.5, w: 1.5 },
                checks_capacity: false,
                checks_uplift: true,
                source: "EN 1990 Table A1.2(A) EQU recommended values; National Annex may differ".into(),
                psi0: None,
            },
        ]
    }

    /// The factor on a variable case (Q or W).
    pub fn variable_factor(&self, case: crate::Case) -> f64 {
        self.factors.unfavourable(case)
    }
}
