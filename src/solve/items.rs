//! What the solver hands on: every load item with its plate reactions, and the trace behind them.

use crate::scene::loads::Case;
use crate::solve::beam::Piece;
use crate::solve::passes::MethodPass;

/// Force (kN) and moment about the origin (kN·m) of a set of forces.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct Resultant {
    /// Force (x, y, z), kN; z up.
    pub force: [f64; 3],
    /// Moment about the origin (x, y, z), kN·m.
    pub moment: [f64; 3],
}

impl Resultant {
    /// Add a force `f` acting at `r`.
    pub fn add(&mut self, r: [f64; 3], f: [f64; 3]) {
        for k in 0..3 {
            self.force[k] += f[k];
        }
        self.moment[0] += r[1] * f[2] - r[2] * f[1];
        self.moment[1] += r[2] * f[0] - r[0] * f[2];
        self.moment[2] += r[0] * f[1] - r[1] * f[0];
    }
    /// Add a downward load `p` (kN) at plan point (x, y).
    pub fn add_down(&mut self, x: f64, y: f64, p: f64) {
        self.add([x, y, 0.0], [0.0, 0.0, -p]);
    }
    /// Sum of two resultants.
    pub fn plus(mut self, o: &Resultant) -> Resultant {
        for k in 0..3 {
            self.force[k] += o.force[k];
            self.moment[k] += o.moment[k];
        }
        self
    }
    /// Moment about point `p`, kN·m.
    pub fn moment_about(&self, p: [f64; 3]) -> [f64; 3] {
        let f = self.force;
        [
            self.moment[0] - (p[1] * f[2] - p[2] * f[1]),
            self.moment[1] - (p[2] * f[0] - p[0] * f[2]),
            self.moment[2] - (p[0] * f[1] - p[1] * f[0]),
        ]
    }
    /// Total downward force, kN.
    pub fn down(&self) -> f64 {
        -self.force[2]
    }
}

/// Which route a share of load came by into a post.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize)]
pub enum Route {
    /// Through a piece of a bearer onto the post.
    Bearer {
        /// Bearer index.
        bearer: u32,
        /// Which piece of it.
        piece: Piece,
    },
    /// From the post standing on this one: an upper lift of the same standard.
    Lift {
        /// The upper post (index).
        from: u32,
    },
    /// Through a piece of a transfer bearer, from a post standing on that bearer (or on a deck
    /// over it).
    Transfer {
        /// Bearer index.
        bearer: u32,
        /// Which piece of it.
        piece: Piece,
        /// The post standing on it (index).
        from: u32,
    },
    /// The post's own weight.
    PostSelfWeight,
    /// A load straight onto the post top.
    PostTop,
    /// Kentledge sitting on the plate.
    Kentledge,
    /// The vertical components of the brace forces at this post's nodes, from the braced bays
    /// its post is part of (the item's [`Item::lift_shear`] gives each brace's share).
    Bracing,
}

/// What kind of action a load item is, for combining it with the others.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize)]
pub enum Action {
    /// A vertical load.
    Vertical,
    /// Wind: the plan directions are alternatives.
    Wind,
    /// An identified horizontal force: independent, present wherever it is unfavourable.
    Identified,
    /// A notional horizontal load: acts with the wind of its own direction.
    Notional,
}

/// The reactions of a horizontal item under a second assumption about how its diaphragms share
/// it (the primary is the lever rule between adjacent braced planes, this one a rigid diaphragm
/// with equal-stiffness planes). Each balances the load on its own; the worse governs each plate.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Alternative {
    /// What the primary reactions assume.
    pub primary: &'static str,
    /// What these assume.
    pub label: &'static str,
    /// Upward vertical reaction at each plate it reaches: (post, kN).
    pub vertical: Vec<(u32, f64)>,
    /// Load passed on at the base of posts standing on other members: (post, kN).
    pub internal: Vec<(u32, f64)>,
    /// Horizontal reaction at each plate it reaches: (plate, [x, y] kN).
    pub shear: Vec<(u32, [f64; 2])>,
    /// As [`Item::vertical_permanent_basis`].
    pub vertical_permanent_basis: Option<Vec<(u32, f64)>>,
}

/// One set of reactions of an item (see [`Item::variant`]).
#[derive(Debug, Clone, Copy)]
pub struct Variant<'a> {
    /// Upward vertical reaction at each plate: (post, kN).
    pub vertical: &'a [(u32, f64)],
    /// Load passed on at the base of posts standing on other members: (post, kN).
    pub internal: &'a [(u32, f64)],
    /// Horizontal reaction at each plate: (post, [x, y] kN).
    pub shear: &'a [(u32, [f64; 2])],
    /// For a notional load: the part due to permanent load, at plates and other posts alike.
    pub permanent: Option<&'a [(u32, f64)]>,
}

/// One share of the load entering one post: the trace behind every number. The shares of a post
/// with a base plate add up to its plate load; those of a post standing on another member add up
/// to the load it passes on.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Contribution {
    /// Post index.
    pub post: u32,
    /// Item index.
    pub item: u32,
    /// Route it came by.
    pub route: Route,
    /// Upward reaction, kN.
    pub kn: f64,
}

/// One load item and what it does at the base.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Item {
    /// Load id, or `self-weight`.
    pub id: String,
    /// Load case.
    pub case: Case,
    /// Resultant of the applied load, from its own definition.
    pub applied: Resultant,
    /// Upward vertical reaction at each base plate it reaches: (post, kN), one entry per plate.
    pub vertical: Vec<(u32, f64)>,
    /// Load passed on at the base of each post it reaches that stands on another member (a post,
    /// a bearer, a deck): (post, kN downwards). Negative: the post pulls on what it stands on —
    /// tension through a splice, or a post lifting off a transfer bearer.
    pub internal: Vec<(u32, f64)>,
    /// Horizontal reaction at each plate it reaches: (plate, [x, y] kN).
    pub shear: Vec<(u32, [f64; 2])>,
    /// Plan direction (unit x, y) of a horizontal load; `None` for vertical loads.
    pub direction: Option<[f64; 2]>,
    /// For a notional load whose basis includes variable loads: the vertical reactions of the
    /// part due to permanent load alone. Where uplift is sought the variable load is absent, and
    /// so is the notional load it would cause.
    pub vertical_permanent_basis: Option<Vec<(u32, f64)>>,
    /// How it combines with the others.
    pub action: Action,
    /// Its reactions under the other diaphragm assumption, where that differs.
    pub alternative: Option<Box<Alternative>>,
    /// How a generated item was made (e.g. the notional rule and the vertical load it is a share
    /// of); empty for the scene's own loads.
    pub note: String,
    /// For a horizontal item: the shear of each lift of each braced plane, flat over the planes'
    /// levels (primary reactions), kN; empty otherwise.
    pub lift_shear: Vec<f64>,
    /// For an arranged imposed load: its cells and, at every post, the worst arrangement. The
    /// whole-load reactions above are then the case with every cell loaded.
    pub arranged: Option<Arranged>,
    /// For a load-class imposed load on a deck: the level of that deck, m (a working level).
    pub working_level: Option<f64>,
}

/// An arranged imposed load: split into cells, each present or absent, so that at every post the
/// maximum takes only the cells that push it down and the minimum only those that lift it.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Arranged {
    /// The cells, with their applied load.
    pub cells: Vec<Cell>,
    /// At every post the load reaches: (post, sum of the cells that push it down (≥ 0), sum of
    /// the cells that lift it (≤ 0)), kN — reactions for a plate, load passed on for any other
    /// post.
    pub extremes: Vec<(u32, f64, f64)>,
    /// For each entry of `extremes`: how many cells push that post down, and how many lift it.
    pub counts: Vec<(u32, u32)>,
    /// Worst relative equilibrium residual of a single cell: largest of |ΣF| / F and
    /// |ΣM| / (F·L) over the cells (L the plan size of the structure, at least 1 m).
    pub worst_cell_residual: f64,
}

/// One cell of an arranged load.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Cell {
    /// Where it is.
    pub place: CellPlace,
    /// Its applied load.
    pub applied: Resultant,
}

/// Where a cell of an arranged load lies.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub enum CellPlace {
    /// A plan rectangle of a deck: one strip between bearers (or a cantilever) over one span
    /// between posts (or an overhang).
    Deck {
        /// Deck index.
        deck: u32,
        /// Plan rectangle, m.
        rect: crate::scene::geometry::Rect,
    },
    /// A stretch of a bearer between posts (or an overhang), distances from its first post.
    Bearer {
        /// Bearer index.
        bearer: u32,
        /// Start, m.
        from_m: f64,
        /// End, m.
        to_m: f64,
    },
}

impl Item {
    /// An item of a load with nothing reaching the base yet.
    pub fn new(id: impl Into<String>, case: Case, applied: Resultant) -> Self {
        Item {
            id: id.into(),
            case,
            applied,
            vertical: Vec::new(),
            internal: Vec::new(),
            shear: Vec::new(),
            direction: None,
            vertical_permanent_basis: None,
            action: Action::Vertical,
            alternative: None,
            note: String::new(),
            lift_shear: Vec::new(),
            arranged: None,
            working_level: None,
        }
    }

    /// Horizontal loads in the same plan direction act together; loads in different directions
    /// are alternatives. This key (direction in hundredths of a degree) tells them apart.
    pub fn direction_key(&self) -> Option<i64> {
        self.direction.map(direction_key_of)
    }

    /// Resultant of the item's plate reactions.
    pub fn reaction_resultant(&self, plates: &[[f64; 3]]) -> Resultant {
        resultant_of(plates, &self.vertical, &self.shear)
    }

    /// Number of reaction sets: 2 when an alternative diaphragm assumption differs, else 1.
    pub fn variant_count(&self) -> usize {
        1 + self.alternative.is_some() as usize
    }

    /// Reaction set `v` (0 = primary, 1 = the alternative; the primary if there is none).
    pub fn variant(&self, v: usize) -> Variant<'_> {
        match (&self.alternative, v) {
            (Some(a), 1) => Variant { vertical: &a.vertical, internal: &a.internal, shear: &a.shear, permanent: a.vertical_permanent_basis.as_deref() },
            _ => Variant { vertical: &self.vertical, internal: &self.internal, shear: &self.shear, permanent: self.vertical_permanent_basis.as_deref() },
        }
    }

    /// Resultant of the plate reactions of reaction set `v`.
    pub fn variant_resultant(&self, plates: &[[f64; 3]], v: usize) -> Resultant {
        let r = self.variant(v);
        resultant_of(plates, r.vertical, r.shear)
    }
}

fn resultant_of(plates: &[[f64; 3]], vertical: &[(u32, f64)], shear: &[(u32, [f64; 2])]) -> Resultant {
    let mut r = Resultant::default();
    for &(p, v) in vertical {
        r.add(plates[p as usize], [0.0, 0.0, v]);
    }
    for &(p, [sx, sy]) in shear {
        r.add(plates[p as usize], [sx, sy, 0.0]);
    }
    r
}

/// Id of the item that holds the self-weight of every element.
pub const SELF_WEIGHT_ID: &str = "self-weight";

/// Everything the solver found, before any combination is applied.
#[derive(Debug, Clone)]
pub struct Solution {
    /// Base positions (x, y, base level) of every post, in post order; only those with
    /// [`is_plate`](Self::is_plate) are base plates.
    pub plates: Vec<[f64; 3]>,
    /// Whether each post has a base plate (on the ground or an existing structure).
    pub is_plate: Vec<bool>,
    /// Every load item: self-weight first, then the scene's loads in order.
    pub items: Vec<Item>,
    /// Every reaction share, for tracing.
    pub contributions: Vec<Contribution>,
    /// Single-post bearers that stand only because their post's head takes a moment.
    pub head_moments: Vec<crate::solve::tee_heads::HeadMoment>,
    /// Where members are taken support by support ([`MethodPass::is_one_state`] false): the
    /// worst relative equilibrium residual of their two-span models; 0 otherwise.
    pub local_residual: f64,
    /// How the members shared their loads in this solution.
    pub method: MethodPass,
}

impl Solution {
    /// Vertical load at the base of each post in each case, kN: `[post][case]` — the plate load
    /// (upwards positive) for a post with a base plate, the load it passes on for any other.
    pub fn case_vertical(&self) -> Vec<[f64; 3]> {
        let mut out = vec![[0.0; 3]; self.plates.len()];
        for item in &self.items {
            for &(p, v) in item.vertical.iter().chain(&item.internal) {
                out[p as usize][item.case.index()] += v;
            }
        }
        out
    }
    /// Horizontal reaction of each plate in each case, kN: `[plate][case][x|y]`.
    pub fn case_shear(&self) -> Vec<[[f64; 2]; 3]> {
        let mut out = vec![[[0.0; 2]; 3]; self.plates.len()];
        for item in &self.items {
            for &(p, [sx, sy]) in &item.shear {
                let s = &mut out[p as usize][item.case.index()];
                s[0] += sx;
                s[1] += sy;
            }
        }
        out
    }
}

/// A plan direction (unit vector x, y) as a whole number of hundredths of a degree, 0 to 35,999:
/// directions that print alike are one.
pub fn direction_key_of([x, y]: [f64; 2]) -> i64 {
    let deg = y.atan2(x).to_degrees().rem_euclid(360.0);
    ((deg * 100.0).round() as i64) % 36_000
}
