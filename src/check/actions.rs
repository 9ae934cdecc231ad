//! How the variable load items of a solution act together: which are independent and which are
//! alternatives.

use crate::scene::loads::Case;
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
}

impl VariableActions {
    /// Sort the variable (Q and W) items of a solution into independent ones and direction groups.
    pub fn of(items: &[Item]) -> Self {
        let mut out = VariableActions::default();
        let mut keys: Vec<i64> = Vec::new();
        for (i, item) in items.iter().enumerate() {
            if item.case == Case::G {
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
        out
    }
}
