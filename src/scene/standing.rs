//! What each post stands on, and the order in which loads flow down.
//!
//! A post stands on the first of these that is at its base level, under its plan point:
//!
//! 1. another post whose top is at its base — a spliced standard, an upper lift on a lower one.
//!    Centred within [`SPLICE_CENTRED_M`] it continues that standard; off centre by up to
//!    [`ECCENTRIC_LIMIT_M`] it is refused as an eccentric splice;
//! 2. a bearer (or ledger, transom) passing under it — a transfer member: the post's load enters
//!    the bearer as a point load there;
//! 3. a deck covering its plan point — the post's load enters the deck as a point load;
//! 4. a declared existing structure (a slab of the permanent works) — a base plate on it;
//! 5. otherwise the ground, at its own base level: a base plate.
//!
//! A post whose base is above anything of the scene under it (a post, a bearer line, a deck)
//! without standing on it hangs in the air and is refused, as are partial overlaps with a post
//! below and loops in the load path. Loads then flow top-down through decks, bearers and posts in
//! the order of [`LoadPathGraph::order`], so every member has all its loads before it passes them on.

use crate::scene::model::{ElementKind, Scene};
use crate::scene::validate::{BearerLine, DeckLine, Problem, GEOMETRY_TOLERANCE_M};

/// A post within this plan distance of the one below it, at its top, continues that standard, m.
// common practice, no source: spigot and socket joints of tube standards centre within a few mm.
pub const SPLICE_CENTRED_M: f64 = 0.010;

/// Off centre beyond [`SPLICE_CENTRED_M`] and up to this plan distance, a post on another post or
/// on a bearer line is an eccentric bearing: refused, m. Further off, it does not stand on it.
// common practice, no source: a standard more than a tube radius off its support is not carried
// concentrically.
pub const ECCENTRIC_LIMIT_M: f64 = 0.050;

/// What the base of a post stands on.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub enum StandsOn {
    /// The ground at the post's base level: the post has a base plate.
    Ground,
    /// A declared existing structure (index into [`Scene::existing_structures`]): the post has a
    /// base plate on it.
    Structure(usize),
    /// The top of another post (index): a spliced standard.
    Post(usize),
    /// A bearer (index), at a distance along its line, m: a transfer member.
    Bearer {
        /// Bearer index.
        bearer: usize,
        /// Distance along the bearer from its first post, m.
        at: f64,
    },
    /// A deck (index), at the post's plan point.
    Deck(usize),
}

impl StandsOn {
    /// Whether the post has a base plate (on the ground or on an existing structure).
    pub fn is_plate(self) -> bool {
        matches!(self, StandsOn::Ground | StandsOn::Structure(_))
    }
}

/// One member of the load path.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize)]
pub enum Member {
    /// A deck (index).
    Deck(usize),
    /// A bearer, ledger or transom (index).
    Bearer(usize),
    /// A post (index).
    Post(usize),
}

/// The resolved load path: what each post stands on, and a top-down order of all members.
#[derive(Debug, Clone, PartialEq)]
pub struct LoadPathGraph {
    /// What each post stands on, in post order.
    pub stands_on: Vec<StandsOn>,
    /// Every deck, bearer and post, each after everything that puts load on it.
    pub order: Vec<Member>,
    /// Position of each post in [`order`](Self::order).
    pub post_rank: Vec<u32>,
    /// Position of each bearer in [`order`](Self::order).
    pub bearer_rank: Vec<u32>,
    /// Position of each deck in [`order`](Self::order).
    pub deck_rank: Vec<u32>,
}

impl LoadPathGraph {
    /// Whether post `p` has a base plate.
    pub fn is_plate(&self, p: usize) -> bool {
        self.stands_on[p].is_plate()
    }
    /// Whether any post stands on another member (a lift, a transfer): then loads pass through
    /// more than one post on their way down.
    pub fn has_lifts(&self) -> bool {
        self.stands_on.iter().any(|s| !s.is_plate())
    }
    /// Rank of a member in the top-down order.
    pub fn rank(&self, m: Member) -> u32 {
        match m {
            Member::Deck(d) => self.deck_rank[d],
            Member::Bearer(b) => self.bearer_rank[b],
            Member::Post(p) => self.post_rank[p],
        }
    }
    /// The post whose base plate finally carries post `p` through splices, if `p` reaches the
    /// ground by splices alone (`None` when a transfer member lies on the way).
    pub fn spliced_base(&self, mut p: usize) -> Option<usize> {
        for _ in 0..self.stands_on.len() {
            match self.stands_on[p] {
                StandsOn::Ground | StandsOn::Structure(_) => return Some(p),
                StandsOn::Post(q) => p = q,
                _ => return None,
            }
        }
        None
    }
}

/// Find what each post stands on and order the members top-down. Problems and warnings are
/// returned with element ids; the graph is `None` when there are problems.
///
/// Members whose geometry did not resolve (`None`) are left out; the caller reports them. The
/// last value is what each post stands on as far as could be told (the ground where in doubt).
pub fn resolve(scene: &Scene, bearers: &[Option<BearerLine>], decks: &[Option<DeckLine>]) -> (Option<LoadPathGraph>, Vec<Problem>, Vec<Problem>, Vec<StandsOn>) {
    let mut problems = Vec::new();
    let mut warnings = Vec::new();
    let mut err = |id: &str, message: String| problems.push(Problem { kind: ElementKind::Post, id: id.to_owned(), message });
    let tol = GEOMETRY_TOLERANCE_M;
    let posts = &scene.posts;
    let index = PostIndex::new(scene);
    let lines = LineIndex::new(bearers);

    let mut stands_on = Vec::with_capacity(posts.len());
    for (i, p) in posts.iter().enumerate() {
        // 1. Posts under this one, within the eccentric limit: the highest whose base is lower.
        let mut below: Option<(usize, f64)> = None;
        for j in index.near(p.x, p.y) {
            let q = &posts[j];
            let d = (q.x - p.x).hypot(q.y - p.y);
            if j == i || d > ECCENTRIC_LIMIT_M || q.base_level >= p.base_level - tol {
                continue;
            }
            if q.top_level > p.base_level + tol {
                // Overlapping extents at (nearly) the same plan point; exact coincidence is
                // reported by the post checks already.
                if d >= tol {
                    err(&p.id, format!("overlaps post {} below it: its base at {:.3} m is under the top of {} at {:.3} m, {:.0} mm off its centre; an upper lift must start at the top of the one below", q.id, p.base_level, q.id, q.top_level, d * 1000.0));
                }
                continue;
            }
            if below.is_none_or(|(k, _)| q.top_level > posts[k].top_level) {
                below = Some((j, d));
            }
        }
        if let Some((j, d)) = below {
            let q = &posts[j];
            if (q.top_level - p.base_level).abs() <= tol {
                if d <= SPLICE_CENTRED_M {
                    stands_on.push(StandsOn::Post(j));
                } else {
                    err(&p.id, format!("stands {:.0} mm off the centre of post {} below it: a splice more than {:.0} mm off centre is eccentric; line the posts up within {:.0} mm", d * 1000.0, q.id, SPLICE_CENTRED_M * 1000.0, SPLICE_CENTRED_M * 1000.0));
                    stands_on.push(StandsOn::Ground);
                }
                continue;
            }
        }
        // 2. Bearers at its base level passing under its plan point.
        let mut on_bearer: Vec<(usize, f64, f64)> = Vec::new();
        for b in lines.through(p.x, p.y) {
            let Some(line) = &bearers[b] else { continue };
            if (scene.bearers[b].level - p.base_level).abs() > tol || line.posts.contains(&i) {
                continue;
            }
            let at = line.distance_of(p.x, p.y);
            let (px, py) = line.point_at(at);
            let off = (px - p.x).hypot(py - p.y);
            if off <= ECCENTRIC_LIMIT_M && at >= line.start - tol && at <= line.end + tol {
                on_bearer.push((b, at, off));
            }
        }
        if let Some(&(b, at, off)) = on_bearer.first() {
            if on_bearer.len() > 1 {
                let ids: Vec<&str> = on_bearer.iter().map(|e| scene.bearers[e.0].id.as_str()).collect();
                err(&p.id, format!("stands on {} bearers at once ({}): members at one level cannot cross; set one on top of the other", ids.len(), ids.join(", ")));
            } else if off > SPLICE_CENTRED_M {
                err(&p.id, format!("stands {:.0} mm off the line of bearer {}: a post more than {:.0} mm off the member it stands on is eccentric; move it onto the line", off * 1000.0, scene.bearers[b].id, SPLICE_CENTRED_M * 1000.0));
            }
            stands_on.push(StandsOn::Bearer { bearer: b, at });
            continue;
        }
        // 3. A deck at its base level covering its plan point.
        if let Some(d) = scene.decks.iter().position(|d| (d.level - p.base_level).abs() <= tol && d.extent.contains(p.x, p.y, tol)) {
            stands_on.push(StandsOn::Deck(d));
            continue;
        }
        // 4. A declared existing structure.
        if let Some(s) = scene.existing_structures.iter().position(|s| (s.level - p.base_level).abs() <= tol && s.extent.contains(p.x, p.y, tol)) {
            stands_on.push(StandsOn::Structure(s));
            continue;
        }
        // 5. The ground — unless something of the scene is under it: then it hangs in the air.
        if let Some((j, _)) = below {
            let q = &posts[j];
            err(&p.id, format!("hangs in the air: its base at {:.3} m is {:.3} m above the top of post {} below it; extend {} up to it, or lower its base", p.base_level, p.base_level - q.top_level, q.id, q.id));
        } else if let Some(b) = lines.through(p.x, p.y).find(|&b| {
            let Some(line) = &bearers[b] else { return false };
            let at = line.distance_of(p.x, p.y);
            let (px, py) = line.point_at(at);
            scene.bearers[b].level < p.base_level - tol && (px - p.x).hypot(py - p.y) <= ECCENTRIC_LIMIT_M && at >= line.start - tol && at <= line.end + tol
        }) {
            let bl = &scene.bearers[b];
            err(&p.id, format!("hangs in the air: its base at {:.3} m is above bearer {} at {:.3} m under it; set its base on the bearer, or on a post", p.base_level, bl.id, bl.level));
        } else if let Some(d) = scene.decks.iter().find(|d| d.level < p.base_level - tol && d.extent.contains(p.x, p.y, tol)) {
            err(&p.id, format!("hangs in the air: its base at {:.3} m is above deck {} at {:.3} m under it; set its base on the deck, or on a post", p.base_level, d.id, d.level));
        }
        stands_on.push(StandsOn::Ground);
    }
    if !problems.is_empty() {
        return (None, problems, warnings, stands_on);
    }

    // A base plate well above the lowest plate of the scene stands on nothing drawn: say so, since
    // a post meant to stand on a member but drawn off it would otherwise pass as a plate.
    let lowest = posts.iter().zip(&stands_on).filter(|(_, s)| **s == StandsOn::Ground).map(|(p, _)| p.base_level).fold(f64::INFINITY, f64::min);
    for (p, s) in posts.iter().zip(&stands_on) {
        if *s == StandsOn::Ground && p.base_level > lowest + RAISED_PLATE_NOTICE_M {
            warnings.push(Problem {
                kind: ElementKind::Post,
                id: p.id.clone(),
                message: format!("stands on nothing drawn at {:.3} m, {:.3} m above the lowest base plate: it is taken as a base plate on the ground at its own level; if it stands on a post, bearer or deck, connect it there", p.base_level, p.base_level - lowest),
            });
        }
    }

    // The order needs every member; with some unresolved, the caller has problems to report.
    let (Some(bearers), Some(decks)) = (bearers.iter().cloned().collect::<Option<Vec<_>>>(), decks.iter().cloned().collect::<Option<Vec<_>>>()) else {
        return (None, problems, warnings, stands_on);
    };
    match order_top_down(&bearers, &decks, &stands_on) {
        Ok(graph) => (Some(graph), problems, warnings, stands_on),
        Err(cycle) => {
            let names: Vec<String> = cycle.iter().map(|m| member_name(scene, *m)).collect();
            let first = match cycle[0] {
                Member::Post(p) => (ElementKind::Post, scene.posts[p].id.clone()),
                Member::Bearer(b) => (ElementKind::Bearer, scene.bearers[b].id.clone()),
                Member::Deck(d) => (ElementKind::Deck, scene.decks[d].id.clone()),
            };
            problems.push(Problem {
                kind: first.0,
                id: first.1,
                message: format!("the load path goes round in a loop ({} → back to the start): a member cannot carry what it stands on; break the loop", names.join(" → ")),
            });
            (None, problems, warnings, stands_on)
        }
    }
}

/// A base plate this far above the lowest one gets a notice that it stands on nothing drawn, m.
// common practice, no source: base plates of one structure on level ground differ by jack
// extension only; a step of more than a lift in the ground should be deliberate.
pub const RAISED_PLATE_NOTICE_M: f64 = 1.0;

fn member_name(scene: &Scene, m: Member) -> String {
    match m {
        Member::Post(p) => format!("post {}", scene.posts[p].id),
        Member::Bearer(b) => format!("bearer {}", scene.bearers[b].id),
        Member::Deck(d) => format!("deck {}", scene.decks[d].id),
    }
}

/// Kahn's algorithm over the members: decks → their bearers → their posts → what the posts stand
/// on. On a loop, the members of one loop.
fn order_top_down(bearers: &[BearerLine], decks: &[DeckLine], stands_on: &[StandsOn]) -> Result<LoadPathGraph, Vec<Member>> {
    let (nd, nb, np) = (decks.len(), bearers.len(), stands_on.len());
    let node = |m: Member| match m {
        Member::Deck(d) => d,
        Member::Bearer(b) => nd + b,
        Member::Post(p) => nd + nb + p,
    };
    let member = |k: usize| {
        if k < nd {
            Member::Deck(k)
        } else if k < nd + nb {
            Member::Bearer(k - nd)
        } else {
            Member::Post(k - nd - nb)
        }
    };
    let n = nd + nb + np;
    let mut edges: Vec<Vec<usize>> = vec![Vec::new(); n];
    for (d, line) in decks.iter().enumerate() {
        edges[node(Member::Deck(d))].extend(line.bearers.iter().map(|&b| node(Member::Bearer(b))));
    }
    for (b, line) in bearers.iter().enumerate() {
        edges[node(Member::Bearer(b))].extend(line.posts.iter().map(|&p| node(Member::Post(p))));
    }
    for (p, s) in stands_on.iter().enumerate() {
        let to = match *s {
            StandsOn::Post(q) => Some(Member::Post(q)),
            StandsOn::Bearer { bearer, .. } => Some(Member::Bearer(bearer)),
            StandsOn::Deck(d) => Some(Member::Deck(d)),
            StandsOn::Ground | StandsOn::Structure(_) => None,
        };
        if let Some(to) = to {
            edges[node(Member::Post(p))].push(node(to));
        }
    }
    let mut indegree = vec![0u32; n];
    for e in edges.iter().flatten() {
        indegree[*e] += 1;
    }
    // Start from the members nothing stands on, in element order, so the order is stable.
    let mut ready: std::collections::VecDeque<usize> = (0..n).filter(|&k| indegree[k] == 0).collect();
    let mut order = Vec::with_capacity(n);
    while let Some(k) = ready.pop_front() {
        order.push(member(k));
        for &e in &edges[k] {
            indegree[e] -= 1;
            if indegree[e] == 0 {
                ready.push_back(e);
            }
        }
    }
    if order.len() < n {
        // Every member left over still waits for a member left over above it; walking up from
        // one of them must repeat a member: that stretch is a loop.
        let mut above: Vec<usize> = vec![usize::MAX; n];
        for (k, targets) in edges.iter().enumerate() {
            if indegree[k] > 0 {
                for &e in targets {
                    above[e] = k;
                }
            }
        }
        let start = (0..n).find(|&k| indegree[k] > 0).expect("a member is left");
        let mut seen = vec![usize::MAX; n];
        let mut path = Vec::new();
        let mut k = start;
        while seen[k] == usize::MAX {
            seen[k] = path.len();
            path.push(k);
            k = above[k];
        }
        // Walked upwards: reverse so the loop reads in the direction loads flow.
        let mut cycle: Vec<Member> = path[seen[k]..].iter().map(|&k| member(k)).collect();
        cycle.reverse();
        return Err(cycle);
    }
    let mut rank = vec![0u32; n];
    for (r, m) in order.iter().enumerate() {
        rank[node(*m)] = r as u32;
    }
    Ok(LoadPathGraph {
        stands_on: stands_on.to_vec(),
        post_rank: rank[nd + nb..].to_vec(),
        bearer_rank: rank[nd..nd + nb].to_vec(),
        deck_rank: rank[..nd].to_vec(),
        order,
    })
}

/// Posts bucketed by plan position into cells of the eccentric limit, for neighbour queries.
struct PostIndex {
    cells: rustc_hash::FxHashMap<(i64, i64), Vec<usize>>,
}

impl PostIndex {
    fn cell(v: f64) -> i64 {
        // Coordinates are checked to lie within ±10 km; clamp anyway so a neighbour cell ±1
        // never overflows.
        ((v / ECCENTRIC_LIMIT_M).floor() as i64).clamp(i64::MIN / 2, i64::MAX / 2)
    }
    fn new(scene: &Scene) -> Self {
        let mut cells: rustc_hash::FxHashMap<(i64, i64), Vec<usize>> = Default::default();
        for (i, p) in scene.posts.iter().enumerate() {
            cells.entry((Self::cell(p.x), Self::cell(p.y))).or_default().push(i);
        }
        PostIndex { cells }
    }
    /// Posts in the cells around a plan point (a superset of those within the eccentric limit).
    fn near(&self, x: f64, y: f64) -> impl Iterator<Item = usize> + '_ {
        let (cx, cy) = (Self::cell(x), Self::cell(y));
        (-1..=1).flat_map(move |dx| (-1..=1).flat_map(move |dy| self.cells.get(&(cx + dx, cy + dy)).into_iter().flatten().copied()))
    }
}

/// Bearer lines bucketed by their offset (lines along x by y, lines along y by x), for the query
/// "which lines pass near this plan point"; skew lines are checked one by one.
struct LineIndex {
    along_x: rustc_hash::FxHashMap<i64, Vec<usize>>,
    along_y: rustc_hash::FxHashMap<i64, Vec<usize>>,
    skew: Vec<usize>,
}

impl LineIndex {
    fn new(bearers: &[Option<BearerLine>]) -> Self {
        let mut ix = LineIndex { along_x: Default::default(), along_y: Default::default(), skew: Vec::new() };
        for (b, line) in bearers.iter().enumerate() {
            let Some(line) = line else { continue };
            match (line.posts.len() > 1).then(|| line.axis()).flatten() {
                Some(crate::scene::validate::Axis::X) => ix.along_x.entry(PostIndex::cell(line.origin.1)).or_default().push(b),
                Some(crate::scene::validate::Axis::Y) => ix.along_y.entry(PostIndex::cell(line.origin.0)).or_default().push(b),
                // Single-post members run along +x by convention; treat them as skew (rare).
                None => ix.skew.push(b),
            }
        }
        ix
    }
    /// Lines that may pass within the eccentric limit of a plan point.
    fn through(&self, x: f64, y: f64) -> impl Iterator<Item = usize> + '_ {
        let (cx, cy) = (PostIndex::cell(x), PostIndex::cell(y));
        near_cells(&self.along_x, cy).chain(near_cells(&self.along_y, cx)).chain(self.skew.iter().copied())
    }
}

/// Entries of the cells `c - 1 ..= c + 1` of a one-dimensional bucket map.
fn near_cells(map: &rustc_hash::FxHashMap<i64, Vec<usize>>, c: i64) -> impl Iterator<Item = usize> + '_ {
    (-1..=1).flat_map(move |d| map.get(&(c + d)).into_iter().flatten().copied())
}
