//! One call from a scene to everything a site team needs: validate, solve, combine, check,
//! prove equilibrium and summarise stability.

use crate::check::bearing::Ground;
use crate::check::equilibrium::{equilibrium, CaseEquilibrium};
use crate::check::horizontal::{brace_at_posts, summary, BraceAtPlate, HorizontalSummary};
use crate::check::plates::{capacities, combine_envelope, PlateCombination, Status};
use crate::check::sliding::{sliding, PlateSliding, Sliding};
use crate::check::stability::{hold_down, HoldDown};
use crate::scene::standing::StandsOn;
use crate::scene::combination::Combination;
use crate::scene::loads::Case;
use crate::scene::model::Scene;
use crate::solve::{solve_methods, MethodPass, Solution, SolveError};
use crate::check::stability::{stability, Stability};
use crate::scene::validate::{validate, Braced, Problem, ValidationError};

/// Why a scene could not be analysed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum AnalysisError {
    /// The scene has problems; all of them are listed.
    #[error("{0}")]
    Invalid(ValidationError),
    /// The scene is valid but the structure cannot carry its loads as modelled.
    #[error("the structure cannot be solved: {0}")]
    Unsolvable(SolveError),
}

/// One base plate's results.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PlateResult {
    /// Post (and base plate) id.
    pub id: String,
    /// Index of its post in the scene.
    pub post: usize,
    /// Existing structure it stands on (its id), if not the ground: its load is for the
    /// permanent-works designer.
    pub on_structure: Option<String>,
    /// Plan position, m.
    pub x: f64,
    /// Plan position, m.
    pub y: f64,
    /// Base plate level, m.
    pub base_level: f64,
    /// Support type id.
    pub support: String,
    /// Safe working load of the support, kN.
    pub swl_kn: f64,
    /// Bearing area at formation level (on an existing structure: the plate's own area), m².
    pub bearing_area_m2: f64,
    /// Area under the plate or sole board (on the granular layer, or on the ground), m².
    pub plate_area_m2: f64,
    /// Allowable bearing pressure on that area (the ground's at formation, or the existing
    /// structure's under the plate), kPa; `None`: not entered, bearing not checked.
    pub allowable_kpa: Option<f64>,
    /// Group of plates whose spread areas overlap at formation ([`crate::check::bearing::Ground::formation_groups`]).
    pub formation_group: Option<u32>,
    /// Group of plates whose bearing plates overlap on the layer or ground ([`crate::check::bearing::Ground::surface_groups`]).
    pub surface_group: Option<u32>,
    /// Hold-down the plate needs where it lifts.
    pub hold_down: Option<HoldDown>,
    /// Sliding of the plate under its base shear; `None` when it has none.
    pub sliding: Option<PlateSliding>,
    /// Vertical reaction per case (G, Q, W), kN, upwards positive.
    pub case_kn: [f64; 3],
    /// Horizontal reaction per case (G, Q, W), [x, y] kN.
    pub case_shear_kn: [[f64; 2]; 3],
    /// Results under each combination, in the scene's order: the envelope over the method
    /// passes (the larger maximum, the smaller minimum), each naming the pass that gave it.
    pub combinations: Vec<PlateCombination>,
    /// Index of the combination that governs the utilisation.
    pub governing: usize,
    /// Findings over all combinations.
    pub status: Status,
    /// Method pass ([`Analysis::method_label`]) that gives the maximum of the governing
    /// combination.
    pub governing_method: usize,
    /// Method pass that gives the lowest minimum over the combinations that check uplift (over
    /// all combinations if none does).
    pub min_method: usize,
    /// Whether every method pass gives this plate the same maximum and minimum in every
    /// combination (within 1e-6 relative): then the method does not matter here.
    pub methods_agree: bool,
    /// Vertical reaction per case (G, Q, W) under each method pass, kN; `[0]` equals `case_kn`.
    pub case_kn_by_method: Vec<[f64; 3]>,
    /// Results under each combination for each method pass alone: `[pass][combination]`.
    pub combinations_by_method: Vec<Vec<PlateCombination>>,
    /// Vertical components of the brace forces it carries, and the braced bays they come from.
    pub brace: BraceAtPlate,
}

impl PlateResult {
    /// Results under the governing combination.
    pub fn governing(&self) -> &PlateCombination {
        &self.combinations[self.governing]
    }
}

/// What a post that stands on another member passes on at its base: a splice of a standard, or a
/// post on a transfer bearer or deck. A negative minimum is reported like uplift: tension through
/// the splice, or the post lifting off what it stands on.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LiftResult {
    /// Post id.
    pub id: String,
    /// Index of its post in the scene.
    pub post: usize,
    /// What it stands on, in words (e.g. `post A1`, `bearer T2 at 1.200 m`, `deck D1`).
    pub stands_on: String,
    /// Whether it continues the standard under it (a splice): pulling up is then tension in the
    /// joint, not a post lifting off a member.
    pub spliced: bool,
    /// Base level, m.
    pub base_level: f64,
    /// Safe working load of its own support, kN, if it has one.
    pub swl_kn: Option<f64>,
    /// Load passed on per case (G, Q, W), kN downwards, primary method pass.
    pub case_kn: [f64; 3],
    /// Per combination: the largest and smallest load passed on over the method passes, kN.
    pub combinations: Vec<PlateCombination>,
    /// Findings: over the safe working load of its own support (if it has one), or pulling up.
    pub status: Status,
}

/// Everything found for a scene.
#[derive(Debug, Clone)]
pub struct Analysis {
    /// Site name.
    pub scene_name: String,
    /// Combinations checked, in order.
    pub combinations: Vec<Combination>,
    /// The solver's per-item reactions and trace, under the primary method pass (the case loads
    /// of [`PlateResult::case_kn`] and [`Analysis::equilibrium`] come from it).
    pub solution: Solution,
    /// The solutions of the other method passes, in pass order (empty when one pass suffices).
    pub other_solutions: Vec<Solution>,
    /// One result per base plate, in post order.
    pub plates: Vec<PlateResult>,
    /// One result per post that stands on another member (lifts, posts on transfer members), in
    /// post order.
    pub lifts: Vec<LiftResult>,
    /// Equilibrium proof per case (G, Q, W), primary method pass.
    pub equilibrium: [CaseEquilibrium; 3],
    /// Equilibrium proof per case for every method pass; `[0]` equals `equilibrium`.
    pub equilibrium_by_method: Vec<[CaseEquilibrium; 3]>,
    /// Overturning of each structure.
    pub stability: Stability,
    /// Sliding of each structure and plate.
    pub sliding: Sliding,
    /// Ground data and the plates whose bearing areas overlap.
    pub ground: Ground,
    /// Braced plan directions.
    pub braced: Braced,
    /// The horizontal load path in words: braced planes, diaphragms, notional load, combinations.
    pub horizontal: HorizontalSummary,
    /// The braced planes and diaphragms themselves (for the trace of brace forces and drawing).
    pub bracing: crate::scene::bracing::Bracing,
    /// Non-fatal findings.
    pub warnings: Vec<Problem>,
    /// Imposed loads that the planner set to act whole (not arranged), by id.
    pub whole_loads: Vec<String>,
    /// How working levels act together.
    pub working_levels: crate::scene::model::WorkingLevels,
}

impl Analysis {
    /// Index of the plate with the highest governing utilisation.
    pub fn worst_plate(&self) -> Option<usize> {
        // Of equal utilisations the first in the scene, as the editor's summary names it.
        (0..self.plates.len()).fold(None, |best: Option<usize>, i| match best {
            Some(b) if self.plates[i].governing().utilisation <= self.plates[b].governing().utilisation => Some(b),
            _ => Some(i),
        })
    }
    /// Whether plate `plate` lifts only where members run continuous over their supports: it
    /// lifts in some combination, but in the pass with every enveloped member in simple spans it
    /// never does. A member that is not fixed to its supports lifts off them instead of pulling
    /// the plate up (its load then goes as in simple spans, which the envelope already covers),
    /// so such uplift asks first how the members are fixed at their heads. `false` where there
    /// is no simple-spans pass.
    pub fn lifts_only_through_continuity(&self, plate: usize) -> bool {
        use crate::solve::passes::Behaviour;
        let p = &self.plates[plate];
        let Some(simple) = (0..self.method_count()).find(|&m| {
            let pass = self.method(m);
            pass.decks == Behaviour::SimpleSpans && pass.bearers == Behaviour::SimpleSpans
        }) else {
            return false;
        };
        p.status.uplift
            && self.combinations.iter().enumerate().filter(|(_, c)| c.checks_uplift).all(|(c, _)| {
                p.combinations_by_method.get(simple).and_then(|m| m.get(c)).is_some_and(|pc| pc.min_kn >= -crate::check::UPLIFT_TOLERANCE_KN)
            })
    }
    /// Plate index by id.
    pub fn plate_index(&self, id: &str) -> Option<usize> {
        self.plates.iter().position(|p| p.id == id)
    }
    /// Worst relative equilibrium residual over the cases and method passes.
    pub fn worst_residual(&self) -> f64 {
        self.equilibrium_by_method.iter().flatten().chain(&self.equilibrium).map(|e| e.relative).fold(0.0, f64::max)
    }
    /// Number of method passes solved.
    pub fn method_count(&self) -> usize {
        1 + self.other_solutions.len()
    }
    /// Solution of method pass `m` (0 = primary).
    pub fn solution_of(&self, m: usize) -> &Solution {
        if m == 0 { &self.solution } else { &self.other_solutions[m - 1] }
    }
    /// Method pass `m`.
    pub fn method(&self, m: usize) -> &MethodPass {
        &self.solution_of(m).method
    }
    /// Name of method pass `m`, e.g. `continuous`.
    pub fn method_label(&self, m: usize) -> &str {
        &self.method(m).label
    }
    /// What governs a plate's maximum, for outputs: the pass's name, or `any (methods agree)`
    /// when several passes were solved and all give this plate the same loads.
    pub fn governing_method_label(&self, plate: usize) -> &str {
        let p = &self.plates[plate];
        if self.method_count() > 1 && p.methods_agree { METHODS_AGREE } else { self.method_label(p.governing_method) }
    }
    /// What governs a plate's minimum, for outputs, as [`Analysis::governing_method_label`].
    pub fn min_method_label(&self, plate: usize) -> &str {
        let p = &self.plates[plate];
        if self.method_count() > 1 && p.methods_agree { METHODS_AGREE } else { self.method_label(p.min_method) }
    }
    /// Whether any plate is over capacity, lifts or slides, any post standing on another member
    /// is over its support's capacity or pulls up, or overturning or sliding fails.
    pub fn any_failure(&self) -> bool {
        self.plates.iter().any(|p| !p.status.is_ok()) || self.lifts.iter().any(|l| !l.status.is_ok()) || self.stability.fails() || self.sliding.fails()
    }
    /// Whether the allowable bearing pressure at formation was entered (else bearing is not checked).
    pub fn bearing_checked(&self) -> bool {
        self.ground.allowable_kpa.is_some()
    }
    /// Base shear taken by the plates under each horizontal load on its own: (load id, case,
    /// [x, y] kN). Opposite loads of one case would cancel in the case totals.
    pub fn horizontal_base_shear(&self) -> Vec<(&str, Case, [f64; 2])> {
        self.solution
            .items
            .iter()
            .filter(|i| i.direction.is_some())
            .map(|i| {
                let s = i.shear.iter().fold([0.0; 2], |a, &(_, v)| [a[0] + v[0], a[1] + v[1]]);
                (i.id.as_str(), i.case, s)
            })
            .collect()
    }
    /// Id of every post, by index (base plates and posts on other members alike).
    pub fn post_ids(&self) -> Vec<&str> {
        let n = self.plates.iter().map(|p| p.post + 1).chain(self.lifts.iter().map(|l| l.post + 1)).max().unwrap_or(0);
        let mut ids = vec!["?"; n];
        for p in &self.plates {
            ids[p.post] = &p.id;
        }
        for l in &self.lifts {
            ids[l.post] = &l.id;
        }
        ids
    }
    /// Names of the braced bays, e.g. `A1–B1`, in the order of
    /// [`HorizontalSummary::bays`](crate::check::horizontal::HorizontalSummary::bays).
    pub fn bay_names(&self) -> Vec<String> {
        let ids = self.post_ids();
        self.horizontal.bays.iter().map(|&(a, z)| format!("{}–{}", ids[a as usize], ids[z as usize])).collect()
    }
    /// Names of the braced bays whose brace forces a plate carries.
    pub fn bays_of(&self, brace: &crate::check::horizontal::BraceAtPlate) -> Vec<String> {
        let ids = self.post_ids();
        brace.bays.iter().filter_map(|&b| self.horizontal.bays.get(b as usize)).map(|&(a, z)| format!("{}–{}", ids[a as usize], ids[z as usize])).collect()
    }
    /// Total base shear per case, [x, y] kN.
    pub fn base_shear(&self) -> [[f64; 2]; 3] {
        let mut s = [[0.0; 2]; 3];
        for p in &self.plates {
            for c in 0..3 {
                s[c][0] += p.case_shear_kn[c][0];
                s[c][1] += p.case_shear_kn[c][1];
            }
        }
        s
    }
}

/// How an arranged imposed load is placed for one plate's worst maximum and minimum.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ArrangementAt {
    /// Load id.
    pub load: String,
    /// Number of cells it is split into.
    pub cells: usize,
    /// Cells loaded for the plate's maximum (those that push it down); the rest empty.
    pub loaded_for_max: u32,
    /// Cells loaded for the plate's minimum (those that lift it); the rest empty.
    pub loaded_for_min: u32,
}

impl ArrangementAt {
    /// In words for a site manager.
    pub fn words(&self) -> String {
        let lift = if self.loaded_for_min > 0 { format!("; it lifts with {} cell(s) loaded alone", self.loaded_for_min) } else { String::new() };
        if self.loaded_for_max as usize == self.cells {
            format!("{}: worst with every cell loaded{lift}", self.load)
        } else {
            format!("{}: worst with {} of {} cells loaded, the rest empty{lift}", self.load, self.loaded_for_max, self.cells)
        }
    }
}

impl Analysis {
    /// The arranged loads reaching plate `plate` (index into [`Analysis::plates`]) and how each
    /// is placed for its worst maximum, in the method pass that governs that maximum.
    pub fn arrangements_at(&self, plate: usize) -> Vec<ArrangementAt> {
        let p = &self.plates[plate];
        let post = p.post as u32;
        let solution = self.solution_of(p.governing_method);
        solution
            .items
            .iter()
            .filter_map(|item| {
                let a = item.arranged.as_ref()?;
                let at = a.extremes.binary_search_by_key(&post, |e| e.0).ok()?;
                let (down, up) = a.counts[at];
                Some(ArrangementAt { load: item.id.clone(), cells: a.cells.len(), loaded_for_max: down, loaded_for_min: up })
            })
            .collect()
    }
}

/// Output label of a plate whose loads are the same under every method pass.
pub const METHODS_AGREE: &str = "any (methods agree)";

/// Relative tolerance within which two method passes count as agreeing at a plate.
const AGREE_RELATIVE: f64 = 1e-6;

/// Validate, solve and check a scene.
pub fn analyse(scene: &Scene) -> Result<Analysis, AnalysisError> {
    let model = validate(scene).map_err(AnalysisError::Invalid)?;
    let mut solutions = solve_methods(&model).map_err(AnalysisError::Unsolvable)?;
    let caps = capacities(&model);
    let ground = Ground::new(&model, &solutions[0].plates);
    let permanent: Vec<Vec<crate::check::permanent::PermanentParts>> = solutions.iter().map(|s| crate::check::permanent::permanent_parts(scene, s)).collect();
    let envelope = combine_envelope(scene, &solutions, &permanent, &caps, &ground);
    let structures = crate::check::stability::structures(&model);
    // Overturning depends on the applied loads; horizontal loads are taken from every pass.
    let stability = stability(&model, &solutions, &structures);
    let labels: Vec<String> = stability.structures.iter().map(|s| s.label.clone()).collect();
    let structure_plates: Vec<Vec<u32>> = stability.structures.iter().map(|s| s.plates.clone()).collect();
    let mut sliding = sliding(scene, &solutions, &permanent, &model.post_support, &structure_plates, &labels);
    let case_by_method: Vec<Vec<[f64; 3]>> = solutions.iter().map(Solution::case_vertical).collect();
    let case_shear = solutions[0].case_shear();
    let capacity_combos: Vec<usize> = (0..scene.combinations.len()).filter(|&c| scene.combinations[c].checks_capacity).collect();
    let uplift_combos: Vec<usize> = (0..scene.combinations.len()).filter(|&c| scene.combinations[c].checks_uplift).collect();
    let all_combos: Vec<usize> = (0..scene.combinations.len()).collect();
    let (mut brace, bays) = brace_at_posts(&model, &solutions);
    let mut lifts = Vec::new();
    let plates = scene
        .posts
        .iter()
        .zip(envelope.envelope)
        .enumerate()
        .filter_map(|(i, (post, combinations))| {
            let stands_on = model.graph.stands_on[i];
            if !stands_on.is_plate() {
                lifts.push(LiftResult {
                    id: post.id.clone(),
                    post: i,
                    stands_on: stands_on_words(scene, stands_on),
                    spliced: matches!(stands_on, StandsOn::Post(_)),
                    base_level: post.base_level,
                    swl_kn: caps[i].swl_kn.is_finite().then_some(caps[i].swl_kn),
                    case_kn: case_by_method[0][i],
                    status: combinations.iter().fold(Status::default(), |s, c| s.or(c.status)),
                    combinations,
                });
                return None;
            }
            let support = &scene.support_types[model.post_support[i].expect("validation gives every base plate a support type")];
            let all = 0..combinations.len();
            let governing = all
                .filter(|&c| capacity_combos.is_empty() || capacity_combos.contains(&c))
                .max_by(|&a, &b| combinations[a].utilisation.partial_cmp(&combinations[b].utilisation).unwrap_or(std::cmp::Ordering::Equal))
                .unwrap_or(0);
            let plate_sliding = sliding.plates[i].take();
            let mut status = combinations.iter().fold(Status::default(), |s, c| s.or(c.status));
            status.slides = plate_sliding.as_ref().is_some_and(|s| s.slides);
            let lows: &[usize] = if uplift_combos.is_empty() { &all_combos } else { &uplift_combos };
            let lowest = lows
                .iter()
                .copied()
                .min_by(|&a, &b| combinations[a].min_kn.partial_cmp(&combinations[b].min_kn).unwrap_or(std::cmp::Ordering::Equal))
                .unwrap_or(0);
            let combinations_by_method: Vec<Vec<PlateCombination>> = envelope.by_method.iter().map(|m| m[i].clone()).collect();
            let same = |a: f64, b: f64| (a - b).abs() <= AGREE_RELATIVE * a.abs().max(b.abs()).max(1.0);
            let methods_agree = combinations_by_method
                .iter()
                .all(|m| m.iter().zip(&combinations).all(|(c, e)| same(c.max_kn, e.max_kn) && same(c.min_kn, e.min_kn)));
            Some(PlateResult {
                id: post.id.clone(),
                post: i,
                on_structure: match stands_on {
                    StandsOn::Structure(e) => Some(scene.existing_structures[e].id.clone()),
                    _ => None,
                },
                x: post.x,
                y: post.y,
                base_level: post.base_level,
                support: support.id.clone(),
                swl_kn: support.swl_kn,
                bearing_area_m2: ground.formation_area_m2[i],
                plate_area_m2: ground.plate_area_m2[i],
                allowable_kpa: match ground.bears_on[i] {
                    crate::check::bearing::BearsOn::Structure { structure, .. } => Some(ground.structure_allowable_kpa[structure]),
                    _ => ground.allowable_kpa,
                },
                formation_group: ground.formation_group_of[i],
                surface_group: ground.surface_group_of[i],
                hold_down: hold_down(&scene.combinations, combinations.iter().map(|c| c.min_kn)),
                sliding: plate_sliding,
                case_kn: case_by_method[0][i],
                case_shear_kn: case_shear[i],
                governing_method: combinations.get(governing).map_or(0, |c| c.max_method),
                min_method: combinations.get(lowest).map_or(0, |c| c.min_method),
                methods_agree,
                case_kn_by_method: case_by_method.iter().map(|m| m[i]).collect(),
                combinations_by_method,
                combinations,
                governing,
                status,
                brace: std::mem::take(&mut brace[i]),
            })
        })
        .collect();
    let equilibrium_by_method: Vec<[CaseEquilibrium; 3]> = solutions.iter().map(equilibrium).collect();
    let horizontal = summary(&model, &solutions[0], bays);
    let mut warnings = model.warnings;
    for g in ground.mixed_level_groups() {
        let ids: Vec<&str> = g.plates.iter().take(8).map(|&p| scene.posts[p as usize].id.as_str()).collect();
        let more = if g.plates.len() > 8 { ", …" } else { "" };
        warnings.push(Problem {
            kind: crate::scene::model::ElementKind::Post,
            id: ids[0].to_owned(),
            message: format!("bearing areas of plates {}{more} overlap but stand at different levels: taken together as if at one level; check the ground under them by hand", ids.join(", ")),
        });
    }
    // T-heads that stand on their head's moment capacity: the worst moment over the passes.
    let mut heads: Vec<&crate::solve::tee_heads::HeadMoment> = solutions.iter().flat_map(|s| &s.head_moments).collect();
    heads.sort_by(|a, b| a.bearer.cmp(&b.bearer).then(b.moment_knm.total_cmp(&a.moment_knm)));
    heads.dedup_by_key(|h| h.bearer);
    for h in heads {
        warnings.push(Problem {
            kind: crate::scene::model::ElementKind::Bearer,
            id: scene.bearers[h.bearer].id.clone(),
            message: format!(
                "rests on post {} alone and is out of balance by up to {:.3} kN·m with one arm loaded: it stands on the head's moment capacity of {:.3} kN·m given on the post's support type — check that value against the maker's data",
                scene.posts[h.post].id, h.moment_knm, h.capacity_knm
            ),
        });
    }
    let solution = solutions.remove(0);
    Ok(Analysis {
        scene_name: scene.site.name.clone(),
        combinations: scene.combinations.clone(),
        solution,
        other_solutions: solutions,
        plates,
        lifts,
        equilibrium: equilibrium_by_method[0],
        equilibrium_by_method,
        stability,
        sliding,
        ground,
        braced: model.braced,
        horizontal,
        bracing: model.bracing,
        warnings,
        whole_loads: scene
            .loads
            .iter()
            .filter(|l| l.case == Case::Q && l.arrangement == crate::scene::loads::Arrangement::Whole)
            .map(|l| l.id.clone())
            .collect(),
        working_levels: scene.analysis.working_levels,
    })
}

/// What a post stands on, in words for outputs.
pub fn stands_on_words(scene: &Scene, s: StandsOn) -> String {
    match s {
        StandsOn::Ground => "the ground".into(),
        StandsOn::Structure(e) => format!("existing structure {}", scene.existing_structures[e].id),
        StandsOn::Post(q) => format!("post {} (spliced)", scene.posts[q].id),
        StandsOn::Bearer { bearer, at } => format!("bearer {} at {:.3} m", scene.bearers[bearer].id, at),
        StandsOn::Deck(d) => format!("deck {}", scene.decks[d].id),
    }
}
