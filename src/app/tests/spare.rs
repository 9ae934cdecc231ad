//! The spare-capacity overlay, headless: turned on over a demo site, its cells checked against
//! the engine's own map, a point hovered and read, the footprint put down there with D, and
//! undone.

use bevy::prelude::*;
use plateload::check::spare::{spare_map, SpareMap, SpareSettings};
use plateload::export::palette::SpareBand;
use plateload::export::spare::{point_words, round_down_kn};
use plateload::scene::loads::{Case, LoadKind};

use super::mouse::{at, ctrl_z, key, mouse_app, move_to, scene};
use crate::app::doc::SceneDoc;
use crate::app::view::spare::{linear, SpareCells, SpareView, HATCH, LIFT_M};

/// The engine's map of the document as it is now, with the overlay's settings.
fn engine_map(app: &App) -> SpareMap {
    let doc = app.world().resource::<SceneDoc>();
    let settings = app.world().resource::<SpareView>().settings();
    spare_map(&doc.scene, doc.analysis().expect("the scene solves"), &settings).expect("a map")
}

fn drawn_meshes(app: &mut App) -> usize {
    app.world_mut().query_filtered::<Entity, With<SpareCells>>().iter(app.world()).count()
}

/// Check every deck's mesh against the map: one quad per grid point in its band's colour, and
/// a hatch quad after each point where a limit is already reached. Returns the cells per band.
fn check_cells(app: &mut App, map: &SpareMap) -> [usize; 8] {
    let mut by_band = [0usize; 8];
    let meshes: Vec<(String, Handle<Mesh>)> = app.world_mut().query_filtered::<(&Name, &Mesh3d), With<SpareCells>>().iter(app.world()).map(|(n, m)| (n.as_str().to_owned(), m.0.clone())).collect();
    assert_eq!(meshes.len(), map.decks.len(), "one mesh per deck");
    for d in &map.decks {
        let (_, h) = meshes.iter().find(|(n, _)| *n == format!("spare capacity of deck {}", d.deck)).expect("the deck's mesh");
        let mesh = app.world().resource::<Assets<Mesh>>().get(h).expect("mesh");
        let Some(bevy::mesh::VertexAttributeValues::Float32x4(colours)) = mesh.attribute(Mesh::ATTRIBUTE_COLOR) else { panic!("vertex colours") };
        let mut at_vertex = 0;
        for p in &d.points {
            let band = SpareBand::of(p.kn, p.already_at_limit);
            by_band[band as usize] += 1;
            assert!(colours[at_vertex..at_vertex + 6].iter().all(|c| *c == linear(band.colour())), "deck {} point ({}, {}): not in the colour of {band:?}", d.deck, p.x, p.y);
            at_vertex += 6;
            if band == SpareBand::AtLimit {
                assert!(colours[at_vertex..at_vertex + 6].iter().all(|c| *c == linear(HATCH)), "a reached limit is hatched");
                at_vertex += 6;
            }
        }
        assert_eq!(at_vertex, colours.len(), "no cells beyond the map's points on deck {}", d.deck);
    }
    by_band
}

/// Demo site `i` without notional load. On every demo some plates already lift and the notional
/// load any extra load brings reaches them through the bracing, so the whole map is at a limit;
/// without notional load the map has points with room to read, scale and place at.
fn site_with_room(i: usize) -> plateload::Scene {
    let mut s = plateload::scene::demo::demo_scene(i).expect("demo");
    s.loads.retain(|l| !matches!(l.kind, LoadKind::Notional { .. }));
    s.horizontal.notional = plateload::scene::model::NotionalRule::Off;
    s
}

#[test]
fn the_spare_overlay_shows_the_engines_map_reads_a_point_and_places_a_load_there() {
    // source: the engine's own spare-capacity map (`spare_map`), worked out independently of the
    // editor's cached coefficients; and linearity of the plate reactions (a load placed where the
    // map allows P leaves less than P there)
    let before = site_with_room(1);
    let mut app = mouse_app(before.clone());
    assert_eq!(drawn_meshes(&mut app), 0, "off by default: nothing drawn");
    app.world_mut().resource_mut::<SpareView>().on = true;
    app.update();
    let map = engine_map(&app);
    let spare = app.world().resource::<SpareView>();
    assert_eq!(spare.settings(), SpareSettings::default(), "the engine's defaults");
    assert_eq!(spare.map(), Some(&map), "the overlay shows the engine's map");
    let counts = check_cells(&mut app, &map);
    assert_eq!(counts.iter().sum::<usize>(), map.decks.iter().map(|d| d.points.len()).sum::<usize>());
    assert!(counts[SpareBand::AtLimit as usize] > 0, "this site has points already at a limit: {counts:?}");

    // The point with the most room: hovered, it reads in the engine's words.
    let (di, pi) = map
        .decks
        .iter()
        .enumerate()
        .flat_map(|(i, d)| d.points.iter().enumerate().map(move |(j, p)| (i, j, p)))
        .filter(|(_, _, p)| !p.already_at_limit && p.kn.is_some())
        .max_by(|a, b| a.2.kn.unwrap().total_cmp(&b.2.kn.unwrap()))
        .map(|(i, j, _)| (i, j))
        .expect("a point with spare capacity");
    let p = map.decks[di].points[pi].clone();
    let old_kn = p.kn.unwrap();
    assert!(old_kn >= 1.0, "enough room to place a load: {old_kn} kN");
    let deck = before.decks.iter().find(|d| d.id == map.decks[di].deck).unwrap();
    // A little inside the point's cell, towards the deck's middle (a point on the deck's edge
    // has its cell on one side of it only).
    let towards = |v: f64, (lo, hi): (f64, f64)| v + 0.05 * (0.5 * (lo + hi) - v).signum();
    let pointer = at(&app, [towards(p.x, deck.extent.x), towards(p.y, deck.extent.y), deck.level + LIFT_M]);
    move_to(&mut app, pointer);
    let spare = app.world().resource::<SpareView>();
    let h = spare.hover.clone().expect("a point under the pointer");
    assert_eq!((h.deck, h.point), (di, pi));
    assert_eq!(h.words, point_words(&p));
    assert!(h.words.starts_with(&format!("up to {} kN here — limited by ", plateload::format::num(round_down_kn(old_kn)))), "{}", h.words);
    assert_eq!(spare.load_to_place(), Some(round_down_kn(old_kn)));

    // D puts it down: one imposed load of that size, where the pointer is.
    let generation = spare.generation;
    key(&mut app, KeyCode::KeyD);
    let now = scene(&app);
    assert_eq!(now.loads.len(), before.loads.len() + 1);
    let new = now.loads.iter().find(|l| !before.loads.iter().any(|b| b.id == l.id)).expect("the new load");
    assert_eq!(new.case, Case::Q);
    match &new.kind {
        LoadKind::DeckPoint { deck, x, y, kn } => {
            assert_eq!((deck, *x, *y, *kn), (&map.decks[di].deck, p.x, p.y, round_down_kn(old_kn)));
        }
        k => panic!("a point footprint places a point load: {k:?}"),
    }
    // The map was worked out again with it, from the kept coefficients, and matches the engine.
    let after = engine_map(&app);
    let spare = app.world().resource::<SpareView>();
    assert!(spare.generation > generation);
    assert!(spare.reused, "a load edit keeps the coefficients");
    assert_eq!(spare.map(), Some(&after));
    let q = &after.decks[di].points[pi];
    assert_eq!((q.x, q.y), (p.x, p.y));
    assert!(q.kn.unwrap() < old_kn - 0.5, "values do not add: {} kN left after placing {} kN of {old_kn} kN", q.kn.unwrap(), round_down_kn(old_kn));
    check_cells(&mut app, &after);

    // Undo takes it away and the map is back.
    ctrl_z(&mut app);
    assert_eq!(scene(&app), before);
    assert_eq!(app.world().resource::<SpareView>().map(), Some(&map));
    check_cells(&mut app, &map);

    // Idle with the overlay on: no frame is asked for, and the map is not worked out again.
    // common practice, no source: a desktop editor draws on demand
    for _ in 0..3 {
        app.update();
    }
    let generation = app.world().resource::<SpareView>().generation;
    let mut redraws = super::RedrawCounter::new(&app);
    let idle: usize = (0..20).map(|_| redraws.next(&mut app)).sum();
    assert_eq!(idle, 0, "frames asked for with no input");
    assert_eq!(app.world().resource::<SpareView>().generation, generation);

    // Off: nothing drawn.
    app.world_mut().resource_mut::<SpareView>().on = false;
    app.update();
    assert_eq!(drawn_meshes(&mut app), 0);
}

/// Each point of `map` with its deck index, for comparing two maps of the same grid.
fn points(map: &SpareMap) -> Vec<(&str, &plateload::check::spare::SparePoint)> {
    map.decks.iter().flat_map(|d| d.points.iter().map(move |p| (d.deck.as_str(), p))).collect()
}

#[test]
fn the_landing_factor_divides_the_plate_limited_values_of_the_map() {
    // source: plate reactions are linear in the load (statics), so a placed load multiplied by a
    // factor φ reaches the same plate limit at 1/φ of the load; the factor for loads set down by
    // hoist, 1.2, from DGUV Information 201-011 (REFERENCES §2). The sheeted-face demo: many of
    // its points are limited by a plate with room left.
    let mut app = mouse_app(site_with_room(2));
    app.world_mut().resource_mut::<SpareView>().on = true;
    app.update();
    let plain = engine_map(&app);
    assert_eq!(app.world().resource::<SpareView>().map(), Some(&plain));
    let generation = app.world().resource::<SpareView>().generation;

    app.world_mut().resource_mut::<SpareView>().dynamic_factor = plateload::check::spare::HOISTED_FACTOR;
    app.update();
    let spare = app.world().resource::<SpareView>();
    assert!(spare.generation > generation, "a new factor works the map out again");
    assert!(spare.reused, "the factor does not change the coefficients");
    let hoisted = spare.map().expect("a map").clone();
    assert_eq!(hoisted.settings.dynamic_factor, 1.2, "the factor reaches the engine");
    assert_eq!(hoisted, engine_map(&app), "the overlay shows the engine's map for that factor");
    check_cells(&mut app, &hoisted);

    let (a, b) = (points(&plain), points(&hoisted));
    assert_eq!(a.len(), b.len());
    let mut compared = 0;
    for ((deck, p), (_, q)) in a.iter().zip(&b) {
        assert_eq!((p.x, p.y), (q.x, q.y));
        match (&p.limit, p.kn, q.kn) {
            (plateload::check::spare::Limit::Plate { .. }, Some(kn), Some(kn_hoisted)) if !p.already_at_limit => {
                assert!((kn_hoisted - kn / 1.2).abs() <= 1e-9 * kn.max(1.0), "deck {deck} ({}, {}): {kn_hoisted} kN with the factor, {kn} kN without", p.x, p.y);
                assert_eq!(q.limit, p.limit, "the same plate limits it");
                compared += 1;
            }
            _ if p.already_at_limit => assert!(q.already_at_limit && q.kn == Some(0.0), "a limit reached stays reached"),
            _ => {}
        }
    }
    assert!(compared > 10, "points limited by a plate with room left: {compared}");

    // Back to 1.0: the first map again.
    app.world_mut().resource_mut::<SpareView>().dynamic_factor = 1.0;
    app.update();
    assert_eq!(app.world().resource::<SpareView>().map(), Some(&plain));
}

#[test]
fn a_chosen_combination_is_the_only_one_the_map_checks() {
    // source: the engine's own spare-capacity map for that combination (`spare_map` with its
    // name); the default combinations, of which "service" checks capacity and uplift and
    // "stability" uplift only
    let scene = plateload::scene::demo::demo_scene(1).expect("demo");
    let mut app = mouse_app(scene);
    app.world_mut().resource_mut::<SpareView>().on = true;
    app.update();
    let all = engine_map(&app);
    let checking = crate::app::view::spare::checking_combinations(app.world().resource::<SceneDoc>().analysis().unwrap());
    assert!(checking.len() >= 2, "the demo checks more than one combination: {checking:?}");
    assert_eq!(all.combinations, checking, "by default every combination that checks capacity or uplift");

    let chosen = checking[1].clone();
    app.world_mut().resource_mut::<SpareView>().combinations = vec![chosen.clone()];
    app.update();
    let one = app.world().resource::<SpareView>().map().expect("a map").clone();
    assert_eq!(one.settings.combinations, vec![chosen.clone()], "the name reaches the engine");
    assert_eq!(one.combinations, vec![chosen.clone()], "the engine checked that one only");
    assert_eq!(one, engine_map(&app));
    for (_, p) in points(&one) {
        if let plateload::check::spare::Limit::Plate { combination, .. } = &p.limit {
            assert_eq!(&**combination, chosen.as_str());
        }
    }
    assert_ne!(one, all, "one combination alone gives another map on this site");
    check_cells(&mut app, &one);

    // A name the analysis does not have (renamed since) is dropped: every combination again.
    app.world_mut().resource_mut::<SpareView>().combinations = vec!["no such combination".into()];
    app.update();
    let spare = app.world().resource::<SpareView>();
    assert!(spare.combinations.is_empty());
    assert_eq!(spare.map(), Some(&all));
}

#[test]
fn the_footprint_turned_a_quarter_is_mapped_with_its_sides_swapped() {
    // source: the engine's own map for the footprint with its sides swapped
    let mut app = mouse_app(plateload::scene::demo::demo_scene(1).expect("demo"));
    {
        let mut s = app.world_mut().resource_mut::<SpareView>();
        s.on = true;
        s.footprint_m = [1.2, 0.8];
    }
    app.update();
    let along = engine_map(&app);
    app.world_mut().resource_mut::<SpareView>().turn_footprint();
    app.update();
    let spare = app.world().resource::<SpareView>();
    assert_eq!(spare.footprint_m, [0.8, 1.2]);
    let across = spare.map().expect("a map").clone();
    assert_eq!(across.settings.footprint, plateload::solve::influence::Footprint { x_m: 0.8, y_m: 1.2 });
    assert_eq!(across, engine_map(&app));
    assert_ne!(across, along, "turned, the load lands elsewhere on the bearers");
}
