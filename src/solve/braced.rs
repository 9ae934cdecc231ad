//! Horizontal loads carried down the braced planes to the base plates.
//!
//! A horizontal load reaches the posts where it is applied (a point force at a post, a wind face
//! shared among the posts along it by moment balance, a notional load at every node where vertical
//! load enters a post). Each post spans simply, in each plan axis, between the levels where it is
//! held ([`crate::scene::bracing::Hold`]) and its pinned base: the part below the lowest hold goes
//! straight into its plate as base shear, the rest to the holds either side by the lever rule. A
//! load above a post's highest hold is refused — nothing above the bracing holds it.
//!
//! A hold by a braced plane puts the force into that plane at that level. A hold by a diaphragm
//! shares it among the braced planes joined to the diaphragm, two ways:
//! - **lever rule**: the diaphragm spans simply between adjacent parallel planes (beyond the
//!   outermost it cantilevers, balanced about the outer plane); a force component with fewer than
//!   two parallel planes to go to is shared as below;
//! - **rigid**: the diaphragm is rigid, every plane equally stiff, and the twist about the centre
//!   of stiffness is shared too (REFERENCES §8).
//!
//! With three or more planes on a diaphragm both are solved; each balances the load, and the worse
//! governs every plate ([`crate::solve::Alternative`]). With two they are the same.
//!
//! Each braced plane is a pin-jointed truss solved lift by lift from the top: the shear of a lift
//! is the sum of the forces put into the plane at and above its top; the diagonals of the lift
//! share it by their lateral stiffness b²/d³ (equal tube sections, post shortening neglected —
//! two crossed diagonals of one bay take half each). A diagonal with run b and rise h carrying
//! shear V puts +V·h/b into the post at its upper end and −V·h/b into the post at its lower end
//! (the vertical components of its force); the shear passes to its lower end, and from the ground
//! lift into that post's plate. Every vertical component is a force at a post node; it enters
//! the post there and flows down to the plates through splices and transfer members like any
//! other load (`route_item`).
//!
//! Everything is linear in the load. The notional load is solved once per basis case and plan
//! axis (a unit response) and each notional item is a sum of those; where a unit force at each
//! node goes is worked out once per analysis ([`Network`]).


use crate::format::num;
use nalgebra::{Matrix3, Vector3};

use crate::scene::bracing::{list_ids, Bracing, Holder, Placement, Plane};
use crate::scene::loads::{Case, LoadKind, PlanDirection};
use crate::scene::model::NotionalRule;
use crate::scene::validate::{Axis, Model, GEOMETRY_TOLERANCE_M};
use crate::solve::beam::{share_simple, BeamLoad};
use crate::solve::items::{Action, Alternative, Contribution, Item, Resultant, Route};
use crate::solve::load_path::Solver;

const TOL: f64 = GEOMETRY_TOLERANCE_M;

/// Diaphragm sharing prepared once.
#[derive(Debug, Clone)]
struct Prepared {
    /// Reference point of the moments, m.
    origin: (f64, f64),
    /// Generalised direction of each joined plane: (along x, along y, twist about the origin / size).
    g: Vec<[f64; 3]>,
    /// Σ g gᵀ and its pseudo-inverse.
    k: Matrix3<f64>,
    k_inv: Matrix3<f64>,
    /// Per axis: coordinates across the axis of the joined planes along it, ascending, and the
    /// index of each among the joined planes.
    lever: [(Vec<f64>, Vec<usize>); 2],
    /// Size of the diaphragm, m (scales moments).
    size: f64,
    /// First slot of its joined planes in [`Acc::lever`].
    slot: usize,
    /// Whether two ways of sharing are solved (three or more planes).
    two_ways: bool,
}

/// Where part of a horizontal force at a post goes.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Target {
    /// Into the ground at the base of this post (its standard's lowest post).
    Base(u32),
    /// Into a braced plane at one of its levels (flat index).
    Plane(u32),
    /// Into a diaphragm, at the plan point of this post.
    Diaphragm(u32, u32),
}

/// Everything a horizontal load item puts into the bracing, before the diaphragms and planes are
/// solved. Linear in the load: items add and scale.
#[derive(Debug, Clone)]
pub struct Acc {
    /// Force into the ground at each post's base, along x and y, kN.
    base: Vec<[f64; 2]>,
    /// Force put straight into each plane level (flattened), along the plane's axis, kN.
    plane: Vec<f64>,
    /// Per diaphragm: resultant (Fx, Fy, twist about its origin) of all it takes.
    rigid: Vec<[f64; 3]>,
    /// Per diaphragm: resultant of what the lever rule cannot take.
    fallback: Vec<[f64; 3]>,
    /// Per diaphragm and joined plane: force by the lever rule, kN.
    lever: Vec<f64>,
    /// Whether anything went into `base`.
    any_base: bool,
}

impl Acc {
    /// Empty it for the next load, keeping its storage: the per-post part is only touched when
    /// something went into it, which for one load on a braced post is seldom.
    pub fn clear(&mut self) {
        if self.any_base {
            self.base.fill([0.0; 2]);
            self.any_base = false;
        }
        self.plane.fill(0.0);
        self.rigid.fill([0.0; 3]);
        self.fallback.fill([0.0; 3]);
        self.lever.fill(0.0);
    }

    /// Add `s` times another accumulation.
    pub fn add_scaled(&mut self, s: f64, o: &Acc) {
        if s == 0.0 {
            return;
        }
        self.any_base |= o.any_base;
        for (a, b) in self.base.iter_mut().zip(&o.base) {
            a[0] += s * b[0];
            a[1] += s * b[1];
        }
        for (a, b) in self.plane.iter_mut().zip(&o.plane) {
            *a += s * b;
        }
        for (a, b) in self.rigid.iter_mut().zip(&o.rigid).chain(self.fallback.iter_mut().zip(&o.fallback)) {
            for k in 0..3 {
                a[k] += s * b[k];
            }
        }
        for (a, b) in self.lever.iter_mut().zip(&o.lever) {
            *a += s * b;
        }
    }
}

/// Why part of a load cannot reach the ground.
#[derive(Debug, Clone, PartialEq)]
pub enum PathFailure {
    /// A post carries load along an axis but nothing holds it above its base.
    NotHeld {
        /// Post index.
        post: u32,
        /// 0 = x, 1 = y.
        axis: usize,
    },
    /// Load on a post above the highest level at which it is held.
    AboveTop {
        /// Post index.
        post: u32,
        /// 0 = x, 1 = y.
        axis: usize,
        /// Highest load level, m.
        level: f64,
        /// Highest hold, m.
        top: f64,
    },
    /// Load on a post below the lowest level at which it is held, where it does not stand on the
    /// ground (it stands on a transfer bearer or deck, which holds nothing horizontally).
    BelowBottom {
        /// Post index.
        post: u32,
        /// 0 = x, 1 = y.
        axis: usize,
        /// Lowest load level, m.
        level: f64,
        /// Lowest hold, m.
        bottom: f64,
    },
    /// A diaphragm whose braced planes cannot take what it carries.
    Diaphragm {
        /// Diaphragm index.
        diaphragm: u32,
        /// Force and twist it carries: Fx, Fy kN, twist kN·m about its centre.
        load: [f64; 3],
    },
}

/// The reactions of one horizontal item under one diaphragm assumption.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Reactions {
    /// Vertical components of the brace forces entering each post at its nodes, kN (as upward
    /// reactions at a plate under it): (post, kN), by post.
    pub vertical: Vec<(u32, f64)>,
    /// Horizontal reaction at the base of each post that takes any: (post, [x, y] kN), by post.
    pub shear: Vec<(u32, [f64; 2])>,
    /// Shear of each lift of each braced plane (flat over the planes' levels, lift `k` below
    /// level `k`), along the plane's axis, kN.
    pub lift_shear: Vec<f64>,
}

/// Values that add and scale.
trait Linear: Copy {
    fn zero() -> Self;
    fn axpy(self, s: f64, o: Self) -> Self;
}

impl Linear for f64 {
    fn zero() -> Self {
        0.0
    }
    fn axpy(self, s: f64, o: Self) -> Self {
        self + s * o
    }
}

impl Linear for [f64; 2] {
    fn zero() -> Self {
        [0.0; 2]
    }
    fn axpy(self, s: f64, o: Self) -> Self {
        [self[0] + s * o[0], self[1] + s * o[1]]
    }
}

/// Σ sᵢ·listᵢ of lists sorted by post, merged in one pass each.
fn combine_sorted<T: Linear>(parts: &[(f64, &[(u32, T)])]) -> Vec<(u32, T)> {
    let mut out: Vec<(u32, T)> = Vec::with_capacity(parts.iter().map(|p| p.1.len()).max().unwrap_or(0));
    for &(s, list) in parts {
        if out.is_empty() {
            out.extend(list.iter().map(|&(p, v)| (p, T::zero().axpy(s, v))));
            continue;
        }
        let mut merged = Vec::with_capacity(out.len() + list.len());
        let (mut i, mut j) = (0, 0);
        while i < out.len() || j < list.len() {
            let take_a = j >= list.len() || (i < out.len() && out[i].0 < list[j].0);
            let take_b = i >= out.len() || (j < list.len() && list[j].0 < out[i].0);
            if take_a {
                merged.push(out[i]);
                i += 1;
            } else if take_b {
                merged.push((list[j].0, T::zero().axpy(s, list[j].1)));
                j += 1;
            } else {
                merged.push((out[i].0, out[i].1.axpy(s, list[j].1)));
                i += 1;
                j += 1;
            }
        }
        out = merged;
    }
    out
}

impl Reactions {
    /// Σ sᵢ·Rᵢ.
    fn combine(parts: &[(f64, &Reactions)]) -> Reactions {
        let vertical = combine_sorted(&parts.iter().map(|&(s, r)| (s, r.vertical.as_slice())).collect::<Vec<_>>());
        let shear = combine_sorted(&parts.iter().map(|&(s, r)| (s, r.shear.as_slice())).collect::<Vec<_>>());
        let n = parts.iter().map(|p| p.1.lift_shear.len()).max().unwrap_or(0);
        let mut lift_shear = vec![0.0; n];
        for &(s, r) in parts {
            for (a, b) in lift_shear.iter_mut().zip(&r.lift_shear) {
                *a += s * b;
            }
        }
        Reactions { vertical, shear, lift_shear }
    }
}

/// The bracing of a model, ready to carry loads: diaphragm sharing prepared, and where a unit
/// force at each notional-load node goes, along each axis.
#[derive(Debug, Clone)]
pub struct Network<'m, 's> {
    model: &'m Model<'s>,
    plane_first: Vec<usize>,
    prepared: Vec<Prepared>,
    n_lever: usize,
    /// Slot of each notional-load node: nodes at one post and level share one.
    node_slot: Vec<u32>,
    /// Per slot and axis (`2 · slot + axis`): first entry in `slot_targets`.
    slot_first: Vec<u32>,
    slot_targets: Vec<(Target, f64)>,
    /// Per slot and axis that cannot take a force: (`2 · slot + axis`, why), ascending.
    slot_fail: Vec<(u32, PathFailure)>,
}

/// Labels of the two diaphragm assumptions.
pub const LEVER_RULE: &str = "lever rule between adjacent braced planes";
/// Rigid diaphragm label.
pub const RIGID: &str = "rigid diaphragm, equally stiff planes, twist shared";

impl<'m, 's> Network<'m, 's> {
    /// Prepare the bracing of a validated model, for notional load at the nodes `node_at`
    /// ((post, level) where vertical load enters a post).
    pub fn new(model: &'m Model<'s>, node_at: &[(usize, f64)]) -> Self {
        let bracing = &model.bracing;
        let scene = model.scene;
        let mut plane_first = Vec::with_capacity(bracing.planes.len() + 1);
        let mut n = 0;
        for p in &bracing.planes {
            plane_first.push(n);
            n += p.levels.len();
        }
        plane_first.push(n);
        let mut slot = 0;
        let prepared = bracing
            .diaphragms
            .iter()
            .map(|d| {
                let nf = d.posts.len().max(1) as f64;
                let (sx, sy) = d.posts.iter().fold((0.0, 0.0), |a, &p| (a.0 + scene.posts[p as usize].x, a.1 + scene.posts[p as usize].y));
                let origin = (sx / nf, sy / nf);
                let size = ((d.bounds.0 .1 - d.bounds.0 .0).max(0.0) + (d.bounds.1 .1 - d.bounds.1 .0).max(0.0)).max(1.0);
                let g: Vec<[f64; 3]> = d
                    .planes
                    .iter()
                    .map(|&(p, _)| {
                        let plane = &bracing.planes[p as usize];
                        match plane.axis {
                            Axis::X => [1.0, 0.0, -(plane.coord - origin.1) / size],
                            Axis::Y => [0.0, 1.0, (plane.coord - origin.0) / size],
                        }
                    })
                    .collect();
                let mut k = Matrix3::zeros();
                for v in &g {
                    let v = Vector3::new(v[0], v[1], v[2]);
                    k += v * v.transpose();
                }
                let eig = k.symmetric_eigen();
                let largest = eig.eigenvalues.iter().fold(0.0f64, |a, &l| a.max(l));
                let mut k_inv = Matrix3::zeros();
                for i in 0..3 {
                    let l = eig.eigenvalues[i];
                    if l > 1e-10 * largest {
                        let e = eig.eigenvectors.column(i);
                        k_inv += e * e.transpose() / l;
                    }
                }
                let lever = [Axis::X, Axis::Y].map(|axis| {
                    let mut v: Vec<(f64, usize)> = d.planes.iter().enumerate().filter(|(_, pk)| bracing.planes[pk.0 as usize].axis == axis).map(|(j, pk)| (bracing.planes[pk.0 as usize].coord, j)).collect();
                    v.sort_by(|a, b| a.0.total_cmp(&b.0));
                    (v.iter().map(|e| e.0).collect(), v.iter().map(|e| e.1).collect())
                });
                let prep = Prepared { origin, g, k, k_inv, lever, size, slot, two_ways: d.planes.len() >= 3 };
                slot += d.planes.len();
                prep
            })
            .collect();
        // Slots: the distinct (post, level) of the nodes, found per post.
        let n_posts = scene.posts.len();
        let mut by_post = vec![0u32; n_posts + 1];
        for &(p, _) in node_at {
            by_post[p + 1] += 1;
        }
        for p in 0..n_posts {
            by_post[p + 1] += by_post[p];
        }
        let mut order = vec![0u32; node_at.len()];
        let mut fill = by_post.clone();
        for (n, &(p, _)) in node_at.iter().enumerate() {
            order[fill[p] as usize] = n as u32;
            fill[p] += 1;
        }
        let mut node_slot = vec![0u32; node_at.len()];
        let mut slots: Vec<(u32, f64)> = Vec::with_capacity(node_at.len() / 2);
        for p in 0..n_posts {
            let first_slot = slots.len();
            for &n in &order[by_post[p] as usize..by_post[p + 1] as usize] {
                let z = node_at[n as usize].1;
                let s = match slots[first_slot..].iter().position(|e| e.1 == z) {
                    Some(k) => first_slot + k,
                    None => {
                        slots.push((p as u32, z));
                        slots.len() - 1
                    }
                };
                node_slot[n as usize] = s as u32;
            }
        }
        let mut net = Network { model, plane_first, prepared, n_lever: slot, node_slot, slot_first: Vec::with_capacity(2 * slots.len() + 1), slot_targets: Vec::new(), slot_fail: Vec::new() };
        let mut targets = Vec::with_capacity(2 * slots.len());
        for &(post, z) in &slots {
            for axis in 0..2 {
                net.slot_first.push(targets.len() as u32);
                // Most nodes are at a level where the post is held: all of it goes there.
                let holds = bracing.holds(post as usize, axis);
                if let Some(h) = holds.iter().find(|h| h.level == z) {
                    targets.push((net.target_of(h, post), 1.0));
                    continue;
                }
                if let Err(fail) = net.distribute(post, BeamLoad::Point { at: z, p: 1.0 }, axis, &mut |t, w| targets.push((t, w))) {
                    net.slot_fail.push(((net.slot_first.len() - 1) as u32, fail));
                }
            }
        }
        net.slot_first.push(targets.len() as u32);
        net.slot_targets = targets;
        net
    }

    /// An empty accumulation.
    pub fn acc(&self) -> Acc {
        let d = self.prepared.len();
        Acc {
            base: vec![[0.0; 2]; self.model.scene.posts.len()],
            plane: vec![0.0; *self.plane_first.last().unwrap_or(&0)],
            rigid: vec![[0.0; 3]; d],
            fallback: vec![[0.0; 3]; d],
            lever: vec![0.0; self.n_lever],
            any_base: false,
        }
    }

    /// Where a load on post `post` along one axis goes: `load` gives positions as levels and its
    /// magnitude along the axis. The post's standard spans between the levels where it is held,
    /// and from its base if that is the ground.
    fn distribute(&self, post: u32, load: BeamLoad, axis: usize, sink: &mut impl FnMut(Target, f64)) -> Result<(), PathFailure> {
        let bracing = &self.model.bracing;
        let (low, grounded) = bracing.standard[post as usize];
        let base = self.model.scene.posts[low as usize].base_level;
        let holds = bracing.holds(post as usize, axis);
        let (bottom_of_load, top_of_load) = match load {
            BeamLoad::Point { at, .. } => (at, at),
            BeamLoad::Uniform { from, to, .. } => (from, to),
        };
        let Some(top) = holds.last().map(|h| h.level) else {
            if grounded && top_of_load <= base + TOL {
                sink(Target::Base(low), load.total());
                return Ok(());
            }
            return Err(PathFailure::NotHeld { post, axis });
        };
        if top_of_load > top + TOL {
            return Err(PathFailure::AboveTop { post, axis, level: top_of_load, top });
        }
        if !grounded && bottom_of_load < holds[0].level - TOL {
            return Err(PathFailure::BelowBottom { post, axis, level: bottom_of_load, bottom: holds[0].level });
        }
        let target = |k: usize| self.target_of(&holds[k], post);
        // A point exactly at a hold (the usual node) goes there whole.
        if let BeamLoad::Point { at, p } = load {
            if let Some(k) = holds.iter().position(|h| h.level == at) {
                sink(target(k), p);
                return Ok(());
            }
        }
        // Supports: the base (when it is the ground), then each hold (a handful per post: on the
        // stack unless there are many).
        let mut stack = [0.0f64; 8];
        let mut heap = Vec::new();
        let n = holds.len() + usize::from(grounded);
        let supports: &mut [f64] = if n <= stack.len() {
            &mut stack[..n]
        } else {
            heap.resize(n, 0.0);
            &mut heap
        };
        if grounded {
            supports[0] = base.min(holds[0].level - crate::scene::validate::MIN_SPAN_M);
        }
        for (s, h) in supports[usize::from(grounded)..].iter_mut().zip(holds) {
            *s = h.level;
        }
        // Within the tolerance beyond the end supports, a load overhangs them, balanced about the
        // end support (exact statics, no shift of the load).
        let first = usize::from(grounded);
        share_simple(supports, &load, &mut |k, _, r| sink(if k < first { Target::Base(low) } else { target(k - first) }, r));
        Ok(())
    }

    /// Where a force held by `h` at post `post` goes.
    fn target_of(&self, h: &crate::scene::bracing::Hold, post: u32) -> Target {
        match h.by {
            Holder::Plane { plane, level } => Target::Plane((self.plane_first[plane as usize] + level as usize) as u32),
            Holder::Diaphragm(d) => Target::Diaphragm(d, post),
        }
    }

    fn apply(&self, acc: &mut Acc, target: Target, axis: usize, f: f64) {
        match target {
            Target::Base(p) => {
                acc.base[p as usize][axis] += f;
                acc.any_base = true;
            }
            Target::Plane(i) => acc.plane[i as usize] += f,
            Target::Diaphragm(d, post) => {
                let p = &self.model.scene.posts[post as usize];
                let force = if axis == 0 { [f, 0.0] } else { [0.0, f] };
                self.to_diaphragm(acc, d as usize, p.x, p.y, force);
            }
        }
    }

    /// A load on post `post` along its height, in plan direction `dir` (a unit vector or any
    /// multiple of one): `load` gives positions as levels.
    pub fn post_load(&self, acc: &mut Acc, fails: &mut Vec<PathFailure>, post: u32, load: BeamLoad, dir: [f64; 2]) {
        for axis in 0..2 {
            let c = dir[axis];
            if c == 0.0 || load.total() == 0.0 {
                continue;
            }
            let mut parts: Vec<(Target, f64)> = Vec::new();
            match self.distribute(post, load, axis, &mut |t, r| parts.push((t, r))) {
                Ok(()) => parts.into_iter().for_each(|(t, r)| self.apply(acc, t, axis, c * r)),
                Err(f) => fails.push(f),
            }
        }
    }

    /// A point force `f` (x, y kN) on diaphragm `d` at plan point (x, y).
    pub fn diaphragm_load(&self, acc: &mut Acc, d: u32, x: f64, y: f64, f: [f64; 2]) {
        self.to_diaphragm(acc, d as usize, x, y, f);
    }

    fn to_diaphragm(&self, acc: &mut Acc, d: usize, x: f64, y: f64, f: [f64; 2]) {
        let prep = &self.prepared[d];
        let (dx, dy) = (x - prep.origin.0, y - prep.origin.1);
        let twist = dx * f[1] - dy * f[0];
        let r = &mut acc.rigid[d];
        r[0] += f[0];
        r[1] += f[1];
        r[2] += twist;
        for axis in 0..2 {
            let fa = f[axis];
            if fa == 0.0 {
                continue;
            }
            let (coords, index) = &prep.lever[axis];
            if coords.len() >= 2 {
                let across = if axis == 0 { y } else { x };
                share_simple(coords, &BeamLoad::Point { at: across, p: fa }, &mut |k, _, share| acc.lever[prep.slot + index[k]] += share);
            } else {
                let part = if axis == 0 { [fa, 0.0, -dy * fa] } else { [0.0, fa, dx * fa] };
                for k in 0..3 {
                    acc.fallback[d][k] += part[k];
                }
            }
        }
    }

    /// The notional-load nodes' loads along each axis, into `acc[0][axis]` for the permanent
    /// load (G) and `acc[1][axis]` for permanent and imposed together (G + Q); the failures of
    /// the slots that carry load, likewise.
    fn nodes_load(&self, acc: &mut [[Acc; 2]; 2], fails: &mut [[Vec<PathFailure>; 2]; 2], load: &[[f64; 3]]) {
        let mut v = vec![[0.0f64; 2]; self.slot_first.len() / 2];
        for (&s, l) in self.node_slot.iter().zip(load) {
            let e = &mut v[s as usize];
            e[0] += l[0];
            e[1] += l[0] + l[1];
        }
        for &(i, ref fail) in &self.slot_fail {
            let (s, axis) = (i as usize / 2, i as usize % 2);
            for c in 0..2 {
                if v[s][c] != 0.0 {
                    fails[c][axis].push(fail.clone());
                }
            }
        }
        let [g, q] = acc;
        let ([gx, gy], [qx, qy]) = (g, q);
        for (s, &[fg, fq]) in v.iter().enumerate() {
            if fg == 0.0 && fq == 0.0 {
                continue;
            }
            for axis in 0..2 {
                let i = 2 * s + axis;
                let (ag, aq) = if axis == 0 { (&mut *gx, &mut *qx) } else { (&mut *gy, &mut *qy) };
                for &(t, w) in &self.slot_targets[self.slot_first[i] as usize..self.slot_first[i + 1] as usize] {
                    match t {
                        Target::Base(p) => {
                            ag.base[p as usize][axis] += fg * w;
                            aq.base[p as usize][axis] += fq * w;
                            ag.any_base = true;
                            aq.any_base = true;
                        }
                        Target::Plane(k) => {
                            ag.plane[k as usize] += fg * w;
                            aq.plane[k as usize] += fq * w;
                        }
                        t => {
                            self.apply(ag, t, axis, fg * w);
                            self.apply(aq, t, axis, fq * w);
                        }
                    }
                }
            }
        }
    }

    /// Forces on the joined planes of diaphragm `d` for a resultant (Fx, Fy, twist), rigid and
    /// equally stiff; `None` if the planes cannot resist it.
    fn rigid_share(&self, d: usize, f: [f64; 3]) -> Option<Vec<f64>> {
        let prep = &self.prepared[d];
        let rhs = Vector3::new(f[0], f[1], f[2] / prep.size);
        let scale = rhs.norm();
        if scale == 0.0 {
            return Some(vec![0.0; prep.g.len()]);
        }
        let u = prep.k_inv * rhs;
        if (prep.k * u - rhs).norm() > 1e-9 * scale {
            return None;
        }
        Some(prep.g.iter().map(|g| g[0] * u[0] + g[1] * u[1] + g[2] * u[2]).collect())
    }

    /// Whether an accumulation loads a diaphragm that is shared two ways.
    pub(crate) fn two_ways(&self, acc: &Acc) -> bool {
        self.prepared.iter().enumerate().any(|(d, p)| p.two_ways && self.loads(acc, d))
    }

    fn loads(&self, acc: &Acc, d: usize) -> bool {
        let prep = &self.prepared[d];
        acc.rigid[d].iter().any(|v| *v != 0.0) || acc.lever[prep.slot..prep.slot + prep.g.len()].iter().any(|v| *v != 0.0)
    }

    /// Solve the diaphragms and planes for an accumulation: one set of reactions, or `ways` (2:
    /// lever rule first, rigid second). Base shear only when `shear` is asked for.
    pub fn finish(&self, acc: &Acc, fails: &mut Vec<PathFailure>, ways: usize, shear: bool) -> Vec<Reactions> {
        self.finish_with(acc, fails, ways, shear, &mut vec![0.0; self.model.scene.posts.len()])
    }

    /// [`Network::finish`] with the per-post working store given: zero at every post, and left
    /// zero, so that one store serves load after load without being cleared.
    pub fn finish_with(&self, acc: &Acc, fails: &mut Vec<PathFailure>, ways: usize, shear: bool, vertical: &mut [f64]) -> Vec<Reactions> {
        let bracing = &self.model.bracing;
        debug_assert_eq!(vertical.len(), self.model.scene.posts.len(), "one entry per post");
        let mut totals = vec![acc.plane.clone(); ways];
        for (d, dia) in bracing.diaphragms.iter().enumerate() {
            if !self.loads(acc, d) {
                continue;
            }
            let prep = &self.prepared[d];
            let Some(rigid) = self.rigid_share(d, acc.rigid[d]) else {
                fails.push(PathFailure::Diaphragm { diaphragm: d as u32, load: acc.rigid[d] });
                continue;
            };
            let add = |total: &mut Vec<f64>, forces: &[f64]| {
                for (&(p, k), &f) in dia.planes.iter().zip(forces) {
                    total[self.plane_first[p as usize] + k as usize] += f;
                }
            };
            if ways == 2 && prep.two_ways {
                let Some(mut lever) = self.rigid_share(d, acc.fallback[d]) else {
                    fails.push(PathFailure::Diaphragm { diaphragm: d as u32, load: acc.fallback[d] });
                    continue;
                };
                for (j, l) in lever.iter_mut().enumerate() {
                    *l += acc.lever[prep.slot + j];
                }
                add(&mut totals[0], &lever);
                add(&mut totals[1], &rigid);
            } else {
                for t in &mut totals {
                    add(t, &rigid);
                }
            }
        }
        // Base shear straight into the ground at the posts' bases: the same each way.
        let direct: Vec<(u32, [f64; 2])> = if shear && acc.any_base { acc.base.iter().enumerate().filter(|(_, a)| **a != [0.0; 2]).map(|(p, a)| (p as u32, [-a[0], -a[1]])).collect() } else { Vec::new() };
        // Only the posts at the ends of the diagonals of loaded planes can take a brace component:
        // those are read back, in post order, rather than every post. Base shears are listed as
        // they come and summed post by post, in the same order.
        let mut touched: Vec<u32> = Vec::new();
        let mut base: Vec<(u32, [f64; 2])> = Vec::new();
        totals
            .iter()
            .map(|forces| {
                let mut lift_shear = vec![0.0; forces.len()];
                touched.clear();
                base.clear();
                base.extend_from_slice(&direct);
                for (pk, plane) in bracing.planes.iter().enumerate() {
                    let range = self.plane_first[pk]..self.plane_first[pk + 1];
                    if forces[range.clone()].iter().all(|v| *v == 0.0) {
                        continue;
                    }
                    solve_plane(plane, &forces[range.clone()], vertical, shear.then_some(&mut base), &mut lift_shear[range]);
                    touched.extend(plane.lifts.iter().flatten().flat_map(|d| [d.lower, d.upper]));
                }
                touched.sort_unstable();
                touched.dedup();
                let mut out_vertical: Vec<(u32, f64)> = Vec::with_capacity(touched.len());
                for &p in &touched {
                    let v = std::mem::take(&mut vertical[p as usize]);
                    if v != 0.0 {
                        out_vertical.push((p, v));
                    }
                }
                base.sort_by_key(|e| e.0);
                let mut out_shear: Vec<(u32, [f64; 2])> = Vec::with_capacity(base.len());
                for &(p, s) in &base {
                    match out_shear.last_mut() {
                        Some(last) if last.0 == p => {
                            last.1[0] += s[0];
                            last.1[1] += s[1];
                        }
                        _ => out_shear.push((p, s)),
                    }
                }
                out_shear.retain(|e| e.1 != [0.0; 2]);
                Reactions { vertical: out_vertical, shear: out_shear, lift_shear }
            })
            .collect()
    }

    /// Words for the failures of one load, grouped, with the ids and what to do.
    pub fn describe(&self, fails: &[PathFailure]) -> Vec<String> {
        describe_failures(self.model, fails)
    }
}

/// Solve one plane lift by lift for the forces put into it at its levels (along its axis):
/// brace vertical components into `vertical` (per post), base shear reactions at the feet of the
/// ground-lift diagonals onto `base` (post, shear; where asked for), the shear of each lift into
/// `lift_shear`.
fn solve_plane(plane: &Plane, forces: &[f64], vertical: &mut [f64], mut base: Option<&mut Vec<(u32, [f64; 2])>>, lift_shear: &mut [f64]) {
    let mut v = 0.0;
    for k in (0..plane.levels.len()).rev() {
        v += forces[k];
        lift_shear[k] = v;
        if v == 0.0 {
            continue;
        }
        for d in &plane.lifts[k] {
            let vj = v * d.share;
            let component = vj * d.rise() / d.run;
            vertical[d.lower as usize] -= component;
            vertical[d.upper as usize] += component;
            if k == 0
                && let Some(base) = base.as_deref_mut()
            {
                let mut s = [0.0; 2];
                s[plane.axis as usize] = 0.0 - vj;
                base.push((d.lower, s));
            }
        }
    }
}

/// The vertical component a diagonal puts into the post at its `end` (lower or upper) for the
/// shear `v` of its lift, kN (as an upward reaction under the post).
pub fn diagonal_component(d: &crate::scene::bracing::Diagonal, lift_shear: f64, upper: bool) -> f64 {
    let c = lift_shear * d.share * d.rise() / d.run;
    if upper { c } else { -c }
}

/// First index of each plane's levels in the flat per-plane-level lists ([`Reactions::lift_shear`]).
pub fn plane_offsets(bracing: &Bracing) -> Vec<usize> {
    let mut out = Vec::with_capacity(bracing.planes.len() + 1);
    let mut n = 0;
    for p in &bracing.planes {
        out.push(n);
        n += p.levels.len();
    }
    out.push(n);
    out
}

fn axis_name(axis: usize) -> &'static str {
    if axis == 0 { "x" } else { "y" }
}

/// Words for path failures: one line per kind and axis, naming posts, planes and diaphragms.
pub fn describe_failures(model: &Model, fails: &[PathFailure]) -> Vec<String> {
    let scene = model.scene;
    let bracing: &Bracing = &model.bracing;
    let id = |p: u32| scene.posts[p as usize].id.as_str();
    let mut out = Vec::new();
    for axis in 0..2 {
        let mut posts: Vec<u32> = fails.iter().filter_map(|f| matches!(f, PathFailure::NotHeld { axis: a, .. } if *a == axis).then(|| if let PathFailure::NotHeld { post, .. } = f { *post } else { 0 })).collect();
        posts.sort_unstable();
        posts.dedup();
        if !posts.is_empty() {
            let a = axis_name(axis);
            // Planes along this axis through these posts that lost their bracing.
            let cuts: Vec<String> = bracing
                .planes
                .iter()
                .filter(|pl| pl.axis as usize == axis && pl.braced_to == 0 && pl.posts.iter().any(|p| posts.binary_search(p).is_ok()))
                .filter_map(|pl| pl.cut.as_ref().map(|c| format!("{} is not counted: {c}", pl.name(scene))))
                .collect();
            let extra = if cuts.is_empty() { String::new() } else { format!(" ({})", cuts.join("; ")) };
            out.push(format!(
                "post{} {} {} not held along {a} above the base: no braced plane along {a} runs through {} at any level and no diaphragm holds {}{extra}; brace a bay in the line of posts along {a}, plan-brace a level, or declare a fixed deck a diaphragm",
                if posts.len() == 1 { "" } else { "s" },
                list_ids(posts.iter().map(|&p| id(p)), 6),
                if posts.len() == 1 { "is" } else { "are" },
                if posts.len() == 1 { "it" } else { "them" },
                if posts.len() == 1 { "it" } else { "them" },
            ));
        }
        let mut above: Vec<(u32, f64, f64)> = fails.iter().filter_map(|f| if let PathFailure::AboveTop { post, axis: a, level, top } = f { (*a == axis).then_some((*post, *level, *top)) } else { None }).collect();
        above.sort_by(|a, b| a.0.cmp(&b.0).then(b.1.total_cmp(&a.1)));
        above.dedup_by_key(|a| a.0);
        if !above.is_empty() {
            let a = axis_name(axis);
            let first = above[0];
            out.push(format!(
                "acts along {a} above the top of the bracing: on post{} {} up to {:.3} m, while the highest level at which {} held along {a} is {:.3} m{}; extend the bracing (or a diaphragm) up to the load",
                if above.len() == 1 { "" } else { "s" },
                list_ids(above.iter().map(|e| id(e.0)), 6),
                num(first.1),
                if above.len() == 1 { format!("{} is", id(first.0)) } else { format!("{} is", id(first.0)) },
                num(first.2),
                cut_note(model, first.0, axis),
            ));
        }
    }
    let mut below: Vec<(u32, usize, f64, f64)> = fails.iter().filter_map(|f| if let PathFailure::BelowBottom { post, axis, level, bottom } = f { Some((*post, *axis, *level, *bottom)) } else { None }).collect();
    below.sort_by(|a, b| a.0.cmp(&b.0).then(a.1.cmp(&b.1)));
    below.dedup_by_key(|e| (e.0, e.1));
    if let Some(&(p, axis, level, bottom)) = below.first() {
        let (low, _) = bracing.standard[p as usize];
        out.push(format!(
            "acts along {} on post{} {} down to {:.3} m, below the lowest level at which {} is held ({:.3} m): post {} does not stand on the ground but on another member, which holds nothing horizontally here; brace it down to the ground or hold its base",
            axis_name(axis),
            if below.len() == 1 { "" } else { "s" },
            list_ids(below.iter().map(|e| id(e.0)), 6),
            num(level),
            id(p),
            num(bottom),
            id(low)
        ));
    }
    for f in fails {
        if let PathFailure::Diaphragm { diaphragm, load } = f {
            let d = &bracing.diaphragms[*diaphragm as usize];
            let along = |a: Axis| d.planes.iter().filter(|&&(p, _)| bracing.planes[p as usize].axis == a).count();
            let (nx, ny) = (along(Axis::X), along(Axis::Y));
            let what = if d.planes.is_empty() {
                "no braced plane is joined to it".to_owned()
            } else if load[0].abs() > 1e-9 && nx == 0 {
                "no braced plane along x is joined to it".to_owned()
            } else if load[1].abs() > 1e-9 && ny == 0 {
                "no braced plane along y is joined to it".to_owned()
            } else {
                let names: Vec<String> = d.planes.iter().map(|&(p, _)| bracing.planes[p as usize].name(scene)).collect();
                format!("its braced planes ({}) all meet at one line or point and cannot resist the twist", names.join(", "))
            };
            out.push(format!(
                "the {} takes {:.3} kN along x, {:.3} kN along y and {:.3} kN·m of twist, but {what}; join braced planes along x and y to it, not all through one point",
                d.name(scene),
                num(load[0]),
                num(load[1]),
                num(load[2])
            ));
        }
    }
    out
}

/// Why a post's bracing stops where it does, if a plane through it was cut.
fn cut_note(model: &Model, post: u32, axis: usize) -> String {
    let b = &model.bracing;
    let cuts: Vec<String> = b
        .planes
        .iter()
        .filter(|pl| pl.axis as usize == axis && pl.cut.is_some() && pl.posts.contains(&post))
        .map(|pl| format!("{} stops there: {}", pl.name(model.scene), pl.cut.as_deref().unwrap_or("")))
        .collect();
    if cuts.is_empty() { String::new() } else { format!(" ({})", cuts.join("; ")) }
}

/// Vertical load entering the posts at their nodes: what the notional load is made of.
#[derive(Debug, Clone, Copy)]
pub struct NodeLoads<'a> {
    /// (post, level) of each node.
    pub at: &'a [(usize, f64)],
    /// Vertical load per node per case (G, Q, W), kN downwards.
    pub load: &'a [[f64; 3]],
    /// Per case: ΣV, ΣV·x, ΣV·y, ΣV·z over the nodes.
    pub moments: [[f64; 4]; 3],
}

/// The reactions to notional load of each basis case (G, Q) along each axis, per unit share.
/// `sets[0][axis]`: permanent load (G) alone; `sets[1][axis]`: permanent and imposed together.
struct Responses {
    sets: [[Vec<Reactions>; 2]; 2],
    fails: [[Vec<PathFailure>; 2]; 2],
}

fn responses(net: &Network, nodes: &NodeLoads) -> Responses {
    let mut accs = [[net.acc(), net.acc()], [net.acc(), net.acc()]];
    let mut fails: [[Vec<PathFailure>; 2]; 2] = Default::default();
    net.nodes_load(&mut accs, &mut fails, nodes.load);
    let ways = if accs.iter().flatten().any(|a| net.two_ways(a)) { 2 } else { 1 };
    let mut sets: [[Vec<Reactions>; 2]; 2] = Default::default();
    for c in 0..2 {
        for a in 0..2 {
            sets[c][a] = net.finish(&accs[c][a], &mut fails[c][a], ways, true);
        }
    }
    Responses { sets, fails }
}

/// Resultant of the forces a horizontal load applies, from its own definition. A notional load
/// takes `percent` of the vertical load of `basis` at every node where that load enters a post.
pub fn applied_resultant(kind: &LoadKind, moments: &[[f64; 4]; 3], basis: Option<&[Case]>) -> Resultant {
    let mut r = Resultant::default();
    match kind {
        LoadKind::Horizontal { x, y, level, kn, direction } => {
            let (ux, uy) = direction.unit();
            r.add([*x, *y, *level], [kn * ux, kn * uy, 0.0]);
        }
        LoadKind::Wind { face, kpa, direction } => {
            let (ux, uy) = direction.unit();
            let f = wind_force(face, *kpa, *direction);
            let at = [0.5 * (face.from.0 + face.to.0), 0.5 * (face.from.1 + face.to.1), 0.5 * (face.bottom + face.top)];
            r.add(at, [f * ux, f * uy, 0.0]);
        }
        LoadKind::Notional { percent, direction, basis: own } => {
            let basis = basis.unwrap_or(own);
            let (ux, uy) = direction.unit();
            let share = percent / 100.0;
            // Forces share·V·u at every node: only the node sums ΣV, ΣVx, ΣVy, ΣVz matter.
            let [v, vx, vy, vz] = basis.iter().fold([0.0; 4], |a, c| {
                let m = moments[c.index()];
                [a[0] + m[0], a[1] + m[1], a[2] + m[2], a[3] + m[3]]
            });
            r.force[0] += share * v * ux;
            r.force[1] += share * v * uy;
            r.moment[0] += -share * vz * uy;
            r.moment[1] += share * vz * ux;
            r.moment[2] += share * (vx * uy - vy * ux);
        }
        _ => {}
    }
    r
}

/// Wind force on a face: pressure × area projected normal to the wind, kN.
pub fn wind_force(face: &crate::scene::loads::Face, kpa: f64, direction: PlanDirection) -> f64 {
    let (ux, uy) = direction.unit();
    let (dx, dy) = (face.to.0 - face.from.0, face.to.1 - face.from.1);
    kpa * (dx * uy - dy * ux).abs() * (face.top - face.bottom)
}

/// Direction key in hundredths of a degree, as [`Item::direction_key`].
fn direction_key(d: PlanDirection) -> i64 {
    let (x, y) = d.unit();
    crate::solve::items::direction_key_of([x, y])
}

/// Short name of a plan direction: `+x`, `-y`, or `30°`.
pub fn direction_name(d: PlanDirection) -> String {
    match direction_key(d) {
        0 => "+x".into(),
        9_000 => "+y".into(),
        18_000 => "-x".into(),
        27_000 => "-y".into(),
        k => format!("{}°", k as f64 / 100.0),
    }
}

/// One horizontal load that cannot reach the ground: its id and the reasons.
pub type PathProblem = (String, Vec<String>);


/// A horizontal load item carried down the bracing, before its brace forces are routed to the
/// plates (`route_item`).
#[derive(Debug, Clone)]
pub struct HorizontalItem {
    /// Index of the scene's load, or `None` for a generated notional load.
    pub slot: Option<usize>,
    /// Load id.
    pub id: String,
    /// Load case.
    pub case: Case,
    /// Resultant of the applied load.
    pub applied: Resultant,
    /// Plan direction (unit x, y).
    pub direction: [f64; 2],
    /// How it combines with the others.
    pub action: Action,
    /// How a generated item was made.
    pub note: String,
    /// Its reactions: one set, or two (lever rule, rigid diaphragm).
    pub sets: Vec<Reactions>,
    /// For a notional load on permanent and variable load: the same for the permanent part.
    pub permanent: Option<Vec<Reactions>>,
}

/// Carry every horizontal load of the scene down the bracing, and generate the notional load of
/// the scene's rule (after the scene's own loads, in checked-direction order).
pub fn horizontal_items(model: &Model, net: &Network, nodes: &NodeLoads) -> Result<Vec<HorizontalItem>, Vec<PathProblem>> {
    let scene = model.scene;
    let mut problems: Vec<PathProblem> = Vec::new();
    let mut out: Vec<HorizontalItem> = Vec::new();
    let own_notional = scene.loads.iter().any(|l| matches!(l.kind, LoadKind::Notional { .. }));
    let rule = scene.horizontal.notional;
    let resp = (own_notional || rule != NotionalRule::Off).then(|| responses(net, nodes));
    // A notional item: the unit responses of its basis cases and axes, scaled and added.
    let notional = |resp: &Responses, percent: f64, direction: PlanDirection, basis: &[Case], fails: &mut Vec<PathFailure>| -> Vec<Reactions> {
        let (ux, uy) = direction.unit();
        let u = [ux, uy];
        // G + Q, G alone, or Q alone as (G + Q) − G.
        let (g, q) = (basis.contains(&Case::G), basis.contains(&Case::Q));
        let terms: &[(usize, f64)] = match (g, q) {
            (true, true) => &[(1, 1.0)],
            (true, false) => &[(0, 1.0)],
            (false, true) => &[(1, 1.0), (0, -1.0)],
            (false, false) => &[],
        };
        let mut parts: Vec<(f64, &Vec<Reactions>)> = Vec::new();
        for &(c, sign) in terms {
            for a in 0..2 {
                if u[a].abs() > 1e-12 {
                    fails.extend(resp.fails[c][a].iter().cloned());
                    parts.push((sign * percent / 100.0 * u[a], &resp.sets[c][a]));
                }
            }
        }
        let ways = parts.iter().map(|p| p.1.len()).max().unwrap_or(1);
        (0..ways).map(|v| Reactions::combine(&parts.iter().map(|&(s, sets)| (s, &sets[v.min(sets.len() - 1)])).collect::<Vec<_>>())).collect()
    };
    let mut finish = |slot: Option<usize>, id: String, label: String, case: Case, kind: &LoadKind, action: Action, note: String, sets: Vec<Reactions>, permanent: Option<Vec<Reactions>>, fails: Vec<PathFailure>| {
        if !fails.is_empty() {
            problems.push((label, net.describe(&fails)));
            return;
        }
        let direction = match kind {
            LoadKind::Horizontal { direction, .. } | LoadKind::Wind { direction, .. } | LoadKind::Notional { direction, .. } => direction.unit(),
            _ => unreachable!("only horizontal loads"),
        };
        let applied = applied_resultant(kind, &nodes.moments, None);
        out.push(HorizontalItem { slot, id, case, applied, direction: [direction.0, direction.1], action, note, sets, permanent });
    };
    for (k, load) in scene.loads.iter().enumerate() {
        if !load.kind.is_horizontal() {
            continue;
        }
        let mut fails = Vec::new();
        let (action, sets, permanent) = match &load.kind {
            LoadKind::Notional { percent, direction, basis } => {
                let resp = resp.as_ref().expect("made when the scene has notional loads");
                let sets = notional(resp, *percent, *direction, basis, &mut fails);
                let permanent = basis.iter().any(|c| *c != Case::G).then(|| notional(resp, *percent, *direction, &[Case::G], &mut Vec::new()));
                (Action::Notional, sets, permanent)
            }
            kind => {
                let mut acc = net.acc();
                let action = match kind {
                    LoadKind::Horizontal { x, y, level, kn, direction } => {
                        let (ux, uy) = direction.unit();
                        match model.bracing.placements.get(k) {
                            Some(Placement::Post(p)) => net.post_load(&mut acc, &mut fails, *p, BeamLoad::Point { at: *level, p: *kn }, [ux, uy]),
                            Some(Placement::Diaphragm(d)) => net.diaphragm_load(&mut acc, *d, *x, *y, [kn * ux, kn * uy]),
                            _ => unreachable!("validation places every horizontal force"),
                        }
                        Action::Identified
                    }
                    LoadKind::Wind { face, kpa, direction } => {
                        let (ux, uy) = direction.unit();
                        let f = wind_force(face, *kpa, *direction);
                        if let Some(Placement::Face { posts, length }) = model.bracing.placements.get(k) {
                            let along: Vec<f64> = posts.iter().map(|p| p.1).collect();
                            let height = face.top - face.bottom;
                            share_simple(&along, &BeamLoad::Uniform { from: 0.0, to: *length, w: f / length }, &mut |j, _, r| {
                                net.post_load(&mut acc, &mut fails, posts[j].0, BeamLoad::Uniform { from: face.bottom, to: face.top, w: r / height }, [ux, uy]);
                            });
                        }
                        Action::Wind
                    }
                    _ => unreachable!("only horizontal loads"),
                };
                let ways = if net.two_ways(&acc) { 2 } else { 1 };
                (action, net.finish(&acc, &mut fails, ways, true), None)
            }
        };
        finish(Some(k), load.id.clone(), load.id.clone(), load.case, &load.kind, action, String::new(), sets, permanent, fails);
    }

    // The notional load of the scene's rule, unless the scene gives its own.
    let v = nodes.moments[Case::G.index()][0] + nodes.moments[Case::Q.index()][0];
    if let (false, Some(resp), true) = (own_notional, resp.as_ref(), v > 0.0) {
        let mut directions: Vec<PlanDirection> = Vec::new();
        for d in scene.horizontal.directions.iter().copied().chain(scene.loads.iter().filter_map(|l| match l.kind {
            LoadKind::Wind { direction, .. } => Some(direction),
            _ => None,
        })) {
            if !directions.iter().any(|e| direction_key(*e) == direction_key(d)) {
                directions.push(d);
            }
        }
        for d in directions {
            let key = direction_key(d);
            let wind: f64 = scene
                .loads
                .iter()
                .filter_map(|l| match &l.kind {
                    LoadKind::Wind { face, kpa, direction } if direction_key(*direction) == key => Some(wind_force(face, *kpa, *direction)),
                    _ => None,
                })
                .sum();
            let (percent, note) = match rule {
                NotionalRule::Off => break,
                NotionalRule::Percent(p) => (p, format!("{} % of the vertical load {:.3} kN (scene setting)", num(p), num(v))),
                NotionalRule::Falsework => {
                    let p = (FALSEWORK_PERCENT - 100.0 * wind / v).max(IDENTIFIED_PLUS_PERCENT);
                    let why = if wind > 0.0 {
                        format!("greater of 2.5 % of the vertical load {:.3} kN ({:.3} kN) and wind {:.3} kN + 1 % ({:.3} kN); wind acts with it, so {:.3} % is added", num(v), num(0.025 * v), num(wind), num(wind + 0.01 * v), num(p))
                    } else {
                        format!("2.5 % of the vertical load {:.3} kN (falsework rule; no wind in this direction)", num(v))
                    };
                    (p, why)
                }
            };
            let mut id = format!("notional {}", direction_name(d));
            while scene.loads.iter().any(|l| l.id == id) {
                id.push('\'');
            }
            let basis = [Case::G, Case::Q];
            let mut fails = Vec::new();
            let sets = notional(resp, percent, d, &basis, &mut fails);
            let permanent = notional(resp, percent, d, &[Case::G], &mut Vec::new());
            let kind = LoadKind::Notional { percent, direction: d, basis: basis.to_vec() };
            let label = format!("{id} (generated: {})", rule.describe());
            finish(None, id, label, Case::W, &kind, Action::Notional, note, sets, Some(permanent), fails);
        }
    }
    if problems.is_empty() { Ok(out) } else { Err(problems) }
}

/// Percentage of the vertical load the falsework rule asks for at least.
// source: BS 5975:2008+A1:2011 cl. 19, 2.5 % (via a secondary summary; REFERENCES §4)
pub const FALSEWORK_PERCENT: f64 = 2.5;
/// Percentage added to the identified horizontal forces by the falsework rule.
// source: Advisory Committee on Falsework final report (Bragg), HMSO 1975: identifiable forces
// + 1 % of the vertical load (REFERENCES §4); its place in BS 5975:2008 is from memory.
pub const IDENTIFIED_PLUS_PERCENT: f64 = 1.0;

/// Route the brace forces of a horizontal item to the plates: each post's vertical components
/// enter it at its nodes and flow down through splices and transfer members like any other load
/// (without such members, a post's own plate takes them). The primary reactions are traced, as
/// one share per post ([`Route::Bracing`]); the alternative and the permanent part are not.
pub(super) fn route_item(s: &mut Solver, item: u32, h: HorizontalItem) -> Item {
    let lifts = s.model.graph.has_lifts();
    let flow = |s: &mut Solver, r: &Reactions, record: bool| -> (Vec<(u32, f64)>, Vec<(u32, f64)>) {
        if !lifts {
            let v = r.vertical.clone();
            if record {
                s.contributions_mut().extend(v.iter().map(|&(post, kn)| Contribution { post, item, route: Route::Bracing, kn }));
            }
            return (v, Vec::new());
        }
        let was = s.record;
        s.record = record;
        for &(post, kn) in &r.vertical {
            s.post_direct(item, post as usize, kn, Route::Bracing, Case::W);
        }
        s.flow(item, Case::W);
        let t = s.take_item(Item::new(String::new(), Case::W, Resultant::default()));
        s.record = was;
        (t.vertical, t.internal)
    };
    let (vertical, internal) = flow(s, &h.sets[0], true);
    let permanent_of = |s: &mut Solver, k: usize| -> Option<Vec<(u32, f64)>> {
        let p = h.permanent.as_ref()?;
        let (mut v, i) = flow(s, &p[k.min(p.len() - 1)], false);
        v.extend(i);
        Some(v)
    };
    let vertical_permanent_basis = permanent_of(s, 0);
    let alternative = if h.sets.len() > 1 {
        let (v, i) = flow(s, &h.sets[1], false);
        let perm = permanent_of(s, 1);
        Some(Box::new(Alternative { primary: LEVER_RULE, label: RIGID, vertical: v, internal: i, shear: h.sets[1].shear.clone(), vertical_permanent_basis: perm }))
    } else {
        None
    };
    let mut it = Item::new(h.id, h.case, h.applied);
    it.vertical = vertical;
    it.internal = internal;
    it.shear = h.sets[0].shear.clone();
    it.direction = Some(h.direction);
    it.vertical_permanent_basis = vertical_permanent_basis;
    it.action = h.action;
    it.alternative = alternative;
    it.note = h.note;
    it.lift_shear = h.sets.into_iter().next().map(|r| r.lift_shear).unwrap_or_default();
    it
}
