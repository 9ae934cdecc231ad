//! Spare capacity over every deck: at each point of a grid, the largest extra imposed load (one
//! footprint at a time, on top of the existing loads in their worst arrangement) before any base
//! plate exceeds its safe working load or allowable bearing, any plate lifts, or the deck exceeds
//! its load class — and what limits it.
//!
//! Every plate's reaction is linear in the load, so the extra load `P` at a point adds `c·P` at a
//! plate, `c` the influence coefficient of that point at that plate in a method pass
//! ([`crate::solve::influence`]). With γ the combination's imposed-load factor and φ the dynamic
//! factor, a plate limits `P` to `(capacity − max) / (γ·φ·c)` where `c > 0`, and — the placed load
//! being free to be there or not — to `min / (γ·φ·|c|)` where `c < 0` (no uplift). The value is the
//! least over plates, combinations and method passes, and the deck's own capacity. The values do
//! not add: after placing one load, the map must be read again.

use crate::check::analysis::Analysis;
use crate::scene::loads::{Intensity, LoadClass, LoadKind};
use crate::scene::model::Scene;
use crate::scene::loads::Case;
use crate::solve::influence::{deck_influences, deck_influences_notional, DeckInfluence, Footprint};

/// Influence coefficients smaller than this (kN per kN) are rounding, not load: a plate far along
/// a continuous member gets 1e-12 of a load, which must not let an over-capacity plate there
/// block the whole deck.
pub const INFLUENCE_FLOOR: f64 = 1e-9;

/// What the map is worked out for.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SpareSettings {
    /// Grid spacing, m.
    pub spacing_m: f64,
    /// What is placed: a point, or a rectangle centred on the grid point.
    pub footprint: Footprint,
    /// Factor on the placed load for landing it (1.0 none; e.g. 1.2 for loads set down by crane
    /// or hoist).
    pub dynamic_factor: f64,
    /// Combinations to check, by name; empty: every one that checks capacity or uplift.
    pub combinations: Vec<String>,
    /// Decks to map, by id; empty: every deck.
    pub decks: Vec<String>,
}

/// Default grid spacing, m.
// common practice, no source: a quarter-metre grid resolves a board width and a pallet.
pub const DEFAULT_SPACING_M: f64 = 0.25;

/// Factor on loads set down by hoist or crane, a suggested value for `dynamic_factor`.
// source: DGUV Information 201-011 (loads set down by hoist × 1.2), via REFERENCES §2
pub const HOISTED_FACTOR: f64 = 1.2;

impl Default for SpareSettings {
    fn default() -> Self {
        SpareSettings { spacing_m: DEFAULT_SPACING_M, footprint: Footprint::POINT, dynamic_factor: 1.0, combinations: Vec::new(), decks: Vec::new() }
    }
}

/// Why the map cannot be worked out.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum SpareError {
    /// A setting is out of range.
    #[error("{0}")]
    Setting(String),
    /// No combination checks capacity or uplift (or none of those named exists).
    #[error("{0}")]
    NoCombination(String),
}

/// A name in a [`Limit`]: one plate or combination limits many points, so each point shares
/// the one copy of its name rather than holding its own.
pub type Label = std::sync::Arc<str>;

/// What limits the spare load at a point.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub enum Limit {
    /// A base plate reaches a capacity.
    Plate {
        /// Plate id.
        plate: Label,
        /// Which capacity: `safe working load`, `ground bearing` or `uplift`.
        check: &'static str,
        /// Combination.
        combination: Label,
        /// Method pass.
        method: Label,
    },
    /// The structure reaches its overturning target about an axis.
    Overturning {
        /// The axis, e.g. `edge A1–G1`.
        about: Label,
        /// Which form: `factor of safety` or `EQU`.
        form: &'static str,
    },
    /// A base plate reaches its sliding target: its friction against its base shear, without
    /// restraint. (The structure's own sliding check follows from its plates': it is never the
    /// first reached.)
    Sliding {
        /// Plate id.
        plate: Label,
        /// Which form: `factor of safety` or `EQU`.
        form: &'static str,
    },
    /// The deck reaches its load class.
    Deck {
        /// What of the class limits it, in words (e.g. `load class 3, q1 2.0 kPa over the footprint`).
        what: Label,
    },
    /// Nothing found that limits it: no plate takes any of it upward or downward and the deck has
    /// no stated capacity.
    None,
}

impl Limit {
    /// In words for a site manager.
    pub fn words(&self) -> String {
        match self {
            Limit::Plate { plate, check, combination, .. } if *check == "uplift" => format!("plate {plate} would lift ({combination})"),
            Limit::Plate { plate, check, combination, .. } => format!("plate {plate}, {check} ({combination})"),
            Limit::Overturning { about, form } => format!("overturning about {about} ({form})"),
            Limit::Sliding { plate, form } => format!("plate {plate} would slide ({form})"),
            Limit::Deck { what } => format!("the deck, {what}"),
            Limit::None => "no limit found".into(),
        }
    }
}

/// One grid point of a deck's map.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SparePoint {
    /// Plan position of the footprint's centre, m.
    pub x: f64,
    /// Plan position, m.
    pub y: f64,
    /// Largest extra characteristic imposed load there, kN (0: none — already at a limit);
    /// `None` where nothing limits it.
    pub kn: Option<f64>,
    /// Whether a limit is already reached or exceeded without the extra load (shown apart from a
    /// small spare capacity).
    pub already_at_limit: bool,
    /// What limits it.
    pub limit: Limit,
}

/// The map of one deck.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DeckSpare {
    /// Deck id.
    pub deck: String,
    /// Deck level, m.
    pub level: f64,
    /// Load class the deck is checked against, if known.
    pub load_class: Option<u8>,
    /// Grid points, row by row.
    pub points: Vec<SparePoint>,
    /// Number of columns of the grid (points per row).
    pub columns: usize,
}

/// The spare-capacity map of a scene.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SpareMap {
    /// What it was worked out for.
    pub settings: SpareSettings,
    /// Combinations checked.
    pub combinations: Vec<String>,
    /// One map per deck.
    pub decks: Vec<DeckSpare>,
    /// Members whose own strength is not checked by the map (no capacity is known for them).
    pub not_checked: Vec<String>,
    /// What the map leaves out of what the extra load would bring, in words: sliding where no
    /// friction coefficient is given.
    pub not_included: Option<String>,
    /// How the map takes the notional horizontal load the extra load itself brings, in words, where
    /// the scene has notional load.
    pub notional: Option<String>,
}

/// The influence coefficients behind a map, per deck and method pass. They depend on the
/// structure, the footprint and the grid only, not on the loads: after an edit of loads alone,
/// the map can be worked out again from the same coefficients ([`spare_map_from`]).
#[derive(Debug, Clone)]
pub struct SpareInfluences {
    footprint: Footprint,
    spacing_m: f64,
    /// The method passes they were worked out for, by label.
    methods: Vec<String>,
    /// Per deck in scene order, or `None` where the footprint does not fit.
    decks: Vec<Option<DeckCoefficients>>,
    /// The plan axes (x, y) the notional load of the extra load was worked out along.
    notional_axes: [bool; 2],
    /// Whether the base shears of that notional load were worked out (for sliding).
    with_shears: bool,
}

impl SpareInfluences {
    /// Whether these coefficients are for the same footprint, grid and method passes.
    pub fn fits(&self, analysis: &Analysis, settings: &SpareSettings) -> bool {
        self.footprint == settings.footprint
            && self.spacing_m == settings.spacing_m
            && self.methods.len() == analysis.method_count()
            && self.methods.iter().enumerate().all(|(m, l)| l == analysis.method_label(m))
    }
}

/// The influence coefficients of one deck, and what follows from them alone.
struct DeckCoefficients {
    /// Per method pass.
    passes: Vec<DeckInfluence>,
    /// The plates a load on the deck reaches, by post ([`reached_plates`]).
    reached: Vec<bool>,
    /// The plates whose sliding the map looks at, with what they were worked out for: they
    /// follow from the coefficients, and from the loads only through which plates take base
    /// shear, the friction and the notional load ([`SlidingKey`]), which an edit seldom changes.
    sliding: std::sync::Mutex<Option<(SlidingKey, Vec<std::sync::Arc<SlidingPlates>>)>>,
    /// The plates that take brace forces from the notional load of a load on the deck, per
    /// group of passes that reach them alike ([`braced_plates`]): they follow from the
    /// coefficients alone, once the scene has any notional load.
    braced: std::sync::Mutex<Option<Vec<std::sync::Arc<Braced>>>>,
}

impl DeckCoefficients {
    fn new(passes: Vec<DeckInfluence>, n_posts: usize) -> Self {
        let reached = reached_plates(n_posts, &passes);
        DeckCoefficients { passes, reached, sliding: Default::default(), braced: Default::default() }
    }
}

impl Clone for DeckCoefficients {
    fn clone(&self) -> Self {
        let sliding = self.sliding.lock().map(|kept| kept.clone()).unwrap_or_default();
        let braced = self.braced.lock().map(|kept| kept.clone()).unwrap_or_default();
        DeckCoefficients { passes: self.passes.clone(), reached: self.reached.clone(), sliding: std::sync::Mutex::new(sliding), braced: std::sync::Mutex::new(braced) }
    }
}

impl std::fmt::Debug for DeckCoefficients {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("DeckCoefficients").field("passes", &self.passes).field("reached", &self.reached).finish_non_exhaustive()
    }
}

/// Check the settings against the scene and its analysis: the combinations to check.
fn checked(scene: &Scene, analysis: &Analysis, settings: &SpareSettings) -> Result<Vec<usize>, SpareError> {
    if !(settings.spacing_m.is_finite() && settings.spacing_m >= 0.01) {
        return Err(SpareError::Setting(format!("grid spacing must be at least 0.01 m (it is {} m)", settings.spacing_m)));
    }
    let fp = settings.footprint;
    if !(fp.x_m.is_finite() && fp.y_m.is_finite() && fp.x_m >= 0.0 && fp.y_m >= 0.0) || (fp.x_m > 0.0) != (fp.y_m > 0.0) {
        return Err(SpareError::Setting(format!("the footprint must be a point (0 × 0) or a rectangle with both sides above zero (it is {} × {} m)", fp.x_m, fp.y_m)));
    }
    if !(settings.dynamic_factor.is_finite() && (1.0..=10.0).contains(&settings.dynamic_factor)) {
        return Err(SpareError::Setting(format!("the dynamic factor must be from 1.0 to 10 (it is {})", settings.dynamic_factor)));
    }
    let combos: Vec<usize> = (0..analysis.combinations.len())
        .filter(|&c| {
            let comb = &analysis.combinations[c];
            (comb.checks_capacity || comb.checks_uplift) && (settings.combinations.is_empty() || settings.combinations.contains(&comb.name))
        })
        .collect();
    if combos.is_empty() {
        return Err(SpareError::NoCombination(if settings.combinations.is_empty() {
            "no combination checks capacity or uplift, so no load has a limit: set checks_capacity on one".into()
        } else {
            format!("none of {} is a combination that checks capacity or uplift", settings.combinations.join(", "))
        }));
    }
    for name in &settings.decks {
        if !scene.decks.iter().any(|d| &d.id == name) {
            return Err(SpareError::Setting(format!("deck \"{name}\" does not exist")));
        }
    }
    Ok(combos)
}

/// Work out the influence coefficients of the decks a map covers.
pub fn spare_influences(scene: &Scene, analysis: &Analysis, settings: &SpareSettings) -> Result<SpareInfluences, SpareError> {
    checked(scene, analysis, settings)?;
    let model = crate::validate(scene).map_err(|e| SpareError::Setting(e.to_string()))?;
    let passes: Vec<crate::solve::MethodPass> = (0..analysis.method_count()).map(|m| analysis.method(m).clone()).collect();
    let groups = notional_groups(scene);
    let with_notional = !groups.is_empty();
    let axes = notional_axes(&groups);
    // Base shears are needed only where some plate's sliding is checked.
    let with_shears = sliding_checked(analysis);
    let mut decks = Vec::with_capacity(scene.decks.len());
    for d in 0..scene.decks.len() {
        let wanted = settings.decks.is_empty() || settings.decks.contains(&scene.decks[d].id);
        if !wanted {
            decks.push(None);
            continue;
        }
        let per_pass = if with_notional {
            deck_influences_notional(&model, &passes, d, settings.footprint, settings.spacing_m, axes, with_shears).map_err(|reasons| {
                SpareError::Setting(format!(
                    "a load placed on deck {} brings notional horizontal load that the bracing cannot carry to the ground: {}",
                    scene.decks[d].id,
                    reasons.join("; ")
                ))
            })?
        } else {
            deck_influences(&model, &passes, d, settings.footprint, settings.spacing_m)
        };
        decks.push(per_pass.into_iter().collect::<Option<Vec<_>>>().map(|passes| DeckCoefficients::new(passes, scene.posts.len())));
    }
    Ok(SpareInfluences {
        footprint: settings.footprint,
        spacing_m: settings.spacing_m,
        methods: (0..analysis.method_count()).map(|m| analysis.method_label(m).to_owned()).collect(),
        decks,
        notional_axes: axes,
        with_shears,
    })
}

/// Work out the spare-capacity map of an analysed scene.
pub fn spare_map(scene: &Scene, analysis: &Analysis, settings: &SpareSettings) -> Result<SpareMap, SpareError> {
    let influences = spare_influences(scene, analysis, settings)?;
    spare_map_from(scene, analysis, settings, &influences)
}

/// Work out the map from influence coefficients worked out before for the same structure,
/// footprint and grid ([`spare_influences`]): what is left to do after an edit of loads alone.
pub fn spare_map_from(scene: &Scene, analysis: &Analysis, settings: &SpareSettings, influences: &SpareInfluences) -> Result<SpareMap, SpareError> {
    let combos = checked(scene, analysis, settings)?;
    // Coefficients worked out without the notional load now asked for (a changed rule or
    // direction), or without its base shears now that sliding is checked: worked out again here
    // rather than left out.
    let groups = notional_groups(scene);
    let axes = notional_axes(&groups);
    if (axes[0] && !influences.notional_axes[0]) || (axes[1] && !influences.notional_axes[1]) || (sliding_checked(analysis) && !influences.with_shears) {
        let fresh = spare_influences(scene, analysis, settings)?;
        return spare_map_from(scene, analysis, settings, &fresh);
    }
    let fp = settings.footprint;
    if !influences.fits(analysis, settings) || influences.decks.len() != scene.decks.len() {
        return Err(SpareError::Setting("the influence coefficients are for another structure, footprint or grid: work them out again".into()));
    }
    let mut decks = Vec::new();
    let mut mapped_structures: Vec<usize> = Vec::new();
    for (d, deck) in scene.decks.iter().enumerate() {
        if !settings.decks.is_empty() && !settings.decks.contains(&deck.id) {
            continue;
        }
        match &influences.decks[d] {
            Some(coefficients) => {
                if analysis.sliding.mu.iter().any(Option::is_none) {
                    mapped_structures.extend(reached_structures(analysis, &coefficients.reached));
                }
                decks.push(deck_map(scene, analysis, d, settings, &combos, &groups, coefficients));
            }
            None if !settings.decks.is_empty() => {
                return Err(SpareError::Setting(format!("the footprint {} × {} m does not fit on deck {}", fp.x_m, fp.y_m, deck.id)));
            }
            None => {}
        }
    }
    if decks.is_empty() {
        return Err(SpareError::Setting(if scene.decks.is_empty() {
            "the scene has no deck to place a load on".to_owned()
        } else {
            format!("the footprint {} × {} m does not fit on any deck", fp.x_m, fp.y_m)
        }));
    }
    mapped_structures.sort_unstable();
    mapped_structures.dedup();
    let mut not_checked: Vec<String> = scene.bearers.iter().map(|b| format!("{} {}", role_word(b.role), b.id)).collect();
    not_checked.extend(scene.decks.iter().filter(|d| deck_class(scene, d).is_none()).map(|d| format!("deck {}", d.id)));
    Ok(SpareMap { settings: settings.clone(), combinations: combos.iter().map(|&c| analysis.combinations[c].name.clone()).collect(), decks, not_checked, not_included: not_included(scene, analysis, &mapped_structures), notional: notional_words(scene, &groups) })
}

/// One notional load the extra load brings: its plan direction (unit x, y), its share of the
/// vertical load (kN per kN) and the case whose factor it takes.
#[derive(Debug, Clone, Copy)]
struct NotionalTerm {
    u: [f64; 2],
    share: f64,
    case: Case,
}

/// Direction key in hundredths of a degree, as the combinations group directions.
fn direction_key(u: (f64, f64)) -> i64 {
    crate::solve::items::direction_key_of([u.0, u.1])
}

/// The notional loads an extra imposed load brings, grouped by plan direction as the combinations
/// take them (one direction at a time): the scene's own notional loads whose basis includes
/// imposed load, or else the scene's rule in each checked direction and each wind direction. The
/// falsework rule (the greater of 2.5 % of the vertical load and wind + 1 %) grows by at most
/// 2.5 % of an extra load: that is taken.
fn notional_groups(scene: &Scene) -> Vec<Vec<NotionalTerm>> {
    use crate::scene::model::NotionalRule;
    let mut groups: Vec<(i64, Vec<NotionalTerm>)> = Vec::new();
    let mut add = |d: crate::scene::loads::PlanDirection, term: Option<(f64, Case)>| {
        let u = d.unit();
        let key = direction_key(u);
        let at = match groups.iter().position(|g| g.0 == key) {
            Some(i) => i,
            None => {
                groups.push((key, Vec::new()));
                groups.len() - 1
            }
        };
        if let Some((share, case)) = term.filter(|t| t.0 > 0.0) {
            groups[at].1.push(NotionalTerm { u: [u.0, u.1], share, case });
        }
    };
    if scene.loads.iter().any(|l| matches!(l.kind, LoadKind::Notional { .. })) {
        for l in &scene.loads {
            if let LoadKind::Notional { percent, direction, ref basis } = l.kind {
                add(direction, basis.contains(&Case::Q).then_some((percent / 100.0, l.case)));
            }
        }
    } else {
        let share = match scene.horizontal.notional {
            NotionalRule::Off => return Vec::new(),
            NotionalRule::Percent(p) => p / 100.0,
            NotionalRule::Falsework => crate::solve::braced::FALSEWORK_PERCENT / 100.0,
        };
        let winds = scene.loads.iter().filter_map(|l| match l.kind {
            LoadKind::Wind { direction, .. } => Some(direction),
            _ => None,
        });
        for d in scene.horizontal.directions.iter().copied().chain(winds) {
            add(d, Some((share, Case::W)));
        }
    }
    groups.into_iter().map(|g| g.1).filter(|g| !g.is_empty()).collect()
}

/// Whether any plate's sliding is checked (it has a friction coefficient).
fn sliding_checked(analysis: &Analysis) -> bool {
    analysis.sliding.mu.iter().any(Option::is_some)
}

/// The plan axes (x, y) along which any notional load of the extra load acts.
fn notional_axes(groups: &[Vec<NotionalTerm>]) -> [bool; 2] {
    [0, 1].map(|a| groups.iter().flatten().any(|t| t.u[a].abs() > 1e-12))
}

/// What the map leaves out, in words: the sliding of any structure under a mapped deck, and of
/// its plates, that lacks a friction coefficient.
fn not_included(scene: &Scene, analysis: &Analysis, structures: &[usize]) -> Option<String> {
    let sl = &analysis.sliding;
    let mut unknown: Vec<String> = Vec::new();
    for &s in structures {
        let plates = &analysis.stability.structures[s].plates;
        if plates.iter().all(|&p| sl.mu.get(p as usize).copied().flatten().is_some()) {
            continue;
        }
        let mut types: Vec<&str> = analysis.stability.structures[s]
            .plates
            .iter()
            .filter(|&&p| sl.mu.get(p as usize).copied().flatten().is_none())
            .map(|&p| scene.posts[p as usize].support.as_deref().unwrap_or("(none)"))
            .collect();
        types.sort_unstable();
        types.dedup();
        unknown.push(format!("sliding of {} and of its plates, for want of a friction coefficient for support type {}", analysis.stability.structures[s].label, types.join(", ")));
    }
    (!unknown.is_empty()).then(|| format!("{} — check it with the load added to the scene", unknown.join("; ")))
}

/// How the map takes the notional load of the extra load, in words.
fn notional_words(scene: &Scene, groups: &[Vec<NotionalTerm>]) -> Option<String> {
    if groups.is_empty() {
        return None;
    }
    let most = groups.iter().map(|g| g.iter().map(|t| t.share).sum::<f64>()).fold(0.0, f64::max);
    let bound = scene.horizontal.notional == crate::scene::model::NotionalRule::Falsework && !scene.loads.iter().any(|l| matches!(l.kind, LoadKind::Notional { .. }));
    Some(format!(
        "the notional horizontal load the extra load itself brings ({} % of it{}) is included, with the brace forces it puts into the plates, in its worst direction even where another direction governs the loads already there, and not counted where it would help (on the safe side)",
        crate::format::num(100.0 * most),
        if bound { ", the most the falsework rule adds" } else { "" }
    ))
}

fn role_word(r: crate::scene::model::BeamRole) -> &'static str {
    match r {
        crate::scene::model::BeamRole::Bearer => "bearer",
        crate::scene::model::BeamRole::Ledger => "ledger",
        crate::scene::model::BeamRole::Transom => "transom",
    }
}

/// The load class a deck is checked against: that of a load-class imposed load on it.
pub fn deck_class(scene: &Scene, deck: &crate::scene::model::Deck) -> Option<u8> {
    scene.loads.iter().find_map(|l| match &l.kind {
        LoadKind::DeckArea { deck: id, intensity: Intensity::LoadClassUniform(c) | Intensity::LoadClassPartial(c) }
        | LoadKind::DeckPatch { deck: id, intensity: Intensity::LoadClassUniform(c) | Intensity::LoadClassPartial(c), .. }
            if *id == deck.id =>
        {
            Some(*c)
        }
        _ => None,
    })
}

/// [`Best::check`] of a plate's sliding (after the capacity checks 0–2), in the factor-of-safety
/// form and the EQU form.
const SLIDING_FACTOR: u8 = 3;
const SLIDING_EQU: u8 = 4;

/// The best (smallest) limit found so far at a grid point.
#[derive(Debug, Clone, Copy)]
struct Best {
    kn: f64,
    plate: u32,
    /// 0 safe working load, 1 ground bearing, 2 uplift; [`SLIDING_FACTOR`], [`SLIDING_EQU`].
    check: u8,
    combination: u16,
    method: u16,
    already: bool,
}

impl Best {
    const NONE: Best = Best { kn: f64::INFINITY, plate: u32::MAX, check: 0, combination: 0, method: 0, already: false };
    fn take(&mut self, other: Best) {
        if other.kn < self.kn || (other.kn == self.kn && other.already && !self.already) {
            *self = other;
        }
    }
}

/// Per plate (by post index) and per combination of one method pass: the room left before each
/// capacity, kN of plate load; `None` where the post has no plate or the check is not made.
struct Room {
    /// (to safe working load, to allowable bearing) for capacity-checking combinations.
    capacity: Vec<Option<(f64, f64)>>,
    /// Minimum load for uplift-checking combinations: room before it lifts.
    uplift: Vec<Option<f64>>,
}

/// What one combination needs at every grid point of one method pass.
struct ComboPass {
    c: usize,
    gamma: f64,
    room: Room,
    shared_list: Vec<usize>,
    a: Vec<[f64; 2]>,
    scratch: BracedScratch,
    bounds: BearerBounds,
    notional_here: bool,
    by_sign: Vec<[Best; 2]>,
    least: Vec<f64>,
}

/// What every grid point of one method pass `m` needs, worked out once for the pass: the braced
/// plates and, per combination, the rooms and bounds.
struct PassSetup<'a> {
    inf: &'a DeckInfluence,
    m: usize,
    braced: &'a Braced,
    row_sum: Vec<f64>,
    reach: Reach,
    states: Vec<ComboPass>,
}

/// [`PassSetup`] of method pass `m`.
fn pass_setup<'a>(analysis: &Analysis, settings: &SpareSettings, combos: &[usize], groups: &[Vec<NotionalTerm>], m: usize, inf: &'a DeckInfluence, braced: &'a Braced, n_posts: usize) -> PassSetup<'a> {
    let cols = inf.along.len();
    let nk = inf.bearers.len();
    let vertically_shared = shared_posts(inf, n_posts);
    let reach = Reach::new(inf, braced, &vertically_shared);
    let mut states = Vec::with_capacity(combos.len());
    for &c in combos {
        let comb = &analysis.combinations[c];
        let gamma = comb.factors.q * settings.dynamic_factor;
        if gamma <= 0.0 {
            continue;
        }
        let room = room_of(analysis, m, c, n_posts);
        let mut shared = vertically_shared.clone();
        let notional_here = !braced.posts.is_empty();
        let shared_list: Vec<usize> = (0..n_posts).filter(|&p| shared[p] && !(notional_here && braced.slot[p] != u32::MAX)).collect();
        if notional_here {
            for &p in &braced.posts {
                shared[p as usize] = true;
            }
        }
        // Per direction group, the factored notional share along x and y per kN placed
        // (notional load is never reduced by ψ0), relative to γ·φ.
        let a: Vec<[f64; 2]> = groups
            .iter()
            .map(|g| {
                g.iter().fold([0.0; 2], |acc, t| {
                    let f = comb.variable_factor(t.case) * t.share / comb.factors.q;
                    [acc[0] + f * t.u[0], acc[1] + f * t.u[1]]
                })
            })
            .collect();
        let scratch = BracedScratch::new(braced, &a, &room);
        let bounds = bearer_bounds(inf, braced, &reach, &scratch, &vertically_shared);
        // Per bearer and column: the least ratio room / influence over the plates, for a
        // positive and for a negative deck share, with what gave it.
        let mut by_sign = vec![[Best::NONE; 2]; nk * cols];
        for k in 0..nk {
            for j in 0..cols {
                let slot = &mut by_sign[k * cols + j];
                for &(p, f) in inf.flows.at(k, j) {
                    if f.abs() < INFLUENCE_FLOOR || shared[p as usize] {
                        continue;
                    }
                    for (sign, effect) in [(0usize, f), (1usize, -f)] {
                        if let Some(b) = plate_limit(&room, p, effect, c, m) {
                            slot[sign].take(b);
                        }
                    }
                }
            }
        }
        // The least ratio over the bearers of each column: no bearer can give less than that
        // over its share, so bearers are taken largest share first and the rest skipped once
        // their share cannot beat the value found.
        let least: Vec<f64> = (0..cols).map(|j| (0..nk).flat_map(|k| by_sign[k * cols + j]).map(|b| b.kn).fold(f64::INFINITY, f64::min)).collect();
        states.push(ComboPass { c, gamma, room, shared_list, a, scratch, bounds, notional_here, by_sign, least });
    }
    PassSetup { inf, m, braced, row_sum: row_sums(inf, groups), reach, states }
}

/// The least limit at every grid point of rows `rows` of one method pass over the combinations,
/// before the deck's and the structure's own checks; row by row.
fn pass_rows(setup: &PassSetup, rows: std::ops::Range<usize>, caps: &[f64]) -> Vec<Best> {
    let &PassSetup { inf, m, braced, ref row_sum, ref reach, ref states } = setup;
    let cols = inf.along.len();
    let nk = inf.bearers.len();
    let mut best = vec![Best::NONE; rows.len() * cols];
    let first = rows.start;
    let mut scratch: Vec<BracedScratch> = states.iter().map(|st| st.scratch.clone()).collect();
    let mut shares: Vec<(usize, f64)> = Vec::with_capacity(nk);
    let mut taking: Vec<u32> = Vec::with_capacity(nk);
    let mut sums = NotionalSums::new(braced.posts.len());
    for i in rows {
        taking.clear();
        if let Some(n) = &inf.notional {
            taking.extend((0..braced.bearers.min(n.d[i].len())).filter(|&k| n.d[i][k] != 0.0).map(|k| k as u32));
        }
        shares.clear();
        shares.extend(inf.d[i].iter().copied().enumerate().filter(|(_, dk)| dk.abs() >= INFLUENCE_FLOOR));
        shares.sort_unstable_by(|a, b| b.1.abs().total_cmp(&a.1.abs()));
        for j in 0..cols {
            sums.clear();
            // What the structure and the deck allow here bounds the search: a plate that cannot
            // come below it is not summed (just above it, so that a plate level with it is still
            // found and keeps its place ahead of them).
            let cap = caps.get(i * cols + j).copied().unwrap_or(f64::INFINITY);
            for (st, w) in states.iter().zip(&mut scratch) {
                let c = st.c;
                let mut here = Best { kn: above(cap * st.gamma), ..Best::NONE };
                for &(k, dk) in &shares {
                    if st.least[j] / dk.abs() >= here.kn {
                        break;
                    }
                    let b = st.by_sign[k * cols + j][if dk > 0.0 { 0 } else { 1 }];
                    if b.kn.is_finite() {
                        here.take(Best { kn: b.kn / dk.abs(), ..b });
                    }
                }
                // Plates reached through more than one of the deck's bearers: summed here.
                for &p in &st.shared_list {
                    let c_p: f64 = (0..nk).map(|k| inf.d[i][k] * inf.flows.at(k, j).iter().filter(|e| e.0 as usize == p).map(|e| e.1).sum::<f64>()).sum();
                    if c_p.abs() >= INFLUENCE_FLOOR
                        && let Some(b) = plate_limit(&st.room, p as u32, c_p, c, m)
                    {
                        here.take(b);
                    }
                }
                if st.notional_here {
                    let at = BracedPoint { inf, braced, shares: &shares, row_sum, reach, taking: &taking, i, j, c, m };
                    braced_limits(&at, w, &st.bounds, &st.a, &st.room, &mut sums, &mut here);
                }
                if here.plate == u32::MAX {
                    // Nothing below the cap: as if nothing were found.
                    continue;
                }
                best[(i - first) * cols + j].take(Best { kn: here.kn / st.gamma, ..here });
            }
        }
    }
    best
}

/// The least limit at every grid point over the method passes and combinations. Method passes
/// are independent, and so are the grid points of one pass once its setup is made: the braced
/// plates, the setups and the blocks of rows of every pass are handed out in that order, each
/// piece waiting only for what it needs (already worked out, or being worked out on the other
/// core), so that the cores share the work evenly whatever the number of passes.
fn pass_grids(analysis: &Analysis, settings: &SpareSettings, combos: &[usize], groups: &[Vec<NotionalTerm>], coefficients: &DeckCoefficients, n_posts: usize, caps: &[f64]) -> Vec<Best> {
    let (per_pass, kept_braced) = (&coefficients.passes, &coefficients.braced);
    /// Rows of the grid in one piece of work.
    const BLOCK_ROWS: usize = 8;
    // Plates that take brace forces from the notional load of the extra load (summed at each grid
    // point, with that load): once for the passes that share the routing and entry reactions.
    let alike = |a: &DeckInfluence, b: &DeckInfluence| match (&a.notional, &b.notional) {
        (Some(x), Some(y)) => std::sync::Arc::ptr_eq(&x.units, &y.units) && std::sync::Arc::ptr_eq(&x.entries, &y.entries),
        _ => false,
    };
    let owner: Vec<usize> = (0..per_pass.len()).map(|m| (0..m).find(|&e| alike(&per_pass[e], &per_pass[m])).unwrap_or(m)).collect();
    let own: Vec<usize> = (0..per_pass.len()).filter(|&m| owner[m] == m).collect();
    // Worked out once for the coefficients (they depend on the notional load only through
    // whether there is any), else here, side by side.
    let kept = if groups.is_empty() { None } else { kept_braced.lock().ok().and_then(|k| k.clone()).filter(|k| k.len() == own.len()) };
    let braced: Vec<std::sync::OnceLock<std::sync::Arc<Braced>>> = match &kept {
        Some(k) => k.iter().map(|b| std::sync::OnceLock::from(b.clone())).collect(),
        None => own.iter().map(|_| std::sync::OnceLock::new()).collect(),
    };
    let braced_get = |t: usize| &**braced[t].get_or_init(|| std::sync::Arc::new(braced_plates(&per_pass[own[t]], groups, n_posts)));
    let braced_of = |m: usize| braced_get(own.iter().position(|&e| e == owner[m]).expect("every pass has an owner"));
    let setups: Vec<std::sync::OnceLock<PassSetup>> = per_pass.iter().map(|_| std::sync::OnceLock::new()).collect();
    let setup_get = |m: usize| setups[m].get_or_init(|| pass_setup(analysis, settings, combos, groups, m, &per_pass[m], braced_of(m), n_posts));
    let blocks: Vec<(usize, std::ops::Range<usize>)> = (0..per_pass.len())
        .flat_map(|m| {
            let rows = per_pass[m].across.len();
            (0..rows.div_ceil(BLOCK_ROWS)).map(move |b| (m, b * BLOCK_ROWS..((b + 1) * BLOCK_ROWS).min(rows)))
        })
        .collect();
    let (n_braced, n_setups) = (if kept.is_some() { 0 } else { own.len() }, per_pass.len());
    let parts = crate::workers::in_order(n_braced + n_setups + blocks.len(), || (), |t, _| {
        if t < n_braced {
            braced_get(t);
            None
        } else if t < n_braced + n_setups {
            setup_get(t - n_braced);
            None
        } else {
            let (m, rows) = &blocks[t - n_braced - n_setups];
            Some(pass_rows(setup_get(*m), rows.clone(), caps))
        }
    });
    if kept.is_none()
        && !groups.is_empty()
        && let Ok(mut k) = kept_braced.lock()
    {
        *k = braced.iter().map(|b| b.get().cloned()).collect();
    }
    // Blocks come back pass after pass: each taken into the one grid as it comes is the least
    // value over the passes, ties to the first, without a grid per pass.
    let size = per_pass.first().map_or(0, |inf| inf.across.len() * inf.along.len());
    let mut grid = vec![Best::NONE; size];
    for ((m, rows), part) in blocks.iter().zip(parts.into_iter().flatten()) {
        let cols = per_pass[*m].along.len();
        debug_assert_eq!(per_pass[*m].across.len() * cols, size, "every pass has the same grid");
        for (a, b) in grid[rows.start * cols..rows.end * cols].iter_mut().zip(part) {
            a.take(b);
        }
    }
    grid
}

fn deck_map(scene: &Scene, analysis: &Analysis, d: usize, settings: &SpareSettings, combos: &[usize], groups: &[Vec<NotionalTerm>], coefficients: &DeckCoefficients) -> DeckSpare {
    let per_pass = &coefficients.passes;
    let deck = &scene.decks[d];
    let n_posts = scene.posts.len();
    let inf = &per_pass[0];
    let (rows, cols) = (inf.across.len(), inf.along.len());
    // The structure's and the deck's own limits at each point, first: they bound the search of
    // the plates.
    let tipping = tipping_room(analysis, &coefficients.reached);
    let equ = analysis.stability.equilibrium;
    let entry_level = per_pass[0].bearers.iter().map(|&b| scene.bearers[b].level).fold(deck.level, f64::max);
    let class = deck_class(scene, deck).and_then(LoadClass::get);
    let models = class.map(|c| class_models(c, settings.footprint)).unwrap_or_default();
    // Overturning: a load beyond an axis of the structure under the deck adds its moment there
    // (an imposed load never restores), in both forms. The notional load the extra load brings
    // acts where it enters the posts (at the deck's bearers) and turns the structure too, in its
    // worst direction: by its share along the axis's normal times its height above the axis —
    // the same at every point, per axis and form.
    let sideways: Vec<[f64; 2]> = tipping
        .iter()
        .map(|t| {
            let rise = (entry_level - t.point[2]).max(0.0);
            [false, true].map(|factored| {
                groups
                    .iter()
                    .map(|g| g.iter().map(|n| n.share * (n.u[0] * t.normal[0] + n.u[1] * t.normal[1]) * if factored { equ.unfavourable(n.case) } else { 1.0 }).sum::<f64>())
                    .fold(0.0, f64::max)
                    * rise
            })
        })
        .collect();
    let others: Vec<Other> = (0..rows * cols)
        .map(|at| {
            let (x, y) = inf.point(at / cols, at % cols);
            let mut other = Other { kn: f64::INFINITY, already: false, what: OtherLimit::None };
            for (a, t) in tipping.iter().enumerate() {
                let lever = (x - t.point[0]) * t.normal[0] + (y - t.point[1]) * t.normal[1];
                for (room, gamma, form, equ) in [(t.factor_room, 1.0, "factor of safety", 0), (t.equ_room, t.equ_gamma, "EQU", 1)] {
                    let arm = gamma * lever.max(0.0) + sideways[a][equ];
                    if arm <= 0.0 {
                        continue;
                    }
                    let kn_here = room.max(0.0) / (settings.dynamic_factor * arm);
                    if kn_here < other.kn {
                        other = Other { kn: kn_here, already: room <= 0.0, what: OtherLimit::Overturning { axis: a, form } };
                    }
                }
            }
            if !models.is_empty() {
                // The class's load models are alternatives: the one that leaves the most room.
                let (room, model) = models
                    .iter()
                    .enumerate()
                    .map(|(k, (allowed, over, _))| (allowed - existing_imposed(scene, d, x, y, *over), k))
                    .max_by(|a, b| a.0.total_cmp(&b.0))
                    .expect("q1 is always a model");
                let deck_kn = room.max(0.0) / settings.dynamic_factor;
                if deck_kn < other.kn {
                    other = Other { kn: deck_kn, already: room <= 0.0, what: OtherLimit::Deck { model } };
                }
            }
            other
        })
        .collect();
    let caps: Vec<f64> = others.iter().map(|o| o.kn).collect();
    // Method passes are independent: worked out side by side, then taken in pass order (the
    // least value, ties to the first, as one after the other would).
    let mut grid = pass_grids(analysis, settings, combos, groups, coefficients, n_posts, &caps);
    // Sliding of the plates the load reaches: the passes side by side, each searching below the
    // values found so far, then taken in pass order.
    if let Some(sliding) = SlidingDeck::new(scene, analysis, settings, groups, &coefficients.reached) {
        /// Rows of the grid in one piece of work.
        const BLOCK_ROWS: usize = 8;
        let plates = sliding.plates_per_pass(analysis, per_pass, &coefficients.sliding);
        let setups = crate::workers::in_order(per_pass.len(), || (), |m, _| sliding.prepare(analysis, m, &per_pass[m], &plates[m], &grid, &caps));
        let blocks: Vec<(usize, std::ops::Range<usize>)> = (0..per_pass.len())
            .filter(|&m| setups[m].is_some())
            .flat_map(|m| (0..rows.div_ceil(BLOCK_ROWS)).map(move |b| (m, b * BLOCK_ROWS..((b + 1) * BLOCK_ROWS).min(rows))))
            .collect();
        let found = crate::workers::in_order(blocks.len(), || (), |b, _| {
            let (m, range) = &blocks[b];
            let mut own = grid[range.start * cols..range.end * cols].to_vec();
            if let Some(setup) = &setups[*m] {
                sliding.rows(analysis, *m, &per_pass[*m], &plates[*m], setup, range.clone(), &mut own, &caps);
            }
            own
        });
        // In pass order, as one pass after the other would.
        for ((_, range), own) in blocks.iter().zip(found) {
            for (g, b) in grid[range.start * cols..range.end * cols].iter_mut().zip(own) {
                g.take(b);
            }
        }
    }
    // The names the points share.
    let plate_ids: Vec<Label> = scene.posts.iter().map(|p| Label::from(p.id.as_str())).collect();
    let combination_names: Vec<Label> = analysis.combinations.iter().map(|c| Label::from(c.name.as_str())).collect();
    let method_labels: Vec<Label> = (0..analysis.method_count()).map(|m| Label::from(analysis.method_label(m))).collect();
    let axes: Vec<Label> = tipping.iter().map(|t| Label::from(t.about.as_str())).collect();
    let model_words: Vec<Label> = models.iter().map(|m| Label::from(m.2.as_str())).collect();
    let mut points = Vec::with_capacity(rows * cols);
    for i in 0..rows {
        for j in 0..cols {
            let (x, y) = inf.point(i, j);
            let b = grid[i * cols + j];
            let other = &others[i * cols + j];
            // The first least of the plates, then the structure, then the deck.
            let (kn, already, limit) = if other.kn < b.kn {
                let limit = match other.what {
                    OtherLimit::Overturning { axis, form } => Limit::Overturning { about: axes[axis].clone(), form },
                    OtherLimit::Deck { model } => Limit::Deck { what: model_words[model].clone() },
                    OtherLimit::None => Limit::None,
                };
                (other.kn, other.already, limit)
            } else if b.kn.is_finite() && b.check >= SLIDING_FACTOR {
                (b.kn, b.already, Limit::Sliding { plate: plate_ids[b.plate as usize].clone(), form: if b.check == SLIDING_EQU { "EQU" } else { "factor of safety" } })
            } else if b.kn.is_finite() {
                let limit = Limit::Plate {
                    plate: plate_ids[b.plate as usize].clone(),
                    check: ["safe working load", "ground bearing", "uplift"][b.check as usize],
                    combination: combination_names[b.combination as usize].clone(),
                    method: method_labels[b.method as usize].clone(),
                };
                (b.kn, b.already, limit)
            } else {
                (b.kn, b.already, Limit::None)
            };
            points.push(SparePoint { x, y, kn: kn.is_finite().then_some(kn.max(0.0)), already_at_limit: already, limit });
        }
    }
    DeckSpare { deck: deck.id.clone(), level: deck.level, load_class: class.map(|c| c.class), points, columns: cols }
}

/// A limit of the structure or the deck at a grid point: the first least of the overturning
/// axes (both forms) and the deck's load class.
struct Other {
    kn: f64,
    already: bool,
    what: OtherLimit,
}

enum OtherLimit {
    None,
    /// Axis index in [`tipping_room`]'s list, and the form.
    Overturning { axis: usize, form: &'static str },
    /// Load model index in [`class_models`]'s list.
    Deck { model: usize },
}

/// Where the search of the plates starts at a point whose structure or deck allows `kn`: just
/// above it, so that a plate level with it (within rounding of the load factor, and at zero) is
/// still found and keeps its place ahead of them.
fn above(kn: f64) -> f64 {
    kn * (1.0 + 1e-9) + f64::MIN_POSITIVE
}

/// Room an axis of overturning leaves for a load placed beyond it.
struct TippingRoom {
    about: String,
    point: [f64; 3],
    normal: [f64; 2],
    /// Restoring ÷ target − overturning, kN·m (factor-of-safety form, unfactored).
    factor_room: f64,
    /// E_d,stb − E_d,dst, kN·m, and the imposed-load factor of the EQU form.
    equ_room: f64,
    equ_gamma: f64,
}

/// The overturning axes of the structure that carries the deck — every plate its loads reach —
/// with the room each leaves. A load on the deck then turns that structure about an axis by its
/// full lever. (A deck shared by structures that are not joined puts on each only reactions at its
/// own posts, which turn it about its edges only by lifting its plates: the plate checks above
/// cover that.)
fn tipping_room(analysis: &Analysis, reached: &[bool]) -> Vec<TippingRoom> {
    let st = &analysis.stability;
    let n = analysis.ground.plate_area_m2.len();
    let any = reached.iter().any(|&r| r);
    let mut in_structure = vec![false; n];
    st.structures
        .iter()
        .filter(|s| {
            in_structure.iter_mut().for_each(|v| *v = false);
            for &p in &s.plates {
                in_structure[p as usize] = true;
            }
            any && reached.iter().zip(&in_structure).all(|(&r, &i)| !r || i)
        })
        .flat_map(|s| s.axes.iter())
        .map(|t| {
            let overturning = t.permanent_destabilising_knm + t.imposed_destabilising_knm + t.horizontal_destabilising_knm;
            TippingRoom {
                about: t.about.clone(),
                point: t.point,
                normal: t.normal,
                factor_room: t.permanent_stabilising_knm / st.target_factor - overturning,
                equ_room: t.equ_stabilising_knm - t.equ_destabilising_knm,
                equ_gamma: st.equilibrium.q.max(f64::MIN_POSITIVE),
            }
        })
        .collect()
}

/// The limit one plate puts on the placed load (before the factor γ·φ) for an `effect` of 1 kN
/// placed: kN of load.
fn plate_limit(room: &Room, p: u32, effect: f64, c: usize, m: usize) -> Option<Best> {
    let p_us = p as usize;
    let at = |kn: f64, check: u8| Best { kn: kn.max(0.0) / effect.abs(), plate: p, check, combination: c as u16, method: m as u16, already: kn <= 0.0 };
    if effect > 0.0 {
        let (swl, bearing) = room.capacity[p_us]?;
        Some(if swl <= bearing { at(swl, 0) } else { at(bearing, 1) })
    } else {
        room.uplift[p_us].map(|low| at(low, 2))
    }
}

/// Room left at every plate in combination `c` of method pass `m`.
fn room_of(analysis: &Analysis, m: usize, c: usize, n_posts: usize) -> Room {
    let comb = &analysis.combinations[c];
    let mut room = Room { capacity: vec![None; n_posts], uplift: vec![None; n_posts] };
    // Bearing room as the checks take it: on the layer and at formation, overlap groups included.
    let mut max = vec![0.0; analysis.ground.plate_area_m2.len()];
    for p in &analysis.plates {
        max[p.post] = p.combinations_by_method[m][c].max_kn;
    }
    for p in &analysis.plates {
        let r = &p.combinations_by_method[m][c];
        if comb.checks_capacity {
            room.capacity[p.post] = Some((p.swl_kn - r.max_kn, analysis.ground.room_kn(p.post, &max)));
        }
        if comb.checks_uplift {
            room.uplift[p.post] = Some(r.min_kn);
        }
    }
    room
}

/// The plates that take brace forces from the notional load of a load on the deck, with a slot
/// each; per slot the largest brace effect of any of the deck's bearers and columns, per axis
/// and diaphragm assumption (`2·axis + way`). The same for method passes whose notional load
/// reaches the plates alike (the same routing and entry reactions).
struct Braced {
    posts: Vec<u32>,
    /// Slot of each post, `u32::MAX` where it takes none.
    slot: Vec<u32>,
    most: Vec<[f64; 4]>,
    /// Per slot: the nodes that reach it, (bearer k, node number, effect per axis and way);
    /// nodes are numbered bearer after bearer, each bearer's posts in its order.
    nodes: Vec<Vec<(u32, u32, [f64; 4])>>,
    /// Number of nodes.
    node_count: usize,
    /// Number of bearers, and per slot where each bearer's nodes start in `nodes` (nodes come
    /// bearer by bearer): `by_bearer[s · (bearers + 1) + k]`, the last the end.
    bearers: usize,
    by_bearer: Vec<u32>,
    /// Entry reactions by column and node: `entries[j · node_count + node]`.
    entries: Vec<f64>,
}

fn braced_plates(inf: &DeckInfluence, groups: &[Vec<NotionalTerm>], n_posts: usize) -> Braced {
    let mut slot = vec![u32::MAX; n_posts];
    let mut posts = Vec::new();
    let mut most: Vec<[f64; 4]> = Vec::new();
    let mut nodes: Vec<Vec<(u32, u32, [f64; 4])>> = Vec::new();
    let mut node_count = 0;
    let mut by_bearer = Vec::new();
    let mut entries = Vec::new();
    if let (Some(n), false) = (&inf.notional, groups.is_empty()) {
        let first: Vec<usize> = n.units.iter().scan(0, |acc, list| {
            let at = *acc;
            *acc += list.len();
            Some(at)
        }).collect();
        node_count = n.units.iter().map(Vec::len).sum();
        let cols = inf.along.len();
        entries = vec![0.0; cols * node_count];
        for (k, per_column) in n.entries.iter().enumerate() {
            for (j, e) in per_column.iter().enumerate() {
                let at = j * node_count + first[k];
                let len = e.len().min(n.units[k].len());
                entries[at..at + len].copy_from_slice(&e[..len]);
            }
        }
        // |Σₙ eₙ·Uₙ(p)| ≤ (most Σₙ |eₙ| of the bearer) × (most |Uₙ(p)| of its nodes).
        for (k, node_lists) in n.units.iter().enumerate() {
            let spread = n.entries[k].iter().map(|e| e.iter().map(|v| v.abs()).sum::<f64>()).fold(0.0, f64::max);
            if spread == 0.0 {
                continue;
            }
            for (n, four) in node_lists.iter().enumerate() {
                for (q, list) in four.iter().enumerate() {
                    for &(p, v) in list {
                        if (spread * v).abs() < INFLUENCE_FLOOR {
                            continue;
                        }
                        if slot[p as usize] == u32::MAX {
                            slot[p as usize] = posts.len() as u32;
                            posts.push(p);
                            most.push([0.0; 4]);
                            nodes.push(Vec::new());
                        }
                        let sl = slot[p as usize] as usize;
                        let m = &mut most[sl][q];
                        *m = m.max((spread * v).abs());
                        let list = &mut nodes[sl];
                        let node = (first[k] + n) as u32;
                        match list.last_mut() {
                            Some(e) if e.1 == node => e.2[q] = v,
                            _ => {
                                let mut u = [0.0; 4];
                                u[q] = v;
                                list.push((k as u32, node, u));
                            }
                        }
                    }
                }
            }
        }
    }
    let bearers = inf.notional.as_ref().filter(|_| !groups.is_empty()).map_or(0, |n| n.units.len());
    by_bearer.reserve(nodes.len() * (bearers + 1));
    for list in &nodes {
        let mut at = 0;
        for k in 0..=bearers {
            while at < list.len() && (list[at].0 as usize) < k {
                at += 1;
            }
            by_bearer.push(at as u32);
        }
    }
    Braced { posts, slot, most, nodes, node_count, bearers, by_bearer, entries }
}

/// Per row of the grid, Σₖ |d[i][k]| of the notional deck shares (none without notional load).
fn row_sums(inf: &DeckInfluence, groups: &[Vec<NotionalTerm>]) -> Vec<f64> {
    match (&inf.notional, groups.is_empty()) {
        (Some(n), false) => n.d.iter().map(|row| row.iter().map(|v| v.abs()).sum()).collect(),
        _ => Vec::new(),
    }
}

/// Work space of [`braced_limits`] for one combination: per braced plate the vertical influence
/// being summed, and the plates in order of the least limit the notional load alone could give.
#[derive(Clone)]
struct BracedScratch {
    touched: Vec<u32>,
    seen: Vec<bool>,
    /// Per slot: the most the notional load of 1 kN placed can press the plate down, relative
    /// to γ·φ, per unit of Σₖ |d[i][k]|.
    bound: Vec<f64>,
    /// (slot, room ÷ bound), ascending.
    order: Vec<(u32, f64)>,
    /// Per slot: the least room of the plate ([`least_room`]).
    least: Vec<Option<f64>>,
}

impl BracedScratch {
    fn new(braced: &Braced, a: &[[f64; 2]], room: &Room) -> Self {
        let n = braced.posts.len();
        let bound: Vec<f64> = braced
            .most
            .iter()
            .map(|m| a.iter().map(|g| (0..2).map(|w| g[0].abs() * m[w] + g[1].abs() * m[2 + w]).fold(0.0, f64::max)).fold(0.0, f64::max))
            .collect();
        let least: Vec<Option<f64>> = braced.posts.iter().map(|&p| least_room(room, p as usize)).collect();
        let mut order: Vec<(u32, f64)> = (0..n)
            .filter_map(|s| {
                let least = least[s]?;
                (bound[s] > 0.0).then(|| (s as u32, least / bound[s]))
            })
            .collect();
        order.sort_by(|x, y| x.1.total_cmp(&y.1));
        BracedScratch { touched: Vec::new(), seen: vec![false; n], bound, order, least }
    }
}

/// The notional effect at the braced plate of slot `s` of 1 kN placed at grid point (`i`, `j`), per axis and
/// diaphragm assumption (`2·axis + way`). `taking`: the bearers whose notional deck share in row
/// `i` is not zero, in order (the others add nothing).
fn notional_at(inf: &DeckInfluence, braced: &Braced, i: usize, j: usize, s: usize, taking: &[u32]) -> [f64; 4] {
    let mut h = [0.0; 4];
    let Some(n) = &inf.notional else { return h };
    let d = &n.d[i];
    let column = &braced.entries[j * braced.node_count..(j + 1) * braced.node_count];
    let list = &braced.nodes[s];
    let starts = &braced.by_bearer[s * (braced.bearers + 1)..(s + 1) * (braced.bearers + 1)];
    for &k in taking {
        let dk = d[k as usize];
        for &(_, node, u) in &list[starts[k as usize] as usize..starts[k as usize + 1] as usize] {
            // A node the bearer puts none into adds nothing.
            let e = column[node as usize];
            if e == 0.0 {
                continue;
            }
            let c = dk * e;
            for q in 0..4 {
                h[q] += c * u[q];
            }
        }
    }
    h
}

/// A grid point of one method pass and combination, for [`braced_limits`].
struct BracedPoint<'a> {
    inf: &'a DeckInfluence,
    braced: &'a Braced,
    /// The deck shares of the point's row above the floor, largest first.
    shares: &'a [(usize, f64)],
    /// Per row, Σₖ |d[i][k]| of the notional deck shares.
    row_sum: &'a [f64],
    /// The bearers whose notional deck share in the point's row is not zero, in order.
    taking: &'a [u32],
    reach: &'a Reach,
    i: usize,
    j: usize,
    c: usize,
    m: usize,
}

/// The notional sums worked out at one grid point (by slot), kept for the other combinations
/// of the same point: they depend on the point and the method pass only.
#[derive(Default)]
struct NotionalSums {
    /// Per slot: the point they were worked out at (`point`), and the sums.
    at: Vec<(u64, [f64; 4])>,
    point: u64,
}

impl NotionalSums {
    fn new(slots: usize) -> Self {
        NotionalSums { at: vec![(0, [0.0; 4]); slots], point: 0 }
    }
    /// Forget the sums: the next grid point.
    fn clear(&mut self) {
        self.point += 1;
    }
    fn get(&mut self, s: usize, work_out: impl FnOnce() -> [f64; 4]) -> [f64; 4] {
        let e = &mut self.at[s];
        if e.0 != self.point {
            *e = (self.point, work_out());
        }
        e.1
    }
}

/// Per braced plate reached through one bearer, bounds that let a whole bearer be skipped at a
/// grid point: per bearer and column, the least room ÷ |influence| of its braced plates
/// (`vertical`); per bearer, the least room ÷ the notional bound of its braced plates
/// (`notional`). Rooms are those of the checks the combination makes.
struct BearerBounds {
    cols: usize,
    vertical: Vec<f64>,
    notional: Vec<f64>,
    /// Per column, the least `vertical` of any bearer; the least `notional` of any bearer.
    vertical_least: Vec<f64>,
    notional_least: f64,
    /// Braced plates reached through more than one of the deck's bearers (by slot): summed whole.
    shared: Vec<u32>,
}

/// Per bearer and column of one method pass, the braced plates its flow reaches that no other of
/// the deck's bearers reaches: (slot, effect), in the flow's order.
struct Reach {
    /// Where the plates of bearer `k` at column `j` start in `plates` (`start[k · cols + j]`); they
    /// end where the next start.
    start: Vec<u32>,
    plates: Vec<(u32, f64)>,
}

impl Reach {
    fn new(inf: &DeckInfluence, braced: &Braced, vertically_shared: &[bool]) -> Self {
        let mut start = Vec::with_capacity(inf.bearers.len() * inf.along.len() + 1);
        let mut plates = Vec::new();
        start.push(0);
        for columns in inf.flows.per_bearer() {
            for flow in columns {
                for &(p, f) in flow {
                    let s = braced.slot[p as usize];
                    if s != u32::MAX && !vertically_shared[p as usize] {
                        plates.push((s, f));
                    }
                }
                start.push(plates.len() as u32);
            }
        }
        Reach { start, plates }
    }
    /// The plates of bearer `k` at column `j`, at `k · cols + j`.
    fn at(&self, kj: usize) -> &[(u32, f64)] {
        &self.plates[self.start[kj] as usize..self.start[kj + 1] as usize]
    }
}

/// The least room of a plate in the checks the combination makes (kN, not below zero).
fn least_room(room: &Room, p: usize) -> Option<f64> {
    let cap = room.capacity[p].map(|(swl, bearing)| swl.min(bearing));
    let low = room.uplift[p];
    match (cap, low) {
        (Some(a), Some(b)) => Some(a.min(b).max(0.0)),
        (Some(a), None) | (None, Some(a)) => Some(a.max(0.0)),
        (None, None) => None,
    }
}

fn bearer_bounds(inf: &DeckInfluence, braced: &Braced, reach: &Reach, w: &BracedScratch, vertically_shared: &[bool]) -> BearerBounds {
    let (nk, cols) = (inf.bearers.len(), inf.along.len());
    let mut vertical = vec![f64::INFINITY; nk * cols];
    let mut notional = vec![f64::INFINITY; nk];
    let mut shared = Vec::new();
    for (s, &p) in braced.posts.iter().enumerate() {
        if vertically_shared[p as usize] {
            shared.push(s as u32);
        }
    }
    for k in 0..nk {
        for j in 0..cols {
            for &(s, f) in reach.at(k * cols + j) {
                let Some(least) = w.least[s as usize] else { continue };
                if f != 0.0 {
                    let v = &mut vertical[k * cols + j];
                    *v = v.min(least / f.abs());
                }
                if w.bound[s as usize] > 0.0 {
                    notional[k] = notional[k].min(least / w.bound[s as usize]);
                }
            }
        }
    }
    let vertical_least = (0..cols).map(|j| (0..nk).map(|k| vertical[k * cols + j]).fold(f64::INFINITY, f64::min)).collect();
    let notional_least = notional.iter().copied().fold(f64::INFINITY, f64::min);
    BearerBounds { cols, vertical, notional, vertical_least, notional_least, shared }
}

/// Limits at grid point (`i`, `j`) from the plates that take brace forces, per kN placed and
/// before the factor γ·φ: the vertical influence `r` of the extra load and the brace components
/// of its notional load together. The maximum takes `r` where it presses the plate down (the
/// extra load may be absent) and the notional load of the worst direction group and diaphragm
/// assumption where that presses it down; the minimum takes `r` where it lifts the plate and the
/// notional load of the worst direction where that lifts it (the minimum counts a notional load
/// of imposed load where it lifts a plate). Bearer by bearer, largest deck share first, a
/// bearer is skipped where a bound on its plates — room ÷ (|share| · |influence| + Σₖ |d[i][k]|
/// · notional bound) — cannot beat the value found; the plates no bearer reaches here take the
/// notional load alone, in order of the least limit they could give.
fn braced_limits(at: &BracedPoint, w: &mut BracedScratch, bounds: &BearerBounds, a: &[[f64; 2]], room: &Room, sums: &mut NotionalSums, here: &mut Best) {
    let &BracedPoint { inf, braced, shares, reach, taking, i, j, c, m, .. } = at;
    let spread = at.row_sum[i];
    let mut exact = |s: usize, r: f64, here: &mut Best| {
        let p = braced.posts[s];
        let h = sums.get(s, || notional_at(inf, braced, i, j, s, taking));
        let (mut down, mut up) = (0.0f64, 0.0f64);
        for g in a {
            for way in 0..2 {
                let v = g[0] * h[way] + g[1] * h[2 + way];
                down = down.max(v);
                up = up.min(v);
            }
        }
        let pressing = r.max(0.0) + down;
        if pressing >= INFLUENCE_FLOOR
            && let Some(b) = plate_limit(room, p, pressing, c, m)
        {
            here.take(b);
        }
        let lifting = r.min(0.0) + up;
        if lifting <= -INFLUENCE_FLOOR
            && let Some(b) = plate_limit(room, p, lifting, c, m)
        {
            here.take(b);
        }
    };
    let mut consider = |s: usize, r: f64, here: &mut Best, w: &mut BracedScratch| {
        if !w.seen[s] {
            w.seen[s] = true;
            w.touched.push(s as u32);
        }
        let Some(least) = w.least[s] else { return };
        let most = r.abs() + spread * w.bound[s];
        if most >= INFLUENCE_FLOOR && least / most < here.kn {
            exact(s, r, here);
        }
    };
    // Plates reached through one bearer: r = d[i][k] · f. Shares come largest first: once the
    // bound of the least room of any bearer cannot beat the value found, none can.
    let (v_least, n_least) = (bounds.vertical_least[j], bounds.notional_least);
    let bound_of = |dk: f64, v: f64, n: f64| {
        let inv = if v.is_finite() { dk.abs() / v } else { 0.0 } + if n.is_finite() { spread / n } else { 0.0 };
        if inv <= 0.0 { f64::INFINITY } else { 1.0 / inv }
    };
    for &(k, dk) in shares {
        if bound_of(dk, v_least, n_least) >= here.kn {
            break;
        }
        if bound_of(dk, bounds.vertical[k * bounds.cols + j], bounds.notional[k]) >= here.kn {
            continue;
        }
        for &(s, f) in reach.at(k * bounds.cols + j) {
            consider(s as usize, dk * f, here, w);
        }
    }
    // Plates reached through more than one bearer: summed whole.
    for &s in &bounds.shared {
        let p = braced.posts[s as usize];
        let r: f64 = shares.iter().map(|&(k, dk)| dk * inf.flows.at(k, j).iter().filter(|e| e.0 == p).map(|e| e.1).sum::<f64>()).sum();
        consider(s as usize, r, here, w);
    }
    // The others take the notional load alone: in order of the least limit they could give.
    if spread > 0.0 {
        for &(s, key) in &w.order {
            if key / spread >= here.kn {
                break;
            }
            if !w.seen[s as usize] {
                exact(s as usize, 0.0, here);
            }
        }
    }
    for &s in &w.touched {
        w.seen[s as usize] = false;
    }
    w.touched.clear();
}

/// Posts reached through more than one of the deck's bearers.
fn shared_posts(inf: &DeckInfluence, n_posts: usize) -> Vec<bool> {
    let mut via = vec![u32::MAX; n_posts];
    let mut shared = vec![false; n_posts];
    for (k, columns) in inf.flows.per_bearer().enumerate() {
        for col in columns {
            for &(p, f) in col {
                if f == 0.0 {
                    continue;
                }
                let v = &mut via[p as usize];
                if *v == u32::MAX {
                    *v = k as u32;
                } else if *v != k as u32 {
                    shared[p as usize] = true;
                }
            }
        }
    }
    shared
}

/// The load models of load class `class` that apply to the footprint: (the most it takes, kN;
/// the area the imposed load already there is counted over; in words). The uniform load q1 over
/// the footprint; the partial-area load q2 over it (classes 4–6); and, for a point or a footprint
/// within 500 × 500 mm, the concentrated load F1 on that square. They are alternatives, not added.
// source: EN 12811-1:2003 Table 3 (q1, q2 via DGUV 201-011; F1 and the rule that the models act
// separately from memory), REFERENCES §2
fn class_models(class: &LoadClass, fp: Footprint) -> Vec<(f64, Footprint, String)> {
    let a = fp.area();
    let mut out = vec![(class.uniform_kpa * a, fp, format!("load class {}, q1 {} kPa over the footprint", class.class, class.uniform_kpa))];
    if let Some(q2) = class.partial_kpa {
        out.push((q2 * a, fp, format!("load class {}, q2 {} kPa over the footprint", class.class, q2)));
    }
    if fp.x_m <= 0.5 + 1e-9 && fp.y_m <= 0.5 + 1e-9 {
        let square = Footprint { x_m: 0.5, y_m: 0.5 };
        out.push((class.concentrated_500_kn, square, format!("load class {}, concentrated load F1 {} kN on 500 × 500 mm", class.class, class.concentrated_500_kn)));
    }
    out
}

/// Imposed load already on the footprint at (x, y) of deck `d`, kN: area and patch pressures
/// covering it, and point loads on it.
fn existing_imposed(scene: &Scene, d: usize, x: f64, y: f64, fp: Footprint) -> f64 {
    let deck = &scene.decks[d];
    let rect = crate::scene::geometry::Rect { x: (x - 0.5 * fp.x_m, x + 0.5 * fp.x_m), y: (y - 0.5 * fp.y_m, y + 0.5 * fp.y_m) };
    let overlap = |r: &crate::scene::geometry::Rect| {
        let w = (rect.x.1.min(r.x.1) - rect.x.0.max(r.x.0)).max(0.0);
        let h = (rect.y.1.min(r.y.1) - rect.y.0.max(r.y.0)).max(0.0);
        w * h
    };
    let mut total = 0.0;
    for l in scene.loads.iter().filter(|l| l.case == crate::scene::loads::Case::Q) {
        match &l.kind {
            LoadKind::DeckArea { deck: id, intensity } if *id == deck.id => {
                let q = intensity.kpa().unwrap_or(0.0);
                total += q * if fp.is_point() { 0.0 } else { overlap(&deck.extent) };
            }
            LoadKind::DeckPatch { deck: id, area, intensity } if *id == deck.id => {
                total += intensity.kpa().unwrap_or(0.0) * if fp.is_point() { 0.0 } else { overlap(area) };
            }
            LoadKind::DeckPoint { deck: id, x: px, y: py, kn } if *id == deck.id => {
                let inside = if fp.is_point() { (px - x).abs() < 1e-9 && (py - y).abs() < 1e-9 } else { rect.contains(*px, *py, 0.0) };
                if inside {
                    total += kn;
                }
            }
            _ => {}
        }
    }
    total
}

/// The plates a load on the deck reaches, by post: those that take some of it in any method pass.
fn reached_plates(n_posts: usize, per_pass: &[DeckInfluence]) -> Vec<bool> {
    let mut reached = vec![false; n_posts];
    for e in per_pass.iter().flat_map(|inf| inf.flows.all()) {
        if e.1 != 0.0 {
            reached[e.0 as usize] = true;
        }
    }
    reached
}

/// The structures a load on the deck reaches (its `reached` plates, [`reached_plates`]). (Its
/// notional load, carried by the bracing, stays within them: braces join what they connect into
/// one structure.)
fn reached_structures(analysis: &Analysis, reached: &[bool]) -> Vec<usize> {
    let structures = &analysis.stability.structures;
    (0..structures.len()).filter(|&s| structures[s].plates.iter().any(|&p| reached[p as usize])).collect()
}

/// What 1 kN of horizontal load at a node does to a plate, per `q = 2·axis + way`: the brace
/// components (`[q]`), then the base shear along x and y (`[4 + 2q]`, `[5 + 2q]`). Sums of them
/// are made the same way.
type Effects = [f64; 12];

/// The base shear (x, y) of `q = 2·axis + way` in [`Effects`].
fn shear_of(e: &Effects, q: usize) -> [f64; 2] {
    [e[4 + 2 * q], e[5 + 2 * q]]
}

/// One node's effect at one plate: (bearer k, node, [`Effects`]).
type NodeAtPlate = (u32, u32, Effects);

/// The plates whose sliding a load on a deck can change — in the structures it reaches where
/// every plate has a friction coefficient, those that take base shear already (in any method
/// pass) or from the notional load of the extra load — with what each node of the deck's bearers
/// does to them. The same in every method pass that shares the notional routing.
#[derive(Clone)]
struct SlidingPlates {
    posts: Vec<u32>,
    mu: Vec<f64>,
    nodes: std::sync::Arc<Vec<Vec<NodeAtPlate>>>,
    /// Per slot and node entry, per form: the most 1 kN at the node adds to the left side of
    /// the check at the plate, over the direction groups and assumptions — η·|s| + μ·(lift).
    node_most: std::sync::Arc<Vec<Vec<[f64; 2]>>>,
    /// Per slot and form (factor of safety, EQU): the most the notional load of 1 kN can add
    /// to the left side of the check per unit of Σₖ |d_n[i][k]| — η·|s| + μ·(lift).
    notional_most: Vec<[f64; 2]>,
    /// Per slot: (bearer k, first, end) of its entries in `nodes`, bearer by bearer: a point
    /// looks only at the bearers its row loads.
    by_bearer: std::sync::Arc<Vec<Vec<(u32, u32, u32)>>>,
    /// The routing and entry reactions they were worked out from (by address).
    from: [usize; 3],
}

/// What the plates of [`SlidingDeck::plates_per_pass`] are worked out from, besides the
/// influence coefficients.
#[derive(Clone, PartialEq)]
struct SlidingKey {
    in_scope: Vec<bool>,
    /// Per post: in scope and taking base shear already.
    sheared: Vec<bool>,
    mu: Vec<Option<f64>>,
    a: Vec<[[f64; 2]; 2]>,
    w_shear: [f64; 2],
}

/// What the sliding limits of one deck need in every method pass.
struct SlidingDeck {
    /// Per direction group, per form (unfactored, factored): the notional load along x and y
    /// per kN placed; one group of none where there is no notional load.
    a: Vec<[[f64; 2]; 2]>,
    /// Per sliding check direction group ([`crate::check::sliding::PlateRooms::groups`]): the
    /// groups of `a` taken with it — the one of the same direction, and any of a direction the
    /// check has none of (with each, on the safe side); none: the extra load's vertical load alone.
    pairs: Vec<Vec<usize>>,
    /// Per form: the factor on the base shear, and on the friction the vertical load takes.
    w_shear: [f64; 2],
    w_vertical: [f64; 2],
    phi: f64,
    in_scope: Vec<bool>,
}

impl SlidingDeck {
    /// `None` where no plate a load on the deck reaches has its sliding checked.
    fn new(scene: &Scene, analysis: &Analysis, settings: &SpareSettings, groups: &[Vec<NotionalTerm>], reached: &[bool]) -> Option<SlidingDeck> {
        let sl = &analysis.sliding;
        if !sliding_checked(analysis) {
            return None;
        }
        let mut in_scope = vec![false; scene.posts.len()];
        for s in reached_structures(analysis, reached) {
            let plates = &analysis.stability.structures[s].plates;
            if plates.iter().all(|&p| sl.mu[p as usize].is_some()) {
                for &p in plates {
                    in_scope[p as usize] = true;
                }
            }
        }
        if !in_scope.contains(&true) {
            return None;
        }
        let f = &scene.stability.equilibrium;
        let mut a: Vec<[[f64; 2]; 2]> = groups
            .iter()
            .map(|g| {
                let mut v = [[0.0; 2]; 2];
                for t in g {
                    for ax in 0..2 {
                        v[0][ax] += t.share * t.u[ax];
                        v[1][ax] += f.unfavourable(t.case) * t.share * t.u[ax];
                    }
                }
                v
            })
            .collect();
        let keys: Vec<i64> = groups.iter().map(|g| g.first().map_or(-1, |t| direction_key((t.u[0], t.u[1])))).collect();
        let checked = &sl.rooms.groups;
        let unmatched: Vec<usize> = (0..keys.len()).filter(|&g| !checked.contains(&Some(keys[g]))).collect();
        let pairs = checked.iter().map(|key| (0..keys.len()).filter(|&g| Some(keys[g]) == *key || unmatched.contains(&g)).collect()).collect();
        if a.is_empty() {
            a.push([[0.0; 2]; 2]);
        }
        Some(SlidingDeck { a, pairs, w_shear: [sl.target_factor, 1.0], w_vertical: [1.0, f.q], phi: settings.dynamic_factor, in_scope })
    }

    /// The plates of each method pass: those of an earlier pass where it shares their routing.
    /// Those kept in `kept` where worked out for the same [`SlidingKey`] (which they are then
    /// replaced by otherwise).
    fn plates_per_pass(&self, analysis: &Analysis, per_pass: &[DeckInfluence], kept: &std::sync::Mutex<Option<(SlidingKey, Vec<std::sync::Arc<SlidingPlates>>)>>) -> Vec<std::sync::Arc<SlidingPlates>> {
        let sl = &analysis.sliding;
        let key = SlidingKey {
            in_scope: self.in_scope.clone(),
            sheared: (0..self.in_scope.len()).map(|p| self.in_scope[p] && sl.rooms.sheared(p)).collect(),
            mu: sl.mu.clone(),
            a: self.a.clone(),
            w_shear: self.w_shear,
        };
        // A poisoned lock only loses what was kept: worked out again.
        let mut kept = kept.lock().unwrap_or_else(|poisoned| poisoned.into_inner());
        if let Some((_, plates)) = kept.as_ref().filter(|(for_key, plates)| *for_key == key && plates.len() == per_pass.len()) {
            return plates.clone();
        }
        let plates = self.work_out_per_pass(analysis, per_pass);
        *kept = Some((key, plates.clone()));
        plates
    }

    fn work_out_per_pass(&self, analysis: &Analysis, per_pass: &[DeckInfluence]) -> Vec<std::sync::Arc<SlidingPlates>> {
        let mut out: Vec<std::sync::Arc<SlidingPlates>> = Vec::with_capacity(per_pass.len());
        for inf in per_pass {
            let from = inf.notional.as_ref().map_or([0; 3], |n| [std::sync::Arc::as_ptr(&n.units) as usize, std::sync::Arc::as_ptr(&n.shears) as usize, std::sync::Arc::as_ptr(&n.entries) as usize]);
            if let Some(same) = out.iter().find(|p| p.from == from && from != [0; 3]) {
                out.push(same.clone());
                continue;
            }
            // The same routing with other entry reactions: only what depends on those is new.
            let routed = out.iter().find(|p| p.from[..2] == from[..2] && from != [0; 3]).map(|p| SlidingPlates { from, ..(**p).clone() });
            let mut sp = routed.unwrap_or_else(|| self.work_out_plates(analysis, inf, from));
            self.with_entries(&mut sp, inf);
            out.push(std::sync::Arc::new(sp));
        }
        out
    }

    fn work_out_plates(&self, analysis: &Analysis, inf: &DeckInfluence, from: [usize; 3]) -> SlidingPlates {
        let sl = &analysis.sliding;
        let n_posts = self.in_scope.len();
        let mut slot = vec![u32::MAX; n_posts];
        let mut sp = SlidingPlates { posts: Vec::new(), mu: Vec::new(), nodes: Default::default(), node_most: Default::default(), notional_most: Vec::new(), by_bearer: Default::default(), from };
        let mut nodes: Vec<Vec<NodeAtPlate>> = Vec::new();
        let mut add = |p: usize, sp: &mut SlidingPlates| {
            if slot[p] == u32::MAX {
                slot[p] = sp.posts.len() as u32;
                sp.posts.push(p as u32);
                sp.mu.push(sl.mu[p].unwrap_or(0.0));
                nodes.push(Vec::new());
            }
        };
        for p in (0..n_posts).filter(|&p| self.in_scope[p]) {
            if sl.rooms.sheared(p) {
                add(p, &mut sp);
            }
        }
        let Some(n) = &inf.notional else {
            // No notional load: the plates that already take shear, with no node reaching them.
            sp.by_bearer = std::sync::Arc::new(vec![Vec::new(); nodes.len()]);
            sp.node_most = std::sync::Arc::new(vec![Vec::new(); nodes.len()]);
            sp.nodes = std::sync::Arc::new(nodes);
            return sp;
        };
        for &(p, v) in n.shears.iter().flatten().flatten().flatten() {
            if self.in_scope[p as usize] && v != [0.0; 2] {
                add(p as usize, &mut sp);
            }
        }
        // Node by node, what each does to each plate.
        for (k, per_node) in n.shears.iter().enumerate() {
            for (node, four) in per_node.iter().enumerate() {
                let at = (k as u32, node as u32);
                for (q, list) in four.iter().enumerate() {
                    for &(p, v) in list {
                        let s = slot[p as usize];
                        if s != u32::MAX && v != [0.0; 2] {
                            let e = &mut node_entry(&mut nodes[s as usize], at).2;
                            [e[4 + 2 * q], e[5 + 2 * q]] = v;
                        }
                    }
                }
                let Some(units) = n.units.get(k).and_then(|u| u.get(node)) else { continue };
                for (q, list) in units.iter().enumerate() {
                    for &(p, v) in list {
                        let s = slot[p as usize];
                        if s != u32::MAX && v != 0.0 {
                            node_entry(&mut nodes[s as usize], at).2[q] = v;
                        }
                    }
                }
            }
        }
        sp.by_bearer = std::sync::Arc::new(
            nodes
                .iter()
                .map(|list| {
                    let mut out: Vec<(u32, u32, u32)> = Vec::new();
                    for (at, e) in list.iter().enumerate() {
                        match out.last_mut() {
                            Some(last) if last.0 == e.0 => last.2 = at as u32 + 1,
                            _ => out.push((e.0, at as u32, at as u32 + 1)),
                        }
                    }
                    out
                })
                .collect(),
        );
        sp.node_most = std::sync::Arc::new(
            nodes
                .iter()
                .zip(&sp.mu)
                .map(|(list, &mu)| {
                    list.iter()
                        .map(|(_, _, e)| {
                            let mut most = [0.0f64; 2];
                            for (form, m) in most.iter_mut().enumerate() {
                                for g in &self.a {
                                    let v = g[form];
                                    for way in 0..2 {
                                        let (sh, sh2) = (shear_of(e, way), shear_of(e, 2 + way));
                                        let sx = [v[0] * sh[0] + v[1] * sh2[0], v[0] * sh[1] + v[1] * sh2[1]];
                                        let lift = (v[0] * e[way] + v[1] * e[2 + way]).abs();
                                        *m = m.max(self.w_shear[form] * (sx[0] * sx[0] + sx[1] * sx[1]).sqrt() + mu * lift);
                                    }
                                }
                            }
                            most
                        })
                        .collect()
                })
                .collect(),
        );
        sp.nodes = std::sync::Arc::new(nodes);
        sp
    }

    /// What of the plates depends on the entry reactions of a pass: the entries per column, and
    /// per plate the most the notional load of 1 kN can add per unit of Σₖ |d_n[i][k]|:
    /// |s| ≤ Σₖ |d_n[i][k]| · (most Σₙ |e| of bearer k) · (most |S| of its nodes), and alike for
    /// the brace components.
    fn with_entries(&self, sp: &mut SlidingPlates, inf: &DeckInfluence) {
        let Some(n) = &inf.notional else { return };
        let spread: Vec<f64> = n.entries.iter().map(|cols| cols.iter().map(|e| e.iter().map(|v| v.abs()).sum::<f64>()).fold(0.0, f64::max)).collect();
        sp.notional_most = sp
            .nodes
            .iter()
            .zip(sp.node_most.iter())
            .map(|(list, most)| {
                let mut out = [0.0f64; 2];
                for (&(k, ..), m) in list.iter().zip(most) {
                    let spread = spread.get(k as usize).copied().unwrap_or(0.0);
                    for form in 0..2 {
                        out[form] = out[form].max(spread * m[form]);
                    }
                }
                out
            })
            .collect();
    }

    /// What the plates' sliding limits of method pass `m` need at every grid point; `None` where
    /// there is nothing to look for. The limits themselves ([`SlidingDeck::rows`]), in
    /// characteristic kN after γ·φ:
    ///
    /// At a plate with friction μ, least vertical load N and base shear H, a load `P` placed adds
    /// the base shear `s·P` of its notional load (|H + s·P| ≤ |H| + |s|·P) and takes away μ × what
    /// it lifts off the plate: its vertical load where it lifts (`c < 0`; an imposed load never
    /// adds friction) and the brace components of its notional load where they lift (`u < 0`; the
    /// sliding check counts a notional load of imposed load only where it lifts). The plate needs
    /// no restraint while `μ·(N − loss·P) ≥ η·|H + s·P|` (factor of safety η) and
    /// `μ·(N_d − loss_d·P) ≥ |H_d + s_d·P|` (EQU): `P ≤ (μN − η|H|) / (φ·(η|s| + μ·loss))`. Each
    /// direction and diaphragm assumption of the check is taken with the extra load's notional
    /// load of the same direction and assumption (see [`SlidingDeck::pairs`]). (The structure's
    /// own check follows from its plates': where each plate keeps μN ≥ η|H|, so do their sums.)
    fn prepare(&self, analysis: &Analysis, m: usize, inf: &DeckInfluence, sp: &SlidingPlates, grid: &[Best], caps: &[f64]) -> Option<SlidingSetup> {
        let rooms = &analysis.sliding.rooms;
        rooms.get(m, 0, 0, 0)?;
        // Nothing can be less than a limit already reached everywhere.
        if grid.iter().enumerate().all(|(at, b)| below(at, b, caps) <= 0.0) || sp.posts.is_empty() {
            return None;
        }
        let (n_groups, n_variants) = (rooms.groups.len(), rooms.variants);
        let (cols, nk) = (inf.along.len(), inf.bearers.len());
        let n_slots = sp.posts.len();
        let mut slot = vec![u32::MAX; analysis.sliding.mu.len()];
        for (s, &p) in sp.posts.iter().enumerate() {
            slot[p as usize] = s as u32;
        }
        // Per slot, direction group and assumption: the room (both forms) and the shear there.
        let room_of: Vec<Vec<[f64; 3]>> = sp.posts.iter().map(|&p| (0..n_groups).flat_map(|g| (0..n_variants).map(move |v| (g, v))).map(|(g, v)| rooms.get(m, p as usize, g, v).unwrap_or([f64::INFINITY, f64::INFINITY, 0.0])).collect()).collect();
        let vertical = VerticalInfluence::new(inf, &slot, n_slots);
        // Per slot and form: the least room of any direction and assumption; per bearer reaching
        // it, the most its influence lifts and presses it over the columns.
        let least: Vec<[f64; 2]> = room_of.iter().map(|r| [0, 1].map(|form| r.iter().map(|x| x[form]).fold(f64::INFINITY, f64::min))).collect();
        let extremes: Vec<Vec<(u32, f64, f64)>> = (0..n_slots).map(|s| vertical.of(s).map(|(k, _, col)| (k, col.iter().fold(0.0f64, |m, v| m.max(-v)), col.iter().fold(0.0f64, |m, v| m.max(*v)))).collect()).collect();
        // Plates with no room left are looked at nearly everywhere: their notional sums are made
        // per column of each bearer once, so that a row's are a sum of whole columns (within a
        // bound on the memory they take).
        let mut budget = COLUMN_SUMS_BUDGET;
        let by_column = (0..n_slots)
            .map(|s| {
                if inf.notional.is_none() || least[s].iter().all(|&r| r > 0.0) || sp.by_bearer[s].len() * cols > budget {
                    return None;
                }
                budget -= sp.by_bearer[s].len() * cols;
                Some(
                    sp.by_bearer[s]
                        .iter()
                        .map(|&(k, from, end)| {
                            let mut sums = vec![[0.0f64; 12]; cols];
                            for (j, sum) in sums.iter_mut().enumerate() {
                                add_nodes(sum, &sp.nodes[s][from as usize..end as usize], notional_entries(inf, k as usize, j), 1.0);
                            }
                            (k, sums)
                        })
                        .collect(),
                )
            })
            .collect();
        // For a bound per row: the plates by least room of either form, the most any plate's
        // μ × lift per unit of a bearer's share, and the most notional effect of any plate.
        let mut by_room: Vec<(f64, u32)> = least.iter().enumerate().map(|(s, l)| (l[0].min(l[1]), s as u32)).collect();
        by_room.sort_unstable_by(|x, y| x.0.total_cmp(&y.0).then(x.1.cmp(&y.1)));
        let mut lift_most = vec![0.0f64; nk];
        for (list, &mu) in extremes.iter().zip(&sp.mu) {
            for &(k, fall, rise) in list {
                lift_most[k as usize] = lift_most[k as usize].max(mu * fall.max(rise));
            }
        }
        let bearer_lift_most = lift_most.into_iter().enumerate().filter(|&(_, most)| most > 0.0).map(|(k, most)| (k as u32, most)).collect();
        let all_notional_most = sp.notional_most.iter().fold([0.0f64; 2], |m, n| [m[0].max(n[0]), m[1].max(n[1])]);
        Some(SlidingSetup { room_of, vertical, least, extremes, by_column, by_room, bearer_lift_most, all_notional_most })
    }

    /// The plates' sliding limits ([`SlidingDeck::prepare`]) at rows `rows` of method pass `m`:
    /// `grid` holds those rows, with the values found so far, and takes them.
    #[allow(clippy::too_many_arguments)]
    fn rows(&self, analysis: &Analysis, m: usize, inf: &DeckInfluence, sp: &SlidingPlates, setup: &SlidingSetup, rows: std::ops::Range<usize>, grid: &mut [Best], caps: &[f64]) {
        let SlidingSetup { room_of, vertical, least, extremes, by_column, by_room, bearer_lift_most, all_notional_most } = setup;
        let (a, pairs, w_shear, w_vertical, phi) = (&self.a, &self.pairs, self.w_shear, self.w_vertical, self.phi);
        let n_variants = analysis.sliding.rooms.variants;
        let cols = inf.along.len();
        let n_slots = sp.posts.len();
        let first = rows.start;
        let notional = inf.notional.as_ref();
        let mut candidates: Vec<(f64, u32)> = Vec::with_capacity(n_slots);
        // Per row, the plates with column sums ([`SlidingSetup::by_column`]) among the
        // candidates: (slot, their notional sums at each column of the row).
        let mut row_sums: Vec<(u32, Vec<Effects>)> = Vec::new();
        for i in rows {
            let d = &inf.d[i];
            let nd = notional.map(|n| n.d[i].as_slice());
            let spread = nd.map_or(0.0, |nd| nd.iter().map(|v| v.abs()).sum::<f64>());
            // Per plate, the least limit it could give anywhere on this row: its least room ÷ the
            // most the row's load can lift it (a positive share through its falling influence,
            // a negative through its rising one) and the most its notional load can add; only
            // plates that could beat a value already found on the row are looked at, least first.
            let row_most = (0..cols).map(|j| below(i * cols + j, &grid[(i - first) * cols + j], caps)).fold(0.0, f64::max);
            candidates.clear();
            // The plates in order of least room, while even the most any plate can be lifted or
            // sheared per kN on this row could bring one below the row's values.
            let lift_most: f64 = bearer_lift_most.iter().map(|&(k, most)| d[k as usize].abs() * most).sum();
            let per_unit_most = (0..2).map(|form| phi * (w_vertical[form] * lift_most + spread * all_notional_most[form])).fold(0.0, f64::max);
            for &(least_room, s) in by_room {
                if per_unit_most < INFLUENCE_FLOOR || least_room.max(0.0) / per_unit_most >= row_most {
                    break;
                }
                let s = s as usize;
                let lift: f64 = extremes[s].iter().map(|&(k, fall, rise)| if d[k as usize] > 0.0 { d[k as usize] * fall } else { -d[k as usize] * rise }).sum();
                let key = (0..2)
                    .map(|form| {
                        let per_unit = phi * (sp.mu[s] * w_vertical[form] * lift + spread * sp.notional_most.get(s).map_or(0.0, |most| most[form]));
                        if per_unit < INFLUENCE_FLOOR { f64::INFINITY } else { least[s][form].max(0.0) / per_unit }
                    })
                    .fold(f64::INFINITY, f64::min);
                if key < row_most {
                    candidates.push((key, s as u32));
                }
            }
            if candidates.is_empty() {
                continue;
            }
            // Ties in plate order, as the plates come.
            candidates.sort_unstable_by(|x, y| x.0.total_cmp(&y.0).then(x.1.cmp(&y.1)));
            let mut used = 0;
            if let Some(nd) = nd {
                for &(_, s) in &candidates {
                    let Some(per_bearer) = &by_column[s as usize] else { continue };
                    if used == row_sums.len() {
                        row_sums.push((s, vec![[0.0; 12]; cols]));
                    }
                    let (slot, sums) = &mut row_sums[used];
                    *slot = s;
                    sums.fill([0.0; 12]);
                    for (k, columns) in per_bearer {
                        let dk = nd[*k as usize];
                        if dk != 0.0 {
                            for (sum, column) in sums.as_flattened_mut().iter_mut().zip(columns.as_flattened()) {
                                *sum += dk * column;
                            }
                        }
                    }
                    used += 1;
                }
            }
            let row_sums = &row_sums[..used];
            for j in 0..cols {
                let cap = caps.get(i * cols + j).map_or(f64::INFINITY, |&c| above(c));
                let best = &mut grid[(i - first) * cols + j];
                for &(key, s) in &candidates {
                    let s = s as usize;
                    if key >= best.kn.min(cap) {
                        break;
                    }
                    let p = sp.posts[s];
                    let c = vertical.at(s, d, j);
                    let mut h = [0.0f64; 12];
                    if let Some((_, sums)) = row_sums.iter().find(|r| r.0 as usize == s) {
                        h = sums[j];
                    } else if let Some(nd) = nd {
                        for &(k, first, end) in &sp.by_bearer[s] {
                            let dk = nd[k as usize];
                            if dk == 0.0 {
                                continue;
                            }
                            add_nodes(&mut h, &sp.nodes[s][first as usize..end as usize], notional_entries(inf, k as usize, j), dk);
                        }
                    }
                    // What the extra load adds per kN in a form, with its notional load of group
                    // `g` under diaphragm assumption `way`, or without (`None`): (the left side
                    // of the check, the base shear).
                    let added = |form: usize, with: Option<(usize, usize)>| {
                        let lifted = w_vertical[form] * (-c).max(0.0);
                        match with {
                            None => (sp.mu[s] * lifted, 0.0),
                            Some((g, way)) => {
                                let v = a[g][form];
                                let (sh, sh2) = (shear_of(&h, way), shear_of(&h, 2 + way));
                                let sx = [v[0] * sh[0] + v[1] * sh2[0], v[0] * sh[1] + v[1] * sh2[1]];
                                let shear = (sx[0] * sx[0] + sx[1] * sx[1]).sqrt();
                                let u = v[0] * h[way] + v[1] * h[2 + way];
                                (w_shear[form] * shear + sp.mu[s] * (lifted + (-u).max(0.0)), shear)
                            }
                        }
                    };
                    'plate: for (g_check, paired) in pairs.iter().enumerate() {
                        for variant in 0..n_variants {
                            let room = room_of[s][g_check * n_variants + variant];
                            // The extra load's assumption paired with the check's; with one
                            // assumption in the check, either of the extra load's.
                            let ways: &[usize] = if n_variants == 2 { if variant == 0 { &[0] } else { &[1] } } else { &[0, 1] };
                            let withs = paired.is_empty().then_some(None).into_iter().chain(paired.iter().flat_map(|&g| ways.iter().map(move |&w| Some((g, w)))));
                            for with in withs {
                                for form in 0..2 {
                                    let (add, shear) = added(form, with);
                                    // A plate with no base shear, before or after, cannot slide.
                                    if room[2] <= crate::check::sliding::NO_SHEAR_KN && shear * phi < INFLUENCE_FLOOR {
                                        continue;
                                    }
                                    if add * phi >= INFLUENCE_FLOOR {
                                        best.take(Best { kn: room[form].max(0.0) / (phi * add), plate: p, check: SLIDING_FACTOR + form as u8, combination: 0, method: m as u16, already: room[form] <= 0.0 });
                                        // Nothing comes before a limit already reached.
                                        if best.kn == 0.0 && best.already {
                                            break 'plate;
                                        }
                                    }
                                }
                            }
                        }
                    }
                }
            }
        }
    }
}

/// What every grid point of one method pass needs for the plates' sliding, worked out once for
/// the pass ([`SlidingDeck::prepare`]).
struct SlidingSetup {
    /// Per slot, per direction group and assumption: the room (both forms) and the shear there.
    room_of: Vec<Vec<[f64; 3]>>,
    /// Per slot: the plate's vertical influence from each bearer reaching it.
    vertical: VerticalInfluence,
    /// Per slot and form: the least room of any direction and assumption.
    least: Vec<[f64; 2]>,
    /// Per slot, per bearer reaching it: the most its influence lifts and presses it over the
    /// columns.
    extremes: Vec<Vec<(u32, f64, f64)>>,
    /// Per slot, for plates with no room left: per bearer reaching it, the plate's notional sums
    /// (brace components, base shears) of 1 kN on the bearer at each column.
    by_column: Vec<Option<Vec<(u32, Vec<Effects>)>>>,
    /// (least room of either form, slot), least first.
    by_room: Vec<(f64, u32)>,
    /// Per bearer reaching any plate (k, most): the most μ × its influence lifts or presses a
    /// plate.
    bearer_lift_most: Vec<(u32, f64)>,
    /// Per form: the most of any plate's `notional_most`.
    all_notional_most: [f64; 2],
}

/// The vertical influence of the bearers at the plates, per slot: for each bearer reaching the
/// plate, its reaction per unit of the bearer's share at each column, over the columns from the
/// first to the last it is not zero at (zero beyond).
struct VerticalInfluence {
    /// Per slot, where its entries begin in `entries` (and the next slot's, where they end).
    start: Vec<u32>,
    /// (bearer k, first column, where its values begin in `values`, how many).
    entries: Vec<(u32, u32, u32, u32)>,
    values: Vec<f64>,
}

/// `visit(slot, bearer k, column j, kN)` for each flow of one method pass that reaches a plate
/// with a slot, bearer by bearer and column by column.
fn visit_slotted_flows(inf: &DeckInfluence, slot: &[u32], mut visit: impl FnMut(usize, u32, u32, f64)) {
    for (k, per_column) in inf.flows.per_bearer().enumerate() {
        for (j, flow) in per_column.enumerate() {
            for &(p, e) in flow {
                if let Some(&s) = slot.get(p as usize).filter(|&&s| s != u32::MAX) {
                    visit(s as usize, k as u32, j as u32, e);
                }
            }
        }
    }
}

impl VerticalInfluence {
    /// From the flows of one method pass, for the plates of `slot` (per post; `u32::MAX` none).
    fn new(inf: &DeckInfluence, slot: &[u32], n_slots: usize) -> Self {
        // Each plate's first and last column per bearer, as the flows meet them (bearer by
        // bearer, so that a plate's entries come in bearer order).
        let mut met: Vec<(u32, u32, u32, u32)> = Vec::new();
        let mut last_k = vec![u32::MAX; n_slots];
        let mut at = vec![0usize; n_slots];
        visit_slotted_flows(inf, slot, |s, k, j, _| {
            if last_k[s] != k {
                last_k[s] = k;
                at[s] = met.len();
                met.push((s as u32, k, j, j));
            } else {
                met[at[s]].3 = j;
            }
        });
        // Grouped by plate, in the order met.
        let mut start = vec![0u32; n_slots + 1];
        for e in &met {
            start[e.0 as usize + 1] += 1;
        }
        for s in 0..n_slots {
            start[s + 1] += start[s];
        }
        let mut fill: Vec<u32> = start[..n_slots].to_vec();
        let mut place = vec![0u32; met.len()];
        let mut entries = vec![(0u32, 0u32, 0u32, 0u32); met.len()];
        let mut offset = 0u32;
        for (m, &(s, k, first, last)) in met.iter().enumerate() {
            let to = fill[s as usize];
            fill[s as usize] += 1;
            place[m] = to;
            entries[to as usize] = (k, first, 0, last - first + 1);
        }
        for e in &mut entries {
            e.2 = offset;
            offset += e.3;
        }
        // The values, with the plates met in the same order again.
        let mut values = vec![0.0f64; offset as usize];
        let mut seen = 0usize;
        last_k.fill(u32::MAX);
        visit_slotted_flows(inf, slot, |s, k, j, e| {
            if last_k[s] != k {
                last_k[s] = k;
                at[s] = place[seen] as usize;
                seen += 1;
            }
            let (_, first, off, _) = entries[at[s]];
            values[(off + j - first) as usize] += e;
        });
        VerticalInfluence { start, entries, values }
    }

    /// Slot `s`'s entries: (bearer k, first column, the values from there).
    fn of(&self, s: usize) -> impl Iterator<Item = (u32, u32, &[f64])> {
        self.entries[self.start[s] as usize..self.start[s + 1] as usize].iter().map(|&(k, first, off, n)| (k, first, &self.values[off as usize..(off + n) as usize]))
    }

    /// The reaction at slot `s` of 1 kN at column `j` of a row with bearer shares `d`.
    fn at(&self, s: usize, d: &[f64], j: usize) -> f64 {
        self.of(s).map(|(k, first, values)| d[k as usize] * (j as u32).checked_sub(first).and_then(|i| values.get(i as usize)).copied().unwrap_or(0.0)).sum()
    }
}

/// The most column sums ([`SlidingSetup::by_column`]) one method pass keeps: a bearer's column
/// each, 96 bytes apiece (about 24 MB).
const COLUMN_SUMS_BUDGET: usize = 250_000;

/// What a plate must come below to count at grid point `at`: the value found so far, and what the
/// structure and the deck allow there (just above it, so that a plate level with it still counts).
fn below(at: usize, b: &Best, caps: &[f64]) -> f64 {
    b.kn.min(caps.get(at).map_or(f64::INFINITY, |&c| above(c)))
}

/// The notional load's entry reactions of bearer `k` for 1 kN at column `j`, per node (none
/// where the bearer takes nothing).
fn notional_entries(inf: &DeckInfluence, k: usize, j: usize) -> &[f64] {
    inf.notional.as_ref().and_then(|n| n.entries.get(k)).and_then(|per_column| per_column.get(j)).map_or(&[], Vec::as_slice)
}

/// Add to a plate's sums `factor` times what the entry reactions `entries` (per node) do through
/// the plate's node list `nodes` of one bearer.
fn add_nodes(sum: &mut Effects, nodes: &[NodeAtPlate], entries: &[f64], factor: f64) {
    for (_, node, effects) in nodes {
        add_node(sum, factor * entries.get(*node as usize).copied().unwrap_or(0.0), effects);
    }
}

/// Add `cn` times one node's effects to a plate's sums (nothing where `cn` is zero).
fn add_node(sum: &mut Effects, cn: f64, effects: &Effects) {
    if cn == 0.0 {
        return;
    }
    for (s, e) in sum.iter_mut().zip(effects) {
        *s += cn * e;
    }
}

/// The entry of node `at` (bearer, node) in a plate's node list, made where missing: lists are
/// filled node by node, so only the last entry can be it.
fn node_entry(list: &mut Vec<NodeAtPlate>, at: (u32, u32)) -> &mut NodeAtPlate {
    if list.last().is_none_or(|e| (e.0, e.1) != at) {
        list.push((at.0, at.1, [0.0; 12]));
    }
    let last = list.len() - 1;
    &mut list[last]
}
