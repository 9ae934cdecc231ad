//! Validation lists every problem at once, each with its element id.

use plateload::scene::loads::{Case, LoadKind};
use plateload::{analyse, validate};

use crate::util::*;

fn problems(s: &plateload::Scene) -> Vec<String> {
    validate(s).err().map(|e| e.problems.iter().map(|p| p.to_string()).collect()).unwrap_or_default()
}

#[track_caller]
fn has(list: &[String], needle: &str) {
    assert!(list.iter().any(|p| p.contains(needle)), "no problem containing {needle:?} in {list:#?}");
}

#[test]
fn all_problems_are_reported_together_with_ids() {
    // common practice, no source
    let mut s = one_bay_deck((0.0, 4.0));
    s.posts.push(post("A1", 9.0, 9.0, 2.0)); // duplicate id
    s.posts.push(post("X", 5.0, 5.0, 2.0));
    s.posts.last_mut().unwrap().support = None; // no support type
    s.posts.push(post("NaN", f64::NAN, 0.0, 2.0));
    s.posts.push(post("Flat", 7.0, 0.0, 0.0)); // top not above base
    s.bearers.push(bearer("Ghost", 2.0, &["A1", "Nowhere"]));
    s.bearers.push(bearer("Bent", 2.0, &["A1", "B2", "B1"]));
    s.decks.push(deck("Lonely", 2.0, (0.0, 2.0), (0.0, 1.0), &["B-south"]));
    s.support_types[0].swl_kn = 0.0;
    s.loads.push(load("Off", Case::Q, LoadKind::DeckPoint { deck: "D".into(), x: 10.0, y: 1.0, kn: 1.0 }));
    s.loads.push(load("NoDeck", Case::Q, LoadKind::DeckArea { deck: "Missing".into(), intensity: kpa(1.0) }));
    s.loads.push(load("Class9", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: plateload::Intensity::LoadClassUniform(9) }));
    s.loads.push(load("Push", Case::W, LoadKind::Horizontal { x: 0.5, y: 0.5, level: 2.0, kn: 1.0, direction: PLUS_X }));
    let list = problems(&s);
    has(&list, "post A1: id is already used");
    has(&list, "post X: has no support type");
    has(&list, "post NaN: x (m) is not a number");
    has(&list, "post Flat: top level");
    has(&list, "bearer Ghost: post \"Nowhere\" does not exist");
    has(&list, "bearer Bent");
    has(&list, "deck Lonely: rests on 1 bearer(s)");
    has(&list, "support type S: safe working load (kN) must be more than zero");
    has(&list, "load Off: point (10, 1) is not on deck D");
    has(&list, "load NoDeck: deck \"Missing\" does not exist");
    has(&list, "load Class9: load class 9 does not exist");
    has(&list, "load Push: acts at (0.5, 0.5) at 2 m, which is neither on a post nor on a diaphragm");
    assert!(list.len() >= 12, "{list:#?}");
}

#[test]
fn degenerate_geometry_is_refused_not_solved() {
    // common practice, no source: zero spans, coincident posts and absurd magnitudes are input
    // mistakes; a number computed from them would be wrong.
    let mut s = bare_scene();
    s.posts = vec![post("A", 0.0, 0.0, 2.0), post("B", 1e-9, 0.0, 2.0), post("C", 3.0, 0.0, 2.0)];
    s.bearers = vec![bearer("Short", 2.0, &["A", "B", "C"])];
    s.loads.push(load("Huge", Case::G, LoadKind::PostTop { post: "C".into(), kn: 1e12 }));
    let list = problems(&s);
    has(&list, "post B: stands in the same place as post A");
    has(&list, "bearer Short: span from post A to post B");
    has(&list, "load Huge: force (kN) = 1e12 is outside the plausible range");
}

#[test]
fn a_line_of_plates_cannot_resist_overturning_across_it() {
    // common practice, no source: plates on one line are a hinge about that line; a brace in the
    // line braces it along the line only, so a push across it is refused, naming the post.
    let mut s = bare_scene();
    s.posts = vec![post("A", 0.0, 0.0, 3.0), post("B", 2.0, 0.0, 3.0)];
    s.braces = vec![brace("diag", "A", "B", 3.0)];
    s.loads.push(load("Y", Case::W, LoadKind::Horizontal { x: 2.0, y: 0.0, level: 3.0, kn: 1.0, direction: plateload::PlanDirection::PlusY }));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("load Y") && err.contains("post B is not held along y"), "{err}");
    // Along the line it is taken: 1 kN at 3 m over a 2 m bay → ∓1.5 kN.
    s.loads[0] = load("X", Case::W, LoadKind::Horizontal { x: 2.0, y: 0.0, level: 3.0, kn: 1.0, direction: PLUS_X });
    let a = analyse(&s).unwrap();
    // source: a diagonal carrying shear H over rise h and run b puts ±H·h/b into the standards
    // (REFERENCES §8, Peurifoy & Oberlender Ex. 5-19)
    close("A", case_load(&a, "A", Case::W), -1.5, 1e-12);
    close("B", case_load(&a, "B", Case::W), 1.5, 1e-12);
}

#[test]
fn an_empty_scene_with_loads_is_refused() {
    // common practice, no source: loads need something to stand on
    let mut s = bare_scene();
    s.loads.push(load("Q", Case::Q, LoadKind::PostTop { post: "P".into(), kn: 1.0 }));
    has(&problems(&s), "load Q: post \"P\" does not exist");
}
