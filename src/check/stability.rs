//! Overall stability: centre of gravity of the permanent load, factor of safety against
//! overturning about each edge of the base footprint, and the kentledge that would reach the target.

use crate::scene::loads::Case;
use crate::solve::{Resultant, Solution};

/// Tipping towards one plan direction about the edge of the base footprint on that side.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Overturning {
    /// Direction of tipping: `+x`, `-x`, `+y` or `-y`.
    pub direction: &'static str,
    /// Plan coordinate of the tipping edge (x for ±x, y for ±y), m.
    pub edge_m: f64,
    /// Restoring moment of the permanent load about the edge, kN·m.
    pub restoring_knm: f64,
    /// Overturning moment about the edge: permanent load if it overturns, plus every vertical
    /// variable load that overturns, plus the worst single direction of horizontal load, kN·m.
    pub overturning_knm: f64,
    /// restoring ÷ overturning; `None` when nothing overturns.
    pub factor: Option<f64>,
    /// Kentledge needed over the opposite edge to reach the target factor, kN (0 if met;
    /// `None` if the footprint has no width in this direction).
    pub kentledge_kn: Option<f64>,
}

/// The stability summary.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Stability {
    /// Total permanent load, kN.
    pub permanent_kn: f64,
    /// Centre of gravity (x, y) of the permanent load, m; `None` if there is none.
    pub centre_of_gravity: Option<(f64, f64)>,
    /// Target factor of safety.
    pub target_factor: f64,
    /// Each tipping direction.
    pub directions: Vec<Overturning>,
}

impl Stability {
    /// The direction with the lowest factor, if any overturns.
    pub fn governing(&self) -> Option<&Overturning> {
        self.directions
            .iter()
            .filter(|d| d.factor.is_some())
            .min_by(|a, b| a.factor.partial_cmp(&b.factor).unwrap_or(std::cmp::Ordering::Equal))
    }
}

/// Work out the stability summary from the applied load of each item.
pub fn stability(solution: &Solution, target_factor: f64) -> Stability {
    let permanent = solution.items.iter().filter(|i| i.case == Case::G).fold(Resultant::default(), |r, i| r.plus(&i.applied));
    let p = permanent.down();
    // Downward P at (x, y) has moment (−yP, xP, 0) about the origin.
    let cog = (p > 0.0).then(|| (permanent.moment[1] / p, -permanent.moment[0] / p));
    let plates: Vec<[f64; 3]> = solution.plates.iter().zip(&solution.is_plate).filter(|(_, is)| **is).map(|(p, _)| *p).collect();
    if plates.is_empty() {
        return Stability { permanent_kn: p, centre_of_gravity: cog, target_factor, directions: Vec::new() };
    }
    let fold = |f: fn(f64, f64) -> f64, k: usize, init: f64| plates.iter().fold(init, |a, pl| f(a, pl[k]));
    let (xmin, xmax) = (fold(f64::min, 0, f64::INFINITY), fold(f64::max, 0, f64::NEG_INFINITY));
    let (ymin, ymax) = (fold(f64::min, 1, f64::INFINITY), fold(f64::max, 1, f64::NEG_INFINITY));
    let zbase = plates.iter().map(|p| p[2]).sum::<f64>() / plates.len() as f64;
    // (label, point on the edge, axis whose moment component tips that way, width, edge coord)
    let sides: [(&'static str, [f64; 3], [f64; 3], f64, f64); 4] = [
        ("+x", [xmax, 0.0, zbase], [0.0, 1.0, 0.0], xmax - xmin, xmax),
        ("-x", [xmin, 0.0, zbase], [0.0, -1.0, 0.0], xmax - xmin, xmin),
        ("+y", [0.0, ymax, zbase], [-1.0, 0.0, 0.0], ymax - ymin, ymax),
        ("-y", [0.0, ymin, zbase], [1.0, 0.0, 0.0], ymax - ymin, ymin),
    ];
    // Every working level counts in full here (the working-scaffold rule is not used for
    // overturning, which is the more cautious).
    let actions = crate::check::actions::VariableActions::of(&solution.items, crate::scene::model::WorkingLevels::AllAtOnce);
    let tip = |r: &Resultant, edge: [f64; 3], axis: [f64; 3]| {
        let m = r.moment_about(edge);
        m[0] * axis[0] + m[1] * axis[1] + m[2] * axis[2]
    };
    let directions = sides
        .iter()
        .map(|&(direction, edge, axis, width, edge_m)| {
            let g = tip(&permanent, edge, axis);
            let restoring = (-g).max(0.0);
            let items = &solution.items;
            // An arranged load overturns with the cells that turn the structure that way only.
            let independent: f64 = actions
                .independent
                .iter()
                .map(|&i| match &items[i].arranged {
                    Some(a) => a.cells.iter().map(|c| tip(&c.applied, edge, axis).max(0.0)).sum(),
                    None => tip(&items[i].applied, edge, axis).max(0.0),
                })
                .sum();
            let horizontal = actions
                .by_direction
                .iter()
                .map(|g| g.iter().map(|&i| tip(&items[i].applied, edge, axis)).sum::<f64>())
                .fold(0.0, f64::max);
            let variable = independent + horizontal;
            let overturning = g.max(0.0) + variable;
            let factor = (overturning > 1e-9).then(|| restoring / overturning);
            let shortfall = (target_factor * overturning - restoring).max(0.0);
            let kentledge_kn = if shortfall == 0.0 { Some(0.0) } else { (width > 1e-9).then(|| shortfall / width) };
            Overturning { direction, edge_m, restoring_knm: restoring, overturning_knm: overturning, factor, kentledge_kn }
        })
        .collect();
    Stability { permanent_kn: p, centre_of_gravity: cog, target_factor, directions }
}
