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

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use crate::scene::standing::{Member, StandsOn};
use crate::solve::beam::{share_simple, BeamLoad, Piece};
use crate::solve::continuous::{JointedBeam, TwoSpanLocal};
use crate::solve::arrangement::FlowCache;
use crate::solve::passes::Behaviour;
use crate::scene::loads::{Case, Intensity, KentledgePlace, LoadKind};
use crate::solve::braced::{horizontal_items, route_item, Network, NodeLoads};
use crate::scene::validate::{Model, Target};
use crate::solve::items::{Contribution, Item, Resultant, Route, Solution, SELF_WEIGHT_ID};
use crate::solve::passes::{method_passes, MethodPass};
use crate::solve::tee_heads::{TeeHeadTips, TeeHeads};

/// Why a valid scene could not be solved.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum SolveError {
    /// A single-post bearer whose loads do not balance about the post.
    #[error("{0}")]
    TeeHeadTips(#[from] TeeHeadTips),
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

/// Where a load on a member came from: applied to it directly, or passed on by a post standing on
/// it (or on a deck over it).
pub(super) type Source = Option<u32>;

/// Work buffers reused from item to item: the loads gathered on each member for the current flow
/// and the members waiting to pass them on, in top-down order.
pub(super) struct Solver<'m, 's> {
    pub(super) model: &'m Model<'s>,
    /// Loads gathered on each bearer for the current flow, with where each came from.
    bearer_loads: Vec<Vec<(BeamLoad, Source)>>,
    /// Load entering each post for the current flow, kN downwards.
    post_load: Vec<f64>,
    /// Members waiting to pass their loads on, by rank in the top-down order.
    queue: BinaryHeap<Reverse<u32>>,
    queued: Vec<bool>,
    /// Plate reactions and loads passed on at post bases of the current flow: (post, kN).
    pub(super) bases: Vec<(u32, f64)>,
    pub(super) internal: Vec<(u32, f64)>,
    /// Whether the current flow records its trace and the notional-load nodes (real load items
    /// do; the unit flows of the arrangement analysis do not).
    pub(super) record: bool,
    /// Reaction per (piece, support side) of the bearer being shared.
    piece_sums: Vec<[f64; 2]>,
    nodes: Nodes,
    contributions: Vec<Contribution>,
    /// Each bearer that is continuous in this pass (and has two or more posts), factorised once.
    pub(super) bearer_beams: Vec<Option<MemberBeam>>,
    /// Each deck that is continuous in this pass, per metre of width.
    pub(super) deck_beams: Vec<Option<MemberBeam>>,
    /// Reactions of one continuous member.
    pub(super) reactions: Vec<f64>,
    /// Single-post bearers' unbalanced moments of the current flow: (bearer, moment, scale).
    pub(super) unbalanced: Vec<(usize, f64, f64)>,
    /// Behaviour of each bearer in this pass.
    pub(super) bearer_behaviour: Vec<Behaviour>,
    /// Unit flows kept from earlier passes.
    pub(super) flow_cache: FlowCache,
    /// Entries of the unit flows of one arranged load, reused from load to load.
    pub(super) flow_buffer: Vec<(u32, f64)>,
    /// Single-post bearers' moments under the last arranged load, each way.
    pub(super) arranged_tee: Vec<crate::solve::arrangement::ArrangedTee>,
}

/// Carry every load of a validated scene down to the base plates, the way the scene's primary
/// method pass says (the first of [`method_passes`]).
pub fn solve(model: &Model) -> Result<Solution, SolveError> {
    let pass = method_passes(model.scene).swap_remove(0);
    solve_pass(model, pass)
}

/// One solution per method pass of the scene ([`method_passes`]), primary first. The bracing is
/// prepared once for them all.
pub fn solve_methods(model: &Model) -> Result<Vec<Solution>, SolveError> {
    let net = Network::new(model, &Nodes::new(model).at);
    // Unit flows of the arranged loads are shared by the passes where a bearer behaves alike.
    let mut cache = FlowCache::default();
    let mut primary_nodes: Option<NodeSnapshot> = None;
    let mut out = Vec::new();
    for pass in method_passes(model.scene) {
        let (solution, nodes) = solve_pass_with(model, pass, &net, &mut cache, primary_nodes.as_ref())?;
        primary_nodes.get_or_insert(nodes);
        out.push(solution);
    }
    Ok(out)
}

/// The bracing of a model prepared for notional load at every node where vertical load enters a
/// post, as the solver prepares it.
pub(crate) fn notional_network<'m, 's>(model: &'m Model<'s>) -> Network<'m, 's> {
    Network::new(model, &Nodes::new(model).at)
}

/// Carry every load of a validated scene down to the base plates, members behaving as `pass` says.
pub fn solve_pass(model: &Model, pass: MethodPass) -> Result<Solution, SolveError> {
    let net = Network::new(model, &Nodes::new(model).at);
    let mut cache = FlowCache::default();
    // A pass of local models takes its notional load from the primary pass (see below).
    let primary = if pass.is_one_state() { None } else { Some(solve_pass_with(model, method_passes(model.scene).swap_remove(0), &net, &mut cache, None)?.1) };
    Ok(solve_pass_with(model, pass, &net, &mut cache, primary.as_ref())?.0)
}

/// The vertical load entering each notional-load node per case, and its first moments.
type NodeSnapshot = (Vec<[f64; 3]>, [[f64; 4]; 3]);

fn solve_pass_with(model: &Model, pass: MethodPass, net: &Network, cache: &mut FlowCache, primary_nodes: Option<&NodeSnapshot>) -> Result<(Solution, NodeSnapshot), SolveError> {
    let scene = model.scene;
    let plates: Vec<[f64; 3]> = scene.posts.iter().map(|p| [p.x, p.y, p.base_level]).collect();
    let is_plate: Vec<bool> = (0..scene.posts.len()).map(|p| model.graph.is_plate(p)).collect();
    let mut s = Solver::new(model, &pass);
    s.flow_cache = std::mem::take(cache);
    let solved = solve_with(&mut s, model, pass, net, plates, is_plate, primary_nodes);
    *cache = std::mem::take(&mut s.flow_cache);
    Ok((solved?, (std::mem::take(&mut s.nodes.load), s.nodes.moments)))
}

fn solve_with(s: &mut Solver, model: &Model, pass: MethodPass, net: &Network, plates: Vec<[f64; 3]>, is_plate: Vec<bool>, primary_nodes: Option<&NodeSnapshot>) -> Result<Solution, SolveError> {
    let scene = model.scene;
    // Slot 0: self-weight; slot k + 1: the scene's load k.
    let mut heads = TeeHeads::default();
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
            s.push_bearer(b, BeamLoad::Uniform { from: line.start, to: line.end, w }, None);
        }
        let item = 0;
        for (i, p) in scene.posts.iter().enumerate() {
            let wt = p.self_weight_kn_per_m * (p.top_level - p.base_level);
            applied.add_down(p.x, p.y, wt);
            s.post_direct(item, i, wt, Route::PostSelfWeight, Case::G);
        }
        s.flow(item, Case::G);
        heads.permanent(&s.unbalanced);
        s.unbalanced.clear();
        items[0] = Some(s.take_item(Item::new(SELF_WEIGHT_ID, Case::G, applied)));
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
                s.deck_point(d, *x, *y, *kn, None);
            }
            (LoadKind::BearerPoint { at_m, kn, .. }, Target::Bearer(b)) => {
                let (x, y) = model.bearers[b].point_at(*at_m);
                applied.add_down(x, y, *kn);
                s.push_bearer(b, BeamLoad::Point { at: *at_m, p: *kn }, None);
            }
            (LoadKind::BearerLine { from_m, to_m, kn_per_m, .. }, Target::Bearer(b)) => {
                let (x, y) = model.bearers[b].point_at(0.5 * (from_m + to_m));
                applied.add_down(x, y, kn_per_m * (to_m - from_m));
                s.push_bearer(b, BeamLoad::Uniform { from: *from_m, to: *to_m, w: *kn_per_m }, None);
            }
            (LoadKind::PostTop { kn, .. }, Target::Post(p)) => {
                let post = &scene.posts[p];
                applied.add_down(post.x, post.y, *kn);
                s.post_direct(item, p, *kn, Route::PostTop, load.case);
            }
            (LoadKind::Kentledge { on: KentledgePlace::Plates(_), kn, .. }, _) => {
                // Straight onto the plates, at base level: no member carries it and it does not
                // lean with the structure, so it adds nothing to a notional horizontal load.
                let on = &model.load_posts[k];
                for &p in on {
                    let post = &scene.posts[p];
                    let share = kn / on.len() as f64;
                    applied.add_down(post.x, post.y, share);
                    s.post_direct(item, p, share, Route::Kentledge, load.case);
                }
            }
            (LoadKind::Kentledge { on: KentledgePlace::Deck { x, y, .. }, kn, .. }, Target::Deck(d)) => {
                applied.add_down(*x, *y, *kn);
                s.deck_point(d, *x, *y, *kn, None);
            }
            _ => unreachable!("validation resolves every vertical load to its element"),
        }
        s.flow(item, load.case);
        let mut it = s.take_item(Item::new(load.id.clone(), load.case, applied));
        it.arranged = s.arrange(load, model.load_targets[k]);
        if let (Case::Q, Target::Deck(d), LoadKind::DeckArea { intensity, .. } | LoadKind::DeckPatch { intensity, .. }) = (load.case, model.load_targets[k], &load.kind) {
            if matches!(intensity, Intensity::LoadClassUniform(_) | Intensity::LoadClassPartial(_)) {
                it.working_level = Some(scene.decks[d].level);
            }
        }
        if load.case == Case::G {
            heads.permanent(&s.unbalanced);
        } else if it.arranged.is_some() {
            // Arranged: one arm may be loaded alone, each way counts on its own.
            for t in std::mem::take(&mut s.arranged_tee) {
                heads.variable(t.bearer, t.one_way_knm, t.other_way_knm, t.scale, &load.id);
            }
        } else {
            for (b, m, scale) in sum_per_bearer(&s.unbalanced) {
                heads.variable(b, m, 0.0, scale, &load.id);
            }
        }
        s.unbalanced.clear();
        s.arranged_tee.clear();
        items[k + 1] = Some(it);
    }

    // Permanent loads act together; each variable load may act alone, on either arm.
    let head_moments = heads.check(model)?;

    // Horizontal loads, after the vertical ones: a notional load is a share of them. They go down
    // the braced planes; the vertical components of the brace forces enter the posts at their
    // nodes and flow down to the plates like any other load.
    s.nodes.sum_moments(scene);
    // A pass that takes each support's reaction from its own local model (two-span continuity
    // support by support) puts more load into the posts than is applied, by design. The notional
    // load is a share of the load applied, so such a pass takes its node loads from the primary
    // pass (simple spans, which balances exactly); each pass routes them down its own way.
    let (node_load, node_moments) = match primary_nodes {
        Some((load, moments)) if !pass.is_one_state() => (load.as_slice(), *moments),
        _ => (s.nodes.load.as_slice(), s.nodes.moments),
    };
    let nodes = NodeLoads { at: &s.nodes.at, load: node_load, moments: node_moments };
    let horizontal = horizontal_items(model, net, &nodes).map_err(|problems| SolveError::HorizontalPath { problems })?;
    // Horizontal loads fill their slots below.
    let mut items: Vec<Item> = items.into_iter().map(|i| i.unwrap_or_else(|| Item::new(String::new(), Case::W, Resultant::default()))).collect();
    for h in horizontal {
        match h.slot {
            Some(k) => {
                let it = route_item(s, (k + 1) as u32, h);
                items[k + 1] = it;
            }
            None => {
                let it = route_item(s, items.len() as u32, h);
                items.push(it);
            }
        }
    }
    let local_residual = s.bearer_beams.iter().chain(&s.deck_beams).flatten().map(MemberBeam::worst_residual).fold(0.0, f64::max);
    Ok(Solution { plates, is_plate, items, contributions: std::mem::take(&mut s.contributions), method: pass, head_moments, local_residual })
}

impl<'m, 's> Solver<'m, 's> {
    pub(super) fn new(model: &'m Model<'s>, pass: &MethodPass) -> Self {
        let scene = model.scene;
        let stiffness = scene.analysis.stiffness;
        // Validation guarantees increasing supports and a positive EI; a member that still fails
        // to set up (it cannot) would fall back to simple spans rather than stop the analysis.
        let bearer_beams = (0..model.bearers.len())
            .map(|b| {
                let line = &model.bearers[b];
                (line.supports.len() >= 2).then(|| MemberBeam::new(pass.bearer(scene, b), &line.supports, stiffness.of(scene.bearers[b].role), line.joints.as_deref())).flatten()
            })
            .collect();
        let deck_beams = (0..model.decks.len())
            .map(|d| {
                let line = &model.decks[d];
                MemberBeam::new(pass.deck(scene, d), &line.supports, stiffness.deck_knm2_per_m, line.joints.as_deref())
            })
            .collect();
        let members = model.graph.order.len();
        Solver {
            model,
            bearer_loads: vec![Vec::new(); model.bearers.len()],
            post_load: vec![0.0; scene.posts.len()],
            queue: BinaryHeap::new(),
            queued: vec![false; members],
            bases: Vec::new(),
            internal: Vec::new(),
            record: true,
            piece_sums: Vec::new(),
            nodes: Nodes::new(model),
            contributions: Vec::new(),
            bearer_beams,
            deck_beams,
            reactions: Vec::new(),
            unbalanced: Vec::new(),
            arranged_tee: Vec::new(),
            bearer_behaviour: (0..model.bearers.len()).map(|b| pass.bearer(scene, b)).collect(),
            flow_cache: FlowCache::default(),
            flow_buffer: Vec::new(),
        }
    }

    /// The trace of the current solution, to add shares to.
    pub(super) fn contributions_mut(&mut self) -> &mut Vec<Contribution> {
        &mut self.contributions
    }

    /// Put a member in line to pass its loads on.
    pub(super) fn enqueue(&mut self, m: Member) {
        let rank = self.model.graph.rank(m);
        if !self.queued[rank as usize] {
            self.queued[rank as usize] = true;
            self.queue.push(Reverse(rank));
        }
    }

    pub(super) fn push_bearer(&mut self, b: usize, load: BeamLoad, from: Source) {
        self.bearer_loads[b].push((load, from));
        self.enqueue(Member::Bearer(b));
    }

    /// Load `kn` entering post `post` by `route`.
    pub(super) fn post_direct(&mut self, item: u32, post: usize, kn: f64, route: Route, case: Case) {
        self.post_load[post] += kn;
        self.enqueue(Member::Post(post));
        if self.record {
            let node = match route {
                Route::PostTop => Some(self.nodes.post_top_first + post),
                Route::PostSelfWeight => Some(self.nodes.post_top_first + self.model.scene.posts.len() + post),
                _ => None,
            };
            if let Some(node) = node {
                self.nodes.load[node][case.index()] += kn;
            }
            self.contributions.push(Contribution { post: post as u32, item, route, kn });
        }
    }

    /// Pass every gathered load down, member by member in the top-down order, until it reaches
    /// the base plates.
    pub(super) fn flow(&mut self, item: u32, case: Case) {
        while let Some(Reverse(rank)) = self.queue.pop() {
            self.queued[rank as usize] = false;
            match self.model.graph.order[rank as usize] {
                Member::Bearer(b) => self.share_bearer(b, item, case),
                Member::Post(p) => self.pass_post(p, item),
                // Decks pass their loads to their bearers as the loads arrive.
                Member::Deck(_) => {}
            }
        }
    }

    /// The item with what the last flow put on the plates and passed on at post bases.
    pub(super) fn take_item(&mut self, mut item: Item) -> Item {
        self.bases.sort_unstable_by_key(|e| e.0);
        self.internal.sort_unstable_by_key(|e| e.0);
        item.vertical = std::mem::take(&mut self.bases);
        item.internal = std::mem::take(&mut self.internal);
        item
    }

    /// A post passes everything that entered it to what it stands on.
    pub(super) fn pass_post(&mut self, p: usize, item: u32) {
        let f = std::mem::take(&mut self.post_load[p]);
        let stands_on = self.model.graph.stands_on[p];
        if stands_on.is_plate() {
            self.bases.push((p as u32, f));
            return;
        }
        self.internal.push((p as u32, f));
        if f == 0.0 {
            return;
        }
        match stands_on {
            StandsOn::Post(q) => {
                self.post_load[q] += f;
                self.enqueue(Member::Post(q));
                if self.record {
                    self.contributions.push(Contribution { post: q as u32, item, route: Route::Lift { from: p as u32 }, kn: f });
                }
            }
            StandsOn::Bearer { bearer, at } => self.push_bearer(bearer, BeamLoad::Point { at, p: f }, Some(p as u32)),
            StandsOn::Deck(d) => {
                let post = &self.model.scene.posts[p];
                self.deck_point(d, post.x, post.y, f, Some(p as u32));
            }
            StandsOn::Ground | StandsOn::Structure(_) => unreachable!("plates keep their load"),
        }
    }

    /// A uniform pressure `q` on a plan rectangle of deck `d`: each strip between bearers is a
    /// span across them (simple or continuous); the per-metre reactions become line loads on the
    /// bearers.
    pub(super) fn deck_area(&mut self, d: usize, rect: &crate::scene::model::Rect, q: f64) {
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
            self.push_bearer(b, BeamLoad::Uniform { from: a.min(z), to: a.max(z), w }, None);
        }
        self.piece_sums = per_metre;
    }

    /// A point load on deck `d`, shared between the bearers either side by moment balance (or
    /// over all of them, continuous).
    pub(super) fn deck_point(&mut self, d: usize, x: f64, y: f64, p: f64, from: Source) {
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
            let b = self.model.decks[d].bearers[k];
            let at = self.model.bearers[b].distance_of(x, y);
            self.push_bearer(b, BeamLoad::Point { at, p: r }, from);
        }
    }

    /// Share the gathered loads of bearer `b` among its posts. Loads passed on by posts standing
    /// on it are shared separately, so the trace can say whose load each share is; they are not
    /// new load entering the structure, so they add nothing to the notional-load nodes. A
    /// single-post bearer adds the moment it cannot balance to [`Solver::unbalanced`].
    pub(super) fn share_bearer(&mut self, b: usize, item: u32, case: Case) {
        let mut loads = std::mem::take(&mut self.bearer_loads[b]);
        // Group by source: direct loads first, then each post's, in a stable order.
        loads.sort_by_key(|l| l.1.map_or(0, |p| p as u64 + 1));
        let line = &self.model.bearers[b];
        let n = line.supports.len();
        let mut moment = 0.0;
        let mut scale = 0.0;
        for group in loads.chunk_by(|a, b| a.1 == b.1) {
            let from = group[0].1;
            let route = |piece: Piece| match from {
                None => Route::Bearer { bearer: b as u32, piece },
                Some(p) => Route::Transfer { bearer: b as u32, piece, from: p },
            };
            if let Some(beam) = &mut self.bearer_beams[b] {
                // Continuous: one solve for all of this group's loads on the member.
                self.reactions.resize(n, 0.0);
                let group_loads: Vec<BeamLoad> = group.iter().map(|l| l.0).collect();
                beam.share(&group_loads, &mut self.reactions);
                let piece = beam.piece();
                for k in 0..n {
                    let r = self.reactions[k];
                    if r != 0.0 {
                        self.bearer_reaction(b, k, r, route(piece), from.is_none(), item, case);
                    }
                }
                continue;
            }
            // Pieces: spans 0..n-1, then start and end overhang (or the single support).
            let mut sums = std::mem::take(&mut self.piece_sums);
            sums.clear();
            sums.resize(n + 1, [0.0; 2]);
            for (load, _) in group {
                scale += load.total().abs() * (line.end - line.start).max(1.0);
                moment += share_simple(&line.supports, load, &mut |k, piece, r| {
                    let (slot, side) = piece_slot(piece, k, n);
                    sums[slot][side] += r;
                });
            }
            for (slot, pair) in sums.iter().enumerate() {
                for (side, &r) in pair.iter().enumerate() {
                    if r != 0.0 {
                        let (k, piece) = slot_piece(slot, side, n);
                        self.bearer_reaction(b, k, r, route(piece), from.is_none(), item, case);
                    }
                }
            }
            self.piece_sums = sums;
        }
        if n == 1 {
            self.unbalanced.push((b, moment, scale));
        }
        loads.clear();
        self.bearer_loads[b] = loads;
    }

    /// Reaction `r` of bearer `b` at its `k`-th post: load entering that post.
    #[allow(clippy::too_many_arguments)]
    pub(super) fn bearer_reaction(&mut self, b: usize, k: usize, r: f64, route: Route, new_load: bool, item: u32, case: Case) {
        let post = self.model.bearers[b].posts[k];
        self.post_load[post] += r;
        self.enqueue(Member::Post(post));
        if self.record {
            if new_load {
                self.nodes.load[self.nodes.bearer_first[b] + k][case.index()] += r;
            }
            self.contributions.push(Contribution { post: post as u32, item, route, kn: r });
        }
    }
}

/// One moment per single-post bearer: (bearer, Σ moment, Σ scale) of a flow's entries.
fn sum_per_bearer(moments: &[(usize, f64, f64)]) -> Vec<(usize, f64, f64)> {
    // Sorted, so a scene of many T-heads costs n log n, not n².
    let mut sorted = moments.to_vec();
    sorted.sort_unstable_by_key(|e| e.0);
    sorted.chunk_by(|a, b| a.0 == b.0).map(|g| (g[0].0, g.iter().map(|e| e.1).sum(), g.iter().map(|e| e.2).sum())).collect()
}

/// Where a reaction of `piece` at support `k` is summed: (slot, side).
fn piece_slot(piece: Piece, k: usize, n: usize) -> (usize, usize) {
    match piece {
        Piece::Span(j) => (j as usize, k - j as usize),
        Piece::StartOverhang => (n - 1, k),
        Piece::EndOverhang => (n, k + 2 - n),
        Piece::Single => (0, 0),
        Piece::Continuous | Piece::TwoSpanModel => unreachable!("segment moment balance reports no continuous piece"),
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

/// How one member shares its loads in a pass, where it is not simple spans.
pub(super) enum MemberBeam {
    /// Continuous between its joints (declared ones, or none).
    Jointed(JointedBeam),
    /// Joints not known: each support from its own two-span model.
    Local(TwoSpanLocal),
}

impl MemberBeam {
    /// The member as `behaviour` says, on `supports` with stiffness `ei` and declared joints
    /// (support indices) if known; `None` for simple spans (or a member that cannot be set up,
    /// which validation rules out).
    fn new(behaviour: Behaviour, supports: &[f64], ei: f64, declared: Option<&[usize]>) -> Option<MemberBeam> {
        match (behaviour, declared) {
            (Behaviour::SimpleSpans, _) => None,
            (Behaviour::TwoSpanEach, None) => TwoSpanLocal::new(supports, ei).ok().map(MemberBeam::Local),
            (_, joints) => JointedBeam::new(supports, ei, joints.unwrap_or_default()).ok().map(MemberBeam::Jointed),
        }
    }

    /// Reactions of `loads` at every support, overwriting `reactions`.
    pub(super) fn share(&mut self, loads: &[BeamLoad], reactions: &mut [f64]) -> f64 {
        match self {
            MemberBeam::Jointed(b) => b.share(loads, reactions),
            MemberBeam::Local(b) => b.share(loads, reactions),
        }
    }

    /// The piece its reactions are traced as.
    fn piece(&self) -> Piece {
        match self {
            MemberBeam::Jointed(_) => Piece::Continuous,
            MemberBeam::Local(_) => Piece::TwoSpanModel,
        }
    }

    /// Worst relative equilibrium residual of its own models (0 where it is one state).
    fn worst_residual(&self) -> f64 {
        match self {
            MemberBeam::Jointed(_) => 0.0,
            MemberBeam::Local(b) => b.worst_residual(),
        }
    }
}
