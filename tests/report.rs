//! The printable load report: contents, escaping, the `report` command, and the real print in
//! headless Chromium (ignored unless `--include-ignored`; `.ci/run` installs the browser).

use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use plateload::export::palette::{Band, Cue};
use plateload::export::report::{report_html, ReportOptions};
use plateload::{analyse, Analysis, Scene, CAUTION};

fn demos() -> Vec<(&'static str, Scene)> {
    plateload::scene::demo::DEMO_SCENES.iter().map(|(name, text)| (*name, plateload::scene::io::parse_scene(text, name).unwrap())).collect()
}

fn opts(note: &str) -> ReportOptions {
    ReportOptions { revision_note: note.into(), date: "2026-03-14".into(), source: "site.ron".into(), ..Default::default() }
}

fn hex(c: [u8; 3]) -> String {
    format!("#{:02x}{:02x}{:02x}", c[0], c[1], c[2])
}

/// The SVG group of one plate on the plan.
fn plate_group<'h>(html: &'h str, id: &str) -> &'h str {
    let start = html.find(&format!("<g class=\"plate\" data-id=\"{id}\">")).unwrap_or_else(|| panic!("no plate {id} on the plan"));
    let end = html[start..].find("</g>").unwrap() + start;
    &html[start..end]
}

/// Figures of the most utilised plate as the report writes them.
fn worst_figures(a: &Analysis) -> (String, String, String) {
    let p = &a.plates[a.worst_plate().unwrap()];
    let g = p.governing();
    (p.id.clone(), format!("{:.2} kN", g.max_kn), format!("{:.1} %", 100.0 * g.utilisation))
}

#[test]
fn report_of_each_demo_holds_the_key_figures() {
    // common practice, no source: a report must carry the numbers it summarises
    for (name, scene) in demos() {
        let a = analyse(&scene).unwrap();
        let html = report_html(&scene, &a, &opts("Rev A: sole boards checked"));
        assert!(html.starts_with("<!DOCTYPE html>"), "{name}");
        assert!(html.contains(CAUTION), "{name}: no caution");
        assert!(html.contains("Rev A: sole boards checked") && html.contains("2026-03-14") && html.contains("site.ron"), "{name}: title block");
        let (id, kn, pct) = worst_figures(&a);
        let group = plate_group(&html, &id);
        assert!(group.contains(&kn) && group.contains(&pct), "{name}: worst plate {id} label lacks {kn} / {pct}:\n{group}");
        // Every plate on the plan, in its band colour, with the second cue where it applies.
        assert_eq!(html.matches("<g class=\"plate\"").count(), a.plates.len(), "{name}");
        for p in &a.plates {
            let g = plate_group(&html, &p.id);
            let fill = hex(Band::of(p.governing().utilisation).colour());
            assert!(g.contains(&format!("fill=\"{fill}\"")), "{name}: plate {} not in {fill}:\n{g}", p.id);
            let cue = Cue::of(p.status);
            assert_eq!(g.contains("url(#hatch)"), matches!(cue, Cue::Over | Cue::OverAndUplift), "{name}: plate {} over cue", p.id);
            assert_eq!(g.contains("UPLIFT"), matches!(cue, Cue::Uplift | Cue::OverAndUplift), "{name}: plate {} uplift cue", p.id);
            assert_eq!(g.contains("<path"), matches!(cue, Cue::Uplift | Cue::OverAndUplift), "{name}: plate {} uplift marker", p.id);
            // One meaning everywhere, as in the editor: a round ring is uplift, a square frame
            // over capacity.
            assert_eq!(g.contains("<circle"), matches!(cue, Cue::Uplift | Cue::OverAndUplift), "{name}: plate {} uplift ring", p.id);
        }
        assert!(html.contains("over capacity: hatched, square frame") && html.contains("lifts (uplift): round ring, upward marker"), "{name}: legend words");
        assert!(!html.contains("bold ring"), "{name}: a ring means uplift only");
        // The demos' safe working loads are examples: the inputs say so beside the value.
        assert!(html.contains("EXAMPLE VALUE — replace with the manufacturer's"), "{name}: example SWL not marked");
        for b in Band::ALL {
            assert!(html.contains(&b.label()), "{name}: legend lacks {}", b.label());
        }
        // Schedule row per plate with its governing figures.
        for p in &a.plates {
            assert!(html.contains(&format!("<tr><td>{}</td>", p.id)), "{name}: no schedule row for {}", p.id);
        }
        // Equilibrium per case, stability, combinations with their sources.
        for e in &a.equilibrium {
            assert!(html.contains(&format!("{:.1e}", e.relative)), "{name}: residual of case {}", e.case);
        }
        for d in a.stability.structures.iter().flat_map(|s| &s.axes) {
            if let Some(f) = d.factor {
                assert!(html.contains(&format!("{f:.2}")), "{name}: factor {f:.2} tipping {} about {}", d.towards, d.about);
            }
        }
        for c in &a.combinations {
            assert!(html.contains(&c.source), "{name}: source of combination {}", c.name);
        }
        // Self-contained: nothing fetched from elsewhere.
        for bad in ["src=\"http", "href=", "@import", "url(http", "<script", "<link"] {
            assert!(!html.contains(bad), "{name}: report refers outside itself ({bad})");
        }
        assert!(html.contains("@page") && html.contains("size: A4"), "{name}: print rules");
    }
}

#[test]
fn kentledge_and_uplift_of_the_sheeted_face_are_reported() {
    // common practice, no source: the figures come from the engine's stability summary
    let (_, scene) = demos().into_iter().find(|(n, _)| n.starts_with("harbour")).unwrap();
    let a = analyse(&scene).unwrap();
    let html = report_html(&scene, &a, &opts(""));
    let need = a.stability.structures.iter().flat_map(|s| &s.axes).filter_map(|d| d.kentledge.as_ref().and_then(|k| k.needed_kn)).fold(0.0, f64::max);
    assert!(need > 0.0, "the demo needs kentledge");
    assert!(html.contains(&format!("needs {need:.2} kN kentledge over plates")), "kentledge {need:.2} not in the findings");
    assert!(html.contains(&format!("<strong>{need:.2}</strong>")), "kentledge {need:.2} not in the kentledge table");
    for p in a.plates.iter().filter(|p| p.status.uplift) {
        let lift = p.combinations.iter().filter(|c| c.status.uplift).map(|c| c.min_kn).fold(f64::INFINITY, f64::min);
        assert!(plate_group(&html, &p.id).contains(&format!("min {lift:.2} kN")), "plate {} uplift {lift:.2}", p.id);
    }
}

#[test]
fn user_text_is_escaped() {
    // common practice, no source: HTML special characters in user text must not become markup
    let mut scene = demos().remove(1).1;
    scene.site.name = "Yard \"7\" <b>bold</b> & </style><script>x()</script>".into();
    scene.posts[0].id = "<img src=x onerror=y>".into();
    for b in &mut scene.bearers {
        for p in &mut b.posts {
            if p == "A1" {
                *p = scene.posts[0].id.clone();
            }
        }
    }
    for b in &mut scene.braces {
        for n in [&mut b.from, &mut b.to] {
            if n.post == "A1" {
                n.post = scene.posts[0].id.clone();
            }
        }
    }
    scene.combinations[0].source = "table <3> & 'quotes'".into();
    let a = analyse(&scene).unwrap_or_else(|e| panic!("{e}"));
    let html = report_html(&scene, &a, &opts("note </td></tr></table><h1>injected"));
    for raw in ["<b>bold</b>", "<script>", "<img src=x", "</td></tr></table><h1>injected", "table <3>"] {
        assert!(!html.contains(raw), "raw user text {raw:?} in the report");
    }
    assert!(html.contains("&lt;img src=x onerror=y&gt;"));
    assert!(html.contains("Yard &quot;7&quot; &lt;b&gt;bold&lt;/b&gt; &amp;"));
    assert!(html.contains("table &lt;3&gt; &amp; &#39;quotes&#39;"));
    // The style sheet closes exactly once, where it should.
    assert_eq!(html.matches("</style>").count(), 1);
}

#[test]
fn picture_is_embedded_as_a_data_uri() {
    // source: a 1 × 1 PNG and its base64 text, as written by Python's base64 module (RFC 4648)
    const PNG: [u8; 70] = [
        0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0x00, 0x00, 0x0d, 0x49, 0x48, 0x44, 0x52, 0x00, 0x00, 0x00, 0x01, 0x00, 0x00, 0x00, 0x01,
        0x08, 0x06, 0x00, 0x00, 0x00, 0x1f, 0x15, 0xc4, 0x89, 0x00, 0x00, 0x00, 0x0d, 0x49, 0x44, 0x41, 0x54, 0x78, 0xda, 0x63, 0x64, 0x60, 0xf8, 0x5f,
        0x0f, 0x00, 0x02, 0x87, 0x01, 0x80, 0xeb, 0x47, 0xba, 0x92, 0x00, 0x00, 0x00, 0x00, 0x49, 0x45, 0x4e, 0x44, 0xae, 0x42, 0x60, 0x82,
    ];
    const BASE64: &str = "iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==";
    let (_, scene) = demos().remove(0);
    let a = analyse(&scene).unwrap();
    let without = report_html(&scene, &a, &opts(""));
    assert!(!without.contains("data:image/png"));
    let with = report_html(&scene, &a, &ReportOptions { picture_png: Some(PNG.to_vec()), ..opts("") });
    assert!(with.contains(&format!("src=\"data:image/png;base64,{BASE64}\"")));
}

#[test]
fn a_large_scene_still_makes_a_report() {
    // common practice, no source: label fitting must not grow with the square of the plates
    let spec = plateload::scene::layout::LayoutSpec { bays_x: 45, bays_y: 45, lifts: 1, deck_lifts: vec![1], ..Default::default() };
    let scene = plateload::scene::layout::generate("big", 150.0, &spec);
    let a = analyse(&scene).unwrap();
    let (tx, rx) = std::sync::mpsc::channel();
    std::thread::spawn(move || {
        let html = report_html(&scene, &a, &opts(""));
        let _ = tx.send(html.matches("<g class=\"plate\"").count());
    });
    // A generous bound: this guards against a hang, it is not a speed target.
    let plates = rx.recv_timeout(Duration::from_secs(120)).expect("the report of 2116 plates did not finish");
    assert_eq!(plates, 46 * 46);
}

// ---------------------------------------------------------------------------------------------
// The `report` command

fn scratch(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join(format!("report-{name}"));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn plateload_cli() -> Command {
    Command::new(env!("CARGO_BIN_EXE_plateload"))
}

fn demo_file(dir: &Path, prefix: &str) -> PathBuf {
    let (name, text) = plateload::scene::demo::DEMO_SCENES.iter().find(|(n, _)| n.starts_with(prefix)).unwrap();
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path
}

#[test]
fn report_command_writes_the_file() {
    // common practice, no source
    let dir = scratch("cli");
    let scene = demo_file(&dir, "tannery");
    let out = dir.join("tannery.html");
    let run = plateload_cli().arg("report").arg(&scene).arg("-o").arg(&out).args(["--note", "Rev C <draft>", "--date", "2026-05-01"]).output().unwrap();
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    let stderr = String::from_utf8_lossy(&run.stderr);
    assert!(stderr.contains(CAUTION), "the command must show the caution: {stderr}");
    let html = std::fs::read_to_string(&out).unwrap();
    assert!(html.contains("Rev C &lt;draft&gt;") && html.contains("2026-05-01") && html.contains("tannery-loading-bay.ron"));
    let left: Vec<_> = std::fs::read_dir(&dir).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into_owned()).filter(|n| n.contains(".tmp-")).collect();
    assert!(left.is_empty(), "temporary files left: {left:?}");
    // --strict: the tannery has a plate over capacity.
    let strict = plateload_cli().arg("report").arg(&scene).arg("-o").arg(&out).arg("--strict").status().unwrap();
    assert_eq!(strict.code(), Some(3));
    // Without --date the title block has today's date.
    let run = plateload_cli().arg("report").arg(&scene).arg("-o").arg(&out).status().unwrap();
    assert!(run.success());
    assert!(std::fs::read_to_string(&out).unwrap().contains(&plateload::export::report::today_utc()));
}

#[test]
fn report_command_refuses_bad_input_without_touching_the_output() {
    // common practice, no source
    let dir = scratch("cli-bad");
    let scene = demo_file(&dir, "tannery");
    let out = dir.join("out.html");
    std::fs::write(&out, "previous report").unwrap();
    let not_png = dir.join("picture.png");
    std::fs::write(&not_png, "not a picture").unwrap();
    let run = plateload_cli().arg("report").arg(&scene).arg("-o").arg(&out).arg("--picture").arg(&not_png).output().unwrap();
    assert_eq!(run.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&run.stderr).contains("is not a PNG file"));
    let broken = dir.join("broken.ron");
    std::fs::write(&broken, "(format: 1, site: (name: \"x\", allowable_bearing_kpa: NaN), posts: [(id: \"P\", x: 0.0, y: 0.0, base_level: 0.0, top_level: 1.0)])").unwrap();
    let run = plateload_cli().arg("report").arg(&broken).arg("-o").arg(&out).output().unwrap();
    assert_eq!(run.status.code(), Some(1));
    let stderr = String::from_utf8_lossy(&run.stderr);
    assert!(stderr.contains("post P: has no support type") && stderr.contains("allowable bearing"), "{stderr}");
    let syntax = dir.join("syntax.ron");
    std::fs::write(&syntax, "(format: 1,\n  site: (name: \"x\" allowable_bearing_kpa: 1.0))").unwrap();
    let run = plateload_cli().arg("report").arg(&syntax).arg("-o").arg(&out).output().unwrap();
    assert_eq!(run.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&run.stderr).contains("syntax.ron:2:"), "{}", String::from_utf8_lossy(&run.stderr));
    assert_eq!(std::fs::read_to_string(&out).unwrap(), "previous report");
}

// ---------------------------------------------------------------------------------------------
// The real print, in headless Chromium

/// Run a command with a time limit; kill it (by its own pid) if it overruns.
fn run_with_limit(cmd: &mut Command, limit: Duration) -> std::process::Output {
    let mut child = cmd.stdout(Stdio::piped()).stderr(Stdio::piped()).spawn().unwrap_or_else(|e| panic!("cannot start {cmd:?}: {e}"));
    let start = Instant::now();
    loop {
        if child.try_wait().unwrap().is_some() {
            return child.wait_with_output().unwrap();
        }
        if start.elapsed() > limit {
            let _ = child.kill();
            let out = child.wait_with_output().unwrap();
            panic!("{cmd:?} took over {limit:?}; stderr:\n{}", String::from_utf8_lossy(&out.stderr));
        }
        std::thread::sleep(Duration::from_millis(50));
    }
}

fn chromium(profile: &Path, args: &[String]) {
    let mut cmd = Command::new("chromium");
    cmd.args([
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--disable-dev-shm-usage",
        "--hide-scrollbars",
    ]);
    cmd.arg(format!("--user-data-dir={}", profile.display()));
    cmd.args(args);
    let out = run_with_limit(&mut cmd, Duration::from_secs(120));
    assert!(out.status.success(), "chromium failed: {}", String::from_utf8_lossy(&out.stderr));
}

fn tool_text(cmd: &mut Command) -> String {
    let out = run_with_limit(cmd, Duration::from_secs(60));
    assert!(out.status.success(), "{cmd:?}: {}", String::from_utf8_lossy(&out.stderr));
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// Text with every run of white space as one space, so wrapped lines still match.
fn squash(s: &str) -> String {
    s.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// Width and height of a PNG from its IHDR chunk.
// source: PNG specification (ISO/IEC 15948) §11.2.2: IHDR follows the 8-byte signature, width
// and height are big-endian u32 at bytes 16..24
fn png_size(bytes: &[u8]) -> (u32, u32) {
    assert!(bytes.starts_with(b"\x89PNG\r\n\x1a\n") && &bytes[12..16] == b"IHDR", "not a PNG");
    (u32::from_be_bytes(bytes[16..20].try_into().unwrap()), u32::from_be_bytes(bytes[20..24].try_into().unwrap()))
}

#[test]
#[ignore = "needs chromium and poppler-utils (pdftotext, pdfinfo): .ci/run installs them"]
fn report_prints_in_headless_chromium() {
    // common practice, no source: what a browser prints is what the site team files
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("report-chromium");
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let profile = dir.join("profile");
    for prefix in ["tannery", "harbour", "larkfield"] {
        let scene_path = demo_file(&dir, prefix);
        let scene = plateload::scene::io::read_scene(&scene_path).unwrap();
        let a = analyse(&scene).unwrap();
        let html = dir.join(format!("{prefix}.html"));
        let run = plateload_cli().arg("report").arg(&scene_path).arg("-o").arg(&html).args(["--note", "Rev B: issued for the ground check", "--date", "2026-06-30"]).output().unwrap();
        assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
        let url = format!("file://{}", html.display());
        let pdf = dir.join(format!("{prefix}.pdf"));
        chromium(&profile, &["--no-pdf-header-footer".into(), format!("--print-to-pdf={}", pdf.display()), url.clone()]);
        let png = dir.join(format!("{prefix}.png"));
        chromium(&profile, &["--window-size=1100,2600".into(), format!("--screenshot={}", png.display()), url]);

        // The printed text holds the key figures.
        let text = squash(&tool_text(Command::new("pdftotext").arg("-layout").arg(&pdf).arg("-")));
        assert!(text.contains(&squash(CAUTION)), "{prefix}: caution not printed");
        assert!(text.contains(&scene.site.name) && text.contains("Rev B: issued for the ground check") && text.contains("2026-06-30"), "{prefix}: title block");
        let (id, kn, pct) = worst_figures(&a);
        assert!(text.contains(&format!("{id}: {kn}, {pct}")), "{prefix}: worst plate {id} {kn} {pct} not printed");
        for e in &a.equilibrium {
            assert!(text.contains(&format!("{:.1e}", e.relative)), "{prefix}: residual of case {} not printed", e.case);
        }
        for p in &a.plates {
            assert!(text.contains(&p.id), "{prefix}: plate {} not printed", p.id);
        }
        // A4 portrait pages, the schedule on a landscape one, and page numbers in the footer.
        let info = tool_text(Command::new("pdfinfo").args(["-f", "1", "-l", "99"]).arg(&pdf));
        let pages: usize = info.lines().find_map(|l| l.strip_prefix("Pages:")).unwrap().trim().parse().unwrap();
        assert!(pages >= 3, "{prefix}: {pages} pages");
        let sizes: Vec<&str> = info.lines().filter(|l| l.contains(" size:")).collect();
        // source: ISO 216, A4 = 210 × 297 mm = 595.3 × 841.9 pt
        assert!(sizes.iter().any(|l| l.contains("594.96 x 841.92")), "{prefix}: no A4 portrait page: {sizes:?}");
        assert!(sizes.iter().any(|l| l.contains("841.92 x 594.96")), "{prefix}: no A4 landscape page: {sizes:?}");
        assert!(text.contains(&format!("page 1 of {pages}")), "{prefix}: no page numbers");

        let shot = std::fs::read(&png).unwrap();
        assert_eq!(png_size(&shot), (1100, 2600), "{prefix}: screenshot size");
        eprintln!("{prefix}: {} ({pages} pages), {}", pdf.display(), png.display());

        // The screenshot goes back in as the report's picture: it must survive the round trip.
        let with_picture = dir.join(format!("{prefix}-picture.html"));
        let run = plateload_cli().arg("report").arg(&scene_path).arg("-o").arg(&with_picture).arg("--picture").arg(&png).output().unwrap();
        assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
        let pdf2 = dir.join(format!("{prefix}-picture.pdf"));
        chromium(&profile, &["--no-pdf-header-footer".into(), format!("--print-to-pdf={}", pdf2.display()), format!("file://{}", with_picture.display())]);
        let images = tool_text(Command::new("pdfimages").arg("-list").arg(&pdf2));
        assert!(images.lines().skip(2).any(|l| !l.trim().is_empty()), "{prefix}: the picture is not in the PDF:\n{images}");
    }
}
