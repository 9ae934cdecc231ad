//! The command line, run as a new user would.

use std::process::{Command, Output};

use crate::util::scene_path;

fn plateload(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_plateload")).args(args).output().expect("the binary runs")
}

fn text(o: &Output) -> (String, String) {
    (String::from_utf8_lossy(&o.stdout).into_owned(), String::from_utf8_lossy(&o.stderr).into_owned())
}

fn scene(name: &str) -> String {
    scene_path(name).display().to_string()
}

fn temp(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("plateload-cli-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

#[test]
fn validate_solve_schedule_trace_on_every_demo() {
    // common practice, no source: every command succeeds on the shipped demos
    for name in ["larkfield-falsework.ron", "tannery-loading-bay.ron", "harbour-sheeted-face.ron"] {
        let file = scene(name);
        let o = plateload(&["validate", &file]);
        let (out, err) = text(&o);
        assert!(o.status.success(), "{name}: {err}");
        assert!(out.contains("valid"), "{out}");

        let o = plateload(&["solve", &file]);
        let (out, err) = text(&o);
        assert!(o.status.success(), "{name}: {err}");
        assert!(out.contains(plateload::CAUTION), "solve output must carry the caution");
        assert!(out.contains("equilibrium") && out.contains("relative") && out.contains("worst base"), "{out}");

        let o = plateload(&["solve", "--json", &file]);
        assert!(o.status.success());
        let v: serde_json::Value = serde_json::from_slice(&o.stdout).expect("valid JSON");
        assert!(v["bases"].as_array().is_some_and(|b| !b.is_empty()));

        let csv = temp(&format!("{name}.csv"));
        let o = plateload(&["schedule", &file, "-o", csv.to_str().unwrap()]);
        let (_, err) = text(&o);
        assert!(o.status.success(), "{err}");
        assert!(err.contains(plateload::CAUTION));
        assert!(std::fs::read_to_string(&csv).unwrap().contains("TOTAL"));

        let o = plateload(&["trace", &file, "A1"]);
        let (out, err) = text(&o);
        assert!(o.status.success(), "{err}");
        assert!(out.contains("Base A1") && out.contains("total G") && out.contains(plateload::CAUTION), "{out}");
    }
}

#[test]
fn strict_check_fails_when_a_plate_is_over() {
    // common practice, no source: exit codes 0 ok, 1 invalid input, 3 strict check failed
    let o = plateload(&["solve", "--strict", &scene("larkfield-falsework.ron")]);
    assert_eq!(o.status.code(), Some(3), "{:?}", text(&o));
    assert!(text(&o).1.contains("strict check failed"));
    let o = plateload(&["solve", &scene("larkfield-falsework.ron")]);
    assert_eq!(o.status.code(), Some(0));
}

#[test]
fn bad_input_gives_a_clear_message_and_exit_code_1() {
    // common practice, no source
    let bad = temp("syntax.ron");
    std::fs::write(&bad, "(\n  site: (name: \"x\" allowable_bearing_kpa: 1.0),\n)\n").unwrap();
    let o = plateload(&["solve", bad.to_str().unwrap()]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(1));
    assert!(err.contains(&format!("{}:2:", bad.display())), "{err}");

    let invalid = temp("invalid.ron");
    std::fs::write(&invalid, "(site: (name: \"x\", allowable_bearing_kpa: -5.0), posts: [(id: \"P\", x: 0.0, y: 0.0, base_level: 0.0, top_level: 1.0)])").unwrap();
    let o = plateload(&["validate", invalid.to_str().unwrap()]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(1));
    assert!(err.contains("allowable bearing pressure") && err.contains("post P: has no support type"), "{err}");

    let o = plateload(&["trace", &scene("larkfield-falsework.ron"), "Z99"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(text(&o).1.contains("no base plate \"Z99\""));
}

#[test]
fn demos_can_be_listed_and_printed() {
    // common practice, no source
    let o = plateload(&["demo"]);
    let (out, _) = text(&o);
    assert!(out.lines().count() >= 3 && out.contains("larkfield-falsework"));
    let o = plateload(&["demo", "tannery-loading-bay"]);
    let s = plateload::scene::io::parse_scene(&String::from_utf8(o.stdout).unwrap(), "stdout").unwrap();
    assert!(!s.posts.is_empty());
}

#[test]
fn every_command_has_help() {
    // common practice, no source
    for cmd in ["validate", "solve", "schedule", "trace", "demo", "edit"] {
        let o = plateload(&[cmd, "--help"]);
        assert!(o.status.success(), "{cmd} --help");
        assert!(!o.stdout.is_empty());
    }
}

#[test]
fn catalogue_lists_every_entry_with_its_source_and_the_users_additions() {
    // common practice, no source
    let dir = temp("catalogue-site");
    std::fs::create_dir_all(&dir).unwrap();
    let config = temp("catalogue-config");
    std::fs::create_dir_all(&config).unwrap();
    let run = |args: &[&str]| Command::new(env!("CARGO_BIN_EXE_plateload")).args(args).env("XDG_CONFIG_HOME", &config).output().unwrap();
    let o = run(&["catalogue"]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(out.contains("example-jack-30") && out.contains("SWL 30 kN up to 0.25 m extension") && out.contains("EXAMPLE — replace with the manufacturer's value"), "{out}");
    assert!(out.contains("tube-steel-48.3x4.0") && out.contains("EN 39:2001") && out.contains("timber-on-concrete"), "{out}");
    assert!(out.contains(&config.join("plateload").join("catalogue.ron").display().to_string()), "says where the user's file goes: {out}");

    let scene_file = dir.join("site.ron");
    std::fs::write(&scene_file, "(site: (name: \"s\", allowable_bearing_kpa: 100.0))").unwrap();
    std::fs::write(dir.join("catalogue.ron"), "(decks: [(id: \"boards-38-dry\", self_weight_kpa: 0.18, confidence: Confirmed, source: \"weighed on site\")])").unwrap();
    let o = run(&["catalogue", scene_file.to_str().unwrap()]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(out.contains("0.18 kPa") && out.contains("weighed on site") && out.contains("note: deck boards-38-dry from") && out.contains("replaces"), "{out}");

    std::fs::write(dir.join("catalogue.ron"), "(decks: [(id: \"d\",, )])").unwrap();
    let o = run(&["catalogue", scene_file.to_str().unwrap()]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(1));
    assert!(err.contains(&format!("{}:1:", dir.join("catalogue.ron").display())), "{err}");
}

#[test]
fn rewrite_turns_an_old_file_into_one_line_per_element() {
    // common practice, no source
    let old = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/old-format/tannery-loading-bay.ron");
    let out = temp("tannery-rewritten.ron");
    let o = plateload(&["rewrite", old.to_str().unwrap(), "-o", out.to_str().unwrap()]);
    let (_, err) = text(&o);
    assert!(o.status.success(), "{err}");
    let written = std::fs::read_to_string(&out).unwrap();
    assert!(written.starts_with("// Tannery Yard loading bay"), "header kept");
    // (18 braces and the horizontal-load settings block since the bracing was redrawn)
    assert!(written.lines().count() < 105, "{written}");
    let a = plateload::scene::io::read_scene(&old).unwrap();
    assert_eq!(plateload::scene::io::parse_scene(&written, "w").unwrap(), a);

    // A comment further down would be lost: refused, with its line.
    let commented = temp("commented.ron");
    std::fs::write(&commented, "// top\n(\n  site: (name: \"s\", allowable_bearing_kpa: 100.0), // ground from the 2019 survey\n)\n").unwrap();
    let o = plateload(&["rewrite", commented.to_str().unwrap(), "-o", commented.to_str().unwrap()]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(1));
    assert!(err.contains("line(s) 3") && err.contains("--drop-comments"), "{err}");
    assert!(std::fs::read_to_string(&commented).unwrap().contains("2019 survey"), "the file is left alone");
    let o = plateload(&["rewrite", commented.to_str().unwrap(), "--drop-comments"]);
    assert!(o.status.success());
    assert!(text(&o).0.starts_with("// top\n(\n"));
}

/// A scene with no permanent and no horizontal load: weightless members, one imposed load.
fn imposed_only() -> std::path::PathBuf {
    use crate::util::*;
    let mut s = bare_scene();
    for (id, x, y) in [("A1", 0.0, 0.0), ("B1", 2.0, 0.0), ("A2", 0.0, 1.5), ("B2", 2.0, 1.5)] {
        s.posts.push(post(id, x, y, 2.0));
    }
    s.bearers.push(bearer("L1", 2.0, &["A1", "B1"]));
    s.bearers.push(bearer("L2", 2.0, &["A2", "B2"]));
    s.decks.push(deck("D", 2.0, (0.0, 2.0), (0.0, 1.5), &["L1", "L2"]));
    s.loads.push(plateload::Load::new("q", plateload::Case::Q, plateload::LoadKind::DeckArea { deck: "D".into(), intensity: plateload::Intensity::Kpa(1.5) }));
    let path = temp("imposed-only.ron");
    plateload::scene::io::save_scene(&path, &s).unwrap();
    path
}

#[test]
fn no_output_shows_a_negative_zero() {
    // common practice, no source: "-0.000 kN" reads as an uplift that is not there
    let mut files: Vec<std::path::PathBuf> = ["larkfield-falsework.ron", "tannery-loading-bay.ron", "harbour-sheeted-face.ron"].iter().map(|n| scene_path(n)).collect();
    files.push(imposed_only());
    for file in &files {
        let f = file.to_str().unwrap();
        let scene = plateload::scene::io::read_scene(file).unwrap();
        let mut outputs: Vec<(String, String)> = Vec::new();
        for args in [vec!["validate", f], vec!["solve", f], vec!["solve", "--json", f], vec!["schedule", f]] {
            let o = plateload(&args);
            assert!(o.status.success(), "{args:?}: {}", text(&o).1);
            outputs.push((args.join(" "), text(&o).0));
        }
        for p in &scene.posts {
            let o = plateload(&["trace", f, &p.id]);
            assert!(o.status.success());
            outputs.push((format!("trace {}", p.id), text(&o).0));
        }
        let html = temp(&format!("{}.html", file.file_stem().unwrap().to_string_lossy()));
        let o = plateload(&["report", f, "-o", html.to_str().unwrap(), "--date", "2026-01-01"]);
        assert!(o.status.success(), "{}", text(&o).1);
        outputs.push(("report".into(), std::fs::read_to_string(&html).unwrap()));
        for (what, out) in &outputs {
            if let Some(at) = plateload::format::find_negative_zero(out) {
                let line = out[..at].lines().count().max(1);
                panic!("{}: `{what}` prints a negative zero on line {line}: {}", file.display(), out.lines().nth(line - 1).unwrap_or(""));
            }
        }
        if file.ends_with("imposed-only.ron") {
            let solve = &outputs[1].1;
            assert!(solve.contains("G [simple spans]: applied      0.000 kN down") || solve.contains("G: applied      0.000 kN down"), "{solve}");
            assert!(solve.contains("stability: permanent load 0.000 kN"), "{solve}");
        }
    }
}
