//! Bearers on a single post (T-heads): the moment about the post must balance, or stay within a
//! head moment capacity the support type states, in every arrangement of the variable loads.
//!
//! Permanent loads act together, so their moments may cancel. Each variable load may act alone,
//! and an arranged load may load one arm alone: the worst is the permanent moment plus every
//! variable part that turns the head one way, and the same the other way.

use crate::scene::validate::Model;

/// Relative tolerance below which a head counts as balanced (rounding of the moment sums).
const BALANCED_RELATIVE: f64 = 1e-9;

/// Moments about the post of one single-post bearer.
#[derive(Debug, Clone, Default)]
struct Head {
    permanent: f64,
    /// Σ of the variable parts turning it each way (≥ 0 and ≤ 0).
    one_way: f64,
    other_way: f64,
    /// Largest variable part each way, with its load id, for the message.
    worst_one_way: (f64, String),
    worst_other_way: (f64, String),
    /// Σ |moment| of everything seen, for the tolerance.
    scale: f64,
}

/// A T-head that stands only because its support type's head takes a moment.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct HeadMoment {
    /// Bearer index.
    pub bearer: usize,
    /// Post index it rests on.
    pub post: usize,
    /// Worst moment about the post, kN·m (absolute).
    pub moment_knm: f64,
    /// The head's moment capacity, kN·m.
    pub capacity_knm: f64,
}

/// Why a T-head does not stand.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("bearer {bearer} rests on a single post, {post}, and tips: {moment_knm:.3} kN·m about the post is out of balance {when}{capacity}; give the head a moment capacity on the post's support type (from the maker's data), or tie the bearer back to a neighbouring standard with a ledger (draw it as a bearer on both posts)")]
pub struct TeeHeadTips {
    /// Bearer id.
    pub bearer: String,
    /// Post id.
    pub post: String,
    /// Out-of-balance moment, kN·m.
    pub moment_knm: f64,
    /// When: which load or arrangement.
    pub when: String,
    /// The capacity it exceeds, in words (empty if none is stated).
    pub capacity: String,
}

/// Collects the moments of every T-head over the load items of one solution.
#[derive(Debug, Default)]
pub(super) struct TeeHeads {
    heads: rustc_hash::FxHashMap<usize, Head>,
}

impl TeeHeads {
    /// Moments of a permanent item: (bearer, moment, scale) per single-post bearer reached.
    pub(super) fn permanent(&mut self, moments: &[(usize, f64, f64)]) {
        for &(b, m, scale) in moments {
            let h = self.heads.entry(b).or_default();
            h.permanent += m;
            h.scale += scale.max(m.abs());
        }
    }

    /// Moments of a variable item (`load` its id), each way on its own: a whole load gives one
    /// moment per head (one way or the other), an arranged load both ways.
    pub(super) fn variable(&mut self, b: usize, one_way: f64, other_way: f64, scale: f64, load: &str) {
        let h = self.heads.entry(b).or_default();
        let (pos, neg) = (one_way.max(0.0) + other_way.max(0.0), one_way.min(0.0) + other_way.min(0.0));
        h.one_way += pos;
        h.other_way += neg;
        h.scale += scale.max(pos - neg);
        if pos > h.worst_one_way.0 {
            h.worst_one_way = (pos, load.to_owned());
        }
        if neg < h.worst_other_way.0 {
            h.worst_other_way = (neg, load.to_owned());
        }
    }

    /// Every head must balance, or stay within its support type's head moment capacity. Returns
    /// the heads that rely on that capacity.
    pub(super) fn check(&self, model: &Model) -> Result<Vec<HeadMoment>, TeeHeadTips> {
        let scene = model.scene;
        let mut heads: Vec<(&usize, &Head)> = self.heads.iter().collect();
        heads.sort_unstable_by_key(|e| *e.0);
        let mut relying = Vec::new();
        for (&b, h) in heads {
            let post = model.bearers[b].posts[0];
            let capacity = model.post_support[post].and_then(|s| scene.support_types[s].head_moment_capacity_knm);
            let ways = [(h.permanent + h.one_way, &h.worst_one_way), (h.permanent + h.other_way, &h.worst_other_way)];
            let (m, worst) = ways.into_iter().max_by(|a, b| a.0.abs().total_cmp(&b.0.abs())).expect("two ways");
            if m.abs() <= BALANCED_RELATIVE * h.scale.max(1e-9) {
                continue;
            }
            let when = if worst.1.is_empty() { "under the permanent load".to_owned() } else { format!("under load {} on one arm (with every variable load placed where it turns the head that way)", worst.1) };
            match capacity {
                Some(c) if m.abs() <= c => relying.push(HeadMoment { bearer: b, post, moment_knm: m.abs(), capacity_knm: c }),
                _ => {
                    return Err(TeeHeadTips {
                        bearer: scene.bearers[b].id.clone(),
                        post: scene.posts[post].id.clone(),
                        moment_knm: m.abs(),
                        when,
                        capacity: capacity.map_or(String::new(), |c| format!(", more than the head's capacity of {c:.3} kN·m")),
                    });
                }
            }
        }
        Ok(relying)
    }
}
