//! What the horizontal load path is, in words every output shows: the braced planes, where load
//! is shared between them (the diaphragms, and that it is nowhere else), how the notional load
//! was made, what each combination does; and at each plate the vertical components of the brace
//! forces it carries, from which braced bays.

use crate::check::actions::{describe, VariableActions, DIAPHRAGM_ENVELOPE};
use crate::scene::bracing::list_ids;
use crate::scene::loads::{Case, LoadKind};
use crate::scene::model::NotionalRule;
use crate::scene::validate::Model;
use crate::solve::{Action, Solution};

/// One braced plane, for outputs.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PlaneSummary {
    /// Name, e.g. `plane along x at y = 0.000 m (A1–G1)`.
    pub name: String,
    /// Highest level it is braced to from the ground, m (`None`: not counted at all).
    pub braced_to_m: Option<f64>,
    /// Why bracing above that is not counted.
    pub cut: Option<String>,
    /// Number of its diagonals (braces), over all lifts.
    pub diagonals: usize,
    /// Its braced bays in plan, e.g. `A1–B1`: the first few, then how many more.
    pub bays: Vec<String>,
}

/// How many braced bays of a plane are named in outputs.
pub const BAYS_NAMED: usize = 8;

/// The horizontal load path of a scene in words.
#[derive(Debug, Clone, PartialEq, Default, serde::Serialize)]
pub struct HorizontalSummary {
    /// Braced planes.
    pub planes: Vec<PlaneSummary>,
    /// One line per diaphragm and a closing line saying that load is shared nowhere else.
    pub diaphragms: Vec<String>,
    /// How the notional load was made.
    pub notional: String,
    /// Exactly what each combination does, in the scene's order.
    pub combinations: Vec<String>,
    /// How diaphragms shared load, when two ways were solved.
    pub sharing: Option<&'static str>,
    /// The braced bays in plan, as the posts at their two ends, in order along their plane
    /// ([`BraceAtPlate::bays`] indexes them; [`crate::Analysis::bay_names`] names them).
    pub bays: Vec<(u32, u32)>,
}

/// At one plate: the vertical components of the brace forces it carries (unfactored, kN) — the
/// largest push down and the largest pull up over the plan directions, diaphragm assumptions and
/// method passes, identified forces where unfavourable — and the braced bays they come from.
#[derive(Debug, Clone, PartialEq, Default, serde::Serialize)]
pub struct BraceAtPlate {
    /// Largest downward brace component, kN (≥ 0).
    pub max_kn: f64,
    /// Largest upward brace component, kN (≤ 0).
    pub min_kn: f64,
    /// Braced bays whose braces end on this plate's standard: indices into
    /// [`HorizontalSummary::bays`].
    pub bays: Vec<u32>,
}

/// The horizontal load path of a validated model, in words.
pub fn summary(model: &Model, solution: &Solution, bays: Vec<(u32, u32)>) -> HorizontalSummary {
    let scene = model.scene;
    let b = &model.bracing;
    let planes = b
        .planes
        .iter()
        .map(|p| {
            // The bays in plan (each may be braced in several lifts), the first few by name.
            let mut pairs: Vec<(u32, u32, u32)> = p.lifts.iter().flatten().map(|d| if d.run >= 0.0 { (d.lower, d.upper, d.brace) } else { (d.upper, d.lower, d.brace) }).collect();
            pairs.sort_unstable_by_key(|e| (e.0, e.1));
            pairs.dedup_by_key(|e| (e.0, e.1));
            let mut bays: Vec<String> = pairs.iter().take(BAYS_NAMED).map(|&(a, z, _)| format!("{}–{}", scene.posts[a as usize].id, scene.posts[z as usize].id)).collect();
            if pairs.len() > BAYS_NAMED {
                bays.push(format!("and {} more", pairs.len() - BAYS_NAMED));
            }
            PlaneSummary { name: p.name(scene), braced_to_m: p.braced_to.checked_sub(1).map(|k| p.levels[k]), cut: p.cut.clone(), diagonals: p.lifts.iter().map(Vec::len).sum(), bays }
        })
        .collect();
    let own: Vec<&str> = scene.loads.iter().filter(|l| matches!(l.kind, LoadKind::Notional { .. })).map(|l| l.id.as_str()).collect();
    let notional = if !own.is_empty() {
        format!("the scene's own notional loads ({}) stand instead of the rule", list_ids(own.into_iter(), 6))
    } else if scene.horizontal.notional == NotionalRule::Off {
        "none: the scene sets the notional load off".to_owned()
    } else {
        let generated: Vec<String> = solution.items.iter().filter(|i| i.action == Action::Notional && !i.note.is_empty()).map(|i| format!("{}: {}", i.id, i.note)).collect();
        let list = if generated.is_empty() { "none generated (no vertical load)".to_owned() } else { generated.join("; ") };
        format!("{} in each checked direction — {list}", scene.horizontal.notional.describe())
    };
    let actions = VariableActions::of(&solution.items, scene.analysis.working_levels);
    HorizontalSummary {
        planes,
        diaphragms: b.diaphragm_lines(scene),
        notional,
        combinations: scene.combinations.iter().map(|c| format!("{}: {}", c.name, describe(c, scene.analysis.working_levels))).collect(),
        sharing: (actions.variants > 1).then_some(DIAPHRAGM_ENVELOPE),
        bays,
    }
}

/// Brace components at every post (index by post), over all method passes, and the braced bays
/// they index.
pub fn brace_at_posts(model: &Model, solutions: &[Solution]) -> (Vec<BraceAtPlate>, Vec<(u32, u32)>) {
    let scene = model.scene;
    let n = scene.posts.len();
    let mut out = vec![BraceAtPlate::default(); n];
    for solution in solutions {
        let actions = VariableActions::of(&solution.items, scene.analysis.working_levels);
        for variant in 0..actions.variants {
            let (mut hi, mut lo) = (vec![0.0f64; n], vec![0.0f64; n]);
            for &i in &actions.independent {
                let item = &solution.items[i];
                if item.case != Case::W {
                    continue;
                }
                let r = item.variant(variant);
                for &(p, v) in r.vertical.iter().chain(r.internal) {
                    if v > 0.0 {
                        hi[p as usize] += v;
                    } else {
                        lo[p as usize] += v;
                    }
                }
            }
            let (mut worst_hi, mut worst_lo) = (vec![0.0f64; n], vec![0.0f64; n]);
            let mut group = vec![0.0f64; n];
            for g in &actions.by_direction {
                group.iter_mut().for_each(|v| *v = 0.0);
                for &i in g {
                    let r = solution.items[i].variant(variant);
                    for &(p, v) in r.vertical.iter().chain(r.internal) {
                        group[p as usize] += v;
                    }
                }
                for p in 0..n {
                    worst_hi[p] = worst_hi[p].max(group[p]);
                    worst_lo[p] = worst_lo[p].min(group[p]);
                }
            }
            for p in 0..n {
                out[p].max_kn = out[p].max_kn.max(hi[p] + worst_hi[p]);
                out[p].min_kn = out[p].min_kn.min(lo[p] + worst_lo[p]);
            }
        }
    }
    // The bays whose braces end on each standard, at its lowest post.
    let mut index: rustc_hash::FxHashMap<(u32, u32), u32> = Default::default();
    let mut bays: Vec<(u32, u32)> = Vec::new();
    for plane in &model.bracing.planes {
        for d in plane.lifts.iter().flatten() {
            let key = if d.run >= 0.0 { (d.lower, d.upper) } else { (d.upper, d.lower) };
            let bay = *index.entry(key).or_insert_with(|| {
                bays.push(key);
                (bays.len() - 1) as u32
            });
            for end in [d.lower, d.upper] {
                let low = model.bracing.standard[end as usize].0 as usize;
                if !out[low].bays.contains(&bay) {
                    out[low].bays.push(bay);
                }
            }
        }
    }
    (out, bays)
}
