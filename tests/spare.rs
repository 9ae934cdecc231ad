//! The spare-capacity map against hand calculations, and re-solved with the reported load placed.

use plateload::check::spare::{spare_map, Limit, SpareSettings};
use plateload::scene::loads::{Arrangement, Case, LoadKind};
use plateload::scene::model::{BeamMethod, Brace, Interface, NotionalRule, PostNode};
use plateload::solve::influence::Footprint;
use plateload::{analyse, Scene};

use crate::util::*;

/// Four weightless posts at (0|2, 0|3) with SWL 30 kN, bearers along x at y = 0 and y = 3, a
/// deck over x 0..2 spanning y 0..`y_top` (beyond 3: a cantilever), all simple spans; ground and
/// bearing generous so the safe working load governs.
fn strip(y_top: f64) -> Scene {
    let mut s = bare_scene();
    s.site.allowable_bearing_kpa = Some(1e5);
    s.analysis.method = BeamMethod::SimpleSpans;
    s.posts = vec![post("A1", 0.0, 0.0, 2.0), post("B1", 2.0, 0.0, 2.0), post("A2", 0.0, 3.0, 2.0), post("B2", 2.0, 3.0, 2.0)];
    s.bearers = vec![bearer("South", 2.0, &["A1", "B1"]), bearer("North", 2.0, &["A2", "B2"])];
    s.decks = vec![deck("D", 2.0, (0.0, 2.0), (0.0, y_top), &["South", "North"])];
    s
}

fn at<'a>(map: &'a plateload::check::spare::SpareMap, x: f64, y: f64) -> &'a plateload::check::spare::SparePoint {
    map.decks[0].points.iter().find(|p| (p.x - x).abs() < 1e-9 && (p.y - y).abs() < 1e-9).unwrap_or_else(|| panic!("no grid point at ({x}, {y})"))
}

#[test]
fn a_deck_strip_on_four_plates_by_the_lever_rule() {
    // statics, by hand (lever rule across the deck, then along the bearer — AISC Table 3-23 case
    // 8): a point load at (0.5, 1.0) puts (1 − 1/3)·(1 − 0.5/2) = 0.5 of itself on A1, the most of
    // any plate. With 6 kN already on A1 (a permanent load on its top), A1 has 30 − 6 = 24 kN of
    // room: the spare load there is 24 / 0.5 = 48 kN. B1 gets 1/6 (room 30 → 180), A2 1/4
    // (→ 120), B2 1/12 (→ 360).
    let mut s = strip(3.0);
    s.loads.push(load("kit", Case::G, LoadKind::PostTop { post: "A1".into(), kn: 6.0 }));
    let a = analyse(&s).unwrap();
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    let p = at(&map, 0.5, 1.0);
    close("spare at (0.5, 1.0)", p.kn.unwrap(), 48.0, 1e-9);
    match &p.limit {
        Limit::Plate { plate, check, combination, .. } => assert_eq!((&**plate, *check, &**combination), ("A1", "safe working load", "service")),
        other => panic!("{other:?}"),
    }
    // Mid-deck (1.0, 1.5): a quarter to each plate; A1 binds with 24 / 0.25 = 96 kN.
    close("spare at the middle", at(&map, 1.0, 1.5).kn.unwrap(), 96.0, 1e-9);
    // Right on post B2's corner (2, 3) the load goes straight into B2: 30 kN.
    close("spare over B2", at(&map, 2.0, 3.0).kn.unwrap(), 30.0, 1e-9);
    assert!(map.not_checked.iter().any(|m| m == "bearer South") && map.not_checked.iter().any(|m| m == "deck D"), "{:?}", map.not_checked);
}

#[test]
fn a_cantilever_point_is_limited_by_the_back_plate_lifting() {
    // statics, by hand: the deck cantilevers 1 m past the north bearer (span 3 m). A point load at
    // the tip (1.0, 4.0) puts −1/3 of itself on the south bearer (lever rule, AISC Table 3-23 case
    // 25), −1/6 on each of A1 and B1. Each carries 1 kN of permanent load. Service (G × 1.0, Q ×
    // 1.0): 1 / (1/6) = 6 kN. Stability (EN 1990 Table A1.2(A): G × 0.9 favourable, Q × 1.5):
    // 0.9 / (1.5 × 1/6) = 3.6 kN — that governs.
    let mut s = strip(4.0);
    for id in ["A1", "B1"] {
        s.loads.push(load(&format!("kit-{id}"), Case::G, LoadKind::PostTop { post: id.into(), kn: 1.0 }));
    }
    let a = analyse(&s).unwrap();
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    let tip = at(&map, 1.0, 4.0);
    close("spare at the tip", tip.kn.unwrap(), 3.6, 1e-9);
    match &tip.limit {
        Limit::Plate { plate, check, combination, .. } => {
            assert!(&**plate == "A1" || &**plate == "B1", "{plate}");
            assert_eq!((*check, &**combination), ("uplift", "stability"));
        }
        other => panic!("{other:?}"),
    }
    assert!(tip.limit.words().contains("would lift"), "{}", tip.limit.words());
}

#[test]
fn a_point_limited_by_the_deck_load_class() {
    // source: EN 12811-1:2003 Table 3 (REFERENCES §2): load class 3, q1 = 2.0 kPa, F1 = 1.5 kN on
    // 500 × 500 mm, applied separately. With q1 already over the whole deck, a point load may add
    // F1 less the 2.0 × 0.25 = 0.5 kN already on that square: 1.0 kN. A 1.0 × 1.0 m pallet may
    // add nothing: q1 over its area is already there, and F1 (1.5 kN) < q1 × 1 m² is not larger.
    let mut s = strip(3.0);
    s.loads.push(load("class", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: plateload::Intensity::LoadClassUniform(3) }));
    let a = analyse(&s).unwrap();
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    let p = at(&map, 1.0, 1.5);
    close("point on a class-3 deck", p.kn.unwrap(), 1.0, 1e-9);
    assert!(matches!(&p.limit, Limit::Deck { what } if what.contains("F1 1.5 kN")), "{:?}", p.limit);
    assert_eq!(map.decks[0].load_class, Some(3));
    let pallet = spare_map(&s, &a, &SpareSettings { footprint: Footprint { x_m: 1.0, y_m: 1.0 }, ..SpareSettings::default() }).unwrap();
    let p = at(&pallet, 1.0, 1.5);
    assert_eq!(p.kn, Some(0.0));
    assert!(p.already_at_limit, "a deck at its class already is shown apart from small spare capacity");
}

#[test]
fn bad_settings_are_refused_with_a_clear_message() {
    // common practice, no source
    let s = strip(3.0);
    let a = analyse(&s).unwrap();
    let refuse = |settings: SpareSettings, needle: &str| {
        let err = spare_map(&s, &a, &settings).unwrap_err().to_string();
        assert!(err.contains(needle), "{err}");
    };
    refuse(SpareSettings { spacing_m: 0.0, ..Default::default() }, "grid spacing must be at least 0.01 m");
    refuse(SpareSettings { spacing_m: -1.0, ..Default::default() }, "grid spacing");
    refuse(SpareSettings { footprint: Footprint { x_m: 1.0, y_m: 0.0 }, ..Default::default() }, "footprint must be a point");
    refuse(SpareSettings { footprint: Footprint { x_m: 5.0, y_m: 5.0 }, decks: vec!["D".into()], ..Default::default() }, "does not fit on deck D");
    refuse(SpareSettings { decks: vec!["Nope".into()], ..Default::default() }, "deck \"Nope\" does not exist");
    refuse(SpareSettings { footprint: Footprint { x_m: 5.0, y_m: 5.0 }, ..Default::default() }, "does not fit on any deck");
    refuse(SpareSettings { combinations: vec!["factored".into()], ..Default::default() }, "none of factored");
    refuse(SpareSettings { dynamic_factor: 0.5, ..Default::default() }, "dynamic factor");
    let mut t = s.clone();
    for c in &mut t.combinations {
        c.checks_capacity = false;
        c.checks_uplift = false;
    }
    let b = analyse(&t).unwrap();
    let err = spare_map(&t, &b, &SpareSettings::default()).unwrap_err().to_string();
    assert!(err.contains("no combination checks capacity or uplift"), "{err}");
}

/// `strip(3.0)` with each of its two lines along x braced by one diagonal (west post at the
/// base to east post at 2 m: run 2 m, rise 2 m), 10 kN of permanent load on each post top, the
/// notional load checked along +x only.
fn braced_strip(rule: NotionalRule) -> Scene {
    let mut s = strip(3.0);
    for (id, a, b) in [("XS", "A1", "B1"), ("XN", "A2", "B2")] {
        s.braces.push(Brace { id: id.into(), from: PostNode { post: a.into(), level: 0.0 }, to: PostNode { post: b.into(), level: 2.0 } });
    }
    for id in ["A1", "B1", "A2", "B2"] {
        s.loads.push(load(&format!("kit-{id}"), Case::G, LoadKind::PostTop { post: id.into(), kn: 10.0 }));
    }
    s.horizontal.notional = rule;
    s.horizontal.directions = vec![plateload::scene::loads::PlanDirection::PlusX];
    s
}

#[test]
fn the_notional_load_of_the_extra_load_goes_into_the_braced_plates() {
    // statics, by hand (lever rule across the deck and along the bearers, AISC Table 3-23 case 8;
    // a diagonal of run b and rise h carrying shear V puts ±V·h/b into the posts at its ends,
    // REFERENCES §8). Notional load 2.5 % of the vertical load, along +x, at the nodes where it
    // enters the posts (2 m). Already there: 40 kN → 1 kN along +x, 0.5 kN in each braced line
    // → +0.5 kN on B1 (upper end of XS), −0.5 kN on A1. Service: B1 carries 10 + 0.5 = 10.5 kN,
    // room 30 − 10.5 = 19.5 kN.
    // A point load P at (1.0, 1.0): 2/3 of it onto the south bearer, half of that to each of A1
    // and B1 (P/3 each); its notional load 0.025 × 2/3 P goes down XS: +P/60 on B1 (h/b = 1).
    // B1 takes P/3 + P/60 = 0.35 P → P = 19.5 / 0.35 = 55.714… kN. A1: room 20 (the −0.5 kN is
    // not counted on the maximum), P/3 − P/60 → the vertical P/3 alone at worst: 60 kN. B2:
    // 19.5 / (1/6 + 1/120) = 111.4 kN; A2: 120 kN.
    let s = braced_strip(NotionalRule::Percent(2.5));
    let a = analyse(&s).unwrap();
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    let p = at(&map, 1.0, 1.0);
    close("spare at (1, 1) with the notional load", p.kn.unwrap(), 19.5 / 0.35, 1e-9);
    match &p.limit {
        Limit::Plate { plate, check, combination, .. } => assert_eq!((&**plate, *check, &**combination), ("B1", "safe working load", "service")),
        other => panic!("{other:?}"),
    }
    let words = map.notional.as_deref().unwrap();
    assert!(words.contains("2.5 % of it") && words.contains("is included"), "{words}");
    assert!(map.not_included.as_deref().unwrap().contains("sliding"));
    // Placed and solved again, B1 is exactly at its safe working load: 10.5 + 0.35 × P = 30.
    let mut t = s.clone();
    let mut l = load("placed", Case::Q, LoadKind::DeckPoint { deck: "D".into(), x: 1.0, y: 1.0, kn: 19.5 / 0.35 });
    l.arrangement = Arrangement::Whole;
    t.loads.push(l);
    let b = analyse(&t).unwrap();
    let service = b.combinations.iter().position(|c| c.name == "service").unwrap();
    close("B1 with the load placed", b.plates[b.plate_index("B1").unwrap()].combinations[service].max_kn, 30.0, 1e-9);
    // Without notional load the value is the old one: room 20 on A1 and B1, P/3 each → 60 kN.
    let s = braced_strip(NotionalRule::Off);
    let a = analyse(&s).unwrap();
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    close("spare at (1, 1) without notional load", at(&map, 1.0, 1.0).kn.unwrap(), 60.0, 1e-9);
    assert!(map.notional.is_none());
    // Coefficients kept from before the notional rule was set are not used without it.
    // common practice, no source: the same map as worked out from scratch.
    let kept = plateload::check::spare::spare_influences(&s, &a, &SpareSettings::default()).unwrap();
    let on = braced_strip(NotionalRule::Percent(2.5));
    let a_on = analyse(&on).unwrap();
    let again = plateload::check::spare::spare_map_from(&on, &a_on, &SpareSettings::default(), &kept).unwrap();
    close("kept coefficients, notional load set since", at(&again, 1.0, 1.0).kn.unwrap(), 19.5 / 0.35, 1e-9);
}

/// Posts `P{i}-{j}` on a square grid of `bay`, 2 m high; the lines along x carry bearers `L{j}` at
/// 2 m, and a deck over them cantilevers `cant` past the last; imposed load `q` and permanent
/// load `g` (kPa) on it; analysed by `method` (0 simple spans, 1 continuous, 2 envelope).
#[allow(clippy::too_many_arguments)]
fn grid_scene(nx: usize, ny: usize, bay: f64, cant: f64, q: f64, g: f64, method: usize) -> Scene {
    let mut s = bare_scene();
    s.analysis.method = [BeamMethod::SimpleSpans, BeamMethod::Continuous, BeamMethod::Envelope][method];
    for j in 0..ny {
        for i in 0..nx {
            s.posts.push(post(&format!("P{i}-{j}"), i as f64 * bay, j as f64 * bay, 2.0));
        }
    }
    for j in 0..ny {
        let ids: Vec<String> = (0..nx).map(|i| format!("P{i}-{j}")).collect();
        let refs: Vec<&str> = ids.iter().map(String::as_str).collect();
        s.bearers.push(bearer(&format!("L{j}"), 2.0, &refs));
    }
    let names: Vec<String> = (0..ny).map(|j| format!("L{j}")).collect();
    let refs: Vec<&str> = names.iter().map(String::as_str).collect();
    s.decks.push(deck("D", 2.0, (0.0, (nx - 1) as f64 * bay), (0.0, (ny - 1) as f64 * bay + cant), &refs));
    s.loads.push(load("q", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: kpa(q) }));
    s.loads.push(load("g", Case::G, LoadKind::DeckArea { deck: "D".into(), intensity: kpa(g) }));
    s
}

/// Each line along x of [`grid_scene`] braced in its first bay, and the falsework rule (2.5 %,
/// no wind) along +x.
fn brace_first_bays(s: &mut Scene, ny: usize) {
    for j in 0..ny {
        s.braces.push(Brace { id: format!("X{j}"), from: PostNode { post: format!("P0-{j}"), level: 0.0 }, to: PostNode { post: format!("P1-{j}"), level: 2.0 } });
    }
    s.horizontal.notional = NotionalRule::Falsework;
    s.horizontal.directions = vec![plateload::scene::loads::PlanDirection::PlusX];
}

/// One point of the map of `s` (grid 0.5 m; a point, or the 0.6 × 0.4 m footprint) with room
/// left whose limit `wanted` accepts, chosen by `pick`; `None` where there is none.
fn pick_point(s: &Scene, a: &plateload::Analysis, rect: bool, pick: u64, wanted: impl Fn(&Limit) -> bool) -> Option<plateload::check::spare::SparePoint> {
    let fp = if rect { Footprint { x_m: 0.6, y_m: 0.4 } } else { Footprint::POINT };
    let map = spare_map(s, a, &SpareSettings { spacing_m: 0.5, footprint: fp, ..SpareSettings::default() }).unwrap();
    let candidates: Vec<_> = map.decks[0].points.iter().filter(|p| p.kn.is_some_and(|k| k > 1e-6) && wanted(&p.limit)).collect();
    (!candidates.is_empty()).then(|| candidates[(pick % candidates.len() as u64) as usize].clone())
}

/// `s` solved again with `kn` placed on deck D at (x, y), whole: a point, or spread over 0.6 × 0.4 m.
fn placed(s: &Scene, rect: bool, x: f64, y: f64, kn: f64) -> plateload::Analysis {
    let mut t = s.clone();
    let kind = if rect {
        LoadKind::DeckPatch { deck: "D".into(), area: plateload::Rect { x: (x - 0.3, x + 0.3), y: (y - 0.2, y + 0.2) }, intensity: kpa(kn / (0.6 * 0.4)) }
    } else {
        LoadKind::DeckPoint { deck: "D".into(), x, y, kn }
    };
    let mut l = load("placed", Case::Q, kind);
    l.arrangement = Arrangement::Whole;
    t.loads.push(l);
    analyse(&t).unwrap()
}

mod properties {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig { cases: 48, .. ProptestConfig::default() })]

        #[test]
        fn the_reported_load_brings_its_limit_exactly_to_capacity(
            nx in 2usize..4, ny in 2usize..4, bay in 1.0f64..2.5, cant in 0.0f64..0.8,
            method in 0usize..3, q in 0.5f64..4.0, g in 0.0f64..2.0, pick in any::<u64>(), rect in any::<bool>(),
            notional in any::<bool>(),
        ) {
            // common practice, no source: linearity — placing the reported load at the point and
            // solving again brings the limiting check to its limit (1e-6), and no other beyond
            // it; 1 % more exceeds it.
            let mut s = grid_scene(nx, ny, bay, cant, q, g, method);
            s.site.allowable_bearing_kpa = Some(400.0);
            if notional {
                // The map includes the notional load of the placed load, the solver adds it.
                brace_first_bays(&mut s, ny);
            }
            let a = analyse(&s).unwrap();
            let found = pick_point(&s, &a, rect, pick, |l| matches!(l, Limit::Plate { .. }));
            prop_assume!(found.is_some());
            let p = found.unwrap();
            let kn = p.kn.unwrap();
            let Limit::Plate { plate, check, combination, .. } = &p.limit else { unreachable!() };
            let place = |factor: f64| placed(&s, rect, p.x, p.y, factor * kn);
            let b = place(1.0);
            let c = b.combinations.iter().position(|x| *x.name == **combination).unwrap();
            let r = &b.plates[b.plate_index(plate).unwrap()];
            let cap = match *check {
                "safe working load" => r.swl_kn,
                "ground bearing" => r.allowable_kpa.unwrap() * r.bearing_area_m2,
                _ => 0.0,
            };
            let reached = if *check == "uplift" { r.combinations[c].min_kn } else { r.combinations[c].max_kn };
            // Where the limiting plate takes brace forces, the map takes the notional load of the
            // placed load in its worst direction and diaphragm assumption whatever governs the
            // loads already there, and never counts it where it helps: on the safe side, by at
            // most that notional load's own effect at the plate — statics, by hand: 2.5 % of the
            // load, all of it into one braced line at most (1 + cantilever ÷ bay of it, by the
            // lever rule), times rise ÷ run of the diagonal (2 m ÷ bay), times the horizontal
            // load factor.
            let braced = notional && { let q = &a.plates[a.plate_index(plate).unwrap()].brace; q.max_kn != 0.0 || q.min_kn != 0.0 };
            let slack = if braced { b.combinations[c].factors.w.max(1.0) * 0.025 * kn * (1.0 + cant / bay) * (2.0 / bay) } else { 0.0 };
            let tol = 1e-6 * cap.abs().max(1.0);
            if *check == "uplift" {
                prop_assert!(reached >= -tol && reached <= slack + tol, "{plate} {check} {combination}: {reached} vs {cap} (slack {slack}) with {kn} kN at ({}, {})", p.x, p.y);
            } else {
                prop_assert!(reached <= cap + tol && reached >= cap - slack - tol, "{plate} {check} {combination}: {reached} vs {cap} (slack {slack}) with {kn} kN at ({}, {})", p.x, p.y);
            }
            // Nothing else goes beyond its limit.
            for r in &b.plates {
                for (k, comb) in b.combinations.iter().enumerate() {
                    let rc = &r.combinations[k];
                    if comb.checks_capacity {
                        prop_assert!(rc.max_kn <= r.swl_kn.min(r.allowable_kpa.unwrap() * r.bearing_area_m2) * (1.0 + 1e-6) + 1e-9 || a.plates[a.plate_index(&r.id).unwrap()].combinations[k].max_kn > r.swl_kn.min(r.allowable_kpa.unwrap() * r.bearing_area_m2), "{} over in {}", r.id, comb.name);
                    }
                    if comb.checks_uplift {
                        prop_assert!(rc.min_kn >= -1e-6 || a.plates[a.plate_index(&r.id).unwrap()].combinations[k].min_kn < 0.0, "{} lifts in {}", r.id, comb.name);
                    }
                }
            }
            // 1 % more goes beyond the limit: by half the extra load's effect at least (where the
            // value is exact).
            prop_assume!(slack == 0.0);
            let d = place(1.01);
            let r1 = &d.plates[d.plate_index(plate).unwrap()].combinations[c];
            let (before, after) = if *check == "uplift" { (-reached, -r1.min_kn) } else { (reached, r1.max_kn) };
            let step = after - before;
            let limit = if *check == "uplift" { 0.0 } else { cap };
            prop_assert!(step > 0.0 && after - limit >= 0.5 * step, "1 % more must exceed the limit of {plate}: {before} → {after} against {limit}");
        }
    }
}

/// [`grid_scene`] 4 × 3, simple spans, with friction μ, braced in the first bays, 20 kN of
/// permanent load on the feet of the diagonals, its lines joined into one structure by transoms
/// that carry nothing.
fn sliding_grid(mu: f64) -> Scene {
    let mut s = grid_scene(4, 3, 1.5, 0.0, 2.0, 3.0, 0);
    s.site.allowable_bearing_kpa = Some(1e5);
    s.support_types[0].swl_kn = 1e4;
    s.support_types[0].friction = vec![Interface::Given { mu, source: "a test".into() }];
    brace_first_bays(&mut s, 3);
    // Weight on the feet of the diagonals, so that they have friction to spare.
    for j in 0..3 {
        s.loads.push(load(&format!("weight-{j}"), Case::G, LoadKind::PostTop { post: format!("P0-{j}"), kn: 20.0 }));
    }
    for i in 0..4 {
        let ids: Vec<String> = (0..3).map(|j| format!("P{i}-{j}")).collect();
        let refs: Vec<&str> = ids.iter().map(String::as_str).collect();
        s.bearers.push(bearer(&format!("T{i}"), 1.0, &refs));
    }
    s
}

#[test]
fn kept_coefficients_give_the_same_map_after_edits_that_change_what_slides() {
    // common practice, no source: a map from coefficients kept across edits of loads, friction,
    // the sliding target and the notional rule is the map worked out from scratch — twice in a
    // row, so that what the first keeps is used by the second.
    let settings = SpareSettings { spacing_m: 0.5, ..SpareSettings::default() };
    let first = sliding_grid(0.3);
    let kept = plateload::check::spare::spare_influences(&first, &analyse(&first).unwrap(), &settings).unwrap();
    let mut edits: Vec<(&str, Scene)> = vec![("as it was", first.clone())];
    let mut s = first.clone();
    s.loads.push(load("pallet", Case::G, LoadKind::PostTop { post: "P3-2".into(), kn: 8.0 }));
    edits.push(("a load on a post", s.clone()));
    s.support_types[0].friction = vec![Interface::Given { mu: 0.45, source: "a test".into() }];
    edits.push(("more friction", s.clone()));
    s.stability.sliding_target_factor = 2.5;
    edits.push(("a higher target against sliding", s.clone()));
    s.horizontal.directions.push(plateload::scene::loads::PlanDirection::MinusX);
    edits.push(("both ways along x", s.clone()));
    s.horizontal.notional = NotionalRule::Percent(3.0);
    edits.push(("a greater notional load", s.clone()));
    let mut slid = 0;
    for (what, s) in &edits {
        let a = analyse(s).unwrap();
        let fresh = spare_map(s, &a, &settings).unwrap();
        for time in ["first", "second"] {
            let again = plateload::check::spare::spare_map_from(s, &a, &settings, &kept).unwrap();
            assert!(again == fresh, "{what}, {time} time from kept coefficients: not the map worked out from scratch");
        }
        slid += fresh.decks[0].points.iter().filter(|p| matches!(p.limit, Limit::Sliding { .. })).count();
    }
    assert!(slid > 0, "some point is limited by sliding, so the kept plates are used");
}

#[test]
fn kept_coefficients_give_the_same_map_when_the_notional_load_is_taken_away_and_put_back() {
    // common practice, no source: what a map keeps from coefficients worked out with notional
    // load, when the map is asked first for the scene without any, is still right once the
    // notional load is back.
    let settings = SpareSettings { spacing_m: 0.5, ..SpareSettings::default() };
    let spec = plateload::scene::layout::LayoutSpec { bays_x: 3, bays_y: 3, lifts: 3, deck_lifts: vec![3], ..Default::default() };
    let with = plateload::scene::layout::generate("braced tower", 150.0, &spec);
    let kept = plateload::check::spare::spare_influences(&with, &analyse(&with).unwrap(), &settings).unwrap();
    let mut without = with.clone();
    without.horizontal.notional = NotionalRule::Off;
    for (what, s) in [("without notional load", &without), ("with it again", &with)] {
        let a = analyse(s).unwrap();
        let again = plateload::check::spare::spare_map_from(s, &a, &settings, &kept).unwrap();
        assert!(again == spare_map(s, &a, &settings).unwrap(), "{what}: not the map worked out from scratch");
    }
}

mod sliding_properties {
use super::*;
use proptest::prelude::*;

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    #[test]
    fn a_point_limited_by_sliding_brings_the_plate_to_its_target(
        nx in 2usize..4, ny in 2usize..4, bay in 1.0f64..2.5, cant in prop_oneof![Just(0.0), 0.0f64..0.8],
        method in 0usize..3, q in 0.5f64..4.0, g in 0.5f64..3.0, mu in 0.05f64..0.5, pick in any::<u64>(),
        rect in any::<bool>(), both_ways in any::<bool>(),
    ) {
        // common practice, no source: linearity — placing the reported load where a plate's
        // sliding limits it and solving again brings that plate's factor against sliding to its
        // target, never beyond, and no other plate beyond its own; exactly (1e-6) with simple spans
        // and no cantilever; 1 % more then loses the target.
        let mut s = grid_scene(nx, ny, bay, cant, q, g, method);
        s.site.allowable_bearing_kpa = Some(1e5);
        s.support_types[0].swl_kn = 1e4;
        s.support_types[0].friction = vec![Interface::Given { mu, source: "a test".into() }];
        brace_first_bays(&mut s, ny);
        // Transoms joining the lines into one structure, carrying nothing.
        for i in 0..nx {
            let ids: Vec<String> = (0..ny).map(|j| format!("P{i}-{j}")).collect();
            let refs: Vec<&str> = ids.iter().map(String::as_str).collect();
            s.bearers.push(bearer(&format!("T{i}"), 1.0, &refs));
        }
        if both_ways {
            s.horizontal.directions.push(plateload::scene::loads::PlanDirection::MinusX);
        }
        let a = analyse(&s).unwrap();
        prop_assume!(a.stability.structures.len() == 1);
        let found = pick_point(&s, &a, rect, pick, |l| matches!(l, Limit::Sliding { .. }));
        prop_assume!(found.is_some());
        let p = found.unwrap();
        let kn = p.kn.unwrap();
        let Limit::Sliding { plate, form } = p.limit.clone() else { unreachable!() };
        let place = |factor: f64| placed(&s, rect, p.x, p.y, factor * kn);
        // How far within its limit the plate is in the form that limits: 0 at the limit.
        let margin = |b: &plateload::Analysis| {
            let Some(r) = b.plates[b.plate_index(&plate).unwrap()].sliding.clone() else { return f64::INFINITY };
            if form == "EQU" { (r.equ_friction_kn - r.equ_shear_kn) / r.equ_friction_kn.max(1.0) } else { r.factor.unwrap() / b.sliding.target_factor - 1.0 }
        };
        let b = place(1.0);
        let at = margin(&b);
        prop_assert!(at >= -1e-6, "{plate} beyond the sliding target ({form}): {at} with {kn} kN at ({}, {})", p.x, p.y);
        prop_assert!(b.sliding.plates_to_restrain == 0 || a.sliding.plates_to_restrain > 0, "another plate slides");
        if method == 0 && cant == 0.0 {
            prop_assert!(at <= 1e-6, "{plate} short of the sliding target ({form}): {at} with {kn} kN at ({}, {})", p.x, p.y);
            prop_assert!(margin(&place(1.01)) < -1e-6, "1 % more must lose the target");
        }
    }
}
}

/// The strip's two lines joined into one structure by weightless transoms carrying nothing, 1 kN
/// of permanent load on each post top, overturning target factor 2.0.
fn one_structure(mut s: Scene) -> Scene {
    for id in ["A1", "B1", "A2", "B2"] {
        s.loads.push(load(&format!("kit-{id}"), Case::G, LoadKind::PostTop { post: id.into(), kn: 1.0 }));
    }
    s.bearers.push(bearer("West", 1.0, &["A1", "A2"]));
    s.bearers.push(bearer("East", 1.0, &["B1", "B2"]));
    s.stability.target_factor = 2.0;
    s
}

#[test]
fn a_point_beyond_the_tipping_edge_is_limited_by_overturning() {
    // statics, by hand: the deck cantilevers 2 m past the north bearer (y = 3) of a one-bay tower
    // (its two lines joined by transoms). Each plate carries
    // 1 kN of permanent load. About the north edge the two south plates restore 2 × 1 × 3 = 6 kN·m.
    // With a target factor of 2.0 the room is 6 / 2 = 3 kN·m: a load at the tip (lever 2 m) may
    // add 1.5 kN. (EQU, EN 1990 Table A1.2(A): 0.9 × 6 = 5.4 ≥ 1.5 × 2 × P → 1.8 kN; the south
    // plates lift at 0.9 / (1.5 × 1/3) = 1.8 kN too: both less strict here.)
    let s = one_structure(strip(5.0));
    let a = analyse(&s).unwrap();
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    let tip = at(&map, 1.0, 5.0);
    close("spare at the tip", tip.kn.unwrap(), 1.5, 1e-9);
    assert!(matches!(&tip.limit, Limit::Overturning { form: "factor of safety", .. }), "{:?}", tip.limit);
    assert!(tip.limit.words().starts_with("overturning about"), "{}", tip.limit.words());
}

#[test]
fn the_notional_load_of_the_extra_load_turns_the_structure_too() {
    // statics, by hand: the braced strip joined into one structure by transoms, 1 kN of
    // permanent load on each post top, target factor 2.0, notional load 2.5 % along +x at 2 m.
    // About the east edge (B1–B2, x = 2): restoring 2 × 1 kN × 2 m = 4 kN·m; overturning already
    // 0.025 × 4 kN × 2 m = 0.2 kN·m; room 4 / 2 − 0.2 = 1.8 kN·m. A load P at the middle
    // (1.0, 1.5) is inside the edge (it adds no overturning by its weight) but its notional load
    // 0.025·P at 2 m does: 0.05·P ≤ 1.8 → P = 36 kN. (EQU, EN 1990 Table A1.2(A): 0.9 × 4 −
    // 1.5 × 0.2 = 3.3 ≥ 1.5 × 0.05 P → 44 kN; plate B1 (SWL 30, room 28.95, P/4 + P/80) → 110 kN:
    // both less strict.)
    let mut s = braced_strip(NotionalRule::Percent(2.5));
    s.loads.retain(|l| !l.id.starts_with("kit-"));
    let s = one_structure(s);
    let a = analyse(&s).unwrap();
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    let p = at(&map, 1.0, 1.5);
    close("spare at the middle", p.kn.unwrap(), 36.0, 1e-9);
    assert!(matches!(&p.limit, Limit::Overturning { form: "factor of safety", .. }), "{:?}", p.limit);
    // Placed and solved again: the factor about the east edge is exactly the target.
    let mut t = s.clone();
    let mut l = load("placed", Case::Q, LoadKind::DeckPoint { deck: "D".into(), x: 1.0, y: 1.5, kn: 36.0 });
    l.arrangement = Arrangement::Whole;
    t.loads.push(l);
    let b = analyse(&t).unwrap();
    let east = b.stability.structures.iter().flat_map(|st| st.axes.iter()).find(|ax| ax.normal[0] > 0.99).expect("the east edge");
    close("factor about the east edge", east.factor.unwrap(), 2.0, 1e-9);
}

#[test]
fn a_deck_whose_notional_load_the_bracing_cannot_carry_is_refused() {
    // common practice, no source: with nothing on it yet the scene solves (no notional load), but
    // a load placed on the deck would bring notional load along y that nothing braced along y
    // holds: the map refuses with the posts and what to do rather than show numbers.
    let mut s = braced_strip(NotionalRule::Percent(2.5));
    s.loads.clear();
    s.horizontal.directions = vec![plateload::scene::loads::PlanDirection::PlusX, plateload::scene::loads::PlanDirection::PlusY];
    let a = analyse(&s).unwrap();
    let err = spare_map(&s, &a, &SpareSettings::default()).unwrap_err().to_string();
    assert!(err.contains("deck D") && err.contains("not held along y") && err.contains("A1") && err.contains("brace a bay"), "{err}");
    // Along x alone the bracing carries it.
    s.horizontal.directions = vec![plateload::scene::loads::PlanDirection::PlusX];
    spare_map(&s, &a, &SpareSettings::default()).unwrap();
}

#[test]
fn a_point_limited_by_a_plate_sliding() {
    // statics, by hand (REFERENCES §8: a diagonal of run b and rise h carrying shear V puts
    // ±V·h/b into its posts, and V leaves by its foot; lever rule across the deck and along the
    // bearers, AISC Table 3-23 case 8). The braced strip joined into one structure: 11 kN of
    // permanent load on each post top, notional load 2.5 % along +x at 2 m, μ = 0.2 (given),
    // sliding target 2.0, SWL raised to 100 kN so no capacity governs. Already there: 1.1 kN along
    // +x, 0.55 kN down each diagonal: at its foot A1 base shear 0.55 kN and 11 − 0.55 = 10.45 kN
    // (the brace component lifts it). Room at A1: 0.2 × 10.45 − 2.0 × 0.55 = 0.99 kN.
    // A load P at the middle (1.0, 1.5) puts P/4 on each post (its vertical load never adds
    // friction); its notional load 0.025·P sends 0.0125·P down each diagonal: base shear 0.0125·P
    // at A1, and 0.0125·P lifting A1 (a notional load of imposed load counts where it lifts):
    // 0.99 = 2.0 × 0.0125·P + 0.2 × 0.0125·P → P = 36 kN (A2 the same).
    // EQU (EN 1990 Table A1.2(A): G × 0.9 favourable, W × 1.5): 0.2 × (0.9 × 11 − 1.5 × 0.55)
    // − 1.5 × 0.55 = 0.99 against 1.5 × 0.0125·P + 0.2 × 1.5 × 0.0125·P → 44 kN. The structure as
    // a whole: 0.2 × 44 / 2 − 1.1 = 3.3 kN against 0.025·P + 0.2 × 0.025·P / 2 → 120 kN (with
    // friction at every plate, a plate always slides first). Plate B1 (room 100 − 11.55,
    // P/4 + P/80) → 337 kN; overturning about the east edge (44 / 2 − 2.2 = 19.8 kN·m against
    // 0.05·P) → 396 kN.
    let mut s = braced_strip(NotionalRule::Percent(2.5));
    s.loads.retain(|l| !l.id.starts_with("kit-"));
    let mut s = one_structure(s);
    for l in &mut s.loads {
        if let LoadKind::PostTop { kn, .. } = &mut l.kind {
            *kn = 11.0;
        }
    }
    s.support_types[0].swl_kn = 100.0;
    s.support_types[0].friction = vec![Interface::Given { mu: 0.2, source: "a test".into() }];
    let a = analyse(&s).unwrap();
    let foot = a.plates[a.plate_index("A1").unwrap()].sliding.clone().expect("A1 takes base shear");
    close("base shear at A1 already", foot.shear_kn, 0.55, 1e-9);
    close("least vertical load at A1", foot.normal_kn, 10.45, 1e-9);
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    let p = at(&map, 1.0, 1.5);
    close("spare at the middle", p.kn.unwrap(), 36.0, 1e-9);
    assert_eq!(p.limit, Limit::Sliding { plate: "A1".into(), form: "factor of safety" }, "{}", p.limit.words());
    assert_eq!(p.limit.words(), "plate A1 would slide (factor of safety)");
    assert_eq!(map.not_included, None, "every plate has friction: nothing left out");
    // Placed and solved again: A1's factor against sliding is exactly the target.
    let place = |kn: f64| placed(&s, false, 1.0, 1.5, kn);
    let b = place(36.0);
    let after = b.plates[b.plate_index("A1").unwrap()].sliding.clone().unwrap();
    close("A1's factor against sliding with the load placed", after.factor.unwrap(), 2.0, 1e-9);
    assert_eq!(b.sliding.plates_to_restrain, 0);
    // 1 % more and A1 (and A2) must be restrained.
    assert_eq!(place(36.36).sliding.plates_to_restrain, 2);
    // Without a friction coefficient sliding is not checked, and the map says so.
    let with_friction = (s.clone(), a);
    s.support_types[0].friction.clear();
    let a = analyse(&s).unwrap();
    let map = spare_map(&s, &a, &SpareSettings::default()).unwrap();
    assert!(!matches!(at(&map, 1.0, 1.5).limit, Limit::Sliding { .. }));
    // Coefficients kept from before friction was given are not used without the base shears.
    // common practice, no source: the same map as worked out from scratch.
    let kept = plateload::check::spare::spare_influences(&s, &a, &SpareSettings::default()).unwrap();
    let again = plateload::check::spare::spare_map_from(&with_friction.0, &with_friction.1, &SpareSettings::default(), &kept).unwrap();
    close("kept coefficients, friction given since", at(&again, 1.0, 1.5).kn.unwrap(), 36.0, 1e-9);
    let left_out = map.not_included.as_deref().unwrap();
    assert!(left_out.contains("sliding of the structure (4 plates) and of its plates, for want of a friction coefficient for support type S"), "{left_out}");
}
