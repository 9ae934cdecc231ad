//! Sliding: base shear against friction, plate by plate and for each structure as a whole.
//!
//! Friction at a plate is μ × the least vertical load it carries while the horizontal load acts:
//! the permanent load (favourable and unfavourable parts apart), less any imposed load that lifts
//! it, with the vertical reactions of the horizontal loads of that direction (the same loads
//! that shear it: their pull on the windward plates and their push on the leeward ones); a plate
//! that lifts has no friction. μ is the lowest lower-bound coefficient of the interfaces of its support type
//! ([`crate::scene::model::Interface`]); where none is given, sliding is not checked and says so.
//!
//! Two forms, as for overturning: the factor of safety (friction ÷ horizontal load, unfactored)
//! against the scene's target, and the equilibrium form with the partial factors of the
//! stability settings (horizontal load × γ against friction from the factored least vertical
//! load). Horizontal loads in one plan direction act together; each direction is checked.

use crate::check::actions::VariableActions;
use crate::check::permanent::PermanentParts;
use crate::check::stability::direction_words;
use crate::scene::loads::Case;
use crate::scene::model::Scene;
use crate::solve::Solution;

/// Base shear below this, kN, is none.
pub const NO_SHEAR_KN: f64 = 1e-9;

/// One plate's sliding check, in its worst direction.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PlateSliding {
    /// Friction coefficient used; `None`: not given for its support type, not checked.
    pub mu: Option<f64>,
    /// Direction of the horizontal loads of the worst case.
    pub towards: String,
    /// Base shear, kN (unfactored).
    pub shear_kn: f64,
    /// Least vertical load with it, kN (unfactored; negative lifts).
    pub normal_kn: f64,
    /// μ × that load (0 if it lifts) ÷ shear; `None` when not checked.
    pub factor: Option<f64>,
    /// Base shear × partial factors, kN.
    pub equ_shear_kn: f64,
    /// μ × the factored least vertical load, kN (0 if it lifts or μ is unknown).
    pub equ_friction_kn: f64,
    /// Horizontal restraint the plate needs to meet both forms, kN (0 when friction suffices).
    pub restraint_kn: f64,
    /// Whether it must be restrained.
    pub slides: bool,
}

/// One structure under the horizontal loads of one direction.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SlidingCheck {
    /// Which structure ([`crate::check::stability::Structure::label`]).
    pub structure: String,
    /// Direction of the horizontal loads, with their ids.
    pub towards: String,
    /// Total horizontal load on the structure, kN (unfactored).
    pub horizontal_kn: f64,
    /// Σ μ × least vertical load over its plates, kN.
    pub friction_kn: f64,
    /// Friction ÷ horizontal load; `None` when not checked.
    pub factor: Option<f64>,
    /// Whether the factor meets the target.
    pub meets_target: bool,
    /// Horizontal load × partial factors, kN.
    pub equ_horizontal_kn: f64,
    /// Friction from the factored least vertical loads, kN.
    pub equ_friction_kn: f64,
    /// Whether the factored horizontal load is within that friction.
    pub equ_ok: bool,
    /// Why it is not checked, when it is not.
    pub not_checked: Option<String>,
}

/// The sliding summary.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Sliding {
    /// Target factor of safety against sliding.
    pub target_factor: f64,
    /// Each structure in each direction with horizontal load.
    pub checks: Vec<SlidingCheck>,
    /// Number of plates that must be restrained.
    pub plates_to_restrain: usize,
    /// Per plate (not written here; each plate's result carries its own, and this list is
    /// emptied when the analysis hands them over).
    #[serde(skip)]
    pub plates: Vec<Option<PlateSliding>>,
    /// The room each plate leaves against sliding for a load yet to be placed (not written out).
    #[serde(skip)]
    pub rooms: PlateRooms,
    /// Per plate (by post), the friction coefficient taken; `None` where none is given (not
    /// written out).
    #[serde(skip)]
    pub mu: Vec<Option<f64>>,
}

/// The room each plate leaves against sliding, per method pass, plate (by post), direction
/// group and diaphragm assumption: μ × least vertical load − target × base shear (kN,
/// factor-of-safety form), factored friction − factored base shear (kN, EQU form), and the base
/// shear already there (kN). Infinite rooms where the plate has no friction coefficient.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PlateRooms {
    /// Per direction group: the direction of its horizontal loads (as
    /// [`crate::solve::items::direction_key_of`]); `None` for the permanent horizontal load alone.
    pub groups: Vec<Option<i64>>,
    /// Number of diaphragm assumptions (1, or 2: lever rule, then rigid).
    pub variants: usize,
    posts: usize,
    rooms: Vec<[f64; 3]>,
}

impl PlateRooms {
    fn new(passes: usize, posts: usize, groups: Vec<Option<i64>>, variants: usize) -> Self {
        let rooms = vec![[f64::INFINITY, f64::INFINITY, 0.0]; passes * posts * groups.len() * variants];
        PlateRooms { groups, variants, posts, rooms }
    }
    fn at(&self, pass: usize, post: usize, group: usize, variant: usize) -> usize {
        ((pass * self.posts + post) * self.groups.len() + group) * self.variants + variant
    }
    /// The room at plate `post` in method pass `pass`, direction group `group` and diaphragm
    /// assumption `variant`; `None` out of range.
    pub fn get(&self, pass: usize, post: usize, group: usize, variant: usize) -> Option<[f64; 3]> {
        (post < self.posts && group < self.groups.len() && variant < self.variants).then(|| self.rooms.get(self.at(pass, post, group, variant)).copied()).flatten()
    }
    /// Whether the plate takes base shear already, in any pass, direction or assumption.
    pub fn sheared(&self, post: usize) -> bool {
        let per = self.groups.len() * self.variants;
        (0..self.rooms.len() / (self.posts * per).max(1)).any(|pass| (0..per).any(|k| self.rooms[(pass * self.posts + post) * per + k][2] > NO_SHEAR_KN))
    }
}

impl Sliding {
    /// Whether any structure or plate fails, or a check that is needed could not be made.
    pub fn fails(&self) -> bool {
        self.checks.iter().any(|c| c.not_checked.is_none() && !(c.meets_target && c.equ_ok)) || self.plates_to_restrain > 0
    }
    /// Checks that could not be made, with the reason.
    pub fn not_checked(&self) -> impl Iterator<Item = &SlidingCheck> {
        self.checks.iter().filter(|c| c.not_checked.is_some())
    }
    /// The check with the lowest factor.
    pub fn lowest(&self) -> Option<&SlidingCheck> {
        self.checks.iter().filter(|c| c.factor.is_some()).min_by(|a, b| a.factor.unwrap_or(f64::INFINITY).total_cmp(&b.factor.unwrap_or(f64::INFINITY)))
    }
}

/// Per plate and direction: shear and least vertical load, both forms.
#[derive(Debug, Clone, Copy, Default)]
struct Case2 {
    shear: [f64; 2],
    shear_d: [f64; 2],
    normal: f64,
    normal_d: f64,
}

/// Length of a plan vector (shears here are far from overflow, so no `hypot` needed).
fn norm(v: [f64; 2]) -> f64 {
    (v[0] * v[0] + v[1] * v[1]).sqrt()
}

/// The worst direction so far at one plate.
#[derive(Debug, Clone, Copy)]
struct Worst {
    group: usize,
    shear: f64,
    normal: f64,
    factor: Option<f64>,
    shear_d: f64,
    friction_d: f64,
    restraint: f64,
}

/// Check sliding of every plate and structure; `solutions` are the method passes (the worst is
/// kept) with the permanent parts at every post of each (`permanent[pass][post]`),
/// `structure_plates` and `labels` from the stability check.
pub fn sliding(scene: &Scene, solutions: &[Solution], permanent: &[Vec<PermanentParts>], post_support: &[Option<usize>], structure_plates: &[Vec<u32>], labels: &[String]) -> Sliding {
    let settings = &scene.stability;
    let f = settings.equilibrium;
    let target = settings.sliding_target_factor;
    let n = solutions[0].plates.len();
    let mu: Vec<Option<f64>> = (0..n).map(|p| post_support[p].and_then(|s| scene.support_types[s].friction()).map(|(m, _)| m)).collect();
    // Every imposed load that lifts a plate counts, on every working level (the more cautious).
    let actions = VariableActions::of(&solutions[0].items, crate::scene::model::WorkingLevels::AllAtOnce);
    let items0 = &solutions[0].items;
    // Direction groups (wind and notional of one direction), by item id: a method pass may hold
    // other items than the primary one. Identified forces are independent and present wherever
    // unfavourable: each joins every group it does not oppose (or forms the only group).
    let identified: Vec<usize> = actions.independent.iter().copied().filter(|&i| items0[i].direction.is_some()).collect();
    let mut groups: Vec<Vec<usize>> = actions.by_direction.clone();
    // Without wind or notional load, each direction of the identified forces leads in turn
    // (forces that oppose each other never act together to cancel).
    if groups.is_empty() {
        for &i in &identified {
            let k = items0[i].direction_key();
            if !groups.iter().any(|g| items0[g[0]].direction_key() == k) {
                groups.push(vec![i]);
            }
        }
    }
    for group in &mut groups {
        let Some(d) = group.first().and_then(|&i| items0[i].direction) else { continue };
        for &i in &identified {
            let e = items0[i].direction.unwrap_or([0.0; 2]);
            if d[0] * e[0] + d[1] * e[1] > -1e-9 && !group.contains(&i) {
                group.push(i);
            }
        }
    }
    // With no horizontal load of any direction, one group of none: the permanent horizontal
    // load alone, if any, and the friction a load yet to be placed would work against.
    if groups.is_empty() {
        groups.push(Vec::new());
    }
    let group_ids: Vec<Vec<&str>> = groups.iter().map(|g| g.iter().map(|&i| items0[i].id.as_str()).collect()).collect();
    let towards: Vec<String> = groups
        .iter()
        .map(|group| match group.first() {
            Some(&i) => {
                let items = &solutions[0].items;
                let ids: Vec<&str> = group.iter().map(|&k| items[k].id.as_str()).collect();
                format!("towards {}: {}", items[i].direction.map_or_else(String::new, direction_words), ids.join(", "))
            }
            None => "permanent horizontal load".to_owned(),
        })
        .collect();
    let mut worst: Vec<Option<Worst>> = vec![None; n];
    // Per structure and group: the worst over passes.
    let mut checks: Vec<Option<SlidingCheck>> = vec![None; structure_plates.len() * groups.len()];
    let mut cases = vec![Case2::default(); n];
    let (mut lift, mut lift_d, mut g_shear) = (vec![0.0; n], vec![0.0; n], vec![[0.0; 2]; n]);
    let variants = solutions.iter().flat_map(|s| &s.items).map(|i| i.variant_count()).max().unwrap_or(1);
    let mut notional_normal = vec![0.0; n];
    let mut scratch = crate::check::plates::NotionalScratch::new(n);
    let mut rooms = PlateRooms::new(solutions.len(), n, groups.iter().map(|g| g.first().and_then(|&i| items0[i].direction_key())).collect(), variants);
    for (pass, (sol, parts)) in solutions.iter().zip(permanent).enumerate() {
        let index: rustc_hash::FxHashMap<&str, usize> = sol.items.iter().enumerate().map(|(i, it)| (it.id.as_str(), i)).collect();
        // Imposed (and other vertical variable) loads that lift a plate: always with it.
        lift.iter_mut().for_each(|v| *v = 0.0);
        lift_d.iter_mut().for_each(|v| *v = 0.0);
        for item in sol.items.iter().filter(|i| i.case != Case::G && i.direction.is_none()) {
            let y = f.unfavourable(item.case);
            let mut add = |p: u32, v: f64| {
                if v < 0.0 && sol.is_plate[p as usize] {
                    lift[p as usize] += v;
                    lift_d[p as usize] += y * v;
                }
            };
            match &item.arranged {
                // An arranged load: the cells that lift the plate.
                Some(arranged) => arranged.extremes.iter().for_each(|&(p, _, up)| add(p, up)),
                None => item.vertical.iter().for_each(|&(p, v)| add(p, v)),
            }
        }
        // Permanent horizontal loads: always there.
        g_shear.iter_mut().for_each(|v| *v = [0.0; 2]);
        for item in sol.items.iter().filter(|i| i.case == Case::G && i.direction.is_some()) {
            for &(p, s) in &item.shear {
                g_shear[p as usize][0] += s[0];
                g_shear[p as usize][1] += s[1];
            }
        }
        for (g, variant) in (0..group_ids.len()).flat_map(|g| (0..variants).map(move |v| (g, v))) {
            let group = &group_ids[g];
            for (p, c) in cases.iter_mut().enumerate() {
                *c = Case2 {
                    shear: g_shear[p],
                    shear_d: [f.g_unfavourable * g_shear[p][0], f.g_unfavourable * g_shear[p][1]],
                    normal: parts[p].minimum(1.0, 1.0) + lift[p],
                    normal_d: parts[p].minimum(f.g_favourable, f.g_unfavourable) + lift_d[p],
                };
            }
            // The group's own vertical effect, both ways: the loads that shear the plate press it
            // down or pull it up at the same time. A notional load counts with its share due to
            // permanent load only (the imposed load it would come from is then absent).
            for &i in group.iter().filter_map(|id| index.get(id)) {
                let item = &sol.items[i];
                let y = f.unfavourable(item.case);
                let r = item.variant(variant);
                for &(p, s) in r.shear {
                    let c = &mut cases[p as usize];
                    c.shear[0] += s[0];
                    c.shear[1] += s[1];
                    c.shear_d[0] += y * s[0];
                    c.shear_d[1] += y * s[1];
                }
                match r.permanent {
                    // A notional load: its part due to permanent load, or the whole where the
                    // variable load's part lifts the plate (the lower normal force).
                    Some(perm) => {
                        crate::check::plates::add_notional_minimum(perm, r.vertical.iter(), 1.0, &mut notional_normal, &mut scratch);
                        for &(p, _) in perm.iter().chain(r.vertical) {
                            let x = std::mem::take(&mut notional_normal[p as usize]);
                            let c = &mut cases[p as usize];
                            c.normal += x;
                            c.normal_d += y * x;
                        }
                    }
                    None => {
                        for &(p, x) in r.vertical {
                            let c = &mut cases[p as usize];
                            c.normal += x;
                            c.normal_d += y * x;
                        }
                    }
                }
            }
            // Plates.
            for p in 0..n {
                let c = cases[p];
                // The room for a load yet to be placed, with shear here or not.
                if let Some(m) = mu[p] {
                    let at = rooms.at(pass, p, g, variant);
                    rooms.rooms[at] = [m * c.normal.max(0.0) - target * norm(c.shear), m * c.normal_d.max(0.0) - norm(c.shear_d), norm(c.shear)];
                }
                let h = norm(c.shear);
                if h <= NO_SHEAR_KN {
                    continue;
                }
                let h_d = norm(c.shear_d);
                let here = match mu[p] {
                    Some(m) => {
                        let r = m * c.normal.max(0.0);
                        let r_d = m * c.normal_d.max(0.0);
                        Worst { group: g, shear: h, normal: c.normal, factor: Some(r / h), shear_d: h_d, friction_d: r_d, restraint: (target * h - r).max(h_d - r_d).max(0.0) }
                    }
                    None => Worst { group: g, shear: h, normal: c.normal, factor: None, shear_d: h_d, friction_d: 0.0, restraint: 0.0 },
                };
                let worse = match &worst[p] {
                    None => true,
                    Some(old) => here.restraint > old.restraint || (here.restraint == old.restraint && here.factor.unwrap_or(f64::INFINITY) < old.factor.unwrap_or(f64::INFINITY)),
                };
                if worse {
                    worst[p] = Some(here);
                }
            }
            // Structures.
            for (s, list) in structure_plates.iter().enumerate() {
                let (mut hs, mut hs_d, mut r, mut r_d) = ([0.0; 2], [0.0; 2], 0.0, 0.0);
                let mut unknown: Vec<Option<usize>> = Vec::new();
                for &p in list {
                    let (p, c) = (p as usize, cases[p as usize]);
                    hs = [hs[0] + c.shear[0], hs[1] + c.shear[1]];
                    hs_d = [hs_d[0] + c.shear_d[0], hs_d[1] + c.shear_d[1]];
                    match mu[p] {
                        Some(m) => {
                            r += m * c.normal.max(0.0);
                            r_d += m * c.normal_d.max(0.0);
                        }
                        None if norm(c.shear) > NO_SHEAR_KN => {
                            if !unknown.contains(&post_support[p]) {
                                unknown.push(post_support[p]);
                            }
                        }
                        None => {}
                    }
                }
                let h = norm(hs);
                if h <= NO_SHEAR_KN {
                    // No net horizontal load on this structure (a twist alone): the plates' own
                    // checks cover it.
                    continue;
                }
                let h_d = norm(hs_d);
                let not_checked = (!unknown.is_empty()).then(|| {
                    let names: Vec<&str> = unknown.iter().map(|s| s.map_or("(none)", |s| scene.support_types[s].id.as_str())).collect();
                    format!("no friction coefficient is given for support type {}: give the interfaces under it (friction) to check sliding", names.join(", "))
                });
                let factor = not_checked.is_none().then(|| r / h);
                let here = SlidingCheck {
                    structure: labels.get(s).cloned().unwrap_or_default(),
                    towards: towards[g].clone(),
                    horizontal_kn: h,
                    friction_kn: r,
                    meets_target: factor.is_none_or(|f| f >= target * (1.0 - 1e-9)),
                    factor,
                    equ_horizontal_kn: h_d,
                    equ_friction_kn: r_d,
                    equ_ok: not_checked.is_some() || h_d <= r_d * (1.0 + 1e-9),
                    not_checked,
                };
                let slot = &mut checks[s * groups.len() + g];
                let worse = match slot {
                    None => true,
                    Some(old) => here.factor.unwrap_or(f64::INFINITY) < old.factor.unwrap_or(f64::INFINITY) || (!here.equ_ok && old.equ_ok),
                };
                if worse {
                    *slot = Some(here);
                }
            }
        }
    }
    let plates: Vec<Option<PlateSliding>> = worst
        .iter()
        .enumerate()
        .map(|(p, w)| {
            w.map(|w| PlateSliding {
                mu: mu[p],
                towards: towards[w.group].clone(),
                shear_kn: w.shear,
                normal_kn: w.normal,
                factor: w.factor,
                equ_shear_kn: w.shear_d,
                equ_friction_kn: w.friction_d,
                restraint_kn: w.restraint,
                slides: w.restraint > 1e-9 * w.shear.max(1.0),
            })
        })
        .collect();
    let plates_to_restrain = plates.iter().flatten().filter(|p| p.slides).count();
    Sliding { target_factor: target, checks: checks.into_iter().flatten().collect(), plates_to_restrain, plates, rooms, mu }
}
