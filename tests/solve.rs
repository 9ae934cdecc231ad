//! Load paths through whole scenes, checked against published formulas.

use plateload::scene::loads::{Case, LoadKind, PlanDirection, LOAD_CLASSES};
use plateload::{analyse, Intensity};

use crate::util::*;

#[test]
fn deck_point_load_is_shared_by_the_lever_rule_twice() {
    // source: AISC Steel Construction Manual Table 3-23 case 8 (simple beam, concentrated load at
    // any point): R1 = Pb/L, R2 = Pa/L. Deck span 4 m, P = 10 kN at 1 m → bearers 7.5 and 2.5 kN;
    // each bearer span 2 m with the load at mid-span → half to each post.
    let mut s = one_bay_deck((0.0, 4.0));
    s.loads.push(load("P", Case::Q, LoadKind::DeckPoint { deck: "D".into(), x: 1.0, y: 1.0, kn: 10.0 }));
    let a = analyse(&s).unwrap();
    close("A1", case_load(&a, "A1", Case::Q), 3.75, 1e-12);
    close("B1", case_load(&a, "B1", Case::Q), 3.75, 1e-12);
    close("A2", case_load(&a, "A2", Case::Q), 1.25, 1e-12);
    close("B2", case_load(&a, "B2", Case::Q), 1.25, 1e-12);
}

#[test]
fn off_centre_point_load_on_a_bearer() {
    // source: AISC Table 3-23 case 8: L = 4, P = 10 at a = 1 → R1 = 7.5, R2 = 2.5
    let mut s = bare_scene();
    s.posts = vec![post("L", 0.0, 0.0, 2.0), post("R", 4.0, 0.0, 2.0)];
    s.bearers = vec![bearer("B", 2.0, &["L", "R"])];
    s.loads.push(load("P", Case::G, LoadKind::BearerPoint { bearer: "B".into(), at_m: 1.0, kn: 10.0 }));
    let a = analyse(&s).unwrap();
    close("L", case_load(&a, "L", Case::G), 7.5, 1e-12);
    close("R", case_load(&a, "R", Case::G), 2.5, 1e-12);
}

#[test]
fn uniform_deck_load_goes_half_to_each_bearer() {
    // source: AISC Table 3-23 case 1 (simple beam, uniform load): wL/2 at each end.
    // 3 kPa on a 2 m × 4 m deck = 24 kN → 12 kN per bearer → 6 kN per post.
    let mut s = one_bay_deck((0.0, 4.0));
    s.loads.push(load("q", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: kpa(3.0) }));
    let a = analyse(&s).unwrap();
    for id in ["A1", "B1", "A2", "B2"] {
        close(id, case_load(&a, id, Case::Q), 6.0, 1e-12);
    }
}

#[test]
fn bearer_overhang_load_lifts_the_far_post() {
    // source: AISC Table 3-23 case 25 (beam overhanging one support, uniform load on overhang):
    // R1 = −wa²/(2L), R2 = wa(2L + a)/(2L). L = 4, a = 1, w = 10 → −1.25 (uplift), 11.25
    let mut s = bare_scene();
    s.posts = vec![post("L", 0.0, 0.0, 2.0), post("R", 4.0, 0.0, 2.0)];
    let mut b = bearer("B", 2.0, &["L", "R"]);
    b.overhang_end_m = 1.0;
    s.bearers = vec![b];
    s.loads.push(load("w", Case::G, LoadKind::BearerLine { bearer: "B".into(), from_m: 4.0, to_m: 5.0, kn_per_m: 10.0 }));
    let a = analyse(&s).unwrap();
    close("L", case_load(&a, "L", Case::G), -1.25, 1e-12);
    close("R", case_load(&a, "R", Case::G), 11.25, 1e-12);
    let l = &a.plates[a.plate_index("L").unwrap()];
    assert!(l.status.uplift, "the lifting post must be flagged, never hidden");
    assert_eq!(l.status.label(), "UPLIFT");
}

#[test]
fn cantilevered_deck_edge_relieves_the_back_bearer() {
    // source: AISC Table 3-23 case 24 (beam overhanging one support, uniform load over span and
    // overhang): R1 = w(L² − a²)/(2L), R2 = w(L + a)²/(2L). Deck span L = 4 m with a 1 m
    // cantilever edge, 1 kPa → per metre of bearer 1.875 and 3.125 kN/m; bearers 2 m long.
    let mut s = one_bay_deck((0.0, 5.0));
    s.loads.push(load("q", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: kpa(1.0) }));
    let a = analyse(&s).unwrap();
    close("A1", case_load(&a, "A1", Case::Q), 1.875, 1e-12);
    close("A2", case_load(&a, "A2", Case::Q), 3.125, 1e-12);
    // Load only on the cantilever: the back bearer is pulled up.
    let mut s = one_bay_deck((0.0, 5.0));
    s.loads.push(load("edge", Case::Q, LoadKind::DeckPatch { deck: "D".into(), area: plateload::Rect { x: (0.0, 2.0), y: (4.0, 5.0) }, intensity: kpa(10.0) }));
    let a = analyse(&s).unwrap();
    // source: AISC case 25 per metre: −10·1²/(2·4) = −1.25 kN/m and 10·1·9/8 = 11.25 kN/m; × 2 m / 2 posts
    close("A1", case_load(&a, "A1", Case::Q), -1.25, 1e-12);
    close("A2", case_load(&a, "A2", Case::Q), 11.25, 1e-12);
}

#[test]
fn wind_force_is_pressure_times_projected_area() {
    // common practice, no source: F = q·A on the area projected normal to the wind.
    // 0.3 kPa on a 12 m × 6 m sheeted face → 21.6 kN; at 30° to the face normal the projected
    // width is 12·cos 30°.
    let scene = plateload::scene::io::read_scene(&scene_path("harbour-sheeted-face.ron")).unwrap();
    let a = analyse(&scene).unwrap();
    close("base shear", a.base_shear()[Case::W.index()][1].abs(), 21.6, 1e-9);
    // At 30° to the face normal the projected width is 12·cos 30°.
    let mut s = scene.clone();
    for l in &mut s.loads {
        if let LoadKind::Wind { direction, .. } = &mut l.kind {
            *direction = PlanDirection::Degrees(60.0);
        }
    }
    let a = analyse(&s).unwrap();
    let wind = a.horizontal_base_shear().into_iter().find(|h| h.0 == "wind-face").unwrap().2;
    close("resultant", wind[0].hypot(wind[1]), 0.3 * 12.0 * 30f64.to_radians().cos() * 6.0, 1e-9);
}

#[test]
fn overturning_factor_and_kentledge() {
    // common practice, no source: factor = restoring ÷ overturning moment about the tipping edge;
    // kentledge K over the opposite edge adds K × base width. Two posts 2 m apart, 10 kN on
    // each, 2 kN at 5 m on the braced post E → restoring 20 × 1 = 20, overturning 10 → 2.0; target 3 → K = 5 kN.
    let mut s = bare_scene();
    s.posts = vec![post("W", 0.0, 0.0, 5.0), post("E", 2.0, 0.0, 5.0)];
    s.braces = vec![brace("b", "W", "E", 5.0)];
    s.stability.target_factor = 3.0;
    for p in ["W", "E"] {
        s.loads.push(load(&format!("top-{p}"), Case::G, LoadKind::PostTop { post: p.into(), kn: 10.0 }));
    }
    s.loads.push(load("H", Case::W, LoadKind::Horizontal { x: 2.0, y: 0.0, level: 5.0, kn: 2.0, direction: PLUS_X }));
    let a = analyse(&s).unwrap();
    let axes = &a.stability.structures[0].axes;
    let plus_x = axes.iter().find(|d| d.towards == "+x").unwrap();
    close("restoring", plus_x.permanent_stabilising_knm, 20.0, 1e-12);
    close("overturning", plus_x.horizontal_destabilising_knm, 10.0, 1e-12);
    close("factor", plus_x.factor.unwrap(), 2.0, 1e-12);
    let k = plus_x.kentledge.as_ref().unwrap();
    close("kentledge", k.needed_kn.unwrap(), 5.0, 1e-12);
    assert_eq!(k.plates, ["W"]);
    close("lever", k.lever_m, 2.0, 1e-12);
    assert!(axes.iter().find(|d| d.towards == "-x").unwrap().factor.is_none());
}

#[test]
fn load_class_loads_follow_the_load_class_table() {
    // source: EN 12811-1:2003 Table 3 (q1, q2 via DGUV Information 201-011 Table 2)
    let q1 = [0.75, 1.5, 2.0, 3.0, 4.5, 6.0];
    let q2 = [None, None, None, Some(5.0), Some(7.5), Some(10.0)];
    for (k, c) in LOAD_CLASSES.iter().enumerate() {
        assert_eq!(c.class as usize, k + 1);
        assert_eq!(c.uniform_kpa, q1[k], "q1 of class {}", c.class);
        assert_eq!(c.partial_kpa, q2[k], "q2 of class {}", c.class);
        assert_eq!(Intensity::LoadClassUniform(c.class).kpa(), Some(q1[k]));
    }
    // from memory: F1 on 500 × 500 mm is 1.5 kN for classes 1–3 and 3.0 kN for 4–6
    assert_eq!(LOAD_CLASSES[2].concentrated_500_kn, 1.5);
    assert_eq!(LOAD_CLASSES[3].concentrated_500_kn, 3.0);
    // A class-3 deck of 2 m × 4 m carries 2.0 kPa × 8 m² = 16 kN.
    let mut s = one_bay_deck((0.0, 4.0));
    s.loads.push(load("class-3", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: Intensity::LoadClassUniform(3) }));
    let a = analyse(&s).unwrap();
    close("total Q", a.equilibrium[Case::Q.index()].reactions.force[2], 16.0, 1e-12);
}

#[test]
fn default_factors_are_the_recommended_en_1990_values() {
    // source: EN 1990 Annex A1 Table A1.2(B) set B: γG,sup 1.35, γG,inf 1.00, γQ 1.50;
    // Table A1.2(A) EQU: γG,sup 1.10, γG,inf 0.90, γQ 1.50.
    let d = plateload::Combination::defaults();
    let f = &d.iter().find(|c| c.name == "factored").unwrap().factors;
    assert_eq!((f.g_unfavourable, f.g_favourable, f.q), (1.35, 1.0, 1.5));
    let e = &d.iter().find(|c| c.name == "stability").unwrap().factors;
    assert_eq!((e.g_unfavourable, e.g_favourable, e.q), (1.1, 0.9, 1.5));
    // source: worked check G = 10, Q = 5 → expression 6.10: 1.35·10 + 1.5·5 = 21.0
    let mut s = bare_scene();
    s.posts = vec![post("P", 0.0, 0.0, 2.0)];
    s.loads.push(load("g", Case::G, LoadKind::PostTop { post: "P".into(), kn: 10.0 }));
    s.loads.push(load("q", Case::Q, LoadKind::PostTop { post: "P".into(), kn: 5.0 }));
    let a = analyse(&s).unwrap();
    let factored = a.combinations.iter().position(|c| c.name == "factored").unwrap();
    close("6.10", a.plates[0].combinations[factored].max_kn, 21.0, 1e-12);
    // Favourable permanent load with the imposed load absent: 0.9 × 10 (EQU).
    let eq = a.combinations.iter().position(|c| c.name == "stability").unwrap();
    close("EQU min", a.plates[0].combinations[eq].min_kn, 9.0, 1e-12);
}

#[test]
fn every_demo_scene_balances_to_rounding() {
    // common practice, no source: ΣF = 0 and ΣM = 0 for every load case; here to 1e-9 relative.
    for (name, scene) in demo_scenes() {
        let a = analyse(&scene).unwrap_or_else(|e| panic!("{name}: {e}"));
        assert!(a.worst_residual() <= 1e-9, "{name}: residual {}", a.worst_residual());
        for e in &a.equilibrium {
            assert!(e.applied.force[2].abs() > 0.0 || e.case == Case::W, "{name}: case {} has no load", e.case);
        }
    }
}

#[test]
fn moments_balance_about_any_point() {
    // common practice, no source: if ΣF = 0 and ΣM = 0 about one point, ΣM = 0 about every point.
    let points = [[0.0, 0.0, 0.0], [13.0, -7.5, 2.0], [-40.0, 25.0, -3.0], [3.3, 1.1, 100.0]];
    for (name, scene) in demo_scenes() {
        let a = analyse(&scene).unwrap();
        // Each load item on its own, so that opposite loads cannot cancel an error.
        for item in &a.solution.items {
            let total = item.applied.plus(&item.reaction_resultant(&a.solution.plates));
            let scale = item.applied.force.iter().map(|f| f.abs()).sum::<f64>().max(1e-3) * 100.0;
            for p in points {
                let m = total.moment_about(p);
                let norm = (m[0] * m[0] + m[1] * m[1] + m[2] * m[2]).sqrt();
                assert!(norm <= 1e-9 * scale, "{name} item {} about {p:?}: {norm}", item.id);
            }
        }
    }
}

#[test]
fn centre_of_gravity_is_the_centre_of_mass() {
    // common practice, no source: under uniform gravity the centre of gravity is the
    // weight-weighted mean position. Computed here straight from the element definitions.
    for (name, scene) in demo_scenes() {
        let a = analyse(&scene).unwrap();
        let (mut w, mut wx, mut wy) = (0.0, 0.0, 0.0);
        let mut add = |p: f64, x: f64, y: f64| {
            w += p;
            wx += p * x;
            wy += p * y;
        };
        for p in &scene.posts {
            add(p.self_weight_kn_per_m * (p.top_level - p.base_level), p.x, p.y);
        }
        for b in &scene.bearers {
            let ends: Vec<&plateload::Post> = [b.posts.first().unwrap(), b.posts.last().unwrap()].iter().map(|id| scene.posts.iter().find(|p| &&p.id == id).unwrap()).collect();
            let len = (ends[1].x - ends[0].x).hypot(ends[1].y - ends[0].y);
            let (ux, uy) = if len > 0.0 { ((ends[1].x - ends[0].x) / len, (ends[1].y - ends[0].y) / len) } else { (1.0, 0.0) };
            let mid = 0.5 * (len + b.overhang_end_m - b.overhang_start_m);
            add(b.self_weight_kn_per_m * (len + b.overhang_start_m + b.overhang_end_m), ends[0].x + mid * ux, ends[0].y + mid * uy);
        }
        for d in &scene.decks {
            let (cx, cy) = d.extent.centre();
            add(d.self_weight_kpa * d.extent.area(), cx, cy);
        }
        for l in scene.loads.iter().filter(|l| l.case == Case::G) {
            match &l.kind {
                LoadKind::PostTop { post, kn } => {
                    let p = scene.posts.iter().find(|p| &p.id == post).unwrap();
                    add(*kn, p.x, p.y);
                }
                LoadKind::DeckArea { deck, intensity } => {
                    let d = scene.decks.iter().find(|d| &d.id == deck).unwrap();
                    let (cx, cy) = d.extent.centre();
                    add(intensity.kpa().unwrap() * d.extent.area(), cx, cy);
                }
                LoadKind::BearerLine { bearer, from_m, to_m, kn_per_m } => {
                    let b = scene.bearers.iter().find(|b| &b.id == bearer).unwrap();
                    let p0 = scene.posts.iter().find(|p| p.id == b.posts[0]).unwrap();
                    let p1 = scene.posts.iter().find(|p| &p.id == b.posts.last().unwrap()).unwrap();
                    let len = (p1.x - p0.x).hypot(p1.y - p0.y);
                    let t = 0.5 * (from_m + to_m) / len;
                    add(kn_per_m * (to_m - from_m), p0.x + t * (p1.x - p0.x), p0.y + t * (p1.y - p0.y));
                }
                other => panic!("{name}: add {other:?} to this check"),
            }
        }
        let (gx, gy) = a.stability.centre_of_gravity.unwrap();
        close(&format!("{name} CoG x"), gx, wx / w, 1e-9);
        close(&format!("{name} CoG y"), gy, wy / w, 1e-9);
        close(&format!("{name} weight"), a.stability.permanent_kn, w, 1e-9);
    }
}

#[test]
fn trace_adds_up_to_the_plate_load() {
    // common practice, no source: the shares of a reaction sum to the reaction.
    for (name, scene) in demo_scenes() {
        let a = analyse(&scene).unwrap();
        let mut sums = vec![[0.0; 3]; scene.posts.len()];
        for c in &a.solution.contributions {
            sums[c.post as usize][a.solution.items[c.item as usize].case.index()] += c.kn;
        }
        for p in &a.plates {
            let s = sums[p.post];
            for k in 0..3 {
                close(&format!("{name} {} case {k}", p.id), s[k], p.case_kn[k], 1e-9);
            }
        }
        let worst = a.worst_plate().unwrap();
        let text = plateload::export::trace::trace_text(&scene, &a, worst);
        assert!(text.contains(&a.plates[worst].id) && text.contains("via bearer"), "{text}");
    }
}

#[test]
fn single_post_tee_head_must_balance() {
    // common practice, no source: a T-head on one post stands only if the moments about the post
    // balance; symmetric loads do, a load on one arm does not.
    let mut s = bare_scene();
    s.posts = vec![post("P", 0.0, 0.0, 2.0)];
    let mut t = bearer("T", 2.0, &["P"]);
    t.overhang_start_m = 1.0;
    t.overhang_end_m = 1.0;
    s.bearers = vec![t];
    s.loads.push(load("a", Case::G, LoadKind::BearerPoint { bearer: "T".into(), at_m: -0.8, kn: 3.0 }));
    s.loads.push(load("b", Case::G, LoadKind::BearerPoint { bearer: "T".into(), at_m: 0.8, kn: 3.0 }));
    let a = analyse(&s).unwrap();
    close("P", case_load(&a, "P", Case::G), 6.0, 1e-12);
    assert!(a.warnings.iter().any(|w| w.id == "T"), "{:?}", a.warnings);
    s.loads.pop();
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("bearer T") && err.contains("tips") && err.contains("permanent load"), "{err}");
    // Balanced permanent load again, plus a variable load on one arm: that load can act alone.
    s.loads.push(load("b", Case::G, LoadKind::BearerPoint { bearer: "T".into(), at_m: 0.8, kn: 3.0 }));
    s.loads.push(load("q", Case::Q, LoadKind::BearerPoint { bearer: "T".into(), at_m: 0.8, kn: 3.0 }));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("bearer T") && err.contains("under load q"), "{err}");
}

mod properties {
    use plateload::scene::layout::{generate, LayoutSpec};
    use plateload::scene::loads::{Case, LoadKind, PlanDirection};
    use plateload::Rect;
    use proptest::prelude::*;

    use crate::util::load;

    /// A generated braced layout with a patch, a point load and a wind load placed at random.
    fn scene(bx: usize, by: usize, sx: f64, sy: f64, lifts: usize, u: f64, v: f64, wind_deg: f64) -> plateload::Scene {
        let spec = LayoutSpec { bays_x: bx, bays_y: by, bay_x_m: sx, bay_y_m: sy, lifts, deck_lifts: vec![lifts], ..LayoutSpec::default() };
        let mut s = generate("prop", 200.0, &spec);
        let deck = s.decks[0].id.clone();
        let (w, d) = (bx as f64 * sx, by as f64 * sy);
        let (x0, y0) = (u * w * 0.5, v * d * 0.5);
        let area = Rect { x: (x0, x0 + 0.4 * w), y: (y0, y0 + 0.4 * d) };
        s.loads.push(load("patch", Case::Q, LoadKind::DeckPatch { deck: deck.clone(), area, intensity: plateload::Intensity::Kpa(7.0) }));
        s.loads.push(load("point", Case::G, LoadKind::DeckPoint { deck, x: u * w, y: v * d, kn: 4.0 }));
        let face = plateload::scene::loads::Face { from: (0.0, 0.0), to: (w, 0.0), bottom: 0.0, top: lifts as f64 * 2.0 };
        s.loads.push(load("wind", Case::W, LoadKind::Wind { face, kpa: 0.4, direction: PlanDirection::Degrees(wind_deg) }));
        s
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

        #[test]
        fn moment_sum_vanishes_about_any_point(
            bx in 1usize..5, by in 1usize..4, sx in 0.8f64..3.0, sy in 0.8f64..2.5, lifts in 1usize..4,
            u in 0.0f64..1.0, v in 0.0f64..1.0, wind_deg in 0.0f64..360.0,
            px in -50.0f64..50.0, py in -50.0f64..50.0, pz in -10.0f64..30.0,
        ) {
            // common practice, no source: ΣF = 0 and ΣM = 0 about every point, for each load item
            let s = scene(bx, by, sx, sy, lifts, u, v, wind_deg);
            let a = plateload::analyse(&s).unwrap();
            let size = (bx as f64 * sx).max(by as f64 * sy) + px.abs().max(py.abs()) + pz.abs();
            for item in &a.solution.items {
                let total = item.applied.plus(&item.reaction_resultant(&a.solution.plates));
                let f: f64 = item.applied.force.iter().map(|c| c.abs()).sum();
                let m = total.moment_about([px, py, pz]);
                let norm = (m[0] * m[0] + m[1] * m[1] + m[2] * m[2]).sqrt();
                prop_assert!(norm <= 1e-9 * f.max(1e-6) * size, "item {} about ({px},{py},{pz}): {norm}", item.id);
                let fr = (total.force[0].powi(2) + total.force[1].powi(2) + total.force[2].powi(2)).sqrt();
                prop_assert!(fr <= 1e-9 * f.max(1e-6), "item {}: |ΣF| {fr}", item.id);
            }
        }
    }
}
