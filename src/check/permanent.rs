//! How the permanent load acts at each plate: the parts that push it down and the parts that lift
//! it, kept apart so that each can take its own partial factor where equilibrium is checked.
//!
//! The parts are as fine as the trace keeps them: one share per load item, plate and route (a
//! bearer piece, a post's own weight, a kentledge…). A simply supported back span and the
//! overhang that lifts it are separate shares; loads summed onto one member before it shares
//! them (a deck's strips on one bearer, a continuous member) are one.

use rustc_hash::FxHashMap as HashMap;
use crate::scene::loads::Case;
use crate::scene::model::Scene;
use crate::solve::{Route, Solution};

/// Permanent load at one plate, split by what it does there. Reactions upward positive, kN.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct PermanentParts {
    /// Shares that press the plate down and may count where favourable.
    pub down_kn: f64,
    /// Shares that press the plate down but may not count where favourable: kentledge that could
    /// be taken away (removable or water-filled, not secured).
    pub down_unreliable_kn: f64,
    /// Shares that lift the plate (negative).
    pub up_kn: f64,
}

impl PermanentParts {
    /// All of it, kN.
    pub fn total(&self) -> f64 {
        self.down_kn + self.down_unreliable_kn + self.up_kn
    }
    /// The least the plate can carry with partial factors `favourable` on the parts that press
    /// it down and `unfavourable` on the parts that lift it; unreliable kentledge counts 0.
    pub fn minimum(&self, favourable: f64, unfavourable: f64) -> f64 {
        favourable * self.down_kn + unfavourable * self.up_kn
    }
    /// The most, whole permanent load with the worse of the two factors (one source, one factor).
    pub fn maximum(&self, favourable: f64, unfavourable: f64) -> f64 {
        let g = self.total();
        (unfavourable * g).max(favourable * g)
    }
}

/// Which items of a solution are permanent loads that may count where favourable: per item,
/// `None` for variable items.
pub fn favourable_items(scene: &Scene, solution: &Solution) -> Vec<Option<bool>> {
    let kinds: HashMap<&str, &crate::scene::loads::LoadKind> = scene.loads.iter().map(|l| (l.id.as_str(), &l.kind)).collect();
    solution.items.iter().map(|i| (i.case == Case::G).then(|| kinds.get(i.id.as_str()).is_none_or(|k| k.may_be_favourable()))).collect()
}

/// The permanent parts at every post of a solution, in post order: for a post with a base plate
/// its plate load, for any other the load it passes on.
///
/// A splice passes everything above it on unchanged, so the shares of a lift count at the post
/// below as they are (not netted into one share per load): a standard drawn as two lifts gives
/// the same parts as one drawn whole.
pub fn permanent_parts(scene: &Scene, solution: &Solution) -> Vec<PermanentParts> {
    let favourable = favourable_items(scene, solution);
    let n = solution.plates.len();
    let mut own = vec![PermanentParts::default(); n];
    // Posts spliced onto each post, from the trace.
    let mut above: Vec<Vec<u32>> = vec![Vec::new(); n];
    for c in &solution.contributions {
        let Some(reliable) = favourable[c.item as usize] else { continue };
        if let Route::Lift { from } = c.route {
            if !above[c.post as usize].contains(&from) {
                above[c.post as usize].push(from);
            }
            continue;
        }
        let p = &mut own[c.post as usize];
        if c.kn < 0.0 {
            p.up_kn += c.kn;
        } else if reliable {
            p.down_kn += c.kn;
        } else {
            p.down_unreliable_kn += c.kn;
        }
    }
    if above.iter().all(Vec::is_empty) {
        return own;
    }
    // Each post's own parts plus those of every lift above it, worked out from the top down.
    let mut out: Vec<Option<PermanentParts>> = vec![None; n];
    for start in 0..n {
        let mut stack = vec![start];
        while let Some(&q) = stack.last() {
            if out[q].is_some() {
                stack.pop();
                continue;
            }
            match above[q].iter().find(|&&p| out[p as usize].is_none()) {
                Some(&p) => stack.push(p as usize),
                None => {
                    let total = above[q].iter().fold(own[q], |t, &p| {
                        let u = out[p as usize].expect("done above");
                        PermanentParts { down_kn: t.down_kn + u.down_kn, down_unreliable_kn: t.down_unreliable_kn + u.down_unreliable_kn, up_kn: t.up_kn + u.up_kn }
                    });
                    out[q] = Some(total);
                    stack.pop();
                }
            }
        }
    }
    out.into_iter().map(|p| p.expect("every post done")).collect()
}
