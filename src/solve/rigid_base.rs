//! Sharing horizontal loads among the base plates of a rigid, braced structure.
//!
//! The braced structure is treated as a rigid body on its base plates (the rigid-cap pile-group
//! idealisation). Horizontal force is shared equally among the plates as base shear, plus a
//! torsional share about the plate centroid when the force does not pass through it. What moment
//! is left — the overturning moment about the base — is resisted by vertical plate forces that
//! vary linearly over the plan: `ΔR_i = b (x_i − x̄) + c (y_i − ȳ)`, with `[Ixx Ixy; Ixy Iyy]
//! [b c]ᵀ` equal to the moment. For a group symmetric about both axes this is the familiar
//! `ΔR_i = M (x_i − x̄) / Σ (x_j − x̄)²` per axis.

use nalgebra::{Matrix2, Vector2};

/// A horizontal force at a point, kN and m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HorizontalForce {
    /// Point of application (x, y, z), m.
    pub at: [f64; 3],
    /// Force (fx, fy), kN.
    pub force: [f64; 2],
}

/// Why a set of plates cannot take a load as a rigid base.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum RigidBaseError {
    /// No plates at all.
    #[error("there are no base plates to take the load")]
    NoPlates,
    /// All plates lie on one line, and the load overturns about that line.
    #[error("the base plates all lie on one line, so they cannot resist an overturning moment of {moment_knm:.3} kN·m about it")]
    Collinear {
        /// The moment that cannot be resisted, kN·m.
        moment_knm: f64,
    },
    /// All plates are at one point in plan, and the load twists the structure about it.
    #[error("the base plates are all at one point in plan, so they cannot resist a twisting moment of {moment_knm:.3} kN·m")]
    NoTorsion {
        /// The twisting moment, kN·m.
        moment_knm: f64,
    },
}

/// The plan geometry of a set of base plates, prepared once for any number of loads.
#[derive(Debug, Clone)]
pub struct RigidBase {
    plates: Vec<[f64; 3]>,
    centroid: (f64, f64),
    /// Σ r² about the centroid (polar), m².
    polar: f64,
    /// Principal second moments of the plate positions and their axes.
    principal: [(f64, Vector2<f64>); 2],
}

impl RigidBase {
    /// Prepare plates at (x, y, z).
    pub fn new(plates: &[[f64; 3]]) -> Result<Self, RigidBaseError> {
        let n = plates.len();
        if n == 0 {
            return Err(RigidBaseError::NoPlates);
        }
        let nf = n as f64;
        let (sx, sy) = plates.iter().fold((0.0, 0.0), |(a, b), p| (a + p[0], b + p[1]));
        let (xc, yc) = (sx / nf, sy / nf);
        let (mut ixx, mut iyy, mut ixy) = (0.0, 0.0, 0.0);
        for p in plates {
            let (dx, dy) = (p[0] - xc, p[1] - yc);
            ixx += dx * dx;
            iyy += dy * dy;
            ixy += dx * dy;
        }
        let eig = Matrix2::new(ixx, ixy, ixy, iyy).symmetric_eigen();
        let principal = [0, 1].map(|k| (eig.eigenvalues[k], eig.eigenvectors.column(k).into_owned()));
        Ok(RigidBase { plates: plates.to_vec(), centroid: (xc, yc), polar: ixx + iyy, principal })
    }

    /// Coefficients (b, c) of ΔR = b (x − x̄) + c (y − ȳ) with Σ ΔR (x − x̄) = `sx` and
    /// Σ ΔR (y − ȳ) = `sy`, solved in principal axes so a line of plates can still take moments
    /// about the other axis.
    fn linear_share(&self, sx: f64, sy: f64) -> Result<(f64, f64), RigidBaseError> {
        let rhs = Vector2::new(sx, sy);
        let scale = rhs.norm();
        if scale == 0.0 {
            return Ok((0.0, 0.0));
        }
        let largest = self.principal.iter().map(|p| p.0).fold(0.0, f64::max);
        let mut coeff = Vector2::zeros();
        for (lambda, axis) in &self.principal {
            let along = axis.dot(&rhs);
            if *lambda <= 1e-12 * largest.max(1e-300) || *lambda <= 0.0 {
                if along.abs() > 1e-9 * scale.max(1.0) {
                    return Err(RigidBaseError::Collinear { moment_knm: along.abs() });
                }
            } else {
                coeff += axis * (along / lambda);
            }
        }
        Ok((coeff[0], coeff[1]))
    }

    /// Upward reaction of each plate to a vertical load `v` (kN, downwards) and moments about the
    /// plate centroid: `mx` tips towards +y, `my` towards +x (kN·m; a downward load at
    /// eccentricity (ex, ey) gives `my = v·ex`, `mx = v·ey`).
    pub fn share_vertical(&self, v: f64, mx: f64, my: f64) -> Result<Vec<f64>, RigidBaseError> {
        let (xc, yc) = self.centroid;
        let (b, c) = self.linear_share(my, mx)?;
        let n = self.plates.len() as f64;
        Ok(self.plates.iter().map(|p| v / n + b * (p[0] - xc) + c * (p[1] - yc)).collect())
    }

    /// Share a horizontal resultant — force (fx, fy) kN and its moment about the origin
    /// (mx, my, mz) kN·m — so that all six equilibrium equations hold.
    pub fn share_horizontal(&self, f: [f64; 2], m: [f64; 3]) -> Result<HorizontalShare, RigidBaseError> {
        let (xc, yc) = self.centroid;
        // Twist about the vertical through the centroid that the plates must resist.
        let twist = -m[2] + xc * f[1] - yc * f[0];
        let t = if self.polar > 1e-12 {
            twist / self.polar
        } else if twist.abs() > 1e-9 * (f[0].hypot(f[1]) + 1.0) {
            return Err(RigidBaseError::NoTorsion { moment_knm: twist.abs() });
        } else {
            0.0
        };
        let nf = self.plates.len() as f64;
        let shear: Vec<[f64; 2]> = self.plates.iter().map(|p| [-f[0] / nf - t * (p[1] - yc), -f[1] / nf + t * (p[0] - xc)]).collect();
        // Moment still to be balanced after the shears: that is the overturning moment.
        let (mut rx, mut ry) = (m[0], m[1]);
        for (p, s) in self.plates.iter().zip(&shear) {
            rx += -p[2] * s[1];
            ry += p[2] * s[0];
        }
        // Vertical reactions R give moment (Σ y R, −Σ x R); they must cancel (rx, ry).
        let (b, c) = self.linear_share(ry, -rx)?;
        let vertical = self.plates.iter().map(|p| b * (p[0] - xc) + c * (p[1] - yc)).collect();
        Ok(HorizontalShare { vertical, shear })
    }
}

/// Resultant force (fx, fy) and moment about the origin of horizontal forces.
pub fn resultant(forces: &[HorizontalForce]) -> ([f64; 2], [f64; 3]) {
    let (mut f, mut m) = ([0.0f64; 2], [0.0f64; 3]);
    for h in forces {
        let [x, y, z] = h.at;
        let [fx, fy] = h.force;
        f[0] += fx;
        f[1] += fy;
        m[0] += -z * fy;
        m[1] += z * fx;
        m[2] += x * fy - y * fx;
    }
    (f, m)
}

/// Reactions of a rigid base at plan points to a vertical load and moments; see
/// [`RigidBase::share_vertical`].
pub fn share_vertical(plates: &[(f64, f64)], v: f64, mx: f64, my: f64) -> Result<Vec<f64>, RigidBaseError> {
    let at: Vec<[f64; 3]> = plates.iter().map(|&(x, y)| [x, y, 0.0]).collect();
    RigidBase::new(&at)?.share_vertical(v, mx, my)
}

/// Base reactions of a rigid braced structure to horizontal forces.
#[derive(Debug, Clone, PartialEq)]
pub struct HorizontalShare {
    /// Upward vertical reaction change of each plate, kN.
    pub vertical: Vec<f64>,
    /// Horizontal reaction (x, y) of each plate, kN.
    pub shear: Vec<[f64; 2]>,
}

/// Share horizontal forces among plates at `(x, y, z)`; see [`RigidBase::share_horizontal`].
pub fn share_horizontal(plates: &[[f64; 3]], forces: &[HorizontalForce]) -> Result<HorizontalShare, RigidBaseError> {
    let (f, m) = resultant(forces);
    RigidBase::new(plates)?.share_horizontal(f, m)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn eccentric_load_on_a_four_pile_group() {
        // source: rigid-cap pile-group formula P_i = V/n ± M_y x_i/Σx² ± M_x y_i/Σy² (Bowles,
        // Foundation Analysis and Design; Tomlinson, Pile Design and Construction Practice).
        // Supports at (±1.5, ±1.0), V = 100 at e_x = 1.0, e_y = 0.5 → 54.17, 29.17, 20.83, −4.17
        let plates = [(1.5, 1.0), (-1.5, 1.0), (1.5, -1.0), (-1.5, -1.0)];
        let r = share_vertical(&plates, 100.0, 100.0 * 0.5, 100.0 * 1.0).unwrap();
        let expect = [54.1667, 20.8333, 29.1667, -4.1667];
        for (a, e) in r.iter().zip(expect) {
            assert!((a - e).abs() < 1e-4, "{r:?}");
        }
    }

    #[test]
    fn moment_about_one_axis_on_a_two_by_two_grid() {
        // source: same pile-group formula; 2×2 grid at ±1.0, V = 40, M = 4 → 11, 11, 9, 9
        let plates = [(1.0, 1.0), (1.0, -1.0), (-1.0, 1.0), (-1.0, -1.0)];
        let r = share_vertical(&plates, 40.0, 0.0, 4.0).unwrap();
        for (a, e) in r.iter().zip([11.0, 11.0, 9.0, 9.0]) {
            assert!((a - e).abs() < 1e-12, "{r:?}");
        }
    }

    #[test]
    fn plates_in_a_line_cannot_resist_moment_about_it() {
        // common practice, no source: a single line of supports is a hinge about that line.
        let plates = [[0.0, 0.0, 0.0], [2.0, 0.0, 0.0]];
        let push_y = [HorizontalForce { at: [1.0, 0.0, 2.0], force: [0.0, 1.0] }];
        assert!(matches!(share_horizontal(&plates, &push_y), Err(RigidBaseError::Collinear { .. })));
        let push_x = [HorizontalForce { at: [1.0, 0.0, 2.0], force: [1.0, 0.0] }];
        let s = share_horizontal(&plates, &push_x).unwrap();
        // 1 kN at 2 m over a 2 m base: ±1 kN.
        assert!((s.vertical[0] + 1.0).abs() < 1e-12 && (s.vertical[1] - 1.0).abs() < 1e-12);
    }
}
