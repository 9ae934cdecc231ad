//! Drawing geometry, ray picking and the view camera, as plain maths with no display code.
//!
//! [`shapes`] turns a scene into simple solids — round bars for tubes, cuboids for plates and
//! decks, arrows for loads — each tagged with the element it belongs to. The 3D view draws
//! exactly these, and [`pick`] intersects a ray with exactly these, so what is clicked is what is
//! seen. [`ViewCamera`] is the camera of the view: it frames a scene ([`ViewCamera::fit`]),
//! projects points to pixels ([`ViewCamera::project`]) and casts the ray under a pixel
//! ([`ViewCamera::ray`]). The shell builds its camera from it, and the picture tests use it to
//! find where each base plate lands on screen.
//!
//! Coordinates are the scene's: x, y in plan, z up, metres.

use std::collections::HashMap;

use crate::check::analysis::Analysis;
use crate::edit::ElementRef;
use crate::scene::loads::{Case, Intensity, LoadKind};
use crate::scene::model::{BeamRole, ElementKind, Scene};

/// A point or vector (x, y, z), m.
pub type V3 = [f64; 3];

fn add(a: V3, b: V3) -> V3 {
    [a[0] + b[0], a[1] + b[1], a[2] + b[2]]
}
fn sub(a: V3, b: V3) -> V3 {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}
fn scale(a: V3, k: f64) -> V3 {
    [a[0] * k, a[1] * k, a[2] * k]
}
fn dot(a: V3, b: V3) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}
fn cross(a: V3, b: V3) -> V3 {
    [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}
fn norm(a: V3) -> f64 {
    dot(a, a).sqrt()
}
fn unit(a: V3) -> V3 {
    let n = norm(a);
    if n > 0.0 { scale(a, 1.0 / n) } else { a }
}

/// What part of an element a shape draws.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Part {
    /// A post's tube.
    Post,
    /// The steel base plate under a post.
    BasePlate,
    /// The timber sole plate under the base plate.
    SolePlate,
    /// A bearer, ledger or transom.
    Bearer(BeamRole),
    /// A deck slab.
    Deck,
    /// A slab of an existing structure the plates stand on.
    ExistingStructure,
    /// A brace.
    Brace,
    /// An arrow of a load (shaft and head are separate shapes).
    LoadArrow,
    /// The sheet or bar joining the tails of a distributed load's arrows.
    LoadSpread,
}

impl Part {
    /// Picking preference: a deck or a load sheet is see-through, so anything else hit along
    /// the same ray wins over it.
    fn pick_priority(self) -> u8 {
        match self {
            Part::Deck | Part::LoadSpread | Part::ExistingStructure => 0,
            _ => 1,
        }
    }
}

/// A simple solid.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Prim {
    /// A round bar from `a` to `b`.
    Bar {
        /// One end.
        a: V3,
        /// Other end.
        b: V3,
        /// Radius, m.
        radius: f64,
    },
    /// A cone with its base disc centred on `base` and its point at `tip`.
    Cone {
        /// Centre of the base disc.
        base: V3,
        /// Point.
        tip: V3,
        /// Base radius, m.
        radius: f64,
    },
    /// An axis-aligned box.
    Cuboid {
        /// Lowest corner.
        min: V3,
        /// Highest corner.
        max: V3,
    },
}

impl Prim {
    /// Lowest and highest corner of the box around it.
    pub fn bounds(&self) -> (V3, V3) {
        match *self {
            Prim::Bar { a, b, radius } | Prim::Cone { base: a, tip: b, radius } => {
                let lo = [0, 1, 2].map(|k| a[k].min(b[k]) - radius);
                let hi = [0, 1, 2].map(|k| a[k].max(b[k]) + radius);
                (lo, hi)
            }
            Prim::Cuboid { min, max } => (min, max),
        }
    }
}

/// One solid of the drawing, tagged with its element.
#[derive(Debug, Clone, PartialEq)]
pub struct Shape {
    /// The element it belongs to (a base plate belongs to its post).
    pub element: ElementRef,
    /// What part of the element it is.
    pub part: Part,
    /// Number of the shape among the element's shapes of this part (arrows of one load…).
    pub index: u32,
    /// The solid.
    pub prim: Prim,
    /// Load case, for load shapes.
    pub case: Option<Case>,
}

/// Gap between a plate's footprint and the second cue drawn around it (square frame when over
/// capacity, round ring when it lifts), m. Drawing sizes only, shared with the picture tests.
pub const CUE_GAP_M: f64 = 0.03;
/// Width of a cue, m: a white band between two black edges.
pub const CUE_BAND_M: f64 = 0.10;
/// Width of each black edge of a cue, m.
pub const CUE_EDGE_M: f64 = 0.025;

/// Inner radius of the uplift ring around a footprint of half sizes `hx` × `hy`, m: clear of
/// the corners of the over-capacity frame, so a plate that is both over and lifting shows both
/// cues whole, one inside the other.
pub fn uplift_ring_radius(hx: f64, hy: f64) -> f64 {
    let frame = CUE_GAP_M + CUE_BAND_M;
    (hx + frame).hypot(hy + frame) + CUE_GAP_M
}

/// Drawing sizes that are not in the scene: thicknesses and arrow scales.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ShapeOptions {
    /// Radius of tubes, m.
    pub tube_radius_m: f64,
    /// Drawn thickness of a base plate, m.
    pub base_plate_thickness_m: f64,
    /// Drawn thickness of a sole plate, m.
    pub sole_plate_thickness_m: f64,
    /// Drawn thickness of a deck, m.
    pub deck_thickness_m: f64,
    /// Arrow length per kN of a force, m.
    pub arrow_m_per_kn: f64,
    /// Arrow length per kPa of a pressure, m.
    pub arrow_m_per_kpa: f64,
    /// Radius of arrow shafts, m.
    pub arrow_radius_m: f64,
    /// Whether loads are drawn.
    pub loads: bool,
}

impl ShapeOptions {
    /// Sizes for a scene: tubes of 48.3 mm, arrows scaled so the largest force and the largest
    /// pressure each draw about a quarter of the scene's height (at least 0.6 m).
    pub fn for_scene(scene: &Scene, analysis: Option<&Analysis>) -> Self {
        let (lo, hi) = structure_bounds(scene);
        let size = (hi[2] - lo[2]).max(0.25 * (hi[0] - lo[0]).max(hi[1] - lo[1])).max(1.0);
        let longest = (0.25 * size).max(0.6);
        let notional = notional_forces(scene, analysis);
        let (mut kn, mut kpa) = (0.0f64, 0.0f64);
        for l in &scene.loads {
            match &l.kind {
                LoadKind::DeckArea { intensity, .. } | LoadKind::DeckPatch { intensity, .. } => kpa = kpa.max(intensity.kpa().unwrap_or(0.0).abs()),
                LoadKind::DeckPoint { kn: f, .. } | LoadKind::BearerPoint { kn: f, .. } | LoadKind::PostTop { kn: f, .. } | LoadKind::Horizontal { kn: f, .. } | LoadKind::Kentledge { kn: f, .. } => kn = kn.max(f.abs()),
                LoadKind::BearerLine { kn_per_m, from_m, to_m, .. } => kn = kn.max((kn_per_m * (to_m - from_m)).abs()),
                LoadKind::Wind { face, kpa: p, direction } => kn = kn.max(wind_force(face, *p, *direction).abs()),
                LoadKind::Notional { .. } => kn = kn.max(notional.get(l.id.as_str()).copied().unwrap_or(0.0)),
            }
        }
        let finite = |v: f64| if v.is_finite() && v > 0.0 { v } else { 1.0 };
        ShapeOptions {
            // source: EN 39:2001 tube, 48.3 mm outside diameter
            tube_radius_m: 0.048_3 / 2.0,
            // common practice, no source: drawing thicknesses only (6–10 mm steel plate,
            // 38 mm timber board, 50 mm deck build-up); they do not enter any result
            base_plate_thickness_m: 0.01,
            sole_plate_thickness_m: 0.038,
            deck_thickness_m: 0.05,
            arrow_m_per_kn: longest / finite(kn),
            arrow_m_per_kpa: longest / finite(kpa),
            arrow_radius_m: (0.006 * size).clamp(0.015, 0.25),
            loads: true,
        }
    }
}

/// Net horizontal force of wind on a face, kN: pressure × face area projected normal to the wind.
fn wind_force(face: &crate::scene::loads::Face, kpa: f64, direction: crate::scene::loads::PlanDirection) -> f64 {
    let (ux, uy) = direction.unit();
    let (dx, dy) = (face.to.0 - face.from.0, face.to.1 - face.from.1);
    let width = (dx * uy - dy * ux).abs();
    kpa * width * (face.top - face.bottom)
}

/// Magnitude of each notional load, kN, from the solved items (needs a solution).
fn notional_forces<'a>(scene: &'a Scene, analysis: Option<&Analysis>) -> HashMap<&'a str, f64> {
    let mut out = HashMap::new();
    let Some(a) = analysis else { return out };
    for l in &scene.loads {
        if let LoadKind::Notional { .. } = l.kind
            && let Some(item) = a.solution.items.iter().find(|i| i.id == l.id)
        {
            let f = item.applied.force;
            out.insert(l.id.as_str(), f[0].hypot(f[1]));
        }
    }
    out
}

/// Lowest and highest corner around the posts and decks (no loads), m; a 10 × 10 × 3 m box at
/// the origin for an empty scene.
pub fn structure_bounds(scene: &Scene) -> (V3, V3) {
    let mut lo = [f64::INFINITY; 3];
    let mut hi = [f64::NEG_INFINITY; 3];
    let mut grow = |p: V3| {
        if p.iter().all(|v| v.is_finite()) {
            for k in 0..3 {
                lo[k] = lo[k].min(p[k]);
                hi[k] = hi[k].max(p[k]);
            }
        }
    };
    for p in &scene.posts {
        grow([p.x, p.y, p.base_level]);
        grow([p.x, p.y, p.top_level]);
    }
    for d in &scene.decks {
        grow([d.extent.x.0, d.extent.y.0, d.level]);
        grow([d.extent.x.1, d.extent.y.1, d.level]);
    }
    if lo[0] > hi[0] {
        return ([0.0, 0.0, 0.0], [10.0, 10.0, 3.0]);
    }
    (lo, hi)
}

/// Lowest and highest corner around every shape.
pub fn shapes_bounds(shapes: &[Shape]) -> Option<(V3, V3)> {
    let mut it = shapes.iter().map(|s| s.prim.bounds()).filter(|(a, b)| a.iter().chain(b).all(|v| v.is_finite()));
    let first = it.next()?;
    Some(it.fold(first, |(lo, hi), (a, b)| ([0, 1, 2].map(|k| lo[k].min(a[k])), [0, 1, 2].map(|k| hi[k].max(b[k])))))
}

/// Drawn thickness of an existing structure's slab, m (it is not part of any calculation).
const EXISTING_SLAB_DRAWN_THICKNESS_M: f64 = 0.2;

/// Every solid of the scene's drawing. Elements whose references do not resolve are left out
/// (validation reports them). `analysis` gives the size of notional loads, which depend on
/// the solved vertical load.
pub fn shapes(scene: &Scene, opts: &ShapeOptions, analysis: Option<&Analysis>) -> Vec<Shape> {
    let mut out = Vec::with_capacity(scene.posts.len() * 3 + scene.bearers.len() + scene.braces.len() + scene.decks.len());
    let posts: HashMap<&str, &crate::scene::model::Post> = scene.posts.iter().map(|p| (p.id.as_str(), p)).collect();
    let supports: HashMap<&str, &crate::scene::model::SupportType> = scene.support_types.iter().map(|s| (s.id.as_str(), s)).collect();
    let r = opts.tube_radius_m;
    let mut push = |element: &ElementRef, part: Part, index: u32, prim: Prim, case: Option<Case>| {
        out.push(Shape { element: element.clone(), part, index, prim, case });
    };
    for p in &scene.posts {
        let e = ElementRef::post(&p.id);
        let support = p.support.as_deref().and_then(|s| supports.get(s));
        let plate_top = p.base_level + if support.is_some() { opts.base_plate_thickness_m } else { 0.0 };
        push(&e, Part::Post, 0, Prim::Bar { a: [p.x, p.y, plate_top], b: [p.x, p.y, p.top_level], radius: r }, None);
        if let Some(s) = support {
            let (w, l) = (s.base_plate.width_m / 2.0, s.base_plate.length_m / 2.0);
            push(&e, Part::BasePlate, 0, Prim::Cuboid { min: [p.x - w, p.y - l, p.base_level], max: [p.x + w, p.y + l, plate_top] }, None);
            if let Some(sole) = s.sole_plate {
                let (w, l) = (sole.width_m / 2.0, sole.length_m / 2.0);
                let z = p.base_level - opts.sole_plate_thickness_m;
                push(&e, Part::SolePlate, 0, Prim::Cuboid { min: [p.x - w, p.y - l, z], max: [p.x + w, p.y + l, p.base_level] }, None);
            }
        }
    }
    let bearer_line = |b: &crate::scene::model::Bearer| -> Option<(V3, V3, V3)> {
        let first = posts.get(b.posts.first()?.as_str())?;
        let last = posts.get(b.posts.last()?.as_str())?;
        let d = [last.x - first.x, last.y - first.y, 0.0];
        let dir = if norm(d) > 1e-9 { unit(d) } else { [1.0, 0.0, 0.0] };
        let z = b.level - r;
        let a = add([first.x, first.y, z], scale(dir, -b.overhang_start_m));
        let e = add([last.x, last.y, z], scale(dir, b.overhang_end_m));
        Some((a, e, dir))
    };
    let mut lines: HashMap<&str, (V3, V3, V3)> = HashMap::new();
    for b in &scene.bearers {
        if let Some(line) = bearer_line(b) {
            lines.insert(b.id.as_str(), line);
            push(&ElementRef::new(ElementKind::Bearer, &b.id), Part::Bearer(b.role), 0, Prim::Bar { a: line.0, b: line.1, radius: r }, None);
        }
    }
    for d in &scene.decks {
        let t = opts.deck_thickness_m;
        let prim = Prim::Cuboid { min: [d.extent.x.0, d.extent.y.0, d.level - t], max: [d.extent.x.1, d.extent.y.1, d.level] };
        push(&ElementRef::new(ElementKind::Deck, &d.id), Part::Deck, 0, prim, None);
    }
    for e in &scene.existing_structures {
        // Drawn as a slab under its top surface, as thick as a floor slab looks.
        let t = EXISTING_SLAB_DRAWN_THICKNESS_M;
        let prim = Prim::Cuboid { min: [e.extent.x.0, e.extent.y.0, e.level - t], max: [e.extent.x.1, e.extent.y.1, e.level] };
        push(&ElementRef::new(ElementKind::ExistingStructure, &e.id), Part::ExistingStructure, 0, prim, None);
    }
    for b in &scene.braces {
        let (Some(p), Some(q)) = (posts.get(b.from.post.as_str()), posts.get(b.to.post.as_str())) else { continue };
        let prim = Prim::Bar { a: [p.x, p.y, b.from.level], b: [q.x, q.y, b.to.level], radius: r * 0.8 };
        push(&ElementRef::new(ElementKind::Brace, &b.id), Part::Brace, 0, prim, None);
    }
    if opts.loads {
        let decks: HashMap<&str, &crate::scene::model::Deck> = scene.decks.iter().map(|d| (d.id.as_str(), d)).collect();
        let bearers: HashMap<&str, &crate::scene::model::Bearer> = scene.bearers.iter().map(|b| (b.id.as_str(), b)).collect();
        let notional = notional_forces(scene, analysis);
        let (lo, hi) = structure_bounds(scene);
        for l in &scene.loads {
            let e = ElementRef::new(ElementKind::Load, &l.id);
            let mut arrows = load_arrows(l, opts, &posts, &decks, &bearers, &lines, &notional, (lo, hi));
            let mut n = 0u32;
            for (tail, head) in arrows.arrows.drain(..) {
                for prim in arrow_prims(tail, head, opts.arrow_radius_m) {
                    push(&e, Part::LoadArrow, n, prim, Some(l.case));
                    n += 1;
                }
            }
            for (k, prim) in arrows.spread.into_iter().enumerate() {
                push(&e, Part::LoadSpread, k as u32, prim, Some(l.case));
            }
        }
    }
    out
}

/// A shaft and a head for an arrow from `tail` to `head` (the head touches the point of action).
fn arrow_prims(tail: V3, head: V3, radius: f64) -> Vec<Prim> {
    let d = sub(head, tail);
    let len = norm(d);
    if len < 1e-9 || !len.is_finite() {
        return Vec::new();
    }
    let head_len = (0.3 * len).min(8.0 * radius);
    let neck = sub(head, scale(unit(d), head_len));
    vec![Prim::Bar { a: tail, b: neck, radius }, Prim::Cone { base: neck, tip: head, radius: 2.5 * radius }]
}

struct LoadDrawing {
    arrows: Vec<(V3, V3)>,
    spread: Vec<Prim>,
}

/// Arrows of one load: downward arrows ending on the surface it acts on, horizontal ones ending
/// at the point of action.
#[allow(clippy::too_many_arguments)]
fn load_arrows(
    l: &crate::scene::loads::Load,
    opts: &ShapeOptions,
    posts: &HashMap<&str, &crate::scene::model::Post>,
    decks: &HashMap<&str, &crate::scene::model::Deck>,
    bearers: &HashMap<&str, &crate::scene::model::Bearer>,
    lines: &HashMap<&str, (V3, V3, V3)>,
    notional: &HashMap<&str, f64>,
    (lo, hi): (V3, V3),
) -> LoadDrawing {
    let mut d = LoadDrawing { arrows: Vec::new(), spread: Vec::new() };
    let down = |p: V3, len: f64| (add(p, [0.0, 0.0, len]), p);
    // Arrows over a rectangle at a level, at most `max` a side, and the sheet at their tails.
    let over_area = |d: &mut LoadDrawing, x: (f64, f64), y: (f64, f64), z: f64, intensity: Intensity, max: usize| {
        let q = intensity.kpa().unwrap_or(0.0);
        let len = q * opts.arrow_m_per_kpa;
        // Nothing to draw for a zero (or not-a-number) pressure.
        if len.is_nan() || len.abs() <= 1e-6 {
            return;
        }
        let spacing = ((x.1 - x.0).max(y.1 - y.0) / max as f64).max(0.5);
        let nx = (((x.1 - x.0) / spacing).round() as usize).clamp(1, max);
        let ny = (((y.1 - y.0) / spacing).round() as usize).clamp(1, max);
        for i in 0..nx {
            for j in 0..ny {
                let px = x.0 + (i as f64 + 0.5) * (x.1 - x.0) / nx as f64;
                let py = y.0 + (j as f64 + 0.5) * (y.1 - y.0) / ny as f64;
                d.arrows.push(down([px, py, z], len));
            }
        }
        let t = opts.arrow_radius_m * 0.5;
        d.spread.push(Prim::Cuboid { min: [x.0, y.0, z + len], max: [x.1, y.1, z + len + t] });
    };
    match &l.kind {
        LoadKind::DeckArea { deck, intensity } => {
            if let Some(dk) = decks.get(deck.as_str()) {
                over_area(&mut d, dk.extent.x, dk.extent.y, dk.level, *intensity, 5);
            }
        }
        LoadKind::DeckPatch { deck, area, intensity } => {
            if let Some(dk) = decks.get(deck.as_str()) {
                over_area(&mut d, area.x, area.y, dk.level, *intensity, 3);
            }
        }
        LoadKind::DeckPoint { deck, x, y, kn } => {
            if let Some(dk) = decks.get(deck.as_str()) {
                d.arrows.push(down([*x, *y, dk.level], kn * opts.arrow_m_per_kn));
            }
        }
        LoadKind::BearerPoint { bearer, at_m, kn } => {
            if let (Some(b), Some(line)) = (bearers.get(bearer.as_str()), lines.get(bearer.as_str()))
                && let Some(first) = b.posts.first().and_then(|p| posts.get(p.as_str()))
            {
                let p = add([first.x, first.y, b.level], scale(line.2, *at_m));
                d.arrows.push(down(p, kn * opts.arrow_m_per_kn));
            }
        }
        LoadKind::BearerLine { bearer, from_m, to_m, kn_per_m } => {
            if let (Some(b), Some(line)) = (bearers.get(bearer.as_str()), lines.get(bearer.as_str()))
                && let Some(first) = b.posts.first().and_then(|p| posts.get(p.as_str()))
            {
                let len = kn_per_m * (to_m - from_m) * opts.arrow_m_per_kn;
                let n = (((to_m - from_m) / 0.5).ceil() as usize).clamp(2, 8);
                let at = |s: f64| add([first.x, first.y, b.level], scale(line.2, s));
                for k in 0..n {
                    let s = from_m + (to_m - from_m) * k as f64 / (n - 1) as f64;
                    d.arrows.push(down(at(s), len));
                }
                d.spread.push(Prim::Bar { a: add(at(*from_m), [0.0, 0.0, len]), b: add(at(*to_m), [0.0, 0.0, len]), radius: opts.arrow_radius_m * 0.6 });
            }
        }
        LoadKind::PostTop { post, kn } => {
            if let Some(p) = posts.get(post.as_str()) {
                d.arrows.push(down([p.x, p.y, p.top_level], kn * opts.arrow_m_per_kn));
            }
        }
        LoadKind::Horizontal { x, y, level, kn, direction } => {
            let (ux, uy) = direction.unit();
            let len = kn * opts.arrow_m_per_kn;
            let head = [*x, *y, *level];
            d.arrows.push((sub(head, [ux * len, uy * len, 0.0]), head));
        }
        LoadKind::Wind { face, kpa, direction } => {
            let (ux, uy) = direction.unit();
            let len = wind_force(face, *kpa, *direction) * opts.arrow_m_per_kn;
            let mid = [(face.from.0 + face.to.0) / 2.0, (face.from.1 + face.to.1) / 2.0, (face.bottom + face.top) / 2.0];
            d.arrows.push((sub(mid, [ux * len, uy * len, 0.0]), mid));
            let c = |p: (f64, f64), z: f64| [p.0, p.1, z];
            let rad = opts.arrow_radius_m * 0.4;
            for (a, b) in [
                (c(face.from, face.bottom), c(face.to, face.bottom)),
                (c(face.to, face.bottom), c(face.to, face.top)),
                (c(face.to, face.top), c(face.from, face.top)),
                (c(face.from, face.top), c(face.from, face.bottom)),
            ] {
                d.spread.push(Prim::Bar { a, b, radius: rad });
            }
        }
        LoadKind::Kentledge { on, kn, .. } => {
            // A block on each plate it sits on (or at its point on the deck), with its arrow.
            let side = opts.arrow_radius_m * 6.0;
            let mut block = |at: V3, share: f64| {
                d.spread.push(Prim::Cuboid { min: [at[0] - side, at[1] - side, at[2]], max: [at[0] + side, at[1] + side, at[2] + side] });
                d.arrows.push(down(add(at, [0.0, 0.0, side]), share * opts.arrow_m_per_kn));
            };
            match on {
                crate::scene::loads::KentledgePlace::Plates(ids) => {
                    let share = kn / ids.len().max(1) as f64;
                    for p in ids.iter().filter_map(|id| posts.get(id.as_str())) {
                        block([p.x, p.y, p.base_level], share);
                    }
                }
                crate::scene::loads::KentledgePlace::Deck { deck, x, y } => {
                    if let Some(dk) = decks.get(deck.as_str()) {
                        block([*x, *y, dk.level], *kn);
                    }
                }
            }
        }
        LoadKind::Notional { direction, .. } => {
            let (ux, uy) = direction.unit();
            let len = notional.get(l.id.as_str()).copied().unwrap_or(0.0) * opts.arrow_m_per_kn;
            // Drawn from the middle of the structure's top, one arrow per direction.
            let centre = [(lo[0] + hi[0]) / 2.0, (lo[1] + hi[1]) / 2.0, hi[2] + 0.3];
            let gap = opts.arrow_radius_m * 4.0;
            let start = add(centre, [ux * gap, uy * gap, 0.0]);
            d.arrows.push((start, add(start, [ux * len, uy * len, 0.0])));
        }
    }
    d
}

/// What a line of [`bracing_lines`] shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BracingLine {
    /// The outline of a braced plane, from the ground to the top of its bracing, and its braced
    /// levels.
    Plane,
    /// Bracing of a plane above a lift with no brace: not counted.
    NotCounted,
    /// The outline of a diaphragm at its level, and its diagonals.
    Diaphragm,
}

/// Height above the base at which a plane's outline starts, m: clear of the plate and its cues.
const PLATE_CLEARANCE_M: f64 = 0.4;

/// Lines that show the braced planes and the diaphragms of an analysis: (from, to, what).
pub fn bracing_lines(scene: &Scene, bracing: &crate::scene::bracing::Bracing) -> Vec<(V3, V3, BracingLine)> {
    let mut out = Vec::new();
    for plane in &bracing.planes {
        let (Some(&first), Some(&last)) = (plane.posts.first(), plane.posts.last()) else { continue };
        let (a, z) = (&scene.posts[first as usize], &scene.posts[last as usize]);
        let base = plane.posts.iter().map(|&p| scene.posts[p as usize].base_level).fold(f64::INFINITY, f64::min);
        let counted_top = plane.braced_to.checked_sub(1).map(|k| plane.levels[k]);
        // An outline without its bottom edge on the ground, its sides starting clear of the
        // plates, so that it never covers a plate's colour or its failure cue.
        let rect = |lo: f64, hi: f64, kind: BracingLine, out: &mut Vec<(V3, V3, BracingLine)>| {
            let from = if lo <= base { base + PLATE_CLEARANCE_M } else { lo };
            out.push(([a.x, a.y, from], [a.x, a.y, hi], kind));
            out.push(([z.x, z.y, from], [z.x, z.y, hi], kind));
            out.push(([a.x, a.y, hi], [z.x, z.y, hi], kind));
            if lo > base {
                out.push(([a.x, a.y, lo], [z.x, z.y, lo], kind));
            }
        };
        if let Some(top) = counted_top {
            rect(base, top, BracingLine::Plane, &mut out);
            for &zl in &plane.levels[..plane.braced_to - 1] {
                out.push(([a.x, a.y, zl], [z.x, z.y, zl], BracingLine::Plane));
            }
        }
        if let Some(&top) = plane.levels.last() {
            if plane.braced_to < plane.levels.len() {
                rect(counted_top.unwrap_or(base), top, BracingLine::NotCounted, &mut out);
            }
        }
    }
    for d in &bracing.diaphragms {
        let ((x0, x1), (y0, y1)) = d.bounds;
        let z = d.level;
        let corners = [[x0, y0, z], [x1, y0, z], [x1, y1, z], [x0, y1, z]];
        for k in 0..4 {
            out.push((corners[k], corners[(k + 1) % 4], BracingLine::Diaphragm));
        }
        out.push((corners[0], corners[2], BracingLine::Diaphragm));
        out.push((corners[1], corners[3], BracingLine::Diaphragm));
    }
    out
}

/// A half-line from `origin` along the unit vector `dir`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Ray {
    /// Start point.
    pub origin: V3,
    /// Unit direction.
    pub dir: V3,
}

impl Ray {
    /// A ray from `origin` towards `dir` (normalised here).
    pub fn new(origin: V3, dir: V3) -> Self {
        Ray { origin, dir: unit(dir) }
    }
    /// The point at distance `t`.
    pub fn at(&self, t: f64) -> V3 {
        add(self.origin, scale(self.dir, t))
    }
}

/// Closest approach of a ray and a segment: (distance along the ray, gap between them).
pub fn ray_segment(ray: &Ray, a: V3, b: V3) -> (f64, f64) {
    let u = ray.dir;
    let v = sub(b, a);
    let w = sub(ray.origin, a);
    let (uu, uv, vv, uw, vw) = (dot(u, u), dot(u, v), dot(v, v), dot(u, w), dot(v, w));
    let den = uu * vv - uv * uv;
    // Parameters on the ray (t ≥ 0) and on the segment (s in 0..=1).
    let (mut t, mut s);
    if den < 1e-12 * uu * vv.max(1e-12) {
        // Parallel: the segment end met first along the ray.
        let (ta, tb) = (dot(u, sub(a, ray.origin)) / uu, dot(u, sub(b, ray.origin)) / uu);
        (t, s) = if ta <= tb { (ta, 0.0) } else { (tb, 1.0) };
        if t < 0.0 && ta.max(tb) >= 0.0 {
            // The ray starts alongside the segment.
            t = 0.0;
            s = (dot(v, w) / vv.max(1e-300)).clamp(0.0, 1.0);
        }
        let gap = norm(sub(ray.at(t.max(0.0)), add(a, scale(v, s))));
        return (t.max(0.0), gap);
    } else {
        t = (uv * vw - vv * uw) / den;
        s = (uu * vw - uv * uw) / den;
    }
    if !(0.0..=1.0).contains(&s) || vv == 0.0 {
        s = s.clamp(0.0, 1.0);
        t = dot(u, sub(add(a, scale(v, s)), ray.origin)) / uu;
    }
    if t < 0.0 {
        t = 0.0;
        s = if vv > 0.0 { (dot(v, sub(ray.origin, a)) / vv).clamp(0.0, 1.0) } else { 0.0 };
    }
    let gap = norm(sub(ray.at(t), add(a, scale(v, s))));
    (t, gap)
}

/// Entry distance of a ray into an axis-aligned box, if it hits (0 when it starts inside).
pub fn ray_box(ray: &Ray, min: V3, max: V3) -> Option<f64> {
    let (mut t0, mut t1) = (0.0f64, f64::INFINITY);
    for k in 0..3 {
        let (o, d) = (ray.origin[k], ray.dir[k]);
        if d.abs() < 1e-15 {
            if o < min[k] || o > max[k] {
                return None;
            }
        } else {
            let (a, b) = ((min[k] - o) / d, (max[k] - o) / d);
            t0 = t0.max(a.min(b));
            t1 = t1.min(a.max(b));
            if t0 > t1 {
                return None;
            }
        }
    }
    Some(t0)
}

/// How generous picking is: a thin bar counts as hit within `base_m + per_m × distance` of the
/// ray, so a tube a few pixels wide can still be clicked (see [`ViewCamera::pick_tolerance`]).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct PickTolerance {
    /// Slack at any distance, m.
    pub base_m: f64,
    /// Extra slack per metre along the ray.
    pub per_m: f64,
}

impl PickTolerance {
    fn at(&self, t: f64) -> f64 {
        self.base_m + self.per_m * t
    }
}

/// Distance along the ray at which it hits a solid, if it does.
pub fn ray_prim(ray: &Ray, prim: &Prim, tol: &PickTolerance) -> Option<f64> {
    match *prim {
        Prim::Bar { a, b, radius } | Prim::Cone { base: a, tip: b, radius } => {
            let (t, gap) = ray_segment(ray, a, b);
            (gap <= radius + tol.at(t)).then_some(t)
        }
        Prim::Cuboid { min, max } => {
            let centre = scale(add(min, max), 0.5);
            let slack = tol.at(norm(sub(centre, ray.origin)));
            ray_box(ray, sub(min, [slack; 3]), add(max, [slack; 3]))
        }
    }
}

/// What a pick found.
#[derive(Debug, Clone, PartialEq)]
pub struct Hit {
    /// The element.
    pub element: ElementRef,
    /// The part of it that was hit.
    pub part: Part,
    /// Distance along the ray, m.
    pub distance: f64,
    /// The point hit.
    pub point: V3,
}

/// The element under a ray: the nearest solid hit, except that decks and load sheets (drawn
/// see-through) only count when nothing else is hit.
pub fn pick(shapes: &[Shape], ray: &Ray, tol: &PickTolerance) -> Option<Hit> {
    let mut best: Option<(u8, f64, &Shape)> = None;
    for s in shapes {
        let Some(t) = ray_prim(ray, &s.prim, tol) else { continue };
        let p = s.part.pick_priority();
        let better = match best {
            None => true,
            Some((bp, bt, _)) => p > bp || (p == bp && t < bt),
        };
        if better {
            best = Some((p, t, s));
        }
    }
    best.map(|(_, t, s)| Hit { element: s.element.clone(), part: s.part, distance: t, point: ray.at(t) })
}

/// Where a ray meets the horizontal plane at level `z`, if it does (in front of its start).
pub fn ray_plane_z(ray: &Ray, z: f64) -> Option<[f64; 2]> {
    if ray.dir[2].abs() < 1e-12 {
        return None;
    }
    let t = (z - ray.origin[2]) / ray.dir[2];
    (t >= 0.0).then(|| {
        let p = ray.at(t);
        [p[0], p[1]]
    })
}

/// Named viewing directions.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ViewPreset {
    /// Isometric, seen from −x, −y and above.
    Iso,
    /// Plan, looking down, +y up the screen.
    Plan,
    /// Elevation looking along +y, x to the right.
    Front,
    /// Elevation looking along −x, y to the right.
    Side,
}

impl ViewPreset {
    /// (yaw, pitch) of the eye seen from the target, degrees.
    pub fn angles(self) -> (f64, f64) {
        match self {
            // source: isometric projection — the view direction makes equal angles with the
            // three axes, elevation atan(1/√2) = 35.264°
            ViewPreset::Iso => (-135.0, 35.264_389_682_754_654),
            ViewPreset::Plan => (-90.0, 90.0),
            ViewPreset::Front => (-90.0, 0.0),
            ViewPreset::Side => (0.0, 0.0),
        }
    }
    /// Whether the preset is drawn without perspective.
    pub fn orthographic(self) -> bool {
        true
    }
}

/// The view camera: it orbits a target point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ViewCamera {
    /// Point looked at, m.
    pub target: V3,
    /// Direction of the eye from the target in plan, degrees from +x towards +y.
    pub yaw_deg: f64,
    /// Elevation of the eye above the target's horizontal plane, degrees (90 = straight down).
    pub pitch_deg: f64,
    /// Distance of the eye from the target, m. Without perspective it sets the zoom: the view
    /// is as high as a perspective view's at the target.
    pub distance: f64,
    /// Vertical field of view, degrees.
    pub fov_y_deg: f64,
    /// Parallel projection instead of perspective.
    pub orthographic: bool,
}

impl Default for ViewCamera {
    fn default() -> Self {
        ViewCamera { target: [0.0; 3], yaw_deg: -135.0, pitch_deg: 35.0, distance: 20.0, fov_y_deg: 40.0, orthographic: false }
    }
}

/// How far behind the scene a ray without perspective starts, m.
const ORTHO_BACKOFF_M: f64 = 2.0e4;

impl ViewCamera {
    /// Unit vector from the target towards the eye.
    pub fn towards_eye(&self) -> V3 {
        let (y, p) = (self.yaw_deg.to_radians(), self.pitch_deg.to_radians());
        [p.cos() * y.cos(), p.cos() * y.sin(), p.sin()]
    }
    /// The eye position.
    pub fn eye(&self) -> V3 {
        add(self.target, scale(self.towards_eye(), self.distance))
    }
    /// Screen axes in the scene: (right, up, forward), orthonormal. Right stays horizontal, so
    /// looking straight down is well defined.
    pub fn basis(&self) -> (V3, V3, V3) {
        let y = self.yaw_deg.to_radians();
        let forward = scale(self.towards_eye(), -1.0);
        let right = [-y.sin(), y.cos(), 0.0];
        let up = cross(right, forward);
        (right, up, forward)
    }
    /// Half the view height at the target, m.
    pub fn half_height(&self) -> f64 {
        self.distance * (self.fov_y_deg.to_radians() / 2.0).tan()
    }
    /// Pixel position (from the top-left corner, y down) of a point in a viewport of
    /// `size` = (width, height) pixels; `None` behind the eye.
    pub fn project(&self, p: V3, size: [f64; 2]) -> Option<[f64; 2]> {
        let (r, u, f) = self.basis();
        let v = sub(p, self.eye());
        let (x, y, z) = (dot(v, r), dot(v, u), dot(v, f));
        let aspect = size[0] / size[1];
        let (nx, ny) = if self.orthographic {
            let h = self.half_height();
            (x / (h * aspect), y / h)
        } else {
            if z <= 1e-6 {
                return None;
            }
            let t = (self.fov_y_deg.to_radians() / 2.0).tan();
            (x / (z * t * aspect), y / (z * t))
        };
        Some([(nx + 1.0) / 2.0 * size[0], (1.0 - ny) / 2.0 * size[1]])
    }
    /// The ray under a pixel (from the top-left corner) of a viewport of `size` pixels.
    pub fn ray(&self, pixel: [f64; 2], size: [f64; 2]) -> Ray {
        let (r, u, f) = self.basis();
        let aspect = size[0] / size[1];
        let nx = 2.0 * pixel[0] / size[0] - 1.0;
        let ny = 1.0 - 2.0 * pixel[1] / size[1];
        if self.orthographic {
            let h = self.half_height();
            let on_plane = add(self.target, add(scale(r, nx * h * aspect), scale(u, ny * h)));
            Ray::new(sub(on_plane, scale(f, ORTHO_BACKOFF_M)), f)
        } else {
            let t = (self.fov_y_deg.to_radians() / 2.0).tan();
            Ray::new(self.eye(), add(f, add(scale(r, nx * t * aspect), scale(u, ny * t))))
        }
    }
    /// Picking slack of about `pixels` pixels in a viewport `height` pixels high.
    pub fn pick_tolerance(&self, pixels: f64, height: f64) -> PickTolerance {
        let per_px = 2.0 * (self.fov_y_deg.to_radians() / 2.0).tan() / height;
        if self.orthographic {
            PickTolerance { base_m: pixels * 2.0 * self.half_height() / height, per_m: 0.0 }
        } else {
            PickTolerance { base_m: 0.0, per_m: pixels * per_px }
        }
    }
    /// A camera looking from `preset`'s direction that shows the whole box `lo`..`hi` in a
    /// viewport of aspect `aspect` (width ÷ height), with a small margin.
    pub fn fit(lo: V3, hi: V3, preset: ViewPreset, aspect: f64, orthographic: bool) -> ViewCamera {
        let (yaw_deg, pitch_deg) = preset.angles();
        let mut cam = ViewCamera { yaw_deg, pitch_deg, orthographic, ..ViewCamera::default() };
        cam.frame(lo, hi, aspect);
        cam
    }
    /// Keep the direction; move and zoom so the box `lo`..`hi` fills the view.
    pub fn frame(&mut self, lo: V3, hi: V3, aspect: f64) {
        let (r, u, f) = self.basis();
        let mut ext = [[f64::INFINITY, f64::NEG_INFINITY]; 3];
        for i in 0..8 {
            let c = [if i & 1 == 0 { lo[0] } else { hi[0] }, if i & 2 == 0 { lo[1] } else { hi[1] }, if i & 4 == 0 { lo[2] } else { hi[2] }];
            for (k, axis) in [r, u, f].iter().enumerate() {
                let v = dot(c, *axis);
                ext[k][0] = ext[k][0].min(v);
                ext[k][1] = ext[k][1].max(v);
            }
        }
        let mid = ext.map(|e| (e[0] + e[1]) / 2.0);
        self.target = add(add(scale(r, mid[0]), scale(u, mid[1])), scale(f, mid[2]));
        // source: a 4 % margin on each side, common practice for "fit to view", no source
        let margin = 1.08;
        let half = ((ext[1][1] - ext[1][0]) / 2.0).max((ext[0][1] - ext[0][0]) / 2.0 / aspect.max(1e-6)).max(0.5) * margin;
        let t = (self.fov_y_deg.to_radians() / 2.0).tan();
        let depth = (ext[2][1] - ext[2][0]) / 2.0;
        self.distance = if self.orthographic { half / t } else { half / t + depth };
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: f64, b: f64, tol: f64) -> bool {
        (a - b).abs() <= tol
    }

    #[test]
    fn ray_meets_a_segment_where_expected() {
        // common practice, no source: closest approach of two skew lines (x axis and the line
        // x = 2, z = 1 along y) is 1 m, at x = 2 on the first
        let ray = Ray::new([0.0, 0.0, 0.0], [1.0, 0.0, 0.0]);
        let (t, gap) = ray_segment(&ray, [2.0, -1.0, 1.0], [2.0, 1.0, 1.0]);
        assert!(close(t, 2.0, 1e-12) && close(gap, 1.0, 1e-12), "{t} {gap}");
        // Segment beyond its end: the nearest end counts.
        let (t, gap) = ray_segment(&ray, [2.0, 1.0, 0.0], [2.0, 3.0, 0.0]);
        assert!(close(t, 2.0, 1e-12) && close(gap, 1.0, 1e-12));
        // Parallel segment at distance 0.5.
        let (_, gap) = ray_segment(&ray, [3.0, 0.5, 0.0], [5.0, 0.5, 0.0]);
        assert!(close(gap, 0.5, 1e-12));
        // Behind the ray's start: measured from the start point.
        let (t, gap) = ray_segment(&ray, [-2.0, 0.0, 1.0], [-2.0, 0.0, 2.0]);
        assert!(close(t, 0.0, 1e-12) && close(gap, 5f64.sqrt(), 1e-12));
    }

    #[test]
    fn ray_enters_a_box_at_its_face() {
        // common practice, no source: slab method
        let ray = Ray::new([-5.0, 0.5, 0.5], [1.0, 0.0, 0.0]);
        assert_eq!(ray_box(&ray, [0.0; 3], [1.0; 3]), Some(5.0));
        assert_eq!(ray_box(&Ray::new([-5.0, 2.0, 0.5], [1.0, 0.0, 0.0]), [0.0; 3], [1.0; 3]), None);
        assert_eq!(ray_box(&Ray::new([0.5; 3], [0.0, 0.0, 1.0]), [0.0; 3], [1.0; 3]), Some(0.0));
        // Diagonal through the corner region: enters at x = y = 0 → t = √2 from (−1, −1).
        let t = ray_box(&Ray::new([-1.0, -1.0, 0.5], [1.0, 1.0, 0.0]), [0.0; 3], [1.0; 3]).unwrap();
        assert!(close(t, 2f64.sqrt(), 1e-12));
    }

    #[test]
    fn picking_the_demo_from_above_finds_the_post_not_the_deck() {
        // common practice, no source: a see-through deck does not hide what is under it
        let scene = crate::scene::demo::default_scene();
        let shapes = shapes(&scene, &ShapeOptions::for_scene(&scene, None), None);
        let down = Ray::new([3.0, 1.5, 50.0], [0.0, 0.0, -1.0]);
        let hit = pick(&shapes, &down, &PickTolerance::default()).unwrap();
        assert_eq!(hit.element, ElementRef::post("C2"));
        // Off every post and plan brace but over the deck: the deck (or a load sheet above it).
        let hit = pick(&shapes, &Ray::new([1.1, 0.4, 50.0], [0.0, 0.0, -1.0]), &PickTolerance::default()).unwrap();
        assert!(matches!(hit.element.kind, ElementKind::Deck | ElementKind::Load), "{hit:?}");
        // A ray beside the structure hits nothing.
        assert!(pick(&shapes, &Ray::new([30.0, 30.0, 50.0], [0.0, 0.0, -1.0]), &PickTolerance::default()).is_none());
    }

    #[test]
    fn a_horizontal_ray_at_the_base_picks_the_first_plate_it_meets() {
        // common practice, no source
        let scene = crate::scene::demo::default_scene();
        let shapes = shapes(&scene, &ShapeOptions { loads: false, ..ShapeOptions::for_scene(&scene, None) }, None);
        // Along y = 1.5 from the −x side, 5 mm above the base level: through A2's base plate first.
        let ray = Ray::new([-5.0, 1.5, 0.005], [1.0, 0.0, 0.0]);
        let hit = pick(&shapes, &ray, &PickTolerance::default()).unwrap();
        assert_eq!(hit.element, ElementRef::post("A2"));
        assert_eq!(hit.part, Part::BasePlate);
        assert!(close(hit.distance, 5.0 - 0.075, 1e-9), "{}", hit.distance);
    }

    #[test]
    fn a_thin_tube_is_picked_within_the_tolerance_only() {
        // common practice, no source
        let scene = crate::scene::demo::default_scene();
        let shapes = shapes(&scene, &ShapeOptions { loads: false, ..ShapeOptions::for_scene(&scene, None) }, None);
        // A horizontal ray passing 0.1 m beside post A1 (radius 24 mm) at mid-height.
        let ray = Ray::new([-5.0, 0.1, 1.0], [1.0, 0.0, 0.0]);
        assert!(pick(&shapes, &ray, &PickTolerance::default()).is_none_or(|h| h.element != ElementRef::post("A1")));
        let hit = pick(&shapes, &ray, &PickTolerance { base_m: 0.1, per_m: 0.0 }).unwrap();
        assert_eq!(hit.element, ElementRef::post("A1"));
    }

    #[test]
    fn projection_and_ray_are_inverse() {
        // common practice, no source: the ray under a projected point passes through it
        for ortho in [false, true] {
            let cam = ViewCamera { target: [3.0, 2.0, 1.0], yaw_deg: -120.0, pitch_deg: 30.0, distance: 15.0, fov_y_deg: 40.0, orthographic: ortho };
            let size = [1600.0, 1000.0];
            for p in [[0.0, 0.0, 0.0], [6.0, 4.5, 3.6], [3.0, 2.0, 1.0], [-1.0, 7.0, 2.0]] {
                let px = cam.project(p, size).unwrap();
                let ray = cam.ray(px, size);
                let (_, gap) = ray_segment(&ray, p, p);
                assert!(gap < 1e-6, "ortho {ortho}: {p:?} → {px:?}, miss {gap}");
            }
            // The target is in the middle of the screen.
            let c = cam.project(cam.target, size).unwrap();
            assert!(close(c[0], 800.0, 1e-6) && close(c[1], 500.0, 1e-6));
        }
    }

    #[test]
    fn plan_view_puts_north_up_and_east_right() {
        // common practice, no source: plan drawings have +y (north) up, +x (east) right
        let cam = ViewCamera::fit([0.0, 0.0, 0.0], [10.0, 5.0, 3.0], ViewPreset::Plan, 2.0, true);
        let size = [1000.0, 500.0];
        let o = cam.project([0.0, 0.0, 0.0], size).unwrap();
        let e = cam.project([10.0, 0.0, 0.0], size).unwrap();
        let n = cam.project([0.0, 5.0, 0.0], size).unwrap();
        assert!(e[0] > o[0] && close(e[1], o[1], 1e-6));
        assert!(n[1] < o[1] && close(n[0], o[0], 1e-6));
        // The box fills the width with the 4 % margin each side: 10 m over 1000 / 1.08 px.
        assert!(close(e[0] - o[0], 1000.0 / 1.08, 1e-6), "{}", e[0] - o[0]);
    }

    #[test]
    fn isometric_axes_are_equally_foreshortened() {
        // source: isometric projection — the three axes project at equal lengths, 120° apart
        let cam = ViewCamera::fit([0.0; 3], [1.0; 3], ViewPreset::Iso, 1.0, true);
        let size = [1000.0, 1000.0];
        let o = cam.project([0.0; 3], size).unwrap();
        let lens: Vec<f64> = [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]]
            .iter()
            .map(|p| {
                let q = cam.project(*p, size).unwrap();
                (q[0] - o[0]).hypot(q[1] - o[1])
            })
            .collect();
        assert!(close(lens[0], lens[1], 1e-6) && close(lens[1], lens[2], 1e-6), "{lens:?}");
    }

    #[test]
    fn fit_shows_every_corner() {
        // common practice, no source
        for preset in [ViewPreset::Iso, ViewPreset::Plan, ViewPreset::Front, ViewPreset::Side] {
            for ortho in [true, false] {
                let (lo, hi) = ([-2.0, 1.0, 0.0], [8.0, 6.0, 4.0]);
                let cam = ViewCamera::fit(lo, hi, preset, 1.6, ortho);
                let size = [1600.0, 1000.0];
                for i in 0..8 {
                    let c = [if i & 1 == 0 { lo[0] } else { hi[0] }, if i & 2 == 0 { lo[1] } else { hi[1] }, if i & 4 == 0 { lo[2] } else { hi[2] }];
                    let p = cam.project(c, size).unwrap();
                    assert!(p[0] >= -1e-6 && p[0] <= size[0] + 1e-6 && p[1] >= -1e-6 && p[1] <= size[1] + 1e-6, "{preset:?} ortho {ortho}: {c:?} at {p:?}");
                }
            }
        }
    }

    #[test]
    fn arrows_scale_with_magnitude() {
        // common practice, no source: an arrow twice as long for twice the force
        let mut scene = crate::scene::demo::default_scene();
        scene.loads.retain(|l| !matches!(l.kind, LoadKind::Notional { .. }));
        scene.loads.push(crate::scene::loads::Load::new("p1", Case::Q, LoadKind::PostTop { post: "A1".into(), kn: 2.0 }));
        scene.loads.push(crate::scene::loads::Load::new("p2", Case::Q, LoadKind::PostTop { post: "B1".into(), kn: 4.0 }));
        let opts = ShapeOptions::for_scene(&scene, None);
        let s = shapes(&scene, &opts, None);
        let len = |id: &str| -> f64 {
            s.iter()
                .filter(|x| x.element.id == id && x.part == Part::LoadArrow)
                .map(|x| match x.prim {
                    Prim::Bar { a, b, .. } | Prim::Cone { base: a, tip: b, .. } => norm(sub(b, a)),
                    Prim::Cuboid { .. } => 0.0,
                })
                .sum()
        };
        assert!(close(len("p2"), 2.0 * len("p1"), 1e-9), "{} {}", len("p1"), len("p2"));
        assert!(close(len("p2"), 4.0 * opts.arrow_m_per_kn, 1e-9));
        // The arrow's head ends on the post top.
        let tip = s.iter().find(|x| x.element.id == "p1" && matches!(x.prim, Prim::Cone { .. })).unwrap();
        let Prim::Cone { tip, .. } = tip.prim else { unreachable!() };
        assert_eq!(tip, [0.0, 0.0, 3.6]);
    }
}
