//! Overall stability of each separate structure against overturning, as a temporary-works
//! designer checks it.
//!
//! - **Structures.** Posts joined by bearers or braces form one structure; each is checked on
//!   its own base plates.
//! - **Tipping axes.** Every edge of the convex hull of the structure's plates, and, for each
//!   direction a horizontal load acts in or a cantilevered load lies in beyond a corner, the
//!   line through the hull's outermost plate across that direction. A line of plates (or a
//!   single plate) has its own line as the axis sideways and its end plates lengthways.
//! - **Moments kept apart.** About each axis every load item is split into the part that
//!   restores and the part that overturns, from where it acts on the structure (a deck's area,
//!   a bearer's length, a post): the self-weight of a cantilever beyond the edge overturns even
//!   though the rest of the self-weight restores. Imposed load never restores: a load over a
//!   whole deck (it can stand anywhere on it) counts on the part beyond the edge, any other
//!   imposed load (a stack, a point load: one object) counts whole where it overturns. Each
//!   horizontal load counts where it overturns, the worst single plan direction of them.
//!   Kentledge that could be taken away never restores.
//! - **Two forms.** The factor of safety, restoring (stabilising permanent load only) ÷
//!   overturning (destabilising permanent + variable), unfactored, against the scene's target;
//!   and the EN 1990 equilibrium check E_d,dst ≤ E_d,stb with the partial factors of
//!   Table A1.2(A) (or the scene's), favourable and unfavourable parts of the permanent load
//!   factored separately.
//! - **Kentledge.** Where an axis falls short, the kentledge that brings it to both targets, at
//!   the plates the planner names or else over the plates farthest from the axis, with its real
//!   lever.

use crate::check::actions::VariableActions;
use rustc_hash::FxHashMap as HashMap;
use crate::scene::combination::Factors;
use crate::scene::loads::{Case, KentledgePlace, LoadKind};
use crate::scene::standing::StandsOn;
use crate::scene::validate::{Model, Target};
use crate::solve::items::CellPlace;
use crate::solve::{Resultant, Solution, SELF_WEIGHT_ID};

/// Distances below this, m, count as on the axis.
const ON_AXIS_M: f64 = 1e-9;
/// Plates within this of the farthest one, m, share a default kentledge.
const FARTHEST_TOLERANCE_M: f64 = 1e-3;
/// Unit directions whose components differ by less than this are one tipping direction.
const DIRECTION_SAME: f64 = 1e-12;

/// Tipping about one axis of one structure.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TippingAxis {
    /// What the axis is, with plate ids: `edge A1–G1`, `corner A1`, `line A1–G1`.
    pub about: String,
    /// Direction of tipping in plan: `+x`, `-y`, or degrees from +x towards +y.
    pub towards: String,
    /// Unit plan vector of the tipping direction (the axis's outward normal).
    pub normal: [f64; 2],
    /// A point on the axis (a plate's position and level), m.
    pub point: [f64; 3],
    /// Restoring moment of the permanent load that stabilises, kN·m (unfactored).
    pub permanent_stabilising_knm: f64,
    /// Overturning moment of the permanent load that destabilises (the parts beyond the axis),
    /// kN·m.
    pub permanent_destabilising_knm: f64,
    /// Overturning moment of the vertical variable loads, each only where and as far as it
    /// overturns, kN·m.
    pub imposed_destabilising_knm: f64,
    /// Overturning moment of the worst single plan direction of horizontal load, kN·m.
    pub horizontal_destabilising_knm: f64,
    /// Which horizontal loads that is: their direction and ids.
    pub horizontal_loads: Option<String>,
    /// Restoring ÷ overturning; `None` when nothing overturns.
    pub factor: Option<f64>,
    /// Whether the factor meets the target (or nothing overturns).
    pub meets_target: bool,
    /// E_d,stb: the stabilising permanent load × γG,inf, kN·m.
    pub equ_stabilising_knm: f64,
    /// E_d,dst: destabilising permanent × γG,sup + each variable load × its γ, kN·m.
    pub equ_destabilising_knm: f64,
    /// E_d,dst ÷ E_d,stb; `None` when nothing overturns.
    pub equ_utilisation: Option<f64>,
    /// Whether E_d,dst ≤ E_d,stb.
    pub equ_ok: bool,
    /// Kentledge that brings both forms to their targets, where they fall short.
    pub kentledge: Option<KentledgeNeed>,
}

impl TippingAxis {
    /// How far the axis is from its targets, as one number: the larger of target ÷ factor and
    /// E_d,dst ÷ E_d,stb; above 1 fails. 0 when nothing overturns.
    pub fn utilisation(&self, target: f64) -> f64 {
        let f = self.factor.map_or(0.0, |f| if f > 0.0 { target / f } else { f64::INFINITY });
        f.max(self.equ_utilisation.unwrap_or(0.0))
    }
    /// Whether both forms pass.
    pub fn passes(&self) -> bool {
        self.meets_target && self.equ_ok
    }
}

/// Kentledge needed about one axis.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct KentledgeNeed {
    /// Plates (post ids) it goes over, its weight shared equally, secured to their standards.
    pub plates: Vec<String>,
    /// Its lever about the axis, m (the mean distance of those plates inside the axis).
    pub lever_m: f64,
    /// Kentledge for the factor of safety to reach the target, kN.
    pub for_factor_kn: Option<f64>,
    /// Kentledge for E_d,dst ≤ E_d,stb, kN (it counts × γG,inf); `None` if γG,inf is 0.
    pub for_equ_kn: Option<f64>,
    /// The larger: what to place, kN; `None` when kentledge there cannot help (lever 0).
    pub needed_kn: Option<f64>,
    /// Why kentledge cannot help, when it cannot.
    pub cannot: Option<String>,
}

/// One separate structure.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Structure {
    /// Name for outputs: `structure 1 (21 plates from A1)`.
    pub label: String,
    /// Number of base plates.
    pub plate_count: usize,
    /// Plate ids at the corners of the convex hull, anticlockwise.
    pub hull: Vec<String>,
    /// Permanent load on it, kN.
    pub permanent_kn: f64,
    /// Each tipping axis.
    pub axes: Vec<TippingAxis>,
    /// Index of the axis with the highest utilisation ([`TippingAxis::utilisation`]), if
    /// anything overturns.
    pub governing: Option<usize>,
    /// Plate indices (not written out).
    #[serde(skip)]
    pub plates: Vec<u32>,
}

/// The stability summary.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Stability {
    /// Total permanent load, kN.
    pub permanent_kn: f64,
    /// Centre of gravity (x, y) of the permanent load, m; `None` if there is none.
    pub centre_of_gravity: Option<(f64, f64)>,
    /// Target factor of safety against overturning.
    pub target_factor: f64,
    /// Partial factors of the equilibrium form.
    pub equilibrium: Factors,
    /// Each separate structure.
    pub structures: Vec<Structure>,
    /// Why the check could not be made, when it could not: no number is given then.
    pub refused: Option<String>,
}

impl Stability {
    /// The governing axis over all structures: (structure, axis).
    pub fn governing(&self) -> Option<(&Structure, &TippingAxis)> {
        self.structures
            .iter()
            .filter_map(|s| s.governing.map(|g| (s, &s.axes[g])))
            .max_by(|a, b| a.1.utilisation(self.target_factor).total_cmp(&b.1.utilisation(self.target_factor)))
    }
    /// The lowest factor of safety over every axis, with its structure and axis.
    pub fn lowest_factor(&self) -> Option<(&Structure, &TippingAxis, f64)> {
        self.structures.iter().flat_map(|s| s.axes.iter().filter_map(move |a| a.factor.map(|f| (s, a, f)))).min_by(|a, b| a.2.total_cmp(&b.2))
    }
    /// Whether the check was refused or any axis fails either form.
    pub fn fails(&self) -> bool {
        self.refused.is_some() || self.structures.iter().any(|s| s.axes.iter().any(|a| !a.passes()))
    }
}

// ---------------------------------------------------------------------------------------------
// Structures

/// Separate structures: groups of posts joined by bearers, braces, splices (a post standing on
/// another) or transfer members (a post standing on a bearer or deck). Returns each structure's
/// post indices, in order of their first post; its base plates are those of its posts that have
/// one.
pub fn structures(model: &Model) -> Vec<Vec<u32>> {
    let scene = model.scene;
    let n = scene.posts.len();
    let mut parent: Vec<usize> = (0..n).collect();
    fn root(parent: &mut [usize], mut i: usize) -> usize {
        while parent[i] != i {
            parent[i] = parent[parent[i]];
            i = parent[i];
        }
        i
    }
    let mut join = |a: usize, b: usize| {
        let (ra, rb) = (root(&mut parent, a), root(&mut parent, b));
        if ra != rb {
            parent[ra.max(rb)] = ra.min(rb);
        }
    };
    for line in &model.bearers {
        for w in line.posts.windows(2) {
            join(w[0], w[1]);
        }
    }
    for (p, on) in model.graph.stands_on.iter().enumerate() {
        match *on {
            StandsOn::Post(q) => join(p, q),
            StandsOn::Bearer { bearer, .. } => join(p, model.bearers[bearer].posts[0]),
            StandsOn::Deck(d) => join(p, model.bearers[model.decks[d].bearers[0]].posts[0]),
            StandsOn::Ground | StandsOn::Structure(_) => {}
        }
    }
    if !scene.braces.is_empty() {
        let ix: HashMap<&str, usize> = scene.posts.iter().enumerate().map(|(i, p)| (p.id.as_str(), i)).collect();
        for b in &scene.braces {
            if let (Some(&a), Some(&z)) = (ix.get(b.from.post.as_str()), ix.get(b.to.post.as_str())) {
                join(a, z);
            }
        }
    }
    let mut slot: HashMap<usize, usize> = HashMap::default();
    let mut out: Vec<Vec<u32>> = Vec::new();
    for i in 0..n {
        let r = root(&mut parent, i);
        let k = *slot.entry(r).or_insert_with(|| {
            out.push(Vec::new());
            out.len() - 1
        });
        out[k].push(i as u32);
    }
    out
}

// ---------------------------------------------------------------------------------------------
// Where each load acts: its parts

/// One part of an applied vertical load, downward force `p` (kN) positive.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Shape {
    /// At a plan point.
    Point([f64; 2]),
    /// Spread evenly along a plan segment.
    Line([f64; 2], [f64; 2]),
    /// Spread evenly over an axis-aligned plan rectangle [x0, y0, x1, y1].
    Area([f64; 4]),
}

#[derive(Debug, Clone, Copy, PartialEq)]
struct Part {
    shape: Shape,
    p: f64,
}

impl Part {
    /// Plan bounding box [x0, y0, x1, y1].
    fn bounds(&self) -> [f64; 4] {
        match self.shape {
            Shape::Point([x, y]) => [x, y, x, y],
            Shape::Line(a, b) => [a[0].min(b[0]), a[1].min(b[1]), a[0].max(b[0]), a[1].max(b[1])],
            Shape::Area(r) => r,
        }
    }
    /// First moments: (p, p·x̄, p·ȳ).
    fn moments(&self) -> [f64; 3] {
        let c = match self.shape {
            Shape::Point(a) => a,
            Shape::Line(a, b) => [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])],
            Shape::Area(r) => [0.5 * (r[0] + r[2]), 0.5 * (r[1] + r[3])],
        };
        [self.p, self.p * c[0], self.p * c[1]]
    }
    /// Tipping moment about an axis through `a` with outward unit normal `n`, split into the part
    /// beyond the axis and the part inside it (positive overturns).
    fn tipping(&self, a: [f64; 2], n: [f64; 2]) -> (f64, f64) {
        let d = |q: [f64; 2]| {
            let v = n[0] * (q[0] - a[0]) + n[1] * (q[1] - a[1]);
            if v.abs() < ON_AXIS_M { 0.0 } else { v }
        };
        match self.shape {
            Shape::Point(q) => {
                let t = self.p * d(q);
                if t >= 0.0 { (t, 0.0) } else { (0.0, t) }
            }
            Shape::Line(qa, qb) => {
                let (da, db) = (d(qa), d(qb));
                if da >= 0.0 && db >= 0.0 {
                    (self.p * 0.5 * (da + db), 0.0)
                } else if da <= 0.0 && db <= 0.0 {
                    (0.0, self.p * 0.5 * (da + db))
                } else {
                    // The fraction beyond lies between the end beyond and the crossing point.
                    let (out, inn) = if da > 0.0 { (da, db) } else { (db, da) };
                    let f = out / (out - inn);
                    (self.p * f * 0.5 * out, self.p * (1.0 - f) * 0.5 * inn)
                }
            }
            Shape::Area(r) => {
                let area = (r[2] - r[0]) * (r[3] - r[1]);
                if area <= 0.0 {
                    return (0.0, 0.0);
                }
                let q = self.p / area;
                let corners = [[r[0], r[1]], [r[2], r[1]], [r[2], r[3]], [r[0], r[3]]];
                let centre = [0.5 * (r[0] + r[2]), 0.5 * (r[1] + r[3])];
                let total = self.p * d(centre);
                let ds = corners.map(d);
                if ds.iter().all(|&v| v <= 0.0) {
                    return (0.0, total);
                }
                if ds.iter().all(|&v| v >= 0.0) {
                    return (total, 0.0);
                }
                // Clip the rectangle to the side beyond the axis; ∫ d dA = area × d(centroid).
                let beyond = clip_beyond(&corners, &ds);
                let (ab, cb) = polygon_area_centroid(&beyond);
                let out = q * ab * d(cb);
                (out, total - out)
            }
        }
    }
}

/// The part of a convex polygon where the signed distance `ds` ≥ 0 (Sutherland–Hodgman, one plane).
fn clip_beyond(poly: &[[f64; 2]], ds: &[f64]) -> Vec<[f64; 2]> {
    let mut out = Vec::with_capacity(poly.len() + 1);
    for i in 0..poly.len() {
        let j = (i + 1) % poly.len();
        let (p, q, dp, dq) = (poly[i], poly[j], ds[i], ds[j]);
        if dp >= 0.0 {
            out.push(p);
        }
        if (dp > 0.0 && dq < 0.0) || (dp < 0.0 && dq > 0.0) {
            let t = dp / (dp - dq);
            out.push([p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])]);
        }
    }
    out
}

/// Area and centroid of a simple polygon (shoelace).
fn polygon_area_centroid(poly: &[[f64; 2]]) -> (f64, [f64; 2]) {
    let (mut a, mut cx, mut cy) = (0.0, 0.0, 0.0);
    for i in 0..poly.len() {
        let (p, q) = (poly[i], poly[(i + 1) % poly.len()]);
        let cross = p[0] * q[1] - q[0] * p[1];
        a += cross;
        cx += (p[0] + q[0]) * cross;
        cy += (p[1] + q[1]) * cross;
    }
    if a.abs() < 1e-300 {
        return (0.0, poly.first().copied().unwrap_or([0.0, 0.0]));
    }
    (0.5 * a.abs(), [cx / (3.0 * a), cy / (3.0 * a)])
}

/// The parts of one vertical item on one structure, with their sums.
#[derive(Debug, Clone)]
struct Group {
    item: usize,
    /// Whether each part of a variable item is present or absent on its own (the cells of an
    /// arranged load); otherwise the item is one object, present whole or not at all.
    cellwise: bool,
    structure: usize,
    range: std::ops::Range<usize>,
    /// Σp, Σp·x, Σp·y.
    sums: [f64; 3],
    bounds: [f64; 4],
}

/// The parts of every vertical item of a solution, grouped by item and structure; or why the
/// loads could not be split.
struct Parts {
    parts: Vec<Part>,
    groups: Vec<Group>,
}

/// Where every vertical load item acts, from the scene: the self-weight of each deck, bearer and
/// post, and each load by its kind. Each item's parts are checked against its applied resultant,
/// so a load the split does not know is refused, not left out.
fn parts_of(model: &Model, solution: &Solution, structure_of: &[u32]) -> Result<Parts, String> {
    let scene = model.scene;
    let by_id: HashMap<&str, usize> = scene.loads.iter().enumerate().map(|(k, l)| (l.id.as_str(), k)).collect();
    let deck_anchor = |d: usize| model.bearers[model.decks[d].bearers[0]].posts[0];
    let mut parts: Vec<Part> = Vec::new();
    let mut groups: Vec<Group> = Vec::new();
    let mut tagged: Vec<(usize, Part)> = Vec::new();
    for (i, item) in solution.items.iter().enumerate() {
        if item.direction.is_some() {
            continue;
        }
        tagged.clear();
        let mut cellwise = false;
        let mut put = |post: usize, shape: Shape, p: f64| tagged.push((post, Part { shape, p }));
        if item.id == SELF_WEIGHT_ID && i == 0 {
            for (d, deck) in scene.decks.iter().enumerate() {
                let e = &deck.extent;
                put(deck_anchor(d), Shape::Area([e.x.0, e.y.0, e.x.1, e.y.1]), deck.self_weight_kpa * e.area());
            }
            for (b, line) in model.bearers.iter().enumerate() {
                let (a, z) = (line.point_at(line.start), line.point_at(line.end));
                put(line.posts[0], Shape::Line([a.0, a.1], [z.0, z.1]), scene.bearers[b].self_weight_kn_per_m * (line.end - line.start));
            }
            for (k, post) in scene.posts.iter().enumerate() {
                put(k, Shape::Point([post.x, post.y]), post.self_weight_kn_per_m * (post.top_level - post.base_level));
            }
        } else {
            let Some(&k) = by_id.get(item.id.as_str()) else {
                return Err(format!("load item {} is not a load of the scene, so where it acts is not known", item.id));
            };
            let load = &scene.loads[k];
            match (&load.kind, model.load_targets[k]) {
                // An arranged load: each cell present or absent on its own.
                _ if item.arranged.is_some() => {
                    cellwise = true;
                    for cell in &item.arranged.as_ref().expect("checked").cells {
                        let p = cell.applied.down();
                        match cell.place {
                            CellPlace::Deck { deck, rect } => put(deck_anchor(deck as usize), Shape::Area([rect.x.0, rect.y.0, rect.x.1, rect.y.1]), p),
                            CellPlace::Bearer { bearer, from_m, to_m } => {
                                let line = &model.bearers[bearer as usize];
                                let (a, z) = (line.point_at(from_m), line.point_at(to_m));
                                put(line.posts[0], Shape::Line([a.0, a.1], [z.0, z.1]), p);
                            }
                        }
                    }
                }
                (LoadKind::DeckArea { intensity, .. }, Target::Deck(d)) => {
                    let e = &scene.decks[d].extent;
                    put(deck_anchor(d), Shape::Area([e.x.0, e.y.0, e.x.1, e.y.1]), intensity.kpa().unwrap_or(0.0) * e.area());
                }
                (LoadKind::DeckPatch { area, intensity, .. }, Target::Deck(d)) => {
                    put(deck_anchor(d), Shape::Area([area.x.0, area.y.0, area.x.1, area.y.1]), intensity.kpa().unwrap_or(0.0) * area.area());
                }
                (LoadKind::DeckPoint { x, y, kn, .. }, Target::Deck(d)) | (LoadKind::Kentledge { on: KentledgePlace::Deck { x, y, .. }, kn, .. }, Target::Deck(d)) => {
                    put(deck_anchor(d), Shape::Point([*x, *y]), *kn);
                }
                (LoadKind::BearerPoint { at_m, kn, .. }, Target::Bearer(b)) => {
                    let (x, y) = model.bearers[b].point_at(*at_m);
                    put(model.bearers[b].posts[0], Shape::Point([x, y]), *kn);
                }
                (LoadKind::BearerLine { from_m, to_m, kn_per_m, .. }, Target::Bearer(b)) => {
                    let line = &model.bearers[b];
                    let (a, z) = (line.point_at(*from_m), line.point_at(*to_m));
                    put(line.posts[0], Shape::Line([a.0, a.1], [z.0, z.1]), kn_per_m * (to_m - from_m));
                }
                (LoadKind::PostTop { kn, .. }, Target::Post(p)) => {
                    let post = &scene.posts[p];
                    put(p, Shape::Point([post.x, post.y]), *kn);
                }
                (LoadKind::Kentledge { on: KentledgePlace::Plates(_), kn, .. }, _) => {
                    let on = &model.load_posts[k];
                    for &p in on {
                        let post = &scene.posts[p];
                        put(p, Shape::Point([post.x, post.y]), kn / on.len() as f64);
                    }
                }
                _ => return Err(format!("load {} ({}) has no known point of action for the overturning check", load.id, load.kind.label())),
            }
        }
        // The parts must add up to what the solver applied.
        let sums = tagged.iter().fold([0.0; 3], |s, (_, part)| {
            let m = part.moments();
            [s[0] + m[0], s[1] + m[1], s[2] + m[2]]
        });
        let applied = &item.applied;
        let reach = tagged.iter().map(|(_, part)| part.bounds().iter().fold(1.0f64, |a, v| a.max(v.abs()))).fold(1.0f64, f64::max);
        let scale = tagged.iter().map(|(_, part)| part.p.abs()).sum::<f64>() * reach;
        let off = (sums[0] - applied.down()).abs().max((sums[1] - applied.moment[1]).abs()).max((sums[2] + applied.moment[0]).abs());
        if off > 1e-9 * scale.max(1e-9) {
            return Err(format!("the parts of load {} do not add up to the load the solver applied (off by {off:.3e}), so it cannot be split about a tipping edge", item.id));
        }
        // Group by structure.
        if tagged.iter().any(|(post, _)| structure_of[*post] != structure_of[tagged[0].0]) {
            tagged.sort_by_key(|(post, _)| structure_of[*post]);
        }
        for chunk in tagged.chunk_by(|a, b| structure_of[a.0] == structure_of[b.0]) {
            let start = parts.len();
            parts.extend(chunk.iter().map(|(_, part)| *part));
            let (mut sums, mut bounds) = ([0.0; 3], [f64::INFINITY, f64::INFINITY, f64::NEG_INFINITY, f64::NEG_INFINITY]);
            for part in &parts[start..] {
                let m = part.moments();
                let b = part.bounds();
                for k in 0..3 {
                    sums[k] += m[k];
                }
                bounds = [bounds[0].min(b[0]), bounds[1].min(b[1]), bounds[2].max(b[2]), bounds[3].max(b[3])];
            }
            groups.push(Group { item: i, cellwise, structure: structure_of[chunk[0].0] as usize, range: start..parts.len(), sums, bounds });
        }
    }
    Ok(Parts { parts, groups })
}

// ---------------------------------------------------------------------------------------------
// Hulls and axes

/// Convex hull of plan points, anticlockwise, without collinear points; indices into `pts`.
fn convex_hull(pts: &[[f64; 2]], idx: &[u32]) -> Vec<u32> {
    // Points well inside the polygon of the eight extreme points (west, south-west, south, …)
    // cannot be on the hull: drop them before sorting (Akl–Toussaint), which leaves only the
    // rim of a large grid.
    let mut order: Vec<u32> = match octagon(pts, idx) {
        Some(oct) => idx
            .iter()
            .copied()
            .filter(|&i| {
                let q = pts[i as usize];
                !(0..oct.len()).all(|k| {
                    let (a, b) = (oct[k], oct[(k + 1) % oct.len()]);
                    (b[0] - a[0]) * (q[1] - a[1]) - (b[1] - a[1]) * (q[0] - a[0]) > 1e-6 * ((b[0] - a[0]).abs() + (b[1] - a[1]).abs())
                })
            })
            .collect(),
        None => idx.to_vec(),
    };
    monotone_chain(pts, &mut order)
}

/// Convex hull (Andrew's monotone chain) of the points `order` (indices into `pts`, reordered).
fn monotone_chain(pts: &[[f64; 2]], order: &mut Vec<u32>) -> Vec<u32> {
    order.sort_unstable_by(|&a, &b| {
        let (p, q) = (pts[a as usize], pts[b as usize]);
        p[0].total_cmp(&q[0]).then(p[1].total_cmp(&q[1]))
    });
    order.dedup_by(|a, b| {
        let (p, q) = (pts[*a as usize], pts[*b as usize]);
        (p[0] - q[0]).abs() < ON_AXIS_M && (p[1] - q[1]).abs() < ON_AXIS_M
    });
    if order.len() < 3 {
        return order.clone();
    }
    let cross = |o: u32, a: u32, b: u32| {
        let (o, a, b) = (pts[o as usize], pts[a as usize], pts[b as usize]);
        (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])
    };
    // Points off a line by less than 1e-9 m are on it: cross ≤ tol × |ap|, compared squared.
    let mut hull: Vec<u32> = Vec::with_capacity(2 * order.len());
    let len2 = |a: u32, b: u32| {
        let (p, q) = (pts[a as usize], pts[b as usize]);
        (q[0] - p[0]) * (q[0] - p[0]) + (q[1] - p[1]) * (q[1] - p[1])
    };
    for pass in 0..2 {
        let start = hull.len();
        let seq: Box<dyn Iterator<Item = &u32>> = if pass == 0 { Box::new(order.iter()) } else { Box::new(order.iter().rev()) };
        for &p in seq {
            while hull.len() >= start + 2 {
                let (a, b) = (hull[hull.len() - 2], hull[hull.len() - 1]);
                let c = cross(a, b, p);
                if c <= 0.0 || c * c <= ON_AXIS_M * ON_AXIS_M * len2(a, p) {
                    hull.pop();
                } else {
                    break;
                }
            }
            hull.push(p);
        }
        hull.pop();
    }
    if hull.len() < 3 {
        // All on a line: its two ends.
        return vec![order[0], *order.last().expect("non-empty")];
    }
    hull
}

/// The extreme points of a set in eight directions, anticlockwise from the west, without
/// repeats; `None` for fewer than three distinct ones.
fn octagon(pts: &[[f64; 2]], idx: &[u32]) -> Option<Vec<[f64; 2]>> {
    if idx.len() < 16 {
        return None;
    }
    // Key of each direction: the point minimising it is the extreme one that way.
    let keys: [fn([f64; 2]) -> f64; 8] = [|p| p[0], |p| p[0] + p[1], |p| p[1], |p| p[1] - p[0], |p| -p[0], |p| -p[0] - p[1], |p| -p[1], |p| p[0] - p[1]];
    let mut oct: Vec<[f64; 2]> = keys
        .iter()
        .map(|k| idx.iter().map(|&i| pts[i as usize]).min_by(|a, b| k(*a).total_cmp(&k(*b))).expect("non-empty"))
        .collect();
    oct.dedup();
    while oct.len() > 1 && oct.first() == oct.last() {
        oct.pop();
    }
    (oct.len() >= 3).then_some(oct)
}

/// A tipping axis before it is evaluated.
#[derive(Debug, Clone)]
struct AxisDef {
    about: String,
    /// Outward unit normal (tipping direction).
    n: [f64; 2],
    /// Point on the axis (x, y, z).
    a: [f64; 3],
    /// Rise of the axis per metre along it (for horizontal loads on sloping bases).
    slope: f64,
}

impl AxisDef {
    /// Moment of a resultant about the axis, positive overturning.
    fn moment(&self, r: &Resultant) -> f64 {
        let m = r.moment_about(self.a);
        let t = [-self.n[1], self.n[0], self.slope];
        m[0] * t[0] + m[1] * t[1] + m[2] * t[2]
    }
    /// Plan distance of a point beyond the axis (negative inside).
    fn distance(&self, q: [f64; 2]) -> f64 {
        self.n[0] * (q[0] - self.a[0]) + self.n[1] * (q[1] - self.a[1])
    }
}

/// Plan direction in words: `+x`, `-y`, or degrees from +x towards +y.
pub fn direction_words(n: [f64; 2]) -> String {
    let deg = n[1].atan2(n[0]).to_degrees().rem_euclid(360.0);
    for (d, name) in [(0.0, "+x"), (90.0, "+y"), (180.0, "-x"), (270.0, "-y"), (360.0, "+x")] {
        if (deg - d).abs() < 1e-6 {
            return name.into();
        }
    }
    format!("{deg:.1}°")
}

/// The axes of one structure: hull edges, and the supporting line across each of `directions`
/// that is not an edge's.
fn axes_of(hull: &[u32], plates: &[[f64; 3]], ids: &dyn Fn(u32) -> String, directions: &[[f64; 2]]) -> Vec<AxisDef> {
    let p2 = |i: u32| [plates[i as usize][0], plates[i as usize][1]];
    let mut out: Vec<AxisDef> = Vec::new();
    let corner = |i: u32, n: [f64; 2], what: &str| AxisDef { about: format!("{what} {}", ids(i)), n, a: plates[i as usize], slope: 0.0 };
    match hull.len() {
        0 => {}
        1 => {
            for &n in directions {
                out.push(corner(hull[0], n, "plate"));
            }
        }
        2 => {
            let (a, b) = (hull[0], hull[1]);
            let (pa, pb) = (p2(a), p2(b));
            let len = (pb[0] - pa[0]).hypot(pb[1] - pa[1]);
            let t = [(pb[0] - pa[0]) / len, (pb[1] - pa[1]) / len];
            let rise = (plates[b as usize][2] - plates[a as usize][2]) / len;
            let line = format!("line {}–{}", ids(a), ids(b));
            out.push(AxisDef { about: line.clone(), n: [t[1], -t[0]], a: plates[a as usize], slope: rise });
            out.push(AxisDef { about: line, n: [-t[1], t[0]], a: plates[b as usize], slope: -rise });
            out.push(corner(b, t, "end plate"));
            out.push(corner(a, [-t[0], -t[1]], "end plate"));
        }
        h => {
            for k in 0..h {
                let (a, b) = (hull[k], hull[(k + 1) % h]);
                let (pa, pb) = (p2(a), p2(b));
                let len = (pb[0] - pa[0]).hypot(pb[1] - pa[1]);
                let t = [(pb[0] - pa[0]) / len, (pb[1] - pa[1]) / len];
                let rise = (plates[b as usize][2] - plates[a as usize][2]) / len;
                out.push(AxisDef { about: format!("edge {}–{}", ids(a), ids(b)), n: [t[1], -t[0]], a: plates[a as usize], slope: rise });
            }
        }
    }
    if hull.len() >= 2 {
        // Across each load direction that no edge faces: the line through the outermost plate.
        let edge_normals: Vec<[f64; 2]> = out.iter().map(|a| a.n).collect();
        for &u in directions {
            if edge_normals.iter().any(|e| e[0] * u[0] + e[1] * u[1] > 1.0 - 1e-9) {
                continue;
            }
            let far = hull.iter().copied().max_by(|&i, &j| {
                let (p, q) = (p2(i), p2(j));
                (u[0] * p[0] + u[1] * p[1]).total_cmp(&(u[0] * q[0] + u[1] * q[1]))
            });
            if let Some(v) = far {
                out.push(corner(v, u, "corner"));
            }
        }
    }
    out
}

// ---------------------------------------------------------------------------------------------
// The check

/// Check every structure about every axis; `solutions` are the method passes (the horizontal
/// loads of each are checked, the worst kept), `structure_plates` from [`structures`].
pub fn stability(model: &Model, solutions: &[Solution], structure_plates: &[Vec<u32>]) -> Stability {
    let scene = model.scene;
    let settings = &scene.stability;
    let primary = &solutions[0];
    let permanent = primary.items.iter().filter(|i| i.case == Case::G).fold(Resultant::default(), |r, i| r.plus(&i.applied));
    let p = permanent.down();
    // Downward P at (x, y) has moment (−yP, xP, 0) about the origin.
    let cog = (p > 0.0).then(|| (permanent.moment[1] / p, -permanent.moment[0] / p));
    let mut out = Stability { permanent_kn: p, centre_of_gravity: cog, target_factor: settings.target_factor, equilibrium: settings.equilibrium, structures: Vec::new(), refused: None };
    let plates = &primary.plates;
    let n_structures = structure_plates.len();
    let mut structure_of = vec![0u32; plates.len()];
    for (s, list) in structure_plates.iter().enumerate() {
        for &pl in list {
            structure_of[pl as usize] = s as u32;
        }
    }
    let parts = match parts_of(model, primary, &structure_of) {
        Ok(p) => p,
        Err(reason) => {
            out.refused = Some(reason);
            return out;
        }
    };
    let mut groups_of: Vec<Vec<&Group>> = vec![Vec::new(); n_structures];
    for g in &parts.groups {
        groups_of[g.structure].push(g);
    }
    // Horizontal items on each structure, per method pass: the applied resultant when there is
    // one structure, else the load its own plates take (each structure balances on its own).
    let horizontal: Vec<Vec<Vec<Resultant>>> = solutions
        .iter()
        .map(|sol| {
            sol.items
                .iter()
                .map(|item| {
                    if item.direction.is_none() {
                        return Vec::new();
                    }
                    if n_structures == 1 {
                        return vec![item.applied];
                    }
                    let mut per = vec![Resultant::default(); n_structures];
                    for &(pl, v) in &item.vertical {
                        per[structure_of[pl as usize] as usize].add(sol.plates[pl as usize], [0.0, 0.0, -v]);
                    }
                    for &(pl, [sx, sy]) in &item.shear {
                        per[structure_of[pl as usize] as usize].add(sol.plates[pl as usize], [-sx, -sy, 0.0]);
                    }
                    per
                })
                .collect()
        })
        .collect();
    let favourable = crate::check::permanent::favourable_items(scene, primary);
    // Every working level counts in full here (the working-scaffold rule is not used for
    // overturning, which is the more cautious).
    // Per method pass: a pass may hold other horizontal items than the primary one (a notional
    // load follows the vertical load the pass carries), so each is sorted on its own.
    let actions: Vec<VariableActions> = solutions.iter().map(|s| VariableActions::of(&s.items, crate::scene::model::WorkingLevels::AllAtOnce)).collect();
    let plate_id = |i: u32| scene.posts[i as usize].id.clone();
    let kentledge_at: Vec<usize> = settings.kentledge_plates.iter().filter_map(|id| scene.posts.iter().position(|p| p.id == *id)).collect();
    let pts: Vec<[f64; 2]> = plates.iter().map(|p| [p[0], p[1]]).collect();

    for (s, posts) in structure_plates.iter().enumerate() {
        // Its base plates: the posts that have one.
        let list: Vec<u32> = posts.iter().copied().filter(|&p| primary.is_plate[p as usize]).collect();
        let list = &list;
        let hull = convex_hull(&pts, list);
        let groups = &groups_of[s];
        // Directions to tip in besides the edges: each horizontal load's, and towards each
        // cantilevered part beyond a corner of the hull.
        let mut directions: Vec<[f64; 2]> = Vec::new();
        let mut add_direction = |u: [f64; 2]| {
            let len = u[0].hypot(u[1]);
            if len > 1e-12 {
                directions.push([u[0] / len, u[1] / len]);
            }
        };
        for (i, item) in primary.items.iter().enumerate() {
            if let Some(d) = item.direction {
                let r = &horizontal[0][i][if n_structures == 1 { 0 } else { s }];
                if r.force[0].hypot(r.force[1]) > 0.0 {
                    add_direction(d);
                }
            }
        }
        let corners_of = |part: &Part| -> Vec<[f64; 2]> {
            match part.shape {
                Shape::Point(q) => vec![q],
                Shape::Line(a, b) => vec![a, b],
                Shape::Area(r) => vec![[r[0], r[1]], [r[2], r[1]], [r[2], r[3]], [r[0], r[3]]],
            }
        };
        if hull.len() >= 3 {
            // Beyond a corner: behind both edges that meet there (outside each one's span).
            let h = hull.len();
            let outside_corner = |q: [f64; 2]| -> Option<[f64; 2]> {
                (0..h).find_map(|k| {
                    let v = pts[hull[k] as usize];
                    let prev = pts[hull[(k + h - 1) % h] as usize];
                    let next = pts[hull[(k + 1) % h] as usize];
                    let along_next = (q[0] - v[0]) * (next[0] - v[0]) + (q[1] - v[1]) * (next[1] - v[1]);
                    let along_prev = (q[0] - v[0]) * (prev[0] - v[0]) + (q[1] - v[1]) * (prev[1] - v[1]);
                    (along_next < 0.0 && along_prev < 0.0).then_some([q[0] - v[0], q[1] - v[1]])
                })
            };
            // A hull that is its own bounding box (a rectangular grid): only items reaching
            // beyond the box can lie beyond a corner.
            let hb = hull.iter().fold([f64::INFINITY, f64::INFINITY, f64::NEG_INFINITY, f64::NEG_INFINITY], |b, &i| {
                let q = pts[i as usize];
                [b[0].min(q[0]), b[1].min(q[1]), b[2].max(q[0]), b[3].max(q[1])]
            });
            let is_box = h == 4
                && hull.iter().all(|&i| {
                    let q = pts[i as usize];
                    ((q[0] - hb[0]).abs() < ON_AXIS_M || (q[0] - hb[2]).abs() < ON_AXIS_M) && ((q[1] - hb[1]).abs() < ON_AXIS_M || (q[1] - hb[3]).abs() < ON_AXIS_M)
                });
            for g in groups {
                let b = g.bounds;
                if is_box && b[0] >= hb[0] && b[1] >= hb[1] && b[2] <= hb[2] && b[3] <= hb[3] {
                    continue;
                }
                for part in &parts.parts[g.range.clone()] {
                    for q in corners_of(part) {
                        if let Some(u) = outside_corner(q).filter(|u| u[0].hypot(u[1]) > FARTHEST_TOLERANCE_M) {
                            add_direction(u);
                        }
                    }
                }
            }
        } else if hull.len() == 1 {
            let v = pts[hull[0] as usize];
            for g in groups {
                for part in &parts.parts[g.range.clone()] {
                    for q in corners_of(part) {
                        if (q[0] - v[0]).hypot(q[1] - v[1]) > FARTHEST_TOLERANCE_M {
                            add_direction([q[0] - v[0], q[1] - v[1]]);
                        }
                    }
                }
            }
        }
        // One axis per distinct direction, in a fixed order (by angle), whatever the order of
        // the loads: the result must not depend on it.
        directions.sort_by(|a, b| a[1].atan2(a[0]).total_cmp(&b[1].atan2(b[0])));
        directions.dedup_by(|a, b| (a[0] - b[0]).abs() < DIRECTION_SAME && (a[1] - b[1]).abs() < DIRECTION_SAME);
        let axes_def = axes_of(&hull, plates, &plate_id, &directions);
        let permanent_kn: f64 = groups.iter().filter(|g| primary.items[g.item].case == Case::G).map(|g| g.sums[0]).sum();
        let on_me = |m: usize, i: usize| horizontal[m][i][if n_structures == 1 { 0 } else { s }];
        let axes: Vec<TippingAxis> = axes_def
            .iter()
            .map(|ax| {
                let mut t = evaluate(ax, &parts, groups, solutions, &actions, &favourable, &on_me, settings);
                if !t.passes() {
                    t.kentledge = Some(kentledge_need(ax, &t, list, plates, &kentledge_at, &plate_id, settings));
                }
                t
            })
            .collect();
        let target = settings.target_factor;
        let governing = (0..axes.len()).filter(|&k| axes[k].factor.is_some() || axes[k].equ_utilisation.is_some()).max_by(|&a, &b| axes[a].utilisation(target).total_cmp(&axes[b].utilisation(target)));
        let first = list.first().map_or_else(String::new, |&i| plate_id(i));
        out.structures.push(Structure {
            label: if n_structures == 1 { format!("the structure ({} plates)", list.len()) } else { format!("structure {} ({} plates from {first})", s + 1, list.len()) },
            plate_count: list.len(),
            hull: hull.iter().map(|&i| plate_id(i)).collect(),
            permanent_kn,
            axes,
            governing,
            plates: list.clone(),
        });
    }
    out
}

/// Both forms about one axis.
#[allow(clippy::too_many_arguments)]
fn evaluate(
    ax: &AxisDef,
    parts: &Parts,
    groups: &[&Group],
    solutions: &[Solution],
    actions: &[VariableActions],
    favourable: &[Option<bool>],
    horizontal_on: &dyn Fn(usize, usize) -> Resultant,
    settings: &crate::scene::model::StabilitySettings,
) -> TippingAxis {
    let f = settings.equilibrium;
    let primary = &solutions[0];
    let (mut g_stb, mut g_dst) = (0.0, 0.0);
    let (mut v_dst, mut v_dst_equ) = (0.0, 0.0);
    let plan = [ax.a[0], ax.a[1]];
    for g in groups {
        let item = &primary.items[g.item];
        // The whole item inside the axis: it only restores (or, pulling up, only overturns).
        let b = g.bounds;
        let reach = [[b[0], b[1]], [b[2], b[1]], [b[2], b[3]], [b[0], b[3]]].iter().map(|&q| ax.distance(q)).fold(f64::NEG_INFINITY, f64::max);
        let (beyond, inside) = if reach <= ON_AXIS_M {
            let net = ax.n[0] * (g.sums[1] - g.sums[0] * plan[0]) + ax.n[1] * (g.sums[2] - g.sums[0] * plan[1]);
            (0.0, net)
        } else {
            parts.parts[g.range.clone()].iter().fold((0.0, 0.0), |(o, i), part| {
                let (a, b) = part.tipping(plan, ax.n);
                (o + a, i + b)
            })
        };
        // Each side's moment: positive overturns, negative restores.
        let dst = beyond.max(0.0) + inside.max(0.0);
        let stb = -(beyond.min(0.0) + inside.min(0.0));
        match (item.case, favourable[g.item]) {
            (Case::G, Some(reliable)) => {
                g_dst += dst;
                if reliable {
                    g_stb += stb;
                }
            }
            _ => {
                // Variable: present only where it overturns; an arranged load with the cells that
                // overturn, anything else whole.
                let v = if g.cellwise {
                    parts.parts[g.range.clone()]
                        .iter()
                        .map(|part| {
                            let (a, b) = part.tipping(plan, ax.n);
                            (a + b).max(0.0)
                        })
                        .sum()
                } else {
                    (beyond + inside).max(0.0)
                };
                v_dst += v;
                v_dst_equ += v * f.unfavourable(item.case);
            }
        }
    }
    // Horizontal items: each whole; the worst single direction of the variable ones, over every
    // method pass (their loads may differ with how members share vertical load).
    let (mut h_dst, mut h_dst_equ, mut h_which) = (0.0f64, 0.0f64, None::<String>);
    let (mut hg_dst, mut hg_stb) = (0.0f64, f64::INFINITY);
    for (m, sol) in solutions.iter().enumerate() {
        // Permanent horizontal loads: always there, overturning or restoring.
        let (mut pg_dst, mut pg_stb) = (0.0, 0.0);
        for (i, item) in sol.items.iter().enumerate() {
            if item.case == Case::G && item.direction.is_some() {
                let t = ax.moment(&horizontal_on(m, i));
                if t > 0.0 {
                    pg_dst += t;
                } else {
                    pg_stb -= t;
                }
            }
        }
        hg_dst = hg_dst.max(pg_dst);
        hg_stb = hg_stb.min(pg_stb);
        // Identified forces are independent: each counts wherever it overturns.
        let (mut ident, mut ident_equ, mut ident_ids) = (0.0, 0.0, Vec::new());
        for &i in &actions[m].independent {
            let item = &sol.items[i];
            if item.direction.is_none() {
                continue;
            }
            let t = ax.moment(&horizontal_on(m, i));
            if t > 0.0 {
                ident += t;
                ident_equ += t * f.unfavourable(item.case);
                ident_ids.push(item.id.as_str());
            }
        }
        // Wind and notional directions are alternatives: the worst single one.
        let (mut best, mut best_equ, mut best_words) = (0.0, 0.0, None::<String>);
        for group in &actions[m].by_direction {
            let (mut sum, mut sum_equ) = (0.0, 0.0);
            for &i in group {
                let t = ax.moment(&horizontal_on(m, i)).max(0.0);
                sum += t;
                sum_equ += t * f.unfavourable(sol.items[i].case);
            }
            if sum > best {
                best = sum;
                let ids: Vec<&str> = group.iter().map(|&i| sol.items[i].id.as_str()).collect();
                let dir = sol.items[group[0]].direction.map_or_else(String::new, direction_words);
                best_words = Some(format!("towards {dir}: {}", ids.join(", ")));
            }
            best_equ = f64::max(best_equ, sum_equ);
        }
        if ident + best > h_dst {
            h_dst = ident + best;
            h_which = match (best_words, ident_ids.is_empty()) {
                (Some(w), true) => Some(w),
                (Some(w), false) => Some(format!("{w}; with {}", ident_ids.join(", "))),
                (None, false) => Some(ident_ids.join(", ")),
                (None, true) => None,
            };
        }
        h_dst_equ = h_dst_equ.max(ident_equ + best_equ);
    }
    g_dst += hg_dst;
    g_stb += hg_stb;
    let overturning = g_dst + v_dst + h_dst;
    let scale = (g_stb + overturning).max(1e-9);
    let nothing = overturning <= 1e-9 * scale.max(1.0);
    let factor = (!nothing).then(|| g_stb / overturning);
    let equ_stb = f.g_favourable * g_stb;
    let equ_dst = f.g_unfavourable * g_dst + v_dst_equ + h_dst_equ;
    let equ_nothing = equ_dst <= 1e-9 * scale.max(1.0);
    let equ_utilisation = (!equ_nothing).then(|| if equ_stb > 0.0 { equ_dst / equ_stb } else { f64::INFINITY });
    TippingAxis {
        about: ax.about.clone(),
        towards: direction_words(ax.n),
        normal: ax.n,
        point: ax.a,
        permanent_stabilising_knm: g_stb,
        permanent_destabilising_knm: g_dst,
        imposed_destabilising_knm: v_dst,
        horizontal_destabilising_knm: h_dst,
        horizontal_loads: h_which,
        meets_target: factor.is_none_or(|f| f >= settings.target_factor * (1.0 - 1e-9)),
        factor,
        equ_stabilising_knm: equ_stb,
        equ_destabilising_knm: equ_dst,
        equ_ok: equ_utilisation.is_none_or(|u| u <= 1.0 + 1e-9),
        equ_utilisation,
        kentledge: None,
    }
}

/// Kentledge that brings an axis to both targets, at the planner's plates (those of this
/// structure) or else over the plates farthest inside the axis.
fn kentledge_need(ax: &AxisDef, t: &TippingAxis, plates_in: &[u32], plates: &[[f64; 3]], given: &[usize], plate_id: &dyn Fn(u32) -> String, settings: &crate::scene::model::StabilitySettings) -> KentledgeNeed {
    let lever = |i: u32| -ax.distance([plates[i as usize][0], plates[i as usize][1]]);
    let mine: Vec<u32> = given.iter().map(|&p| p as u32).filter(|p| plates_in.contains(p)).collect();
    let (at, planned) = if mine.is_empty() {
        let far = plates_in.iter().map(|&i| lever(i)).fold(f64::NEG_INFINITY, f64::max);
        (plates_in.iter().copied().filter(|&i| lever(i) >= far - FARTHEST_TOLERANCE_M).collect::<Vec<u32>>(), false)
    } else {
        (mine, true)
    };
    let lever_m = if at.is_empty() { 0.0 } else { at.iter().map(|&i| lever(i)).sum::<f64>() / at.len() as f64 };
    let ids: Vec<String> = at.iter().map(|&i| plate_id(i)).collect();
    if lever_m <= FARTHEST_TOLERANCE_M {
        let cannot = if planned {
            format!("the kentledge plates given ({}) do not lie inside {}: kentledge there cannot restore it", ids.join(", "), t.about)
        } else {
            format!("every plate lies on {}: nothing can restore tipping about it; widen the base (plates off that line) or tie the structure to something that stands", t.about)
        };
        return KentledgeNeed { plates: ids, lever_m, for_factor_kn: None, for_equ_kn: None, needed_kn: None, cannot: Some(cannot) };
    }
    let overturning = t.permanent_destabilising_knm + t.imposed_destabilising_knm + t.horizontal_destabilising_knm;
    let for_factor = (settings.target_factor * overturning - t.permanent_stabilising_knm).max(0.0) / lever_m;
    let gf = settings.equilibrium.g_favourable;
    let for_equ = Some((t.equ_destabilising_knm / gf - t.permanent_stabilising_knm).max(0.0) / lever_m).filter(|k| k.is_finite());
    let (needed, cannot) = match for_equ {
        Some(e) if for_factor.is_finite() => (Some(for_factor.max(e)), None),
        None if t.equ_ok && for_factor.is_finite() => (Some(for_factor), None),
        _ => (None, Some("kentledge cannot reach the targets: the factor on stabilising permanent load is (nearly) 0 or the moments are out of range".to_owned())),
    };
    KentledgeNeed { plates: ids, lever_m, for_factor_kn: Some(for_factor).filter(|k| k.is_finite()), for_equ_kn: for_equ, needed_kn: needed, cannot }
}

/// Hold-down a lifting plate needs.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct HoldDown {
    /// Combination (index) that needs the most.
    pub combination: usize,
    /// Tension an anchor must resist there, kN (the uplift in that combination, as factored).
    pub anchor_kn: f64,
    /// Secured kentledge on the plate that would do instead, kN (the uplift ÷ the combination's
    /// favourable permanent factor); `None` if that factor is 0.
    pub kentledge_kn: Option<f64>,
}

/// Hold-down for one plate from its minimum loads, over the combinations that check uplift.
pub fn hold_down(combinations: &[crate::scene::combination::Combination], mins: impl Iterator<Item = f64>) -> Option<HoldDown> {
    let mut best: Option<HoldDown> = None;
    for ((c, comb), min) in combinations.iter().enumerate().zip(mins) {
        if !comb.checks_uplift || min >= -crate::check::plates::UPLIFT_TOLERANCE_KN {
            continue;
        }
        let gf = comb.factors.g_favourable;
        let h = HoldDown { combination: c, anchor_kn: -min, kentledge_kn: (gf > 0.0).then(|| -min / gf) };
        let more = |h: &HoldDown| h.kentledge_kn.unwrap_or(f64::INFINITY).max(h.anchor_kn);
        if best.as_ref().is_none_or(|b| more(&h) > more(b)) {
            best = Some(h);
        }
    }
    best
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rectangle_split_about_a_skew_line() {
        // statics, by hand: a unit square [0,1]² of 1 kN, axis x + y = 1 (normal (1,1)/√2):
        // the triangle beyond has area ½, centroid (2/3, 2/3), distance (4/3 − 1)/√2 = 0.2357;
        // beyond: 0.5 × 0.2357 = 0.11785; whole: d(centre) = 0 → inside −0.11785.
        let part = Part { shape: Shape::Area([0.0, 0.0, 1.0, 1.0]), p: 1.0 };
        let s = std::f64::consts::FRAC_1_SQRT_2;
        let (o, i) = part.tipping([1.0, 0.0], [s, s]);
        assert!((o - 0.5 * (1.0 / 3.0) * s).abs() < 1e-12, "{o}");
        assert!((i + o).abs() < 1e-12);
    }

    #[test]
    fn line_split_where_it_crosses() {
        // statics, by hand: 4 kN along x from −1 to 3, axis x = 0 tipping towards −x:
        // beyond 1 kN at 0.5 m → 0.5; inside 3 kN at 1.5 m → −4.5.
        let part = Part { shape: Shape::Line([-1.0, 0.0], [3.0, 0.0]), p: 4.0 };
        let (o, i) = part.tipping([0.0, 0.0], [-1.0, 0.0]);
        assert!((o - 0.5).abs() < 1e-12 && (i + 4.5).abs() < 1e-12, "{o} {i}");
    }

    #[test]
    fn hull_drops_inner_and_collinear_points() {
        // common practice, no source: a 3 × 3 grid has the four corners as its hull.
        let pts: Vec<[f64; 2]> = (0..9).map(|k| [(k % 3) as f64, (k / 3) as f64]).collect();
        let idx: Vec<u32> = (0..9).collect();
        let h = convex_hull(&pts, &idx);
        assert_eq!(h.len(), 4, "{h:?}");
        let line: Vec<[f64; 2]> = (0..4).map(|k| [k as f64, 2.0 * k as f64]).collect();
        assert_eq!(convex_hull(&line, &[0, 1, 2, 3]), vec![0, 3]);
    }

    #[test]
    fn dropping_inner_points_first_keeps_the_hull() {
        // common practice, no source: the hull of a point set is the hull of the points outside
        // any polygon of its own points (Akl–Toussaint); checked against the plain monotone chain.
        let mut seed = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed % 10_000) as f64 / 100.0
        };
        let random: Vec<[f64; 2]> = (0..800).map(|_| [next(), next()]).collect();
        let t = 0.3f64;
        let grid: Vec<[f64; 2]> = (0..400).map(|k| ((k % 20) as f64 * 1.5, (k / 20) as f64 * 1.2)).map(|(x, y)| [x * t.cos() - y * t.sin(), x * t.sin() + y * t.cos()]).collect();
        for pts in [random, grid] {
            let idx: Vec<u32> = (0..pts.len() as u32).collect();
            let mut fast = convex_hull(&pts, &idx);
            let mut plain = monotone_chain(&pts, &mut idx.clone());
            assert!(fast.len() >= 3);
            fast.sort_unstable();
            plain.sort_unstable();
            assert_eq!(fast, plain);
        }
    }

    #[test]
    fn direction_names() {
        // common practice, no source
        assert_eq!(direction_words([0.0, -1.0]), "-y");
        assert_eq!(direction_words([1.0, 1.0]), "45.0°");
    }
}
