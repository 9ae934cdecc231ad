//! Loads through lifts: spliced standards, posts on transfer bearers and decks, base plates on an
//! existing structure, and the refusals where a post stands on nothing it can use.

use plateload::scene::loads::{Case, LoadKind};
use plateload::scene::model::{ExistingStructure, Post, Rect};
use plateload::{analyse, validate};

use crate::util::*;

/// A weightless post from `base` to `top`.
fn lift(id: &str, x: f64, y: f64, base: f64, top: f64) -> Post {
    let mut p = post(id, x, y, top);
    p.base_level = base;
    p
}

fn problems(s: &plateload::Scene) -> Vec<String> {
    validate(s).err().map(|e| e.problems.iter().map(|p| p.to_string()).collect()).unwrap_or_default()
}

#[track_caller]
fn has(list: &[String], needle: &str) {
    assert!(list.iter().any(|p| p.contains(needle)), "no problem containing {needle:?} in {list:#?}");
}

#[test]
fn a_spliced_standard_carries_everything_to_the_lower_plate() {
    // statics, by hand: ΣF = 0 along one standard — the plate under two stacked lifts carries the
    // load on the top and the weight of both lifts (0.05 kN/m × 2 m each): 10 + 0.2 = 10.2 kN.
    let mut s = bare_scene();
    let mut lower = lift("A1", 0.0, 0.0, 0.0, 2.0);
    let mut upper = lift("A1-2", 0.0, 0.0, 2.0, 4.0);
    lower.self_weight_kn_per_m = 0.05;
    upper.self_weight_kn_per_m = 0.05;
    upper.support = None;
    s.posts = vec![lower, upper];
    s.loads.push(load("P", Case::Q, LoadKind::PostTop { post: "A1-2".into(), kn: 10.0 }));
    let a = analyse(&s).unwrap();
    assert_eq!(a.plates.len(), 1, "only the lower post has a base plate");
    close("A1 G", case_load(&a, "A1", Case::G), 0.2, 1e-12);
    close("A1 Q", case_load(&a, "A1", Case::Q), 10.0, 1e-12);
    assert!(a.plate_index("A1-2").is_none(), "the upper lift is not a base plate");
    let up = a.lifts.iter().find(|l| l.id == "A1-2").expect("the upper lift is reported as a lift");
    close("upper passes on G", up.case_kn[0], 0.1, 1e-12);
    close("upper passes on Q", up.case_kn[1], 10.0, 1e-12);
    assert!(up.stands_on.contains("A1"), "{}", up.stands_on);
    // The trace follows the load through the splice.
    let text = plateload::export::trace::trace_text(&s, &a, a.plate_index("A1").unwrap());
    assert!(text.contains("post A1-2 above, spliced onto this one"), "{text}");
    assert!(text.contains("load on the post top"), "{text}");
}

#[test]
fn a_post_on_a_transfer_bearer_is_shared_by_the_lever_rule() {
    // source: AISC Steel Construction Manual Table 3-23 case 8 (simple beam, concentrated load at
    // any point): R1 = Pb/L, R2 = Pa/L. Transfer bearer L = 4 m on posts L and R; an upper post
    // stands on it at a = 1 m carrying P = 10 kN → 7.5 and 2.5 kN.
    let mut s = bare_scene();
    s.posts = vec![post("L", 0.0, 0.0, 2.0), post("R", 4.0, 0.0, 2.0), lift("U", 1.0, 0.0, 2.0, 4.0)];
    s.posts[2].support = None;
    s.bearers = vec![bearer("T", 2.0, &["L", "R"])];
    s.loads.push(load("P", Case::G, LoadKind::PostTop { post: "U".into(), kn: 10.0 }));
    let a = analyse(&s).unwrap();
    close("L", case_load(&a, "L", Case::G), 7.5, 1e-12);
    close("R", case_load(&a, "R", Case::G), 2.5, 1e-12);
    assert_eq!(a.plates.len(), 2);
    let u = &a.lifts[0];
    assert_eq!(u.id, "U");
    assert!(u.stands_on.contains("bearer T at 1.000 m"), "{}", u.stands_on);
    let text = plateload::export::trace::trace_text(&s, &a, a.plate_index("L").unwrap());
    assert!(text.contains("(transfer), from post U standing on it"), "{text}");
    // Equilibrium of the item about any point.
    assert!(a.worst_residual() < 1e-12, "{}", a.worst_residual());
}

#[test]
fn a_post_lifting_off_its_transfer_bearer_is_reported_like_uplift() {
    // source: AISC Table 3-23 case 25 (beam overhanging one support, load on the overhang): a
    // downward load P at a past R2 gives R1 = −P·a/L. Here the upper post U stands on the far end
    // of a bearer whose overhang carries 10 kN at 1 m past its support, with the span L = 2 m:
    // U (at the far support) is pulled up by 5 kN, so it lifts off unless tied down.
    let mut s = bare_scene();
    // Lower bearer carries two posts; the upper bearer spans between U1 and U2 with an overhang.
    s.posts = vec![post("L", 0.0, 0.0, 2.0), post("R", 4.0, 0.0, 2.0), lift("U1", 1.0, 0.0, 2.0, 4.0), lift("U2", 3.0, 0.0, 2.0, 4.0)];
    s.posts[2].support = None;
    s.posts[3].support = None;
    let mut upper = bearer("Top", 4.0, &["U1", "U2"]);
    upper.overhang_end_m = 1.0;
    s.bearers = vec![bearer("T", 2.0, &["L", "R"]), upper];
    s.loads.push(load("edge", Case::Q, LoadKind::BearerPoint { bearer: "Top".into(), at_m: 3.0, kn: 10.0 }));
    let a = analyse(&s).unwrap();
    let u1 = a.lifts.iter().find(|l| l.id == "U1").unwrap();
    close("U1 passes on", u1.case_kn[1], -5.0, 1e-12);
    assert!(u1.status.uplift, "tension at a post base must be flagged like uplift");
    // The plates themselves: statics, by hand — U1 (−5 at 1 m) and U2 (+15 at 3 m) on the 4 m
    // bearer: L = −5·3/4 + 15·1/4 = 0, R = −5·1/4 + 15·3/4 = 10.
    close("L", case_load(&a, "L", Case::Q), 0.0, 1e-12);
    close("R", case_load(&a, "R", Case::Q), 10.0, 1e-12);
}

#[test]
fn a_post_on_a_deck_loads_the_deck_at_its_point() {
    // source: AISC Table 3-23 case 8, twice: deck span 4 m between bearers, post at 1 m from the
    // south bearer → 7.5 / 2.5 kN per bearer; each bearer of 2 m with the load at mid-length.
    let mut s = one_bay_deck((0.0, 4.0));
    s.posts.push(lift("U", 1.0, 1.0, 2.0, 3.0));
    s.posts[4].support = None;
    s.loads.push(load("P", Case::Q, LoadKind::PostTop { post: "U".into(), kn: 10.0 }));
    let a = analyse(&s).unwrap();
    close("A1", case_load(&a, "A1", Case::Q), 3.75, 1e-12);
    close("B1", case_load(&a, "B1", Case::Q), 3.75, 1e-12);
    close("A2", case_load(&a, "A2", Case::Q), 1.25, 1e-12);
    close("B2", case_load(&a, "B2", Case::Q), 1.25, 1e-12);
    assert!(a.lifts[0].stands_on.contains("deck D"));
}

#[test]
fn plates_on_an_existing_structure_are_checked_against_its_allowable_pressure() {
    // common practice, no source: a base plate on a slab bears on the plate's own area (here
    // 0.15 × 0.15 m), against the pressure the permanent-works designer allows on the slab.
    let mut s = bare_scene();
    s.posts = vec![post("A", 0.0, 0.0, 2.0), lift("S1", 3.0, 0.0, 0.5, 2.5)];
    s.existing_structures.push(ExistingStructure { id: "slab".into(), description: "podium slab".into(), level: 0.5, extent: Rect { x: (2.0, 6.0), y: (-1.0, 1.0) }, allowable_kpa: 1000.0 });
    s.loads.push(load("P", Case::G, LoadKind::PostTop { post: "S1".into(), kn: 9.0 }));
    let a = analyse(&s).unwrap();
    let p = &a.plates[a.plate_index("S1").unwrap()];
    assert_eq!(p.on_structure.as_deref(), Some("slab"));
    close("area", p.bearing_area_m2, 0.0225, 1e-12);
    close("allowable", p.allowable_kpa.unwrap(), 1000.0, 1e-12);
    // 9 kN / 0.0225 m² = 400 kPa of 1000 allowed.
    close("bearing", p.governing().bearing_kpa, 400.0, 1e-9);
    // The post on the ground at the same time bears on the ground.
    assert!(a.plates[a.plate_index("A").unwrap()].on_structure.is_none());
}

#[test]
fn eccentric_splices_and_posts_off_their_bearer_are_refused() {
    // common practice, no source: a splice or bearing more than 10 mm off centre (up to 50 mm)
    // is eccentric and not modelled.
    let mut s = bare_scene();
    s.posts = vec![post("A1", 0.0, 0.0, 2.0), lift("A1-2", 0.02, 0.0, 2.0, 4.0), post("L", 5.0, 0.0, 2.0), post("R", 9.0, 0.0, 2.0), lift("U", 6.0, 0.03, 2.0, 4.0)];
    s.bearers = vec![bearer("T", 2.0, &["L", "R"])];
    let list = problems(&s);
    has(&list, "post A1-2: stands 20 mm off the centre of post A1");
    has(&list, "post U: stands 30 mm off the line of bearer T");
}

#[test]
fn posts_hanging_in_the_air_overlapping_or_in_a_loop_are_refused_with_ids() {
    // common practice, no source: every load must reach the ground (EN 12812 7.1, via a
    // reproduction); a post with a gap under it, a partial overlap or a loop has no load path.
    let mut s = bare_scene();
    s.posts = vec![post("A1", 0.0, 0.0, 2.0), lift("A1-2", 0.0, 0.0, 2.5, 4.0), post("B1", 3.0, 0.0, 2.0), lift("B1-2", 3.02, 0.0, 1.5, 4.0)];
    let list = problems(&s);
    has(&list, "post A1-2: hangs in the air: its base at 2.500 m is 0.500 m above the top of post A1");
    has(&list, "post B1-2: overlaps post B1 below it");

    // A loop: P stands on bearer Bp, which rests on Q; Q stands on bearer Bq, which rests on P.
    let mut s = bare_scene();
    s.posts = vec![lift("P", 0.0, 0.0, 2.0, 4.0), lift("Q", 4.0, 0.0, 2.0, 4.0), post("X", 8.0, 0.0, 2.0), post("Y", -4.0, 0.0, 2.0)];
    s.bearers = vec![bearer("Bp", 2.0, &["Q", "X"]), bearer("Bq", 2.0, &["Y", "P"])];
    // P at x = 0 lies on Bp's line? No: Bp runs from Q (4) to X (8). Give it an overhang to reach P.
    s.bearers[0].overhang_start_m = 4.0;
    s.bearers[1].overhang_end_m = 4.0;
    let list = problems(&s);
    has(&list, "goes round in a loop");
    assert!(list.iter().any(|p| p.contains("post P") && p.contains("bearer Bq")), "{list:#?}");
}

#[test]
fn a_post_on_nothing_well_above_the_others_gets_a_notice() {
    // common practice, no source: a base plate 2 m above the lowest one of the scene stands on
    // nothing drawn: accepted (ground may step), but said.
    let mut s = bare_scene();
    s.posts = vec![post("A", 0.0, 0.0, 2.0), lift("B", 3.0, 0.0, 2.0, 4.0)];
    let m = validate(&s).unwrap();
    assert!(m.warnings.iter().any(|w| w.id == "B" && w.message.contains("stands on nothing drawn")), "{:#?}", m.warnings);
}

#[test]
fn a_scene_of_lifts_still_balances_every_item() {
    // statics, by hand: ΣF = 0 and ΣM = 0 for every item, through splices and transfers.
    let mut s = bare_scene();
    s.posts = vec![post("L", 0.0, 0.0, 2.0), post("R", 4.0, 0.0, 2.0), lift("U1", 1.0, 0.0, 2.0, 4.0), lift("U2", 3.0, 0.0, 2.0, 4.0), lift("U2b", 3.0, 0.0, 4.0, 5.0)];
    for p in &mut s.posts {
        p.self_weight_kn_per_m = 0.0429;
    }
    let mut upper = bearer("Top", 4.0, &["U1", "U2"]);
    upper.overhang_start_m = 0.5;
    upper.self_weight_kn_per_m = 0.0429;
    s.bearers = vec![bearer("T", 2.0, &["L", "R"]), upper];
    s.loads.push(load("q", Case::Q, LoadKind::BearerLine { bearer: "Top".into(), from_m: -0.5, to_m: 2.0, kn_per_m: 3.0 }));
    s.loads.push(load("p", Case::G, LoadKind::PostTop { post: "U2b".into(), kn: 4.0 }));
    let a = analyse(&s).unwrap();
    assert!(a.worst_residual() < 1e-12, "{}", a.worst_residual());
    let total: f64 = a.plates.iter().map(|p| p.case_kn[0] + p.case_kn[1]).sum();
    // 4 kN on U2b, 3 kN/m over 2.5 m, posts 9 m and the upper bearer 2.5 m of 0.0429 kN/m.
    let applied = 4.0 + 3.0 * 2.5 + 0.0429 * 9.0 + 0.0429 * 2.5;
    close("all load reaches the plates", total, applied, 1e-9);
}
