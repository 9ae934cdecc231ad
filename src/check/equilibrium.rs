//! The equilibrium proof: for every load item, the applied loads against the base reactions.

use crate::scene::loads::Case;
use crate::solve::{Resultant, Solution};

/// Equilibrium of one load case: applied loads against base reactions.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct CaseEquilibrium {
    /// The case.
    pub case: Case,
    /// Resultant of the applied loads, from their definitions.
    pub applied: Resultant,
    /// Resultant of the base reactions.
    pub reactions: Resultant,
    /// |ΣF| of each load item of the case (under each diaphragm assumption it was solved for),
    /// summed, kN. Each item must balance on its own, so opposite loads in one case (wind from
    /// either side) cannot hide an error.
    pub force_residual_kn: f64,
    /// |ΣM| about the origin of each load item, summed, kN·m.
    pub moment_residual_knm: f64,
    /// Worst item's largest of |ΣF| / F and |ΣM| / (F·L), with F the magnitude of the item's
    /// applied force and L the size of the base; 0 when there is no load. For an arranged load,
    /// each of its cells is held to the same measure. Where the pass is not one state of the
    /// structure (`one_state` false), the worst of its members' own two-span models instead.
    pub relative: f64,
    /// Whether the pass is one state of the structure. Where members with unknown joints are
    /// taken support by support, each support's reaction comes from its own two-span model: the
    /// reactions then exceed the load by design, and each model balances on its own.
    pub one_state: bool,
}

/// Sum applied loads and reactions per case; the two must cancel.
pub fn equilibrium(solution: &Solution) -> [CaseEquilibrium; 3] {
    let plates = &solution.plates;
    let size = {
        let mut lo = [f64::INFINITY; 3];
        let mut hi = [f64::NEG_INFINITY; 3];
        for p in plates {
            for k in 0..3 {
                lo[k] = lo[k].min(p[k]);
                hi[k] = hi[k].max(p[k]);
            }
        }
        let d = (0..3).map(|k| (hi[k] - lo[k]).max(0.0)).fold(0.0, f64::max);
        d.max(1.0)
    };
    let norm = |v: [f64; 3]| (v[0] * v[0] + v[1] * v[1] + v[2] * v[2]).sqrt();
    Case::ALL.map(|case| {
        let mut applied = Resultant::default();
        let mut reactions = Resultant::default();
        let (mut fr, mut mr, mut relative) = (0.0, 0.0, 0.0f64);
        // Each item is balanced on its own, so opposite loads in one case cannot hide an error.
        // An item solved under two diaphragm assumptions must balance under each.
        for item in solution.items.iter().filter(|i| i.case == case) {
            applied = applied.plus(&item.applied);
            for v in 0..item.variant_count() {
                let r = item.variant_resultant(plates, v);
                if v == 0 {
                    reactions = reactions.plus(&r);
                }
                let sum = item.applied.plus(&r);
                let (f, m) = (norm(sum.force), norm(sum.moment));
                fr += f;
                mr += m;
                let magnitude = norm(item.applied.force);
                if magnitude > 0.0 {
                    relative = relative.max(f / magnitude).max(m / (magnitude * size));
                }
            }
            // An arranged load balances cell by cell too.
            if let Some(arranged) = &item.arranged {
                relative = relative.max(arranged.worst_cell_residual);
            }
        }
        let one_state = solution.method.is_one_state();
        if !one_state {
            relative = solution.local_residual;
        }
        CaseEquilibrium { case, applied, reactions, force_residual_kn: fr, moment_residual_knm: mr, relative, one_state }
    })
}
