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
    /// `flows[k][j]`: effect at each post (post, kN) of bearer `bearers[k]`'s share of 1 at
    /// column `j`; empty where row shares onto that bearer are all zero.
    pub flows: Vec<Vec<Vec<(u32, f64)>>>,
}

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

impl Solver<'_, '_> {
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
        let nk = line.bearers.len();
        // Across: the deck's share of a unit load at each row onto each bearer, as kN/m of
        // bearer per kN (rectangle: a strip of pressure 1 / area) or kN per kN (point).
        let mut d = Vec::with_capacity(across.len());
        for &c in &across {
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
        // Along: each bearer's share carried down from each column.
        let mut flows = Vec::with_capacity(nk);
        let mut buffer = Vec::new();
        for (k, &b) in line.bearers.iter().enumerate() {
            let used = d.iter().any(|row| row[k] != 0.0);
            let bl = &model.bearers[b];
            let mut per_column = Vec::with_capacity(along.len());
            for &a in &along {
                if !used {
                    per_column.push(Vec::new());
                    continue;
                }
                let on_line = |u: f64| {
                    let p = match line.bearer_axis {
                        Axis::X => (u, bl.origin.1),
                        Axis::Y => (bl.origin.0, u),
                    };
                    bl.distance_of(p.0, p.1)
                };
                let load = if size_along <= 0.0 {
                    BeamLoad::Point { at: on_line(a), p: 1.0 }
                } else {
                    let (u, v) = (on_line(a - 0.5 * size_along), on_line(a + 0.5 * size_along));
                    BeamLoad::Uniform { from: u.min(v), to: u.max(v), w: 1.0 / size_along }
                };
                buffer.clear();
                let flow = self.load_flow(b, load, &mut buffer);
                per_column.push(buffer[flow.entries].to_vec());
            }
            flows.push(per_column);
        }
        Some(DeckInfluence { deck, across, along, bearer_axis: line.bearer_axis, bearers: line.bearers.clone(), d, flows })
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
