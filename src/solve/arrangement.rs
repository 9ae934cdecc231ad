//! Imposed loads in their worst arrangement.
//!
//! An arranged load is split into cells: for a deck load, each strip between two bearers (or a
//! cantilever edge) × each stretch between the posts of its bearers (or an overhang); for a line
//! load on a bearer, each stretch between posts. Every reaction is linear in the load, so each
//! cell's effect on every post can be added up separately: a post's maximum takes only the cells
//! that push it down and its minimum only those that lift it.
//!
//! Solving every cell on its own would cost cells × posts reached. Instead the load path is cut
//! where the deck meets its bearers: a deck strip `i` puts `D[i][k]` kN/m per kN/m² onto bearer
//! `k`, and a unit line load over stretch `j` of bearer `k` gives `T[k][j](p)` at post `p` (one
//! flow through the members below). A cell's effect is then `q · Σₖ D[i][k] · T[k][j](p)`. Where
//! a post is reached through one bearer of the deck only — the usual case — the sum of the
//! positive parts over all cells factorises:
//! `Σᵢⱼ max(0, D[i][k] T[k][j]) = (Σᵢ D⁺)(Σⱼ T⁺) + (Σᵢ D⁻)(Σⱼ T⁻)`, so the cost is strips +
//! stretches per post instead of their product. Posts reached through several bearers of the deck
//! are summed cell by cell. Every cell's equilibrium is checked the same way.

use crate::scene::loads::{Case, Load, LoadKind};
use crate::scene::validate::{Axis, Target};
use crate::solve::beam::{share_simple, BeamLoad};
use crate::solve::items::{Arranged, Cell, CellPlace, Resultant};
use crate::solve::load_path::Solver;

/// Two cut positions closer than this are one, m.
const SAME_CUT_M: f64 = 1e-9;

/// How an arranged load reaches its bearers: the cells' strips (rows of `d`), the bearers it loads
/// (columns of `d`) and the stretches along them (the same stretches for every bearer).
struct Layout {
    /// Bearer indices.
    bearers: Vec<usize>,
    /// `d[i][k]`: line load on bearer `bearers[k]` from a unit load on strip `i`, kN/m.
    d: Vec<Vec<f64>>,
    /// Stretch `j` on each bearer, in that bearer's distances: `stretches[k][j] = (from, to)`.
    stretches: Vec<Vec<(f64, f64)>>,
    /// Applied load and place of each cell, row-major: cell (i, j) at `i * stretches + j`.
    cells: Vec<Cell>,
}

/// The moments a single-post bearer must balance under an arranged load: the cells that turn it
/// one way, and those that turn it the other, each loaded alone.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct ArrangedTee {
    /// Bearer index.
    pub bearer: usize,
    /// Sum of the cell moments turning it one way, kN·m (≥ 0).
    pub one_way_knm: f64,
    /// Sum of those turning it the other way, kN·m (≤ 0).
    pub other_way_knm: f64,
    /// Σ |cell moment|, for the tolerance.
    pub scale: f64,
}

/// What one unit flow put on the posts.
pub(super) struct Flow {
    /// Range of its entries in the flat buffer.
    pub(super) entries: std::ops::Range<usize>,
    /// Σ reaction, Σ x·reaction, Σ y·reaction over the base plates.
    sums: [f64; 3],
    /// Unbalanced moments of single-post bearers reached: (bearer, moment).
    tee: Vec<(usize, f64)>,
}

/// The effect of each cell of arranged load `load` (index into the scene's loads) at post `post`
/// in method pass `pass`, kN (upward reaction at a plate, load passed on at any other post), in
/// the order of [`Arranged::cells`]; `None` if the load is not arranged. For explaining one
/// post's worst arrangement (the extremes themselves are found without it).
pub fn cell_effects(model: &crate::scene::validate::Model, pass: &crate::solve::passes::MethodPass, load: usize, post: usize) -> Option<Vec<f64>> {
    let mut s = Solver::new(model, pass);
    let l = &model.scene.loads[load];
    if !l.is_arranged() {
        return None;
    }
    let layout = s.layout(l, model.load_targets[load])?;
    let nj = layout.stretches.first().map_or(0, Vec::len);
    let nk = layout.bearers.len();
    let mut buffer = Vec::new();
    let mut t = vec![0.0; nk * nj];
    for k in 0..nk {
        for j in 0..nj {
            let (from, to) = layout.stretches[k][j];
            let flow = s.unit_flow(layout.bearers[k], from, to, &mut buffer);
            t[k * nj + j] = buffer[flow.entries.clone()].iter().filter(|e| e.0 as usize == post).map(|e| e.1).sum();
            buffer.clear();
        }
    }
    Some(layout.d.iter().flat_map(|row| (0..nj).map(|j| (0..nk).map(|k| row[k] * t[k * nj + j]).sum()).collect::<Vec<f64>>()).collect())
}

impl Solver<'_, '_> {
    /// The worst arrangement of load `k` of the scene, if it is arranged.
    pub(super) fn arrange(&mut self, load: &Load, target: Target) -> Option<Arranged> {
        if !load.is_arranged() {
            return None;
        }
        let layout = self.layout(load, target)?;
        Some(self.extremes(&layout))
    }

    /// Cut an arranged load into cells and work out how its strips load the bearers.
    fn layout(&mut self, load: &Load, target: Target) -> Option<Layout> {
        let model = self.model;
        match (&load.kind, target) {
            (LoadKind::DeckArea { intensity, .. } | LoadKind::DeckPatch { intensity, .. }, Target::Deck(d)) => {
                let q = intensity.kpa().unwrap_or(0.0);
                let rect = match &load.kind {
                    LoadKind::DeckPatch { area, .. } => *area,
                    _ => model.scene.decks[d].extent,
                };
                let deck = &model.decks[d];
                let (along, span) = deck.split_rect(&rect);
                // Strips: the span range cut at the bearers.
                let strips = cuts(span, &deck.supports);
                // Stretches: the range along the bearers cut at every post of every bearer.
                let posts_along: Vec<f64> = deck.bearers.iter().flat_map(|&b| model.bearers[b].posts.iter().map(|&p| deck.split(model.scene.posts[p].x, model.scene.posts[p].y).0)).collect();
                let stretches_along = cuts(along, &posts_along);
                let mut d_rows = Vec::with_capacity(strips.len());
                for &(s0, s1) in &strips {
                    let unit = BeamLoad::Uniform { from: s0, to: s1, w: q };
                    let mut row = vec![0.0; deck.bearers.len()];
                    if let Some(beam) = &mut self.deck_beams[d] {
                        beam.share(&[unit], &mut row);
                    } else {
                        share_simple(&deck.supports, &unit, &mut |k, _, r| row[k] += r);
                    }
                    d_rows.push(row);
                }
                let stretches = deck
                    .bearers
                    .iter()
                    .map(|&b| {
                        let line = &model.bearers[b];
                        stretches_along
                            .iter()
                            .map(|&(a0, a1)| {
                                let (p0, p1) = (along_point(deck.bearer_axis, a0, line), along_point(deck.bearer_axis, a1, line));
                                let (u, v) = (line.distance_of(p0.0, p0.1), line.distance_of(p1.0, p1.1));
                                (u.min(v), u.max(v))
                            })
                            .collect()
                    })
                    .collect();
                let mut cells = Vec::with_capacity(strips.len() * stretches_along.len());
                for &(s0, s1) in &strips {
                    for &(a0, a1) in &stretches_along {
                        let rect = match deck.bearer_axis {
                            Axis::X => crate::scene::geometry::Rect { x: (a0, a1), y: (s0, s1) },
                            Axis::Y => crate::scene::geometry::Rect { x: (s0, s1), y: (a0, a1) },
                        };
                        let mut applied = Resultant::default();
                        let (cx, cy) = rect.centre();
                        applied.add_down(cx, cy, q * rect.area());
                        cells.push(Cell { place: CellPlace::Deck { deck: d as u32, rect }, applied });
                    }
                }
                Some(Layout { bearers: deck.bearers.clone(), d: d_rows, stretches, cells })
            }
            (LoadKind::BearerLine { from_m, to_m, kn_per_m, .. }, Target::Bearer(b)) => {
                let line = &model.bearers[b];
                let stretches = cuts((*from_m, *to_m), &line.supports);
                let cells = stretches
                    .iter()
                    .map(|&(a, z)| {
                        let mut applied = Resultant::default();
                        let (x, y) = line.point_at(0.5 * (a + z));
                        applied.add_down(x, y, kn_per_m * (z - a));
                        Cell { place: CellPlace::Bearer { bearer: b as u32, from_m: a, to_m: z }, applied }
                    })
                    .collect();
                Some(Layout { bearers: vec![b], d: vec![vec![*kn_per_m]], stretches: vec![stretches], cells })
            }
            _ => None,
        }
    }

    /// Per post, the sum of the cells that push it down and of those that lift it; per cell, the
    /// equilibrium residual; per single-post bearer, the out-of-balance moments.
    fn extremes(&mut self, layout: &Layout) -> Arranged {
        let n_posts = self.model.scene.posts.len();
        let nj = layout.stretches.first().map_or(0, Vec::len);
        let nk = layout.bearers.len();
        // Σᵢ D⁺ and Σᵢ D⁻ of each bearer.
        let mut d_pos = vec![0.0; nk];
        let mut d_neg = vec![0.0; nk];
        for row in &layout.d {
            for (k, &v) in row.iter().enumerate() {
                if v > 0.0 {
                    d_pos[k] += v;
                } else {
                    d_neg[k] += v;
                }
            }
        }
        // One unit flow per (bearer, stretch); bearers no strip loads are skipped.
        let mut buffer: Vec<(u32, f64)> = std::mem::take(&mut self.flow_buffer);
        buffer.clear();
        let mut flows: Vec<Option<Flow>> = Vec::with_capacity(nk * nj);
        // Per post: the one bearer it is reached through (or MANY), and Σⱼ T⁺, Σⱼ T⁻ through it.
        const NONE: u32 = u32::MAX;
        const MANY: u32 = u32::MAX - 1;
        let mut via = vec![NONE; n_posts];
        let mut t_pos = vec![0.0; n_posts];
        let mut t_neg = vec![0.0; n_posts];
        // Stretches pushing each post down and lifting it (through its one bearer).
        let mut n_pos = vec![0u32; n_posts];
        let mut n_neg = vec![0u32; n_posts];
        let mut touched: Vec<u32> = Vec::new();
        for k in 0..nk {
            let loaded = d_pos[k] != 0.0 || d_neg[k] != 0.0;
            for j in 0..nj {
                if !loaded {
                    flows.push(None);
                    continue;
                }
                let (from, to) = layout.stretches[k][j];
                let flow = self.unit_flow(layout.bearers[k], from, to, &mut buffer);
                for &(p, f) in &buffer[flow.entries.clone()] {
                    let slot = &mut via[p as usize];
                    if *slot == NONE {
                        *slot = k as u32;
                        touched.push(p);
                    }
                    if *slot == k as u32 {
                        if f > 0.0 {
                            t_pos[p as usize] += f;
                            n_pos[p as usize] += 1;
                        } else if f < 0.0 {
                            t_neg[p as usize] += f;
                            n_neg[p as usize] += 1;
                        }
                    } else {
                        *slot = MANY;
                    }
                }
                flows.push(Some(flow));
            }
        }
        touched.sort_unstable();
        let mut extremes = Vec::with_capacity(touched.len());
        let mut counts = Vec::with_capacity(touched.len());
        // Strips loading each bearer down (D > 0) and up (D < 0).
        let d_count: Vec<(u32, u32)> = (0..nk).map(|k| layout.d.iter().fold((0, 0), |(a, b), row| (a + (row[k] > 0.0) as u32, b + (row[k] < 0.0) as u32))).collect();
        let many: Vec<u32> = touched.iter().copied().filter(|&p| via[p as usize] == MANY).collect();
        for &p in &touched {
            let k = via[p as usize];
            if k == MANY {
                continue;
            }
            let (tp, tn) = (t_pos[p as usize], t_neg[p as usize]);
            let (dp, dn) = (d_pos[k as usize], d_neg[k as usize]);
            extremes.push((p, dp * tp + dn * tn, dp * tn + dn * tp));
            let (sp, sn) = d_count[k as usize];
            let (tp_n, tn_n) = (n_pos[p as usize], n_neg[p as usize]);
            counts.push((sp * tp_n + sn * tn_n, sp * tn_n + sn * tp_n));
        }
        if !many.is_empty() {
            // Cell by cell for the posts reached through more than one bearer of the load.
            let index: rustc_hash::FxHashMap<u32, usize> = many.iter().enumerate().map(|(i, &p)| (p, i)).collect();
            // t[m][k * nj + j]: effect at post many[m] of the unit flow (k, j).
            let mut t = vec![vec![0.0; nk * nj]; many.len()];
            for (f, flow) in flows.iter().enumerate() {
                let Some(flow) = flow else { continue };
                for &(p, v) in &buffer[flow.entries.clone()] {
                    if let Some(&m) = index.get(&p) {
                        t[m][f] += v;
                    }
                }
            }
            for (m, &p) in many.iter().enumerate() {
                let (mut hi, mut lo, mut up, mut down) = (0.0, 0.0, 0u32, 0u32);
                for row in &layout.d {
                    for j in 0..nj {
                        let r: f64 = (0..nk).map(|k| row[k] * t[m][k * nj + j]).sum();
                        if r > 0.0 {
                            hi += r;
                            down += 1;
                        } else if r < 0.0 {
                            lo += r;
                            up += 1;
                        }
                    }
                }
                extremes.push((p, hi, lo));
                counts.push((down, up));
            }
            let mut both: Vec<((u32, f64, f64), (u32, u32))> = extremes.into_iter().zip(counts).collect();
            both.sort_unstable_by_key(|e| e.0 .0);
            (extremes, counts) = both.into_iter().unzip();
        }
        let worst_cell_residual = self.cell_residuals(layout, &flows);
        self.tee_heads_arranged(layout, &flows);
        self.flow_buffer = buffer;
        Arranged { cells: layout.cells.clone(), extremes, counts, worst_cell_residual }
    }

    /// Every cell's reactions against its applied load: the largest relative residual.
    fn cell_residuals(&self, layout: &Layout, flows: &[Option<Flow>]) -> f64 {
        let nj = layout.stretches.first().map_or(0, Vec::len);
        let size = self.plan_size();
        let mut worst = 0.0f64;
        for (i, row) in layout.d.iter().enumerate() {
            for j in 0..nj {
                let mut r = Resultant::default();
                for (k, &dk) in row.iter().enumerate() {
                    if let Some(flow) = &flows[k * nj + j] {
                        let [v, xv, yv] = flow.sums;
                        r.force[2] += dk * v;
                        r.moment[0] += dk * yv;
                        r.moment[1] -= dk * xv;
                    }
                }
                let cell = &layout.cells[i * nj + j];
                let sum = cell.applied.plus(&r);
                let f = cell.applied.force[2].abs();
                if f > 0.0 {
                    let fr = sum.force[2].abs() / f;
                    let mr = sum.moment[0].hypot(sum.moment[1]) / (f * size);
                    worst = worst.max(fr).max(mr);
                }
            }
        }
        worst
    }

    /// Single-post bearers (T-heads) reached by an arranged load: the moment of the cells that
    /// turn each way, each side on its own, since one arm may be loaded alone.
    fn tee_heads_arranged(&mut self, layout: &Layout, flows: &[Option<Flow>]) {
        let nj = layout.stretches.first().map_or(0, Vec::len);
        let mut heads: Vec<usize> = flows.iter().flatten().flat_map(|f| f.tee.iter().map(|t| t.0)).collect();
        heads.sort_unstable();
        heads.dedup();
        for head in heads {
            let (mut turn_a, mut turn_b, mut scale) = (0.0, 0.0, 0.0);
            for row in &layout.d {
                for j in 0..nj {
                    let m: f64 = (0..layout.bearers.len())
                        .filter_map(|k| flows[k * nj + j].as_ref().map(|f| row[k] * f.tee.iter().filter(|t| t.0 == head).map(|t| t.1).sum::<f64>()))
                        .sum();
                    if m > 0.0 {
                        turn_a += m;
                    } else {
                        turn_b += m;
                    }
                    scale += m.abs();
                }
            }
            // Each way is a possible arrangement on its own: both are checked.
            self.arranged_tee.push(ArrangedTee { bearer: head, one_way_knm: turn_a, other_way_knm: turn_b, scale });
        }
    }

    /// Largest plan extent of the base plates, at least 1 m: the lever that makes a moment
    /// residual relative.
    fn plan_size(&self) -> f64 {
        let scene = self.model.scene;
        let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
        for (p, post) in scene.posts.iter().enumerate() {
            if self.model.graph.is_plate(p) {
                lo = [lo[0].min(post.x), lo[1].min(post.y)];
                hi = [hi[0].max(post.x), hi[1].max(post.y)];
            }
        }
        (hi[0] - lo[0]).max(hi[1] - lo[1]).max(1.0)
    }

    /// A unit line load (1 kN/m) on bearer `b` from `from` to `to`, carried down: its effect on
    /// every post it reaches (plate reactions and loads passed on), appended to `buffer`.
    pub(super) fn unit_flow(&mut self, b: usize, from: f64, to: f64, buffer: &mut Vec<(u32, f64)>) -> Flow {
        self.load_flow(b, BeamLoad::Uniform { from, to, w: 1.0 }, buffer)
    }

    /// `unit` (a point or line load) on bearer `b`, carried down: its effect on every post it
    /// reaches, appended to `buffer`.
    pub(super) fn load_flow(&mut self, b: usize, unit: BeamLoad, buffer: &mut Vec<(u32, f64)>) -> Flow {
        let start = buffer.len();
        // The flow is linear in the load: kept per unit of it, keyed by where it acts.
        let (kind, a, z, size) = match unit {
            BeamLoad::Point { at, p } => (0u8, at, at, p),
            BeamLoad::Uniform { from, to, w } => (1u8, from, to, w),
        };
        let unit = match unit {
            BeamLoad::Point { at, .. } => BeamLoad::Point { at, p: 1.0 },
            BeamLoad::Uniform { from, to, .. } => BeamLoad::Uniform { from, to, w: 1.0 },
        };
        let model = self.model;
        let line = &model.bearers[b];
        let mut tee = Vec::new();
        let direct = line.posts.iter().all(|&p| model.graph.is_plate(p));
        // A bearer on base plates only gives the same flow in every pass where it behaves the
        // same way: kept for the next pass.
        let key = (b as u32, self.bearer_behaviour[b], kind, a.to_bits(), z.to_bits());
        if direct {
            if let Some(cached) = self.flow_cache.get(&key) {
                buffer.extend(cached.entries.iter().map(|&(p, v)| (p, v * size)));
                return Flow { entries: start..buffer.len(), sums: cached.sums.map(|v| v * size), tee: cached.tee.iter().map(|&(b, m)| (b, m * size)).collect() };
            }
        }
        if direct {
            // The bearer stands on base plates only: its reactions are the plate loads.
            if let Some(beam) = &mut self.bearer_beams[b] {
                self.reactions.resize(line.posts.len(), 0.0);
                beam.share(&[unit], &mut self.reactions);
                buffer.extend(line.posts.iter().zip(&self.reactions).filter(|(_, r)| **r != 0.0).map(|(&p, &r)| (p as u32, r)));
            } else {
                let at = buffer.len();
                let m = share_simple(&line.supports, &unit, &mut |k, _, r| buffer.push((line.posts[k] as u32, r)));
                merge_same_post(buffer, at);
                if line.supports.len() == 1 {
                    tee.push((b, m));
                }
            }
        } else {
            let record = std::mem::replace(&mut self.record, false);
            self.push_bearer(b, unit, None);
            self.flow(0, Case::Q);
            self.record = record;
            buffer.append(&mut self.bases);
            buffer.append(&mut self.internal);
            tee.extend(self.unbalanced.drain(..).map(|(b, m, _)| (b, m)));
        }
        let scene = model.scene;
        let mut sums = [0.0; 3];
        for &(p, v) in &buffer[start..] {
            if model.graph.is_plate(p as usize) {
                let post = &scene.posts[p as usize];
                sums[0] += v;
                sums[1] += post.x * v;
                sums[2] += post.y * v;
            }
        }
        if direct {
            self.flow_cache.insert(key, CachedFlow { entries: buffer[start..].to_vec(), sums, tee: tee.clone() });
        }
        if size != 1.0 {
            buffer[start..].iter_mut().for_each(|e| e.1 *= size);
            sums = sums.map(|v| v * size);
            tee.iter_mut().for_each(|t| t.1 *= size);
        }
        Flow { entries: start..buffer.len(), sums, tee }
    }
}

/// Unit flows of bearers standing on base plates only, kept from pass to pass: keyed by bearer,
/// its behaviour in the pass, and the point or stretch loaded.
pub(super) type FlowCache = rustc_hash::FxHashMap<(u32, crate::solve::passes::Behaviour, u8, u64, u64), CachedFlow>;

/// One kept unit flow.
pub(super) struct CachedFlow {
    entries: Vec<(u32, f64)>,
    sums: [f64; 3],
    tee: Vec<(usize, f64)>,
}

/// Add up entries for the same post appended since `from` (a support reached through two pieces).
fn merge_same_post(buffer: &mut Vec<(u32, f64)>, from: usize) {
    let tail = &mut buffer[from..];
    tail.sort_unstable_by_key(|e| e.0);
    let mut w = from;
    for r in from..buffer.len() {
        if w > from && buffer[w - 1].0 == buffer[r].0 {
            buffer[w - 1].1 += buffer[r].1;
        } else {
            buffer[w] = buffer[r];
            w += 1;
        }
    }
    buffer.truncate(w);
}

/// A range cut at the given positions that lie strictly inside it, as consecutive pieces.
fn cuts(range: (f64, f64), at: &[f64]) -> Vec<(f64, f64)> {
    let mut points: Vec<f64> = at.iter().copied().filter(|&s| s > range.0 + SAME_CUT_M && s < range.1 - SAME_CUT_M).collect();
    points.sort_by(f64::total_cmp);
    points.dedup_by(|a, b| (*a - *b).abs() <= SAME_CUT_M);
    let mut out = Vec::with_capacity(points.len() + 1);
    let mut prev = range.0;
    for s in points {
        out.push((prev, s));
        prev = s;
    }
    if range.1 > prev {
        out.push((prev, range.1));
    }
    out
}

/// Plan point on a bearer's line at coordinate `u` along the deck's bearer axis.
fn along_point(axis: Axis, u: f64, line: &crate::scene::validate::BearerLine) -> (f64, f64) {
    match axis {
        Axis::X => (u, line.origin.1),
        Axis::Y => (line.origin.0, u),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges_are_cut_at_inner_positions_only() {
        // common practice, no source
        assert_eq!(cuts((0.0, 4.0), &[0.0, 2.0, 4.0, 2.0]), vec![(0.0, 2.0), (2.0, 4.0)]);
        assert_eq!(cuts((-0.6, 4.0), &[0.0, 2.0, 4.0]), vec![(-0.6, 0.0), (0.0, 2.0), (2.0, 4.0)]);
        assert_eq!(cuts((1.0, 1.5), &[0.0, 2.0]), vec![(1.0, 1.5)]);
    }

    #[test]
    fn shares_of_one_post_are_merged() {
        // common practice, no source
        let mut b = vec![(9, 1.0), (3, 1.0), (2, 0.5), (3, 0.25)];
        merge_same_post(&mut b, 1);
        assert_eq!(b, vec![(9, 1.0), (2, 0.5), (3, 1.25)]);
    }
}
