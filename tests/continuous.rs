//! Continuous members in whole scenes: the method envelope, per-member overrides, equilibrium of
//! every method pass, outputs that name the method, and old scene files.

use plateload::scene::io::parse_scene;
use plateload::scene::loads::{Case, Intensity, Load, LoadKind};
use plateload::scene::model::{BeamMethod, BeamRole, Bearer, Deck, Post, Rect, Scene, SupportType, PlateSize};
use plateload::{analyse, Analysis};

fn post(id: &str, x: f64, y: f64) -> Post {
    Post { id: id.into(), x, y, base_level: 0.0, top_level: 2.0, support: Some("S".into()), self_weight_kn_per_m: 0.0, section: None }
}

/// A bearer known to be continuous over all its posts (declared with no joints), so that the
/// envelope here is of simple spans and full continuity only.
fn bearer(id: &str, posts: &[&str]) -> Bearer {
    Bearer {
        id: id.into(),
        role: BeamRole::Bearer,
        level: 2.0,
        posts: posts.iter().map(|p| p.to_string()).collect(),
        overhang_start_m: 0.0,
        overhang_end_m: 0.0,
        self_weight_kn_per_m: 0.0,
        method: None,
        joints: Some(Vec::new()),
        section: None,
    }
}

fn scene() -> Scene {
    let mut s = Scene::empty("test site", 1.0e6);
    // Vertical load paths on their own: no notional load generated.
    s.horizontal.notional = plateload::scene::model::NotionalRule::Off;
    s.support_types.push(SupportType::new("S", PlateSize { width_m: 0.15, length_m: 0.15 }, 1.0e6, None));
    s
}

/// One bearer on four posts 1.5 m apart, a uniform line load of 4 kN/m over its whole length,
/// applied whole (these tests are about the method envelope; arrangements have their own).
fn three_span_bearer(method: BeamMethod) -> Scene {
    let mut s = scene();
    for (i, id) in ["P0", "P1", "P2", "P3"].iter().enumerate() {
        s.posts.push(post(id, 1.5 * i as f64, 0.0));
    }
    s.bearers.push(bearer("B", &["P0", "P1", "P2", "P3"]));
    let mut q = Load::new("q", Case::Q, LoadKind::BearerLine { bearer: "B".into(), from_m: 0.0, to_m: 4.5, kn_per_m: 4.0 });
    q.arrangement = plateload::scene::loads::Arrangement::Whole;
    s.loads.push(q);
    s.analysis.method = method;
    s
}

fn service(a: &Analysis, plate: usize) -> (f64, f64) {
    let c = &a.plates[plate].combinations[0];
    assert_eq!(a.combinations[0].name, "service");
    (c.max_kn, c.min_kn)
}

fn q(a: &Analysis) -> Vec<f64> {
    a.plates.iter().map(|p| p.case_kn[Case::Q.index()]).collect()
}

fn close(got: &[f64], want: &[f64]) -> bool {
    got.len() == want.len() && got.iter().zip(want).all(|(g, w)| (g - w).abs() <= 1e-9 * (1.0 + w.abs()))
}

#[test]
fn three_span_bearer_by_each_method() {
    // source: simple spans — AISC Table 3-23 case 1, wL/2 to each end of each span: 0.5, 1.0,
    // 1.0, 0.5 wL; continuous — Hicks Table 2.1 / AISC Table 3-23, three equal spans: 0.4, 1.1,
    // 1.1, 0.4 wL. w = 4, L = 1.5 → wL = 6.
    let simple = analyse(&three_span_bearer(BeamMethod::SimpleSpans)).unwrap();
    assert!(close(&q(&simple), &[3.0, 6.0, 6.0, 3.0]), "{:?}", q(&simple));
    assert_eq!(simple.method_count(), 1);
    assert_eq!(simple.method_label(0), "simple spans");
    let cont = analyse(&three_span_bearer(BeamMethod::Continuous)).unwrap();
    assert!(close(&q(&cont), &[2.4, 6.6, 6.6, 2.4]), "{:?}", q(&cont));
    assert_eq!(cont.method_count(), 1);
    assert_eq!(cont.method_label(0), "continuous");
}

#[test]
fn envelope_takes_the_continuous_load_at_inner_posts_and_the_simple_load_at_end_posts() {
    // source: as above; the envelope takes the larger of 6.6 and 6.0 at the inner posts and of
    // 3.0 and 2.4 at the end posts (service combination: Q factor 1, G = 0 here).
    let a = analyse(&three_span_bearer(BeamMethod::Envelope)).unwrap();
    assert_eq!(a.method_count(), 2);
    let labels: Vec<&str> = (0..2).map(|m| a.method_label(m)).collect();
    assert_eq!(labels, ["simple spans", "continuous"]);
    let max: Vec<f64> = (0..4).map(|p| service(&a, p).0).collect();
    assert!(close(&max, &[3.0, 6.6, 6.6, 3.0]), "{max:?}");
    let governing: Vec<&str> = (0..4).map(|p| a.governing_method_label(p)).collect();
    assert_eq!(governing, ["simple spans", "continuous", "continuous", "simple spans"]);
    // The case columns come from the primary pass; the others are kept per pass.
    assert!(close(&q(&a), &[3.0, 6.0, 6.0, 3.0]));
    assert!(close(&a.plates[1].case_kn_by_method.iter().map(|c| c[1]).collect::<Vec<_>>(), &[6.0, 6.6]));
    // Each pass is combined whole; the envelope's per-pass results are kept.
    assert!((a.plates[1].combinations_by_method[1][0].max_kn - 6.6).abs() < 1e-9);
}

#[test]
fn envelope_takes_the_smaller_minimum_for_uplift() {
    // source: Hicks Table 2.1 / AISC Table 3-23, two equal spans with one span loaded: 7/16, 5/8,
    // −1/16 wL — the far end lifts under continuity; as simple spans it carries nothing.
    // L = 1, w = 16 → 7, 10, −1.
    let mut s = scene();
    for (i, id) in ["P0", "P1", "P2"].iter().enumerate() {
        s.posts.push(post(id, i as f64, 0.0));
    }
    s.bearers.push(bearer("B", &["P0", "P1", "P2"]));
    s.loads.push(Load::new("q", Case::Q, LoadKind::BearerLine { bearer: "B".into(), from_m: 0.0, to_m: 1.0, kn_per_m: 16.0 }));
    let a = analyse(&s).unwrap();
    let (max2, min2) = service(&a, 2);
    assert!(max2.abs() < 1e-9 && (min2 + 1.0).abs() < 1e-9, "{max2} {min2}");
    assert_eq!(a.min_method_label(2), "continuous");
    assert!(a.plates[2].status.uplift, "service checks uplift");
    let (max0, _) = service(&a, 0);
    assert!((max0 - 8.0).abs() < 1e-9, "simple span gives wL/2 = 8 > 7");
    assert_eq!(a.governing_method_label(0), "simple spans");
}

#[test]
fn a_member_set_to_a_method_keeps_it() {
    // common practice, no source: the override wins over the scene's envelope.
    let mut s = three_span_bearer(BeamMethod::Envelope);
    s.bearers[0].method = Some(BeamMethod::Continuous);
    let a = analyse(&s).unwrap();
    assert_eq!(a.method_count(), 1, "nothing left to envelope");
    assert_eq!(a.method_label(0), "continuous");
    assert!(close(&q(&a), &[2.4, 6.6, 6.6, 2.4]));
    s.analysis.method = BeamMethod::SimpleSpans;
    s.bearers[0].method = Some(BeamMethod::Envelope);
    assert_eq!(analyse(&s).unwrap().method_count(), 2);
}

/// A 3 m × 2 m deck over three bearers 1 m apart (along x, at y = 0, 1, 2), each on three posts
/// 1.5 m apart, under 2 kPa applied whole; every member known to be continuous.
fn deck_on_three_bearers() -> Scene {
    let mut s = scene();
    let mut names = Vec::new();
    for j in 0..3 {
        let ids: Vec<String> = (0..3).map(|i| format!("P{i}{j}")).collect();
        for (i, id) in ids.iter().enumerate() {
            s.posts.push(post(id, 1.5 * i as f64, j as f64));
        }
        let refs: Vec<&str> = ids.iter().map(String::as_str).collect();
        s.bearers.push(bearer(&format!("B{j}"), &refs));
        names.push(format!("B{j}"));
    }
    s.decks.push(Deck { id: "D".into(), level: 2.0, extent: Rect { x: (0.0, 3.0), y: (0.0, 2.0) }, bearers: names, self_weight_kpa: 0.0, method: None, joints: Some(Vec::new()), decking: None, diaphragm: false });
    let mut q = Load::new("q", Case::Q, LoadKind::DeckArea { deck: "D".into(), intensity: Intensity::Kpa(2.0) });
    q.arrangement = plateload::scene::loads::Arrangement::Whole;
    s.loads.push(q);
    s
}

fn plate(a: &Analysis, id: &str) -> usize {
    a.plate_index(id).unwrap()
}

#[test]
fn deck_over_three_bearers_and_the_mixed_passes() {
    // source: two equal spans, uniform load — 3/8, 10/8, 3/8 wL continuous (Hicks Table 2.1 /
    // AISC Table 3-23); 1/2, 1, 1/2 wL as simple spans (AISC case 1). Deck: q = 2 kPa, span 1 m,
    // so per metre along the bearers the outer bearers take 1.0 (simple) or 0.75 (continuous) and
    // the middle one 2.0 or 2.5 kN/m. Each bearer: two spans of 1.5 m, so its middle post takes
    // 1.0·w·1.5 (simple) or 1.25·w·1.5 (continuous), its end posts 0.5 or 0.375 × w·1.5. (D)
    let a = analyse(&deck_on_three_bearers()).unwrap();
    let labels: Vec<&str> = (0..a.method_count()).map(|m| a.method_label(m)).collect();
    assert_eq!(labels, ["simple spans", "continuous", "decks simple spans, bearers continuous", "decks continuous, bearers simple spans"]);
    let by = |id: &str| a.plates[plate(&a, id)].case_kn_by_method.iter().map(|c| c[1]).collect::<Vec<f64>>();
    // Middle post of the middle bearer: w·1.5 × {1.0, 1.25} with w ∈ {2.0, 2.5}.
    assert!(close(&by("P11"), &[3.0, 4.6875, 3.75, 3.75]), "{:?}", by("P11"));
    // Middle post of an outer bearer: w ∈ {1.0, 0.75}; the most is a jointed deck on a continuous
    // bearer, 1.0 × 1.25 × 1.5 = 1.875 — more than either all-simple (1.5) or all-continuous (1.40625).
    assert!(close(&by("P10"), &[1.5, 1.40625, 1.875, 1.125]), "{:?}", by("P10"));
    let p10 = plate(&a, "P10");
    assert!((service(&a, p10).0 - 1.875).abs() < 1e-9);
    assert_eq!(a.governing_method_label(p10), "decks simple spans, bearers continuous");
    // Corner post: 0.5 × 1.0 × 1.5 = 0.75 as simple spans everywhere.
    let p00 = plate(&a, "P00");
    assert!((service(&a, p00).0 - 0.75).abs() < 1e-9);
    assert_eq!(a.governing_method_label(p00), "simple spans");
}

#[test]
fn deck_point_load_reaches_every_bearer_of_a_continuous_deck() {
    // from memory: two equal spans, point load P at the middle of one span (AISC Table 3-23):
    // centre-support moment 3PL/32, so by statics R = 13/32, 22/32, −3/32 P. P = 32 → 13, 22, −3.
    let mut s = deck_on_three_bearers();
    s.loads.clear();
    s.decks[0].method = Some(BeamMethod::Continuous);
    s.bearers.iter_mut().for_each(|b| b.method = Some(BeamMethod::SimpleSpans));
    s.loads.push(Load::new("p", Case::Q, LoadKind::DeckPoint { deck: "D".into(), x: 1.5, y: 0.5, kn: 32.0 }));
    let a = analyse(&s).unwrap();
    assert_eq!(a.method_count(), 1);
    let at = |id: &str| a.plates[plate(&a, id)].case_kn[1];
    // The point is over the middle posts (x = 1.5), so each bearer's share goes to its middle post.
    assert!(close(&[at("P10"), at("P11"), at("P12")], &[13.0, 22.0, -3.0]), "{} {} {}", at("P10"), at("P11"), at("P12"));
}

#[test]
fn every_method_pass_is_in_equilibrium() {
    // common practice, no source: each method conserves force and moment; relative ≤ 1e-9.
    let mut scenes: Vec<Scene> = (0..plateload::scene::demo::DEMO_SCENES.len()).map(|i| plateload::scene::demo::demo_scene(i).unwrap()).collect();
    scenes.push(deck_on_three_bearers());
    let mut with_overhang = three_span_bearer(BeamMethod::Envelope);
    with_overhang.bearers[0].overhang_end_m = 0.8;
    with_overhang.bearers[0].overhang_start_m = 0.3;
    with_overhang.loads.push(Load::new("tip", Case::G, LoadKind::BearerPoint { bearer: "B".into(), at_m: 5.2, kn: 3.0 }));
    scenes.push(with_overhang);
    for s in &scenes {
        let a = analyse(s).unwrap();
        assert!(a.method_count() >= 2, "{}: the default envelope solves both methods", s.site.name);
        assert_eq!(a.equilibrium_by_method.len(), a.method_count());
        for (m, eq) in a.equilibrium_by_method.iter().enumerate() {
            for e in eq {
                assert!(e.relative <= 1e-9, "{} [{}] {}: {:e}", s.site.name, a.method_label(m), e.case, e.relative);
            }
            // Per pass, the plates' case loads add up to the applied load of each case — where
            // the pass is one state (taken support by support, each model balances instead).
            if !eq[0].one_state {
                continue;
            }
            for c in Case::ALL {
                let sum: f64 = a.plates.iter().map(|p| p.case_kn_by_method[m][c.index()]).sum();
                assert!((sum - eq[c.index()].applied.down()).abs() <= 1e-9 * (1.0 + sum.abs()), "{} [{}] {c}", s.site.name, a.method_label(m));
            }
        }
        assert!(a.worst_residual() <= 1e-9);
    }
}

#[test]
fn schedule_json_and_trace_name_the_method() {
    // common practice, no source
    let s = three_span_bearer(BeamMethod::Envelope);
    let a = analyse(&s).unwrap();
    let csv = plateload::export::schedule::schedule_csv(&a);
    let mut rows = csv.lines().skip_while(|l| !l.starts_with("id,"));
    let head: Vec<&str> = rows.next().unwrap().split(',').collect();
    let col = head.iter().position(|h| *h == "method for max").expect("method column");
    let p1: Vec<&str> = rows.next().and_then(|_| rows.next()).unwrap().split(',').collect();
    assert_eq!(p1[0], "P1");
    assert_eq!(p1[col], "continuous");
    assert!(csv.contains("Equilibrium Q [continuous]"), "{csv}");
    // The totals row still equals the applied load (primary pass case columns).
    let total = csv.lines().find(|l| l.starts_with("TOTAL")).unwrap();
    assert!(total.contains(",18.000,"), "{total}");
    let json: serde_json::Value = serde_json::from_str(&plateload::export::json::analysis_json(&a)).unwrap();
    assert_eq!(json["methods"], serde_json::json!(["simple spans", "continuous"]));
    assert_eq!(json["bases"][1]["governing_method"], "continuous");
    assert_eq!(json["bases"][1]["combinations"][0]["max_method"], "continuous");
    assert_eq!(json["bases"][1]["cases_kn_by_method"][1]["Q"].as_f64().map(|v| (v - 6.6).abs() < 1e-9), Some(true));
    assert_eq!(json["equilibrium_by_method"].as_array().map(Vec::len), Some(2));
    let trace = plateload::export::trace::trace_text(&s, &a, 1);
    assert!(trace.contains("method: continuous"), "{trace}");
    assert!(trace.contains("bearer B, continuous over 4 posts"), "{trace}");
    assert!(trace.contains("total Q: 6.600 kN (plate load 6.600 kN)"), "{trace}");
    assert!(trace.contains("under simple spans: G 0.000 kN, Q 6.000 kN"), "{trace}");
}

#[test]
fn two_post_bearers_give_the_same_loads_by_both_methods() {
    // source: AISC Table 3-23 case 1: a single span is statically determinate.
    let mut s = scene();
    s.posts.push(post("A", 0.0, 0.0));
    s.posts.push(post("B", 2.0, 0.0));
    s.bearers.push(bearer("AB", &["A", "B"]));
    s.loads.push(Load::new("q", Case::Q, LoadKind::BearerLine { bearer: "AB".into(), from_m: 0.0, to_m: 2.0, kn_per_m: 3.0 }));
    let a = analyse(&s).unwrap();
    assert_eq!(a.method_count(), 2);
    assert!(a.plates.iter().all(|p| p.methods_agree));
    assert_eq!(a.governing_method_label(0), plateload::check::analysis::METHODS_AGREE);
}

#[test]
fn old_scene_files_load_and_new_fields_round_trip() {
    // common practice, no source: files without the new fields still load; the values they
    // default to are written back, so a later change of a default cannot change the file's
    // meaning; unknown fields are still refused.
    let text = include_str!("old-format/larkfield-falsework.ron");
    assert!(!text.contains("analysis"));
    let s = parse_scene(text, "old").unwrap();
    assert_eq!(s.analysis.method, BeamMethod::Envelope);
    assert!(s.bearers.iter().all(|b| b.method.is_none()));
    let written = plateload::scene::io::scene_to_ron(&s);
    assert!(written.contains("analysis: (") && written.contains("method: Envelope,"), "the defaults are written: {written}");
    assert!(written.contains("method: None"), "each member's own method is written, even when it has none");

    let mut t = three_span_bearer(BeamMethod::Continuous);
    t.bearers[0].method = Some(BeamMethod::SimpleSpans);
    t.analysis.stiffness.deck_knm2_per_m = 12.0;
    let back = parse_scene(&plateload::scene::io::scene_to_ron(&t), "t").unwrap();
    assert_eq!(back, t);

    let bad = text.replacen("format: 1,", "format: 1,\n  analysis: (method: Envelope, speed: 3),", 1);
    let err = parse_scene(&bad, "bad.ron").unwrap_err().to_string();
    assert!(err.starts_with("bad.ron:") && err.contains("speed"), "{err}");
    let set = text.replacen("format: 1,", "format: 1,\n  analysis: (method: SimpleSpans),", 1);
    assert_eq!(parse_scene(&set, "set").unwrap().analysis.method, BeamMethod::SimpleSpans);
}

#[test]
fn stiffness_must_be_positive() {
    // common practice, no source
    let mut s = three_span_bearer(BeamMethod::Continuous);
    s.analysis.stiffness.bearer_knm2 = 0.0;
    s.analysis.stiffness.deck_knm2_per_m = f64::NAN;
    let err = plateload::validate(&s).unwrap_err();
    let text = err.to_string();
    assert!(text.contains("bearer stiffness EI") && text.contains("deck stiffness EI"), "{text}");
}

#[test]
fn default_stiffness_values() {
    // source: 48.3 × 4.0 tube (EN 39 dimensions), I = π(D⁴ − d⁴)/64 = 13.77 cm⁴; E = 210 GPa
    // (EN 1993-1-1 cl. 3.2.6, from memory) → EI ≈ 28.91 kN·m². 38 mm boards, E = 11 GPa (C24, EN
    // 338, from memory) → 50.30 kN·m² per metre.
    let i_cm4 = plateload::scene::model::TUBE_I_M4 * 1e8;
    assert!((i_cm4 - 13.77).abs() < 0.01, "{i_cm4}");
    assert!((plateload::scene::model::TUBE_EI_KNM2 - 28.91).abs() < 0.01);
    assert!((plateload::scene::model::BOARD_EI_KNM2_PER_M - 50.30).abs() < 0.01);
}

#[test]
fn unknown_joints_are_covered_by_two_span_pieces() {
    // source: Hicks Table 2.1 / AISC Table 3-23 — four equal spans under uniform load, continuous:
    // 0.393, 1.143, 0.929, 1.143, 0.393 wL; two equal spans: 3/8, 10/8, 3/8 wL. With the joints
    // not known, every inner post is also taken as the middle of a two-span piece: 1.25 wL at
    // each of them. L = 2, w = 4 (applied whole) → wL = 8: inner posts 10.0 (not 9.143 / 7.429).
    let mut s = scene();
    for (i, id) in ["P0", "P1", "P2", "P3", "P4"].iter().enumerate() {
        s.posts.push(post(id, 2.0 * i as f64, 0.0));
    }
    let mut b = bearer("B", &["P0", "P1", "P2", "P3", "P4"]);
    b.joints = None;
    s.bearers.push(b);
    let mut line = Load::new("q", Case::Q, LoadKind::BearerLine { bearer: "B".into(), from_m: 0.0, to_m: 8.0, kn_per_m: 4.0 });
    line.arrangement = plateload::scene::loads::Arrangement::Whole;
    s.loads.push(line);
    let a = analyse(&s).unwrap();
    let labels: Vec<&str> = (0..a.method_count()).map(|m| a.method_label(m)).collect();
    assert_eq!(labels, ["simple spans", "continuous", "two-span continuity at each support"]);
    let max: Vec<f64> = (0..5).map(|p| service(&a, p).0).collect();
    assert!(close(&max, &[4.0, 10.0, 10.0, 10.0, 4.0]), "{max:?}");
    for p in 1..4 {
        assert_eq!(a.governing_method_label(p), "two-span continuity at each support");
    }
    // That pass is an envelope support by support: its two-span models balance one by one.
    let eq = &a.equilibrium_by_method[2];
    assert!(eq.iter().all(|e| !e.one_state && e.relative < 1e-12), "{eq:?}");
    assert!(a.worst_residual() < 1e-12);
    // Declared joints (here: continuous throughout) need no guessing: simple spans and continuous only.
    s.bearers[0].joints = Some(Vec::new());
    let a = analyse(&s).unwrap();
    assert_eq!(a.method_count(), 2);
    let max: Vec<f64> = (0..5).map(|p| service(&a, p).0).collect();
    // continuous 1.143 wL = 64/56 · 8 = 9.142857; middle post simple 8.0 > 0.929 · 8.
    assert!(close(&max, &[4.0, 64.0 / 7.0, 8.0, 64.0 / 7.0, 4.0]), "{max:?}");
    // A declared joint over the middle post makes two two-span beams: 3/8, 10/8, 6/8, 10/8, 3/8.
    s.bearers[0].joints = Some(vec!["P2".into()]);
    s.bearers[0].method = Some(BeamMethod::Continuous);
    let a = analyse(&s).unwrap();
    assert!(close(&q(&a), &[3.0, 10.0, 6.0, 10.0, 3.0]), "{:?}", q(&a));
    // A joint at an end post or at a post it does not rest on is refused.
    s.bearers[0].joints = Some(vec!["P0".into(), "X9".into()]);
    let err = analyse(&s).unwrap_err().to_string();
    assert!(err.contains("joint at post P0: a joint must be at an inner post") && err.contains("joint at post X9: it does not rest on that post"), "{err}");
}
