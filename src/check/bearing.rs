//! Ground bearing under each base plate: on the top of the granular layer (under the plate or
//! sole board), and at formation level (spread through the layer, plus the layer's own weight
//! where the allowable is gross); plates whose spread areas overlap are also taken together, over
//! the union of their areas. A plate on an existing structure bears on its own area against the
//! structure's allowable; a post standing on another member has no bearing to check.
//!
//! Plate sizes are in plan with the width along x and the length along y.

use rustc_hash::FxHashMap as HashMap;
use crate::scene::combination::Combination;
use crate::scene::model::{AllowableBasis, GranularLayer, Scene, SupportType};
use crate::scene::standing::StandsOn;
use crate::scene::validate::Model;

/// What a post's base bears on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
pub enum BearsOn {
    /// The ground (through the granular layer, if any), on a support type (index).
    Ground {
        /// Support type index.
        support: usize,
    },
    /// An existing structure (index), on a support type (index).
    Structure {
        /// Support type index.
        support: usize,
        /// Existing structure index.
        structure: usize,
    },
    /// Nothing to check: the post stands on another member.
    Nothing,
}

impl BearsOn {
    /// What every post of a validated scene bears on, in post order.
    pub fn of(model: &Model) -> Vec<BearsOn> {
        (0..model.scene.posts.len())
            .map(|p| match (model.graph.stands_on[p], model.post_support[p]) {
                (StandsOn::Ground, Some(support)) => BearsOn::Ground { support },
                (StandsOn::Structure(structure), Some(support)) => BearsOn::Structure { support, structure },
                _ => BearsOn::Nothing,
            })
            .collect()
    }
}

/// Bearing of one support type on the ground.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Bearing {
    /// Area the load is spread over at formation level, m².
    pub area_m2: f64,
    /// Allowable ground bearing pressure, kPa; `None` when not entered.
    pub allowable_kpa: Option<f64>,
}

/// Area at formation level under a support: its bearing plate (sole plate, else base plate)
/// widened on every side by the spread through the granular layer, if any.
pub fn bearing_area(scene: &Scene, support: &SupportType) -> f64 {
    let (w, l) = formation_size(scene.site.granular_layer, support);
    w * l
}

/// Plan size (along x, along y) of the area at formation level under a support.
fn formation_size(layer: Option<GranularLayer>, support: &SupportType) -> (f64, f64) {
    let plate = support.bearing_plate();
    let grow = layer.map_or(0.0, |l| 2.0 * l.thickness_m * l.spread.spread_per_side());
    (plate.width_m + grow, plate.length_m + grow)
}

/// Plates whose bearing areas overlap in plan at one level, taken together.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SpreadGroup {
    /// Plate indices, in order.
    pub plates: Vec<u32>,
    /// Area of the union of their bearing areas, m².
    pub union_area_m2: f64,
    /// Whether their base levels differ (by more than 1 mm): the areas are then taken together
    /// as if at one level, which a designer should look at.
    pub levels_differ: bool,
}

/// Ground data and plate geometry, prepared once per scene for every combination.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Ground {
    /// The granular layer, if any.
    pub layer: Option<GranularLayer>,
    /// Allowable bearing pressure at formation, kPa; `None` when not entered.
    pub allowable_kpa: Option<f64>,
    /// Whether that allowable is net or gross of the layer's weight.
    pub basis: AllowableBasis,
    /// What each post bears on.
    pub bears_on: Vec<BearsOn>,
    /// Allowable pressure under a plate on each existing structure, kPa.
    pub structure_allowable_kpa: Vec<f64>,
    /// Per plate: area under its bearing plate (sole plate, else base plate), m² — on the top
    /// of the layer, or on the ground when there is none (0 for a post without a plate).
    pub plate_area_m2: Vec<f64>,
    /// Per plate: area at formation level, m² (equal to the plate area without a layer, or on
    /// an existing structure).
    pub formation_area_m2: Vec<f64>,
    /// Groups of plates whose bearing plates overlap on the top of the layer (or the ground).
    pub surface_groups: Vec<SpreadGroup>,
    /// Groups of plates whose spread areas overlap at formation (only with a layer).
    pub formation_groups: Vec<SpreadGroup>,
    /// Per plate: index of its surface group, if any.
    pub surface_group_of: Vec<Option<u32>>,
    /// Per plate: index of its formation group, if any.
    pub formation_group_of: Vec<Option<u32>>,
}

/// Bearing pressures of one plate under one combination's maximum load.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Pressures {
    /// At formation, kPa: the larger of the plate's own spread pressure and its group's, plus
    /// the layer's weight when the allowable is gross.
    pub formation_kpa: f64,
    /// Formation pressure ÷ allowable; `None` when no allowable is entered.
    pub formation_utilisation: Option<f64>,
    /// On the top of the granular layer under the plate or sole board, kPa; `None` without a layer.
    pub layer_top_kpa: Option<f64>,
    /// Layer-top pressure ÷ the layer's allowable; `None` without a layer or its allowable.
    pub layer_utilisation: Option<f64>,
}

/// Overlap below this, m, is touching, not overlapping.
const OVERLAP_TOLERANCE_M: f64 = 1e-9;
/// Base levels within this of each other, m, are one level.
const LEVEL_TOLERANCE_M: f64 = 1e-3;

impl Ground {
    /// Prepare the ground of a validated scene under its posts at `plates` (x, y, base level).
    pub fn new(model: &Model, plates: &[[f64; 3]]) -> Self {
        Ground::on(model.scene, plates, &BearsOn::of(model))
    }

    /// Prepare the ground of `scene` under posts at `plates` (x, y, base level) bearing on `bears`.
    pub fn on(scene: &Scene, plates: &[[f64; 3]], bears: &[BearsOn]) -> Self {
        let layer = scene.site.granular_layer;
        let plate_size: Vec<(f64, f64)> = bears
            .iter()
            .map(|b| match b {
                BearsOn::Ground { support } | BearsOn::Structure { support, .. } => {
                    let b = scene.support_types[*support].bearing_plate();
                    (b.width_m, b.length_m)
                }
                BearsOn::Nothing => (0.0, 0.0),
            })
            .collect();
        let formation_size: Vec<(f64, f64)> = bears
            .iter()
            .zip(&plate_size)
            .map(|(b, &size)| match b {
                BearsOn::Ground { support } => formation_size(layer, &scene.support_types[*support]),
                _ => size,
            })
            .collect();
        // Only plates on the ground share the ground's bearing.
        let rects = |sizes: &[(f64, f64)]| -> Vec<[f64; 4]> {
            plates
                .iter()
                .zip(sizes)
                .zip(bears)
                .map(|((p, &(w, l)), b)| if matches!(b, BearsOn::Ground { .. }) { [p[0] - w / 2.0, p[1] - l / 2.0, p[0] + w / 2.0, p[1] + l / 2.0] } else { [f64::NAN; 4] })
                .collect()
        };
        let (surface_groups, surface_group_of) = groups(&rects(&plate_size), plates);
        let (formation_groups, formation_group_of) = if layer.is_some() { groups(&rects(&formation_size), plates) } else { (Vec::new(), vec![None; plates.len()]) };
        Ground {
            layer,
            allowable_kpa: scene.site.allowable_bearing_kpa,
            basis: scene.site.allowable_basis,
            bears_on: bears.to_vec(),
            structure_allowable_kpa: scene.existing_structures.iter().map(|e| e.allowable_kpa).collect(),
            plate_area_m2: plate_size.iter().map(|(w, l)| w * l).collect(),
            formation_area_m2: formation_size.iter().map(|(w, l)| w * l).collect(),
            surface_groups,
            formation_groups,
            surface_group_of,
            formation_group_of,
        }
    }

    /// Pressure added at formation by the layer's own weight, kPa: γ·z when the allowable is
    /// gross, 0 when it is net or there is no layer.
    pub fn layer_weight_added_kpa(&self) -> f64 {
        match (self.layer, self.basis) {
            (Some(l), AllowableBasis::Gross) => l.self_weight_kpa(),
            _ => 0.0,
        }
    }

    /// Pressures of every plate under the given maximum loads (kN, one per plate, all under one
    /// combination; negative loads press nothing).
    pub fn pressures(&self, max_kn: &[f64]) -> Vec<Pressures> {
        let down = |p: usize| max_kn[p].max(0.0);
        let group_kpa = |groups: &[SpreadGroup]| -> Vec<f64> { groups.iter().map(|g| g.plates.iter().map(|&p| down(p as usize)).sum::<f64>() / g.union_area_m2).collect() };
        let surface_group_kpa = group_kpa(&self.surface_groups);
        let formation_group_kpa = group_kpa(&self.formation_groups);
        let added = self.layer_weight_added_kpa();
        (0..max_kn.len())
            .map(|p| {
                let structure = match self.bears_on[p] {
                    BearsOn::Nothing => return Pressures::default(),
                    BearsOn::Structure { structure, .. } => Some(structure),
                    BearsOn::Ground { .. } => None,
                };
                let own = down(p) / self.plate_area_m2[p];
                if let Some(e) = structure {
                    // On an existing structure: under the plate, against its own allowable.
                    let allowable = self.structure_allowable_kpa[e];
                    return Pressures { formation_kpa: own, formation_utilisation: Some(own / allowable), layer_top_kpa: None, layer_utilisation: None };
                }
                let surface = self.surface_group_of[p].map_or(own, |g| own.max(surface_group_kpa[g as usize]));
                let (formation_kpa, layer_top_kpa) = match self.layer {
                    None => (surface, None),
                    Some(_) => {
                        let spread = down(p) / self.formation_area_m2[p];
                        let spread = self.formation_group_of[p].map_or(spread, |g| spread.max(formation_group_kpa[g as usize]));
                        (spread + added, Some(surface))
                    }
                };
                Pressures {
                    formation_kpa,
                    formation_utilisation: self.allowable_kpa.map(|a| formation_kpa / a),
                    layer_top_kpa,
                    layer_utilisation: match (layer_top_kpa, self.layer.and_then(|l| l.allowable_kpa)) {
                        (Some(q), Some(a)) => Some(q / a),
                        _ => None,
                    },
                }
            })
            .collect()
    }

    /// Extra downward load, kN, that post `post` can take before a bearing check it is subject
    /// to reaches its allowable, with every post carrying `max_kn` (its own included); infinite
    /// where no bearing is checked. Follows [`Ground::pressures`]: its own pressure and its
    /// overlap group's, on the layer and at formation.
    pub fn room_kn(&self, post: usize, max_kn: &[f64]) -> f64 {
        let down = |p: usize| max_kn[p].max(0.0);
        let own = down(post);
        let group_sum = |groups: &[SpreadGroup], of: &[Option<u32>]| of[post].map(|g| (groups[g as usize].union_area_m2, groups[g as usize].plates.iter().map(|&q| down(q as usize)).sum::<f64>()));
        // Room under an allowable `q` (kPa) over `area`, and over the group's union if any.
        let room = |q: f64, area: f64, group: Option<(f64, f64)>| {
            let mine = q * area - own;
            group.map_or(mine, |(union, total)| mine.min(q * union - total))
        };
        match self.bears_on[post] {
            BearsOn::Nothing => f64::INFINITY,
            BearsOn::Structure { structure, .. } => self.structure_allowable_kpa[structure] * self.plate_area_m2[post] - own,
            BearsOn::Ground { .. } => {
                let surface = group_sum(&self.surface_groups, &self.surface_group_of);
                let mut out = f64::INFINITY;
                match self.layer {
                    None => {
                        if let Some(q) = self.allowable_kpa {
                            out = out.min(room(q, self.plate_area_m2[post], surface));
                        }
                    }
                    Some(layer) => {
                        if let Some(q) = self.allowable_kpa {
                            let formation = group_sum(&self.formation_groups, &self.formation_group_of);
                            out = out.min(room(q - self.layer_weight_added_kpa(), self.formation_area_m2[post], formation));
                        }
                        if let Some(q) = layer.allowable_kpa {
                            out = out.min(room(q, self.plate_area_m2[post], surface));
                        }
                    }
                }
                out
            }
        }
    }

    /// Fill in the bearing of every plate under every combination: `combos[plate][combination]`,
    /// with `max_kn` and `load_utilisation` already set; utilisation and status are finished.
    pub fn fill(&self, combinations: &[Combination], combos: &mut [Vec<crate::check::plates::PlateCombination>]) {
        let mut max = vec![0.0; combos.len()];
        for (c, comb) in combinations.iter().enumerate() {
            for (p, pc) in combos.iter().enumerate() {
                max[p] = pc[c].max_kn;
            }
            for (pc, pr) in combos.iter_mut().zip(self.pressures(&max)) {
                pc[c].set_bearing(pr, comb);
            }
        }
    }

    /// The formation groups whose plates stand at different levels, as warnings' plate lists.
    pub fn mixed_level_groups(&self) -> impl Iterator<Item = &SpreadGroup> {
        self.formation_groups.iter().chain(&self.surface_groups).filter(|g| g.levels_differ)
    }
}

/// Groups of two or more rectangles `[x0, y0, x1, y1]` that overlap (directly or through
/// others), each with the area of its union; and the group of each rectangle.
fn groups(rects: &[[f64; 4]], plates: &[[f64; 3]]) -> (Vec<SpreadGroup>, Vec<Option<u32>>) {
    let n = rects.len();
    let mut parent: Vec<usize> = (0..n).collect();
    fn root(parent: &mut [usize], mut i: usize) -> usize {
        while parent[i] != i {
            parent[i] = parent[parent[i]];
            i = parent[i];
        }
        i
    }
    // Cells as large as the largest rectangle: overlapping rectangles have their lower-left
    // corners in the same or neighbouring cells.
    let cell = rects.iter().filter(|r| r[0].is_finite()).map(|r| (r[2] - r[0]).max(r[3] - r[1])).fold(0.0, f64::max);
    let mut any = false;
    if cell > 0.0 && cell.is_finite() {
        let key = |r: &[f64; 4]| ((r[0] / cell).floor() as i64, (r[1] / cell).floor() as i64);
        // First rectangle of each cell, and for each rectangle the next one in its cell.
        let mut cells: HashMap<(i64, i64), usize> = HashMap::default();
        let mut next = vec![usize::MAX; n];
        for (i, r) in rects.iter().enumerate().filter(|(_, r)| r[0].is_finite()) {
            if let Some(first) = cells.insert(key(r), i) {
                next[i] = first;
            }
        }
        for (i, r) in rects.iter().enumerate().filter(|(_, r)| r[0].is_finite()) {
            let (cx, cy) = key(r);
            for dx in -1..=1 {
                for dy in -1..=1 {
                    let mut j = cells.get(&(cx + dx, cy + dy)).copied().unwrap_or(usize::MAX);
                    while j != usize::MAX {
                        let here = j;
                        j = next[here];
                        if here <= i {
                            continue;
                        }
                        let o = &rects[here];
                        let ox = r[2].min(o[2]) - r[0].max(o[0]);
                        let oy = r[3].min(o[3]) - r[1].max(o[1]);
                        if ox > OVERLAP_TOLERANCE_M && oy > OVERLAP_TOLERANCE_M {
                            let (a, b) = (root(&mut parent, i), root(&mut parent, here));
                            if a != b {
                                parent[a] = b;
                                any = true;
                            }
                        }
                    }
                }
            }
        }
    }
    let mut group_of = vec![None; n];
    if !any {
        return (Vec::new(), group_of);
    }
    let mut members: HashMap<usize, Vec<u32>> = HashMap::default();
    for i in 0..n {
        let r = root(&mut parent, i);
        members.entry(r).or_default().push(i as u32);
    }
    let mut list: Vec<Vec<u32>> = members.into_values().filter(|m| m.len() > 1).collect();
    list.sort_unstable_by_key(|m| m[0]);
    let out: Vec<SpreadGroup> = list
        .into_iter()
        .enumerate()
        .map(|(g, plates_in)| {
            for &p in &plates_in {
                group_of[p as usize] = Some(g as u32);
            }
            let sub: Vec<[f64; 4]> = plates_in.iter().map(|&p| rects[p as usize]).collect();
            let (lo, hi) = plates_in.iter().map(|&p| plates[p as usize][2]).fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), z| (a.min(z), b.max(z)));
            SpreadGroup { union_area_m2: union_area(&sub), levels_differ: hi - lo > LEVEL_TOLERANCE_M, plates: plates_in }
        })
        .collect();
    (out, group_of)
}

/// Area of the union of axis-aligned rectangles `[x0, y0, x1, y1]`, m²: a sweep along x over a
/// segment tree of the y intervals, O(n log n).
pub fn union_area(rects: &[[f64; 4]]) -> f64 {
    let mut ys: Vec<f64> = rects.iter().flat_map(|r| [r[1], r[3]]).collect();
    ys.sort_by(f64::total_cmp);
    ys.dedup();
    if ys.len() < 2 {
        return 0.0;
    }
    // Events: (x, +1 opening / −1 closing, y0, y1).
    let mut events: Vec<(f64, i32, f64, f64)> = rects.iter().filter(|r| r[2] > r[0] && r[3] > r[1]).flat_map(|r| [(r[0], 1, r[1], r[3]), (r[2], -1, r[1], r[3])]).collect();
    events.sort_by(|a, b| a.0.total_cmp(&b.0));
    let segments = ys.len() - 1;
    let mut tree = CoverTree { count: vec![0; 4 * segments], covered: vec![0.0; 4 * segments], ys: &ys };
    let index = |y: f64| ys.partition_point(|&v| v < y);
    let mut area = 0.0;
    let mut last_x = events.first().map_or(0.0, |e| e.0);
    for (x, delta, y0, y1) in events {
        area += tree.covered[1] * (x - last_x);
        last_x = x;
        let (a, b) = (index(y0), index(y1));
        if a < b {
            tree.update(1, 0, segments, a, b, delta);
        }
    }
    area
}

/// Segment tree over the elementary y intervals: how often each node's interval is covered
/// whole, and the length covered below it.
struct CoverTree<'a> {
    count: Vec<i32>,
    covered: Vec<f64>,
    ys: &'a [f64],
}

impl CoverTree<'_> {
    /// Add `delta` to the cover of elementary intervals `a..b` within node `node` = `lo..hi`.
    fn update(&mut self, node: usize, lo: usize, hi: usize, a: usize, b: usize, delta: i32) {
        if b <= lo || hi <= a {
            return;
        }
        if a <= lo && hi <= b {
            self.count[node] += delta;
        } else {
            let mid = (lo + hi) / 2;
            self.update(2 * node, lo, mid, a, b, delta);
            self.update(2 * node + 1, mid, hi, a, b, delta);
        }
        self.covered[node] = if self.count[node] > 0 {
            self.ys[hi] - self.ys[lo]
        } else if hi - lo == 1 {
            0.0
        } else {
            self.covered[2 * node] + self.covered[2 * node + 1]
        };
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::model::{LoadSpread, PlateSize};

    fn support(sole: Option<PlateSize>) -> SupportType {
        SupportType::new("S", PlateSize { width_m: 0.15, length_m: 0.15 }, 30.0, sole)
    }

    #[test]
    fn load_spread_through_a_granular_layer() {
        // source: 2V:1H rule P/((B+z)(L+z)) (Das; Bowles), 45° rule P/((B+2z)(L+2z)) (common
        // practice). P = 20 on a 150 × 150 plate → 888.9 kPa directly; through 150 mm of granular
        // fill: 2:1 → 222.2 kPa, 45° → 98.8 kPa.
        let mut scene = Scene::empty("t", 100.0);
        let s = support(None);
        assert!((20.0 / bearing_area(&scene, &s) - 888.888_9).abs() < 1e-3);
        scene.site.granular_layer = Some(GranularLayer::new(0.15, LoadSpread::TwoToOne));
        assert!((20.0 / bearing_area(&scene, &s) - 222.222_2).abs() < 1e-3);
        scene.site.granular_layer = Some(GranularLayer::new(0.15, LoadSpread::FortyFive));
        assert!((20.0 / bearing_area(&scene, &s) - 98.765_4).abs() < 1e-3);
        scene.site.granular_layer = Some(GranularLayer::new(0.15, LoadSpread::AngleDeg(45.0)));
        assert!((20.0 / bearing_area(&scene, &s) - 98.765_4).abs() < 1e-3);
    }

    #[test]
    fn sole_plate_bears_instead_of_base_plate() {
        // source: sole board 225 mm wide (BS 2482 section) × 450 mm per standard → 0.101 m²
        // (common practice for the length).
        let scene = Scene::empty("t", 100.0);
        let s = support(Some(PlateSize { width_m: 0.225, length_m: 0.45 }));
        assert!((bearing_area(&scene, &s) - 0.10125).abs() < 1e-12);
    }

    #[test]
    fn union_of_rectangles() {
        // statics, by hand: two unit squares overlapping by half → 1.5; an L of three → 3;
        // a square inside another → the outer one; disjoint → the sum.
        let sq = |x: f64, y: f64| [x, y, x + 1.0, y + 1.0];
        assert!((union_area(&[sq(0.0, 0.0), sq(0.5, 0.0)]) - 1.5).abs() < 1e-12);
        assert!((union_area(&[sq(0.0, 0.0), sq(1.0, 0.0), sq(0.0, 1.0)]) - 3.0).abs() < 1e-12);
        assert!((union_area(&[[0.0, 0.0, 3.0, 3.0], [1.0, 1.0, 2.0, 2.0]]) - 9.0).abs() < 1e-12);
        assert!((union_area(&[sq(0.0, 0.0), sq(5.0, 5.0)]) - 2.0).abs() < 1e-12);
        // Three overlapping strips: [0,2]×[0,1], [1,3]×[0.5,1.5], [0.5,1.5]×[−1,0.25]:
        // 2 + 2 − 0.5 + 1.25 − 0.25 − (overlap of 2 and 3: none) = 4.5.
        assert!((union_area(&[[0.0, 0.0, 2.0, 1.0], [1.0, 0.5, 3.0, 1.5], [0.5, -1.0, 1.5, 0.25]]) - 4.5).abs() < 1e-12);
    }

    #[test]
    fn overlapping_spread_areas_are_taken_together() {
        // source: REFERENCES §12 check (D): two 150 × 150 plates 0.30 m apart, 20 kN each, 150 mm
        // layer: 1:1 footprints (0.45) overlap → 40 / (0.75 × 0.45) = 118.5 kPa (single 98.8);
        // 2:1 footprints (0.30) just touch → 222.2 kPa each; hardcore adds 19 × 0.15 = 2.85 kPa
        // (EN 1991-1-1 Table A.6 unit weight).
        let mut scene = Scene::empty("t", 100.0);
        scene.support_types.push(support(None));
        let plates = [[0.0, 0.0, 0.0], [0.3, 0.0, 0.0]];
        let mut layer = GranularLayer::new(0.15, LoadSpread::FortyFive);
        layer.unit_weight_kn_m3 = 19.0;
        scene.site.granular_layer = Some(layer);
        scene.site.allowable_basis = AllowableBasis::Net;
        let g = Ground::on(&scene, &plates, &[BearsOn::Ground { support: 0 }; 2]);
        assert_eq!(g.formation_groups.len(), 1);
        let p = g.pressures(&[20.0, 20.0]);
        assert!((p[0].formation_kpa - 40.0 / (0.75 * 0.45)).abs() < 1e-9, "{p:?}");
        assert!((p[0].formation_kpa - 118.518_5).abs() < 1e-3);
        // On the layer top, under each plate: 20 / 0.0225 = 888.9 kPa, not checked (no allowable).
        assert!((p[1].layer_top_kpa.unwrap() - 888.888_9).abs() < 1e-3 && p[1].layer_utilisation.is_none());
        // Gross adds the layer's weight.
        scene.site.allowable_basis = AllowableBasis::Gross;
        let p = Ground::on(&scene, &plates, &[BearsOn::Ground { support: 0 }; 2]).pressures(&[20.0, 20.0]);
        assert!((p[0].formation_kpa - (118.518_5 + 2.85)).abs() < 1e-3);
        // 2:1: the footprints touch, so each plate keeps its own spread area.
        scene.site.allowable_basis = AllowableBasis::Net;
        layer.spread = LoadSpread::TwoToOne;
        scene.site.granular_layer = Some(layer);
        let g = Ground::on(&scene, &plates, &[BearsOn::Ground { support: 0 }; 2]);
        assert!(g.formation_groups.is_empty());
        assert!((g.pressures(&[20.0, 20.0])[0].formation_kpa - 222.222_2).abs() < 1e-3);
    }

    #[test]
    fn room_left_for_bearing_matches_the_pressures() {
        // statics, by hand: adding the room found to one plate brings its worst bearing check to
        // exactly its allowable. 45° layer 0.15 m, 19 kN/m³ gross, 150 kPa at formation and
        // 900 kPa on the layer; plates 0.3 m apart with 20 and 5 kN.
        let mut scene = Scene::empty("t", 150.0);
        scene.support_types.push(support(None));
        let mut layer = GranularLayer::new(0.15, LoadSpread::FortyFive);
        layer.unit_weight_kn_m3 = 19.0;
        layer.allowable_kpa = Some(900.0);
        scene.site.granular_layer = Some(layer);
        let g = Ground::on(&scene, &[[0.0, 0.0, 0.0], [0.3, 0.0, 0.0]], &[BearsOn::Ground { support: 0 }; 2]);
        for p in 0..2 {
            let mut max = [20.0, 5.0];
            let room = g.room_kn(p, &max);
            max[p] += room;
            let pr = g.pressures(&max)[p];
            let worst = pr.formation_utilisation.unwrap().max(pr.layer_utilisation.unwrap());
            assert!((worst - 1.0).abs() < 1e-12, "plate {p}: room {room}, utilisation {worst}");
        }
        // Nothing checked: no limit.
        scene.site.allowable_bearing_kpa = None;
        layer.allowable_kpa = None;
        scene.site.granular_layer = Some(layer);
        assert_eq!(Ground::on(&scene, &[[0.0, 0.0, 0.0]], &[BearsOn::Ground { support: 0 }]).room_kn(0, &[20.0]), f64::INFINITY);
    }

    #[test]
    fn a_light_neighbour_does_not_lower_a_heavy_plate() {
        // statics, by hand: 40 kN and 1 kN on overlapping areas: the group average
        // 41 / (union) is below the heavy plate's own pressure, which governs.
        let mut scene = Scene::empty("t", 100.0);
        scene.support_types.push(support(None));
        scene.site.granular_layer = Some(GranularLayer::new(0.15, LoadSpread::FortyFive));
        scene.site.allowable_basis = AllowableBasis::Net;
        let g = Ground::on(&scene, &[[0.0, 0.0, 0.0], [0.3, 0.0, 0.0]], &[BearsOn::Ground { support: 0 }; 2]);
        let p = g.pressures(&[40.0, 1.0]);
        assert!((p[0].formation_kpa - 40.0 / (0.45 * 0.45)).abs() < 1e-9);
        assert!((p[1].formation_kpa - 41.0 / (0.75 * 0.45)).abs() < 1e-9);
    }
}
