//! Imposed loads in their worst arrangement, against published continuous-beam coefficients and
//! against a brute-force cell-by-cell solution.

use plateload::scene::loads::{Arrangement, Case, LoadKind};
use plateload::scene::model::{BeamMethod, Rect};
use plateload::{analyse, Analysis, Scene};

use crate::util::*;

/// The service combination's (max, min) at a plate, kN (G = 0 in these scenes).
fn service(a: &Analysis, id: &str) -> (f64, f64) {
    let p = &a.plates[a.plate_index(id).unwrap_or_else(|| panic!("no plate {id}"))];
    assert_eq!(a.combinations[0].name, "service");
    (p.combinations[0].max_kn, p.combinations[0].min_kn)
}

/// A continuous bearer on posts at the given positions along x, with a line load `w` from
/// `from` to `to`.
fn line_on_posts(xs: &[f64], w: f64, from: f64, to: f64) -> Scene {
    let mut s = bare_scene();
    s.support_types[0].swl_kn = 1e6;
    s.site.allowable_bearing_kpa = Some(1e6);
    let ids: Vec<String> = (0..xs.len()).map(|i| format!("P{i}")).collect();
    for (id, &x) in ids.iter().zip(xs) {
        s.posts.push(post(id, x, 0.0, 2.0));
    }
    let refs: Vec<&str> = ids.iter().map(String::as_str).collect();
    let mut b = bearer("B", 2.0, &refs);
    b.overhang_start_m = (xs[0] - from).max(0.0);
    b.overhang_end_m = (to - xs[xs.len() - 1]).max(0.0);
    b.method = Some(BeamMethod::Continuous);
    s.bearers.push(b);
    s.loads.push(load("q", Case::Q, LoadKind::BearerLine { bearer: "B".into(), from_m: from - xs[0], to_m: to - xs[0], kn_per_m: w }));
    s
}

#[test]
fn two_equal_spans_in_their_worst_arrangement() {
    // source: Hicks, Civil Engineering Formulas, Table 2.1; AISC Steel Construction Manual Table
    // 3-23 — two equal spans: both loaded 3/8, 10/8, 3/8 wL; one span loaded 7/16, 5/8, −1/16 wL.
    // Worst arrangement: inner max 10/8 (both), end max 7/16 (its own span only), end min −1/16
    // (the far span only). L = 2.5, w = 3.2 → wL = 8: 10, 3.5, −0.5.
    let a = analyse(&line_on_posts(&[0.0, 2.5, 5.0], 3.2, 0.0, 5.0)).unwrap();
    let (max, min) = service(&a, "P1");
    close("inner max", max, 10.0, 1e-9);
    close("inner min", min, 0.0, 1e-9);
    let (max, min) = service(&a, "P0");
    close("end max", max, 3.5, 1e-9);
    close("end min", min, -0.5, 1e-9);
    assert!(a.plates[0].status.uplift, "the end lifts when only the far span is loaded");
}

#[test]
fn three_equal_spans_in_their_worst_arrangement() {
    // source: Hicks Table 2.1 / AISC Table 3-23, three equal spans with spans 1–2 loaded: 0.383,
    // 1.200, 0.450, −0.033 wL; one span at a time (superposition of the same tables): span 1
    // 0.433, 0.650, −0.100, 0.017; span 2 −0.050, 0.550, 0.550, −0.050 wL. Worst: R2 max 1.200
    // (spans 1–2), R2 min −0.100 (span 3), R1 max 0.450 (spans 1 and 3), R1 min −0.050 (span 2).
    // L = 2, w = 5 → wL = 10.
    let a = analyse(&line_on_posts(&[0.0, 2.0, 4.0, 6.0], 5.0, 0.0, 6.0)).unwrap();
    let (max, min) = service(&a, "P1");
    close("R2 max", max, 12.0, 1e-9);
    close("R2 min", min, -1.0, 1e-9);
    let (max, min) = service(&a, "P0");
    close("R1 max", max, 4.5, 1e-9);
    close("R1 min", min, -0.5, 1e-9);
}

#[test]
fn an_overhang_loaded_alone_lifts_the_back_post() {
    // source: AISC Table 3-23 case 25 (beam overhanging one support, load on the overhang only):
    // R1 = −wa²/(2L), R2 = wa(2L + a)/(2L); case 24 (span and overhang loaded): R2 = w(L + a)²/(2L).
    // L = 3, a = 0.75, w = 8 → R1 min −0.75, R1 max (span alone) wL/2 = 12, R2 max 18.75.
    let a = analyse(&line_on_posts(&[0.0, 3.0], 8.0, 0.0, 3.75)).unwrap();
    let (max, min) = service(&a, "P0");
    close("back post max", max, 12.0, 1e-9);
    close("back post min", min, -0.75, 1e-9);
    let (max, _) = service(&a, "P1");
    close("front post max", max, 18.75, 1e-9);
}

#[test]
fn a_whole_load_is_applied_everywhere_at_once() {
    // source: Hicks Table 2.1 (two equal spans, both loaded): 3/8, 10/8, 3/8 wL, and no uplift.
    let mut s = line_on_posts(&[0.0, 2.5, 5.0], 3.2, 0.0, 5.0);
    s.loads[0].arrangement = Arrangement::Whole;
    let a = analyse(&s).unwrap();
    close("end max", service(&a, "P0").0, 3.0, 1e-9);
    close("end min", service(&a, "P0").1, 0.0, 1e-9);
    close("inner max", service(&a, "P1").0, 10.0, 1e-9);
}

#[test]
fn a_deck_over_three_bearers_is_arranged_strip_by_strip() {
    // source: Hicks Table 2.1 applied to the deck across its bearers (two equal spans of 2 m,
    // continuous): middle bearer 10/8 qL per metre with both strips loaded; edge bearer −1/16 qL
    // per metre with only the far strip loaded. q = 4 kPa, L = 2 → 10 kN/m and −0.5 kN/m. Each
    // bearer is one simple span of 3 m between two posts → half of 3 m to each post: 15 and −0.75.
    let mut s = bare_scene();
    s.support_types[0].swl_kn = 1e6;
    s.site.allowable_bearing_kpa = Some(1e6);
    for (j, y) in [0.0, 2.0, 4.0].iter().enumerate() {
        s.posts.push(post(&format!("A{j}"), 0.0, *y, 2.0));
        s.posts.push(post(&format!("B{j}"), 3.0, *y, 2.0));
        s.bearers.push(bearer(&format!("L{j}"), 2.0, &[&format!("A{j}"), &format!("B{j}")]));
    }
    let mut d = deck("D", 2.0, (0.0, 3.0), (0.0, 4.0), &["L0", "L1", "L2"]);
    d.method = Some(BeamMethod::Continuous);
    s.decks.push(d);
    s.loads.push(load("q", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: kpa(4.0) }));
    let a = analyse(&s).unwrap();
    close("middle max", service(&a, "A1").0, 15.0, 1e-9);
    close("edge min", service(&a, "A0").1, -0.75, 1e-9);
    // source: same table, one strip alone: 7/16 qL at its edge bearer → 3.5 kN/m → 5.25 per post.
    close("edge max", service(&a, "B2").0, 5.25, 1e-9);
    // Every cell balances on its own.
    let item = a.solution.items.iter().find(|i| i.id == "q").unwrap();
    let arranged = item.arranged.as_ref().expect("the deck load is arranged");
    assert_eq!(arranged.cells.len(), 2, "two strips × one stretch between posts");
    assert!(arranged.worst_cell_residual < 1e-12, "{}", arranged.worst_cell_residual);
}

/// Brute force: every cell as its own whole patch load; per plate, the sum of the positive and of
/// the negative reactions in the service combination (G = 0).
fn brute_force(s: &Scene, deck: &str, q: f64, rects: &[Rect]) -> Vec<(String, f64, f64)> {
    let mut t = s.clone();
    t.loads.retain(|l| l.case != Case::Q);
    for (i, r) in rects.iter().enumerate() {
        let mut l = load(&format!("cell{i}"), Case::Q, LoadKind::DeckPatch { deck: deck.into(), area: *r, intensity: kpa(q) });
        l.arrangement = Arrangement::Whole;
        t.loads.push(l);
    }
    let a = analyse(&t).unwrap();
    a.plates.iter().map(|p| (p.id.clone(), p.combinations[0].max_kn, p.combinations[0].min_kn)).collect()
}

mod properties {
    use super::*;

    /// Simple spans, continuous, or the scene's envelope (with joints not known: two-span
    /// continuity at each support too).
    const METHODS: [Option<BeamMethod>; 3] = [Some(BeamMethod::SimpleSpans), Some(BeamMethod::Continuous), None];
    use plateload::solve::CellPlace;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig { cases: 40, .. ProptestConfig::default() })]

        #[test]
        fn arranged_extremes_equal_the_cell_by_cell_sums(
            nx in 2usize..5, ny in 2usize..5, bay_x in 0.8f64..2.5, bay_y in 0.8f64..2.5,
            cant in prop_oneof![Just(0.0), 0.05f64..0.8], deck_method in 0usize..3, bearer_method in 0usize..3,
            q in 0.5f64..8.0, lift_at in 0usize..20,
        ) {
            // common practice, no source: linearity — the arranged extremes must equal the sums of
            // the positive and of the negative effects of every cell solved on its own, in every
            // method pass (the envelope is then taken over the passes either way).
            let mut s = bare_scene();
            s.support_types[0].swl_kn = 1e6;
            s.site.allowable_bearing_kpa = Some(1e6);
            for j in 0..ny {
                for i in 0..nx {
                    s.posts.push(post(&format!("P{i}-{j}"), i as f64 * bay_x, j as f64 * bay_y, 2.0));
                }
            }
            // One standard is two lifts: the bearer rests on the upper one, so that post's load
            // reaches its plate through a splice (the general path of the unit flows).
            let k = lift_at % (nx * ny);
            let mut upper = s.posts[k].clone();
            upper.id = format!("{}-up", s.posts[k].id);
            upper.base_level = 1.0;
            upper.support = None;
            s.posts[k].top_level = 1.0;
            let spliced = s.posts[k].id.clone();
            s.posts.push(upper);
            for j in 0..ny {
                let ids: Vec<String> = (0..nx).map(|i| format!("P{i}-{j}")).map(|id| if id == spliced { format!("{id}-up") } else { id }).collect();
                let refs: Vec<&str> = ids.iter().map(String::as_str).collect();
                let mut b = bearer(&format!("L{j}"), 2.0, &refs);
                b.method = METHODS[bearer_method];
                s.bearers.push(b);
            }
            let names: Vec<String> = (0..ny).map(|j| format!("L{j}")).collect();
            let refs: Vec<&str> = names.iter().map(String::as_str).collect();
            let mut d = deck("D", 2.0, (0.0, (nx - 1) as f64 * bay_x), (-cant, (ny - 1) as f64 * bay_y + cant), &refs);
            d.method = METHODS[deck_method];
            s.decks.push(d);
            s.loads.push(load("q", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: kpa(q) }));
            let a = analyse(&s).unwrap();
            let item = a.solution.items.iter().find(|i| i.id == "q").unwrap();
            let arranged = item.arranged.as_ref().unwrap();
            prop_assert!(arranged.worst_cell_residual < 1e-9, "{}", arranged.worst_cell_residual);
            let rects: Vec<Rect> = arranged.cells.iter().map(|c| match c.place { CellPlace::Deck { rect, .. } => rect, _ => unreachable!() }).collect();
            for (id, max, min) in brute_force(&s, "D", q, &rects) {
                let (amax, amin) = service(&a, &id);
                let tol = 1e-9 * (1.0 + max.abs() + min.abs());
                prop_assert!((amax - max).abs() <= tol && (amin - min).abs() <= tol, "{id}: arranged {amax}/{amin}, cells {max}/{min}");
            }
        }
    }
}

#[test]
fn a_tee_head_is_checked_with_one_arm_loaded_alone() {
    // statics, by hand: a bearer on one post with arms a = 0.6 m each side under w = 5 kN/m
    // balances when both arms are loaded, but one arm alone turns it by w·a²/2 = 0.9 kN·m.
    let mut s = bare_scene();
    s.posts = vec![post("P", 0.0, 0.0, 2.0)];
    let mut t = bearer("T", 2.0, &["P"]);
    t.overhang_start_m = 0.6;
    t.overhang_end_m = 0.6;
    s.bearers = vec![t];
    s.loads.push(load("q", Case::Q, LoadKind::BearerLine { bearer: "T".into(), from_m: -0.6, to_m: 0.6, kn_per_m: 5.0 }));
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("bearer T rests on a single post, P") && err.contains("0.900 kN·m") && err.contains("load q on one arm"), "{err}");
    assert!(err.contains("moment capacity") && err.contains("ledger"), "the message says what would fix it: {err}");
    // Applied whole, the same load balances.
    s.loads[0].arrangement = Arrangement::Whole;
    assert!(analyse(&s).is_ok());
    // Arranged again, with a head that takes 1.0 kN·m (a stated capacity): it stands, and says so.
    s.loads[0].arrangement = Arrangement::Arranged;
    s.support_types[0].head_moment_capacity_knm = Some(1.0);
    let a = analyse(&s).unwrap();
    let h = &a.solution.head_moments[0];
    close("head moment", h.moment_knm, 0.9, 1e-12);
    // A smaller capacity does not do.
    s.support_types[0].head_moment_capacity_knm = Some(0.8);
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("more than the head's capacity of 0.800 kN·m"), "{err}");
}

#[test]
fn working_levels_one_in_full_with_an_adjacent_one_at_half() {
    // source: EN 12811-1 in service, one working level at 100 % of its load class with one
    // adjacent level at 50 % (REFERENCES §9, via a UK industry summary); load class 3, q1 = 2.0
    // kPa (EN 12811-1 Table 3, REFERENCES §2). A one-bay tower 2 m × 2 m with a deck at 2, 4 and
    // 6 m: each deck puts 2.0 × 4 / 4 = 2 kN on each post. All levels at once: 6 kN; the rule:
    // 2 + 0.5 × 2 = 3 kN.
    let mut s = bare_scene();
    s.support_types[0].swl_kn = 1e6;
    s.site.allowable_bearing_kpa = Some(1e6);
    for (id, x, y) in [("A1", 0.0, 0.0), ("B1", 2.0, 0.0), ("A2", 0.0, 2.0), ("B2", 2.0, 2.0)] {
        s.posts.push(post(id, x, y, 6.0));
    }
    for (k, z) in [2.0, 4.0, 6.0].iter().enumerate() {
        s.bearers.push(bearer(&format!("S{k}"), *z, &["A1", "B1"]));
        s.bearers.push(bearer(&format!("N{k}"), *z, &["A2", "B2"]));
        s.decks.push(deck(&format!("D{k}"), *z, (0.0, 2.0), (0.0, 2.0), &[&format!("S{k}"), &format!("N{k}")]));
        s.loads.push(load(&format!("q{k}"), Case::Q, LoadKind::DeckArea { deck: format!("D{k}"), intensity: plateload::Intensity::LoadClassUniform(3) }));
    }
    let a = analyse(&s).unwrap();
    close("all levels at once", service(&a, "A1").0, 6.0, 1e-9);
    s.analysis.working_levels = plateload::scene::model::WorkingLevels::OneFullAdjacentHalf;
    let a = analyse(&s).unwrap();
    close("one level in full, an adjacent one at half", service(&a, "A1").0, 3.0, 1e-9);
    // Materials on a deck are not working-level loads: they count in full wherever they are.
    s.loads.push(load("bricks", Case::Q, LoadKind::DeckArea { deck: "D0".into(), intensity: kpa(1.0) }));
    let a = analyse(&s).unwrap();
    close("rule plus materials", service(&a, "A1").0, 3.0 + 1.0, 1e-9);
}

#[test]
fn outputs_say_how_each_plate_is_worst_loaded_and_which_loads_act_whole() {
    // common practice, no source: the two-span bearer above, arranged; and a second load set whole.
    let mut s = line_on_posts(&[0.0, 2.5, 5.0], 3.2, 0.0, 5.0);
    let mut pour = load("pour", Case::Q, LoadKind::BearerLine { bearer: "B".into(), from_m: 0.0, to_m: 5.0, kn_per_m: 1.0 });
    pour.arrangement = Arrangement::Whole;
    s.loads.push(pour);
    let a = analyse(&s).unwrap();
    let end = a.plate_index("P0").unwrap();
    let notes = a.arrangements_at(end);
    assert_eq!(notes.len(), 1, "only the arranged load is described: {notes:?}");
    assert_eq!((notes[0].cells, notes[0].loaded_for_max, notes[0].loaded_for_min), (2, 1, 1));
    assert!(notes[0].words().contains("worst with 1 of 2 cells loaded"), "{}", notes[0].words());
    let trace = plateload::export::trace::trace_text(&s, &a, end);
    assert!(trace.contains("loaded for the maximum: B 0.00–2.50 m from its first post"), "{trace}");
    assert!(trace.contains("loaded for the minimum: B 2.50–5.00 m from its first post"), "{trace}");
    let csv = plateload::export::schedule::schedule_csv(&a);
    assert!(csv.contains("imposed load arrangement for max") && csv.contains("q 1/2 cells"), "{csv}");
    assert!(csv.contains("applied whole as set: pour"), "{csv}");
    let json: serde_json::Value = serde_json::from_str(&plateload::export::json::analysis_json(&a)).unwrap();
    assert_eq!(json["imposed_loads"]["whole"], serde_json::json!(["pour"]));
    assert_eq!(json["bases"][0]["arrangements"][0]["loaded_for_max"], 1);
    let html = plateload::export::report::report_html(&s, &a, &Default::default());
    assert!(html.contains("<strong>whole</strong> (as set)") && html.contains("q: worst with every cell loaded"), "the worst plate is the middle one");
}

#[test]
fn uplift_only_through_continuity_is_told_apart_from_uplift_in_simple_spans() {
    // source: two equal continuous spans, one loaded: end reactions 7/16 and −1/16 wL, middle
    // 5/8 wL (AISC Manual beam diagrams, two equal spans, uniform load on one span — REFERENCES
    // §1). Spans 2 m, w = 5 kN/m arranged: the far end lifts by 5 × 2 / 16 = 0.625 kN with the
    // bearer continuous, and never in simple spans — uplift a member loose in its heads would not
    // pass on. A cantilever lifts its back support in simple spans too (statics, by hand: 2 kN
    // at 1 m past B on a 2 m span lifts A by 1 kN), which is uplift whatever the fixing.
    let mut s = bare_scene();
    s.posts = vec![post("A", 0.0, 0.0, 2.0), post("B", 2.0, 0.0, 2.0), post("C", 4.0, 0.0, 2.0)];
    s.bearers = vec![bearer("L", 2.0, &["A", "B", "C"])];
    s.loads.push(load("q", Case::Q, LoadKind::BearerLine { bearer: "L".into(), from_m: 0.0, to_m: 4.0, kn_per_m: 5.0 }));
    s.analysis.method = BeamMethod::Envelope;
    let a = analyse(&s).unwrap();
    let i = a.plate_index("A").unwrap();
    close("continuous uplift at A", service(&a, "A").1, -0.625, 1e-9);
    assert!(a.plates[i].status.uplift);
    assert!(a.lifts_only_through_continuity(i), "A lifts only with the bearer continuous");
    let f = plateload::export::findings::findings(&a);
    let uplift = f.iter().find(|f| f.check == "uplift").expect("an uplift finding");
    assert!(uplift.text.contains("lift only where members run continuous"), "{}", uplift.text);
    assert!(plateload::export::trace::trace_text(&s, &a, i).contains("lifts only where members run continuous"));
    // The cantilever: uplift in simple spans as well.
    let mut c = bare_scene();
    c.posts = vec![post("A", 0.0, 0.0, 2.0), post("B", 2.0, 0.0, 2.0)];
    let mut l = bearer("L", 2.0, &["A", "B"]);
    l.overhang_end_m = 1.0;
    c.bearers = vec![l];
    c.loads.push(load("tip", Case::Q, LoadKind::BearerPoint { bearer: "L".into(), at_m: 3.0, kn: 2.0 }));
    let a = analyse(&c).unwrap();
    let i = a.plate_index("A").unwrap();
    close("cantilever uplift at A", service(&a, "A").1, -1.0, 1e-9);
    assert!(a.plates[i].status.uplift && !a.lifts_only_through_continuity(i));
}
