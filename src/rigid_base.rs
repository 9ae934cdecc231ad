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

/// Reactions of a rigid base to a vertical load `v` (kN, downwards) and moments about the plate
/// centroid: `mx` tips towards +y, `my` tips towards +x (kN·m, so that a downward load at
/// eccentricity (ex, ey) gives `my = v·ex`, `mx = v·ey`). Returns the upward reaction of each plate.
pub fn share_vertical(plates: &[(f64, f64)], v: f64, mx: f64, my: f64) -> Result<Vec<f64>, RigidBaseError> {
    let n = plates.len();
    if n == 0 {
        return Err(RigidBaseError::NoPlates);
    }
    let (xc, yc) = centroid(plates);
    let (b, c) = linear_share(plates, (xc, yc), my, mx)?;
    Ok(plates.iter().map(|&(x, y)| v / n as f64 + b * (x - xc) + c * (y - yc)).collect())
}

fn centroid(plates: &[(f64, f64)]) -> (f64, f64) {
    let n = plates.len() as f64;
    let (sx, sy) = plates.iter().fold((0.0, 0.0), |(a, b), &(x, y)| (a + x, b + y));
    (sx / n, sy / n)
}

/// Coefficients (b, c) of ΔR = b (x − x̄) + c (y − ȳ) with Σ ΔR (x − x̄) = `sx` and
/// Σ ΔR (y − ȳ) = `sy`.
fn linear_share(plates: &[(f64, f64)], (xc, yc): (f64, f64), sx: f64, sy: f64) -> Result<(f64, f64), RigidBaseError> {
    let (mut ixx, mut iyy, mut ixy) = (0.0, 0.0, 0.0);
    for &(x, y) in plates {
        let (dx, dy) = (x - xc, y - yc);
        ixx += dx * dx;
        iyy += dy * dy;
        ixy += dx * dy;
    }
    let rhs = Vector2::new(sx, sy);
    let scale = rhs.norm();
    if scale == 0.0 {
        return Ok((0.0, 0.0));
    }
    // Solve in principal axes so a line of plates can still take moments about the other axis.
    let eig = Matrix2::new(ixx, ixy, ixy, iyy).symmetric_eigen();
    let largest = eig.eigenvalues.iter().cloned().fold(0.0, f64::max);
    let mut coeff = Vector2::zeros();
    for k in 0..2 {
        let lambda = eig.eigenvalues[k];
        let axis = eig.eigenvectors.column(k).into_owned();
        let along = axis.dot(&rhs);
        if lambda <= 1e-12 * largest.max(1e-300) || lambda <= 0.0 {
            if along.abs() > 1e-9 * scale.max(1.0) {
                return Err(RigidBaseError::Collinear { moment_knm: along.abs() });
            }
        } else {
            coeff += axis * (along / lambda);
        }
    }
    Ok((coeff[0], coeff[1]))
}

/// Base reactions of a rigid braced structure to horizontal forces.
#[derive(Debug, Clone, PartialEq)]
pub struct HorizontalShare {
    /// Upward vertical reaction change of each plate, kN.
    pub vertical: Vec<f64>,
    /// Horizontal reaction (x, y) of each plate, kN.
    pub shear: Vec<[f64; 2]>,
}

/// Share horizontal forces among plates at `(x, y, z)` so that all six equilibrium equations hold.
pub fn share_horizontal(plates: &[[f64; 3]], forces: &[HorizontalForce]) -> Result<HorizontalShare, RigidBaseError> {
    let n = plates.len();
    if n == 0 {
        return Err(RigidBaseError::NoPlates);
    }
    // Resultant force and moment about the origin of the applied forces.
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
    let plan: Vec<(f64, f64)> = plates.iter().map(|p| (p[0], p[1])).collect();
    let (xc, yc) = centroid(&plan);
    let j: f64 = plan.iter().map(|&(x, y)| (x - xc).powi(2) + (y - yc).powi(2)).sum();
    // Twist about the vertical through the centroid that the plates must resist.
    let twist = -m[2] + xc * f[1] - yc * f[0];
    let t = if j > 1e-12 {
        twist / j
    } else if twist.abs() > 1e-9 * (f[0].hypot(f[1]) + 1.0) {
        return Err(RigidBaseError::NoTorsion { moment_knm: twist.abs() });
    } else {
        0.0
    };
    let nf = n as f64;
    let shear: Vec<[f64; 2]> = plan.iter().map(|&(x, y)| [-f[0] / nf - t * (y - yc), -f[1] / nf + t * (x - xc)]).collect();
    // Moment still to be balanced after the shears: that is the overturning moment.
    let (mut rx, mut ry) = (m[0], m[1]);
    for (p, s) in plates.iter().zip(&shear) {
        rx += -p[2] * s[1];
        ry += p[2] * s[0];
    }
    // Vertical reactions R give moment (Σ y R, −Σ x R); they must cancel (rx, ry).
    let (b, c) = linear_share(&plan, (xc, yc), ry, -rx)?;
    let vertical = plan.iter().map(|&(x, y)| b * (x - xc) + c * (y - yc)).collect();
    Ok(HorizontalShare { vertical, shear })
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
