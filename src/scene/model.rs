//! The scene: what a planner lays out and loads. Plain data, serialised to RON.
//!
//! Units throughout: metres (m), kilonewtons (kN), kilopascals (kPa = kN/m²). Plan coordinates are
//! `x`, `y`; levels are `z`, measured upwards. Every element has a text id that the other elements
//! refer to; the engine resolves ids to indices once, in [`crate::scene::validate`](mod@crate::scene::validate).

use serde::{Deserialize, Serialize};

pub use crate::scene::geometry::Rect;
use crate::scene::loads::Load;
use crate::scene::combination::{Combination, Factors};

/// Schema version written into every scene file.
pub const FORMAT_VERSION: u32 = 1;

/// Self-weight of a 48.3 × 4.0 mm steel tube, kN/m (4.37 kg/m).
// source: EN 39:2001 cl. 7.6.3 (type 4 tube mass per metre)
pub const STEEL_TUBE_KN_PER_M: f64 = 0.0429;

/// A whole working platform: site, supports, members, loads and the combinations to check.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Scene {
    /// Schema version of the file; see [`FORMAT_VERSION`].
    #[serde(default = "format_version")]
    pub format: u32,
    /// Site name and ground data.
    pub site: Site,
    /// Kinds of base support (base plate + jack, optional sole plate).
    #[serde(default)]
    pub support_types: Vec<SupportType>,
    /// Standards (posts). Each stands on a base plate on the ground or an existing structure, or
    /// on another post (a lift), a bearer or a deck; see [`crate::scene::standing`].
    #[serde(default)]
    pub posts: Vec<Post>,
    /// Horizontal members resting on posts: bearers, ledgers, transoms.
    #[serde(default)]
    pub bearers: Vec<Bearer>,
    /// Decks spanning across bearers.
    #[serde(default)]
    pub decks: Vec<Deck>,
    /// Braces between post nodes; they declare which plan directions are braced.
    #[serde(default)]
    pub braces: Vec<Brace>,
    /// Existing structures of the permanent works (slabs, podium decks) that posts may stand on.
    #[serde(default)]
    pub existing_structures: Vec<ExistingStructure>,
    /// Applied loads, each tagged with a load case.
    #[serde(default)]
    pub loads: Vec<Load>,
    /// Load combinations to check. When omitted, [`Combination::defaults`] apply.
    #[serde(default = "Combination::defaults")]
    pub combinations: Vec<Combination>,
    /// Settings of the overturning check.
    #[serde(default)]
    pub stability: StabilitySettings,
    /// How members share load among their supports. Omitted in older files: the defaults.
    #[serde(default)]
    pub analysis: AnalysisSettings,
    /// The notional horizontal load and the plan directions the structure is checked in. Omitted
    /// in older files: the defaults.
    #[serde(default)]
    pub horizontal: HorizontalSettings,
}

fn format_version() -> u32 {
    FORMAT_VERSION
}

/// Site name and ground data.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Site {
    /// Name shown in every output.
    pub name: String,
    /// Allowable ground bearing pressure at formation level, kPa. `None`: not entered; ground
    /// bearing at formation is then reported as not checked.
    #[serde(default)]
    pub allowable_bearing_kpa: Option<f64>,
    /// Whether the allowable bearing pressure at formation is net or gross of the granular
    /// layer's own weight.
    #[serde(default)]
    pub allowable_basis: AllowableBasis,
    /// Optional granular layer between the sole plates and the ground.
    #[serde(default)]
    pub granular_layer: Option<GranularLayer>,
}

/// What the allowable bearing pressure at formation is compared with.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
pub enum AllowableBasis {
    /// Gross: the pressure from the plates plus the granular layer's own weight (γ·z). The
    /// default: a layer placed for the works is new load on the formation.
    // common practice, no source: a layer placed for the works adds its weight to the formation.
    #[default]
    Gross,
    /// Net: the pressure from the plates only; the layer's weight is overburden the allowable
    /// already allows for (an existing hard standing, say).
    Net,
}

impl AllowableBasis {
    /// Word for outputs: `gross` or `net`.
    pub fn label(self) -> &'static str {
        match self {
            AllowableBasis::Gross => "gross",
            AllowableBasis::Net => "net",
        }
    }
}

/// A compacted granular layer that spreads each plate's load before it reaches the ground.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GranularLayer {
    /// Layer thickness, m.
    pub thickness_m: f64,
    /// How the load spreads through the layer.
    #[serde(default)]
    pub spread: LoadSpread,
    /// Unit weight of the layer, kN/m³. Default [`DEFAULT_LAYER_UNIT_WEIGHT_KN_M3`].
    #[serde(default = "default_layer_unit_weight")]
    pub unit_weight_kn_m3: f64,
    /// Allowable pressure on the top of the layer, under each plate or sole board, kPa.
    /// `None`: not entered; the layer top is then reported as not checked.
    #[serde(default)]
    pub allowable_kpa: Option<f64>,
}

impl GranularLayer {
    /// A layer of the given thickness and spread, of the default unit weight, with no allowable
    /// pressure on its top entered.
    pub fn new(thickness_m: f64, spread: LoadSpread) -> Self {
        GranularLayer { thickness_m, spread, unit_weight_kn_m3: DEFAULT_LAYER_UNIT_WEIGHT_KN_M3, allowable_kpa: None }
    }
    /// Pressure of the layer's own weight at its base, kPa.
    pub fn self_weight_kpa(&self) -> f64 {
        self.unit_weight_kn_m3 * self.thickness_m
    }
}

/// Default unit weight of a granular layer, kN/m³: the upper end of the range for hardcore, since
/// it is added as load.
// source: EN 1991-1-1 Table A.6, hardcore 18.5–19.5 kN/m³ (via a national reproduction)
pub const DEFAULT_LAYER_UNIT_WEIGHT_KN_M3: f64 = 19.5;

fn default_layer_unit_weight() -> f64 {
    DEFAULT_LAYER_UNIT_WEIGHT_KN_M3
}

/// Load spread through a granular layer, as horizontal spread per unit depth on each side.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize, Default)]
pub enum LoadSpread {
    /// 2 vertical : 1 horizontal — pressure at depth z under B × L is P / ((B + z)(L + z)).
    /// The default: the more cautious of the two usual rules.
    // source: 2V:1H approximate stress distribution, Das, Principles of Foundation Engineering;
    // Bowles, Foundation Analysis and Design (via a secondary summary)
    #[default]
    TwoToOne,
    /// 45° (1:1) — pressure P / ((B + 2z)(L + 2z)).
    // common practice, no source
    FortyFive,
    /// Any spread angle from the vertical, degrees (0 ≤ angle < 90).
    AngleDeg(f64),
}

impl LoadSpread {
    /// Horizontal spread on each side per metre of depth.
    pub fn spread_per_side(self) -> f64 {
        match self {
            LoadSpread::TwoToOne => 0.5,
            LoadSpread::FortyFive => 1.0,
            LoadSpread::AngleDeg(deg) => deg.to_radians().tan(),
        }
    }
}

/// A rectangular plate in plan, m.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PlateSize {
    /// Width, m.
    pub width_m: f64,
    /// Length, m.
    pub length_m: f64,
}

impl PlateSize {
    /// Plan area, m².
    pub fn area(self) -> f64 {
        self.width_m * self.length_m
    }
}

/// A kind of base support: base plate (with jack) and optional sole plate or board.
///
/// Chosen from the component catalogue ([`crate::scene::catalogue`]), its values are copied in
/// with the catalogue id and source, so the scene file stays complete on its own.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SupportType {
    /// Id the posts refer to.
    pub id: String,
    /// Steel base plate size.
    pub base_plate: PlateSize,
    /// Safe working load of the base jack / plate, kN.
    pub swl_kn: f64,
    /// Largest jack extension the safe working load holds for, m, if known. Older files: not
    /// given.
    #[serde(default)]
    pub max_extension_m: Option<f64>,
    /// Timber sole plate or board under the base plate, if any. Bearing is taken on it.
    #[serde(default)]
    pub sole_plate: Option<PlateSize>,
    /// The interfaces a horizontal force crosses on its way into the ground (base plate on sole
    /// board, sole board on the ground…); the lowest lower-bound friction coefficient governs.
    /// Empty: friction unknown, sliding is not checked for plates on this support.
    #[serde(default)]
    pub friction: Vec<Interface>,
    /// Moment the head of a post of this type takes, kN·m, from the maker's data: a bearer on a
    /// single post (a T-head) may then be out of balance by up to this much. `None`: the head
    /// takes no moment and a T-head must balance.
    #[serde(default)]
    pub head_moment_capacity_knm: Option<f64>,
    /// Catalogue id of the jack the base plate and safe working load were copied from, if any.
    #[serde(default)]
    pub catalogue_id: Option<String>,
    /// Where the safe working load comes from (copied from the catalogue, or the planner's own).
    #[serde(default)]
    pub source: String,
    /// The safe working load is an example value that must be replaced with the manufacturer's;
    /// validation warns while it is set.
    #[serde(default)]
    pub example: bool,
    /// Catalogue id of the sole plate, if it was chosen from the catalogue.
    #[serde(default)]
    pub sole_plate_id: Option<String>,
}

/// One sliding interface under a support, with its lower-bound friction coefficient.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum Interface {
    /// Plain steel on cast concrete: μ = 0.1.
    SteelOnCastConcrete,
    /// Plain steel on trowelled concrete: μ = 0.5.
    SteelOnTrowelledConcrete,
    /// Concrete on concrete: μ = 0.4, the lowest measured.
    ConcreteOnConcrete,
    /// Timber, across the grain, on concrete: μ = 0.7.
    TimberOnConcrete,
    /// A coefficient the planner gives (steel on timber, timber on hardcore… have no published
    /// value), with where it comes from.
    Given {
        /// Lower-bound friction coefficient.
        mu: f64,
        /// Where the value comes from (a test, a manufacturer's sheet…).
        source: String,
    },
}

// source for the four named interfaces: Pallett et al., Concrete 36(6), 2002, the lowest values
// measured (the basis of the BS 5975:2008 values), via a Concrete Society note; EN 12812 annex
// ranges (concrete 0.5–1.0, timber 0.8–1.0) are higher.
impl Interface {
    /// Lower-bound friction coefficient.
    pub fn mu(&self) -> f64 {
        match self {
            Interface::SteelOnCastConcrete => 0.1,
            Interface::SteelOnTrowelledConcrete => 0.5,
            Interface::ConcreteOnConcrete => 0.4,
            Interface::TimberOnConcrete => 0.7,
            Interface::Given { mu, .. } => *mu,
        }
    }
    /// Words for outputs, with the source.
    pub fn label(&self) -> String {
        match self {
            Interface::SteelOnCastConcrete => "steel on cast concrete (Pallett et al. 2002)".into(),
            Interface::SteelOnTrowelledConcrete => "steel on trowelled concrete (Pallett et al. 2002)".into(),
            Interface::ConcreteOnConcrete => "concrete on concrete (Pallett et al. 2002)".into(),
            Interface::TimberOnConcrete => "timber across the grain on concrete (Pallett et al. 2002)".into(),
            Interface::Given { source, .. } => format!("given ({source})"),
        }
    }
}

impl SupportType {
    /// A support type with the given plates and safe working load, not taken from the
    /// catalogue: no source, no extension limit.
    pub fn new(id: &str, base_plate: PlateSize, swl_kn: f64, sole_plate: Option<PlateSize>) -> Self {
        SupportType { id: id.to_owned(), base_plate, swl_kn, max_extension_m: None, sole_plate, friction: Vec::new(), head_moment_capacity_knm: None, catalogue_id: None, source: String::new(), example: false, sole_plate_id: None }
    }

    /// The plate that bears on the ground (or on the granular layer): the sole plate if there
    /// is one, otherwise the base plate.
    pub fn bearing_plate(&self) -> PlateSize {
        self.sole_plate.unwrap_or(self.base_plate)
    }
    /// Lowest lower-bound friction coefficient of its interfaces, with the interface; `None`
    /// when none is given.
    pub fn friction(&self) -> Option<(f64, &Interface)> {
        self.friction.iter().map(|i| (i.mu(), i)).min_by(|a, b| a.0.total_cmp(&b.0))
    }
}

/// A standard (post), or one lift of a standard: it stands on a base plate, another post, a bearer
/// or a deck (see [`crate::scene::standing`]).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Post {
    /// Id; also the id of its base plate in every output.
    pub id: String,
    /// Plan position, m.
    pub x: f64,
    /// Plan position, m.
    pub y: f64,
    /// Level of its base (the base plate, or the top of what it stands on), m.
    pub base_level: f64,
    /// Level of the top of the post, m.
    pub top_level: f64,
    /// Id of its support type: needed where the post has a base plate; optional on a post that
    /// stands on another member (then its safe working load is still checked).
    #[serde(default)]
    pub support: Option<String>,
    /// Self-weight, kN/m. Default: 48.3 × 4.0 steel tube.
    #[serde(default = "steel_tube")]
    pub self_weight_kn_per_m: f64,
    /// Catalogue id of the section the self-weight was copied from, if any (informative).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub section: Option<String>,
}

/// What a horizontal member does; it changes only how it is drawn and listed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
pub enum BeamRole {
    /// Primary beam carrying a deck or other beams.
    #[default]
    Bearer,
    /// Longitudinal member along the face.
    Ledger,
    /// Cross member between the lines of posts.
    Transom,
}

/// A horizontal member resting on two or more posts, in order along its length.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Bearer {
    /// Id.
    pub id: String,
    /// Bearer, ledger or transom.
    #[serde(default)]
    pub role: BeamRole,
    /// Level it sits at, m.
    pub level: f64,
    /// Ids of the posts it rests on, in order along its length (all on one straight line).
    pub posts: Vec<String>,
    /// Overhang beyond the first post, m.
    #[serde(default)]
    pub overhang_start_m: f64,
    /// Overhang beyond the last post, m.
    #[serde(default)]
    pub overhang_end_m: f64,
    /// Self-weight, kN/m. Default: 48.3 × 4.0 steel tube.
    #[serde(default = "steel_tube")]
    pub self_weight_kn_per_m: f64,
    /// How this member shares load among its posts, if not as the scene's
    /// [`AnalysisSettings::method`].
    #[serde(default)]
    pub method: Option<BeamMethod>,
    /// Posts (inner ones, by id) over which the member is jointed — not continuous — when known.
    /// `None`: not known, so the envelope also covers two-span continuity at every inner post
    /// ([`BeamMethod::Envelope`]). `Some(vec![])`: known to be continuous throughout.
    #[serde(default)]
    pub joints: Option<Vec<String>>,
    /// Catalogue id of the section the self-weight was copied from, if any (informative).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub section: Option<String>,
}

/// A deck spanning across parallel bearers.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Deck {
    /// Id.
    pub id: String,
    /// Level of the deck surface, m.
    pub level: f64,
    /// Plan extent of the deck. Parts beyond the outer bearers are cantilevers.
    pub extent: Rect,
    /// Ids of the bearers it rests on, in order across the span (parallel to x or to y).
    pub bearers: Vec<String>,
    /// Self-weight of the decking, kPa.
    pub self_weight_kpa: f64,
    /// How this deck shares load among its bearers, if not as the scene's
    /// [`AnalysisSettings::method`].
    #[serde(default)]
    pub method: Option<BeamMethod>,
    /// Bearers (inner ones, by id) over which the decking is jointed — not continuous — when
    /// known. `None`: not known, so the envelope also covers two-span continuity at every inner
    /// bearer. `Some(vec![])`: known to be continuous throughout.
    #[serde(default)]
    pub joints: Option<Vec<String>>,
    /// Catalogue id of the deck type the self-weight was copied from, if any (informative).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub decking: Option<String>,
    /// Whether the deck is fixed so that it acts as a diaphragm: stiff in its own plane, sharing
    /// horizontal load among the braced planes it is joined to (nailed plywood, bolted steel
    /// units). Loose boards are not one. Default: false.
    #[serde(default)]
    pub diaphragm: bool,
}

/// A structure of the permanent works that base plates stand on, such as an existing slab. Its
/// plate loads are scheduled for the permanent-works designer; the ground check does not apply.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ExistingStructure {
    /// Id.
    pub id: String,
    /// What it is, in words (e.g. "ground-floor slab, 250 mm").
    #[serde(default)]
    pub description: String,
    /// Level of its top surface, m. Posts whose base is at this level within its extent stand on it.
    pub level: f64,
    /// Plan extent, m.
    pub extent: Rect,
    /// Allowable bearing pressure under a base plate (or sole plate) on it, kPa, as given by the
    /// permanent-works designer.
    pub allowable_kpa: f64,
}

/// A point on a post at a level: one end of a brace.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PostNode {
    /// Id of the post.
    pub post: String,
    /// Level on that post, m.
    pub level: f64,
}

/// A brace between two post nodes, pin-ended. Either a diagonal that rises in the vertical plane
/// of a line of posts along x or y (a vertical brace: it braces that plane over the lift it
/// spans), or a level tube across one bay in plan (a plan brace: it makes the bay part of that
/// level's diaphragm). A level tube along a ledger is a ledger and braces nothing.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Brace {
    /// Id.
    pub id: String,
    /// One end.
    pub from: PostNode,
    /// The other end.
    pub to: PostNode,
}

/// The notional horizontal load and the plan directions the structure is checked in.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct HorizontalSettings {
    /// How the notional horizontal load is generated. Ignored when the scene has notional loads
    /// of its own (`Notional` loads), which then stand instead.
    #[serde(default)]
    pub notional: NotionalRule,
    /// Plan directions the structure is checked in; a notional load is generated in each one
    /// and in the direction of every wind load. Default: +x, −x, +y, −y.
    #[serde(default = "default_directions")]
    pub directions: Vec<crate::scene::loads::PlanDirection>,
}

fn default_directions() -> Vec<crate::scene::loads::PlanDirection> {
    use crate::scene::loads::PlanDirection as D;
    vec![D::PlusX, D::MinusX, D::PlusY, D::MinusY]
}

impl Default for HorizontalSettings {
    fn default() -> Self {
        HorizontalSettings { notional: NotionalRule::default(), directions: default_directions() }
    }
}

impl HorizontalSettings {
    /// Whether these are the default settings.
    pub fn is_default(&self) -> bool {
        *self == HorizontalSettings::default()
    }
}

/// How the notional horizontal load is generated, in each checked direction, from the vertical
/// load V of the permanent and imposed cases (applied where that load enters the posts).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize, Default)]
pub enum NotionalRule {
    /// The falsework rule: the horizontal load in a direction is the greater of 2.5 % of V and
    /// the identified horizontal forces in that direction plus 1 % of V. Wind in that direction
    /// counts as identified; the notional load makes up the difference, never less than 1 % of V.
    /// Identified point forces (`Horizontal` loads) may be absent, so they do not reduce it.
    // source: 2.5 % — BS 5975:2008+A1:2011 cl. 19 (via a secondary summary); "identifiable forces
    // + 1 %" — Advisory Committee on Falsework (Bragg) final report, HMSO 1975 (C, REFERENCES §4).
    // That BS 5975 keeps the "+ 1 %" alternative, and that wind counts as identified: from memory.
    #[default]
    Falsework,
    /// A fixed percentage of V in each direction.
    Percent(f64),
    /// None generated.
    Off,
}

impl NotionalRule {
    /// Short description for outputs.
    pub fn describe(self) -> String {
        match self {
            NotionalRule::Falsework => "greater of 2.5 % of the vertical load, or wind in that direction + 1 % (falsework rule)".into(),
            NotionalRule::Percent(p) => format!("{p} % of the vertical load"),
            NotionalRule::Off => "none generated".into(),
        }
    }
}

/// Settings of the overturning and sliding checks.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StabilitySettings {
    /// Target factor of safety against overturning: restoring moment of the stabilising
    /// permanent load ÷ overturning moment of the destabilising permanent and variable loads,
    /// unfactored.
    #[serde(default = "default_target_factor")]
    pub target_factor: f64,
    /// Target factor of safety against sliding: friction ÷ horizontal load, unfactored.
    #[serde(default = "default_sliding_target")]
    pub sliding_target_factor: f64,
    /// Partial factors of the equilibrium (EQU) checks of overturning and sliding: `g_unfavourable`
    /// on destabilising permanent load, `g_favourable` on stabilising permanent load, `q` and `w`
    /// on destabilising variable load (stabilising variable load counts 0).
    #[serde(default = "default_equilibrium_factors")]
    pub equilibrium: Factors,
    /// Base plates (post ids) over which kentledge would be placed, secured to their standards.
    /// Empty: over the plates farthest from each tipping edge.
    #[serde(default)]
    pub kentledge_plates: Vec<String>,
}

/// Default target overturning factor: the usual permissible-stress factor.
// from memory: 1.5 against overturning is UK falsework practice (BS 5975, 1.2 with the maximum
// wind is also quoted); unconfirmed. Local codes govern.
pub const DEFAULT_TARGET_OVERTURNING_FACTOR: f64 = 1.5;

/// Default target factor against sliding where friction alone transfers the horizontal load.
// source: Concrete Society note on the friction tests of Pallett et al. (2002): factor of safety
// at least 2.0 where friction transfers lateral load. NAVFAC DM 7.02 asks 1.5 for foundations.
pub const DEFAULT_TARGET_SLIDING_FACTOR: f64 = 2.0;

/// Default partial factors of the equilibrium checks.
// source: EN 1990 Annex A1 Table A1.2(A) (EQU), recommended values; a National Annex may differ.
pub const DEFAULT_EQUILIBRIUM_FACTORS: Factors = Factors { g_unfavourable: 1.10, g_favourable: 0.90, q: 1.5, w: 1.5 };

fn default_target_factor() -> f64 {
    DEFAULT_TARGET_OVERTURNING_FACTOR
}

fn default_sliding_target() -> f64 {
    DEFAULT_TARGET_SLIDING_FACTOR
}

fn default_equilibrium_factors() -> Factors {
    DEFAULT_EQUILIBRIUM_FACTORS
}

impl Default for StabilitySettings {
    fn default() -> Self {
        Self {
            target_factor: DEFAULT_TARGET_OVERTURNING_FACTOR,
            sliding_target_factor: DEFAULT_TARGET_SLIDING_FACTOR,
            equilibrium: DEFAULT_EQUILIBRIUM_FACTORS,
            kentledge_plates: Vec::new(),
        }
    }
}

fn steel_tube() -> f64 {
    STEEL_TUBE_KN_PER_M
}

/// How a member (bearer, ledger, transom, or a deck across its bearers) shares its load among
/// its supports.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
pub enum BeamMethod {
    /// Every span between two supports is simply supported; overhangs are balanced about the
    /// end support. The way the load path is traced by hand; right for members jointed at every
    /// support.
    SimpleSpans,
    /// The member is continuous over all its supports (elastic, direct stiffness method). Inner
    /// supports take more: 1.25 wL at the middle of two equal spans instead of 1.0 wL.
    Continuous,
    /// Both, and each base plate takes whichever is worse: the larger maximum and the smaller
    /// minimum. The default, since a member's continuity is rarely certain on site. Where a
    /// member's joints are not known, the envelope also takes it as jointed at every other
    /// support, both ways round, so that every inner support is the middle of a two-span piece:
    /// two-span continuity puts 1.25 wL on the middle support, more than a long continuous member
    /// (about 1.1 wL) or simple spans (1.0 wL).
    // source: 5/8 of the load of a stiff beam on three rigid supports goes to the middle one,
    // where 1/2 is assumed in simple-span design (Advisory Committee on Falsework, final report,
    // HMSO 1975, via REFERENCES §9); the two-span coefficients are Hicks Table 2.1.
    #[default]
    Envelope,
}

impl BeamMethod {
    /// Short name for outputs.
    pub fn label(self) -> &'static str {
        match self {
            BeamMethod::SimpleSpans => "simple spans",
            BeamMethod::Continuous => "continuous",
            BeamMethod::Envelope => "envelope",
        }
    }
}

/// How members share load among their supports, and their bending stiffness.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
pub struct AnalysisSettings {
    /// Method for every member that does not set its own.
    #[serde(default)]
    pub method: BeamMethod,
    /// Bending stiffness of each kind of member, for the continuous method.
    #[serde(default)]
    pub stiffness: MemberStiffness,
    /// How the load-class imposed loads of decks at different levels act together.
    #[serde(default)]
    pub working_levels: WorkingLevels,
}

/// How the load-class imposed loads (q1, q2) of decks at different levels act together.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
pub enum WorkingLevels {
    /// Every level may be loaded at once, each in its worst arrangement. The default: it never
    /// gives less than the rule below.
    #[default]
    AllAtOnce,
    /// The working-scaffold rule: one level at its full load-class load together with one
    /// adjacent level (the next above or below) at half of it, whichever pair is worse at each
    /// plate; other levels unloaded. Other imposed loads (materials, concrete) are not affected.
    // source: EN 12811-1 in-service loading, one working level at 100 % plus an adjacent level at
    // 50 % (via a UK industry summary, REFERENCES §9).
    OneFullAdjacentHalf,
}

impl WorkingLevels {
    /// Words for outputs.
    pub fn label(self) -> &'static str {
        match self {
            WorkingLevels::AllAtOnce => "every working level loaded at once",
            WorkingLevels::OneFullAdjacentHalf => "one working level at full load with an adjacent level at half (EN 12811-1)",
        }
    }
}

impl AnalysisSettings {
    /// Whether these are the default settings.
    pub fn is_default(&self) -> bool {
        *self == AnalysisSettings::default()
    }
}

/// Bending stiffness EI of each kind of member, used by the continuous method.
///
/// A member has one section along its length, and the reactions of a continuous member of one
/// section do not depend on its EI (the stiffness matrix scales with EI, the loads do not), so
/// these values change no result today. They are kept, validated and passed to the analysis so
/// that support settlement or members of several sections can be added without a file change.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MemberStiffness {
    /// Bearers, kN·m². Default: 48.3 × 4.0 steel tube.
    #[serde(default = "tube_ei")]
    pub bearer_knm2: f64,
    /// Ledgers, kN·m². Default: 48.3 × 4.0 steel tube.
    #[serde(default = "tube_ei")]
    pub ledger_knm2: f64,
    /// Transoms, kN·m². Default: 48.3 × 4.0 steel tube.
    #[serde(default = "tube_ei")]
    pub transom_knm2: f64,
    /// Decks, per metre of width, kN·m²/m. Default: 38 mm C24 timber boards.
    #[serde(default = "board_ei")]
    pub deck_knm2_per_m: f64,
}

impl MemberStiffness {
    /// Stiffness of a member of the given role, kN·m².
    pub fn of(&self, role: BeamRole) -> f64 {
        match role {
            BeamRole::Bearer => self.bearer_knm2,
            BeamRole::Ledger => self.ledger_knm2,
            BeamRole::Transom => self.transom_knm2,
        }
    }
}

impl Default for MemberStiffness {
    fn default() -> Self {
        MemberStiffness { bearer_knm2: TUBE_EI_KNM2, ledger_knm2: TUBE_EI_KNM2, transom_knm2: TUBE_EI_KNM2, deck_knm2_per_m: BOARD_EI_KNM2_PER_M }
    }
}

/// Young's modulus of structural steel, kPa (210 000 N/mm²).
// source: EN 1993-1-1 cl. 3.2.6 (from memory)
pub const STEEL_E_KPA: f64 = 210.0e6;

/// Second moment of area of a 48.3 × 4.0 mm tube, m⁴: π (D⁴ − d⁴) / 64 with D = 48.3 mm,
/// d = 40.3 mm, = 13.77 cm⁴ (a 48.3 × 3.2 tube has 11.59 cm⁴).
// source: dimensions EN 39:2001 (type 4 tube); the formula is the section property of a circular
// hollow section; the tabulated 13.8 cm⁴ of EN 10219-2 / EN 12811-1 tables is from memory.
pub const TUBE_I_M4: f64 = std::f64::consts::PI * (0.0483 * 0.0483 * 0.0483 * 0.0483 - 0.0403 * 0.0403 * 0.0403 * 0.0403) / 64.0;

/// EI of a 48.3 × 4.0 mm steel tube, kN·m² (≈ 28.9).
pub const TUBE_EI_KNM2: f64 = STEEL_E_KPA * TUBE_I_M4;

/// EI of 38 mm timber boards per metre of deck width, kN·m²/m: E₀,mean = 11 000 N/mm² (C24)
/// × 1.0 × 0.038³ / 12 m⁴/m ≈ 50.3.
// source: C24 mean modulus parallel to grain, EN 338 (from memory); board thickness as BS 2482
// (see REFERENCES §5).
pub const BOARD_EI_KNM2_PER_M: f64 = 11.0e6 * 0.038 * 0.038 * 0.038 / 12.0;

fn tube_ei() -> f64 {
    TUBE_EI_KNM2
}

fn board_ei() -> f64 {
    BOARD_EI_KNM2_PER_M
}

impl Scene {
    /// An empty scene on a site with the given name and allowable bearing pressure.
    pub fn empty(name: &str, allowable_bearing_kpa: f64) -> Self {
        Scene {
            format: FORMAT_VERSION,
            site: Site { name: name.to_owned(), allowable_bearing_kpa: Some(allowable_bearing_kpa), allowable_basis: AllowableBasis::default(), granular_layer: None },
            support_types: Vec::new(),
            posts: Vec::new(),
            bearers: Vec::new(),
            decks: Vec::new(),
            braces: Vec::new(),
            existing_structures: Vec::new(),
            loads: Vec::new(),
            combinations: Combination::defaults(),
            stability: StabilitySettings::default(),
            analysis: AnalysisSettings::default(),
            horizontal: HorizontalSettings::default(),
        }
    }

    /// Every element id in the scene with its kind, in file order.
    pub fn element_ids(&self) -> impl Iterator<Item = (ElementKind, &str)> {
        fn tag<'a>(kind: ElementKind, ids: impl Iterator<Item = &'a String>) -> impl Iterator<Item = (ElementKind, &'a str)> {
            ids.map(move |id| (kind, id.as_str()))
        }
        tag(ElementKind::SupportType, self.support_types.iter().map(|e| &e.id))
            .chain(tag(ElementKind::Post, self.posts.iter().map(|e| &e.id)))
            .chain(tag(ElementKind::Bearer, self.bearers.iter().map(|e| &e.id)))
            .chain(tag(ElementKind::Deck, self.decks.iter().map(|e| &e.id)))
            .chain(tag(ElementKind::Brace, self.braces.iter().map(|e| &e.id)))
            .chain(tag(ElementKind::ExistingStructure, self.existing_structures.iter().map(|e| &e.id)))
            .chain(tag(ElementKind::Load, self.loads.iter().map(|e| &e.id)))
    }
}

/// The kinds of element a scene holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub enum ElementKind {
    /// A [`SupportType`].
    SupportType,
    /// A [`Post`].
    Post,
    /// A [`Bearer`].
    Bearer,
    /// A [`Deck`].
    Deck,
    /// A [`Brace`].
    Brace,
    /// An [`ExistingStructure`].
    ExistingStructure,
    /// A [`Load`].
    Load,
    /// A [`Combination`].
    Combination,
    /// The site.
    Site,
}

impl std::fmt::Display for ElementKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            ElementKind::SupportType => "support type",
            ElementKind::Post => "post",
            ElementKind::Bearer => "bearer",
            ElementKind::Deck => "deck",
            ElementKind::Brace => "brace",
            ElementKind::ExistingStructure => "existing structure",
            ElementKind::Load => "load",
            ElementKind::Combination => "combination",
            ElementKind::Site => "site",
        })
    }
}
