//! Ground bearing under each base plate: the area its load spreads over.

use crate::scene::model::{Scene, SupportType};

/// Bearing of one support type on the ground.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Bearing {
    /// Area the load is spread over at formation level, m².
    pub area_m2: f64,
    /// Allowable ground bearing pressure, kPa.
    pub allowable_kpa: f64,
}

/// Area at formation level under a support: its bearing plate (sole plate, else base plate)
/// widened on every side by the spread through the granular layer, if any.
pub fn bearing_area(scene: &Scene, support: &SupportType) -> f64 {
    let plate = support.bearing_plate();
    let grow = scene.site.granular_layer.map_or(0.0, |l| 2.0 * l.thickness_m * l.spread.spread_per_side());
    (plate.width_m + grow) * (plate.length_m + grow)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::model::{GranularLayer, LoadSpread, PlateSize};

    fn support(sole: Option<PlateSize>) -> SupportType {
        SupportType { id: "S".into(), base_plate: PlateSize { width_m: 0.15, length_m: 0.15 }, swl_kn: 30.0, sole_plate: sole }
    }

    #[test]
    fn load_spread_through_a_granular_layer() {
        // source: 2V:1H rule P/((B+z)(L+z)) (Das; Bowles), 45° rule P/((B+2z)(L+2z)) (common
        // practice). P = 20 on a 150 × 150 plate → 888.9 kPa directly; through 150 mm of granular
        // fill: 2:1 → 222.2 kPa, 45° → 98.8 kPa.
        let mut scene = Scene::empty("t", 100.0);
        let s = support(None);
        assert!((20.0 / bearing_area(&scene, &s) - 888.888_9).abs() < 1e-3);
        scene.site.granular_layer = Some(GranularLayer { thickness_m: 0.15, spread: LoadSpread::TwoToOne });
        assert!((20.0 / bearing_area(&scene, &s) - 222.222_2).abs() < 1e-3);
        scene.site.granular_layer = Some(GranularLayer { thickness_m: 0.15, spread: LoadSpread::FortyFive });
        assert!((20.0 / bearing_area(&scene, &s) - 98.765_4).abs() < 1e-3);
        scene.site.granular_layer = Some(GranularLayer { thickness_m: 0.15, spread: LoadSpread::AngleDeg(45.0) });
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
}
