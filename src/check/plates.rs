//! Checking each base plate: combined loads, uplift, load on the jack and pressure on the ground.

use crate::check::bearing::Ground;
use crate::check::permanent::PermanentParts;
use crate::scene::combination::Combination;
use crate::scene::model::Scene;
use crate::scene::validate::Model;
use crate::solve::Solution;

/// A reaction below this (kN) counts as uplift; above zero by this margin only to ignore
/// rounding noise of the sums.
pub const UPLIFT_TOLERANCE_KN: f64 = 1e-6;

/// State of one base plate.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
pub struct Status {
    /// Load or bearing pressure above capacity.
    pub over: bool,
    /// The plate is pulled up (negative minimum load).
    pub uplift: bool,
    /// Friction cannot hold the plate's base shear: it must be restrained.
    #[serde(default)]
    pub slides: bool,
}

impl Status {
    /// Neither over capacity, nor lifting, nor sliding.
    pub fn is_ok(self) -> bool {
        !self.over && !self.uplift && !self.slides
    }
    /// Every finding of two statuses.
    pub fn or(self, o: Status) -> Status {
        Status { over: self.over || o.over, uplift: self.uplift || o.uplift, slides: self.slides || o.slides }
    }
    /// Short label: OK, or the findings joined by `+` (OVER, UPLIFT, SLIDES).
    pub fn label(self) -> &'static str {
        match (self.over, self.uplift, self.slides) {
            (false, false, false) => "OK",
            (true, false, false) => "OVER",
            (false, true, false) => "UPLIFT",
            (true, true, false) => "OVER+UPLIFT",
            (false, false, true) => "SLIDES",
            (true, false, true) => "OVER+SLIDES",
            (false, true, true) => "UPLIFT+SLIDES",
            (true, true, true) => "OVER+UPLIFT+SLIDES",
        }
    }
}

impl std::fmt::Display for Status {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.label())
    }
}

/// What one post's base is checked against for its load (its bearing is [`Ground`]'s).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct PostCapacity {
    /// Safe working load of its base jack / plate, kN; infinite where it has no support type.
    pub swl_kn: f64,
}

/// What each post's base is checked against, in post order: its support's safe working load, if
/// it has a support type (a post standing on another member may have none).
pub fn capacities(model: &Model) -> Vec<PostCapacity> {
    let scene = model.scene;
    (0..scene.posts.len()).map(|p| PostCapacity { swl_kn: model.post_support[p].map_or(f64::INFINITY, |s| scene.support_types[s].swl_kn) }).collect()
}

/// One plate under one combination.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct PlateCombination {
    /// Largest combined downward load, kN.
    pub max_kn: f64,
    /// Smallest combined load, kN (negative: uplift).
    pub min_kn: f64,
    /// max load ÷ safe working load.
    pub load_utilisation: f64,
    /// Ground pressure at formation level under the maximum load, kPa: the plate's own spread
    /// pressure or its overlap group's, whichever is larger, plus the granular layer's weight
    /// when the allowable is gross ([`crate::check::bearing`]).
    pub bearing_kpa: f64,
    /// Formation pressure ÷ allowable; `None` when no allowable is entered (not checked).
    pub bearing_utilisation: Option<f64>,
    /// Pressure on the top of the granular layer under the plate or sole board, kPa; `None`
    /// without a layer.
    pub layer_top_kpa: Option<f64>,
    /// Layer-top pressure ÷ the layer's allowable; `None` when not checked.
    pub layer_utilisation: Option<f64>,
    /// The largest of the utilisations that are checked.
    pub utilisation: f64,
    /// What this combination finds (only the checks it is set to make).
    pub status: Status,
    /// Method pass ([`crate::solve::method_passes`]) that gives `max_kn`: the first of equals.
    pub max_method: usize,
    /// Method pass that gives `min_kn`: the first of equals.
    pub min_method: usize,
}

impl PlateCombination {
    /// Set the bearing pressures and finish the utilisation and status.
    pub fn set_bearing(&mut self, p: crate::check::bearing::Pressures, comb: &Combination) {
        self.bearing_kpa = p.formation_kpa;
        self.bearing_utilisation = p.formation_utilisation;
        self.layer_top_kpa = p.layer_top_kpa;
        self.layer_utilisation = p.layer_utilisation;
        self.utilisation = [p.formation_utilisation, p.layer_utilisation].into_iter().flatten().fold(self.load_utilisation, f64::max);
        self.status.over = comb.checks_capacity && self.utilisation > 1.0 + 1e-9;
    }
    /// What governs the utilisation, in words: `safe working load`, `ground bearing` (at
    /// formation) or `granular layer` (on its top).
    pub fn governed_by(&self) -> &'static str {
        let b = self.bearing_utilisation.unwrap_or(f64::NEG_INFINITY);
        let l = self.layer_utilisation.unwrap_or(f64::NEG_INFINITY);
        if self.load_utilisation >= b && self.load_utilisation >= l {
            "safe working load"
        } else if b >= l {
            "ground bearing"
        } else {
            "granular layer"
        }
    }
}

/// Combine the case reactions of every plate under every combination.
///
/// Permanent load takes, per plate, whichever of its two factors is worse for the value sought;
/// each imposed load and each identified horizontal force is added only where it makes that value
/// worse (under the working-scaffold rule, the load-class loads of one working level in full with
/// the worse adjacent level at half), and of wind with notional load the worst single plan
/// direction is taken ([`crate::check::actions::VariableActions`]). For the minimum, a notional load counts with
/// the part due to permanent load, or whole where the part due to the variable load lifts the
/// post (that load may be present while pressing nothing here). With ψ0
/// set, each variable case leads in turn; where diaphragms were solved both ways, each way in
/// turn; the worse governs every plate.
///
/// Every post gets a result: the plate load of a post with a base plate, the load passed on at the
/// base of any other (where a negative minimum is tension through a splice or a post lifting off
/// what it stands on).
pub fn combine(scene: &Scene, solution: &Solution, caps: &[PostCapacity], ground: &Ground) -> Vec<Vec<PlateCombination>> {
    combine_with(scene, solution, &crate::check::permanent::permanent_parts(scene, solution), caps, ground)
}

/// [`combine`] with the permanent parts at every post already split
/// ([`crate::check::permanent::permanent_parts`]).
fn combine_with(scene: &Scene, solution: &Solution, permanent: &[PermanentParts], caps: &[PostCapacity], ground: &Ground) -> Vec<Vec<PlateCombination>> {
    let n = solution.plates.len();
    let mut out = vec![Vec::with_capacity(scene.combinations.len()); n];
    let (mut hi, mut lo) = (vec![0.0; n], vec![0.0; n]);
    let (mut best_hi, mut best_lo) = (vec![0.0; n], vec![0.0; n]);
    let (mut group_hi, mut group_lo) = (vec![0.0; n], vec![0.0; n]);
    let mut scratch = NotionalScratch::new(n);
    let actions = crate::check::actions::VariableActions::of(&solution.items, scene.analysis.working_levels);
    for comb in &scene.combinations {
        let f = comb.factors;
        best_hi.iter_mut().for_each(|v| *v = f64::NEG_INFINITY);
        best_lo.iter_mut().for_each(|v| *v = f64::INFINITY);
        // Each leading action (with ψ0) and each diaphragm assumption is a way the structure may
        // be loaded; the worse governs each plate.
        for &leading in crate::check::actions::leading_options(comb) {
            for variant in 0..actions.variants {
                // The parts of the permanent load that press a post down and those that lift it
                // take their own factors for the minimum; the maximum takes the whole with the
                // worse factor.
                for p in 0..n {
                    hi[p] = permanent[p].maximum(f.g_favourable, f.g_unfavourable);
                    lo[p] = permanent[p].minimum(f.g_favourable, f.g_unfavourable);
                }
                for &i in &actions.independent {
                    let item = &solution.items[i];
                    let gamma = crate::check::actions::variable_factor(comb, item, leading);
                    add_variable(item, gamma, variant, &mut hi, &mut lo);
                }
                // Working levels: one level in full with the worse adjacent one at half, at each post.
                if !actions.by_level.is_empty() {
                    let per_level: Vec<(Vec<f64>, Vec<f64>)> = actions
                        .by_level
                        .iter()
                        .map(|(_, group)| {
                            let (mut h, mut l) = (vec![0.0; n], vec![0.0; n]);
                            for &i in group {
                                let item = &solution.items[i];
                                let gamma = crate::check::actions::variable_factor(comb, item, leading);
                                add_variable(item, gamma, variant, &mut h, &mut l);
                            }
                            (h, l)
                        })
                        .collect();
                    let share = crate::check::actions::ADJACENT_LEVEL_SHARE;
                    for p in 0..n {
                        let (mut level_hi, mut level_lo) = (0.0f64, 0.0f64);
                        for k in 0..per_level.len() {
                            let adjacent = |f: &dyn Fn(&(Vec<f64>, Vec<f64>)) -> f64, pick: fn(f64, f64) -> f64| {
                                let below = k.checked_sub(1).map(|j| f(&per_level[j]));
                                let above = per_level.get(k + 1).map(f);
                                match (below, above) {
                                    (Some(a), Some(b)) => pick(a, b),
                                    (Some(a), None) | (None, Some(a)) => a,
                                    (None, None) => 0.0,
                                }
                            };
                            let h = per_level[k].0[p] + share * adjacent(&|x| x.0[p], f64::max);
                            let l = per_level[k].1[p] + share * adjacent(&|x| x.1[p], f64::min);
                            level_hi = level_hi.max(h);
                            level_lo = level_lo.min(l);
                        }
                        hi[p] += level_hi;
                        lo[p] += level_lo;
                    }
                }
                // Wind and notional directions are alternatives: the worst single direction counts.
                if !actions.by_direction.is_empty() {
                    let (mut worst_hi, mut worst_lo) = (vec![0.0f64; n], vec![0.0f64; n]);
                    for group in &actions.by_direction {
                        group_hi.iter_mut().for_each(|v| *v = 0.0);
                        group_lo.iter_mut().for_each(|v| *v = 0.0);
                        for &i in group {
                            let item = &solution.items[i];
                            let gamma = crate::check::actions::variable_factor(comb, item, leading);
                            let r = item.variant(variant);
                            for &(p, v) in r.vertical.iter().chain(r.internal) {
                                group_hi[p as usize] += gamma * v;
                            }
                            match r.permanent {
                                // A notional load: the part due to permanent load always; the
                                // part due to the variable load only where it lifts the plate
                                // more (that load may be present elsewhere, pressing nothing here).
                                Some(perm) => add_notional_minimum(perm, r.vertical.iter().chain(r.internal), gamma, &mut group_lo, &mut scratch),
                                None => r.vertical.iter().chain(r.internal).for_each(|&(p, v)| group_lo[p as usize] += gamma * v),
                            }
                        }
                        for p in 0..n {
                            worst_hi[p] = worst_hi[p].max(group_hi[p]);
                            worst_lo[p] = worst_lo[p].min(group_lo[p]);
                        }
                    }
                    for p in 0..n {
                        hi[p] += worst_hi[p];
                        lo[p] += worst_lo[p];
                    }
                }
                for p in 0..n {
                    best_hi[p] = best_hi[p].max(hi[p]);
                    best_lo[p] = best_lo[p].min(lo[p]);
                }
            }
        }
        for p in 0..n {
            out[p].push(plate_combination(comb, best_hi[p], best_lo[p], caps[p]));
        }
    }
    ground.fill(&scene.combinations, &mut out);
    out
}

/// Per-post sums of one notional item's two reaction sets, reused between items.
pub(crate) struct NotionalScratch {
    permanent: Vec<f64>,
    full: Vec<f64>,
    touched: Vec<u32>,
}

impl NotionalScratch {
    pub(crate) fn new(n: usize) -> Self {
        NotionalScratch { permanent: vec![0.0; n], full: vec![0.0; n], touched: Vec::new() }
    }
}

/// Add a notional item to the minimum at every post it reaches: `gamma` × the lower of its
/// reaction due to permanent load alone (`permanent`) and its whole reaction (`full`, due to the
/// permanent and the variable load together).
pub(crate) fn add_notional_minimum<'a>(permanent: &[(u32, f64)], full: impl Iterator<Item = &'a (u32, f64)>, gamma: f64, lo: &mut [f64], s: &mut NotionalScratch) {
    for &(p, v) in permanent {
        if s.permanent[p as usize] == 0.0 && s.full[p as usize] == 0.0 {
            s.touched.push(p);
        }
        s.permanent[p as usize] += v;
    }
    for &(p, v) in full {
        if s.permanent[p as usize] == 0.0 && s.full[p as usize] == 0.0 {
            s.touched.push(p);
        }
        s.full[p as usize] += v;
    }
    for p in s.touched.drain(..) {
        let p = p as usize;
        lo[p] += gamma * s.permanent[p].min(s.full[p]);
        s.permanent[p] = 0.0;
        s.full[p] = 0.0;
    }
}

/// Add one independent variable item (factor `gamma` already chosen) to the maximum and minimum
/// at every post it reaches, under diaphragm assumption `variant`.
fn add_variable(item: &crate::solve::Item, gamma: f64, variant: usize, hi: &mut [f64], lo: &mut [f64]) {
    match &item.arranged {
        // Arranged: at each post, the cells that push it down for the maximum and those that
        // lift it for the minimum.
        Some(arranged) => {
            for &(p, down, up) in &arranged.extremes {
                hi[p as usize] += gamma * down;
                lo[p as usize] += gamma * up;
            }
        }
        // Whole: present everywhere or not at all, whichever is worse.
        None => {
            let r = item.variant(variant);
            for &(p, v) in r.vertical.iter().chain(r.internal) {
                let v = gamma * v;
                if v > 0.0 {
                    hi[p as usize] += v;
                } else {
                    lo[p as usize] += v;
                }
            }
        }
    }
}

/// One post under one combination, with everything but the bearing
/// ([`PlateCombination::set_bearing`] adds it).
fn plate_combination(comb: &Combination, max_kn: f64, min_kn: f64, cap: PostCapacity) -> PlateCombination {
    let load_utilisation = max_kn.max(0.0) / cap.swl_kn;
    let status = Status { over: comb.checks_capacity && load_utilisation > 1.0 + 1e-9, uplift: comb.checks_uplift && min_kn < -UPLIFT_TOLERANCE_KN, slides: false };
    PlateCombination {
        max_kn,
        min_kn,
        load_utilisation,
        bearing_kpa: 0.0,
        bearing_utilisation: None,
        layer_top_kpa: None,
        layer_utilisation: None,
        utilisation: load_utilisation,
        status,
        max_method: 0,
        min_method: 0,
    }
}

/// Relative margin by which a later method pass must exceed an earlier one to govern: below it
/// the two are the same number up to rounding, and the earlier (primary) pass is named.
pub const METHOD_TIE_RELATIVE: f64 = 1e-9;

/// Combined plate loads of several method passes of one scene.
#[derive(Debug, Clone, PartialEq)]
pub struct MethodEnvelope {
    /// Per plate and combination: the largest maximum and the smallest minimum over the passes,
    /// checked as one, with the pass that gave each.
    pub envelope: Vec<Vec<PlateCombination>>,
    /// The same per pass: `[pass][plate][combination]`.
    pub by_method: Vec<Vec<Vec<PlateCombination>>>,
}

/// [`combine`] every solution (one per method pass, in pass order) and take, per plate and
/// combination, the larger maximum and the smaller minimum. The structure's behaviour is one for
/// all loads of a combination, so each pass is combined whole before the envelope is taken.
/// `permanent[pass]` holds the permanent parts at every post of each solution.
pub fn combine_envelope(scene: &Scene, solutions: &[Solution], permanent: &[Vec<PermanentParts>], caps: &[PostCapacity], ground: &Ground) -> MethodEnvelope {
    let by_method: Vec<_> = solutions.iter().zip(permanent).map(|(s, parts)| combine_with(scene, s, parts, caps, ground)).collect();
    let n = solutions.first().map_or(0, |s| s.plates.len());
    let mut envelope: Vec<Vec<PlateCombination>> = (0..n)
        .map(|p| {
            scene
                .combinations
                .iter()
                .enumerate()
                .map(|(c, comb)| {
                    let (mut hi, mut lo) = ((f64::NEG_INFINITY, 0), (f64::INFINITY, 0));
                    for (m, per_plate) in by_method.iter().enumerate() {
                        let pc = per_plate[p][c];
                        if pc.max_kn > hi.0 + METHOD_TIE_RELATIVE * hi.0.abs().max(1.0) || m == 0 {
                            hi = (pc.max_kn, m);
                        }
                        if pc.min_kn < lo.0 - METHOD_TIE_RELATIVE * lo.0.abs().max(1.0) || m == 0 {
                            lo = (pc.min_kn, m);
                        }
                    }
                    let mut out = plate_combination(comb, hi.0, lo.0, caps[p]);
                    out.max_method = hi.1;
                    out.min_method = lo.1;
                    out
                })
                .collect()
        })
        .collect();
    ground.fill(&scene.combinations, &mut envelope);
    MethodEnvelope { envelope, by_method }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn status_labels() {
        // common practice, no source
        assert_eq!(Status::default().label(), "OK");
        assert_eq!(Status { over: true, uplift: true, slides: false }.to_string(), "OVER+UPLIFT");
        assert_eq!(Status { over: false, uplift: true, slides: true }.to_string(), "UPLIFT+SLIDES");
    }
}
