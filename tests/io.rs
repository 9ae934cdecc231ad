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
