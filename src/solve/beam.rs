//! Load sharing along one straight member by segment moment balance.
//!
//! A member has supports at increasing distances `s[0] < s[1] < … < s[n-1]` along it. Each
//! segment between two consecutive supports is simply supported: a resultant `W` at `c` gives
//! `R_j = W (s[j+1] − c) / L` and `R_{j+1} = W (c − s[j]) / L` (ΣF = 0 and ΣM = 0 about either
//! end). A load beyond the first or last support sits on an overhang that is balanced about that
//! support against the next one — the same lever rule with `c` outside the span, which makes the
//! far reaction negative: the overhang lifts the next support. A member on a single support takes
//! everything on that support and reports the moment it cannot balance.

/// A load on a member, positions as distances along it, m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum BeamLoad {
    /// A point force `p`, kN (positive down), at `at`.
    Point {
        /// Position, m.
        at: f64,
        /// Force, kN.
        p: f64,
    },
    /// A uniform line load `w`, kN/m (positive down), from `from` to `to` (`from < to`).
    Uniform {
        /// Start, m.
        from: f64,
        /// End, m.
        to: f64,
        /// Intensity, kN/m.
        w: f64,
    },
}

impl BeamLoad {
    /// Total force, kN.
    pub fn total(&self) -> f64 {
        match *self {
            BeamLoad::Point { p, .. } => p,
            BeamLoad::Uniform { from, to, w } => w * (to - from),
        }
    }
    /// Moment of the load about the position `s`, kN·m (force × (centroid − s)).
    pub fn moment_about(&self, s: f64) -> f64 {
        match *self {
            BeamLoad::Point { at, p } => p * (at - s),
            BeamLoad::Uniform { from, to, w } => w * (to - from) * (0.5 * (from + to) - s),
        }
    }
}

/// The part of a member a reaction came through.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize)]
pub enum Piece {
    /// The simply supported segment from support `j` to `j + 1`.
    Span(u32),
    /// The overhang before the first support, balanced about it.
    StartOverhang,
    /// The overhang after the last support, balanced about it.
    EndOverhang,
    /// The whole member on its only support.
    Single,
    /// The whole member, continuous over all its supports but its joints
    /// ([`crate::solve::continuous`]).
    Continuous,
    /// The two-span model about the support, for a member whose joints are not known
    /// ([`crate::solve::continuous::TwoSpanLocal`]).
    TwoSpanModel,
}

/// Share one load among the supports by segment moment balance.
///
/// `sink(support, piece, reaction)` receives every reaction (kN, positive up) with the piece it
/// came through. Returns the moment about the support that a single-support member cannot
/// balance (0 for two or more supports).
pub fn share_simple(supports: &[f64], load: &BeamLoad, sink: &mut impl FnMut(usize, Piece, f64)) -> f64 {
    let n = supports.len();
    if n == 0 {
        return 0.0;
    }
    if n == 1 {
        sink(0, Piece::Single, load.total());
        return load.moment_about(supports[0]);
    }
    // Lever rule on span j for a resultant w at c (c may lie outside the span: overhang).
    let mut lever = |j: usize, piece: Piece, w: f64, c: f64| {
        let (a, b) = (supports[j], supports[j + 1]);
        let l = b - a;
        sink(j, piece, w * (b - c) / l);
        sink(j + 1, piece, w * (c - a) / l);
    };
    let region = |k: usize| -> (usize, Piece) {
        // k = number of supports at or before the point.
        if k == 0 {
            (0, Piece::StartOverhang)
        } else if k < n {
            (k - 1, Piece::Span((k - 1) as u32))
        } else {
            (n - 2, Piece::EndOverhang)
        }
    };
    match *load {
        BeamLoad::Point { at, p } => {
            let k = supports.partition_point(|&s| s <= at);
            let (j, piece) = region(k);
            lever(j, piece, p, at);
        }
        BeamLoad::Uniform { from, to, w } => {
            let mut cur = from;
            let mut k = supports.partition_point(|&s| s <= cur);
            while cur < to {
                let next = if k < n { supports[k].min(to) } else { to };
                let (j, piece) = region(k);
                if next > cur {
                    lever(j, piece, w * (next - cur), 0.5 * (cur + next));
                }
                cur = next;
                k += 1;
            }
        }
    }
    0.0
}

#[cfg(test)]
mod tests {
    use super::*;

    fn reactions(supports: &[f64], load: BeamLoad) -> Vec<f64> {
        let mut r = vec![0.0; supports.len()];
        share_simple(supports, &load, &mut |i, _, v| r[i] += v);
        r
    }

    #[test]
    fn point_load_on_a_simple_span() {
        // source: AISC Steel Construction Manual Table 3-23 case 8 (simple beam, concentrated
        // load at any point): R1 = Pb/L, R2 = Pa/L. L=4, P=10, a=1 → 7.5, 2.5
        let r = reactions(&[0.0, 4.0], BeamLoad::Point { at: 1.0, p: 10.0 });
        assert!((r[0] - 7.5).abs() < 1e-12 && (r[1] - 2.5).abs() < 1e-12, "{r:?}");
    }

    #[test]
    fn uniform_load_on_a_simple_span() {
        // source: AISC Table 3-23 case 1 (simple beam, uniform load): wL/2 each. w=3, L=4 → 6, 6
        let r = reactions(&[0.0, 4.0], BeamLoad::Uniform { from: 0.0, to: 4.0, w: 3.0 });
        assert!((r[0] - 6.0).abs() < 1e-12 && (r[1] - 6.0).abs() < 1e-12, "{r:?}");
    }

    #[test]
    fn load_on_an_overhang_lifts_the_far_support() {
        // source: AISC Table 3-23 case 25 (beam overhanging one support, uniform load on the
        // overhang): R1 = −wa²/(2L), R2 = wa(2L + a)/(2L). L=4, a=1, w=10 → −1.25, 11.25
        let r = reactions(&[0.0, 4.0], BeamLoad::Uniform { from: 4.0, to: 5.0, w: 10.0 });
        assert!((r[0] + 1.25).abs() < 1e-12 && (r[1] - 11.25).abs() < 1e-12, "{r:?}");
    }

    #[test]
    fn uniform_load_over_span_and_overhang() {
        // source: AISC Table 3-23 case 24: R1 = w(L² − a²)/(2L), R2 = w(L + a)²/(2L).
        // L=4, a=1, w=1 → 1.875, 3.125
        let r = reactions(&[0.0, 4.0], BeamLoad::Uniform { from: 0.0, to: 5.0, w: 1.0 });
        assert!((r[0] - 1.875).abs() < 1e-12 && (r[1] - 3.125).abs() < 1e-12, "{r:?}");
    }

    #[test]
    fn start_overhang_mirrors_end_overhang() {
        // source: same AISC case 25, mirrored: the overhang before the first support.
        let r = reactions(&[0.0, 4.0], BeamLoad::Point { at: -1.0, p: 10.0 });
        assert!((r[0] - 12.5).abs() < 1e-12 && (r[1] + 2.5).abs() < 1e-12, "{r:?}");
    }

    #[test]
    fn single_support_reports_unbalanced_moment() {
        // common practice, no source: a member on one support balances only if the moment of
        // its loads about that support is zero.
        let mut r = 0.0;
        let m = share_simple(&[2.0], &BeamLoad::Point { at: 3.0, p: 4.0 }, &mut |_, _, v| r += v);
        assert_eq!((r, m), (4.0, 4.0));
        let sym = [BeamLoad::Point { at: 1.0, p: 4.0 }, BeamLoad::Point { at: 3.0, p: 4.0 }];
        let m: f64 = sym.iter().map(|l| share_simple(&[2.0], l, &mut |_, _, _| {})).sum();
        assert_eq!(m, 0.0);
    }

    #[test]
    fn uniform_load_across_many_spans_keeps_force_and_moment() {
        // common practice, no source: ΣR = W and ΣR·s = W·c for any statically determinate split.
        let s = [0.0, 1.2, 2.0, 3.5, 4.1];
        let load = BeamLoad::Uniform { from: -0.4, to: 4.6, w: 2.5 };
        let r = reactions(&s, load);
        let sum: f64 = r.iter().sum();
        let mom: f64 = r.iter().zip(&s).map(|(r, s)| r * s).sum();
        assert!((sum - load.total()).abs() < 1e-12);
        assert!((mom - load.moment_about(0.0)).abs() < 1e-12);
    }
}
