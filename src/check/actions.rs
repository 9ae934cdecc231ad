//! How the variable load items of a solution act together: which are independent and which are
//! alternatives, and the words that say so in every output.

use crate::format::num;
use crate::scene::combination::Combination;
use crate::scene::loads::Case;
use crate::scene::model::WorkingLevels;
use crate::solve::{Action, Item};

/// How the variable load items of a solution combine.
///
/// Vertical variable items and identified horizontal forces are independent: each is present
/// only where it makes things worse. Wind and notional load in the same plan direction act
/// together, and the directions are alternatives: one direction at a time.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct VariableActions {
    /// Item indices of independent variable loads (imposed loads, identified horizontal forces).
    pub independent: Vec<usize>,
    /// Item indices of wind and notional loads, one group per plan direction.
    pub by_direction: Vec<Vec<usize>>,
    /// Number of diaphragm assumptions some item has reactions for (1 or 2).
    pub variants: usize,
    /// Under the working-scaffold rule: the load-class imposed loads of each working level,
    /// levels in increasing order; one level acts at full load with an adjacent one at half.
    pub by_level: Vec<(f64, Vec<usize>)>,
}

/// Two deck levels closer than this are one working level, m.
const SAME_LEVEL_M: f64 = 1e-3;

/// Share of the full load class on the level adjacent to the fully loaded one.
// source: EN 12811-1, one adjacent working level at 50 % (via a UK industry summary, REFERENCES §9)
pub const ADJACENT_LEVEL_SHARE: f64 = 0.5;

impl VariableActions {
    /// Sort the variable (Q and W) items of a solution into independent ones and direction groups
    /// (and, under the working-scaffold rule, working levels).
    pub fn of(items: &[Item], levels: WorkingLevels) -> Self {
        let mut out = VariableActions { variants: 1, ..Default::default() };
        let mut keys: Vec<i64> = Vec::new();
        for (i, item) in items.iter().enumerate() {
            out.variants = out.variants.max(item.variant_count());
            if item.case == Case::G {
                continue;
            }
            if let (WorkingLevels::OneFullAdjacentHalf, Some(z)) = (levels, item.working_level) {
                match out.by_level.iter_mut().find(|(l, _)| (l - z).abs() <= SAME_LEVEL_M) {
                    Some((_, group)) => group.push(i),
                    None => out.by_level.push((z, vec![i])),
                }
                continue;
            }
            match (item.action, item.direction_key()) {
                (Action::Vertical | Action::Identified, _) | (_, None) => out.independent.push(i),
                (_, Some(k)) => match keys.iter().position(|&x| x == k) {
                    Some(g) => out.by_direction[g].push(i),
                    None => {
                        keys.push(k);
                        out.by_direction.push(vec![i]);
                    }
                },
            }
        }
        out.by_level.sort_by(|a, b| a.0.total_cmp(&b.0));
        out
    }

    /// Every vertical variable item, wherever it is sorted.
    pub fn vertical(&self) -> impl Iterator<Item = usize> + '_ {
        self.independent.iter().copied().chain(self.by_level.iter().flat_map(|(_, g)| g.iter().copied()))
    }
}

/// The factor on a variable item in a combination when `leading` (Q or W) leads: the full factor
/// for the leading case, × ψ0 for the other. Notional loads follow the vertical load they come
/// from and are never reduced.
pub fn variable_factor(comb: &Combination, item: &Item, leading: Option<Case>) -> f64 {
    let gamma = comb.variable_factor(item.case);
    match (comb.psi0, leading) {
        (Some(psi), Some(lead)) if item.case != lead && item.action != Action::Notional => {
            gamma
                * match item.case {
                    Case::Q => psi.imposed,
                    Case::W => psi.horizontal,
                    Case::G => 1.0,
                }
        }
        _ => gamma,
    }
}

/// The leading-action options a combination is evaluated for: one (`None`) without ψ0, else
/// imposed leading and horizontal leading.
pub fn leading_options(comb: &Combination) -> &'static [Option<Case>] {
    if comb.psi0.is_some() { &[Some(Case::Q), Some(Case::W)] } else { &[None] }
}

/// Exactly what a combination does, in words, for every output.
pub fn describe(comb: &Combination, levels: WorkingLevels) -> String {
    let f = comb.factors;
    let g = if f.g_unfavourable == f.g_favourable { format!("{:.2}·G", num(f.g_unfavourable)) } else { format!("{:.2}·G ({:.2} where it helps)", num(f.g_unfavourable), num(f.g_favourable)) };
    let imposed = match levels {
        WorkingLevels::AllAtOnce => "each imposed load where unfavourable",
        WorkingLevels::OneFullAdjacentHalf => "each imposed load where unfavourable (load-class loads: one working level in full with the worse adjacent level at half)",
    };
    let part = |q: f64, w: f64| {
        format!(
            "{g} + {:.2}·{imposed} + {:.2}·each identified horizontal force where unfavourable + the worst single direction of {:.2}·wind with {:.2}·notional load in that direction",
            num(q),
            num(w),
            num(w),
            num(comb.factors.w)
        )
    };
    match comb.psi0 {
        None => part(f.q, f.w),
        Some(psi) => format!(
            "worse of (imposed leading: {}) and (horizontal leading: {}); ψ0 = {} imposed, {} horizontal (EN 1990 6.10), notional load never reduced",
            part(f.q, f.w * psi.horizontal),
            part(f.q * psi.imposed, f.w),
            num(psi.imposed),
            num(psi.horizontal)
        ),
    }
}

/// Words on the diaphragm assumptions, when two were solved.
pub const DIAPHRAGM_ENVELOPE: &str = "where a diaphragm joins three or more braced planes, both the lever rule between adjacent planes and a rigid diaphragm (equal-stiffness planes, twist shared) are solved; the worse governs each plate";
