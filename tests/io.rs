//! Scene files: errors with positions, round trips, atomic saves.

use plateload::scene::io::{parse_scene, read_scene, save_scene, scene_to_ron, write_atomic_with, SceneFileError};

use crate::util::*;

#[test]
fn syntax_error_reports_file_line_and_column() {
    // common practice, no source: compiler-style file:line:col positions
    let text = "(\n  site: (\n    name: \"x\",\n    allowable_bearing_kpa: 100.0,,\n  ),\n)\n";
    let err = parse_scene(text, "bad.ron").unwrap_err();
    match &err {
        SceneFileError::Syntax { line, col, .. } => {
            assert_eq!(*line, 4, "{err}");
            assert!(*col > 1, "{err}");
        }
        other => panic!("{other}"),
    }
    assert!(err.to_string().starts_with("bad.ron:4:"), "{err}");
}

#[test]
fn misspelt_field_is_refused_with_its_position() {
    // common practice, no source
    let text = "(\n  site: (name: \"x\", allowable_bearing_kpa: 100.0),\n  postz: [],\n)\n";
    let err = parse_scene(text, "typo.ron").unwrap_err().to_string();
    assert!(err.starts_with("typo.ron:3:"), "{err}");
    assert!(err.contains("postz"), "{err}");
}

#[test]
fn missing_file_names_the_path() {
    // common practice, no source
    let err = read_scene(std::path::Path::new("/no/such/scene.ron")).unwrap_err().to_string();
    assert!(err.contains("/no/such/scene.ron"), "{err}");
}

#[test]
fn scenes_round_trip_through_ron() {
    // common practice, no source: writing then reading gives the same scene
    for (name, scene) in demo_scenes() {
        let text = scene_to_ron(&scene);
        let back = parse_scene(&text, &name).unwrap();
        assert_eq!(back, scene, "{name}");
    }
}

#[test]
fn minimal_scene_uses_documented_defaults() {
    // common practice, no source: omitted sections take their defaults
    let s = parse_scene("(site: (name: \"m\", allowable_bearing_kpa: 80.0))", "m").unwrap();
    assert_eq!(s.combinations, plateload::Combination::defaults());
    assert_eq!(s.stability.target_factor, plateload::scene::model::DEFAULT_TARGET_OVERTURNING_FACTOR);
    assert!(s.posts.is_empty());
}

#[test]
fn a_save_that_dies_before_the_rename_leaves_the_old_file_whole() {
    // common practice, no source: write a temporary file, then rename over the original
    let dir = std::env::temp_dir().join(format!("plateload-io-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("site.ron");
    let (_, original) = demo_scenes().remove(0);
    save_scene(&path, &original).unwrap();
    let before = std::fs::read(&path).unwrap();
    let mut changed = original.clone();
    changed.site.name = "changed".into();
    let crash = write_atomic_with(&path, scene_to_ron(&changed).as_bytes(), |_| Err(std::io::Error::other("simulated crash")));
    assert!(crash.is_err());
    assert_eq!(std::fs::read(&path).unwrap(), before, "original must be intact");
    let leftovers: Vec<_> = std::fs::read_dir(&dir).unwrap().filter_map(|e| e.ok()).filter(|e| e.file_name() != "site.ron").collect();
    assert!(leftovers.is_empty(), "temporary files left behind: {leftovers:?}");
    save_scene(&path, &changed).unwrap();
    assert_eq!(read_scene(&path).unwrap().site.name, "changed");
    std::fs::remove_dir_all(&dir).unwrap();
}

// ---------------------------------------------------------------------------------------------
// The written form: one element per line, every value written.

/// The field names a type declares, as serde's derive lists them for reading (so a field that
/// the writer leaves out is still found).
fn declared_fields<'de, T: serde::Deserialize<'de>>() -> &'static [&'static str] {
    struct Spy(Option<&'static [&'static str]>);
    #[derive(Debug)]
    struct Stop;
    impl std::fmt::Display for Stop {
        fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
            f.write_str("stop")
        }
    }
    impl std::error::Error for Stop {}
    impl serde::de::Error for Stop {
        fn custom<M: std::fmt::Display>(_: M) -> Self {
            Stop
        }
    }
    impl<'de> serde::Deserializer<'de> for &mut Spy {
        type Error = Stop;
        fn deserialize_any<V: serde::de::Visitor<'de>>(self, _: V) -> Result<V::Value, Stop> {
            Err(Stop)
        }
        fn deserialize_struct<V: serde::de::Visitor<'de>>(self, _: &'static str, fields: &'static [&'static str], _: V) -> Result<V::Value, Stop> {
            self.0 = Some(fields);
            Err(Stop)
        }
        serde::forward_to_deserialize_any! {
            bool i8 i16 i32 i64 i128 u8 u16 u32 u64 u128 f32 f64 char str string bytes byte_buf option unit
            unit_struct newtype_struct seq tuple tuple_struct map enum identifier ignored_any
        }
    }
    let mut spy = Spy(None);
    let _ = T::deserialize(&mut spy);
    spy.0.expect("a struct")
}

/// Fields that may be left out of a written file: informative only, never an engineering value.
const INFORMATIVE: [&str; 2] = ["section", "decking"];

fn lines_of<'a>(text: &'a str, list: &str) -> Vec<&'a str> {
    let start = text.find(&format!("\n  {list}: [\n")).unwrap_or_else(|| panic!("no {list} list"));
    text[start..].lines().skip(2).take_while(|l| *l != "  ],").collect()
}

#[test]
fn demo_files_are_in_the_written_form_with_their_header_comments() {
    // common practice, no source: a file a person can read and diff is one the program writes
    // the same way every time
    for (name, text) in plateload::scene::demo::DEMO_SCENES {
        let again = plateload::scene::io::rewrite_scene(text, name).unwrap();
        assert_eq!(again, text, "{name} is not in the form the program writes; run `plateload rewrite scenes/{name} -o scenes/{name}`");
        assert!(text.starts_with("// ") && text.contains("an invented demo site"), "{name} keeps its header");
        assert!(plateload::scene::io::comments_after_header(text).is_empty(), "{name}");
    }
}

#[test]
fn every_element_is_one_line_with_every_field_written() {
    // common practice, no source
    use plateload::scene::model::*;
    assert_eq!(declared_fields::<Brace>(), ["id", "from", "to"], "the field spy works");
    assert!(declared_fields::<Post>().contains(&"section") && declared_fields::<Scene>().contains(&"analysis"));
    for (name, scene) in demo_scenes() {
        let text = scene_to_ron(&scene);
        let check = |list: &str, fields: &[&str], count: usize| {
            let lines = lines_of(&text, list);
            assert_eq!(lines.len(), count, "{name}: one line per {list} element");
            for line in lines {
                assert!(line.starts_with("    (") && line.ends_with("),"), "{name}: {line}");
                for f in fields.iter().filter(|f| !INFORMATIVE.contains(f)) {
                    assert!(line.contains(&format!("{f}: ")), "{name}: field {f} is not written in {line}");
                }
            }
        };
        check("support_types", declared_fields::<SupportType>(), scene.support_types.len());
        check("posts", declared_fields::<Post>(), scene.posts.len());
        check("bearers", declared_fields::<Bearer>(), scene.bearers.len());
        check("decks", declared_fields::<Deck>(), scene.decks.len());
        check("braces", declared_fields::<Brace>(), scene.braces.len());
        check("loads", declared_fields::<plateload::Load>(), scene.loads.len());
        check("combinations", declared_fields::<plateload::Combination>(), scene.combinations.len());
        for f in declared_fields::<Scene>() {
            assert!(text.contains(&format!("\n  {f}: ")), "{name}: top-level field {f} is not written");
        }
        for f in declared_fields::<AnalysisSettings>().iter().chain(declared_fields::<Site>()) {
            assert!(text.contains(&format!("\n    {f}: ")), "{name}: field {f} is not written");
        }
    }
}

/// The results of an analysis that a planner sees: JSON (without the warnings) and schedule.
fn numbers(scene: &plateload::Scene) -> (serde_json::Value, String) {
    let a = plateload::analyse(scene).unwrap();
    let mut json: serde_json::Value = serde_json::from_str(&plateload::export::json::analysis_json(&a)).unwrap();
    json.as_object_mut().unwrap().remove("warnings");
    (json, plateload::export::schedule::schedule_csv(&a))
}

#[test]
fn demos_round_trip_through_the_writer_with_identical_results() {
    // common practice, no source
    for (name, scene) in demo_scenes() {
        let back = parse_scene(&scene_to_ron(&scene), &name).unwrap();
        assert_eq!(back, scene, "{name}");
        let (a, b) = (plateload::analyse(&scene).unwrap(), plateload::analyse(&back).unwrap());
        assert_eq!(a.plates, b.plates, "{name}");
        assert_eq!(plateload::export::json::analysis_json(&a), plateload::export::json::analysis_json(&b), "{name}");
        assert_eq!(plateload::export::schedule::schedule_csv(&a), plateload::export::schedule::schedule_csv(&b), "{name}");
    }
}

/// The scene without what a catalogue adds (ids, sources, example marks): the engineering
/// values only.
fn without_catalogue_marks(mut s: plateload::Scene) -> plateload::Scene {
    for t in &mut s.support_types {
        (t.catalogue_id, t.source, t.example, t.max_extension_m, t.sole_plate_id) = (None, String::new(), false, None, None);
    }
    s.posts.iter_mut().for_each(|p| p.section = None);
    s.bearers.iter_mut().for_each(|b| b.section = None);
    s.decks.iter_mut().for_each(|d| d.decking = None);
    s
}

#[test]
fn old_format_files_still_open_and_give_the_same_numbers_as_their_rewritten_selves() {
    // common practice, no source: the copies in tests/old-format/ are the demos as they were
    // written before (one field per line, defaults left out, no catalogue fields)
    let old_dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/old-format");
    let mut n = 0;
    for (name, new) in demo_scenes() {
        let old_text = std::fs::read_to_string(old_dir.join(&name)).unwrap_or_else(|e| panic!("{name}: {e}"));
        assert!(!old_text.contains("analysis") && old_text.lines().count() > 3 * scene_to_ron(&new).lines().count(), "{name} is an old-format copy");
        let old = parse_scene(&old_text, &name).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(without_catalogue_marks(new.clone()), old, "{name}: rewriting changed an engineering value");
        assert_eq!(numbers(&old), numbers(&new), "{name}");
        // The only new findings are the notes on example safe working loads.
        let warnings = |s: &plateload::Scene| -> Vec<String> { plateload::analyse(s).unwrap().warnings.iter().map(|w| w.to_string()).collect() };
        let (wo, wn) = (warnings(&old), warnings(&new));
        let extra: Vec<&String> = wn.iter().filter(|w| !wo.contains(w)).collect();
        assert!(wo.iter().all(|w| wn.contains(w)), "{name}: {wo:?} vs {wn:?}");
        assert!(!extra.is_empty() && extra.iter().all(|w| w.contains("uses example values")), "{name}: {extra:?}");
        // And an old file written again keeps every value.
        assert_eq!(parse_scene(&scene_to_ron(&old), &name).unwrap(), old, "{name}");
        n += 1;
    }
    assert_eq!(n, 3);
}

#[test]
fn the_twenty_post_demo_is_short() {
    // common practice, no source: one line per element (it was 704 lines written field by field)
    let text = plateload::scene::demo::DEMO_SCENES[0].1;
    let scene = parse_scene(text, "demo").unwrap();
    assert_eq!(scene.posts.len(), 20);
    let elements = scene.support_types.len() + scene.posts.len() + scene.bearers.len() + scene.decks.len() + scene.braces.len() + scene.loads.len() + scene.combinations.len();
    // Beyond one line per element: the header comment, the site, the stability, horizontal-load
    // and analysis settings (one line per field) and the brackets.
    assert!(text.lines().count() < elements + 50, "{} lines for {elements} elements", text.lines().count());
}

#[test]
fn awkward_strings_stay_on_their_line_and_read_back() {
    // common practice, no source
    let mut s = bare_scene();
    s.site.name = "Bridge \"B\" — owner's site, path C:\\jobs\\12, 50 % done #\"# ok".into();
    s.support_types[0].source = "it's the supplier's \"table 3\"".into();
    s.posts.push(post("A'1", 0.0, 0.0, 2.0));
    let text = scene_to_ron(&s);
    assert_eq!(parse_scene(&text, "t").unwrap(), s, "{text}");
    assert!(text.contains("owner's") && !text.contains("\\'"), "apostrophes are written as typed: {text}");
    assert_eq!(lines_of(&text, "support_types").len(), 1);
}

#[test]
fn rewriting_keeps_the_header_and_names_comments_it_would_drop() {
    // common practice, no source
    let text = "// my site\n//   second line\n\n(\n  site: (name: \"x // not a comment\", allowable_bearing_kpa: 100.0), // a note\n  /* old */ posts: [],\n)\n";
    assert_eq!(plateload::scene::io::header_comments(text), "// my site\n//   second line\n\n");
    assert_eq!(plateload::scene::io::comments_after_header(text), vec![5, 6]);
    let out = plateload::scene::io::rewrite_scene(text, "t").unwrap();
    assert!(out.starts_with("// my site\n//   second line\n\n(\n  format: 1,\n"), "{out}");
    assert_eq!(parse_scene(&out, "t").unwrap(), parse_scene(text, "t").unwrap());
    assert!(plateload::scene::io::rewrite_scene("(site: (name: \"x\",,))", "bad.ron").unwrap_err().to_string().starts_with("bad.ron:1:"));
}
