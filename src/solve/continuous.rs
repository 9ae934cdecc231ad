//! Load sharing along one straight member that runs continuously over its supports, by the direct
//! stiffness method with Euler–Bernoulli beam elements.
//!
//! Nodes sit at the supports only. Every support holds the member vertically and lets it rotate,
//! so the only unknowns are the support rotations θ₀…θₙ₋₁. Loads inside a span enter as exact
//! fixed-end actions of that element (point load and part-span uniform load, closed form), so no
//! extra nodes are needed. An overhang beyond the first or last support is a free cantilever: it
//! is statically determinate, so its loads reach the end support as a force and a moment, exactly
//! as a cantilever element would deliver them — its stiffness cannot change any reaction.
//!
//! With vertical displacements held at every node the rotation stiffness matrix is tridiagonal,
//! symmetric and strictly diagonally dominant (`4(kᵢ₋₁ + kᵢ)` on the diagonal against
//! `2kᵢ₋₁ + 2kᵢ` off it, `kᵢ = EI/Lᵢ`), so an LDLᵀ factorisation without pivoting is stable. It is
//! factorised once per member ([`ContinuousBeam::new`]) and every load set is then an O(n)
//! forward and back substitution ([`ContinuousBeam::share`]).
//!
//! Reactions follow from the element end shears: span `j` with rotations θa, θb adds
//! `Va = V⁰a + 6k(θa + θb)/L` and `Vb = V⁰b − 6k(θa + θb)/L` to its two supports (V⁰ the fixed-end
//! shears). Each element is in equilibrium by construction and each node's moment balance is the
//! solved equation, so ΣF and ΣM of the reactions match the loads to rounding.
//!
//! For a member of one section (one EI throughout, as here) the reactions do not depend on EI at
//! all: every term of the stiffness matrix scales with it and the load vector does not. EI is kept
//! so that sections and support settlement can be added without changing the interface.

use crate::solve::beam::{share_simple, BeamLoad};

/// Why a continuous member could not be set up.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ContinuousError {
    /// Supports must be finite and strictly increasing.
    #[error("supports must be finite and in increasing order (support {index} at {at} m)")]
    SupportOrder {
        /// Index of the first offending support.
        index: usize,
        /// Its position, m.
        at: f64,
    },
    /// Flexural stiffness must be finite and positive.
    #[error("flexural stiffness EI must be a positive number (it is {0} kN·m²)")]
    Stiffness(f64),
}

/// A member continuous over supports at fixed positions, factorised once, ready to share any
/// number of load sets among its supports.
#[derive(Debug, Clone)]
pub struct ContinuousBeam {
    supports: Vec<f64>,
    ei: f64,
    /// `EI / L` of each span.
    k: Vec<f64>,
    /// LDLᵀ pivots of the rotation stiffness matrix.
    pivot: Vec<f64>,
    /// LDLᵀ multipliers: row `i` (≥ 1) of the unit lower factor has `mult[i]` at column `i − 1`.
    mult: Vec<f64>,
    /// Fixed-end actions (Va, Ma, Vb, Mb) of each span for the current load set.
    fixed: Vec<[f64; 4]>,
    /// Right-hand side, then the support rotations (rad) of the last load set.
    theta: Vec<f64>,
    /// Force (kN, down) and moment (kN·m, anticlockwise) that each overhang puts on its end support.
    overhang: [(f64, f64); 2],
}

impl ContinuousBeam {
    /// Set up a member on supports at distances `supports` (strictly increasing) with flexural
    /// stiffness `ei`, kN·m².
    pub fn new(supports: &[f64], ei: f64) -> Result<Self, ContinuousError> {
        let mut beam = ContinuousBeam { supports: Vec::new(), ei, k: Vec::new(), pivot: Vec::new(), mult: Vec::new(), fixed: Vec::new(), theta: Vec::new(), overhang: [(0.0, 0.0); 2] };
        beam.set_supports(supports)?;
        Ok(beam)
    }

    /// Move the member onto other supports (strictly increasing) and factorise again, reusing
    /// its buffers: a member solved on many short stretches allocates once.
    pub fn set_supports(&mut self, supports: &[f64]) -> Result<(), ContinuousError> {
        let ei = self.ei;
        if !(ei.is_finite() && ei > 0.0) {
            return Err(ContinuousError::Stiffness(ei));
        }
        for (i, &s) in supports.iter().enumerate() {
            if !s.is_finite() || (i > 0 && s <= supports[i - 1]) {
                return Err(ContinuousError::SupportOrder { index: i, at: s });
            }
        }
        let n = supports.len();
        let spans = n.saturating_sub(1);
        self.supports.clear();
        self.supports.extend_from_slice(supports);
        self.k.clear();
        self.k.extend(supports.windows(2).map(|w| ei / (w[1] - w[0])));
        let k = &self.k;
        self.pivot.clear();
        self.pivot.resize(n, 0.0);
        self.mult.clear();
        self.mult.resize(n, 0.0);
        if n >= 2 {
            // Tridiagonal LDLᵀ: diagonal 4(k_{i-1} + k_i), off-diagonal 2k_i between i and i+1.
            self.pivot[0] = 4.0 * k[0];
            for i in 1..n {
                let off = 2.0 * k[i - 1];
                let diag = 4.0 * (k[i - 1] + if i < spans { k[i] } else { 0.0 });
                self.mult[i] = off / self.pivot[i - 1];
                self.pivot[i] = diag - self.mult[i] * off;
            }
        }
        self.fixed.clear();
        self.fixed.resize(spans, [0.0; 4]);
        self.theta.clear();
        self.theta.resize(n, 0.0);
        Ok(())
    }

    /// Support positions, m.
    pub fn supports(&self) -> &[f64] {
        &self.supports
    }

    /// Flexural stiffness, kN·m².
    pub fn ei(&self) -> f64 {
        self.ei
    }

    /// Share a set of loads among the supports: `reactions[i]` (kN, upward positive) is
    /// overwritten for every support. Loads beyond the end supports sit on free cantilevers.
    ///
    /// Returns the moment about the support that a single-support member cannot balance, kN·m
    /// (0 for two or more supports), as [`crate::solve::beam::share_simple`] does.
    pub fn share(&mut self, loads: &[BeamLoad], reactions: &mut [f64]) -> f64 {
        let n = self.supports.len();
        assert_eq!(reactions.len(), n, "one reaction slot per support");
        reactions.iter_mut().for_each(|r| *r = 0.0);
        self.theta.iter_mut().for_each(|t| *t = 0.0);
        if n == 0 {
            return 0.0;
        }
        if n == 1 {
            reactions[0] = loads.iter().map(BeamLoad::total).sum();
            return loads.iter().map(|l| l.moment_about(self.supports[0])).sum();
        }
        self.fixed.iter_mut().for_each(|f| *f = [0.0; 4]);
        self.overhang = [(0.0, 0.0); 2];
        let mut any_span = false;
        for load in loads {
            any_span |= self.add_fixed_end_actions(load);
        }
        // Overhangs: their force goes straight into the end support.
        reactions[0] += self.overhang[0].0;
        reactions[n - 1] += self.overhang[1].0;
        let (m_start, m_end) = (self.overhang[0].1, self.overhang[1].1);
        if !any_span && m_start == 0.0 && m_end == 0.0 {
            // Nothing bends the spans: every load sits on a support.
            return 0.0;
        }
        // Right-hand side: applied nodal moments minus the fixed-end moments of the spans.
        let th = &mut self.theta;
        th[0] = m_start;
        th[n - 1] += m_end;
        for (j, f) in self.fixed.iter().enumerate() {
            th[j] -= f[1];
            th[j + 1] -= f[3];
        }
        // Forward substitution (L y = b), then D and the back substitution (Lᵀ θ = D⁻¹ y).
        for i in 1..n {
            th[i] -= self.mult[i] * th[i - 1];
        }
        th[n - 1] /= self.pivot[n - 1];
        for i in (0..n - 1).rev() {
            th[i] = th[i] / self.pivot[i] - self.mult[i + 1] * th[i + 1];
        }
        for (j, f) in self.fixed.iter().enumerate() {
            let l = self.supports[j + 1] - self.supports[j];
            let shear = 6.0 * self.k[j] * (th[j] + th[j + 1]) / l;
            reactions[j] += f[0] + shear;
            reactions[j + 1] += f[2] - shear;
        }
        0.0
    }

    /// Support rotations of the last [`share`](Self::share), rad (anticlockwise positive, with
    /// distance increasing to the right). All zero when nothing bent the spans.
    pub fn rotations(&self) -> &[f64] {
        &self.theta
    }

    /// Bending moment at each support for the last [`share`](Self::share), kN·m, sagging
    /// positive (so a continuous beam's inner supports show negative, hogging values). Empty for
    /// fewer than two supports.
    pub fn support_moments(&self) -> Vec<f64> {
        let n = self.supports.len();
        if n < 2 {
            return Vec::new();
        }
        let th = &self.theta;
        let end_moments = |j: usize| {
            let f = self.fixed[j];
            let k = self.k[j];
            (f[1] + k * (4.0 * th[j] + 2.0 * th[j + 1]), f[3] + k * (2.0 * th[j] + 4.0 * th[j + 1]))
        };
        // An anticlockwise end moment on the left end of a span is hogging; on the right end, sagging.
        (0..n).map(|i| if i < n - 1 { -end_moments(i).0 } else { end_moments(n - 2).1 }).collect()
    }

    /// Add one load's fixed-end actions (spans) and end-support actions (overhangs). Returns
    /// whether any part of it lies inside a span.
    fn add_fixed_end_actions(&mut self, load: &BeamLoad) -> bool {
        let ContinuousBeam { supports: s, fixed, overhang, .. } = self;
        let n = s.len();
        // A resultant `p` (kN, down) at `at` on the start or end overhang: a downward force at
        // lever (at − s) has anticlockwise moment −p (at − s) about the end support s.
        let mut on_overhang = |end: bool, p: f64, at: f64| {
            let (slot, support) = if end { (1, s[n - 1]) } else { (0, s[0]) };
            overhang[slot].0 += p;
            overhang[slot].1 -= p * (at - support);
        };
        match *load {
            BeamLoad::Point { at, p } => {
                if p == 0.0 {
                    return false;
                }
                let k = s.partition_point(|&x| x <= at);
                if k == 0 || k == n {
                    on_overhang(k == n, p, at);
                    false
                } else {
                    let j = k - 1;
                    add_point_fea(&mut fixed[j], s[j + 1] - s[j], at - s[j], p);
                    true
                }
            }
            BeamLoad::Uniform { from, to, w } => {
                if w == 0.0 || to.partial_cmp(&from) != Some(std::cmp::Ordering::Greater) {
                    return false;
                }
                let mut any = false;
                let mut cur = from;
                let mut k = s.partition_point(|&x| x <= cur);
                while cur < to {
                    let next = if k < n { s[k].min(to) } else { to };
                    if next > cur {
                        let (a, c) = (cur, next - cur);
                        if k == 0 || k == n {
                            on_overhang(k == n, w * c, a + 0.5 * c);
                        } else {
                            let j = k - 1;
                            add_uniform_fea(&mut fixed[j], s[j + 1] - s[j], a - s[j], c, w);
                            any = true;
                        }
                    }
                    cur = next;
                    k += 1;
                }
                any
            }
        }
    }
}

/// Fixed-end actions of a point load `p` (down) at `a` from the left end of a span of length `l`:
/// `Va = p b²(3a + b)/l³`, `Ma = p a b²/l²`, `Mb = −p a² b/l²`, `Vb = p − Va` (b = l − a).
// source: fixed-end moments of a fixed-fixed beam under a concentrated load, AISC Steel
// Construction Manual Table 3-23 case 18 (case number from memory); shears by statics.
fn add_point_fea(f: &mut [f64; 4], l: f64, a: f64, p: f64) {
    let b = l - a;
    let va = p * b * b * (3.0 * a + b) / (l * l * l);
    f[0] += va;
    f[1] += p * a * b * b / (l * l);
    f[2] += p - va;
    f[3] -= p * a * a * b / (l * l);
}

/// Fixed-end actions of a uniform load `w` on `[a, a + c]` of a span of length `l`: the point-load
/// actions integrated over the loaded length, written about the load's centroid `s = a + c/2`
/// (t = l − s) so that short patches on long spans lose no digits:
/// `Va = wc((2s + l)t² + (s − t)c²/4)/l³`, `Ma = wc(st² + (s − 2t)c²/12)/l²`,
/// `Mb = −wc(ts² + (t − 2s)c²/12)/l²`, `Vb = wc − Va`.
// common practice, no source: derived here by integrating the point-load actions above; checked
// against them by quadrature in the tests and against a general-purpose library in
// tests/pycba_check.py.
fn add_uniform_fea(f: &mut [f64; 4], l: f64, a: f64, c: f64, w: f64) {
    let total = w * c;
    let s = a + 0.5 * c;
    let t = l - s;
    let c2 = c * c;
    let va = total * ((2.0 * s + l) * t * t + (s - t) * c2 / 4.0) / (l * l * l);
    f[0] += va;
    f[1] += total * (s * t * t + (s - 2.0 * t) * c2 / 12.0) / (l * l);
    f[2] += total - va;
    f[3] -= total * (t * s * s + (t - 2.0 * s) * c2 / 12.0) / (l * l);
}

/// A member continuous over its supports except at joints: continuous pieces, each from one joint
/// (or end) to the next, meeting at the jointed supports. A load at a joint goes to that support;
/// overhangs belong to the end pieces.
#[derive(Debug, Clone)]
pub struct JointedBeam {
    /// Each piece: index of its first support, and the piece as a continuous member.
    pieces: Vec<(usize, ContinuousBeam)>,
    /// Loads and reactions of one piece, reused.
    piece_loads: Vec<BeamLoad>,
    piece_reactions: Vec<f64>,
}

impl JointedBeam {
    /// Set up a member on `supports` (strictly increasing) with stiffness `ei`, jointed at the
    /// inner supports whose indices are in `joints` (others are ignored).
    pub fn new(supports: &[f64], ei: f64, joints: &[usize]) -> Result<Self, ContinuousError> {
        let n = supports.len();
        let mut cuts: Vec<usize> = joints.iter().copied().filter(|&k| k > 0 && k + 1 < n).collect();
        cuts.sort_unstable();
        cuts.dedup();
        let mut pieces = Vec::with_capacity(cuts.len() + 1);
        let mut first = 0;
        for end in cuts.into_iter().chain(std::iter::once(n.saturating_sub(1))) {
            pieces.push((first, ContinuousBeam::new(&supports[first..=end.max(first)], ei)?));
            first = end;
        }
        Ok(JointedBeam { pieces, piece_loads: Vec::new(), piece_reactions: Vec::new() })
    }

    /// Share a set of loads among the supports, as [`ContinuousBeam::share`] does: `reactions`
    /// (one per support, kN upward) is overwritten; returns the moment a single-support member
    /// cannot balance.
    pub fn share(&mut self, loads: &[BeamLoad], reactions: &mut [f64]) -> f64 {
        if self.pieces.len() == 1 {
            return self.pieces[0].1.share(loads, reactions);
        }
        reactions.iter_mut().for_each(|r| *r = 0.0);
        let last = self.pieces.len() - 1;
        for (p, (first, beam)) in self.pieces.iter_mut().enumerate() {
            let s = beam.supports();
            // This piece takes what lies after its first support (all of the start overhang for
            // the first piece) up to its last support (all of the end overhang for the last).
            let lo = if p == 0 { f64::NEG_INFINITY } else { s[0] };
            let hi = if p == last { f64::INFINITY } else { s[s.len() - 1] };
            self.piece_loads.clear();
            for load in loads {
                match *load {
                    BeamLoad::Point { at, .. } => {
                        if (at > lo || (p == 0 && at == lo)) && at <= hi {
                            self.piece_loads.push(*load);
                        }
                    }
                    BeamLoad::Uniform { from, to, w } => {
                        let (a, z) = (from.max(lo), to.min(hi));
                        if z > a {
                            self.piece_loads.push(BeamLoad::Uniform { from: a, to: z, w });
                        }
                    }
                }
            }
            if self.piece_loads.is_empty() {
                continue;
            }
            self.piece_reactions.resize(s.len(), 0.0);
            beam.share(&self.piece_loads, &mut self.piece_reactions);
            for (k, r) in self.piece_reactions.iter().enumerate() {
                reactions[*first + k] += r;
            }
        }
        0.0
    }
}

/// A member whose joints are not known, taken support by support as the middle of a two-span
/// piece: the reaction at each inner support is that of a beam continuous over it and jointed at
/// the supports either side; at an end support, that of the end span alone (with its overhang).
///
/// Each support's value is the most any joint layout can put on it under loads spread over
/// equal spans (two-span continuity gives 1.25 wL at the middle, longer continuity less, simple
/// spans 1.0 wL), so the values do not add up to the load: they are an envelope, support by
/// support, not one state of the member. Each two-span model is in equilibrium on its own.
#[derive(Debug, Clone)]
pub struct TwoSpanLocal {
    supports: Vec<f64>,
    /// A two-span beam to copy from, and the two-span beams met so far by their spans (the
    /// middle support at 0).
    middle: ContinuousBeam,
    shapes: Vec<((u64, u64), ContinuousBeam)>,
    piece_loads: Vec<BeamLoad>,
    piece_reactions: [f64; 3],
    /// Worst relative equilibrium residual of a two-span model so far.
    worst_residual: f64,
}

impl TwoSpanLocal {
    /// Set up a member on `supports` (strictly increasing) with stiffness `ei`.
    pub fn new(supports: &[f64], ei: f64) -> Result<Self, ContinuousError> {
        let middle = ContinuousBeam::new(&supports[..supports.len().min(3)], ei)?;
        if let Some(i) = (1..supports.len()).find(|&i| !(supports[i] > supports[i - 1])) {
            return Err(ContinuousError::SupportOrder { index: i, at: supports[i] });
        }
        Ok(TwoSpanLocal { supports: supports.to_vec(), middle, shapes: Vec::new(), piece_loads: Vec::new(), piece_reactions: [0.0; 3], worst_residual: 0.0 })
    }

    /// Worst relative residual (|ΣF| / ΣF and |ΣM| / (ΣF · length)) of the two-span models
    /// solved so far.
    pub fn worst_residual(&self) -> f64 {
        self.worst_residual
    }

    /// Each support's reaction from its own model (kN upward), overwriting `reactions`.
    pub fn share(&mut self, loads: &[BeamLoad], reactions: &mut [f64]) -> f64 {
        let s = &self.supports;
        let n = s.len();
        reactions.iter_mut().for_each(|r| *r = 0.0);
        if n < 3 {
            // One or two supports: nothing is unknown about the member.
            if n == 2 {
                for load in loads {
                    share_simple(s, load, &mut |k, _, r| reactions[k] += r);
                }
                return 0.0;
            }
            return loads.iter().map(|l| {
                reactions[0] += l.total();
                l.moment_about(s[0])
            }).sum();
        }
        // End supports: the end span alone, jointed at the next support, with its overhang.
        for (k, window) in [(0, (f64::NEG_INFINITY, s[1])), (n - 1, (s[n - 2], f64::INFINITY))] {
            let pair = if k == 0 { [s[0], s[1]] } else { [s[n - 2], s[n - 1]] };
            clip(loads, window, k == 0, &mut self.piece_loads);
            for load in &self.piece_loads {
                share_simple(&pair, load, &mut |j, _, r| {
                    if (k == 0 && j == 0) || (k == n - 1 && j == 1) {
                        reactions[k] += r;
                    }
                });
            }
        }
        // Inner supports: the two-span beam about each — only those whose window the loads reach.
        let (mut first, mut last) = (n - 1, 0);
        for load in loads {
            let (a, z) = match *load {
                BeamLoad::Point { at, .. } => (at, at),
                BeamLoad::Uniform { from, to, .. } => (from, to),
            };
            // Support k's window is (s[k−1], s[k+1]] — open to the outside for the first and last
            // inner supports, which carry the overhangs: reached when s[k−1] < z and a ≤ s[k+1].
            first = first.min(s.partition_point(|&x| x < a).saturating_sub(1).clamp(1, n - 2));
            last = last.max(s.partition_point(|&x| x < z).clamp(1, n - 2));
        }
        for k in first..=last {
            let lo = if k == 1 { f64::NEG_INFINITY } else { s[k - 1] };
            let hi = if k == n - 2 { f64::INFINITY } else { s[k + 1] };
            clip(loads, (lo, hi), k == 1, &mut self.piece_loads);
            if self.piece_loads.is_empty() {
                continue;
            }
            // Solved about the middle support (at 0), so that a model of the same two spans is
            // factorised once: on a regular grid every inner support has the same one.
            let (l1, l2) = (s[k] - s[k - 1], s[k + 1] - s[k]);
            let middle = s[k];
            for l in &mut self.piece_loads {
                *l = match *l {
                    BeamLoad::Point { at, p } => BeamLoad::Point { at: at - middle, p },
                    BeamLoad::Uniform { from, to, w } => BeamLoad::Uniform { from: from - middle, to: to - middle, w },
                };
            }
            let key = (l1.to_bits(), l2.to_bits());
            let slot = match self.shapes.iter().position(|e| e.0 == key) {
                Some(i) => i,
                None => {
                    if self.shapes.len() >= MAX_TWO_SPAN_SHAPES {
                        self.shapes.pop();
                    }
                    let mut beam = self.middle.clone();
                    beam.set_supports(&[-l1, 0.0, l2]).expect("supports checked when set up");
                    self.shapes.push((key, beam));
                    self.shapes.len() - 1
                }
            };
            self.shapes[slot].1.share(&self.piece_loads, &mut self.piece_reactions);
            reactions[k] = self.piece_reactions[1];
            // Its own equilibrium: ΣR = ΣW and ΣR·x = ΣW·c.
            let w: f64 = self.piece_loads.iter().map(BeamLoad::total).sum();
            let scale: f64 = self.piece_loads.iter().map(|l| l.total().abs()).sum::<f64>().max(1e-300);
            let mw: f64 = self.piece_loads.iter().map(|l| l.moment_about(0.0)).sum();
            let fr: f64 = self.piece_reactions.iter().sum();
            let mr: f64 = self.piece_reactions[2] * l2 - self.piece_reactions[0] * l1;
            let length = (s[k + 1] - s[k - 1]).max(1.0);
            self.worst_residual = self.worst_residual.max((fr - w).abs() / scale).max((mr - mw).abs() / (scale * length));
        }
        0.0
    }
}

/// Two-span shapes a member keeps factorised; a member of more different span pairs than this
/// factorises again as it goes.
const MAX_TWO_SPAN_SHAPES: usize = 16;

/// The parts of `loads` inside the window `(lo, hi]` (`[lo, hi]` when `closed_start`), into `out`.
fn clip(loads: &[BeamLoad], (lo, hi): (f64, f64), closed_start: bool, out: &mut Vec<BeamLoad>) {
    out.clear();
    for load in loads {
        match *load {
            BeamLoad::Point { at, .. } => {
                if (at > lo || (closed_start && at == lo)) && at <= hi {
                    out.push(*load);
                }
            }
            BeamLoad::Uniform { from, to, w } => {
                let (a, z) = (from.max(lo), to.min(hi));
                if z > a {
                    out.push(BeamLoad::Uniform { from: a, to: z, w });
                }
            }
        }
    }
}

/// Reactions of a continuous member under `loads`, one per support (kN, upward positive). A
/// convenience over [`ContinuousBeam`] for one-off use.
pub fn continuous_reactions(supports: &[f64], loads: &[BeamLoad], ei: f64) -> Result<Vec<f64>, ContinuousError> {
    let mut beam = ContinuousBeam::new(supports, ei)?;
    let mut r = vec![0.0; supports.len()];
    beam.share(loads, &mut r);
    Ok(r)
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Any EI: the reactions of a one-section member do not depend on it.
    const EI: f64 = 28.9;

    fn close(got: &[f64], want: &[f64], tol: f64) -> bool {
        got.len() == want.len() && got.iter().zip(want).all(|(g, w)| (g - w).abs() <= tol * (1.0 + w.abs()))
    }

    fn udl(from: f64, to: f64, w: f64) -> BeamLoad {
        BeamLoad::Uniform { from, to, w }
    }

    #[test]
    fn two_equal_spans_uniform_load() {
        // source: Hicks, Civil Engineering Formulas, Fig. 2.2 / Table 2.1; AISC Table 3-23
        // (continuous beam, two equal spans, uniform load): 3/8, 10/8, 3/8 wL; M at the centre
        // support wL²/8 (hogging). L=2, w=5 → 3.75, 12.5, 3.75; M = 2.5
        let mut beam = ContinuousBeam::new(&[0.0, 2.0, 4.0], EI).unwrap();
        let mut r = [0.0; 3];
        beam.share(&[udl(0.0, 4.0, 5.0)], &mut r);
        assert!(close(&r, &[3.75, 12.5, 3.75], 1e-12), "{r:?}");
        let m = beam.support_moments();
        assert!((m[1] + 2.5).abs() < 1e-12 && m[0].abs() < 1e-12 && m[2].abs() < 1e-12, "{m:?}");
    }

    #[test]
    fn two_equal_spans_one_span_loaded() {
        // source: Hicks Table 2.1 / AISC Table 3-23 (two equal spans, uniform load on one span):
        // 7/16, 5/8, −1/16 wL. L=1, w=16 → 7, 10, −1
        let r = continuous_reactions(&[0.0, 1.0, 2.0], &[udl(0.0, 1.0, 16.0)], EI).unwrap();
        assert!(close(&r, &[7.0, 10.0, -1.0], 1e-12), "{r:?}");
    }

    #[test]
    fn three_equal_spans_uniform_load() {
        // source: Hicks Table 2.1 / AISC Table 3-23 (three equal spans, uniform load): 0.4, 1.1,
        // 1.1, 0.4 wL; M at the inner supports 0.1 wL². L=1.5, w=4 → 2.4, 6.6, 6.6, 2.4; M = 0.9
        let mut beam = ContinuousBeam::new(&[0.0, 1.5, 3.0, 4.5], EI).unwrap();
        let mut r = [0.0; 4];
        beam.share(&[udl(0.0, 4.5, 4.0)], &mut r);
        assert!(close(&r, &[2.4, 6.6, 6.6, 2.4], 1e-12), "{r:?}");
        let m = beam.support_moments();
        assert!((m[1] + 0.9).abs() < 1e-12 && (m[2] + 0.9).abs() < 1e-12, "{m:?}");
    }

    #[test]
    fn three_equal_spans_two_spans_loaded() {
        // source: Hicks Table 2.1 / AISC Table 3-23 (three equal spans, uniform load on spans 1–2):
        // R1..R4 = 0.383, 1.200, 0.450, −0.033 wL (exactly 23/60, 6/5, 9/20, −1/30). L=1, w=60
        let r = continuous_reactions(&[0.0, 1.0, 2.0, 3.0], &[udl(0.0, 2.0, 60.0)], EI).unwrap();
        assert!(close(&r, &[23.0, 72.0, 27.0, -2.0], 1e-12), "{r:?}");
        // The published three-decimal values.
        let published = [0.383, 1.200, 0.450, -0.033];
        assert!(r.iter().zip(published).all(|(r, p)| (r / 60.0 - p).abs() < 5e-4), "{r:?}");
    }

    #[test]
    fn propped_cantilever_as_half_of_a_symmetric_two_span_beam() {
        // source: Hicks case 10; AISC Table 3-23 case 12 (beam fixed at one end, supported at the
        // other, uniform load): prop 3/8 wL, fixed end 5/8 wL, M fixed wL²/8. L=4, w=5 → 7.5, 12.5,
        // M = 10. Modelled here without a rotational restraint: two equal spans under symmetric
        // load have zero rotation at the middle support, which is therefore a fixed end for each
        // half; the middle reaction is the two fixed-end reactions together.
        let mut beam = ContinuousBeam::new(&[0.0, 4.0, 8.0], EI).unwrap();
        let mut r = [0.0; 3];
        beam.share(&[udl(0.0, 8.0, 5.0)], &mut r);
        assert!(close(&r, &[7.5, 25.0, 7.5], 1e-12), "{r:?}");
        assert!(beam.rotations()[1].abs() < 1e-15, "{:?}", beam.rotations());
        assert!((beam.support_moments()[1] + 10.0).abs() < 1e-12);
    }

    #[test]
    fn two_supports_match_the_simple_span_tables() {
        // source: AISC Table 3-23 cases 1, 8, 24 and 25 (see beam.rs): a member on two supports is
        // statically determinate, so the continuous analysis must give the simple-span values.
        let s = [0.0, 4.0];
        let cases = [
            (BeamLoad::Point { at: 1.0, p: 10.0 }, [7.5, 2.5]),
            (udl(0.0, 4.0, 3.0), [6.0, 6.0]),
            (udl(4.0, 5.0, 10.0), [-1.25, 11.25]),
            (udl(0.0, 5.0, 1.0), [1.875, 3.125]),
            (BeamLoad::Point { at: -1.0, p: 10.0 }, [12.5, -2.5]),
        ];
        for (load, want) in cases {
            let r = continuous_reactions(&s, &[load], EI).unwrap();
            assert!(close(&r, &want, 1e-12), "{load:?}: {r:?}");
        }
    }

    #[test]
    fn reactions_do_not_depend_on_ei() {
        // common practice, no source: K scales with EI, the loads do not, so u ∝ 1/EI and K·u is
        // unchanged.
        let s = [0.0, 1.2, 2.0, 3.5, 4.1];
        let loads = [udl(-0.4, 4.6, 2.5), BeamLoad::Point { at: 2.7, p: 3.0 }];
        let a = continuous_reactions(&s, &loads, 1.0).unwrap();
        let b = continuous_reactions(&s, &loads, 1.0e6).unwrap();
        assert!(close(&a, &b, 1e-12), "{a:?} {b:?}");
    }

    #[test]
    fn uniform_fixed_end_actions_equal_integrated_point_actions() {
        // common practice, no source: a uniform load is a row of point loads; midpoint-rule
        // quadrature of the point-load actions must converge to the closed form.
        let (l, a, c, w) = (3.0, 0.7, 1.6, 2.0);
        let mut exact = [0.0; 4];
        add_uniform_fea(&mut exact, l, a, c, w);
        let mut sum = [0.0; 4];
        let steps = 20_000;
        for i in 0..steps {
            let x = a + (i as f64 + 0.5) * c / steps as f64;
            add_point_fea(&mut sum, l, x, w * c / steps as f64);
        }
        assert!(close(&exact, &sum, 1e-8), "{exact:?} {sum:?}");
    }

    #[test]
    fn a_joint_splits_the_member_into_continuous_pieces() {
        // source: Hicks Table 2.1 / AISC Table 3-23, two equal spans under uniform load: 3/8,
        // 10/8, 3/8 wL. Four spans jointed at the middle support are two such beams side by
        // side: 3/8, 10/8, 6/8, 10/8, 3/8 wL. L = 2, w = 4 → wL = 8: 3, 10, 6, 10, 3.
        let mut beam = JointedBeam::new(&[0.0, 2.0, 4.0, 6.0, 8.0], EI, &[2]).unwrap();
        let mut r = [0.0; 5];
        beam.share(&[udl(0.0, 8.0, 4.0)], &mut r);
        assert!(close(&r, &[3.0, 10.0, 6.0, 10.0, 3.0], 1e-12), "{r:?}");
        // A point load right at the joint goes to that support only.
        beam.share(&[BeamLoad::Point { at: 4.0, p: 5.0 }], &mut r);
        assert!(close(&r, &[0.0, 0.0, 5.0, 0.0, 0.0], 1e-12), "{r:?}");
        // Jointed everywhere it is simple spans: wL/2 to each end of each span (AISC case 1).
        let mut beam = JointedBeam::new(&[0.0, 2.0, 4.0, 6.0, 8.0], EI, &[1, 2, 3]).unwrap();
        beam.share(&[udl(-1.0, 9.0, 4.0)], &mut r);
        // The overhangs: AISC case 24 on the end spans, L = 2, a = 1, w = 4: R1 = w(L² − a²)/(2L) = 3,
        // R2 = w(L + a)²/(2L) = 9, so the end supports get 9 and the next ones 3 + 4.
        assert!(close(&r, &[9.0, 7.0, 8.0, 7.0, 9.0], 1e-12), "{r:?}");
    }

    #[test]
    fn unknown_joints_give_each_support_its_two_span_value() {
        // source: Hicks Table 2.1 / AISC Table 3-23 — two equal spans: 3/8, 10/8, 3/8 wL; simple
        // span (AISC case 1): wL/2. Four equal spans of L = 2 under w = 4 (wL = 8), each inner
        // support as the middle of its own two-span beam: 10; each end as its own simple span: 4.
        let mut beam = TwoSpanLocal::new(&[0.0, 2.0, 4.0, 6.0, 8.0], EI).unwrap();
        let mut r = [0.0; 5];
        beam.share(&[udl(0.0, 8.0, 4.0)], &mut r);
        assert!(close(&r, &[4.0, 10.0, 10.0, 10.0, 4.0], 1e-12), "{r:?}");
        assert!(beam.worst_residual() < 1e-12);
        // One span loaded (the second): the two-span models about supports 1 and 2 each have one
        // of their spans loaded, 5/8 wL at the middle (Hicks: 7/16, 5/8, −1/16); the models of
        // the others, jointed short of it, take nothing. (Lifting from longer continuity is the
        // continuous pass's to find.)
        beam.share(&[udl(2.0, 4.0, 4.0)], &mut r);
        assert!(close(&r, &[0.0, 5.0, 5.0, 0.0, 0.0], 1e-12), "{r:?}");
        // An overhang stays with the end models: AISC case 25 (load on the overhang only), L = 2,
        // a = 1, w = 4 → the end support takes wa(2L + a)/(2L) = 5.
        beam.share(&[udl(-1.0, 0.0, 4.0)], &mut r);
        assert!((r[0] - 5.0).abs() < 1e-12, "{r:?}");
    }

    #[test]
    fn zero_load_costs_no_solve_and_gives_zero() {
        // common practice, no source
        let mut beam = ContinuousBeam::new(&[0.0, 1.0, 2.0, 3.0], EI).unwrap();
        let mut r = [9.0; 4];
        beam.share(&[udl(0.0, 3.0, 0.0), BeamLoad::Point { at: 1.0, p: 0.0 }], &mut r);
        assert_eq!(r, [0.0; 4]);
        // A point load right on a support goes to that support alone.
        beam.share(&[BeamLoad::Point { at: 2.0, p: 5.0 }], &mut r);
        assert!(close(&r, &[0.0, 0.0, 5.0, 0.0], 1e-15), "{r:?}");
    }

    #[test]
    fn single_support_reports_unbalanced_moment() {
        // common practice, no source: as share_simple.
        let mut beam = ContinuousBeam::new(&[2.0], EI).unwrap();
        let mut r = [0.0];
        let m = beam.share(&[BeamLoad::Point { at: 3.0, p: 4.0 }], &mut r);
        assert_eq!((r[0], m), (4.0, 4.0));
    }

    #[test]
    fn bad_input_is_an_error_not_a_panic() {
        // common practice, no source
        assert!(matches!(ContinuousBeam::new(&[0.0, 0.0], EI), Err(ContinuousError::SupportOrder { index: 1, .. })));
        assert!(matches!(ContinuousBeam::new(&[0.0, f64::NAN], EI), Err(ContinuousError::SupportOrder { .. })));
        assert!(matches!(ContinuousBeam::new(&[0.0, 1.0], 0.0), Err(ContinuousError::Stiffness(_))));
        assert!(matches!(ContinuousBeam::new(&[0.0, 1.0], f64::INFINITY), Err(ContinuousError::Stiffness(_))));
    }

    #[test]
    fn a_thousand_spans_stay_in_equilibrium() {
        // common practice, no source: ΣR = ΣW and ΣR·s = ΣW·c, relative residual ≤ 1e-9.
        let s: Vec<f64> = (0..=1000).map(|i| 1.5 * i as f64 + 0.3 * ((i * 7919) % 13) as f64 / 13.0).collect();
        let loads = [udl(-0.5, s[1000] + 0.7, 3.0), BeamLoad::Point { at: 700.2, p: 40.0 }];
        let r = continuous_reactions(&s, &loads, EI).unwrap();
        let (f, m) = residual(&s, &loads, &r);
        assert!(f <= 1e-9 && m <= 1e-9, "{f:e} {m:e}");
        // Far from the ends every inner support of a long uniformly loaded beam carries about wL.
        assert!((r[500] / (3.0 * 0.5 * (s[501] - s[499])) - 1.0).abs() < 0.2, "{}", r[500]);
    }

    /// Relative force and moment residuals of reactions against loads.
    fn residual(s: &[f64], loads: &[BeamLoad], r: &[f64]) -> (f64, f64) {
        let w: f64 = loads.iter().map(BeamLoad::total).sum();
        let scale: f64 = loads.iter().map(|l| l.total().abs()).sum::<f64>().max(1e-300);
        let span = (s[s.len() - 1] - s[0]).max(1.0);
        let mw: f64 = loads.iter().map(|l| l.moment_about(0.0)).sum();
        let fr: f64 = r.iter().sum();
        let mr: f64 = r.iter().zip(s).map(|(r, s)| r * s).sum();
        ((fr - w).abs() / scale, (mr - mw).abs() / (scale * span))
    }

    fn arb_beam() -> impl Strategy<Value = (Vec<f64>, Vec<BeamLoad>)> {
        let spans = prop::collection::vec(0.2f64..5.0, 1..12);
        let loads = prop::collection::vec((0u8..2, 0.0f64..1.0, 0.0f64..1.0, -5.0f64..20.0), 1..6);
        (spans, loads, 0.0f64..1.5, 0.0f64..1.5).prop_map(|(spans, loads, o0, o1)| {
            let mut s = vec![0.0];
            for l in spans {
                s.push(s[s.len() - 1] + l);
            }
            let (start, end) = (-o0, s[s.len() - 1] + o1);
            let at = |u: f64| start + u * (end - start);
            let loads = loads
                .into_iter()
                .map(|(kind, u, v, p)| if kind == 0 { BeamLoad::Point { at: at(u), p } } else { udl(at(u.min(v)), at(u.max(v)), p) })
                .collect();
            (s, loads)
        })
    }

    proptest! {
        #[test]
        fn equilibrium_holds_for_any_beam((s, loads) in arb_beam(), ei in 0.1f64..1e4) {
            // common practice, no source: statics of the whole member, relative residual ≤ 1e-9.
            let r = continuous_reactions(&s, &loads, ei).unwrap();
            let (f, m) = residual(&s, &loads, &r);
            prop_assert!(f <= 1e-9 && m <= 1e-9, "{f:e} {m:e}");
        }
    }
}
