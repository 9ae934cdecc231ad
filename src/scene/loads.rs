//! Applied loads, their load cases, and the load-class presets.

use serde::{Deserialize, Serialize};

/// A load case. Every applied load belongs to exactly one.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
pub enum Case {
    /// Permanent: self-weights, fixed equipment, kentledge.
    G,
    /// Imposed (variable) vertical load: operatives, materials, concrete.
    Q,
    /// Horizontal: wind, notional horizontal load, identified horizontal forces.
    W,
}

impl Case {
    /// All cases, in output order.
    pub const ALL: [Case; 3] = [Case::G, Case::Q, Case::W];

    /// Index 0..3 in [`Case::ALL`].
    pub fn index(self) -> usize {
        self as usize
    }

    /// One-letter name.
    pub fn name(self) -> &'static str {
        match self {
            Case::G => "G",
            Case::Q => "Q",
            Case::W => "W",
        }
    }
}

impl std::fmt::Display for Case {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// One applied load.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Load {
    /// Id.
    pub id: String,
    /// Load case it belongs to.
    pub case: Case,
    /// What and where.
    pub kind: LoadKind,
    /// For an imposed (Q) load spread over a deck or along a bearer: whether it is placed in its
    /// worst arrangement at every plate (the default) or always acts whole. Permanent and
    /// horizontal loads always act whole.
    #[serde(default)]
    pub arrangement: Arrangement,
}

impl Load {
    /// A load, arranged if it is an imposed load that can be.
    pub fn new(id: impl Into<String>, case: Case, kind: LoadKind) -> Self {
        Load { id: id.into(), case, kind, arrangement: Arrangement::default() }
    }

    /// Whether the load is placed in its worst arrangement: an imposed load spread over a deck
    /// (area, patch) or along a bearer (line), not marked whole.
    pub fn is_arranged(&self) -> bool {
        self.case == Case::Q
            && self.arrangement == Arrangement::Arranged
            && matches!(self.kind, LoadKind::DeckArea { .. } | LoadKind::DeckPatch { .. } | LoadKind::BearerLine { .. })
    }
}

/// How a variable load spread over an area or a length is placed.
///
/// An imposed load need not be present everywhere at once: each part of it may be there or not.
/// Arranged, it is split into cells — each deck strip between two bearers × each bearer span, each
/// cantilever or overhang part separately — and at every plate each cell counts for the maximum
/// only where it pushes that plate down and for the minimum only where it lifts it (a free
/// variable action, EN 1991-1-1 6.2.1, from memory).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
pub enum Arrangement {
    /// Placed in its worst arrangement at every plate.
    #[default]
    Arranged,
    /// Always present over its whole area or length at once (e.g. a pour taken as one block).
    Whole,
}

impl Arrangement {
    /// Words for outputs.
    pub fn label(self) -> &'static str {
        match self {
            Arrangement::Arranged => "arranged (worst cells at each plate)",
            Arrangement::Whole => "whole (always everywhere at once)",
        }
    }
}

/// Intensity of an area load.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub enum Intensity {
    /// A given pressure, kPa.
    Kpa(f64),
    /// The uniformly distributed load q1 of a load class 1–6.
    #[serde(alias = "DutyUniform")]
    LoadClassUniform(u8),
    /// The partial-area load q2 of a load class 4–6.
    #[serde(alias = "DutyPartial")]
    LoadClassPartial(u8),
}

impl Intensity {
    /// The pressure in kPa, or `None` for an unknown class.
    pub fn kpa(self) -> Option<f64> {
        match self {
            Intensity::Kpa(q) => Some(q),
            Intensity::LoadClassUniform(class) => LoadClass::get(class).map(|c| c.uniform_kpa),
            Intensity::LoadClassPartial(class) => LoadClass::get(class).and_then(|c| c.partial_kpa),
        }
    }
}

/// A horizontal direction in plan.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub enum PlanDirection {
    /// Towards +x.
    PlusX,
    /// Towards −x.
    MinusX,
    /// Towards +y.
    PlusY,
    /// Towards −y.
    MinusY,
    /// At an angle from +x towards +y, degrees.
    Degrees(f64),
}

impl PlanDirection {
    /// Unit vector (x, y).
    pub fn unit(self) -> (f64, f64) {
        match self {
            PlanDirection::PlusX => (1.0, 0.0),
            PlanDirection::MinusX => (-1.0, 0.0),
            PlanDirection::PlusY => (0.0, 1.0),
            PlanDirection::MinusY => (0.0, -1.0),
            PlanDirection::Degrees(d) => {
                let r = d.to_radians();
                (r.cos(), r.sin())
            }
        }
    }
}

/// A vertical exposed face (sheeting, netting, formwork) in plan from `from` to `to`,
/// between two levels.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Face {
    /// One end in plan (x, y), m.
    pub from: (f64, f64),
    /// Other end in plan (x, y), m.
    pub to: (f64, f64),
    /// Lower level, m.
    pub bottom: f64,
    /// Upper level, m.
    pub top: f64,
}

/// Percentage of vertical load taken as the notional horizontal load when none is given.
// source: BS 5975:2008+A1:2011 cl. 19 minimum horizontal load for falsework, 2.5 % of the
// vertical load (via a secondary summary). EN 12812 asks for at least 1 % (from memory).
pub const DEFAULT_NOTIONAL_PERCENT: f64 = 2.5;

fn default_notional_percent() -> f64 {
    DEFAULT_NOTIONAL_PERCENT
}

fn default_notional_basis() -> Vec<Case> {
    vec![Case::G, Case::Q]
}

/// What a load is and where it acts. Vertical loads act downwards; kN values are magnitudes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum LoadKind {
    /// Uniform pressure over a whole deck.
    DeckArea {
        /// Deck id.
        deck: String,
        /// Pressure or load-class preset.
        intensity: Intensity,
    },
    /// Uniform pressure on a rectangle of a deck.
    DeckPatch {
        /// Deck id.
        deck: String,
        /// Plan rectangle (must lie on the deck).
        area: crate::scene::geometry::Rect,
        /// Pressure or load-class preset.
        intensity: Intensity,
    },
    /// A point load on a deck.
    DeckPoint {
        /// Deck id.
        deck: String,
        /// Plan position, m.
        x: f64,
        /// Plan position, m.
        y: f64,
        /// Downward force, kN.
        kn: f64,
    },
    /// A point load on a bearer, at a distance along it from its first post.
    BearerPoint {
        /// Bearer id.
        bearer: String,
        /// Distance from the first post, m (negative: on the start overhang).
        at_m: f64,
        /// Downward force, kN.
        kn: f64,
    },
    /// A uniform line load on part of a bearer, distances from its first post.
    BearerLine {
        /// Bearer id.
        bearer: String,
        /// Start, m from the first post.
        from_m: f64,
        /// End, m from the first post.
        to_m: f64,
        /// Intensity, kN/m.
        kn_per_m: f64,
    },
    /// A vertical load straight onto the top of a post.
    PostTop {
        /// Post id.
        post: String,
        /// Downward force, kN.
        kn: f64,
    },
    /// An identified horizontal force at a point.
    Horizontal {
        /// Plan position, m.
        x: f64,
        /// Plan position, m.
        y: f64,
        /// Level, m.
        level: f64,
        /// Magnitude, kN.
        kn: f64,
        /// Direction it acts in.
        direction: PlanDirection,
    },
    /// Wind on an exposed face: force = pressure × projected area normal to the wind.
    Wind {
        /// The face.
        face: Face,
        /// Net wind pressure on the face, kPa (force coefficient and solidity included).
        kpa: f64,
        /// Direction the wind blows towards.
        direction: PlanDirection,
    },
    /// Notional horizontal load: a percentage of the vertical load of the given cases, applied
    /// wherever that vertical load enters a post.
    Notional {
        /// Percent of vertical load. Default: [`DEFAULT_NOTIONAL_PERCENT`].
        #[serde(default = "default_notional_percent")]
        percent: f64,
        /// Direction it acts in.
        direction: PlanDirection,
        /// Cases whose vertical load it is a percentage of. Default: G and Q.
        #[serde(default = "default_notional_basis")]
        basis: Vec<Case>,
    },
    /// Kentledge: a weight placed to hold the structure down. It must be permanent (case G). It
    /// counts as load everywhere it makes things worse (plate load, bearing), and where it helps
    /// (restoring moment, less uplift, more friction) only if it cannot go away: fixed, or
    /// secured against removal.
    Kentledge {
        /// Where it sits.
        on: KentledgePlace,
        /// Weight, kN.
        kn: f64,
        /// What it is. Default: removable.
        #[serde(default)]
        form: KentledgeForm,
        /// Secured against removal: chained or clamped to the standards, valves locked.
        #[serde(default)]
        secured: bool,
    },
}

/// Where a kentledge sits.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum KentledgePlace {
    /// On these base plates (post ids), its weight shared equally, straight into the plates.
    Plates(Vec<String>),
    /// On a deck at a plan point, carried like a point load on the deck.
    Deck {
        /// Deck id.
        deck: String,
        /// Plan position, m.
        x: f64,
        /// Plan position, m.
        y: f64,
    },
}

/// What a kentledge is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
pub enum KentledgeForm {
    /// Loose blocks or other weights that can be lifted off. The default.
    #[default]
    Removable,
    /// Water-filled tanks or bags: they can be drained.
    WaterFilled,
    /// Fixed: cast in place or bolted down, so it cannot be taken away on site.
    Fixed,
}

impl KentledgeForm {
    /// Word for outputs.
    pub fn label(self) -> &'static str {
        match self {
            KentledgeForm::Removable => "removable",
            KentledgeForm::WaterFilled => "water-filled",
            KentledgeForm::Fixed => "fixed",
        }
    }
}

impl LoadKind {
    /// Whether the load acts horizontally.
    pub fn is_horizontal(&self) -> bool {
        matches!(self, LoadKind::Horizontal { .. } | LoadKind::Wind { .. } | LoadKind::Notional { .. })
    }

    /// Short name of the kind, for tables.
    pub fn label(&self) -> &'static str {
        match self {
            LoadKind::DeckArea { .. } => "deck area",
            LoadKind::DeckPatch { .. } => "deck patch",
            LoadKind::DeckPoint { .. } => "deck point",
            LoadKind::BearerPoint { .. } => "bearer point",
            LoadKind::BearerLine { .. } => "bearer line",
            LoadKind::PostTop { .. } => "post top",
            LoadKind::Horizontal { .. } => "horizontal force",
            LoadKind::Wind { .. } => "wind",
            LoadKind::Notional { .. } => "notional horizontal",
            LoadKind::Kentledge { .. } => "kentledge",
        }
    }

    /// Whether a permanent load of this kind may count where it is favourable: everything but a
    /// kentledge that could be taken away (removable or water-filled, and not secured).
    pub fn may_be_favourable(&self) -> bool {
        match self {
            LoadKind::Kentledge { form, secured, .. } => *secured || *form == KentledgeForm::Fixed,
            _ => true,
        }
    }
}

/// A load class of working scaffold.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LoadClass {
    /// Class number 1–6.
    pub class: u8,
    /// Uniformly distributed load q1, kPa.
    pub uniform_kpa: f64,
    /// Concentrated load F1 on 500 × 500 mm, kN.
    pub concentrated_500_kn: f64,
    /// Concentrated load F2 on 200 × 200 mm, kN.
    pub concentrated_200_kn: f64,
    /// Partial-area load q2, kPa (classes 4–6 only).
    pub partial_kpa: Option<f64>,
    /// Partial-area factor a_p: q2 acts on this fraction of the bay area (classes 4–6).
    pub partial_area_factor: Option<f64>,
}

/// The six load classes.
// source: EN 12811-1:2003 Table 3 (q1 and q2 via DGUV Information 201-011 Table 2; F1, F2 and
// the partial-area factors from memory)
pub const LOAD_CLASSES: [LoadClass; 6] = [
    LoadClass { class: 1, uniform_kpa: 0.75, concentrated_500_kn: 1.5, concentrated_200_kn: 1.0, partial_kpa: None, partial_area_factor: None },
    LoadClass { class: 2, uniform_kpa: 1.50, concentrated_500_kn: 1.5, concentrated_200_kn: 1.0, partial_kpa: None, partial_area_factor: None },
    LoadClass { class: 3, uniform_kpa: 2.00, concentrated_500_kn: 1.5, concentrated_200_kn: 1.0, partial_kpa: None, partial_area_factor: None },
    LoadClass { class: 4, uniform_kpa: 3.00, concentrated_500_kn: 3.0, concentrated_200_kn: 1.0, partial_kpa: Some(5.0), partial_area_factor: Some(0.4) },
    LoadClass { class: 5, uniform_kpa: 4.50, concentrated_500_kn: 3.0, concentrated_200_kn: 1.0, partial_kpa: Some(7.5), partial_area_factor: Some(0.4) },
    LoadClass { class: 6, uniform_kpa: 6.00, concentrated_500_kn: 3.0, concentrated_200_kn: 1.0, partial_kpa: Some(10.0), partial_area_factor: Some(0.5) },
];

impl LoadClass {
    /// The class with this number, if it exists.
    pub fn get(class: u8) -> Option<&'static LoadClass> {
        LOAD_CLASSES.iter().find(|c| c.class == class)
    }
}
