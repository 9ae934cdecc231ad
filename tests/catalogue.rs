//! The component catalogue: the shipped values against their sources, the loader's errors, user
//! catalogues, and what a scene copies in.

use std::path::{Path, PathBuf};

use plateload::scene::catalogue::{self, Catalogue, Confidence, EntryKind};
use plateload::scene::io::SceneFileError;

use crate::util::*;

/// A fresh directory for one test.
fn dir(name: &str) -> PathBuf {
    let d = Path::new(env!("CARGO_TARGET_TMPDIR")).join(format!("catalogue-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

/// Gravity used to turn a mass per metre into a weight per metre, m/s².
// source: standard acceleration of gravity, 9.80665 m/s² (CGPM 1901); 9.81 is the usual rounding
const G: f64 = 9.81;

#[test]
fn the_shipped_catalogue_reads_and_has_no_problems() {
    // common practice, no source: the file built into the program must be clean
    let c = catalogue::parse_catalogue(catalogue::SHIPPED_TEXT, "assets/catalogue.ron").unwrap_or_else(|e| panic!("{e}"));
    let problems = c.problems("assets/catalogue.ron");
    assert!(problems.is_empty(), "{problems:#?}");
    assert_eq!(&c, catalogue::shipped());
    for id in [catalogue::DEFAULT_JACK] {
        assert!(c.jack(id).is_some(), "{id}");
    }
    assert!(c.sole_plate(catalogue::DEFAULT_SOLE_PLATE).is_some());
    assert!(c.member(catalogue::DEFAULT_MEMBER).is_some());
    assert!(c.deck(catalogue::DEFAULT_DECK).is_some());
    // The file on disk is the one built in.
    let on_disk = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("assets/catalogue.ron")).unwrap();
    assert_eq!(on_disk, catalogue::SHIPPED_TEXT);
}

#[test]
fn every_shipped_value_has_a_source_and_no_safe_working_load_is_unsourced() {
    // common practice, no source: the rule the catalogue is written to
    let c = catalogue::shipped();
    let sources = c
        .jacks
        .iter()
        .map(|e| (&e.id, &e.source))
        .chain(c.sole_plates.iter().map(|e| (&e.id, &e.source)))
        .chain(c.members.iter().map(|e| (&e.id, &e.source)))
        .chain(c.decks.iter().map(|e| (&e.id, &e.source)))
        .chain(c.friction.iter().map(|e| (&e.id, &e.source)));
    for (id, source) in sources {
        assert!(source.len() > 10, "{id} has no real source: {source:?}");
    }
    for j in &c.jacks {
        // Only a manufacturer's or standard's figure may ship unmarked; none is known here, so
        // every shipped jack is an example, says so, and names the extension it holds for.
        assert!(j.example, "{} ships a safe working load without a manufacturer's source", j.id);
        assert_eq!(j.confidence, Confidence::Example, "{}", j.id);
        assert!(j.source.starts_with("example — replace with the manufacturer's"), "{}: {}", j.id, j.source);
        assert!(j.name.contains("example"), "{}: {}", j.id, j.name);
        assert!(j.max_extension_m > 0.0, "{}", j.id);
    }
}

#[test]
fn shipped_values_match_their_named_sources() {
    let c = catalogue::shipped();
    let m = |id: &str| c.member(id).unwrap_or_else(|| panic!("member {id}"));
    // source: EN 39:2001 cl. 7.6.3, 48.3 × 4.0 tube 4.37 kg/m; 48.3 × 3.2 tube 3.56 kg/m
    // (REFERENCES §7, confirmed)
    let t4 = m("tube-steel-48.3x4.0");
    assert!(close(t4.self_weight_kn_per_m, 4.37 * G / 1000.0, 5e-5), "{}", t4.self_weight_kn_per_m);
    assert_eq!(t4.self_weight_kn_per_m, plateload::scene::model::STEEL_TUBE_KN_PER_M, "the model's default is the catalogue's tube");
    let t3 = m("tube-steel-48.3x3.2");
    assert!(close(t3.self_weight_kn_per_m, 3.56 * G / 1000.0, 5e-5), "{}", t3.self_weight_kn_per_m);
    // source: EN 39 48.3 × 4.0 section, I = 13.8 cm⁴ (REFERENCES §13, derived), E = 210 000 N/mm²
    // (EN 1993-1-1 cl. 3.2.6, from memory): EI = 210e6 kPa × 13.8e-8 m⁴ = 28.98 kN·m²
    assert!(close(t4.ei_knm2.unwrap(), 210.0e6 * 13.8e-8, 0.1), "{:?}", t4.ei_knm2);
    assert!(close(t4.ei_knm2.unwrap(), plateload::scene::model::TUBE_EI_KNM2, 0.05));
    // source: 48.3 × 3.2: I = π(48.3⁴ − 41.9⁴)/64 mm⁴ (circular hollow section, by hand) = 11.59 cm⁴
    let i3 = std::f64::consts::PI * (48.3f64.powi(4) - 41.9f64.powi(4)) / 64.0 * 1e-12;
    assert!(close(t3.ei_knm2.unwrap(), 210.0e6 * i3, 0.05), "{:?}", t3.ei_knm2);
    // from memory (REFERENCES §7, M): aluminium tube 48.3 × 4.47, 1.67 kg/m
    let alu = m("tube-alu-48.3x4.47");
    assert!(close(alu.self_weight_kn_per_m, 1.67 * G / 1000.0, 5e-5));
    assert_eq!(alu.confidence, Confidence::FromMemory);
    // source: C24 mean density 420 kg/m³, EN 338 via a secondary (REFERENCES §7, confirmed)
    let c24 = 420.0 * G / 1000.0;
    assert!(close(m("timber-c24-75x225").self_weight_kn_per_m, c24 * 0.075 * 0.225, 5e-5));
    assert!(close(m("timber-c24-100x100").self_weight_kn_per_m, c24 * 0.1 * 0.1, 5e-5));
    // source: 38 mm board, C24: 0.16 kPa dry; 0.20–0.25 kPa wet with end bands (REFERENCES §7)
    let dry = c.deck("boards-38-dry").unwrap();
    assert!(close(dry.self_weight_kpa, c24 * 0.038, 0.005), "{}", dry.self_weight_kpa);
    assert_eq!(dry.self_weight_kpa, 0.16);
    assert!(close(dry.ei_knm2_per_m.unwrap(), plateload::scene::model::BOARD_EI_KNM2_PER_M, 0.05));
    let wet = c.deck("boards-38-wet").unwrap();
    assert!((0.20..=0.25).contains(&wet.self_weight_kpa));
    // common practice (REFERENCES §7, P): steel deck units about 0.20–0.25 kPa
    assert!((0.20..=0.25).contains(&c.deck("steel-deck-units").unwrap().self_weight_kpa));
    // common practice (REFERENCES §5, P): 150 × 150 mm base plate; sole board 225 wide (BS 2482
    // section, confirmed), at least 450 mm long: 0.101 m²
    for j in &c.jacks {
        assert!(close(j.base_plate.area(), 0.0225, 1e-9), "{}", j.id);
    }
    let board = c.sole_plate("board-225x38x450").unwrap();
    assert!(close(board.plate.area(), 0.101, 0.0005), "{}", board.plate.area());
    assert_eq!(board.thickness_m, Some(0.038));
    // source: Pallett et al., Concrete 36(6) 2002, via a Concrete Society note (REFERENCES §11):
    // concrete/concrete 0.4, plain steel/cast concrete 0.1, steel/trowelled 0.5, timber/concrete 0.7
    let mu = |id: &str| c.friction(id).unwrap_or_else(|| panic!("friction {id}")).mu;
    assert_eq!(mu("concrete-on-concrete"), 0.4);
    assert_eq!(mu("steel-on-cast-concrete"), 0.1);
    assert_eq!(mu("steel-on-trowelled-concrete"), 0.5);
    assert_eq!(mu("timber-on-concrete"), 0.7);
    // source: NAVFAC DM 7.02 Table 1, lower bounds of 0.55–0.60, 0.45–0.55, 0.35–0.45, 0.30–0.35
    assert_eq!(mu("concrete-on-gravel"), 0.55);
    assert_eq!(mu("concrete-on-medium-sand"), 0.45);
    assert_eq!(mu("concrete-on-fine-sand"), 0.35);
    assert_eq!(mu("concrete-on-sandy-silt"), 0.3);
    for f in &c.friction {
        assert_eq!(f.confidence, Confidence::Confirmed, "{}", f.id);
    }
}

#[test]
fn a_catalogue_syntax_error_gives_file_line_and_column() {
    // common practice, no source: the same positions as scene files
    let text = "(\n  jacks: [\n    (id: \"j\", base_plate: (width_m: 0.15, length_m: 0.15), swl_kn: 30.0,, max_extension_m: 0.2),\n  ],\n)\n";
    let err = catalogue::parse_catalogue(text, "my/catalogue.ron").unwrap_err();
    assert!(matches!(err, SceneFileError::Syntax { line: 3, .. }), "{err}");
    assert!(err.to_string().starts_with("my/catalogue.ron:3:"), "{err}");
    let typo = "(\n  members: [\n    (id: \"m\", self_weight_kn_per_m: 0.04, ei: 3.0, confidence: Derived, source: \"x\"),\n  ],\n)\n";
    let err = catalogue::parse_catalogue(typo, "c.ron").unwrap_err().to_string();
    assert!(err.starts_with("c.ron:3:") && err.contains("ei"), "{err}");
}

#[test]
fn bad_values_and_duplicate_ids_are_listed_by_entry() {
    // common practice, no source
    let text = r#"(
  jacks: [
    (id: "mine", base_plate: (width_m: 0.15, length_m: 0.0), swl_kn: 25.0, max_extension_m: 0.3, confidence: FromMemory, source: "remembered"),
    (id: "odd", base_plate: (width_m: 0.15, length_m: 0.15), swl_kn: NaN, max_extension_m: -1.0, example: true, confidence: Example, source: "example"),
  ],
  members: [
    (id: "m", self_weight_kn_per_m: -0.1, confidence: Derived, source: "by hand"),
    (id: "m", self_weight_kn_per_m: 0.1, confidence: Derived, source: ""),
  ],
  friction: [ (id: "f", interface: "a on b", mu: 0.0, confidence: Confirmed, source: "a book") ],
)"#;
    let c = catalogue::parse_catalogue(text, "user.ron").unwrap();
    let problems = c.problems("user.ron");
    let text: Vec<String> = problems.iter().map(|p| p.to_string()).collect();
    let has = |kind: EntryKind, id: &str, words: &str| problems.iter().any(|p| p.kind == kind && p.id == id && p.message.contains(words));
    assert!(has(EntryKind::Jack, "mine", "base plate length"), "{text:#?}");
    assert!(has(EntryKind::Jack, "mine", "manufacturer's or standard's source"), "{text:#?}");
    assert!(has(EntryKind::Jack, "odd", "safe working load (kN) is not a number"), "{text:#?}");
    assert!(has(EntryKind::Jack, "odd", "maximum extension"), "{text:#?}");
    assert!(has(EntryKind::Member, "m", "self-weight"), "{text:#?}");
    assert!(has(EntryKind::Member, "m", "more than one member"), "{text:#?}");
    assert!(has(EntryKind::Member, "m", "no source"), "{text:#?}");
    assert!(has(EntryKind::Friction, "f", "more than zero"), "{text:#?}");
    assert!(text.iter().all(|t| t.starts_with("user.ron: ")), "{text:#?}");
}

/// A user catalogue that replaces the shipped example jack, adds a member, and has a bad entry.
const USER: &str = r#"// my supplier's jacks
(
  jacks: [
    (id: "example-jack-30", name: "site jack", base_plate: (width_m: 0.14, length_m: 0.14), swl_kn: 28.0, max_extension_m: 0.3, confidence: Confirmed, source: "supplier's table 4, 300 mm extension"),
  ],
  members: [
    (id: "my-beam", self_weight_kn_per_m: 0.12, ei_knm2: 400.0, confidence: Confirmed, source: "supplier's data sheet"),
    (id: "broken", self_weight_kn_per_m: -1.0, confidence: Confirmed, source: "typo"),
  ],
)
"#;

#[test]
fn user_catalogues_add_and_replace_entries_and_say_so() {
    // common practice, no source: the later file wins for the same id
    let d = dir("user");
    let config = d.join("config").join("catalogue.ron");
    std::fs::create_dir_all(config.parent().unwrap()).unwrap();
    std::fs::write(&config, USER).unwrap();
    let site = d.join("site");
    std::fs::create_dir_all(&site).unwrap();
    std::fs::write(
        site.join("catalogue.ron"),
        r#"(members: [(id: "my-beam", self_weight_kn_per_m: 0.15, confidence: Confirmed, source: "site-specific")])"#,
    )
    .unwrap();
    let scene = site.join("scene.ron");
    let loaded = catalogue::load(Some(&config), Some(&scene));
    assert_eq!(loaded.files, vec![config.clone(), site.join("catalogue.ron")]);
    let jack = loaded.catalogue.jack("example-jack-30").unwrap();
    assert_eq!((jack.swl_kn, jack.example), (28.0, false), "the user's entry wins");
    assert_eq!(loaded.catalogue.member("my-beam").unwrap().self_weight_kn_per_m, 0.15, "the file beside the scene wins over the config one");
    assert!(loaded.catalogue.member("broken").is_none(), "a bad entry is left out");
    assert!(loaded.catalogue.member(catalogue::DEFAULT_MEMBER).is_some(), "shipped entries stay");
    assert!(loaded.notes.iter().any(|n| n.contains("example-jack-30") && n.contains(&config.display().to_string()) && n.contains("replaces")), "{:?}", loaded.notes);
    assert!(loaded.notes.iter().any(|n| n.contains("my-beam") && n.contains("site")), "{:?}", loaded.notes);
    assert!(loaded.problems.iter().any(|p| p.contains("broken") && p.contains("left out")), "{:?}", loaded.problems);

    // A file that does not parse is named with its position and left out whole.
    std::fs::write(site.join("catalogue.ron"), "(members: [(id: \"x\",, )])").unwrap();
    let loaded = catalogue::load(Some(&config), Some(&scene));
    assert_eq!(loaded.files, vec![config.clone()]);
    let bad = format!("{}:1:", site.join("catalogue.ron").display());
    assert!(loaded.problems.iter().any(|p| p.starts_with(&bad)), "{:?}", loaded.problems);
    assert_eq!(loaded.catalogue.member("my-beam").unwrap().self_weight_kn_per_m, 0.12);

    // No user files: the shipped catalogue alone.
    let alone = catalogue::load(Some(&d.join("none.ron")), None);
    assert_eq!(&alone.catalogue, catalogue::shipped());
    assert!(alone.files.is_empty() && alone.notes.is_empty() && alone.problems.is_empty());
}

#[test]
fn choosing_an_entry_copies_its_values_with_id_and_source() {
    // common practice, no source: the scene must stay complete without the catalogue
    let c = catalogue::shipped();
    let jack = c.jack(catalogue::DEFAULT_JACK).unwrap();
    let sole = c.sole_plate(catalogue::DEFAULT_SOLE_PLATE).unwrap();
    let s = catalogue::support_type("J", jack, Some(sole));
    assert_eq!((s.swl_kn, s.base_plate, s.max_extension_m), (jack.swl_kn, jack.base_plate, Some(jack.max_extension_m)));
    assert_eq!(s.catalogue_id.as_deref(), Some(jack.id.as_str()));
    assert_eq!(s.source, jack.source);
    assert!(s.example);
    assert_eq!((s.sole_plate, s.sole_plate_id.as_deref()), (Some(sole.plate), Some(sole.id.as_str())));

    let mut scene = bare_scene();
    scene.posts.push(post("A", 0.0, 0.0, 2.0));
    catalogue::apply_member_to_post(&mut scene.posts[0], c.member("tube-steel-48.3x3.2").unwrap());
    assert_eq!(scene.posts[0].self_weight_kn_per_m, 0.0349);
    assert_eq!(scene.posts[0].section.as_deref(), Some("tube-steel-48.3x3.2"));
    // The copied values survive a save and read without the catalogue.
    scene.support_types[0] = catalogue::support_type("S", jack, None);
    let back = plateload::scene::io::parse_scene(&plateload::scene::io::scene_to_ron(&scene), "t").unwrap();
    assert_eq!(back, scene);
}

#[test]
fn validate_warns_while_a_support_type_holds_example_values() {
    // common practice, no source
    let c = catalogue::shipped();
    let mut scene = bare_scene();
    scene.posts.push(post("A", 0.0, 0.0, 2.0));
    scene.support_types[0] = catalogue::support_type("S", c.jack(catalogue::DEFAULT_JACK).unwrap(), None);
    let warned = |scene: &plateload::Scene| -> Vec<String> {
        plateload::validate(scene).unwrap().warnings.iter().filter(|w| w.message.contains("example values")).map(|w| w.to_string()).collect()
    };
    let w = warned(&scene);
    assert_eq!(w.len(), 1, "{w:?}");
    assert!(w[0].starts_with("support type S: uses example values from catalogue entry example-jack-30"), "{}", w[0]);
    assert!(w[0].contains("replace it with the manufacturer's safe working load for the jack extension used"), "{}", w[0]);
    // A hand-edited file that drops the flag but keeps the example's load still warns.
    scene.support_types[0].example = false;
    assert_eq!(warned(&scene).len(), 1);
    // The planner's own figure, not marked as an example: no warning.
    scene.support_types[0].swl_kn = 27.5;
    scene.support_types[0].source = "supplier's table, 250 mm extension".into();
    assert!(warned(&scene).is_empty());
    // A support type never taken from the catalogue: no warning either.
    assert!(warned(&bare_scene_with_post()).is_empty());
}

fn bare_scene_with_post() -> plateload::Scene {
    let mut s = bare_scene();
    s.posts.push(post("A", 0.0, 0.0, 2.0));
    s
}

#[test]
fn the_layout_generator_starts_from_the_catalogue() {
    // common practice, no source
    let c: &Catalogue = catalogue::shipped();
    let spec = plateload::scene::layout::LayoutSpec::default();
    let scene = plateload::scene::layout::generate("t", 100.0, &spec);
    let s = &scene.support_types[0];
    assert_eq!(s.catalogue_id.as_deref(), Some(catalogue::DEFAULT_JACK));
    assert_eq!(s.swl_kn, c.jack(catalogue::DEFAULT_JACK).unwrap().swl_kn);
    assert!(scene.posts.iter().all(|p| p.section.as_deref() == Some(catalogue::DEFAULT_MEMBER)));
    assert!(scene.decks.iter().all(|d| d.decking.as_deref() == Some(catalogue::DEFAULT_DECK) && d.self_weight_kpa == c.deck(catalogue::DEFAULT_DECK).unwrap().self_weight_kpa));
    let model = plateload::validate(&scene).unwrap();
    assert!(model.warnings.iter().any(|w| w.id == "jack" && w.message.contains("example values")), "{:?}", model.warnings);
}
