//! What the braces make of a structure, for horizontal load.
//!
//! Every brace is classified ([`BraceRole`]):
//! - a **vertical brace** rises between two posts of one line of posts along x or y: it is a
//!   diagonal of the vertical plane through that line, over the one lift it spans;
//! - a **plan brace** lies level across one bay framed at its level by bearers, ledgers or
//!   transoms: the bay becomes rigid in plan, part of that level's diaphragm;
//! - a level tube along a ledger is a **ledger**: it braces nothing (a warning says so);
//! - anything else is refused, with the reason.
//!
//! Vertical braces on one line make a **braced plane** ([`Plane`]): a pin-jointed truss whose
//! nodes are the levels where its braces end, solved lift by lift down to the ground. A plane holds
//! its posts in its own direction at each level it is braced to from the ground; bracing above a
//! lift with no brace is not counted.
//!
//! Bays made rigid by plan braces, and decks declared diaphragms, make **diaphragms**
//! ([`Diaphragm`]): two rigid parts sharing two or more posts are one. Only these levels share
//! load between braced planes; elsewhere a horizontal load goes only to the planes it is applied in.
//! A ledger or transom joined to a diaphragm carries load along its own line into it.
//!
//! For every post and plan axis the result lists the levels at which the post is held and by
//! what ([`Hold`]); the solver ([`crate::solve::braced`]) carries horizontal loads along these.
//! Plans are assumed laid out along x and y: braced planes run along one of the two axes.

use crate::format::num;
use rustc_hash::FxHashMap as HashMap;
use crate::scene::model::{ElementKind, Scene};
use crate::scene::standing::StandsOn;
use crate::scene::validate::{Axis, BearerLine, Problem, GEOMETRY_TOLERANCE_M, MIN_SPAN_M};

const TOL: f64 = GEOMETRY_TOLERANCE_M;

/// What one brace of the scene is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BraceRole {
    /// A diagonal of braced plane `plane`, in lift `lift` (0 = from the ground).
    Vertical {
        /// Plane index.
        plane: u32,
        /// Lift index in the plane.
        lift: u32,
    },
    /// A plan brace, part of diaphragm `diaphragm`.
    Plan {
        /// Diaphragm index.
        diaphragm: u32,
    },
    /// A level tube along bearer `bearer`: a ledger, not a brace.
    Ledger {
        /// Bearer index.
        bearer: u32,
    },
    /// Refused (the scene is then invalid).
    Refused,
}

/// One diagonal of a braced plane.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Diagonal {
    /// Brace index in the scene.
    pub brace: u32,
    /// Post at its lower end.
    pub lower: u32,
    /// Post at its upper end.
    pub upper: u32,
    /// Level of the lower end, m.
    pub lower_level: f64,
    /// Level of the upper end, m.
    pub upper_level: f64,
    /// Signed plan distance from the lower to the upper end along the plane, m.
    pub run: f64,
    /// Share of the lift's shear this diagonal takes: its lateral stiffness b²/d³ over the sum
    /// of its lift's (equal tube sections; post shortening neglected).
    pub share: f64,
}

impl Diagonal {
    /// Rise from the lower to the upper end, m.
    pub fn rise(&self) -> f64 {
        self.upper_level - self.lower_level
    }
}

/// A vertical plane along a line of posts, braced by the diagonals drawn in it.
#[derive(Debug, Clone, PartialEq)]
pub struct Plane {
    /// Direction of the line: the plane resists forces along this axis.
    pub axis: Axis,
    /// The other plan coordinate of the line (y for a plane along x), m.
    pub coord: f64,
    /// Posts on the line, in order along it.
    pub posts: Vec<u32>,
    /// Position of each post along the line, m.
    pub along: Vec<f64>,
    /// Levels where its braces end above the ground (its nodes), ascending, m.
    pub levels: Vec<f64>,
    /// Diagonals of each lift: `lifts[k]` runs up to `levels[k]`, from `levels[k − 1]` or the ground.
    pub lifts: Vec<Vec<Diagonal>>,
    /// Levels `levels[..braced_to]` are braced all the way down to the ground.
    pub braced_to: usize,
    /// For each braced level, the posts the plane holds there: those joined by a ledger along
    /// the plane to the braces that meet the level.
    pub holding: Vec<Vec<u32>>,
    /// Why the bracing above `levels[braced_to]` (if any) is not counted.
    pub cut: Option<String>,
}

impl Plane {
    /// Name for outputs, e.g. `plane along x at y = 0.000 m (A1–G1)`.
    pub fn name(&self, scene: &Scene) -> String {
        let (a, c) = match self.axis {
            Axis::X => ("x", "y"),
            Axis::Y => ("y", "x"),
        };
        let first = self.posts.first().map_or("?", |&p| scene.posts[p as usize].id.as_str());
        let last = self.posts.last().map_or("?", |&p| scene.posts[p as usize].id.as_str());
        format!("plane along {a} at {c} = {:.3} m ({first}–{last})", num(self.coord))
    }
    /// Level below lift `k` (the ground: `None`).
    pub fn lift_bottom(&self, k: usize) -> Option<f64> {
        k.checked_sub(1).map(|j| self.levels[j])
    }
}

/// The bays and decks of one level that act together as one body stiff in plan.
#[derive(Debug, Clone, PartialEq)]
pub struct Diaphragm {
    /// Level, m.
    pub level: f64,
    /// Posts it joins, ascending.
    pub posts: Vec<u32>,
    /// Plan braces in it (brace indices).
    pub plan_braces: Vec<u32>,
    /// Decks declared diaphragms in it (deck indices).
    pub decks: Vec<u32>,
    /// Plan bounding box of its posts and decks: (x min, x max), (y min, y max), m.
    pub bounds: ((f64, f64), (f64, f64)),
    /// Braced planes joined to it, with the index of this level among each plane's levels.
    pub planes: Vec<(u32, u32)>,
}

impl Diaphragm {
    /// Name for outputs, e.g. `diaphragm at 2.000 m (plan braces PB1, PB2)`.
    pub fn name(&self, scene: &Scene) -> String {
        let mut parts = Vec::new();
        if !self.plan_braces.is_empty() {
            parts.push(format!("plan braces {}", list_ids(self.plan_braces.iter().map(|&b| scene.braces[b as usize].id.as_str()), 4)));
        }
        if !self.decks.is_empty() {
            parts.push(format!("deck {}", list_ids(self.decks.iter().map(|&d| scene.decks[d as usize].id.as_str()), 4)));
        }
        format!("diaphragm at {:.3} m ({})", num(self.level), parts.join("; "))
    }
}

/// What holds a post horizontally at a level.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Holder {
    /// Braced plane `plane` at its level `level` (index into [`Plane::levels`]).
    Plane {
        /// Plane index.
        plane: u32,
        /// Level index in the plane.
        level: u32,
    },
    /// Diaphragm `diaphragm`, directly or through a ledger or transom joined to it.
    Diaphragm(u32),
}

/// A level at which a post is held along one axis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Hold {
    /// Level, m.
    pub level: f64,
    /// What holds it.
    pub by: Holder,
}

/// Where a horizontal load is applied, resolved once.
#[derive(Debug, Clone, PartialEq)]
pub enum Placement {
    /// A point force on a post.
    Post(u32),
    /// A point force on a diaphragm, away from posts.
    Diaphragm(u32),
    /// A face carried by the posts along it: (post, distance along the face from its start),
    /// in order, and the face length.
    Face {
        /// Posts along the face with their distances from its start, m.
        posts: Vec<(u32, f64)>,
        /// Face length in plan, m.
        length: f64,
    },
    /// Nothing to place (vertical loads, notional loads).
    None,
}

/// Everything the bracing makes of a scene.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Bracing {
    /// Role of each brace, in scene order.
    pub roles: Vec<BraceRole>,
    /// Braced planes.
    pub planes: Vec<Plane>,
    /// Diaphragms.
    pub diaphragms: Vec<Diaphragm>,
    /// Levels at which each standard is held along each axis, ascending: the holds of the
    /// standard whose lowest post is `p`, along axis `a` (0 = x), are
    /// `hold_list[hold_first[2p + a]..hold_first[2p + a + 1]]` (see [`Bracing::holds`]). A
    /// standard is a post with the posts spliced onto it.
    pub hold_first: Vec<u32>,
    /// See [`Bracing::hold_first`].
    pub hold_list: Vec<Hold>,
    /// Per post: the lowest post of its standard, and whether that one stands on a base plate
    /// (its base is then the ground: pinned, it takes base shear).
    pub standard: Vec<(u32, bool)>,
    /// Per post: the levels its standard spans, from the base of its lowest post to the top of
    /// its highest, m.
    pub standard_span: Vec<(f64, f64)>,
    /// Per load: where a horizontal load is applied.
    pub placements: Vec<Placement>,
}

impl Bracing {
    /// Levels at which post `post` (its standard) is held along `axis` (0 = x, 1 = y), ascending.
    pub fn holds(&self, post: usize, axis: usize) -> &[Hold] {
        let k = 2 * self.standard[post].0 as usize + axis;
        &self.hold_list[self.hold_first[k] as usize..self.hold_first[k + 1] as usize]
    }

    /// Whether any braced plane runs along the axis.
    pub fn braced_along(&self, axis: Axis) -> bool {
        self.planes.iter().any(|p| p.axis == axis && p.braced_to > 0)
    }
    /// Braced planes passing through a post, whatever their state.
    pub fn planes_through(&self, post: u32) -> impl Iterator<Item = (usize, &Plane)> {
        self.planes.iter().enumerate().filter(move |(_, p)| p.posts.contains(&post))
    }
    /// One line per diaphragm and a closing note, for every output: where horizontal load is
    /// shared between braced planes, and that it is nowhere else.
    pub fn diaphragm_lines(&self, scene: &Scene) -> Vec<String> {
        let mut out: Vec<String> = self
            .diaphragms
            .iter()
            .map(|d| {
                let planes: Vec<String> = d.planes.iter().map(|&(p, _)| self.planes[p as usize].name(scene)).collect();
                let joined = if planes.is_empty() { "no braced plane joined".to_owned() } else { format!("joined to {}", planes.join(", ")) };
                format!("{}: {joined}", d.name(scene))
            })
            .collect();
        out.push(if self.diaphragms.is_empty() {
            "no diaphragm: no level has plan bracing or a deck declared a diaphragm, so every horizontal load goes only to the braced planes it is applied in".to_owned()
        } else {
            "no other level is a diaphragm: horizontal load there goes only to the braced planes it is applied in".to_owned()
        });
        out
    }
}

/// Ids joined with commas, at most `n` of them and a count of the rest.
pub fn list_ids<'a>(ids: impl Iterator<Item = &'a str>, n: usize) -> String {
    let all: Vec<&str> = ids.collect();
    let mut s = all.iter().take(n).copied().collect::<Vec<_>>().join(", ");
    if all.len() > n {
        s.push_str(&format!(" and {} more", all.len() - n));
    }
    s
}

/// Plan coordinate of a post along an axis, and across it.
fn split(axis: Axis, x: f64, y: f64) -> (f64, f64) {
    match axis {
        Axis::X => (x, y),
        Axis::Y => (y, x),
    }
}

/// Axis a straight member between two plan points runs along, within the geometry tolerance.
fn axis_between(a: (f64, f64), b: (f64, f64)) -> Option<Axis> {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    if dx.hypot(dy) < MIN_SPAN_M {
        None
    } else if dy.abs() <= TOL {
        Some(Axis::X)
    } else if dx.abs() <= TOL {
        Some(Axis::Y)
    } else {
        None
    }
}

/// Whether all posts of a line are in one component.
fn roots_len_one(comp: &[u32]) -> bool {
    comp.windows(2).all(|w| w[0] == w[1])
}

/// Values clustered within the tolerance: sorted representatives.
#[derive(Debug, Default)]
struct Levels {
    values: Vec<f64>,
}

impl Levels {
    fn of(mut v: Vec<f64>) -> Self {
        v.retain(|z| z.is_finite());
        v.sort_unstable_by(f64::total_cmp);
        let mut values: Vec<f64> = Vec::new();
        for z in v {
            match values.last() {
                Some(&last) if z - last <= TOL => {}
                _ => values.push(z),
            }
        }
        Levels { values }
    }
    /// Index of the cluster within the tolerance of `z`.
    fn find(&self, z: f64) -> Option<usize> {
        find_level(&self.values, z)
    }
}

/// Index of the value of an ascending list within the tolerance of `z`.
pub fn find_level(values: &[f64], z: f64) -> Option<usize> {
    let i = values.partition_point(|&v| v < z - TOL);
    (i < values.len() && (values[i] - z).abs() <= TOL).then_some(i)
}

/// Union-find over `0..n`.
struct Sets {
    parent: Vec<u32>,
}

impl Sets {
    fn new(n: usize) -> Self {
        Sets { parent: (0..n as u32).collect() }
    }
    fn root(&mut self, mut i: u32) -> u32 {
        while self.parent[i as usize] != i {
            let g = self.parent[self.parent[i as usize] as usize];
            self.parent[i as usize] = g;
            i = g;
        }
        i
    }
    fn join(&mut self, a: u32, b: u32) -> bool {
        let (ra, rb) = (self.root(a), self.root(b));
        if ra != rb {
            self.parent[ra as usize] = rb;
        }
        ra != rb
    }
}

/// A rigid part of a level in plan: a plan-braced bay or a diaphragm deck.
struct Body {
    level: usize,
    posts: Vec<u32>,
    brace: Option<u32>,
    deck: Option<u32>,
}

/// Classify the braces of a scene and work out its braced planes, diaphragms and holds.
///
/// `ends` are the posts at the two ends of each brace (`None` where an id did not resolve,
/// already reported); `bearers` are the resolved bearer lines (`None` for invalid ones, already
/// reported); `stands_on` what each post stands on, if that could be worked out. Problems that
/// make the scene invalid go to `problems`, findings worth a look to `warnings`.
pub fn analyse_bracing(
    scene: &Scene,
    ends: &[Option<(usize, usize)>],
    bearers: &[Option<BearerLine>],
    stands_on: Option<&[StandsOn]>,
    problems: &mut Vec<Problem>,
    warnings: &mut Vec<Problem>,
) -> Bracing {
    let n_posts = scene.posts.len();
    // Standards: posts spliced onto each other, down to the lowest one.
    let standard: Vec<(u32, bool)> = (0..n_posts)
        .map(|p| {
            let Some(on) = stands_on else { return (p as u32, true) };
            let mut q = p;
            for _ in 0..n_posts {
                match on[q] {
                    StandsOn::Post(r) => q = r,
                    s => return (q as u32, s.is_plate()),
                }
            }
            (q as u32, false)
        })
        .collect();
    let any_splice = standard.iter().enumerate().any(|(p, s)| s.0 as usize != p);
    let mut top_of: Vec<f64> = scene.posts.iter().map(|p| p.top_level).collect();
    for (p, &(low, _)) in standard.iter().enumerate() {
        top_of[low as usize] = top_of[low as usize].max(scene.posts[p].top_level);
    }
    let standard_span: Vec<(f64, f64)> = standard.iter().map(|&(low, _)| (scene.posts[low as usize].base_level, top_of[low as usize])).collect();
    let err = |problems: &mut Vec<Problem>, id: &str, message: String| problems.push(Problem { kind: ElementKind::Brace, id: id.to_owned(), message });
    let pos = |p: usize| (scene.posts[p].x, scene.posts[p].y);
    let post_ok = |p: usize| {
        let q = &scene.posts[p];
        q.x.is_finite() && q.y.is_finite() && q.base_level.is_finite() && q.top_level.is_finite()
    };

    // Bearer levels, and each post's neighbours along bearers: (level, other post, bearer), as
    // one list sliced per post.
    let levels = Levels::of(scene.bearers.iter().map(|b| b.level).collect());
    let bearer_level: Vec<Option<u32>> = scene.bearers.iter().map(|b| levels.find(b.level).map(|l| l as u32)).collect();
    let mut adj_first = vec![0u32; n_posts + 1];
    for (bi, line) in bearers.iter().enumerate() {
        if let (Some(line), Some(_)) = (line, bearer_level[bi]) {
            for w in line.posts.windows(2) {
                adj_first[w[0] + 1] += 1;
                adj_first[w[1] + 1] += 1;
            }
        }
    }
    for p in 0..n_posts {
        adj_first[p + 1] += adj_first[p];
    }
    let mut adjacent = vec![(0u32, 0u32, 0u32); adj_first[n_posts] as usize];
    let mut fill = adj_first.clone();
    for (bi, line) in bearers.iter().enumerate() {
        if let (Some(line), Some(lv)) = (line, bearer_level[bi]) {
            for w in line.posts.windows(2) {
                for (a, z) in [(w[0], w[1]), (w[1], w[0])] {
                    adjacent[fill[a] as usize] = (lv, z as u32, bi as u32);
                    fill[a] += 1;
                }
            }
        }
    }
    let adjacent_of = |p: usize| &adjacent[adj_first[p] as usize..adj_first[p + 1] as usize];
    let neighbours = |p: usize, lv: u32| adjacent_of(p).iter().filter(move |e| e.0 == lv).map(|e| e.1);

    // Classify every brace.
    let mut roles = vec![BraceRole::Refused; scene.braces.len()];
    struct Vert {
        brace: u32,
        axis: Axis,
        coord: f64,
        lower: (u32, f64),
        upper: (u32, f64),
    }
    let mut verticals: Vec<Vert> = Vec::with_capacity(scene.braces.len());
    let mut bodies: Vec<Body> = Vec::new();
    for (bi, b) in scene.braces.iter().enumerate() {
        let Some(Some((pa, pb))) = ends.get(bi).copied() else { continue };
        if !post_ok(pa) || !post_ok(pb) || !b.from.level.is_finite() || !b.to.level.is_finite() {
            continue;
        }
        let (a, z) = (pos(pa), pos(pb));
        let plan = (z.0 - a.0).hypot(z.1 - a.1);
        if pa == pb || plan < TOL {
            err(problems, &b.id, "joins two points on the same post line: it braces no plan direction".into());
            continue;
        }
        let rise = (b.to.level - b.from.level).abs();
        if rise <= TOL {
            // A level tube: a ledger if it lies along one, a plan brace if it crosses one bay.
            let lv = levels.find(b.from.level).map(|l| l as u32);
            if let Some(&(_, _, bearer)) = lv.and_then(|lv| adjacent_of(pa).iter().find(|e| e.0 == lv && bearers[e.2 as usize].as_ref().is_some_and(|l| l.posts.contains(&pb)))) {
                roles[bi] = BraceRole::Ledger { bearer };
                warnings.push(Problem {
                    kind: ElementKind::Brace,
                    id: b.id.clone(),
                    message: format!("lies level along {} at {:.3} m: it is a ledger, not a brace, and braces nothing", scene.bearers[bearer as usize].id, num(b.from.level)),
                });
                continue;
            }
            // Opposite corners of a bay: two posts joined to both ends by members at this level.
            let mut corners: Vec<u32> = lv.map_or(Vec::new(), |lv| neighbours(pa, lv).filter(|&c| neighbours(pb, lv).any(|d| d == c)).collect());
            corners.sort_unstable();
            corners.dedup();
            match (lv, corners.as_slice()) {
                (Some(lv), &[c, d]) => bodies.push(Body { level: lv as usize, posts: vec![pa as u32, pb as u32, c, d], brace: Some(bi as u32), deck: None }),
                _ => err(
                    problems,
                    &b.id,
                    format!(
                        "lies level at {:.3} m from {} to {}, but neither along a ledger nor across one bay framed by bearers, ledgers or transoms at that level: a plan brace must join opposite corners of such a bay",
                        num(b.from.level), scene.posts[pa].id, scene.posts[pb].id
                    ),
                ),
            }
            continue;
        }
        let Some(axis) = axis_between(a, z) else {
            err(
                problems,
                &b.id,
                format!(
                    "rises from {} to {}, which are not on one line of posts along x or y (Δx {:.3} m, Δy {:.3} m): a brace must rise in the plane of a line of posts along x or y, or lie level across one bay",
                    scene.posts[pa].id,
                    scene.posts[pb].id,
                    num(z.0 - a.0),
                    num(z.1 - a.1)
                ),
            );
            continue;
        };
        let coord = 0.5 * (split(axis, a.0, a.1).1 + split(axis, z.0, z.1).1);
        let (lower, upper) = if b.from.level < b.to.level { ((pa as u32, b.from.level), (pb as u32, b.to.level)) } else { ((pb as u32, b.to.level), (pa as u32, b.from.level)) };
        verticals.push(Vert { brace: bi as u32, axis, coord, lower, upper });
    }

    // Diaphragm decks.
    if scene.decks.iter().any(|d| d.diaphragm) {
        let bearer_ix: HashMap<&str, usize> = scene.bearers.iter().enumerate().map(|(i, b)| (b.id.as_str(), i)).collect();
        for (di, d) in scene.decks.iter().enumerate().filter(|(_, d)| d.diaphragm) {
            let ids: Vec<usize> = d.bearers.iter().filter_map(|id| bearer_ix.get(id.as_str()).copied()).collect();
            if ids.len() != d.bearers.len() || ids.iter().any(|&b| bearers[b].is_none()) {
                continue;
            }
            let lv: Vec<Option<u32>> = ids.iter().map(|&b| bearer_level[b]).collect();
            if lv.iter().any(|l| l.is_none() || *l != lv[0]) {
                problems.push(Problem { kind: ElementKind::Deck, id: d.id.clone(), message: "is declared a diaphragm, but its bearers are not all at one level".into() });
                continue;
            }
            let mut posts: Vec<u32> = ids.iter().flat_map(|&b| bearers[b].as_ref().expect("checked").posts.iter().map(|&p| p as u32)).collect();
            posts.sort_unstable();
            posts.dedup();
            bodies.push(Body { level: lv[0].expect("checked") as usize, posts, brace: None, deck: Some(di as u32) });
        }
    }
    let mut diaphragms = merge_bodies(scene, &levels, bodies, &mut roles);

    // Braced planes: vertical braces grouped by their line, then split into the parts of the
    // line that bearers or braces join (two towers in line are two planes).
    // By axis and line coordinate: keys of 64 bits (axis, coordinate in tolerance steps, index)
    // sort fast; coordinates are within ±1e4 m, so 1e7 steps each way.
    let mut keys: Vec<u64> = verticals
        .iter()
        .enumerate()
        .map(|(k, v)| ((v.axis as u64) << 63) | ((((v.coord / TOL).round() as i64 + (1 << 30)) as u64 & 0xFFFF_FFFF) << 25) | k as u64)
        .collect();
    if verticals.len() < 1 << 25 {
        keys.sort_unstable();
        let mut taken: Vec<Option<Vert>> = std::mem::take(&mut verticals).into_iter().map(Some).collect();
        verticals = keys.iter().map(|&k| taken[(k & 0x1FF_FFFF) as usize].take().expect("each once")).collect();
    } else {
        verticals.sort_unstable_by(|a, b| (a.axis as u8).cmp(&(b.axis as u8)).then(a.coord.total_cmp(&b.coord)));
    }
    struct Line {
        axis: Axis,
        coord: f64,
        braces: std::ops::Range<usize>,
        /// Posts on the line joined to it (brace ends, posts of its bearers), by position along it.
        posts: Vec<(f64, u32)>,
    }
    let mut lines: Vec<Line> = Vec::new();
    let mut i = 0;
    while i < verticals.len() {
        let mut j = i + 1;
        while j < verticals.len() && verticals[j].axis == verticals[i].axis && verticals[j].coord - verticals[j - 1].coord <= TOL {
            j += 1;
        }
        let coord = verticals[i..j].iter().map(|v| v.coord).sum::<f64>() / (j - i) as f64;
        lines.push(Line { axis: verticals[i].axis, coord, braces: i..j, posts: Vec::new() });
        i = j;
    }
    let mut line_keys: Vec<(u8, f64, u32)> = lines.iter().enumerate().map(|(k, l)| (l.axis as u8, l.coord, k as u32)).collect();
    line_keys.sort_unstable_by(|a, b| a.0.cmp(&b.0).then(a.1.total_cmp(&b.1)));
    let find_line = |axis: Axis, coord: f64| -> Option<u32> {
        let start = line_keys.partition_point(|k| (k.0, k.1) < (axis as u8, coord - TOL));
        line_keys.get(start).filter(|k| k.0 == axis as u8 && (k.1 - coord).abs() <= TOL).map(|k| k.2)
    };
    // Bearers along each line, with the line they lie on.
    let line_bearers: Vec<(usize, u32)> = bearers
        .iter()
        .enumerate()
        .filter_map(|(bi, line)| {
            let line = line.as_ref()?;
            if line.posts.len() < 2 {
                return None;
            }
            let (a, z) = (pos(line.posts[0]), pos(*line.posts.last().expect("two")));
            let axis = axis_between(a, z)?;
            Some((bi, find_line(axis, 0.5 * (split(axis, a.0, a.1).1 + split(axis, z.0, z.1).1))?))
        })
        .collect();
    let along_of = |axis: Axis, p: u32| split(axis, scene.posts[p as usize].x, scene.posts[p as usize].y).0;
    // Each post once per line: the last line that listed it, per axis.
    let mut listed: [Vec<u32>; 2] = [vec![u32::MAX; n_posts], vec![u32::MAX; n_posts]];
    let mut add = |lines: &mut Vec<Line>, li: usize, p: u32| {
        let axis = lines[li].axis;
        if listed[axis as usize][p as usize] != li as u32 {
            listed[axis as usize][p as usize] = li as u32;
            lines[li].posts.push((along_of(axis, p), p));
        }
    };
    for li in 0..lines.len() {
        for k in lines[li].braces.clone() {
            let (a, b) = (verticals[k].lower.0, verticals[k].upper.0);
            add(&mut lines, li, a);
            add(&mut lines, li, b);
        }
    }
    for &(bi, li) in &line_bearers {
        for &p in &bearers[bi].as_ref().expect("listed").posts {
            add(&mut lines, li as usize, p as u32);
        }
    }
    if any_splice {
        // The posts spliced onto (or under) a post on the line are on it too.
        let mut above: Vec<Vec<u32>> = vec![Vec::new(); n_posts];
        for (p, &(low, _)) in standard.iter().enumerate() {
            if low as usize != p {
                above[low as usize].push(p as u32);
            }
        }
        for line in &mut lines {
            let axis = line.axis;
            let extra: Vec<(f64, u32)> = line.posts.iter().flat_map(|&(_, p)| {
                let low = standard[p as usize].0;
                std::iter::once(low).chain(above[low as usize].iter().copied())
            }).map(|p| (along_of(axis, p), p)).collect();
            line.posts.extend(extra);
        }
    }
    // Position of each post on the line of each axis it stands on.
    let mut on_line: [Vec<u32>; 2] = [vec![u32::MAX; n_posts], vec![u32::MAX; n_posts]];
    for line in &mut lines {
        if any_splice {
            line.posts.sort_unstable_by_key(|e| e.1);
            line.posts.dedup_by_key(|e| e.1);
        }
        line.posts.sort_unstable_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        for (k, &(_, p)) in line.posts.iter().enumerate() {
            on_line[line.axis as usize][p as usize] = k as u32;
        }
    }
    let mut joined: Vec<Sets> = lines.iter().map(|l| Sets::new(l.posts.len())).collect();
    for &(bi, li) in &line_bearers {
        let axis = lines[li as usize].axis as usize;
        let posts = &bearers[bi].as_ref().expect("listed").posts;
        for w in posts.windows(2) {
            joined[li as usize].join(on_line[axis][w[0]], on_line[axis][w[1]]);
        }
    }
    for (li, line) in lines.iter().enumerate() {
        for v in &verticals[line.braces.clone()] {
            let (a, b) = (on_line[line.axis as usize][v.lower.0 as usize], on_line[line.axis as usize][v.upper.0 as usize]);
            joined[li].join(a, b);
        }
        if any_splice {
            // Posts spliced onto each other are one standard.
            for (k, &(_, p)) in line.posts.iter().enumerate() {
                let l = on_line[line.axis as usize][standard[p as usize].0 as usize];
                if l != u32::MAX {
                    joined[li].join(k as u32, l);
                }
            }
        }
    }
    // Plane of each post on each axis, and its index in the plane.
    let mut plane_of: [Vec<(u32, u32)>; 2] = [vec![(u32::MAX, 0); n_posts], vec![(u32::MAX, 0); n_posts]];
    let mut planes: Vec<Plane> = Vec::new();
    // The ground: the base of a standard's lowest post, on a base plate.
    let ground = |p: u32, z: f64| {
        let (low, plate) = standard[p as usize];
        plate && (z - scene.posts[low as usize].base_level).abs() <= TOL
    };
    for (li, line) in lines.iter().enumerate() {
        let axis = line.axis;
        let group = &verticals[line.braces.clone()];
        let comp: Vec<u32> = (0..line.posts.len() as u32).map(|k| joined[li].root(k)).collect();
        let mut roots: Vec<u32> = group.iter().map(|v| comp[on_line[axis as usize][v.lower.0 as usize] as usize]).collect();
        roots.sort_unstable();
        roots.dedup();
        for root in roots {
            let members: Vec<&Vert> = if roots_len_one(&comp) { group.iter().collect() } else { group.iter().filter(|v| comp[on_line[axis as usize][v.lower.0 as usize] as usize] == root).collect() };
            let posts: Vec<(f64, u32)> = line.posts.iter().zip(&comp).filter(|e| *e.1 == root).map(|e| *e.0).collect();
            let plane_index = planes.len() as u32;
            for (k, &(_, p)) in posts.iter().enumerate() {
                plane_of[axis as usize][p as usize] = (plane_index, k as u32);
            }
            let plane_levels = Levels::of(members.iter().flat_map(|v| [Some(v.upper.1), (!ground(v.lower.0, v.lower.1)).then_some(v.lower.1)]).flatten().collect());
            let mut lifts: Vec<Vec<Diagonal>> = vec![Vec::new(); plane_levels.values.len()];
            for v in members {
                let top = plane_levels.find(v.upper.1).expect("listed");
                let bottom = if ground(v.lower.0, v.lower.1) { None } else { plane_levels.find(v.lower.1) };
                if bottom != top.checked_sub(1) {
                    let inside: Vec<String> = plane_levels.values.iter().filter(|&&z| z > v.lower.1 + TOL && z < v.upper.1 - TOL).map(|&z| format!("{:.3} m", num(z))).collect();
                    let why = if inside.is_empty() {
                        format!("its lower end at {:.3} m on post {} is neither the ground nor a level where other braces of the plane end", num(v.lower.1), scene.posts[v.lower.0 as usize].id)
                    } else {
                        format!("it spans {:.3}–{:.3} m across {}, where other braces of its plane end: split it there", num(v.lower.1), num(v.upper.1), inside.join(", "))
                    };
                    err(problems, &scene.braces[v.brace as usize].id, format!("cannot be a diagonal of its braced plane: {why}"));
                    continue;
                }
                let run = along_of(axis, v.upper.0) - along_of(axis, v.lower.0);
                let rise = v.upper.1 - v.lower.1;
                let d = run.hypot(rise);
                lifts[top].push(Diagonal { brace: v.brace, lower: v.lower.0, upper: v.upper.0, lower_level: v.lower.1, upper_level: v.upper.1, run, share: run * run / (d * d * d) });
                roles[v.brace as usize] = BraceRole::Vertical { plane: plane_index, lift: top as u32 };
            }
            for lift in &mut lifts {
                let total: f64 = lift.iter().map(|d| d.share).sum();
                lift.iter_mut().for_each(|d| d.share /= total);
            }
            planes.push(Plane {
                axis,
                coord: line.coord,
                along: posts.iter().map(|p| p.0).collect(),
                posts: posts.iter().map(|p| p.1).collect(),
                levels: plane_levels.values,
                lifts,
                braced_to: 0,
                holding: Vec::new(),
                cut: None,
            });
        }
    }

    // Chords: for each plane level, posts joined along the line by bearers at that level.
    let mut chords: Vec<Vec<Sets>> = planes.iter().map(|p| p.levels.iter().map(|_| Sets::new(p.posts.len())).collect()).collect();
    for &(bi, li) in &line_bearers {
        let axis = lines[li as usize].axis as usize;
        let line = bearers[bi].as_ref().expect("listed");
        for w in line.posts.windows(2) {
            let ((pa, ka), (pb, kb)) = (plane_of[axis][w[0]], plane_of[axis][w[1]]);
            if pa == u32::MAX || pa != pb {
                continue;
            }
            if let Some(k) = find_level(&planes[pa as usize].levels, scene.bearers[bi].level) {
                chords[pa as usize][k].join(ka, kb);
            }
        }
    }
    // Posts of one standard meet at its splices: one node at every level they both reach.
    if any_splice {
        for (pk, plane) in planes.iter().enumerate() {
            for (k, &z) in plane.levels.iter().enumerate() {
                let mut at: Vec<(u32, u32)> = plane
                    .posts
                    .iter()
                    .enumerate()
                    .filter(|&(_, &p)| {
                        let q = &scene.posts[p as usize];
                        q.base_level <= z + TOL && q.top_level >= z - TOL
                    })
                    .map(|(l, &p)| (standard[p as usize].0, l as u32))
                    .collect();
                at.sort_unstable();
                for w in at.windows(2) {
                    if w[0].0 == w[1].0 {
                        chords[pk][k].join(w[0].1, w[1].1);
                    }
                }
            }
        }
    }
    let local = |plane: &Plane, post: u32| -> Option<u32> {
        let (pk, k) = plane_of[plane.axis as usize][post as usize];
        (pk != u32::MAX && plane.posts.get(k as usize) == Some(&post)).then_some(k)
    };
    for (pk, plane) in planes.iter_mut().enumerate() {
        let mut holding = Vec::new();
        let mut cut = None;
        for k in 0..plane.levels.len() {
            let z = plane.levels[k];
            if plane.lifts[k].is_empty() {
                let below = plane.lift_bottom(k).map_or("the ground".to_owned(), |b| format!("{:.3} m", num(b)));
                cut = Some(format!("it has no brace in the lift from {below} to {:.3} m", num(z)));
                break;
            }
            // Posts where braces meet this level: they must be joined by the chord.
            let mut meet: Vec<u32> = plane.lifts[k].iter().map(|d| d.upper).collect();
            if let Some(next) = plane.lifts.get(k + 1) {
                meet.extend(next.iter().filter(|d| (d.lower_level - z).abs() <= TOL).map(|d| d.lower));
            }
            let sets = &mut chords[pk][k];
            let roots: Vec<(u32, u32)> = meet.iter().filter_map(|&p| local(plane, p)).map(|l| (sets.root(l), l)).collect();
            if let Some(&(r0, l0)) = roots.first() {
                if let Some(&(_, l1)) = roots.iter().find(|r| r.0 != r0) {
                    let (a, b) = (&scene.posts[plane.posts[l0 as usize] as usize].id, &scene.posts[plane.posts[l1 as usize] as usize].id);
                    cut = Some(format!("at {:.3} m its braces meet posts {a} and {b}, which no bearer or ledger along the plane joins at that level", num(z)));
                    break;
                }
                let mut held = Vec::with_capacity(plane.posts.len());
                for l in 0..plane.posts.len() as u32 {
                    if sets.root(l) == r0 {
                        held.push(plane.posts[l as usize]);
                    }
                }
                holding.push(held);
            }
        }
        plane.braced_to = holding.len();
        plane.holding = holding;
        if let (Some(why), true) = (&cut, plane.braced_to < plane.levels.len()) {
            let above: Vec<&str> = plane.lifts[plane.braced_to..].iter().flatten().map(|d| scene.braces[d.brace as usize].id.as_str()).collect();
            let first = above.first().copied().unwrap_or("");
            warnings.push(Problem {
                kind: ElementKind::Brace,
                id: first.to_owned(),
                message: format!("{} {why}: braces {} above are not counted", plane.name(scene), list_ids(above.iter().copied(), 6)),
            });
            plane.cut = Some(why.clone());
        }
    }

    // Holds, keyed by standard and axis: diaphragms first (directly, then through ledgers and
    // transoms along their lines), then braced planes where no diaphragm holds the post.
    let key = |p: usize, axis: usize| 2 * standard[p].0 as usize + axis;
    let mut candidates: Vec<(u32, Hold)> = Vec::new();
    // (post, axis, level index) held by a diaphragm.
    let mut dia_at: HashMap<(u32, u8, u32), u32> = HashMap::default();
    if !diaphragms.is_empty() {
        let mut in_diaphragm: HashMap<(u32, u32), u32> = HashMap::default();
        for (d, dia) in diaphragms.iter().enumerate() {
            let lv = levels.find(dia.level).expect("a diaphragm level is a bearer level") as u32;
            for &p in &dia.posts {
                in_diaphragm.entry((p, lv)).or_insert(d as u32);
                for axis in 0..2u8 {
                    if dia_at.insert((p, axis, lv), d as u32).is_none() {
                        candidates.push((key(p as usize, axis as usize) as u32, Hold { level: dia.level, by: Holder::Diaphragm(d as u32) }));
                    }
                }
            }
        }
        // Runs: bearers along one axis at one level sharing a post act as one line.
        let mut runs = Sets::new(scene.bearers.len());
        let axis_of: Vec<Option<(Axis, u32)>> = bearers
            .iter()
            .enumerate()
            .map(|(bi, l)| {
                let l = l.as_ref()?;
                let axis = if l.posts.len() >= 2 { axis_between(pos(l.posts[0]), pos(*l.posts.last().expect("two")))? } else { return None };
                Some((axis, bearer_level[bi]?))
            })
            .collect();
        for p in 0..n_posts {
            let list = adjacent_of(p);
            for (i, a) in list.iter().enumerate() {
                for b in &list[i + 1..] {
                    if a.2 != b.2 && axis_of[a.2 as usize].is_some() && axis_of[a.2 as usize] == axis_of[b.2 as usize] {
                        runs.join(a.2, b.2);
                    }
                }
            }
        }
        let mut taken: HashMap<u32, u32> = HashMap::default();
        for (bi, l) in bearers.iter().enumerate() {
            let (Some(l), Some((_, lv))) = (l, axis_of[bi]) else { continue };
            for &p in &l.posts {
                if let Some(&d) = in_diaphragm.get(&(p as u32, lv)) {
                    let r = runs.root(bi as u32);
                    taken.entry(r).or_insert(d);
                }
            }
        }
        for (bi, l) in bearers.iter().enumerate() {
            let (Some(l), Some((axis, lv))) = (l, axis_of[bi]) else { continue };
            let Some(&d) = taken.get(&runs.root(bi as u32)) else { continue };
            let z = diaphragms[d as usize].level;
            for &p in &l.posts {
                if dia_at.insert((p as u32, axis as u8, lv), d).is_none() {
                    candidates.push((key(p, axis as usize) as u32, Hold { level: z, by: Holder::Diaphragm(d) }));
                }
            }
        }
    }
    for (pk, plane) in planes.iter().enumerate() {
        for (k, posts) in plane.holding.iter().enumerate() {
            let z = plane.levels[k];
            let lv = if dia_at.is_empty() { None } else { levels.find(z).map(|l| l as u32) };
            let mut joined: Vec<u32> = Vec::new();
            for &p in posts {
                match lv.and_then(|lv| dia_at.get(&(p, plane.axis as u8, lv))) {
                    Some(&d) => joined.push(d),
                    None => candidates.push((key(p as usize, plane.axis as usize) as u32, Hold { level: z, by: Holder::Plane { plane: pk as u32, level: k as u32 } })),
                }
            }
            joined.sort_unstable();
            joined.dedup();
            for d in joined {
                diaphragms[d as usize].planes.push((pk as u32, k as u32));
            }
        }
    }
    // By key (counting sort, stable: a diaphragm before a plane at one level), then by level.
    let mut hold_first = vec![0u32; 2 * n_posts + 1];
    for &(k, _) in &candidates {
        hold_first[k as usize + 1] += 1;
    }
    for i in 0..2 * n_posts {
        hold_first[i + 1] += hold_first[i];
    }
    let mut hold_list = vec![Hold { level: 0.0, by: Holder::Diaphragm(0) }; candidates.len()];
    let mut fill = hold_first.clone();
    for (k, h) in candidates {
        hold_list[fill[k as usize] as usize] = h;
        fill[k as usize] += 1;
    }
    let mut kept: Vec<Hold> = Vec::with_capacity(hold_list.len());
    let mut first = vec![0u32; 2 * n_posts + 1];
    for k in 0..2 * n_posts {
        first[k] = kept.len() as u32;
        let seg = &mut hold_list[hold_first[k] as usize..hold_first[k + 1] as usize];
        if !seg.is_sorted_by(|a, b| a.level <= b.level) {
            seg.sort_by(|a, b| a.level.total_cmp(&b.level));
        }
        for h in seg.iter() {
            match kept[first[k] as usize..].last() {
                Some(last) if (h.level - last.level).abs() <= TOL => {}
                _ => kept.push(*h),
            }
        }
    }
    first[2 * n_posts] = kept.len() as u32;
    for d in &mut diaphragms {
        d.planes.sort_unstable();
        d.planes.dedup();
    }
    Bracing { roles, planes, diaphragms, hold_first: first, hold_list: kept, standard, standard_span, placements: Vec::new() }
}

/// Merge the rigid parts of each level into diaphragms: parts that share two or more posts are
/// rigidly joined (two pins fix a body in plan), one shared post is a hinge.
fn merge_bodies(scene: &Scene, levels: &Levels, bodies: Vec<Body>, roles: &mut [BraceRole]) -> Vec<Diaphragm> {
    let mut sets = Sets::new(bodies.len());
    // Repeat until no two groups share two posts: joining two groups can make a third share two.
    loop {
        let mut changed = false;
        let mut count: HashMap<(u32, u32), u32> = HashMap::default();
        let mut at_post: HashMap<(usize, u32), Vec<u32>> = HashMap::default();
        for (k, b) in bodies.iter().enumerate() {
            let r = sets.root(k as u32);
            for &p in &b.posts {
                let list = at_post.entry((b.level, p)).or_default();
                if !list.contains(&r) {
                    list.push(r);
                }
            }
        }
        for list in at_post.values() {
            for (i, &a) in list.iter().enumerate() {
                for &b in &list[i + 1..] {
                    *count.entry((a.min(b), a.max(b))).or_insert(0) += 1;
                }
            }
        }
        for ((a, b), n) in count {
            if n >= 2 && sets.join(a, b) {
                changed = true;
            }
        }
        if !changed {
            break;
        }
    }
    let mut index: HashMap<u32, usize> = HashMap::default();
    let mut out: Vec<Diaphragm> = Vec::new();
    for (k, b) in bodies.iter().enumerate() {
        let r = sets.root(k as u32);
        let d = *index.entry(r).or_insert_with(|| {
            out.push(Diaphragm { level: levels.values[b.level], posts: Vec::new(), plan_braces: Vec::new(), decks: Vec::new(), bounds: ((f64::INFINITY, f64::NEG_INFINITY), (f64::INFINITY, f64::NEG_INFINITY)), planes: Vec::new() });
            out.len() - 1
        });
        let dia = &mut out[d];
        dia.posts.extend(&b.posts);
        if let Some(brace) = b.brace {
            dia.plan_braces.push(brace);
            roles[brace as usize] = BraceRole::Plan { diaphragm: d as u32 };
        }
        if let Some(deck) = b.deck {
            dia.decks.push(deck);
            let e = scene.decks[deck as usize].extent;
            grow(&mut dia.bounds, e.x.0, e.y.0);
            grow(&mut dia.bounds, e.x.1, e.y.1);
        }
        for &p in &b.posts {
            let q = &scene.posts[p as usize];
            grow(&mut dia.bounds, q.x, q.y);
        }
    }
    for d in &mut out {
        d.posts.sort_unstable();
        d.posts.dedup();
    }
    out.sort_by(|a, b| a.level.total_cmp(&b.level).then(a.posts.cmp(&b.posts)));
    // Sorting moved the diaphragms: renumber the plan braces' roles.
    for (d, dia) in out.iter().enumerate() {
        for &b in &dia.plan_braces {
            roles[b as usize] = BraceRole::Plan { diaphragm: d as u32 };
        }
    }
    out
}

fn grow(b: &mut ((f64, f64), (f64, f64)), x: f64, y: f64) {
    b.0 .0 = b.0 .0.min(x);
    b.0 .1 = b.0 .1.max(x);
    b.1 .0 = b.1 .0.min(y);
    b.1 .1 = b.1 .1.max(y);
}

/// Resolve where each horizontal load is applied: a point force at a post or on a diaphragm, a
/// wind face on the posts along it. Loads that cannot be placed are refused.
pub fn place_loads(scene: &Scene, bracing: &mut Bracing, problems: &mut Vec<Problem>) {
    use crate::scene::loads::LoadKind;
    let err = |problems: &mut Vec<Problem>, id: &str, message: String| problems.push(Problem { kind: ElementKind::Load, id: id.to_owned(), message });
    let mut out = Vec::with_capacity(scene.loads.len());
    for load in &scene.loads {
        let placed = match &load.kind {
            LoadKind::Horizontal { x, y, level, .. } if x.is_finite() && y.is_finite() && level.is_finite() => {
                let at_post = scene.posts.iter().position(|p| (p.x - x).hypot(p.y - y) <= TOL && *level >= p.base_level - TOL && *level <= p.top_level + TOL);
                let on_diaphragm = || {
                    bracing.diaphragms.iter().position(|d| (d.level - level).abs() <= TOL && *x >= d.bounds.0 .0 - TOL && *x <= d.bounds.0 .1 + TOL && *y >= d.bounds.1 .0 - TOL && *y <= d.bounds.1 .1 + TOL)
                };
                match (at_post, on_diaphragm()) {
                    (Some(p), _) => Placement::Post(p as u32),
                    (None, Some(d)) => Placement::Diaphragm(d as u32),
                    (None, None) => {
                        err(problems, &load.id, format!("acts at ({x}, {y}) at {level} m, which is neither on a post nor on a diaphragm at that level: apply it to the post (standard) that takes it"));
                        Placement::None
                    }
                }
            }
            LoadKind::Wind { face, .. } if [face.from.0, face.from.1, face.to.0, face.to.1, face.bottom, face.top].iter().all(|v| v.is_finite()) => {
                let (dx, dy) = (face.to.0 - face.from.0, face.to.1 - face.from.1);
                let length = dx.hypot(dy);
                if length < MIN_SPAN_M {
                    err(problems, &load.id, "face has no length in plan".into());
                    Placement::None
                } else {
                    let (ux, uy) = (dx / length, dy / length);
                    let mut posts: Vec<(u32, f64)> = scene
                        .posts
                        .iter()
                        .enumerate()
                        .filter_map(|(i, p)| {
                            let (rx, ry) = (p.x - face.from.0, p.y - face.from.1);
                            let s = rx * ux + ry * uy;
                            let off = (rx * uy - ry * ux).abs();
                            let (base, top) = bracing.standard_span[i];
                            (off <= TOL && s >= -TOL && s <= length + TOL && base < face.top - TOL && top > face.bottom + TOL).then_some((i as u32, s))
                        })
                        .collect();
                    posts.sort_by(|a, b| a.1.total_cmp(&b.1));
                    // Posts stacked at one plan point would each take the face where they stand;
                    // one post per point is carried here.
                    posts.dedup_by(|a, b| (a.1 - b.1).abs() <= MIN_SPAN_M);
                    let short: Vec<&str> = posts
                        .iter()
                        .filter(|&&(p, _)| {
                            let (base, top) = bracing.standard_span[p as usize];
                            base > face.bottom + TOL || top < face.top - TOL
                        })
                        .map(|&(p, _)| scene.posts[p as usize].id.as_str())
                        .collect();
                    if posts.len() < 2 {
                        err(problems, &load.id, format!("face from ({}, {}) to ({}, {}) runs along {} post(s): a face must run along a line of at least two posts that carry it", face.from.0, face.from.1, face.to.0, face.to.1, posts.len()));
                        Placement::None
                    } else if !short.is_empty() {
                        err(problems, &load.id, format!("face from {} m to {} m reaches beyond posts {} that carry it", face.bottom, face.top, list_ids(short.into_iter(), 6)));
                        Placement::None
                    } else {
                        Placement::Face { posts, length }
                    }
                }
            }
            _ => Placement::None,
        };
        out.push(placed);
    }
    bracing.placements = out;
}
