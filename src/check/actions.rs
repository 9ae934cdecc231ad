//! How the variable load items of a solution act together: which are independent and which are
//! alternatives.

use crate::scene::loads::Case;
use crate::scene::model::WorkingLevels;
use crate::solve::Item;

/// How the variable load items of a solution combine.
///
/// Vertical variable items are independent: each is present only where it makes things worse.
/// Horizontal variable items in the same plan direction act together (wind and notional load
/// from the same side), and the directions are alternatives: one direction at a time.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct VariableActions {
    /// Item indices of independent vertical variable loads.
    pub independent: Vec<usize>,
    /// Item indices of horizontal variable loads, one group per plan direction.
    pub by_direction: Vec<Vec<usize>>,
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
        let mut out = VariableActions::default();
        let mut keys: Vec<i64> = Vec::new();
        for (i, item) in items.iter().enumerate() {
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
            match item.direction_key() {
                None => out.independent.push(i),
                Some(k) => match keys.iter().position(|&x| x == k) {
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
