//! Horizontal loads down the braced bays: hand calculations by moment balance, the refusals, the
//! diaphragm sharing rules, the combination of horizontal actions and the notional rule.

use plateload::scene::loads::{Case, Face, LoadKind, PlanDirection};
use plateload::scene::model::{Brace, NotionalRule, PostNode};
use plateload::{analyse, Analysis, Scene};

use crate::util::*;

/// A brace from post `a` at level `za` to post `b` at level `zb`.
fn brace_at(id: &str, a: &str, za: f64, b: &str, zb: f64) -> Brace {
    Brace { id: id.into(), from: PostNode { post: a.into(), level: za }, to: PostNode { post: b.into(), level: zb } }
}

/// A point force along a plan direction at (x, y, z).
fn push(id: &str, x: f64, y: f64, z: f64, kn: f64, direction: PlanDirection) -> plateload::Load {
    load(id, Case::W, LoadKind::Horizontal { x, y, level: z, kn, direction })
}

/// Vertical reaction of one item at a plate, under the item's primary reactions (or its
/// alternative, `variant` 1).
fn item_vertical(a: &Analysis, item: &str, plate: &str, variant: usize) -> f64 {
    let i = a.solution.items.iter().find(|i| i.id == item).unwrap_or_else(|| panic!("no item {item}"));
    let p = a.plate_index(plate).unwrap() as u32;
    i.variant(variant).vertical.iter().filter(|e| e.0 == p).map(|e| e.1).sum()
}

/// Horizontal reaction of one item at a plate, primary reactions.
fn item_shear(a: &Analysis, item: &str, plate: &str) -> [f64; 2] {
    let i = a.solution.items.iter().find(|i| i.id == item).unwrap();
    let p = a.plate_index(plate).unwrap() as u32;
    i.shear.iter().filter(|e| e.0 == p).fold([0.0; 2], |s, e| [s[0] + e.1[0], s[1] + e.1[1]])
}

/// One bay of width `b` along x (posts W at x = 0 and E at x = b), three 2 m lifts with ledgers
/// at 2, 4 and 6 m; a diagonal W (bottom) → E (top) in each listed lift (1 = lowest).
fn one_bay(b: f64, lifts: &[usize]) -> Scene {
    let mut s = bare_scene();
    s.posts = vec![post("W", 0.0, 0.0, 6.0), post("E", b, 0.0, 6.0)];
    s.bearers = (1..=3).map(|k| bearer(&format!("L{k}"), 2.0 * k as f64, &["W", "E"])).collect();
    s.braces = lifts.iter().map(|&k| brace_at(&format!("X{k}"), "W", 2.0 * (k - 1) as f64, "E", 2.0 * k as f64)).collect();
    s
}

#[test]
fn single_braced_bay_with_a_load_at_the_top() {
    // source: REFERENCES §8 — a diagonal in bay b over lift h carrying shear H puts ±H·h/b into the
    // standards (Peurifoy & Oberlender, Formwork for Concrete Structures, Ex. 5-19); for F at
    // height z the base reactions are ±F·z/b. Statics, by hand: b = 2.5 m, F = 1.0 kN at 6 m →
    // each lift ±1.0·2/2.5 = ±0.8, at the plates ±2.4; the whole shear leaves by the foot of the
    // ground-lift diagonal (W).
    let mut s = one_bay(2.5, &[1, 2, 3]);
    s.loads.push(push("F", 2.5, 0.0, 6.0, 1.0, PlanDirection::PlusX));
    let a = analyse(&s).unwrap();
    close("W", case_load(&a, "W", Case::W), -2.4, 1e-12);
    close("E", case_load(&a, "E", Case::W), 2.4, 1e-12);
    close("W shear", item_shear(&a, "F", "W")[0], -1.0, 1e-12);
    close("E shear", item_shear(&a, "F", "E")[0], 0.0, 1e-12);
    // The same force at 4 m: ±1.6 (two lifts).
    let mut s = one_bay(2.5, &[1, 2, 3]);
    s.loads.push(push("F", 2.5, 0.0, 4.0, 1.0, PlanDirection::PlusX));
    let a = analyse(&s).unwrap();
    close("W at 4 m", case_load(&a, "W", Case::W), -1.6, 1e-12);
    // Reversed, the couple reverses.
    let mut s = one_bay(2.5, &[1, 2, 3]);
    s.loads.push(push("F", 0.0, 0.0, 6.0, 1.0, PlanDirection::MinusX));
    let a = analyse(&s).unwrap();
    close("W reversed", case_load(&a, "W", Case::W), 2.4, 1e-12);
    // The trace names the bay and its lever arm.
    let text = plateload::export::trace::trace_text(&s, &a, a.plate_index("W").unwrap());
    assert!(text.contains("braced bay W–E") && text.contains("lever 2.500 m"), "{text}");
}

#[test]
fn braced_bay_of_the_formwork_example() {
    // source: Peurifoy & Oberlender, Formwork for Concrete Structures, Ex. 5-19 (REFERENCES §8):
    // 1125 lb on a brace at x = 6 ft, y = 10 ft → vertical component 1875 lb. Same numbers here in
    // consistent units (a bay 6 wide, a lift 10 high, 1125 at its top).
    let mut s = bare_scene();
    s.posts = vec![post("A", 0.0, 0.0, 10.0), post("B", 6.0, 0.0, 10.0)];
    s.bearers = vec![bearer("top", 10.0, &["A", "B"])];
    s.braces = vec![brace_at("X", "A", 0.0, "B", 10.0)];
    s.loads.push(push("H", 6.0, 0.0, 10.0, 1125.0, PlanDirection::PlusX));
    let a = analyse(&s).unwrap();
    close("A", case_load(&a, "A", Case::W), -1875.0, 1e-9);
    close("B", case_load(&a, "B", Case::W), 1875.0, 1e-9);
}

#[test]
fn crossed_braces_and_two_bays_in_one_lift_share_by_stiffness() {
    // Stated rule: the diagonals of one lift share its shear in proportion to b²/d³ (equal tubes,
    // post shortening neglected); two crossed diagonals of one bay take half each. The plate
    // couple is the same either way (statics, by hand: ±F·h/b); the base shear splits between the
    // feet of the diagonals.
    let mut s = bare_scene();
    s.posts = vec![post("W", 0.0, 0.0, 2.0), post("E", 2.5, 0.0, 2.0)];
    s.bearers = vec![bearer("L", 2.0, &["W", "E"])];
    s.braces = vec![brace_at("up", "W", 0.0, "E", 2.0), brace_at("down", "E", 0.0, "W", 2.0)];
    s.loads.push(push("F", 2.5, 0.0, 2.0, 1.0, PlanDirection::PlusX));
    let a = analyse(&s).unwrap();
    close("W", case_load(&a, "W", Case::W), -0.8, 1e-12);
    close("E", case_load(&a, "E", Case::W), 0.8, 1e-12);
    close("W shear", item_shear(&a, "F", "W")[0], -0.5, 1e-12);
    close("E shear", item_shear(&a, "F", "E")[0], -0.5, 1e-12);

    // Two braced bays in one lift, 2 m and 3 m wide, 2 m high: k = b²/d³ →
    // 4/8^1.5 = 0.176777 and 9/13^1.5 = 0.192012; shares 0.479345 and 0.520655 (by hand).
    let mut s = bare_scene();
    s.posts = vec![post("A", 0.0, 0.0, 2.0), post("B", 2.0, 0.0, 2.0), post("C", 5.0, 0.0, 2.0)];
    s.bearers = vec![bearer("L", 2.0, &["A", "B", "C"])];
    s.braces = vec![brace_at("ab", "A", 0.0, "B", 2.0), brace_at("bc", "B", 0.0, "C", 2.0)];
    s.loads.push(push("F", 5.0, 0.0, 2.0, 10.0, PlanDirection::PlusX));
    let a = analyse(&s).unwrap();
    let (k1, k2) = (4.0 / 8f64.powf(1.5), 9.0 / 13f64.powf(1.5));
    let (v1, v2) = (10.0 * k1 / (k1 + k2), 10.0 * k2 / (k1 + k2));
    close("share 1", v1, 4.79345, 1e-5);
    // Bay A–B: ∓v1·2/2 at A, B; bay B–C: ∓v2·2/3 at B, C.
    close("A", case_load(&a, "A", Case::W), -v1, 1e-12);
    close("B", case_load(&a, "B", Case::W), v1 - v2 * 2.0 / 3.0, 1e-12);
    close("C", case_load(&a, "C", Case::W), v2 * 2.0 / 3.0, 1e-12);
    // The couples add up to the overturning moment: 10 kN × 2 m. source: ΣM = 0, statics
    close("moment", 2.0 * case_load(&a, "B", Case::W) + 5.0 * case_load(&a, "C", Case::W), 20.0, 1e-12);
}

/// Frames along y at the given x (posts `<col>1` at y = 0 and `<col>2` at y = 2), one 3 m lift,
/// each braced in y from `<col>1` at the ground to `<col>2` at 3 m; ledgers along x at 3 m join
/// them; every bay plan-braced at 3 m when `plan` is set.
fn frames(xs: &[f64], plan: bool) -> Scene {
    let cols: Vec<String> = (0..xs.len()).map(|i| ((b'A' + i as u8) as char).to_string()).collect();
    let mut s = bare_scene();
    for (c, &x) in cols.iter().zip(xs) {
        s.posts.push(post(&format!("{c}1"), x, 0.0, 3.0));
        s.posts.push(post(&format!("{c}2"), x, 2.0, 3.0));
        s.bearers.push(bearer(&format!("T-{c}"), 3.0, &[&format!("{c}1"), &format!("{c}2")]));
        s.braces.push(brace_at(&format!("Y-{c}"), &format!("{c}1"), 0.0, &format!("{c}2"), 3.0));
    }
    for row in ["1", "2"] {
        let ids: Vec<String> = cols.iter().map(|c| format!("{c}{row}")).collect();
        let refs: Vec<&str> = ids.iter().map(String::as_str).collect();
        s.bearers.push(bearer(&format!("L-{row}"), 3.0, &refs));
    }
    if plan {
        for w in cols.windows(2) {
            s.braces.push(brace_at(&format!("P-{}", w[0]), &format!("{}1", w[0]), 3.0, &format!("{}2", w[1]), 3.0));
        }
    }
    s
}

#[test]
fn two_braced_frames_share_an_off_centre_load_by_the_lever_rule() {
    // source: REFERENCES §8 — two frames only: lever rule, whatever the stiffness; 6 m apart,
    // F = 10 kN at 2 m → 6.667 and 3.333. Statics, by hand: each frame's diagonal has run 2 m and
    // rise 3 m → ±V·3/2 at its posts: frame A ±10.0, frame B ±5.0.
    let mut s = frames(&[0.0, 6.0], true);
    s.loads.push(push("F", 2.0, 1.0, 3.0, 10.0, PlanDirection::PlusY));
    let a = analyse(&s).unwrap();
    close("A1", case_load(&a, "A1", Case::W), -10.0, 1e-12);
    close("A2", case_load(&a, "A2", Case::W), 10.0, 1e-12);
    close("B1", case_load(&a, "B1", Case::W), -5.0, 1e-12);
    close("B2", case_load(&a, "B2", Case::W), 5.0, 1e-12);
    close("A1 shear", item_shear(&a, "F", "A1")[1], -20.0 / 3.0, 1e-12);
    close("B1 shear", item_shear(&a, "F", "B1")[1], -10.0 / 3.0, 1e-12);
    // Two planes: one way of sharing, no alternative.
    assert!(a.solution.items.iter().all(|i| i.alternative.is_none()));
    // A deck declared a diaphragm does the same as the plan bracing.
    let mut d = frames(&[0.0, 6.0], false);
    d.decks.push(deck("D", 3.0, (0.0, 6.0), (0.0, 2.0), &["L-1", "L-2"]));
    d.decks[0].diaphragm = true;
    d.loads = s.loads.clone();
    let b = analyse(&d).unwrap();
    for id in ["A1", "A2", "B1", "B2"] {
        close(id, case_load(&b, id, Case::W), case_load(&a, id, Case::W), 1e-12);
    }
    // Loose boards are not a diaphragm: the same deck undeclared, and the load off every frame,
    // has nothing to go to.
    d.decks[0].diaphragm = false;
    let err = analyse(&d).unwrap_err().to_string();
    assert!(err.contains("load F") && err.contains("neither on a post nor on a diaphragm"), "{err}");
}

#[test]
fn three_frames_lever_rule_and_rigid_diaphragm_the_worse_governs() {
    // source: REFERENCES §8 — frames at x = 0, 4, 8, equal stiffness, rigid deck, F = 12 at x = 5
    // → 2.5, 4.0, 5.5 (formula from UFC 3-310-03A). Lever rule (statics, by hand): the load lies
    // between the frames at 4 and 8 → 12·3/4 = 9 and 12·1/4 = 3, nothing to the frame at 0. Each
    // diagonal has run 2, rise 3: ±1.5·V. Each plate takes the worse of the two.
    let mut s = frames(&[0.0, 4.0, 8.0], true);
    s.loads.push(push("F", 5.0, 1.0, 3.0, 12.0, PlanDirection::PlusY));
    let a = analyse(&s).unwrap();
    let lever = [0.0, 9.0, 3.0];
    let rigid = [2.5, 4.0, 5.5];
    for (k, col) in ["A", "B", "C"].iter().enumerate() {
        let top = format!("{col}2");
        close(&format!("{top} lever"), item_vertical(&a, "F", &top, 0), 1.5 * lever[k], 1e-12);
        close(&format!("{top} rigid"), item_vertical(&a, "F", &top, 1), 1.5 * rigid[k], 1e-12);
        let p = &a.plates[a.plate_index(&top).unwrap()];
        close(&format!("{top} service max"), p.combinations[0].max_kn, 1.5 * f64::max(lever[k], rigid[k]), 1e-12);
        let bottom = &a.plates[a.plate_index(&format!("{col}1")).unwrap()];
        close(&format!("{col}1 service min"), bottom.combinations[0].min_kn, -1.5 * f64::max(lever[k], rigid[k]), 1e-12);
    }
    // Both ways balance the load. source: ΣF = 0, ΣM = 0
    assert!(a.worst_residual() < 1e-12, "{}", a.worst_residual());
}

#[test]
fn without_a_diaphragm_a_load_goes_only_to_the_planes_it_is_applied_in() {
    // source: statics, by hand — no plan bracing: a load on frame A's post stays in frame A
    // (±10·3/2 = ±15), nothing reaches frame B; a load on a post no frame holds is refused.
    let mut s = frames(&[0.0, 6.0], false);
    s.loads.push(push("F", 0.0, 2.0, 3.0, 10.0, PlanDirection::PlusY));
    let a = analyse(&s).unwrap();
    close("A2", case_load(&a, "A2", Case::W), 15.0, 1e-12);
    close("B2", case_load(&a, "B2", Case::W), 0.0, 1e-12);
    // A third pair of posts between the frames, unbraced, joined by the ledgers.
    let mut s = frames(&[0.0, 6.0], false);
    s.posts.push(post("M1", 3.0, 0.0, 3.0));
    s.posts.push(post("M2", 3.0, 2.0, 3.0));
    for b in s.bearers.iter_mut().filter(|b| b.id.starts_with("L-")) {
        let row = &b.id[2..];
        b.posts = vec![format!("A{row}"), format!("M{row}"), format!("B{row}")];
    }
    s.loads.push(push("G", 3.0, 2.0, 3.0, 10.0, PlanDirection::PlusY));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("load G") && err.contains("post M2 is not held along y") && err.contains("plan-brace a level"), "{err}");
    // Along x, the ledger carries it to nothing braced along x either.
    s.loads[0] = push("G", 3.0, 2.0, 3.0, 10.0, PlanDirection::PlusX);
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("not held along x"), "{err}");
}

#[test]
fn a_load_above_the_bracing_is_refused() {
    // common practice, no source: nothing above the top braced level holds the post; a pinned
    // frame would fold there. Braced in the two lower lifts, loaded at 6 m.
    let mut s = one_bay(2.5, &[1, 2]);
    s.loads.push(push("F", 2.5, 0.0, 6.0, 1.0, PlanDirection::PlusX));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("load F") && err.contains("above the top of the bracing") && err.contains("post E up to 6.000 m") && err.contains("4.000 m"), "{err}");
    // At 4 m it is taken: ±1.0·4/2.5.
    s.loads[0] = push("F", 2.5, 0.0, 4.0, 1.0, PlanDirection::PlusX);
    let a = analyse(&s).unwrap();
    close("E", case_load(&a, "E", Case::W), 1.6, 1e-12);
}

#[test]
fn a_lift_with_no_brace_is_refused() {
    // common practice, no source: one unbraced lift in a loaded plane makes it a mechanism, so the
    // bracing above it carries nothing to the ground. Braced in lifts 2 and 3 only.
    let mut s = one_bay(2.5, &[2, 3]);
    s.loads.push(push("F", 2.5, 0.0, 6.0, 1.0, PlanDirection::PlusX));
    let a = plateload::validate(&s).unwrap();
    assert!(a.warnings.iter().any(|w| w.message.contains("no brace in the lift from the ground to 2.000 m")), "{:?}", a.warnings);
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("load F") && err.contains("post E is not held along x") && err.contains("no brace in the lift from the ground to 2.000 m"), "{err}");
    // The middle lift missing: held up to 2 m only.
    let mut s = one_bay(2.5, &[1, 3]);
    s.loads.push(push("F", 2.5, 0.0, 6.0, 1.0, PlanDirection::PlusX));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("above the top of the bracing") && err.contains("no brace in the lift from 2.000 m to 4.000 m"), "{err}");
}

#[test]
fn what_is_not_a_brace_is_said_or_refused() {
    // common practice, no source: a level tube along a ledger is a ledger; a brace rising across
    // the plan grid is in no plane of posts; a brace over two lifts where the plane has a node
    // between must be split.
    let mut s = one_bay(2.5, &[1, 2, 3]);
    s.braces.push(brace_at("flat", "W", 2.0, "E", 2.0));
    let m = plateload::validate(&s).unwrap();
    assert!(m.warnings.iter().any(|w| w.id == "flat" && w.message.contains("it is a ledger, not a brace")), "{:?}", m.warnings);
    // Only level tubes: nothing is braced.
    s.braces = vec![brace_at("flat", "W", 2.0, "E", 2.0)];
    s.loads.push(push("F", 2.5, 0.0, 2.0, 1.0, PlanDirection::PlusX));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("post E is not held along x"), "{err}");

    let mut s = frames(&[0.0, 6.0], false);
    s.braces.push(brace_at("skew", "A1", 0.0, "B2", 3.0));
    let problems = plateload::validate(&s).unwrap_err().to_string();
    assert!(problems.contains("brace skew") && problems.contains("not on one line of posts along x or y"), "{problems}");

    let mut s = one_bay(2.5, &[1, 3]);
    s.braces.push(brace_at("long", "W", 0.0, "E", 4.0));
    let problems = plateload::validate(&s).unwrap_err().to_string();
    assert!(problems.contains("brace long") && problems.contains("across 2.000 m") && problems.contains("split it there"), "{problems}");

    // A level tube that crosses no framed bay.
    let mut s = frames(&[0.0, 6.0], false);
    s.bearers.retain(|b| b.id != "L-2");
    s.braces.push(brace_at("loose", "A1", 3.0, "B2", 3.0));
    let problems = plateload::validate(&s).unwrap_err().to_string();
    assert!(problems.contains("brace loose") && problems.contains("neither along a ledger nor across one bay"), "{problems}");
}

#[test]
fn a_diaphragm_whose_planes_cannot_resist_the_twist_is_refused() {
    // source: statics — two frames meeting at a corner (one along x, one along y) cannot resist
    // a twist about any point but their crossing; refused with the diaphragm and what to add.
    let mut s = bare_scene();
    s.posts = vec![post("A1", 0.0, 0.0, 3.0), post("B1", 3.0, 0.0, 3.0), post("A2", 0.0, 3.0, 3.0), post("B2", 3.0, 3.0, 3.0)];
    s.bearers = vec![bearer("L1", 3.0, &["A1", "B1"]), bearer("L2", 3.0, &["A2", "B2"]), bearer("TA", 3.0, &["A1", "A2"]), bearer("TB", 3.0, &["B1", "B2"])];
    s.braces = vec![brace_at("X", "A1", 0.0, "B1", 3.0), brace_at("Y", "A1", 0.0, "A2", 3.0), brace_at("P", "A1", 3.0, "B2", 3.0)];
    s.loads.push(push("F", 3.0, 3.0, 3.0, 1.0, PlanDirection::PlusY));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("diaphragm at 3.000 m") && err.contains("cannot resist the twist"), "{err}");
    // Through the crossing it is taken.
    s.loads[0] = push("F", 0.0, 0.0, 3.0, 1.0, PlanDirection::PlusY);
    analyse(&s).unwrap();
}

#[test]
fn wind_on_a_face_goes_to_the_posts_along_it_and_down_the_bracing() {
    // source: statics, by hand. A 4 m face along a braced bay A–B (one 3 m lift, diagonal A → B,
    // run 4), posts held along y by a frame at each end (diagonals A → A', B → B', run 2). Wind
    // 0.5 kPa at 30° to the face: f = 0.5 · 4 sin 30° · 3 = 3 kN along (cos 30°, sin 30°). Each
    // post carries half; each spans from its base to the 3 m level, so half of that goes straight
    // into its plate and half to the bracing at 3 m: fx/2 into bay A–B (±(fx/2)·3/4 at A, B),
    // fy/4 into each end frame (±(fy/4)·3/2).
    let mut s = bare_scene();
    s.posts = vec![post("A", 0.0, 0.0, 3.0), post("B", 4.0, 0.0, 3.0), post("A'", 0.0, 2.0, 3.0), post("B'", 4.0, 2.0, 3.0)];
    s.bearers = vec![bearer("L", 3.0, &["A", "B"]), bearer("TA", 3.0, &["A", "A'"]), bearer("TB", 3.0, &["B", "B'"])];
    s.braces = vec![brace_at("X", "A", 0.0, "B", 3.0), brace_at("YA", "A", 0.0, "A'", 3.0), brace_at("YB", "B", 0.0, "B'", 3.0)];
    let face = Face { from: (0.0, 0.0), to: (4.0, 0.0), bottom: 0.0, top: 3.0 };
    s.loads.push(load("w", Case::W, LoadKind::Wind { face, kpa: 0.5, direction: PlanDirection::Degrees(30.0) }));
    let a = analyse(&s).unwrap();
    let f = 0.5 * 4.0 * 0.5 * 3.0;
    let (fx, fy) = (f * 30f64.to_radians().cos(), f * 0.5);
    close("A", item_vertical(&a, "w", "A", 0), -(fx / 2.0) * 0.75 - (fy / 4.0) * 1.5, 1e-12);
    close("B", item_vertical(&a, "w", "B", 0), (fx / 2.0) * 0.75 - (fy / 4.0) * 1.5, 1e-12);
    close("A'", item_vertical(&a, "w", "A'", 0), (fy / 4.0) * 1.5, 1e-12);
    // Base shear: each post's own half, plus the bracing's at the feet of the diagonals (A, B).
    close("A shear x", item_shear(&a, "w", "A")[0], -(fx / 4.0) - fx / 2.0, 1e-12);
    close("B shear y", item_shear(&a, "w", "B")[1], -(fy / 4.0) - fy / 4.0, 1e-12);
    let [sx, sy] = a.base_shear()[Case::W.index()];
    close("base shear", sx.hypot(sy), f, 1e-12);
    // Without the end frames the y part has nowhere to go.
    s.braces.truncate(1);
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("load w") && err.contains("not held along y"), "{err}");
}

/// A square of four posts 4 m tall, 2 m apart, braced both ways on two faces, plan-braced at the
/// top, 10 kN on each post top (V = 40 kN).
fn braced_tower() -> Scene {
    let mut s = bare_scene();
    s.posts = vec![post("A1", 0.0, 0.0, 4.0), post("B1", 2.0, 0.0, 4.0), post("A2", 0.0, 2.0, 4.0), post("B2", 2.0, 2.0, 4.0)];
    s.bearers = vec![bearer("L1", 4.0, &["A1", "B1"]), bearer("L2", 4.0, &["A2", "B2"]), bearer("TA", 4.0, &["A1", "A2"]), bearer("TB", 4.0, &["B1", "B2"])];
    s.braces = vec![
        brace_at("X1", "A1", 0.0, "B1", 4.0),
        brace_at("X2", "A2", 0.0, "B2", 4.0),
        brace_at("YA", "A1", 0.0, "A2", 4.0),
        brace_at("YB", "B1", 0.0, "B2", 4.0),
        brace_at("P", "A1", 4.0, "B2", 4.0),
    ];
    for p in ["A1", "B1", "A2", "B2"] {
        s.loads.push(load(&format!("top-{p}"), Case::G, LoadKind::PostTop { post: p.into(), kn: 10.0 }));
    }
    s
}

fn base_shear_of(a: &Analysis, item: &str) -> [f64; 2] {
    a.horizontal_base_shear().into_iter().find(|h| h.0 == item).unwrap_or_else(|| panic!("no item {item}")).2
}

#[test]
fn the_falsework_rule_is_the_default_notional_load() {
    // source: REFERENCES §4 — 2.5 % of the vertical load (BS 5975:2008+A1:2011 cl. 19, via a
    // secondary); V = 40 → H = 1.0 kN, in each of +x, −x, +y, −y. With wind in +x the load is the
    // greater of 2.5 % V and the wind + 1 % V (Advisory Committee on Falsework 1975; its place in
    // BS 5975 from memory): wind 0.8 → max(1.0, 1.2) → 0.4 kN notional beside the wind;
    // wind 0.2 → max(1.0, 0.6) → 0.8 kN notional.
    let mut s = braced_tower();
    s.horizontal.notional = NotionalRule::Falsework;
    let a = analyse(&s).unwrap();
    for (id, f) in [("notional +x", [-1.0, 0.0]), ("notional -x", [1.0, 0.0]), ("notional +y", [0.0, -1.0]), ("notional -y", [0.0, 1.0])] {
        let sh = base_shear_of(&a, id);
        close(&format!("{id} x"), sh[0], f[0], 1e-12);
        close(&format!("{id} y"), sh[1], f[1], 1e-12);
    }
    // It acts at the post tops (4 m): the x-frames take 0.5 kN each → ±0.5·4/2 = ±1.0.
    close("B1 under +x", item_vertical(&a, "notional +x", "B1", 0), 1.0, 1e-12);
    for (wind, notional) in [(0.8, 0.4), (0.2, 0.8)] {
        let mut s = braced_tower();
        s.horizontal.notional = NotionalRule::Falsework;
        // A sheeted face 2 m wide and 4 m high on the −x side: pressure giving `wind` kN along +x.
        let face = Face { from: (0.0, 0.0), to: (0.0, 2.0), bottom: 0.0, top: 4.0 };
        s.loads.push(load("wind", Case::W, LoadKind::Wind { face, kpa: wind / 8.0, direction: PlanDirection::PlusX }));
        let a = analyse(&s).unwrap();
        close(&format!("notional beside wind {wind}"), -base_shear_of(&a, "notional +x")[0], notional, 1e-12);
        close("no wind in -x", base_shear_of(&a, "notional -x")[0], 1.0, 1e-12);
        let item = a.solution.items.iter().find(|i| i.id == "notional +x").unwrap();
        assert!(item.note.contains("wind") && item.note.contains("1 %"), "{}", item.note);
    }
    // A fixed percentage, or none.
    let mut s = braced_tower();
    s.horizontal.notional = NotionalRule::Percent(1.0);
    close("1 %", -base_shear_of(&analyse(&s).unwrap(), "notional +y")[1], 0.4, 1e-12);
    s.horizontal.notional = NotionalRule::Off;
    assert!(analyse(&s).unwrap().horizontal_base_shear().is_empty());
    // The scene's own notional loads stand instead of the rule.
    let mut s = braced_tower();
    s.horizontal.notional = NotionalRule::Falsework;
    s.loads.push(load("N", Case::W, LoadKind::Notional { percent: 3.0, direction: PlanDirection::PlusX, basis: vec![Case::G, Case::Q] }));
    let a = analyse(&s).unwrap();
    let h = a.horizontal_base_shear();
    assert_eq!(h.len(), 1, "{h:?}");
    close("own 3 %", -h[0].2[0], 1.2, 1e-12);
}

#[test]
fn unbraced_scenes_are_refused_for_the_default_notional_load() {
    // common practice, no source: a structure with vertical load and no bracing cannot take the
    // notional load of the falsework rule; the planner is told what to do.
    let mut s = braced_tower();
    s.horizontal.notional = NotionalRule::Falsework;
    s.braces.clear();
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("notional +x (generated: greater of 2.5 %") && err.contains("not held along x") && err.contains("brace a bay"), "{err}");
    s.horizontal.notional = NotionalRule::Off;
    analyse(&s).unwrap();
}

#[test]
fn horizontal_actions_combine_as_alternatives_or_independently() {
    // common practice, no source: wind directions are alternatives (the worst one counts, never
    // two at once); an identified force is independent and counts only where it is unfavourable.
    // Statics, by hand: wind of 1 kN on a face 1 m high (3–4 m) on the posts of one side; the
    // posts span from the base to the diaphragm at 4 m, so 3.5/4 of it reaches the bracing, half
    // to each frame along x (diagonal 2 m run, 4 m rise): ±(0.875/2)·2 = ±0.875 at its plates.
    let mut s = braced_tower();
    let side = |x: f64| Face { from: (x, 0.0), to: (x, 2.0), bottom: 3.0, top: 4.0 };
    s.loads.push(load("wind+x", Case::W, LoadKind::Wind { face: side(0.0), kpa: 0.5, direction: PlanDirection::PlusX }));
    s.loads.push(load("wind-x", Case::W, LoadKind::Wind { face: side(2.0), kpa: 0.5, direction: PlanDirection::MinusX }));
    let a = analyse(&s).unwrap();
    let service = |a: &Analysis, id: &str| a.plates[a.plate_index(id).unwrap()].combinations[0];
    close("B1 max", service(&a, "B1").max_kn, 10.0 + 0.875, 1e-12);
    close("B1 min", service(&a, "B1").min_kn, 10.0 - 0.875, 1e-12);
    // Two identified forces of 1 kN at B1's top, one each way, in the frame A1 → B1 without the
    // diaphragm: ±2 at B1. Each counts only where it makes things worse.
    let mut s = braced_tower();
    s.braces.retain(|b| b.id != "P");
    s.loads.push(push("H", 2.0, 0.0, 4.0, 1.0, PlanDirection::PlusX));
    s.loads.push(push("H2", 2.0, 0.0, 4.0, 1.0, PlanDirection::MinusX));
    let a = analyse(&s).unwrap();
    close("B1 max", service(&a, "B1").max_kn, 12.0, 1e-12);
    close("B1 min", service(&a, "B1").min_kn, 8.0, 1e-12);
}

#[test]
fn combination_factors_with_a_leading_action() {
    // source: EN 1990 expression 6.10 with ψ0 on the accompanying action (REFERENCES §3; the ψ0
    // values here are the planner's, 0.7 imposed and 0.6 horizontal): at plate B1, G = 10,
    // Q = 5, W = 4 (2 kN at 4 m in a 2 m bay, by hand), γG 1.35, γQ = γW = 1.5 →
    // Q leading 13.5 + 7.5 + 1.5·0.6·4 = 24.6; W leading 13.5 + 1.5·0.7·5 + 6.0 = 24.75; the
    // worse: 24.75. Without ψ0: 13.5 + 7.5 + 6.0 = 27.0.
    let mut s = braced_tower();
    s.braces.retain(|b| b.id != "P");
    s.loads.push(load("q", Case::Q, LoadKind::PostTop { post: "B1".into(), kn: 5.0 }));
    s.loads.push(push("h", 2.0, 0.0, 4.0, 2.0, PlanDirection::PlusX));
    let factored = |s: &Scene| {
        let a = analyse(s).unwrap();
        let c = a.combinations.iter().position(|c| c.name == "factored").unwrap();
        assert!((case_load(&a, "B1", Case::W) - 4.0).abs() < 1e-12);
        a.plates[a.plate_index("B1").unwrap()].combinations[c].max_kn
    };
    close("no ψ0", factored(&s), 27.0, 1e-12);
    for c in s.combinations.iter_mut().filter(|c| c.name == "factored") {
        c.psi0 = Some(plateload::scene::combination::Psi0 { imposed: 0.7, horizontal: 0.6 });
    }
    close("ψ0", factored(&s), 24.75, 1e-12);
    let words = plateload::check::actions::describe(s.combinations.iter().find(|c| c.name == "factored").unwrap(), s.analysis.working_levels);
    assert!(words.contains("imposed leading") && words.contains("horizontal leading") && words.contains("ψ0 = 0.7 imposed, 0.6 horizontal"), "{words}");
}

#[test]
fn two_towers_in_line_are_two_braced_planes() {
    // common practice, no source: posts on one line but not joined by any member are separate
    // frames; each carries its own load.
    let mut s = one_bay(2.0, &[1, 2, 3]);
    let mut t = one_bay(2.0, &[1, 2, 3]);
    for p in &mut t.posts {
        p.id = format!("T{}", p.id);
        p.x += 10.0;
    }
    for b in &mut t.bearers {
        b.id = format!("T{}", b.id);
        b.posts = b.posts.iter().map(|p| format!("T{p}")).collect();
    }
    for b in &mut t.braces {
        b.id = format!("T{}", b.id);
        b.from.post = format!("T{}", b.from.post);
        b.to.post = format!("T{}", b.to.post);
    }
    s.posts.extend(t.posts);
    s.bearers.extend(t.bearers);
    s.braces.extend(t.braces);
    s.loads.push(push("F", 12.0, 0.0, 6.0, 1.0, PlanDirection::PlusX));
    let a = analyse(&s).unwrap();
    close("TW", case_load(&a, "TW", Case::W), -3.0, 1e-12);
    close("W", case_load(&a, "W", Case::W), 0.0, 1e-12);
    let m = plateload::validate(&s).unwrap();
    assert_eq!(m.bracing.planes.len(), 2);
}

#[test]
fn brace_forces_go_down_a_spliced_standard_and_a_transfer_post_is_refused() {
    // source: REFERENCES §8 (±F·z/b) and statics, by hand: one bay 2.5 m wide, each standard two
    // posts spliced at 2 m (W, W-2 and E, E-2), braced in both lifts; 1 kN at 4 m → ±1.6 at the
    // lower plates, passed through the splices.
    let lift = |id: &str, x: f64, base: f64, top: f64| {
        let mut p = post(id, x, 0.0, top);
        p.base_level = base;
        if base > 0.0 {
            p.support = None;
        }
        p
    };
    let mut s = bare_scene();
    s.posts = vec![lift("W", 0.0, 0.0, 2.0), lift("E", 2.5, 0.0, 2.0), lift("W-2", 0.0, 2.0, 4.0), lift("E-2", 2.5, 2.0, 4.0)];
    s.bearers = vec![bearer("L1", 2.0, &["W", "E"]), bearer("L2", 4.0, &["W-2", "E-2"])];
    s.braces = vec![brace_at("X1", "W", 0.0, "E", 2.0), brace_at("X2", "W-2", 2.0, "E-2", 4.0)];
    s.loads.push(push("F", 2.5, 0.0, 4.0, 1.0, PlanDirection::PlusX));
    let a = analyse(&s).unwrap();
    close("W", case_load(&a, "W", Case::W), -1.6, 1e-12);
    close("E", case_load(&a, "E", Case::W), 1.6, 1e-12);
    let up = a.lifts.iter().find(|l| l.id == "E-2").unwrap();
    close("E-2 passes on", up.case_kn[Case::W.index()], 0.8, 1e-12);
    // A load at 3 m on the upper post spans between the 2 m and 4 m levels: half each (statics).
    s.loads[0] = push("F", 2.5, 0.0, 3.0, 1.0, PlanDirection::PlusX);
    let a = analyse(&s).unwrap();
    close("E at 3 m", case_load(&a, "E", Case::W), 0.5 * 4.0 / 2.5 + 0.5 * 2.0 / 2.5, 1e-12);

    // A post standing on a transfer bearer with nothing holding its base: a load below its lowest
    // hold cannot be carried down (refused, naming the post and what it stands on).
    let mut s = bare_scene();
    s.posts = vec![post("L", 0.0, 0.0, 2.0), post("R", 4.0, 0.0, 2.0), lift("U", 2.0, 2.0, 4.0), lift("V", 4.0, 2.0, 4.0)];
    s.posts[3].support = None;
    s.bearers = vec![bearer("T", 2.0, &["L", "R"]), bearer("top", 4.0, &["U", "V"])];
    s.braces = vec![brace_at("X", "U", 2.0, "V", 4.0)];
    s.loads.push(push("F", 4.0, 0.0, 3.0, 1.0, PlanDirection::PlusX));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("load F") && err.contains("not held along x"), "{err}");
}

#[test]
fn every_output_says_where_horizontal_load_goes() {
    // common practice, no source: the diaphragms (and that there are none elsewhere), the braced
    // bays and the brace forces per plate are in the JSON, the schedule, the report, the trace and
    // the command line alike, with the same numbers.
    let scene = plateload::scene::io::read_scene(&scene_path("harbour-sheeted-face.ron")).unwrap();
    let a = analyse(&scene).unwrap();
    let a1 = &a.plates[a.plate_index("A1").unwrap()];
    assert!(a.bays_of(&a1.brace).iter().any(|b| b == "A1–A2"), "{:?}", a1.brace);
    assert!(a1.brace.min_kn < -1.0);
    let v: serde_json::Value = serde_json::from_str(&plateload::export::json::analysis_json(&a)).unwrap();
    let diaphragms = v["horizontal_path"]["diaphragms"].as_array().unwrap();
    assert!(diaphragms.iter().any(|d| d.as_str().unwrap().starts_with("diaphragm at 2.000 m")));
    assert!(diaphragms.last().unwrap().as_str().unwrap().contains("no other level is a diaphragm"));
    let b = v["bases"].as_array().unwrap().iter().find(|b| b["id"] == "A1").unwrap();
    close("JSON brace min", b["brace"]["min_kn"].as_f64().unwrap(), a1.brace.min_kn, 1e-12);
    let csv = plateload::export::schedule::schedule_csv(&a);
    assert!(csv.contains("Horizontal path,\"diaphragm at 2.000 m") && csv.contains("brace up (kN)"), "{csv}");
    let row = csv.lines().find(|l| l.starts_with("A1,")).unwrap();
    assert!(row.contains(&format!("{:.3}", a1.brace.min_kn)), "{row}");
    let html = plateload::export::report::report_html(&scene, &a, &plateload::export::report::ReportOptions::default());
    assert!(html.contains("Horizontal loads down the braced bays") && html.contains("diaphragm at 6.000 m") && html.contains("What each combination does"));
    let trace = plateload::export::trace::trace_text(&scene, &a, a.plate_index("A1").unwrap());
    assert!(trace.contains("via braced bay A1–A2") && trace.contains("lever 1.300 m") && trace.contains("no other level is a diaphragm"), "{trace}");
}

#[test]
fn the_spare_map_says_how_it_takes_the_notional_load_of_the_extra_load() {
    // The notional load an extra load brings (at most 2.5 % of it by the falsework rule, BS 5975
    // cl. 19) is in the map with its brace forces; the map says so, and that sliding is not in it.
    let (_, scene) = crate::util::demo_scenes().into_iter().find(|(n, _)| n.starts_with("larkfield")).unwrap();
    let a = plateload::analyse(&scene).unwrap();
    let map = plateload::check::spare::spare_map(&scene, &a, &Default::default()).unwrap();
    let words = map.notional.as_deref().expect("the scene has notional load");
    assert!(words.contains("2.5 % of it") && words.contains("falsework rule") && words.contains("is included"), "{words}");
    assert!(map.not_included.as_deref().expect("the map always says what it leaves out").contains("sliding"));
    let text = plateload::export::spare::spare_text(&map);
    assert!(text.contains("Not included: sliding") && text.contains("Notional load: the notional horizontal load"), "{text}");
    // Every point of this demo is at a limit (plates lift already): the report names them.
    let html = plateload::export::report::report_html(&scene, &a, &plateload::export::report::ReportOptions::default());
    assert!(html.contains("<strong>Notional load:</strong> the notional horizontal load") && html.contains("<strong>Already at a limit before anything is added:</strong> plate "), "the report's spare section says how it takes the notional load and what blocks the map");
    let mut off = scene.clone();
    off.horizontal.notional = plateload::scene::model::NotionalRule::Off;
    let a = plateload::analyse(&off).unwrap();
    let map = plateload::check::spare::spare_map(&off, &a, &Default::default()).unwrap();
    assert!(map.notional.is_none() && !map.not_included.unwrap().contains("notional"));
}

#[test]
fn the_notional_load_is_a_share_of_the_load_applied_in_every_method_pass() {
    // BS 5975:2008+A1:2011 cl. 19: 2.5 % of the vertical load. The two-span pass takes each
    // support from its own two-span model, so its reactions add up to more than the load applied
    // (by design); the notional load must still be 2.5 % of the load applied, not of those.
    let (_, scene) = crate::util::demo_scenes().into_iter().find(|(n, _)| n.starts_with("larkfield")).unwrap();
    let a = plateload::analyse(&scene).unwrap();
    let primary = a.solution_of(0);
    let v: f64 = primary.items.iter().filter(|i| i.direction.is_none()).map(|i| i.applied.down()).sum();
    assert!(a.method_count() >= 5, "the envelope has the two-span pass");
    for m in 0..a.method_count() {
        for item in a.solution_of(m).items.iter().filter(|i| i.action == plateload::solve::Action::Notional) {
            let f = item.applied.force[0].hypot(item.applied.force[1]);
            assert!((f - 0.025 * v).abs() < 1e-9 * v, "{} in {}: {f} kN vs 2.5 % of {v} kN", item.id, a.method_label(m));
        }
    }
}

#[test]
fn notional_load_of_an_imposed_load_lifts_a_plate_it_does_not_press() {
    // statics, by hand: one bay W (0, 0) – E (2, 0), 2 m high, a diagonal from the foot of W to
    // the top of E; 1 kN permanent on each post top and 100 kN imposed on E's top only. Notional
    // 2.5 % of the vertical load at the top: 2.55 kN, of which 0.05 kN from the permanent load.
    // Towards +x the brace puts −2.55 × 2 / 2 = −2.55 kN into W. The imposed load presses only E,
    // so with it present W's least load is 1 − 2.55 = −1.55 kN: W lifts. Counting the notional
    // load on the permanent load alone would give 1 − 0.05 = +0.95 kN and no uplift.
    let mut s = bare_scene();
    s.posts = vec![post("W", 0.0, 0.0, 2.0), post("E", 2.0, 0.0, 2.0)];
    s.bearers = vec![bearer("L", 2.0, &["W", "E"])];
    s.braces = vec![brace_at("X", "W", 0.0, "E", 2.0)];
    s.horizontal.notional = NotionalRule::Percent(2.5);
    s.horizontal.directions = vec![PlanDirection::PlusX, PlanDirection::MinusX];
    for p in ["W", "E"] {
        s.loads.push(load(&format!("G-{p}"), Case::G, LoadKind::PostTop { post: p.into(), kn: 1.0 }));
    }
    s.loads.push(load("Q-E", Case::Q, LoadKind::PostTop { post: "E".into(), kn: 100.0 }));
    let a = analyse(&s).unwrap();
    let w = &a.plates[a.plate_index("W").unwrap()];
    assert_eq!(a.combinations[0].name, "service");
    close("least load at W", w.combinations[0].min_kn, 1.0 - 2.55, 1e-9);
    assert!(w.status.uplift, "W lifts under the notional load of the imposed load on E");
}
