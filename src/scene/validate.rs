//! Validation: every problem of a scene at once, with element ids, and the resolved geometry the
//! solver works on (ids turned into indices, bearer and deck lines set up).

use rustc_hash::FxHashMap as HashMap;
use std::fmt;

use crate::scene::bracing::{analyse_bracing, place_loads, Bracing};
use crate::scene::loads::{Intensity, KentledgePlace, LoadKind};
use crate::scene::model::{ElementKind, Scene};
use crate::scene::standing::{self, LoadPathGraph};

/// Plan and level tolerance for "the same place", m.
pub const GEOMETRY_TOLERANCE_M: f64 = 1e-3;
/// Shortest span accepted between two supports, m. Anything shorter is an input mistake and
/// would make lever-arm divisions meaningless.
pub const MIN_SPAN_M: f64 = 0.01;
/// Largest coordinate or size accepted, m.
pub const LIMIT_M: f64 = 1.0e4;
/// Largest force accepted, kN (and kN/m, kPa).
pub const LIMIT_KN: f64 = 1.0e6;
/// Smallest capacity accepted (safe working load, kN; allowable bearing pressure, kPa). Smaller
/// values are input mistakes that would turn utilisations into meaningless huge numbers.
pub const MIN_CAPACITY: f64 = 1.0e-3;

/// One problem found in a scene, tied to the element it is about.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Problem {
    /// Kind of element.
    pub kind: ElementKind,
    /// Element id (or combination name).
    pub id: String,
    /// What is wrong, in words.
    pub message: String,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.id.is_empty() {
            write!(f, "{}: {}", self.kind, self.message)
        } else {
            write!(f, "{} {}: {}", self.kind, self.id, self.message)
        }
    }
}

/// All the problems that stop a scene from being solved.
#[derive(Debug, Clone, PartialEq)]
pub struct ValidationError {
    /// Every problem found, in file order.
    pub problems: Vec<Problem>,
}

impl fmt::Display for ValidationError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let n = self.problems.len();
        write!(f, "the scene has {n} problem{}:", if n == 1 { "" } else { "s" })?;
        for p in &self.problems {
            write!(f, "\n  - {p}")?;
        }
        Ok(())
    }
}

impl std::error::Error for ValidationError {}

/// A plan axis.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize)]
pub enum Axis {
    /// The x axis.
    X,
    /// The y axis.
    Y,
}

/// A bearer's line in plan: its posts at distances along it.
#[derive(Debug, Clone, PartialEq)]
pub struct BearerLine {
    /// Post indices, in order.
    pub posts: Vec<usize>,
    /// Plan position of the first post.
    pub origin: (f64, f64),
    /// Unit direction from the first towards the last post (+x for a single post).
    pub dir: (f64, f64),
    /// Distance of each post from the first, m (strictly increasing, first = 0).
    pub supports: Vec<f64>,
    /// Start of the member (−start overhang), m.
    pub start: f64,
    /// End of the member (last support + end overhang), m.
    pub end: f64,
    /// Inner supports (indices into `posts`) declared as joints; `None` when not known.
    pub joints: Option<Vec<usize>>,
}

impl BearerLine {
    /// Plan point at a distance along the line.
    pub fn point_at(&self, s: f64) -> (f64, f64) {
        (self.origin.0 + s * self.dir.0, self.origin.1 + s * self.dir.1)
    }
    /// Distance along the line of a plan point's projection.
    pub fn distance_of(&self, x: f64, y: f64) -> f64 {
        (x - self.origin.0) * self.dir.0 + (y - self.origin.1) * self.dir.1
    }
    /// Axis the line runs along, if it runs along one.
    pub fn axis(&self) -> Option<Axis> {
        let tol = 1e-6;
        if self.dir.1.abs() < tol {
            Some(Axis::X)
        } else if self.dir.0.abs() < tol {
            Some(Axis::Y)
        } else {
            None
        }
    }
}

/// A deck's span line: the bearers at their positions across the span.
#[derive(Debug, Clone, PartialEq)]
pub struct DeckLine {
    /// Bearer indices in order of increasing span coordinate.
    pub bearers: Vec<usize>,
    /// Axis the bearers run along; the deck spans across the other one.
    pub bearer_axis: Axis,
    /// Span coordinate (plan coordinate across the bearers) of each bearer, increasing.
    pub supports: Vec<f64>,
    /// Span coordinate range of the deck extent.
    pub span_range: (f64, f64),
    /// Inner supports (indices into `bearers`) declared as joints; `None` when not known.
    pub joints: Option<Vec<usize>>,
}

impl DeckLine {
    /// Split a plan point into (coordinate along the bearers, span coordinate).
    pub fn split(&self, x: f64, y: f64) -> (f64, f64) {
        match self.bearer_axis {
            Axis::X => (x, y),
            Axis::Y => (y, x),
        }
    }
    /// Split a plan rectangle into (range along the bearers, range across them).
    pub fn split_rect(&self, r: &crate::scene::model::Rect) -> ((f64, f64), (f64, f64)) {
        match self.bearer_axis {
            Axis::X => (r.x, r.y),
            Axis::Y => (r.y, r.x),
        }
    }
}

/// A load with its references resolved to indices.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Target {
    /// A deck.
    Deck(usize),
    /// A bearer.
    Bearer(usize),
    /// A post.
    Post(usize),
    /// No element: horizontal loads act at a point or on all posts.
    None,
}

/// Which plan directions have a braced plane.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
pub struct Braced {
    /// Some plane along x is braced from the ground.
    pub x: bool,
    /// Some plane along y is braced from the ground.
    pub y: bool,
}

/// A valid scene with its ids resolved and its member lines set up, ready to solve.
#[derive(Debug, Clone)]
pub struct Model<'s> {
    /// The scene this was made from.
    pub scene: &'s Scene,
    /// Support type index of each post (`None` for a post standing on another member without one).
    pub post_support: Vec<Option<usize>>,
    /// What each post stands on, and the top-down order of the members.
    pub graph: LoadPathGraph,
    /// Line of each bearer.
    pub bearers: Vec<BearerLine>,
    /// Span line of each deck.
    pub decks: Vec<DeckLine>,
    /// Element each load acts on.
    pub load_targets: Vec<Target>,
    /// Posts each load names (the plates a kentledge sits on), per load; empty for the others.
    pub load_posts: Vec<Vec<usize>>,
    /// Braced plan directions.
    pub braced: Braced,
    /// Braced planes, diaphragms, and where each post is held horizontally.
    pub bracing: Bracing,
    /// Non-fatal findings worth a look.
    pub warnings: Vec<Problem>,
}

struct Checker<'s> {
    scene: &'s Scene,
    problems: Vec<Problem>,
    warnings: Vec<Problem>,
}

impl<'s> Checker<'s> {
    fn err(&mut self, kind: ElementKind, id: &str, message: impl Into<String>) {
        self.problems.push(Problem { kind, id: id.to_owned(), message: message.into() });
    }
    fn warn(&mut self, kind: ElementKind, id: &str, message: impl Into<String>) {
        self.warnings.push(Problem { kind, id: id.to_owned(), message: message.into() });
    }
    /// A number as written in messages: plain, or in exponent form when very large or small.
    fn show(v: f64) -> String {
        let v = crate::format::num(v);
        if v.0 != 0.0 && v.0.is_finite() && !(1e-4..1e9).contains(&v.0.abs()) { format!("{v:e}") } else { format!("{v}") }
    }
    /// A finite number within ±limit; reports and returns false otherwise.
    fn number(&mut self, kind: ElementKind, id: &str, what: &str, v: f64, limit: f64) -> bool {
        if !v.is_finite() {
            self.err(kind, id, format!("{what} is not a number ({v})"));
            false
        } else if v.abs() > limit {
            self.err(kind, id, format!("{what} = {} is outside the plausible range (±{})", Self::show(v), Self::show(limit)));
            false
        } else {
            true
        }
    }
    /// A finite number > 0 (or ≥ 0 when `allow_zero`).
    fn positive(&mut self, kind: ElementKind, id: &str, what: &str, v: f64, limit: f64, allow_zero: bool) -> bool {
        if !self.number(kind, id, what, v, limit) {
            return false;
        }
        if v < 0.0 || (!allow_zero && v == 0.0) {
            let need = if allow_zero { "zero or more" } else { "more than zero" };
            self.err(kind, id, format!("{what} must be {need} (it is {})", Self::show(v)));
            return false;
        }
        true
    }
    /// A finite number from `min` up to `limit`.
    fn at_least(&mut self, kind: ElementKind, id: &str, what: &str, v: f64, min: f64, limit: f64) -> bool {
        if !self.positive(kind, id, what, v, limit, false) {
            return false;
        }
        if v < min {
            self.err(kind, id, format!("{what} = {} is below the smallest plausible value ({})", Self::show(v), Self::show(min)));
            return false;
        }
        true
    }
}

/// Check a scene and resolve it for solving; on failure, every problem found.
pub fn validate<'s>(scene: &'s Scene) -> Result<Model<'s>, ValidationError> {
    let mut c = Checker { scene, problems: Vec::new(), warnings: Vec::new() };
    use ElementKind as K;

    if scene.format != crate::scene::model::FORMAT_VERSION {
        c.err(K::Site, "", format!("scene format {} is not supported (this build reads format {})", scene.format, crate::scene::model::FORMAT_VERSION));
    }

    // Ids: present and unique across the whole scene, so one id names one thing everywhere.
    let mut seen: HashMap<&str, ElementKind> = HashMap::default();
    for (kind, id) in scene.element_ids() {
        if id.trim().is_empty() {
            c.err(kind, id, "has an empty id");
        } else if let Some(first) = seen.insert(id, kind) {
            c.err(kind, id, format!("id is already used by a {first}"));
        }
    }
    let index = |list: Vec<&'s str>| -> HashMap<&'s str, usize> {
        list.into_iter().enumerate().map(|(i, id)| (id, i)).collect()
    };
    let support_ix = index(scene.support_types.iter().map(|s| s.id.as_str()).collect());
    let post_ix = index(scene.posts.iter().map(|s| s.id.as_str()).collect());
    let bearer_ix = index(scene.bearers.iter().map(|s| s.id.as_str()).collect());
    let deck_ix = index(scene.decks.iter().map(|s| s.id.as_str()).collect());

    check_site(&mut c);
    check_support_types(&mut c);
    let post_support = check_posts(&mut c, &support_ix);
    let bearers = check_bearers(&mut c, &post_ix);
    let decks = check_decks(&mut c, &bearer_ix, &bearers);
    check_existing_structures(&mut c);
    let graph = load_path_graph(&mut c, &bearers, &decks);
    let brace_ends = check_braces(&mut c, &post_ix);
    let (load_targets, load_posts) = check_loads(&mut c, &deck_ix, &bearer_ix, &post_ix, &bearers);
    check_kentledge_plates(&mut c, &post_ix, &load_posts, graph.as_ref());
    check_combinations(&mut c);
    let mut bracing = analyse_bracing(scene, &brace_ends, &bearers, graph.as_ref().map(|g| g.stands_on.as_slice()), &mut c.problems, &mut c.warnings);
    place_loads(scene, &mut bracing, &mut c.problems);
    let braced = Braced { x: bracing.braced_along(Axis::X), y: bracing.braced_along(Axis::Y) };

    match graph {
        Some(graph) if c.problems.is_empty() => Ok(Model {
            scene,
            post_support,
            graph,
            bearers: bearers.into_iter().map(|b| b.expect("checked")).collect(),
            decks: decks.into_iter().map(|d| d.expect("checked")).collect(),
            load_targets,
            load_posts,
            braced,
            bracing,
            warnings: c.warnings,
        }),
        _ => Err(ValidationError { problems: c.problems }),
    }
}

/// Check the declared existing structures of the permanent works.
fn check_existing_structures(c: &mut Checker) {
    use ElementKind as K;
    for e in &c.scene.existing_structures {
        let id = e.id.as_str();
        c.number(K::ExistingStructure, id, "level (m)", e.level, LIMIT_M);
        let r = e.extent;
        let mut ok = true;
        for (what, v) in [("extent x min", r.x.0), ("extent x max", r.x.1), ("extent y min", r.y.0), ("extent y max", r.y.1)] {
            ok &= c.number(K::ExistingStructure, id, what, v, LIMIT_M);
        }
        if ok && (r.x.1 - r.x.0 < MIN_SPAN_M || r.y.1 - r.y.0 < MIN_SPAN_M) {
            c.err(K::ExistingStructure, id, format!("extent x {:?}, y {:?} must have max above min in both directions", r.x, r.y));
        }
        c.at_least(K::ExistingStructure, id, "allowable bearing pressure (kPa)", e.allowable_kpa, MIN_CAPACITY, LIMIT_KN);
    }
}

/// Work out what every post stands on; a post with a base plate needs a support type.
fn load_path_graph(c: &mut Checker, bearers: &[Option<BearerLine>], decks: &[Option<DeckLine>]) -> Option<LoadPathGraph> {
    let scene = c.scene;
    let usable = |v: f64| v.is_finite() && v.abs() <= LIMIT_M;
    if scene.posts.iter().any(|p| !(usable(p.x) && usable(p.y) && usable(p.base_level) && usable(p.top_level))) {
        // Reported by the post checks; without numbers there is nothing to stand on. Every post
        // without a support type is then taken to need one.
        for p in scene.posts.iter().filter(|p| p.support.is_none()) {
            c.err(ElementKind::Post, &p.id, NO_SUPPORT_TYPE);
        }
        return None;
    }
    let (graph, problems, warnings, stands_on) = standing::resolve(scene, bearers, decks);
    c.problems.extend(problems);
    c.warnings.extend(warnings);
    for (p, s) in scene.posts.iter().zip(&stands_on) {
        if s.is_plate() && p.support.is_none() {
            c.err(ElementKind::Post, &p.id, NO_SUPPORT_TYPE);
        }
    }
    graph
}

/// A post with a base plate and no support type.
const NO_SUPPORT_TYPE: &str = "has no support type: its base plate needs one (jack, plate and safe working load)";

fn check_site(c: &mut Checker) {
    use ElementKind as K;
    let site = &c.scene.site;
    let name = site.name.clone();
    match site.allowable_bearing_kpa {
        Some(q) => {
            c.at_least(K::Site, &name, "allowable bearing pressure (kPa)", q, MIN_CAPACITY, LIMIT_KN);
        }
        None => c.warn(K::Site, &name, "no allowable bearing pressure entered: ground bearing at formation is not checked"),
    }
    if let Some(layer) = site.granular_layer {
        c.positive(K::Site, &name, "granular layer thickness (m)", layer.thickness_m, LIMIT_M, true);
        if let crate::scene::model::LoadSpread::AngleDeg(a) = layer.spread {
            if !(a.is_finite() && (0.0..89.0).contains(&a)) {
                c.err(K::Site, &name, format!("spread angle {a}° must be from 0° up to 89°"));
            }
        }
        // Water is 9.81 kN/m³ and dense rock fill under 25: outside this is an input mistake.
        if c.positive(K::Site, &name, "granular layer unit weight (kN/m³)", layer.unit_weight_kn_m3, 1e3, true) && !(5.0..=30.0).contains(&layer.unit_weight_kn_m3) {
            c.err(K::Site, &name, format!("granular layer unit weight {} kN/m³ is outside the plausible range 5 to 30 kN/m³", layer.unit_weight_kn_m3));
        }
        match layer.allowable_kpa {
            Some(q) => {
                c.at_least(K::Site, &name, "allowable pressure on the granular layer (kPa)", q, MIN_CAPACITY, LIMIT_KN);
            }
            None => c.warn(K::Site, &name, "no allowable pressure on the granular layer entered: pressure under the plates on top of the layer is not checked"),
        }
    }
    let h = &c.scene.horizontal;
    if let crate::scene::model::NotionalRule::Percent(p) = h.notional {
        c.positive(K::Site, &name, "notional horizontal load (%)", p, 100.0, true);
    }
    for d in &h.directions {
        if let crate::scene::loads::PlanDirection::Degrees(deg) = d {
            c.number(K::Site, &name, "checked direction (degrees)", *deg, 1e4);
        }
    }
    let st = &c.scene.stability;
    let (target, sliding, equ) = (st.target_factor, st.sliding_target_factor, st.equilibrium);
    c.positive(K::Site, &name, "target overturning factor", target, 1e3, false);
    c.positive(K::Site, &name, "target sliding factor", sliding, 1e3, false);
    for (what, v) in [
        ("equilibrium factor on destabilising permanent load", equ.g_unfavourable),
        ("equilibrium factor on stabilising permanent load", equ.g_favourable),
        ("equilibrium factor on imposed load", equ.q),
        ("equilibrium factor on horizontal load", equ.w),
    ] {
        c.positive(K::Site, &name, what, v, 100.0, true);
    }
    if equ.g_favourable > equ.g_unfavourable {
        c.warn(K::Site, &name, "equilibrium factor on stabilising permanent load is above the one on destabilising permanent load");
    }
    let ei = c.scene.analysis.stiffness;
    for (what, v) in [
        ("bearer stiffness EI (kN·m²)", ei.bearer_knm2),
        ("ledger stiffness EI (kN·m²)", ei.ledger_knm2),
        ("transom stiffness EI (kN·m²)", ei.transom_knm2),
        ("deck stiffness EI (kN·m²/m)", ei.deck_knm2_per_m),
    ] {
        c.positive(K::Site, &name, what, v, 1e12, false);
    }
}

fn check_support_types(c: &mut Checker) {
    use ElementKind as K;
    for s in &c.scene.support_types {
        c.at_least(K::SupportType, &s.id, "base plate width (m)", s.base_plate.width_m, MIN_SPAN_M, LIMIT_M);
        c.at_least(K::SupportType, &s.id, "base plate length (m)", s.base_plate.length_m, MIN_SPAN_M, LIMIT_M);
        c.at_least(K::SupportType, &s.id, "safe working load (kN)", s.swl_kn, MIN_CAPACITY, LIMIT_KN);
        if let Some(m) = s.head_moment_capacity_knm {
            c.positive(K::SupportType, &s.id, "head moment capacity (kN·m)", m, LIMIT_KN, true);
        }
        if let Some(sole) = s.sole_plate {
            c.at_least(K::SupportType, &s.id, "sole plate width (m)", sole.width_m, MIN_SPAN_M, LIMIT_M);
            c.at_least(K::SupportType, &s.id, "sole plate length (m)", sole.length_m, MIN_SPAN_M, LIMIT_M);
        }
        for i in &s.friction {
            if let crate::scene::model::Interface::Given { mu, source } = i {
                // common practice, no source: measured coefficients of dry construction
                // interfaces lie well below 1.5; anything above is an input mistake.
                if c.positive(K::SupportType, &s.id, "friction coefficient", *mu, 1e3, false) && *mu > 1.5 {
                    c.err(K::SupportType, &s.id, format!("friction coefficient {mu} is above the plausible 1.5"));
                }
                if source.trim().is_empty() {
                    c.err(K::SupportType, &s.id, format!("friction coefficient {mu} has no source: say where it comes from (a test, a published table)"));
                }
            }
        }
        if let Some(e) = s.max_extension_m {
            c.positive(K::SupportType, &s.id, "maximum jack extension (m)", e, LIMIT_M, true);
        }
        if crate::scene::catalogue::uses_example_values(s) {
            let from = s.catalogue_id.as_deref().map_or(String::new(), |id| format!(" from catalogue entry {id}"));
            let ext = s.max_extension_m.map_or(String::new(), |e| format!(" (the example holds for up to {e} m)"));
            c.warn(
                K::SupportType,
                &s.id,
                format!("uses example values{from}: safe working load {} kN is not a manufacturer's figure; replace it with the manufacturer's safe working load for the jack extension used{ext}", s.swl_kn),
            );
        }
    }
}

fn check_posts(c: &mut Checker, support_ix: &HashMap<&str, usize>) -> Vec<Option<usize>> {
    use ElementKind as K;
    let scene = c.scene;
    let mut out = Vec::with_capacity(scene.posts.len());
    // Coincident posts: bucket plan positions into tolerance-sized cells.
    let cell = |v: f64| (v / GEOMETRY_TOLERANCE_M).round() as i64;
    // First post in each cell, and for each post the next one in its cell.
    let mut cells: HashMap<(i64, i64), usize> = HashMap::default();
    let mut next_in_cell: Vec<usize> = vec![usize::MAX; scene.posts.len()];
    for (i, p) in scene.posts.iter().enumerate() {
        let ok_x = c.number(K::Post, &p.id, "x (m)", p.x, LIMIT_M);
        let ok_y = c.number(K::Post, &p.id, "y (m)", p.y, LIMIT_M);
        let ok_b = c.number(K::Post, &p.id, "base level (m)", p.base_level, LIMIT_M);
        let ok_t = c.number(K::Post, &p.id, "top level (m)", p.top_level, LIMIT_M);
        c.positive(K::Post, &p.id, "self-weight (kN/m)", p.self_weight_kn_per_m, LIMIT_KN, true);
        if ok_b && ok_t && p.top_level - p.base_level < MIN_SPAN_M {
            c.err(K::Post, &p.id, format!("top level {} must be above base level {}", p.top_level, p.base_level));
        }
        let support = match &p.support {
            None => None,
            Some(s) => match support_ix.get(s.as_str()) {
                Some(&ix) => Some(ix),
                None => {
                    c.err(K::Post, &p.id, format!("support type \"{s}\" does not exist"));
                    None
                }
            },
        };
        out.push(support);
        if ok_x && ok_y {
            let (cx, cy) = (cell(p.x), cell(p.y));
            for dx in -1..=1 {
                for dy in -1..=1 {
                    let mut j = cells.get(&(cx + dx, cy + dy)).copied().unwrap_or(usize::MAX);
                    while j != usize::MAX {
                        let q = &scene.posts[j];
                        let close = (q.x - p.x).hypot(q.y - p.y) < GEOMETRY_TOLERANCE_M;
                        let overlap = p.base_level < q.top_level && q.base_level < p.top_level;
                        if close && overlap {
                            c.err(K::Post, &p.id, format!("stands in the same place as post {}", q.id));
                        }
                        j = next_in_cell[j];
                    }
                }
            }
            if let Some(first) = cells.insert((cx, cy), i) {
                next_in_cell[i] = first;
            }
        }
    }
    out
}

fn check_bearers(c: &mut Checker, post_ix: &HashMap<&str, usize>) -> Vec<Option<BearerLine>> {
    use ElementKind as K;
    let scene = c.scene;
    let mut out = Vec::with_capacity(scene.bearers.len());
    // Which bearer last listed each post, to spot a post listed twice in one bearer.
    let mut listed_by = vec![usize::MAX; scene.posts.len()];
    for (bi, b) in scene.bearers.iter().enumerate() {
        let id = b.id.as_str();
        let mut ok = c.number(K::Bearer, id, "level (m)", b.level, LIMIT_M);
        ok &= c.positive(K::Bearer, id, "start overhang (m)", b.overhang_start_m, LIMIT_M, true);
        ok &= c.positive(K::Bearer, id, "end overhang (m)", b.overhang_end_m, LIMIT_M, true);
        c.positive(K::Bearer, id, "self-weight (kN/m)", b.self_weight_kn_per_m, LIMIT_KN, true);
        let mut posts = Vec::with_capacity(b.posts.len());
        for pid in &b.posts {
            match post_ix.get(pid.as_str()) {
                None => {
                    c.err(K::Bearer, id, format!("post \"{pid}\" does not exist"));
                    ok = false;
                }
                Some(&ix) if listed_by[ix] == bi => {
                    c.err(K::Bearer, id, format!("rests on post {pid} twice"));
                    ok = false;
                }
                Some(&ix) => {
                    listed_by[ix] = bi;
                    posts.push(ix);
                }
            }
        }
        if b.posts.is_empty() {
            c.err(K::Bearer, id, "rests on no post");
            ok = false;
        } else if b.posts.len() == 1 {
            c.warn(K::Bearer, id, "rests on a single post (T-head): it stands only if the moments about that post balance in every case; the solver checks this");
        }
        let coords_ok = posts.iter().all(|&p| scene.posts[p].x.is_finite() && scene.posts[p].y.is_finite() && scene.posts[p].x.abs() <= LIMIT_M && scene.posts[p].y.abs() <= LIMIT_M);
        if !ok || !coords_ok || posts.is_empty() {
            out.push(None);
            continue;
        }
        for &p in &posts {
            let post = &scene.posts[p];
            let tol = GEOMETRY_TOLERANCE_M;
            if b.level < post.base_level - tol || b.level > post.top_level + tol {
                c.err(K::Bearer, id, format!("level {} is not on post {} (it runs from {} to {})", b.level, post.id, post.base_level, post.top_level));
            }
        }
        let first = &scene.posts[posts[0]];
        let last = &scene.posts[*posts.last().expect("non-empty")];
        let origin = (first.x, first.y);
        let (dx, dy) = (last.x - first.x, last.y - first.y);
        let len = dx.hypot(dy);
        let dir = if posts.len() == 1 {
            (1.0, 0.0)
        } else if len < MIN_SPAN_M {
            c.err(K::Bearer, id, format!("first and last posts ({} and {}) are in the same place", first.id, last.id));
            out.push(None);
            continue;
        } else {
            (dx / len, dy / len)
        };
        let mut supports = Vec::with_capacity(posts.len());
        let mut line_ok = true;
        for (k, &p) in posts.iter().enumerate() {
            let post = &scene.posts[p];
            let (rx, ry) = (post.x - origin.0, post.y - origin.1);
            let along = rx * dir.0 + ry * dir.1;
            let off = (rx * dir.1 - ry * dir.0).abs();
            if off > GEOMETRY_TOLERANCE_M {
                c.err(K::Bearer, id, format!("post {} is {:.3} m off the straight line of the bearer", post.id, crate::format::num(off)));
                line_ok = false;
            }
            if let Some(&prev) = supports.last() {
                let span: f64 = along - prev;
                if span < MIN_SPAN_M {
                    let prev_id = &scene.posts[posts[k - 1]].id;
                    c.err(K::Bearer, id, format!("span from post {prev_id} to post {} is {:.4} m: posts must be in order along the bearer, at least {MIN_SPAN_M} m apart", post.id, crate::format::num(span)));
                    line_ok = false;
                }
            }
            supports.push(along);
        }
        if !line_ok {
            out.push(None);
            continue;
        }
        let end = supports.last().copied().unwrap_or(0.0) + b.overhang_end_m;
        let names: Vec<&str> = b.posts.iter().map(String::as_str).collect();
        let joints = inner_joints(c, K::Bearer, id, b.joints.as_deref(), &names, "post");
        out.push(Some(BearerLine { posts, origin, dir, supports, start: -b.overhang_start_m, end, joints }));
    }
    out
}

/// Declared joints of a member as support indices: each must name one of its inner supports
/// (`supports`, in order along it).
fn inner_joints(c: &mut Checker, kind: ElementKind, id: &str, declared: Option<&[String]>, supports: &[&str], what: &str) -> Option<Vec<usize>> {
    let declared = declared?;
    let mut out = Vec::with_capacity(declared.len());
    for j in declared {
        match supports.iter().position(|s| s == j) {
            Some(k) if k > 0 && k + 1 < supports.len() => out.push(k),
            Some(_) => c.err(kind, id, format!("joint at {what} {j}: a joint must be at an inner {what}, not at an end")),
            None => c.err(kind, id, format!("joint at {what} {j}: it does not rest on that {what}")),
        }
    }
    Some(out)
}

fn check_decks(c: &mut Checker, bearer_ix: &HashMap<&str, usize>, bearers: &[Option<BearerLine>]) -> Vec<Option<DeckLine>> {
    use ElementKind as K;
    let scene = c.scene;
    let mut out = Vec::with_capacity(scene.decks.len());
    let mut listed_by = vec![usize::MAX; scene.bearers.len()];
    for (di, d) in scene.decks.iter().enumerate() {
        let id = d.id.as_str();
        let mut ok = c.number(K::Deck, id, "level (m)", d.level, LIMIT_M);
        c.positive(K::Deck, id, "self-weight (kPa)", d.self_weight_kpa, LIMIT_KN, true);
        let e = d.extent;
        for (what, v) in [("extent x min", e.x.0), ("extent x max", e.x.1), ("extent y min", e.y.0), ("extent y max", e.y.1)] {
            ok &= c.number(K::Deck, id, what, v, LIMIT_M);
        }
        if ok && (e.x.1 - e.x.0 < MIN_SPAN_M || e.y.1 - e.y.0 < MIN_SPAN_M) {
            c.err(K::Deck, id, format!("extent x {:?}, y {:?} must have max above min in both directions", e.x, e.y));
            ok = false;
        }
        if d.bearers.len() < 2 {
            c.err(K::Deck, id, format!("rests on {} bearer(s); a deck needs at least two", d.bearers.len()));
            ok = false;
        }
        let mut list = Vec::new();
        for bid in &d.bearers {
            match bearer_ix.get(bid.as_str()) {
                None => {
                    c.err(K::Deck, id, format!("bearer \"{bid}\" does not exist"));
                    ok = false;
                }
                Some(&ix) if listed_by[ix] == di => {
                    c.err(K::Deck, id, format!("lists bearer {bid} twice"));
                    ok = false;
                }
                Some(&ix) => {
                    listed_by[ix] = di;
                    list.push(ix);
                }
            }
        }
        if !ok || list.iter().any(|&b| bearers[b].is_none()) {
            out.push(None);
            continue;
        }
        let lines: Vec<&BearerLine> = list.iter().map(|&b| bearers[b].as_ref().expect("checked")).collect();
        let axis = lines[0].axis();
        let Some(axis) = axis.filter(|a| lines.iter().all(|l| l.axis() == Some(*a))) else {
            c.err(K::Deck, id, "its bearers must all run parallel to the x axis or all parallel to the y axis");
            out.push(None);
            continue;
        };
        let line = DeckLine { bearers: Vec::new(), bearer_axis: axis, supports: Vec::new(), span_range: (0.0, 0.0), joints: None };
        let (along_range, span_range) = line.split_rect(&e);
        let mut positions: Vec<(f64, usize)> = Vec::new();
        let mut covered = true;
        for (k, l) in lines.iter().enumerate() {
            let (_, s) = line.split(l.origin.0, l.origin.1);
            let b_id = &scene.bearers[list[k]].id;
            if s < span_range.0 - GEOMETRY_TOLERANCE_M || s > span_range.1 + GEOMETRY_TOLERANCE_M {
                c.err(K::Deck, id, format!("bearer {b_id} lies outside the deck extent"));
                covered = false;
            }
            // The member's extent along its own axis, in plan coordinates.
            let a = line.split(l.point_at(l.start).0, l.point_at(l.start).1).0;
            let b = line.split(l.point_at(l.end).0, l.point_at(l.end).1).0;
            let (lo, hi) = (a.min(b), a.max(b));
            if along_range.0 < lo - GEOMETRY_TOLERANCE_M || along_range.1 > hi + GEOMETRY_TOLERANCE_M {
                c.err(K::Deck, id, {
                    let n = crate::format::num;
                    format!("extends from {:.3} to {:.3} m along bearer {b_id}, which only runs from {:.3} to {:.3} m", n(along_range.0), n(along_range.1), n(lo), n(hi))
                });
                covered = false;
            }
            positions.push((s, list[k]));
        }
        // Accept the bearers listed in either direction across the span, but in order.
        let increasing = positions.windows(2).all(|w| w[1].0 - w[0].0 >= MIN_SPAN_M);
        let decreasing = positions.windows(2).all(|w| w[0].0 - w[1].0 >= MIN_SPAN_M);
        if !increasing && !decreasing {
            c.err(K::Deck, id, format!("bearers must be listed in order across the span, at least {MIN_SPAN_M} m apart"));
            covered = false;
        }
        if !covered {
            out.push(None);
            continue;
        }
        if decreasing {
            positions.reverse();
        }
        for &b in &list {
            let bl = &scene.bearers[b];
            if d.level < bl.level - GEOMETRY_TOLERANCE_M {
                c.warn(K::Deck, id, format!("level {} is below bearer {} at {}", d.level, bl.id, bl.level));
            }
        }
        let ordered: Vec<&str> = positions.iter().map(|p| scene.bearers[p.1].id.as_str()).collect();
        let joints = inner_joints(c, K::Deck, id, d.joints.as_deref(), &ordered, "bearer");
        out.push(Some(DeckLine {
            bearers: positions.iter().map(|p| p.1).collect(),
            bearer_axis: axis,
            supports: positions.iter().map(|p| p.0).collect(),
            span_range,
            joints,
        }));
    }
    out
}

/// Brace ends on existing posts, within their height; the posts at the two ends of each brace.
/// What each brace is (and whether it is a brace at all) is worked out in
/// [`crate::scene::bracing`].
fn check_braces(c: &mut Checker, post_ix: &HashMap<&str, usize>) -> Vec<Option<(usize, usize)>> {
    use ElementKind as K;
    let scene = c.scene;
    let mut out = Vec::with_capacity(scene.braces.len());
    for b in &scene.braces {
        let mut ends = [None, None];
        for (k, node) in [&b.from, &b.to].into_iter().enumerate() {
            match post_ix.get(node.post.as_str()) {
                None => c.err(K::Brace, &b.id, format!("post \"{}\" does not exist", node.post)),
                Some(&p) => {
                    let post = &scene.posts[p];
                    if c.number(K::Brace, &b.id, "level (m)", node.level, LIMIT_M)
                        && (node.level < post.base_level - GEOMETRY_TOLERANCE_M || node.level > post.top_level + GEOMETRY_TOLERANCE_M)
                    {
                        c.err(K::Brace, &b.id, format!("level {} is not on post {}", node.level, post.id));
                    }
                    ends[k] = Some(p);
                }
            }
        }
        out.push(ends[0].zip(ends[1]));
    }
    out
}

fn check_loads(
    c: &mut Checker,
    deck_ix: &HashMap<&str, usize>,
    bearer_ix: &HashMap<&str, usize>,
    post_ix: &HashMap<&str, usize>,
    bearers: &[Option<BearerLine>],
) -> (Vec<Target>, Vec<Vec<usize>>) {
    use ElementKind as K;
    let scene = c.scene;
    let tol = GEOMETRY_TOLERANCE_M;
    let mut out = Vec::with_capacity(scene.loads.len());
    let mut load_posts = vec![Vec::new(); scene.loads.len()];
    for (k, load) in scene.loads.iter().enumerate() {
        let id = load.id.as_str();
        let deck = |c: &mut Checker, name: &str| -> Option<usize> {
            let found = deck_ix.get(name).copied();
            if found.is_none() {
                c.err(K::Load, id, format!("deck \"{name}\" does not exist"));
            }
            found
        };
        let intensity = |c: &mut Checker, i: Intensity| {
            match i {
                Intensity::Kpa(q) => {
                    c.number(K::Load, id, "pressure (kPa)", q, LIMIT_KN);
                }
                Intensity::LoadClassUniform(n) if crate::scene::loads::LoadClass::get(n).is_none() => {
                    c.err(K::Load, id, format!("load class {n} does not exist (1 to 6)"));
                }
                Intensity::LoadClassPartial(n) if Intensity::LoadClassPartial(n).kpa().is_none() => {
                    c.err(K::Load, id, format!("load class {n} has no partial-area load (classes 4 to 6 do)"));
                }
                _ => {}
            }
        };
        let target = match &load.kind {
            LoadKind::DeckArea { deck: d, intensity: i } => {
                intensity(c, *i);
                deck(c, d).map(Target::Deck)
            }
            LoadKind::DeckPatch { deck: d, area, intensity: i } => {
                intensity(c, *i);
                let ix = deck(c, d);
                let mut finite = true;
                for v in [area.x.0, area.x.1, area.y.0, area.y.1] {
                    finite &= c.number(K::Load, id, "patch corner (m)", v, LIMIT_M);
                }
                if let (Some(ix), true) = (ix, finite) {
                    if area.x.1 - area.x.0 < MIN_SPAN_M || area.y.1 - area.y.0 < MIN_SPAN_M {
                        c.err(K::Load, id, format!("patch x {:?}, y {:?} must have max above min in both directions", area.x, area.y));
                    } else if !scene.decks[ix].extent.contains_rect(area, tol) {
                        c.err(K::Load, id, format!("patch x {:?}, y {:?} is not on deck {d}", area.x, area.y));
                    }
                }
                ix.map(Target::Deck)
            }
            LoadKind::DeckPoint { deck: d, x, y, kn } => {
                let ix = deck(c, d);
                c.number(K::Load, id, "force (kN)", *kn, LIMIT_KN);
                let ok = c.number(K::Load, id, "x (m)", *x, LIMIT_M) & c.number(K::Load, id, "y (m)", *y, LIMIT_M);
                if let (Some(ix), true) = (ix, ok) {
                    if !scene.decks[ix].extent.contains(*x, *y, tol) {
                        c.err(K::Load, id, format!("point ({x}, {y}) is not on deck {d}"));
                    }
                }
                ix.map(Target::Deck)
            }
            LoadKind::BearerPoint { bearer, at_m, kn } => {
                c.number(K::Load, id, "force (kN)", *kn, LIMIT_KN);
                let ix = bearer_ix.get(bearer.as_str()).copied();
                match ix {
                    None => c.err(K::Load, id, format!("bearer \"{bearer}\" does not exist")),
                    Some(b) => {
                        if c.number(K::Load, id, "position (m)", *at_m, LIMIT_M) {
                            if let Some(line) = &bearers[b] {
                                if *at_m < line.start - tol || *at_m > line.end + tol {
                                    c.err(K::Load, id, format!("position {at_m} m is off bearer {bearer} ({} to {} m)", crate::format::num(line.start), crate::format::num(line.end)));
                                }
                            }
                        }
                    }
                }
                ix.map(Target::Bearer)
            }
            LoadKind::BearerLine { bearer, from_m, to_m, kn_per_m } => {
                c.number(K::Load, id, "intensity (kN/m)", *kn_per_m, LIMIT_KN);
                let ix = bearer_ix.get(bearer.as_str()).copied();
                match ix {
                    None => c.err(K::Load, id, format!("bearer \"{bearer}\" does not exist")),
                    Some(b) => {
                        let ok = c.number(K::Load, id, "start (m)", *from_m, LIMIT_M) & c.number(K::Load, id, "end (m)", *to_m, LIMIT_M);
                        if ok && to_m - from_m < MIN_SPAN_M {
                            c.err(K::Load, id, format!("line load from {from_m} to {to_m} m must have its end after its start"));
                        } else if let (true, Some(line)) = (ok, &bearers[b]) {
                            if *from_m < line.start - tol || *to_m > line.end + tol {
                                c.err(K::Load, id, format!("line load from {from_m} to {to_m} m runs off bearer {bearer} ({} to {} m)", crate::format::num(line.start), crate::format::num(line.end)));
                            }
                        }
                    }
                }
                ix.map(Target::Bearer)
            }
            LoadKind::PostTop { post, kn } => {
                c.number(K::Load, id, "force (kN)", *kn, LIMIT_KN);
                let ix = post_ix.get(post.as_str()).copied();
                if ix.is_none() {
                    c.err(K::Load, id, format!("post \"{post}\" does not exist"));
                }
                ix.map(Target::Post)
            }
            LoadKind::Horizontal { x, y, level, kn, direction } => {
                for (what, v, lim) in [("x (m)", *x, LIMIT_M), ("y (m)", *y, LIMIT_M), ("level (m)", *level, LIMIT_M), ("force (kN)", *kn, LIMIT_KN)] {
                    c.number(K::Load, id, what, v, lim);
                }
                check_direction(c, id, *direction);
                Some(Target::None)
            }
            LoadKind::Wind { face, kpa, direction } => {
                c.number(K::Load, id, "pressure (kPa)", *kpa, LIMIT_KN);
                let mut ok = true;
                for v in [face.from.0, face.from.1, face.to.0, face.to.1, face.bottom, face.top] {
                    ok &= c.number(K::Load, id, "face coordinate (m)", v, LIMIT_M);
                }
                if ok && face.top - face.bottom < MIN_SPAN_M {
                    c.err(K::Load, id, format!("face top {} must be above its bottom {}", face.top, face.bottom));
                }
                if check_direction(c, id, *direction) && ok {
                    let (ux, uy) = direction.unit();
                    let (dx, dy) = (face.to.0 - face.from.0, face.to.1 - face.from.1);
                    if (dx * uy - dy * ux).abs() < MIN_SPAN_M {
                        c.warn(K::Load, id, "face is parallel to the wind: it takes no force");
                    }
                }
                Some(Target::None)
            }
            LoadKind::Kentledge { on, kn, .. } => {
                if load.case != crate::scene::loads::Case::G {
                    c.err(K::Load, id, format!("is kentledge, a permanent weight: its case must be G, not {}", load.case));
                }
                c.positive(K::Load, id, "weight (kN)", *kn, LIMIT_KN, false);
                match on {
                    KentledgePlace::Plates(ids) => {
                        if ids.is_empty() {
                            c.err(K::Load, id, "is kentledge on no base plate: name the plates it sits on");
                        }
                        let mut found = Vec::with_capacity(ids.len());
                        for pid in ids {
                            match post_ix.get(pid.as_str()) {
                                None => c.err(K::Load, id, format!("post \"{pid}\" does not exist")),
                                Some(ix) if found.contains(ix) => c.err(K::Load, id, format!("sits on plate {pid} twice")),
                                Some(&ix) => found.push(ix),
                            }
                        }
                        load_posts[k] = found;
                        Some(Target::None)
                    }
                    KentledgePlace::Deck { deck: d, x, y } => {
                        let ix = deck(c, d);
                        let ok = c.number(K::Load, id, "x (m)", *x, LIMIT_M) & c.number(K::Load, id, "y (m)", *y, LIMIT_M);
                        if let (Some(ix), true) = (ix, ok) {
                            if !scene.decks[ix].extent.contains(*x, *y, tol) {
                                c.err(K::Load, id, format!("point ({x}, {y}) is not on deck {d}"));
                            }
                        }
                        ix.map(Target::Deck)
                    }
                }
            }
            LoadKind::Notional { percent, direction, basis } => {
                c.positive(K::Load, id, "percentage", *percent, 100.0, true);
                if basis.is_empty() {
                    c.err(K::Load, id, "names no load case to take a percentage of");
                }
                if let Some(twice) = basis.iter().enumerate().find(|(i, b)| basis[..*i].contains(b)) {
                    c.err(K::Load, id, format!("names case {} twice: its percentage would be counted twice", twice.1));
                }
                check_direction(c, id, *direction);
                Some(Target::None)
            }
        };
        out.push(target.unwrap_or(Target::None));
    }
    (out, load_posts)
}

/// The plates named for kentledge (in the stability settings, and those a kentledge sits on) must
/// exist, once each, and be base plates: a post standing on another member has none.
fn check_kentledge_plates(c: &mut Checker, post_ix: &HashMap<&str, usize>, load_posts: &[Vec<usize>], graph: Option<&crate::scene::standing::LoadPathGraph>) {
    let scene = c.scene;
    let name = scene.site.name.clone();
    let ids = &scene.stability.kentledge_plates;
    let no_plate = |p: usize| graph.is_some_and(|g| !g.is_plate(p));
    for (i, pid) in ids.iter().enumerate() {
        match post_ix.get(pid.as_str()) {
            None => c.err(ElementKind::Site, &name, format!("kentledge plate \"{pid}\" (stability settings) does not exist")),
            Some(_) if ids[..i].contains(pid) => c.err(ElementKind::Site, &name, format!("kentledge plate {pid} (stability settings) is listed twice")),
            Some(&p) if no_plate(p) => c.err(ElementKind::Site, &name, format!("kentledge plate {pid} (stability settings) is a post standing on another member: it has no base plate to put kentledge on")),
            Some(_) => {}
        }
    }
    for (load, posts) in scene.loads.iter().zip(load_posts) {
        for &p in posts.iter().filter(|&&p| no_plate(p)) {
            c.err(ElementKind::Load, &load.id, format!("is kentledge on post {}, which stands on another member: it has no base plate; put the kentledge on a base plate or on a deck", scene.posts[p].id));
        }
    }
}

/// A plan direction given in degrees must be a number. Whether the bracing can take the load is
/// found when it is carried down ([`crate::solve::braced`]).
fn check_direction(c: &mut Checker, id: &str, dir: crate::scene::loads::PlanDirection) -> bool {
    if let crate::scene::loads::PlanDirection::Degrees(d) = dir {
        if !c.number(ElementKind::Load, id, "direction (degrees)", d, 1e4) {
            return false;
        }
    }
    true
}

fn check_combinations(c: &mut Checker) {
    use ElementKind as K;
    let scene = c.scene;
    if scene.combinations.is_empty() {
        c.err(K::Combination, "", "the scene has no load combination to check");
    }
    let mut names = std::collections::HashSet::new();
    for comb in &scene.combinations {
        let n = comb.name.as_str();
        if n.trim().is_empty() {
            c.err(K::Combination, n, "has an empty name");
        } else if !names.insert(n) {
            c.err(K::Combination, n, "name is used twice");
        }
        let f = comb.factors;
        for (what, v) in [("unfavourable permanent factor", f.g_unfavourable), ("favourable permanent factor", f.g_favourable), ("imposed factor", f.q), ("horizontal factor", f.w)] {
            c.positive(K::Combination, n, what, v, 100.0, true);
        }
        if f.g_favourable > f.g_unfavourable {
            c.warn(K::Combination, n, "favourable permanent factor is above the unfavourable one");
        }
        if let Some(psi) = comb.psi0 {
            for (what, v) in [("ψ0 of imposed loads", psi.imposed), ("ψ0 of horizontal loads", psi.horizontal)] {
                if c.number(K::Combination, n, what, v, 1.0) && v < 0.0 {
                    c.err(K::Combination, n, format!("{what} must be from 0 to 1 (it is {v})"));
                }
            }
        }
    }
}
