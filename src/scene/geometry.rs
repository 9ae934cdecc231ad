//! Plan geometry shared by the scene's elements and its loads.

use serde::{Deserialize, Serialize};

/// An axis-aligned rectangle in plan, m.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Rect {
    /// (min, max) in x, m.
    pub x: (f64, f64),
    /// (min, max) in y, m.
    pub y: (f64, f64),
}

impl Rect {
    /// Plan area, m².
    pub fn area(&self) -> f64 {
        (self.x.1 - self.x.0) * (self.y.1 - self.y.0)
    }
    /// Centre point.
    pub fn centre(&self) -> (f64, f64) {
        (0.5 * (self.x.0 + self.x.1), 0.5 * (self.y.0 + self.y.1))
    }
    /// Whether `other` lies inside this rectangle, within `tol` metres.
    pub fn contains_rect(&self, other: &Rect, tol: f64) -> bool {
        other.x.0 >= self.x.0 - tol
            && other.x.1 <= self.x.1 + tol
            && other.y.0 >= self.y.0 - tol
            && other.y.1 <= self.y.1 + tol
    }
    /// Whether the point lies inside, within `tol` metres.
    pub fn contains(&self, x: f64, y: f64, tol: f64) -> bool {
        x >= self.x.0 - tol && x <= self.x.1 + tol && y >= self.y.0 - tol && y <= self.y.1 + tol
    }
}
