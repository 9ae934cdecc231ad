//! Carrying every load down to the base plates, one load at a time, keeping the trace.
//!
//! Each load of the scene (and the self-weight of everything, as one more permanent load) is an
//! *item*. Vertical items go deck strip → bearer → post → base plate, each member sharing its
//! load among its supports either by segment moment balance ([`crate::solve::beam`]) or as a continuous
//! beam ([`crate::solve::continuous`]); horizontal items go down the braced planes to the plates
//! ([`crate::solve::braced`]). Each item's plate reactions are kept separately, so combinations can
//! take each variable load only where it is unfavourable, and every reaction can be traced back.
//!
//! A scene whose members follow the method envelope is solved once per [`MethodPass`]
//! ([`method_passes`]): decks and bearers each take both behaviours, independently, so a deck
//! jointed at every bearer over continuous bearers is covered as well as all-simple and
//! all-continuous. [`crate::check`] then takes the worst pass at every plate.

use crate::solve::beam::{share_simple, BeamLoad, Piece};
use crate::solve::continuous::ContinuousBeam;
use crate::scene::loads::{Case, LoadKind};
use crate::solve::braced::{horizontal_items, NodeLoads};
use crate::scene::validate::{Model, Target};
use crate::solve::items::{Action, Contribution, Item, Resultant, Route, Solution, SELF_WEIGHT_ID};
use crate::solve::passes::{method_passes, Behaviour, MethodPass};

/// Why a valid scene could not be solved.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum SolveError {
    /// A single-post bearer whose loads do not balance about the post.
    #[error("bearer {bearer} rests on a single post and tips under load {load}: {moment_knm:.3} kN·m about the post is not balanced; give it a second post or balance it")]
    TeeHeadTips {
        /// Bearer id.
        bearer: String,
        /// Load id.
        load: String,
        /// Unbalanced moment, kN·m.
        moment_knm: f64,
    },
    /// Horizontal loads that cannot reach the ground through the bracing, each with its reasons.
    #[error("{}", describe_paths(problems))]
    HorizontalPath {
        /// (load id, reasons).
        problems: Vec<crate::solve::braced::PathProblem>,
    },
}

fn describe_paths(problems: &[crate::solve::braced::PathProblem]) -> String {
    let mut s = format!("{} horizontal load{} cannot reach the ground through the bracing:", problems.len(), if problems.len() == 1 { "" } else { "s" });
    for (load, reasons) in problems {
        for r in reasons {
            s.push_str(&format!("\n  - load {load}: {r}"));
        }
    }
    s
}

/// Dense per-plate accumulator that remembers which plates it touched.
struct Sparse {
    values: Vec<f64>,
    touched: Vec<u32>,
    seen: Vec<bool>,
}

impl Sparse {
    fn new(n: usize) -> Self {
        Sparse { values: vec![0.0; n], touched: Vec::new(), seen: vec![false; n] }
    }
    fn add(&mut self, i: usize, v: f64) {
        if !self.seen[i] {
            self.seen[i] = true;
            self.touched.push(i as u32);
        }
        self.values[i] += v;
    }
    fn take(&mut self) -> Vec<(u32, f64)> {
        self.touched.sort_unstable();
        let out = self.touched.iter().map(|&i| (i, self.values[i as usize])).collect();
        for &i in &self.touched {
            self.values[i as usize] = 0.0;
            self.seen[i as usize] = false;
        }
        self.touched.clear();
        out
    }
}

/// Vertical load entering each post at a level: what the notional horizontal load is made of.
struct Nodes {
    /// (post, level) of each node.
    at: Vec<(usize, f64)>,
    /// First node index of each bearer (its supports in order).
    bearer_first: Vec<usize>,
    /// First node of the post tops; post self-weight nodes follow.
    post_top_first: usize,
    /// Vertical load per node per case, kN (downwards positive).
    load: Vec<[f64; 3]>,
    /// Per case: ΣV, ΣV·x, ΣV·y, ΣV·z over the nodes, once the vertical loads are all in.
    moments: [[f64; 4]; 3],
}

impl Nodes {
    fn new(model: &Model) -> Self {
        let scene = model.scene;
        let mut at = Vec::new();
        let mut bearer_first = Vec::with_capacity(model.bearers.len());
        for (b, line) in model.bearers.iter().enumerate() {
            bearer_first.push(at.len());
            at.extend(line.posts.iter().map(|&p| (p, scene.bearers[b].level)));
        }
        let post_top_first = at.len();
        at.extend(scene.posts.iter().enumerate().map(|(i, p)| (i, p.top_level)));
        at.extend(scene.posts.iter().enumerate().map(|(i, p)| (i, 0.5 * (p.base_level + p.top_level))));
        let load = vec![[0.0; 3]; at.len()];
        Nodes { at, bearer_first, post_top_first, load, moments: [[0.0; 4]; 3] }
    }

    /// Sum the first moments of the node loads per case.
    fn sum_moments(&mut self, scene: &crate::scene::model::Scene) {
        let mut m = [[0.0; 4]; 3];
        for (&(post, z), v) in self.at.iter().zip(&self.load) {
            let p = &scene.posts[post];
            for c in 0..3 {
                m[c][0] += v[c];
                m[c][1] += v[c] * p.x;
                m[c][2] += v[c] * p.y;
                m[c][3] += v[c] * z;
            }
        }
        self.moments = m;
    }
}

/// Work buffers reused from item to item.
struct Solver<'m, 's> {
    model: &'m Model<'s>,
    plates: Sparse,
    /// Loads gathered on each bearer for the current item.
    bearer_loads: Vec<Vec<BeamLoad>>,
    bearers_touched: Vec<usize>,
    /// Reaction per (piece, support side) of the bearer being shared.
    piece_sums: Vec<[f64; 2]>,
    nodes: Nodes,
    contributions: Vec<Contribution>,
    /// Each bearer that is continuous in this pass (and has two or more posts), factorised once.
    bearer_beams: Vec<Option<ContinuousBeam>>,
    /// Each deck that is continuous in this pass, per metre of width.
    deck_beams: Vec<Option<ContinuousBeam>>,
    /// Reactions of one continuous member.
    reactions: Vec<f64>,
}

/// Carry every load of a validated scene down to the base plates, the way the scene's primary
/// method pass says (the first of [`method_passes`]).
pub fn solve(model: &Model) -> Result<Solution, SolveError> {
    let pass = method_passes(model.scene).swap_remove(0);
    solve_pass(model, pass)
}

/// One solution per method pass of the scene ([`method_passes`]), primary first.
pub fn solve_methods(model: &Model) -> Result<Vec<Solution>, SolveError> {
    method_passes(model.scene).into_iter().map(|pass| solve_pass(model, pass)).collect()
}

/// Carry every load of a validated scene down to the base plates, members behaving as `pass` says.
pub fn solve_pass(model: &Model, pass: MethodPass) -> Result<Solution, SolveError> {
    let scene = model.scene;
    let plates: Vec<[f64; 3]> = scene.posts.iter().map(|p| [p.x, p.y, p.base_level]).collect();
    let stiffness = scene.analysis.stiffness;
    // Validation guarantees increasing supports and a positive EI; a member that still fails to
    // set up (it cannot) would fall back to simple spans rather than stop the analysis.
    let bearer_beams = (0..model.bearers.len())
        .map(|b| {
            let line = &model.bearers[b];
            (pass.bearer(scene, b) == Behaviour::Continuous && line.supports.len() >= 2)
                .then(|| ContinuousBeam::new(&line.supports, stiffness.of(scene.bearers[b].role)).ok())
                .flatten()
        })
        .collect();
    let deck_beams = (0..model.decks.len())
        .map(|d| (pass.deck(scene, d) == Behaviour::Continuous).then(|| ContinuousBeam::new(&model.decks[d].supports, stiffness.deck_knm2_per_m).ok()).flatten())
        .collect();
    let mut s = Solver {
        model,
        plates: Sparse::new(plates.len()),
        bearer_loads: vec![Vec::new(); model.bearers.len()],
        bearers_touched: Vec::new(),
        piece_sums: Vec::new(),
        nodes: Nodes::new(model),
        contributions: Vec::new(),
        bearer_beams,
        deck_beams,
        reactions: Vec::new(),
    };
    // Slot 0: self-weight; slot k + 1: the scene's load k.
    let mut permanent_tee: Vec<(usize, f64, f64)> = Vec::new();
    let mut items: Vec<Option<Item>> = vec![None; scene.loads.len() + 1];

    // Self-weight of every element: one permanent item.
    {
        let mut applied = Resultant::default();
        for (d, deck) in scene.decks.iter().enumerate() {
            let (cx, cy) = deck.extent.centre();
            applied.add_down(cx, cy, deck.self_weight_kpa * deck.extent.area());
            s.deck_area(d, &deck.extent, deck.self_weight_kpa);
        }
        for (b, line) in model.bearers.iter().enumerate() {
            let w = scene.bearers[b].self_weight_kn_per_m;
            let (x, y) = line.point_at(0.5 * (line.start + line.end));
            applied.add_down(x, y, w * (line.end - line.start));
            s.push_bearer(b, BeamLoad::Uniform { from: line.start, to: line.end, w });
        }
        let item = 0;
        s.share_bearers(item, Case::G, &mut permanent_tee);
        for (i, p) in scene.posts.iter().enumerate() {
            let wt = p.self_weight_kn_per_m * (p.top_level - p.base_level);
            applied.add_down(p.x, p.y, wt);
            s.post_direct(item, i, wt, Route::PostSelfWeight, Case::G);
        }
        items[0] = Some(Item { id: SELF_WEIGHT_ID.into(), case: Case::G, applied, vertical: s.plates.take(), shear: Vec::new(), direction: None, vertical_permanent_basis: None, action: Action::Vertical, alternative: None, note: String::new() });
    }

    // Vertical loads, one item each.
    for (k, load) in scene.loads.iter().enumerate() {
        if load.kind.is_horizontal() {
            continue;
        }
        let item = (k + 1) as u32;
        let mut applied = Resultant::default();
        match (&load.kind, model.load_targets[k]) {
            (LoadKind::DeckArea { intensity, .. }, Target::Deck(d)) => {
                let q = intensity.kpa().unwrap_or(0.0);
                let e = &scene.decks[d].extent;
                let (cx, cy) = e.centre();
                applied.add_down(cx, cy, q * e.area());
                s.deck_area(d, e, q);
            }
            (LoadKind::DeckPatch { area, intensity, .. }, Target::Deck(d)) => {
                let q = intensity.kpa().unwrap_or(0.0);
                let (cx, cy) = area.centre();
                applied.add_down(cx, cy, q * area.area());
                s.deck_area(d, area, q);
            }
            (LoadKind::DeckPoint { x, y, kn, .. }, Target::Deck(d)) => {
                applied.add_down(*x, *y, *kn);
                s.deck_point(d, *x, *y, *kn);
            }
            (LoadKind::BearerPoint { at_m, kn, .. }, Target::Bearer(b)) => {
                let (x, y) = model.bearers[b].point_at(*at_m);
                applied.add_down(x, y, *kn);
                s.push_bearer(b, BeamLoad::Point { at: *at_m, p: *kn });
            }
            (LoadKind::BearerLine { from_m, to_m, kn_per_m, .. }, Target::Bearer(b)) => {
                let (x, y) = model.bearers[b].point_at(0.5 * (from_m + to_m));
                applied.add_down(x, y, kn_per_m * (to_m - from_m));
                s.push_bearer(b, BeamLoad::Uniform { from: *from_m, to: *to_m, w: *kn_per_m });
            }
            (LoadKind::PostTop { kn, .. }, Target::Post(p)) => {
                let post = &scene.posts[p];
                applied.add_down(post.x, post.y, *kn);
            }
            _ => unreachable!("validation resolves every vertical load to its element"),
        }
        if load.case == Case::G {
            s.share_bearers(item, load.case, &mut permanent_tee);
        } else {
            let mut own = Vec::new();
            s.share_bearers(item, load.case, &mut own);
            tee_head_balances(model, &own, &load.id)?;
        }
        if let (LoadKind::PostTop { kn, .. }, Target::Post(p)) = (&load.kind, model.load_targets[k]) {
            s.post_direct(item, p, *kn, Route::PostTop, load.case);
        }
        items[k + 1] = Some(Item { id: load.id.clone(), case: load.case, applied, vertical: s.plates.take(), shear: Vec::new(), direction: None, vertical_permanent_basis: None, action: Action::Vertical, alternative: None, note: String::new() });
    }

    // Permanent loads are always present together, so their moments on a T-head may cancel.
    tee_head_balances(model, &permanent_tee, "permanent load")?;

    // Horizontal loads, after the vertical ones: a notional load is a share of them.
    s.nodes.sum_moments(scene);
    let nodes = NodeLoads { at: &s.nodes.at, load: &s.nodes.load, moments: s.nodes.moments };
    let generated = horizontal_items(model, &nodes, &mut items, &mut s.contributions).map_err(|problems| SolveError::HorizontalPath { problems })?;
    let items = items.into_iter().map(|i| i.expect("every load is solved once")).chain(generated).collect();
    Ok(Solution { plates, items, contributions: s.contributions, method: pass })
}

impl Solver<'_, '_> {
    fn push_bearer(&mut self, b: usize, load: BeamLoad) {
        if self.bearer_loads[b].is_empty() {
            self.bearers_touched.push(b);
        }
        self.bearer_loads[b].push(load);
    }

    /// A uniform pressure `q` on a plan rectangle of deck `d`: each strip between bearers is a
    /// simply supported span across them; the per-metre reactions become line loads on the bearers.
    fn deck_area(&mut self, d: usize, rect: &crate::scene::model::Rect, q: f64) {
        let deck = &self.model.decks[d];
        let (along, span) = deck.split_rect(rect);
        let load = BeamLoad::Uniform { from: span.0, to: span.1, w: q };
        let mut per_metre = std::mem::take(&mut self.piece_sums);
        per_metre.clear();
        per_metre.resize(deck.bearers.len(), [0.0; 2]);
        if let Some(beam) = &mut self.deck_beams[d] {
            self.reactions.resize(deck.bearers.len(), 0.0);
            beam.share(&[load], &mut self.reactions);
            per_metre.iter_mut().zip(&self.reactions).for_each(|(m, &r)| m[0] = r);
        } else {
            share_simple(&deck.supports, &load, &mut |k, _, r| per_metre[k][0] += r);
        }
        for (k, &b) in deck.bearers.iter().enumerate() {
            let w = per_metre[k][0];
            let line = &self.model.bearers[b];
            let (p0, p1) = (along_point(deck.bearer_axis, along.0, line), along_point(deck.bearer_axis, along.1, line));
            let (a, z) = (line.distance_of(p0.0, p0.1), line.distance_of(p1.0, p1.1));
            self.push_bearer(b, BeamLoad::Uniform { from: a.min(z), to: a.max(z), w });
        }
        self.piece_sums = per_metre;
    }

    /// A point load on deck `d`, shared between the bearers either side by moment balance.
    fn deck_point(&mut self, d: usize, x: f64, y: f64, p: f64) {
        let deck = &self.model.decks[d];
        let (_, s) = deck.split(x, y);
        let load = BeamLoad::Point { at: s, p };
        let mut shares: Vec<(usize, f64)> = Vec::with_capacity(2);
        if let Some(beam) = &mut self.deck_beams[d] {
            self.reactions.resize(deck.bearers.len(), 0.0);
            beam.share(&[load], &mut self.reactions);
            shares.extend(self.reactions.iter().enumerate().filter(|(_, r)| **r != 0.0).map(|(k, &r)| (k, r)));
        } else {
            share_simple(&deck.supports, &load, &mut |k, _, r| shares.push((k, r)));
        }
        for (k, r) in shares {
            let b = deck.bearers[k];
            let at = self.model.bearers[b].distance_of(x, y);
            self.push_bearer(b, BeamLoad::Point { at, p: r });
        }
    }

    /// Share the gathered loads of every touched bearer among its posts. Single-post bearers add
    /// the moment they cannot balance to `unbalanced` as (bearer, moment, scale).
    fn share_bearers(&mut self, item: u32, case: Case, unbalanced: &mut Vec<(usize, f64, f64)>) {
        let mut touched = std::mem::take(&mut self.bearers_touched);
        touched.sort_unstable();
        for &b in &touched {
            let line = &self.model.bearers[b];
            let n = line.supports.len();
            if let Some(beam) = &mut self.bearer_beams[b] {
                // Continuous: one solve for all of this item's loads on the member.
                self.reactions.resize(n, 0.0);
                beam.share(&self.bearer_loads[b], &mut self.reactions);
                for (k, &r) in self.reactions.iter().enumerate() {
                    if r == 0.0 {
                        continue;
                    }
                    let post = line.posts[k];
                    self.plates.add(post, r);
                    self.nodes.load[self.nodes.bearer_first[b] + k][case.index()] += r;
                    self.contributions.push(Contribution { plate: post as u32, item, route: Route::Bearer { bearer: b as u32, piece: Piece::Continuous }, kn: r });
                }
                self.bearer_loads[b].clear();
                continue;
            }
            // Pieces: spans 0..n-1, then start and end overhang (or the single support).
            let mut sums = std::mem::take(&mut self.piece_sums);
            sums.clear();
            sums.resize(n + 1, [0.0; 2]);
            let mut moment = 0.0;
            let mut scale = 0.0;
            for load in &self.bearer_loads[b] {
                scale += load.total().abs() * (line.end - line.start).max(1.0);
                moment += share_simple(&line.supports, load, &mut |k, piece, r| {
                    let (slot, side) = piece_slot(piece, k, n);
                    sums[slot][side] += r;
                });
            }
            if n == 1 {
                unbalanced.push((b, moment, scale));
            }
            for (slot, pair) in sums.iter().enumerate() {
                for (side, &r) in pair.iter().enumerate() {
                    if r == 0.0 {
                        continue;
                    }
                    let (k, piece) = slot_piece(slot, side, n);
                    let post = line.posts[k];
                    self.plates.add(post, r);
                    self.nodes.load[self.nodes.bearer_first[b] + k][case.index()] += r;
                    self.contributions.push(Contribution { plate: post as u32, item, route: Route::Bearer { bearer: b as u32, piece }, kn: r });
                }
            }
            self.piece_sums = sums;
            self.bearer_loads[b].clear();
        }
        touched.clear();
        self.bearers_touched = touched;
    }

    fn post_direct(&mut self, item: u32, post: usize, kn: f64, route: Route, case: Case) {
        self.plates.add(post, kn);
        let node = match route {
            Route::PostTop => self.nodes.post_top_first + post,
            _ => self.nodes.post_top_first + self.model.scene.posts.len() + post,
        };
        self.nodes.load[node][case.index()] += kn;
        self.contributions.push(Contribution { plate: post as u32, item, route, kn });
    }
}

/// A single-post bearer must balance about its post under each load that can act alone
/// (each variable load) and under all permanent load together.
fn tee_head_balances(model: &Model, moments: &[(usize, f64, f64)], load: &str) -> Result<(), SolveError> {
    // Sum per bearer: sorted, so a scene of many T-heads costs n log n, not n².
    let mut sorted = moments.to_vec();
    sorted.sort_unstable_by_key(|e| e.0);
    for group in sorted.chunk_by(|a, b| a.0 == b.0) {
        let (m, scale) = group.iter().fold((0.0, 0.0), |(m, s), e| (m + e.1, s + e.2));
        if m.abs() > 1e-9 * f64::max(scale, 1e-9) {
            return Err(SolveError::TeeHeadTips { bearer: model.scene.bearers[group[0].0].id.clone(), load: load.to_owned(), moment_knm: m.abs() });
        }
    }
    Ok(())
}

/// Where a reaction of `piece` at support `k` is summed: (slot, side).
fn piece_slot(piece: Piece, k: usize, n: usize) -> (usize, usize) {
    match piece {
        Piece::Span(j) => (j as usize, k - j as usize),
        Piece::StartOverhang => (n - 1, k),
        Piece::EndOverhang => (n, k + 2 - n),
        Piece::Single => (0, 0),
        Piece::Continuous => unreachable!("segment moment balance reports no continuous piece"),
    }
}

/// Inverse of [`piece_slot`]: (support index, piece).
fn slot_piece(slot: usize, side: usize, n: usize) -> (usize, Piece) {
    if n == 1 {
        (0, Piece::Single)
    } else if slot < n - 1 {
        (slot + side, Piece::Span(slot as u32))
    } else if slot == n - 1 {
        (side, Piece::StartOverhang)
    } else {
        (n - 2 + side, Piece::EndOverhang)
    }
}

/// Plan point on a bearer's line at coordinate `u` along the deck's bearer axis.
fn along_point(axis: crate::scene::validate::Axis, u: f64, line: &crate::scene::validate::BearerLine) -> (f64, f64) {
    match axis {
        crate::scene::validate::Axis::X => (u, line.origin.1),
        crate::scene::validate::Axis::Y => (line.origin.0, u),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn slots_round_trip() {
        for n in 2..6 {
            for j in 0..n - 1 {
                for k in [j, j + 1] {
                    let (slot, side) = piece_slot(Piece::Span(j as u32), k, n);
                    assert_eq!(slot_piece(slot, side, n), (k, Piece::Span(j as u32)));
                }
            }
            for k in [0, 1] {
                let (slot, side) = piece_slot(Piece::StartOverhang, k, n);
                assert_eq!(slot_piece(slot, side, n), (k, Piece::StartOverhang));
            }
            for k in [n - 2, n - 1] {
                let (slot, side) = piece_slot(Piece::EndOverhang, k, n);
                assert_eq!(slot_piece(slot, side, n), (k, Piece::EndOverhang));
            }
        }
    }
}
