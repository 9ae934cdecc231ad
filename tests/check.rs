//! Combinations, utilisation against the entered capacities, schedule and JSON.

use plateload::scene::loads::{Case, LoadKind};
use plateload::scene::model::{AllowableBasis, GranularLayer, LoadSpread, PlateSize};
use plateload::analyse;

use crate::util::*;

#[test]
fn utilisation_is_the_worse_of_jack_and_ground() {
    // source: 2V:1H spread P/((B+z)(L+z)) (Das; Bowles). One post, 20 kN service load on a
    // 150 × 150 plate through 150 mm granular fill → 222.2 kPa; with 100 kPa allowable the
    // ground governs at 222 %; the 30 kN jack is at 67 %.
    let mut s = bare_scene();
    s.site.granular_layer = Some(GranularLayer::new(0.15, LoadSpread::TwoToOne));
    s.site.allowable_basis = AllowableBasis::Net;
    s.posts = vec![post("P", 0.0, 0.0, 2.0)];
    s.loads.push(load("g", Case::G, LoadKind::PostTop { post: "P".into(), kn: 20.0 }));
    let a = analyse(&s).unwrap();
    let p = &a.plates[0];
    let service = &p.combinations[0];
    close("bearing kPa", service.bearing_kpa, 20.0 / 0.09, 1e-9);
    close("jack", service.load_utilisation, 20.0 / 30.0, 1e-12);
    close("ground", service.bearing_utilisation.unwrap(), 20.0 / 0.09 / 100.0, 1e-12);
    assert!(p.status.over && !p.status.uplift);
    assert_eq!(a.combinations[p.governing].name, "service");
    // A 225 × 450 sole board through the same layer: (0.375 × 0.6) m² → 88.9 kPa, OK.
    s.support_types[0].sole_plate = Some(PlateSize { width_m: 0.225, length_m: 0.45 });
    let a = analyse(&s).unwrap();
    close("bearing with sole", a.plates[0].governing().bearing_kpa, 20.0 / (0.375 * 0.6), 1e-9);
    assert!(a.plates[0].status.is_ok());
    // Gross: the layer's own weight is added at formation, γ·z = 19.5 × 0.15 = 2.925 kPa
    // (default unit weight, the top of EN 1991-1-1 Table A.6's 18.5–19.5 kN/m³ for hardcore).
    s.site.allowable_basis = AllowableBasis::Gross;
    let a = analyse(&s).unwrap();
    close("gross", a.plates[0].governing().bearing_kpa, 20.0 / (0.375 * 0.6) + 19.5 * 0.15, 1e-9);
}

#[test]
fn variable_loads_are_taken_only_where_unfavourable() {
    // common practice, no source: a variable load that relieves a support is left off for the
    // maximum and put on for the minimum (EN 1990: γQ = 0 where favourable).
    // Overhang case (AISC Table 3-23 case 25): imposed 10 kN/m on a 1 m overhang of a 4 m span
    // gives −1.25 kN at the far post; with 2 kN permanent there, min = 2 − 1.25 (service),
    // 0.9·2 − 1.5·1.25 = −0.075 in the stability combination (EN 1990 A1.2(A) factors).
    let mut s = bare_scene();
    s.posts = vec![post("L", 0.0, 0.0, 2.0), post("R", 4.0, 0.0, 2.0)];
    let mut b = bearer("B", 2.0, &["L", "R"]);
    b.overhang_end_m = 1.0;
    s.bearers = vec![b];
    s.loads.push(load("g", Case::G, LoadKind::PostTop { post: "L".into(), kn: 2.0 }));
    s.loads.push(load("q", Case::Q, LoadKind::BearerLine { bearer: "B".into(), from_m: 4.0, to_m: 5.0, kn_per_m: 10.0 }));
    let a = analyse(&s).unwrap();
    let l = &a.plates[a.plate_index("L").unwrap()];
    close("service max", l.combinations[0].max_kn, 2.0, 1e-12);
    close("service min", l.combinations[0].min_kn, 0.75, 1e-12);
    close("stability min", l.combinations[2].min_kn, 0.9 * 2.0 - 1.5 * 1.25, 1e-12);
    assert!(l.status.uplift, "stability combination finds uplift");
    assert!(!l.combinations[0].status.uplift);
}

#[test]
fn schedule_totals_equal_the_applied_load() {
    // common practice, no source: ΣR = ΣP per case.
    for (name, scene) in demo_scenes() {
        let a = analyse(&scene).unwrap();
        let csv = plateload::export::schedule::schedule_csv(&a);
        assert!(csv.contains(plateload::CAUTION), "{name}: schedule must carry the caution");
        assert!(csv.is_ascii(), "{name}: schedule must be plain ASCII for spreadsheets");
        let mut rdr = csv::ReaderBuilder::new().has_headers(false).flexible(true).from_reader(csv.as_bytes());
        let rows: Vec<csv::StringRecord> = rdr.records().map(|r| r.unwrap()).collect();
        let head = rows.iter().position(|r| r.get(0) == Some("id")).expect("table header");
        let col = |name: &str| rows[head].iter().position(|h| h == name).unwrap_or_else(|| panic!("no column {name}"));
        let total = rows.iter().find(|r| r.get(0) == Some("TOTAL")).expect("totals row");
        // The plate table runs from its header to the totals row; posts standing on other
        // members follow in a table of their own.
        let end = rows.iter().position(|r| r.get(0) == Some("TOTAL")).expect("totals row");
        let body = &rows[head + 1..end];
        assert_eq!(body.len(), a.plates.len(), "{name}: one row per base plate");
        let on_members = rows.iter().filter(|r| r.get(0).is_some_and(|id| a.lifts.iter().any(|l| l.id == id))).count();
        assert_eq!(on_members, a.lifts.len(), "{name}: one row per post standing on another member");
        assert_eq!(a.plates.len() + a.lifts.len(), scene.posts.len(), "{name}: every post is a plate or stands on a member");
        for (case, column) in [(Case::G, "G (kN)"), (Case::Q, "Q (kN)"), (Case::W, "W (kN)")] {
            let t: f64 = total[col(column)].parse().unwrap();
            let applied = a.equilibrium[case.index()].applied.down();
            close(&format!("{name} total {case}"), t, applied, 2e-3);
        }
        for r in body {
            let status = &r[col("status")];
            assert!(["OK", "OVER", "UPLIFT", "OVER+UPLIFT", "SLIDES", "OVER+SLIDES", "UPLIFT+SLIDES", "OVER+UPLIFT+SLIDES"].contains(&status), "{status}");
        }
    }
}

#[test]
fn json_has_the_documented_shape() {
    // common practice, no source: the documented fields are present for every base.
    let scene = plateload::scene::io::read_scene(&scene_path("larkfield-falsework.ron")).unwrap();
    let a = analyse(&scene).unwrap();
    let v: serde_json::Value = serde_json::from_str(&plateload::export::json::analysis_json(&a)).unwrap();
    assert_eq!(v["plateload_json"], 2);
    assert_eq!(v["caution"], plateload::CAUTION);
    let bases = v["bases"].as_array().unwrap();
    assert_eq!(bases.len(), scene.posts.len());
    for b in bases {
        for key in ["id", "x", "y", "base_level", "support", "swl_kn", "bearing_area_m2", "plate_area_m2", "allowable_kpa", "cases_kn", "shear_kn", "combinations", "utilisation", "bearing_kpa", "governing_combination", "status"] {
            assert!(!b[key].is_null(), "base field {key} missing: {b}");
        }
        for case in ["G", "Q", "W"] {
            assert!(b["cases_kn"][case].is_number());
        }
        for c in b["combinations"].as_array().unwrap() {
            for key in ["name", "max_kn", "min_kn", "utilisation", "status"] {
                assert!(!c[key].is_null(), "combination field {key} missing");
            }
        }
    }
    assert_eq!(v["equilibrium"].as_array().unwrap().len(), 3);
    assert!(v["equilibrium"][0]["relative"].as_f64().unwrap() <= 1e-9);
    assert!(v["stability"]["centre_of_gravity"].is_array());
    assert!(v["stability"]["structures"].is_array());
    assert!(v["findings"].as_array().is_some_and(|f| !f.is_empty()));
    assert!(v["ground"]["basis"].is_string());
    assert!(v["sliding"]["checks"].is_array());
}

#[test]
fn schedule_fields_with_commas_quotes_and_line_breaks_read_back_whole() {
    // source: RFC 4180 (fields with commas, quotes or line breaks are quoted, quotes doubled,
    // records end in CRLF); read back with the csv crate's reader
    let mut scene = plateload::scene::io::read_scene(&scene_path("tannery-loading-bay.ron")).unwrap();
    scene.site.name = "Pier 4, \"north\" side\nphase 2".into();
    let odd = "jack, 40 \"kN\"";
    scene.posts.iter_mut().for_each(|p| p.support = Some(odd.into()));
    scene.support_types[0].id = odd.into();
    let a = analyse(&scene).unwrap();
    let text = plateload::export::schedule::schedule_csv(&a);
    assert!(text.contains("\"Pier 4, \"\"north\"\" side\nphase 2\""), "{text}");
    let bare_lf = text.match_indices('\n').filter(|(i, _)| *i == 0 || text.as_bytes()[i - 1] != b'\r').count();
    assert_eq!(bare_lf, 1, "only the line break inside the quoted name is a bare LF");
    let mut rdr = csv::ReaderBuilder::new().has_headers(false).flexible(true).from_reader(text.as_bytes());
    let rows: Vec<csv::StringRecord> = rdr.records().map(|r| r.unwrap()).collect();
    assert_eq!(&rows[0][1], scene.site.name);
    let head = rows.iter().position(|r| r.get(0) == Some("id")).unwrap();
    assert!(rows[head + 1..].iter().filter(|r| r.get(0) != Some("TOTAL")).all(|r| &r[4] == odd));
}
