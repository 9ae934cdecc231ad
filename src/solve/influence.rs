//! Influence of a load placed anywhere on a deck: the reaction at every post for a unit load at
//! every point of a grid over the deck, by the same load path as the solver (deck strips, bearers,
//! continuity, lifts and transfer members), in one method pass.
//!
//! A load on the deck reaches the posts through the deck's bearers: across the span, the deck
//! puts `d[k]` of it on bearer `k`; along the bearers, that share flows down from its position on
//! the bearer. So the influence at post `p` of a load at grid point (row `i`, column `j`) is
//! `Σₖ d[i][k] · b[k][j](p)`, and only rows × bearers deck shares and bearers × columns flows are
//! solved — not one solution per grid point.

use crate::scene::validate::{Axis, Model};
use crate::solve::beam::{share_simple, BeamLoad};
use crate::solve::load_path::Solver;
use crate::solve::braced::Reactions;
use crate::solve::passes::MethodPass;

/// The plan size of what is placed: a point (both zero) or a rectangle, m.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Footprint {
    /// Size along x, m.
    pub x_m: f64,
    /// Size along y, m.
    pub y_m: f64,
}

impl Footprint {
    /// A point load.
    pub const POINT: Footprint = Footprint { x_m: 0.0, y_m: 0.0 };

    /// Whether it is a point.
    pub fn is_point(&self) -> bool {
        self.x_m <= 0.0 && self.y_m <= 0.0
    }

    /// Plan area, m².
    pub fn area(&self) -> f64 {
        self.x_m * self.y_m
    }
}

/// The grid over one deck and the influence of a unit load (1 kN, spread over the footprint) at
/// each grid point, in one method pass.
#[derive(Debug, Clone)]
pub struct DeckInfluence {
    /// Deck index.
    pub deck: usize,
    /// Grid coordinates across the bearers (the deck's span direction), m.
    pub across: Vec<f64>,
    /// Grid coordinates along the bearers, m.
    pub along: Vec<f64>,
    /// Axis the deck's bearers run along (`along` is that coordinate).
    pub bearer_axis: Axis,
    /// Bearers of the deck (indices), in span order.
    pub bearers: Vec<usize>,
    /// `d[i][k]`: share of a unit load at row `i` that goes onto bearer `bearers[k]`.
    pub d: Vec<Vec<f64>>,
    /// `flows.at(k, j)`: effect at each post (post, kN) of bearer `bearers[k]`'s share of 1 at
    /// column `j`; empty where row shares onto that bearer are all zero.
    pub flows: Flows,
    /// The notional horizontal load the unit load brings, where asked for
    /// ([`deck_influences_notional`]).
    pub notional: Option<NotionalInfluence>,
}

/// Per bearer and column of a deck's grid, a list of (post, kN): the lists one after another in
/// one store, bearer after bearer — tens of thousands of short lists, each its own allocation,
/// would cost more to make and to free than to use.
#[derive(Debug, Clone, PartialEq)]
pub struct Flows {
    columns: usize,
    /// Where each list starts in `entries` (`k · columns + j`), and the end of the last.
    start: Vec<usize>,
    entries: Vec<(u32, f64)>,
}

impl Flows {
    /// No lists yet, for a grid of `columns` columns.
    pub fn new(columns: usize) -> Self {
        Flows { columns, start: vec![0], entries: Vec::new() }
    }
    /// Add the next list (the next column, after the last column the next bearer's first).
    pub fn push(&mut self, list: &[(u32, f64)]) {
        self.entries.extend_from_slice(list);
        self.start.push(self.entries.len());
    }
    /// Room for `entries` more entries.
    pub fn reserve(&mut self, entries: usize) {
        self.entries.reserve(entries);
    }
    /// Number of entries in all lists so far.
    pub fn len(&self) -> usize {
        self.entries.len()
    }
    /// Whether no list has an entry.
    pub fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }
    /// The list of bearer `k` at column `j`.
    pub fn at(&self, k: usize, j: usize) -> &[(u32, f64)] {
        let n = k * self.columns + j;
        &self.entries[self.start[n]..self.start[n + 1]]
    }
    /// Number of bearers with their lists in.
    pub fn bearers(&self) -> usize {
        (self.start.len() - 1).checked_div(self.columns).unwrap_or(0)
    }
    /// The lists of bearer `k`, column by column.
    pub fn columns(&self, k: usize) -> impl ExactSizeIterator<Item = &[(u32, f64)]> + '_ {
        (0..self.columns).map(move |j| self.at(k, j))
    }
    /// Every bearer's lists, bearer by bearer.
    pub fn per_bearer(&self) -> impl ExactSizeIterator<Item = impl ExactSizeIterator<Item = &[(u32, f64)]> + '_> + '_ {
        (0..self.bearers()).map(move |k| self.columns(k))
    }
    /// Every entry of every list.
    pub fn all(&self) -> &[(u32, f64)] {
        &self.entries
    }
}

/// Per bearer of a deck, per node (the bearer's posts in its order), per `2·axis + way`: the effect
/// at each plate (post, kN) of 1 kN of horizontal load at the node.
pub type Routed = Vec<Vec<[Vec<(u32, f64)>; 4]>>;

/// The plate effects of the notional horizontal load a unit load on a deck brings, per unit of
/// the notional share (1 kN of horizontal force per kN of vertical load entering the posts).
#[derive(Debug, Clone)]
pub struct NotionalInfluence {
    /// `d[i][k]`: the deck shares the notional load is taken from — this pass's, or the primary
    /// pass's where this pass takes its notional load from there (members taken support by
    /// support).
    pub d: Vec<Vec<f64>>,
    /// `entries[k][j]`: the reactions of bearer `bearers[k]` at each of its posts (in its order)
    /// for its share of 1 at column `j` — the vertical load entering the posts there, on which
    /// the notional load acts; empty where the bearer takes nothing.
    pub entries: std::sync::Arc<Vec<Vec<Vec<f64>>>>,
    /// `units[k][n][2·axis + way]`: effect at each plate (post, kN; by post) of 1 kN along plan
    /// axis `axis` (0 x, 1 y) at the node where bearer `bearers[k]` sits on its `n`-th post;
    /// way 0 the lever rule between braced planes, way 1 a rigid diaphragm (the same where the
    /// bracing gives one way).
    pub units: std::sync::Arc<Routed>,
    /// `shears[k][n][2·axis + way]`: base shear at each plate (post, plan vector kN) of 1 kN along
    /// plan axis `axis` at the same node: where the bracing puts the force into the ground. The
    /// same in every method pass; empty lists where not asked for.
    pub shears: std::sync::Arc<RoutedShear>,
}

/// Per bearer of a deck, per node, per `2·axis + way`: the base shear at each plate (post, plan
/// vector kN) of 1 kN of horizontal load at the node.
pub type RoutedShear = Vec<Vec<[Vec<(u32, [f64; 2])>; 4]>>;

impl DeckInfluence {
    /// Plan point (x, y) of grid point (row `i`, column `j`).
    pub fn point(&self, i: usize, j: usize) -> (f64, f64) {
        match self.bearer_axis {
            Axis::X => (self.along[j], self.across[i]),
            Axis::Y => (self.across[i], self.along[j]),
        }
    }
}

/// Grid positions over `range` at `spacing`, the footprint (of `size` in that direction) wholly
/// inside: from the low end, every `spacing`, and the high end itself.
pub fn grid_positions(range: (f64, f64), size: f64, spacing: f64) -> Vec<f64> {
    let (lo, hi) = (range.0 + 0.5 * size, range.1 - 0.5 * size);
    if hi < lo - 1e-9 || !(spacing > 0.0) {
        return Vec::new();
    }
    let n = ((hi - lo) / spacing + 1e-9).floor() as usize;
    let mut out: Vec<f64> = (0..=n).map(|i| lo + i as f64 * spacing).collect();
    if hi - out[out.len() - 1] > 1e-6 * spacing {
        out.push(hi);
    }
    out
}

/// The influence of a unit load with `footprint` over a grid of `spacing` on deck `deck`, in
/// method pass `pass`; `None` if the footprint does not fit on the deck.
pub fn deck_influence(model: &Model, pass: &MethodPass, deck: usize, footprint: Footprint, spacing: f64) -> Option<DeckInfluence> {
    deck_influences(model, &[pass.clone()], deck, footprint, spacing).pop().flatten()
}

/// [`deck_influence`] in each of several method passes, sharing the bearer flows of the passes
/// where a bearer behaves alike.
pub fn deck_influences(model: &Model, passes: &[MethodPass], deck: usize, footprint: Footprint, spacing: f64) -> Vec<Option<DeckInfluence>> {
    let mut cache = crate::solve::arrangement::FlowCache::default();
    passes
        .iter()
        .map(|pass| {
            let mut s = Solver::new(model, pass);
            s.flow_cache = std::mem::take(&mut cache);
            let out = s.deck_influence(deck, footprint, spacing);
            cache = std::mem::take(&mut s.flow_cache);
            out
        })
        .collect()
}

/// The load on bearer `b` of deck `deck` of a unit load (spread over `size_along`) at position
/// `a` along the bearers.
fn column_load(model: &Model, deck: usize, b: usize, a: f64, size_along: f64) -> BeamLoad {
    let line = &model.decks[deck];
    let bl = &model.bearers[b];
    let on_line = |u: f64| {
        let p = match line.bearer_axis {
            Axis::X => (u, bl.origin.1),
            Axis::Y => (bl.origin.0, u),
        };
        bl.distance_of(p.0, p.1)
    };
    if size_along <= 0.0 {
        BeamLoad::Point { at: on_line(a), p: 1.0 }
    } else {
        let (u, v) = (on_line(a - 0.5 * size_along), on_line(a + 0.5 * size_along));
        BeamLoad::Uniform { from: u.min(v), to: u.max(v), w: 1.0 / size_along }
    }
}

/// [`deck_influences`] with the notional horizontal load the unit load brings
/// ([`DeckInfluence::notional`]), worked out the way the solver applies it: a horizontal force at
/// every node where the load enters a post (its bearers' reactions at their posts), carried down
/// the bracing, the vertical components of the brace forces routed to the plates. `Err` with the
/// reasons where the bracing cannot carry a horizontal force from a node of the deck's bearers.
/// Only the plan axes in `axes` (x, y) are worked out; the others are left empty; the base
/// shears only where `shears` asks for them (to check sliding).
pub fn deck_influences_notional(model: &Model, passes: &[MethodPass], deck: usize, footprint: Footprint, spacing: f64, axes: [bool; 2], shears: bool) -> Result<Vec<Option<DeckInfluence>>, Vec<String>> {
    let net = crate::solve::load_path::notional_network(model);
    let line = &model.decks[deck];
    // Nodes of the deck: each bearer's posts at the bearer's level.
    let mut fails = Vec::new();
    let nodes: Vec<Vec<(u32, f64)>> = line.bearers.iter().map(|&b| model.bearers[b].posts.iter().map(|&p| (p as u32, model.scene.bearers[b].level)).collect()).collect();
    // Per node and axis: the brace components entering the posts, each way. Nodes are
    // independent: bearer by bearer side by side, the failures kept in bearer order.
    // One accumulation and per-post store per core, emptied between loads: a new one per load
    // would zero a list as long as the posts for a handful of entries.
    let per_bearer = crate::workers::in_order(nodes.len(), || (net.acc(), vec![0.0; model.scene.posts.len()]), |k, (acc, vertical)| {
        let mut fails = Vec::new();
        let mut per = Vec::with_capacity(nodes[k].len());
        for &(post, level) in &nodes[k] {
            let mut both: [Vec<Reactions>; 2] = Default::default();
            for (axis, slot) in both.iter_mut().enumerate() {
                if !axes[axis] {
                    continue;
                }
                acc.clear();
                let dir = if axis == 0 { [1.0, 0.0] } else { [0.0, 1.0] };
                net.post_load(acc, &mut fails, post, BeamLoad::Point { at: level, p: 1.0 }, dir);
                let ways = if net.two_ways(acc) { 2 } else { 1 };
                *slot = net.finish_with(acc, &mut fails, ways, shears, vertical);
            }
            per.push(both);
        }
        (per, fails)
    });
    let mut raw: Vec<Vec<[Vec<Reactions>; 2]>> = Vec::with_capacity(nodes.len());
    for (per, failed) in per_bearer {
        raw.push(per);
        fails.extend(failed);
    }
    if !fails.is_empty() {
        return Err(net.describe(&fails));
    }
    let (size_along, size_across) = match line.bearer_axis {
        Axis::X => (footprint.x_m, footprint.y_m),
        Axis::Y => (footprint.y_m, footprint.x_m),
    };
    // Base shears go straight into the plates the bracing reaches down to.
    let shears: std::sync::Arc<RoutedShear> = std::sync::Arc::new(
        raw.iter()
            .map(|per| {
                per.iter()
                    .map(|both| {
                        let mut four: [Vec<(u32, [f64; 2])>; 4] = Default::default();
                        for axis in 0..2 {
                            for way in 0..2 {
                                let sets = &both[axis];
                                if let Some(set) = sets.get(way.min(sets.len().saturating_sub(1))) {
                                    four[2 * axis + way] = set.shear.clone();
                                }
                            }
                        }
                        four
                    })
                    .collect()
            })
            .collect(),
    );
    // The unit responses routed to the plates: [k][node][2·axis + way].
    let route_bearer = |s: &mut Solver, per: &[[Vec<Reactions>; 2]]| -> Vec<[Vec<(u32, f64)>; 4]> {
        per.iter()
            .map(|both| {
                let mut four: [Vec<(u32, f64)>; 4] = Default::default();
                for axis in 0..2 {
                    for way in 0..2 {
                        let sets = &both[axis];
                        if let Some(set) = sets.get(way.min(sets.len().saturating_sub(1))) {
                            four[2 * axis + way] = s.to_plates(&set.vertical);
                        }
                    }
                }
                four
            })
            .collect()
    };
    let route = |s: &mut Solver| -> Routed { raw.iter().map(|per| route_bearer(s, per)).collect() };
    // Entry reactions at each bearer's posts for its share of 1 at each column, with the deck
    // shares `d` they go with. `like`: those of a pass whose bearers behave alike, taken where
    // they were worked out (the same load on the same bearer model).
    let entries_of = |s: &mut Solver, d: &[Vec<f64>], along: &[f64], like: Option<&[Vec<Vec<f64>>]>| -> Vec<Vec<Vec<f64>>> {
        line.bearers
            .iter()
            .enumerate()
            .map(|(k, &b)| {
                let used = d.iter().any(|row| row[k] != 0.0);
                if let Some(kept) = like.and_then(|l| l.get(k)).filter(|c| used && c.len() == along.len() && c.iter().all(|e| !e.is_empty())) {
                    return kept.clone();
                }
                along
                    .iter()
                    .map(|&a| {
                        let mut e = Vec::new();
                        if used {
                            s.bearer_entries(b, column_load(model, deck, b, a, size_along), &mut e);
                        }
                        e
                    })
                    .collect()
            })
            .collect()
    };
    // Where every post reaches its plate through splices alone the routing is the same in every
    // pass; passes that are not one state take their notional load from the primary pass's
    // entries, the same for each of them: both worked out once. Where the primary pass is one
    // state itself, its own entries are those (taken from it below).
    let all_spliced = (0..model.scene.posts.len()).all(|p| model.graph.spliced_base(p).is_some());
    // Spliced posts pass their load straight down whatever the solver: bearer by bearer side by side.
    let routed_once = all_spliced.then(|| std::sync::Arc::new(crate::workers::in_order(raw.len(), || Solver::new(model, &passes[0]), |k, s| route_bearer(s, &raw[k]))));
    let from_primary = passes[0].is_one_state();
    let primary_entries = (!from_primary && !passes.iter().all(MethodPass::is_one_state)).then(|| {
        let mut primary = Solver::new(model, &passes[0]);
        let extent = model.scene.decks[deck].extent;
        let (along_range, span_range) = line.split_rect(&extent);
        let across = grid_positions(span_range, size_across, spacing);
        let along = grid_positions(along_range, size_along, spacing);
        let d = primary.deck_shares(deck, &across, size_across, footprint);
        let entries = std::sync::Arc::new(entries_of(&mut primary, &d, &along, None));
        (d, entries)
    });
    // One pass: its grid, flows and notional coefficients.
    let one_pass = |pass: &MethodPass, cache: &mut crate::solve::arrangement::FlowCache, like: Option<&[Vec<Vec<f64>>]>| -> Option<DeckInfluence> {
        let mut s = Solver::new(model, pass);
        s.flow_cache = std::mem::take(cache);
        let inf = s.deck_influence(deck, footprint, spacing);
        let result = inf.map(|mut inf| {
            let routed = routed_once.clone().unwrap_or_else(|| std::sync::Arc::new(route(&mut s)));
            let (d, entries) = match (&primary_entries, pass.is_one_state()) {
                (Some(kept), false) => kept.clone(),
                (None, false) if from_primary => (Vec::new(), std::sync::Arc::new(Vec::new())),
                _ => {
                    let d = inf.d.clone();
                    let entries = std::sync::Arc::new(entries_of(&mut s, &d, &inf.along, like));
                    (d, entries)
                }
            };
            inf.notional = Some(NotionalInfluence { d, entries, units: routed, shears: shears.clone() });
            inf
        });
        *cache = std::mem::take(&mut s.flow_cache);
        result
    };
    // Passes are independent: worked out side by side, each worker keeping its own flow cache.
    // Passes whose bearers behave alike go to the same worker, one after the other, so that the
    // later ones find the bearer flows in its cache.
    let mut alike: Vec<Vec<usize>> = Vec::new();
    for (m, pass) in passes.iter().enumerate() {
        match alike.iter_mut().find(|g| passes[g[0]].bearers == pass.bearers) {
            Some(g) => g.push(m),
            None => alike.push(vec![m]),
        }
    }
    let done = crate::workers::in_order(alike.len(), crate::solve::arrangement::FlowCache::default, |g, cache| {
        let mut worked: Vec<(usize, Option<DeckInfluence>)> = Vec::with_capacity(alike[g].len());
        for &m in &alike[g] {
            // The entries of the group's first pass that worked them out itself.
            let like = worked.iter().filter(|(e, _)| passes[*e].is_one_state()).find_map(|(_, inf)| inf.as_ref()?.notional.as_ref()).map(|n| n.entries.clone());
            worked.push((m, one_pass(&passes[m], cache, like.as_deref().map(Vec::as_slice))));
        }
        worked
    });
    let mut out: Vec<Option<DeckInfluence>> = (0..passes.len()).map(|_| None).collect();
    for (m, inf) in done.into_iter().flatten() {
        out[m] = inf;
    }
    // The primary pass's deck shares and entries for the passes that are not one state (every
    // pass has a grid or none does: the grid depends on the deck and footprint alone).
    if from_primary && let Some(primary) = out[0].as_ref().and_then(|inf| inf.notional.as_ref()).map(|n| (n.d.clone(), n.entries.clone())) {
        for (m, inf) in out.iter_mut().enumerate() {
            if let Some(n) = inf.as_mut().and_then(|inf| inf.notional.as_mut()).filter(|_| !passes[m].is_one_state()) {
                (n.d, n.entries) = primary.clone();
            }
        }
    }
    // Passes whose routing or entry reactions came out the same, bit for bit, share one copy:
    // what uses the coefficients can then tell that they reach the plates alike.
    for m in 1..out.len() {
        let (earlier, rest) = out.split_at_mut(m);
        let Some(n) = rest[0].as_mut().and_then(|inf| inf.notional.as_mut()) else { continue };
        for e in earlier.iter().flatten().filter_map(|inf| inf.notional.as_ref()) {
            if !std::sync::Arc::ptr_eq(&n.units, &e.units) && same_routed(&n.units, &e.units) {
                n.units = e.units.clone();
            }
            if !std::sync::Arc::ptr_eq(&n.entries, &e.entries) && same_bits(&n.entries, &e.entries) {
                n.entries = e.entries.clone();
            }
        }
    }
    Ok(out)
}

/// Whether two sets of entry reactions are the same, bit for bit.
fn same_bits(a: &[Vec<Vec<f64>>], b: &[Vec<Vec<f64>>]) -> bool {
    a.len() == b.len()
        && a.iter().zip(b).all(|(x, y)| x.len() == y.len() && x.iter().zip(y).all(|(u, v)| u.len() == v.len() && u.iter().zip(v).all(|(p, q)| p.to_bits() == q.to_bits())))
}

/// Whether two routings are the same, bit for bit.
fn same_routed(a: &Routed, b: &Routed) -> bool {
    let same = |u: &[(u32, f64)], v: &[(u32, f64)]| u.len() == v.len() && u.iter().zip(v).all(|(p, q)| p.0 == q.0 && p.1.to_bits() == q.1.to_bits());
    a.len() == b.len() && a.iter().zip(b).all(|(x, y)| x.len() == y.len() && x.iter().zip(y).all(|(u, v)| u.iter().zip(v).all(|(p, q)| same(p, q))))
}

impl Solver<'_, '_> {
    /// The deck's share of a unit load at each row onto each bearer, as kN/m of bearer per kN
    /// (rectangle: a strip of pressure 1 / area) or kN per kN (point).
    fn deck_shares(&mut self, deck: usize, across: &[f64], size_across: f64, footprint: Footprint) -> Vec<Vec<f64>> {
        let line = &self.model.decks[deck];
        let nk = line.bearers.len();
        let mut d = Vec::with_capacity(across.len());
        for &c in across {
            let load = if footprint.is_point() || size_across <= 0.0 {
                BeamLoad::Point { at: c, p: 1.0 }
            } else {
                BeamLoad::Uniform { from: c - 0.5 * size_across, to: c + 0.5 * size_across, w: 1.0 / size_across }
            };
            let mut row = vec![0.0; nk];
            if let Some(beam) = &mut self.deck_beams[deck] {
                beam.share(&[load], &mut row);
            } else {
                share_simple(&line.supports, &load, &mut |k, _, r| row[k] += r);
            }
            d.push(row);
        }
        d
    }

    /// The reactions of bearer `b` at each of its posts for `load` on it: where the load enters
    /// the posts.
    fn bearer_entries(&mut self, b: usize, load: BeamLoad, out: &mut Vec<f64>) {
        let line = &self.model.bearers[b];
        let n = line.posts.len();
        out.clear();
        out.resize(n, 0.0);
        if let Some(beam) = &mut self.bearer_beams[b] {
            self.reactions.resize(n, 0.0);
            beam.share(&[load], &mut self.reactions);
            out.copy_from_slice(&self.reactions[..n]);
        } else {
            share_simple(&line.supports, &load, &mut |k, _, r| out[k] += r);
        }
    }

    /// Loads entering posts (post, kN) carried down to the plates, as the solver routes brace
    /// components; sorted by post.
    fn to_plates(&mut self, vertical: &[(u32, f64)]) -> Vec<(u32, f64)> {
        let graph = &self.model.graph;
        // Posts that reach their plate through splices alone pass the load straight down, the
        // same in every method pass; only those on members go through the load path.
        let mut out: Vec<(u32, f64)> = vertical.iter().filter_map(|&(post, kn)| graph.spliced_base(post as usize).map(|base| (base as u32, kn))).filter(|e| e.1 != 0.0).collect();
        if vertical.iter().any(|&(post, _)| graph.spliced_base(post as usize).is_none()) {
            let was = self.record;
            self.record = false;
            for &(post, kn) in vertical.iter().filter(|&&(post, _)| graph.spliced_base(post as usize).is_none()) {
                self.post_direct(0, post as usize, kn, crate::solve::items::Route::Bracing, crate::scene::loads::Case::W);
            }
            self.flow(0, crate::scene::loads::Case::W);
            let t = self.take_item(crate::solve::items::Item::new(String::new(), crate::scene::loads::Case::W, crate::solve::items::Resultant::default()));
            self.record = was;
            self.unbalanced.clear();
            out.extend(t.vertical.into_iter().filter(|e| e.1 != 0.0));
        }
        out.sort_unstable_by_key(|e| e.0);
        // One entry per plate.
        out.dedup_by(|later, first| {
            let same = later.0 == first.0;
            if same {
                first.1 += later.1;
            }
            same
        });
        out
    }

    fn deck_influence(&mut self, deck: usize, footprint: Footprint, spacing: f64) -> Option<DeckInfluence> {
        let model = self.model;
        let line = &model.decks[deck];
        let extent = model.scene.decks[deck].extent;
        let (along_range, span_range) = line.split_rect(&extent);
        let (size_along, size_across) = match line.bearer_axis {
            Axis::X => (footprint.x_m, footprint.y_m),
            Axis::Y => (footprint.y_m, footprint.x_m),
        };
        let across = grid_positions(span_range, size_across, spacing);
        let along = grid_positions(along_range, size_along, spacing);
        if across.is_empty() || along.is_empty() {
            return None;
        }
        let d = self.deck_shares(deck, &across, size_across, footprint);
        // Along: each bearer's share carried down from each column.
        let mut flows = Flows::new(along.len());
        let mut reserved = false;
        let mut buffer = Vec::new();
        for (k, &b) in line.bearers.iter().enumerate() {
            let used = d.iter().any(|row| row[k] != 0.0);
            for &a in &along {
                if !used {
                    flows.push(&[]);
                    continue;
                }
                let load = column_load(model, deck, b, a, size_along);
                buffer.clear();
                let flow = self.load_flow(b, load, &mut buffer);
                flows.push(&buffer[flow.entries]);
            }
            // Bearers of one deck reach about as many posts each: room for the rest at once,
            // rather than the store grown and copied again and again.
            if used && !reserved {
                reserved = true;
                let rest = line.bearers.len() - k - 1;
                flows.reserve(flows.len() * rest + flows.len() * rest / 4);
            }
        }
        Some(DeckInfluence { deck, across, along, bearer_axis: line.bearer_axis, bearers: line.bearers.clone(), d, flows, notional: None })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn grid_keeps_the_footprint_on_the_deck() {
        // common practice, no source
        assert_eq!(grid_positions((0.0, 1.0), 0.0, 0.25), vec![0.0, 0.25, 0.5, 0.75, 1.0]);
        assert_eq!(grid_positions((0.0, 1.0), 0.5, 0.25), vec![0.25, 0.5, 0.75]);
        assert_eq!(grid_positions((0.0, 1.1), 0.0, 0.5), vec![0.0, 0.5, 1.0, 1.1]);
        assert!(grid_positions((0.0, 1.0), 1.2, 0.25).is_empty(), "a footprint larger than the deck fits nowhere");
        assert!(grid_positions((0.0, 1.0), 0.0, 0.0).is_empty());
    }
}
