//! The pictures, looked at pixel by pixel: every base plate shows the colour of its utilisation
//! band where the camera puts it, and a plate over capacity (or lifting) shows its second cue.
//!
//! Runs the `snapshot` command (it needs a display: Xvfb with Mesa's software Vulkan will do, as
//! in `.ci/run`), reads the camera it used, projects each plate with the engine's camera maths
//! and reads the PNG there.
use std::path::{Path, PathBuf};
use std::process::Command;

use plateload::export::palette::Band;
use plateload::edit::pick::{ViewCamera, CUE_BAND_M, CUE_EDGE_M, CUE_GAP_M, V3};
use plateload::{analyse, Scene};

struct Picture {
    w: usize,
    h: usize,
    rgb: Vec<u8>,
}

impl Picture {
    fn read(path: &Path) -> Picture {
        let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(path).expect("the picture was written")));
        let mut reader = decoder.read_info().expect("a PNG");
        let mut buf = vec![0; reader.output_buffer_size().expect("size")];
        let info = reader.next_frame(&mut buf).expect("PNG data");
        assert_eq!(info.color_type, png::ColorType::Rgb, "written as 8-bit RGB");
        buf.truncate(info.buffer_size());
        Picture { w: info.width as usize, h: info.height as usize, rgb: buf }
    }
    fn at(&self, x: i64, y: i64) -> [u8; 3] {
        let (x, y) = (x.clamp(0, self.w as i64 - 1) as usize, y.clamp(0, self.h as i64 - 1) as usize);
        let i = 3 * (y * self.w + x);
        [self.rgb[i], self.rgb[i + 1], self.rgb[i + 2]]
    }
    /// Median of each channel over the 3 × 3 pixels around a point (ignores one odd pixel at
    /// an antialiased edge).
    fn median(&self, p: [f64; 2]) -> [u8; 3] {
        let (cx, cy) = (p[0].floor() as i64, p[1].floor() as i64);
        let mut px: Vec<[u8; 3]> = Vec::new();
        for dy in -1..=1 {
            for dx in -1..=1 {
                px.push(self.at(cx + dx, cy + dy));
            }
        }
        [0, 1, 2].map(|k| {
            let mut v: Vec<u8> = px.iter().map(|c| c[k]).collect();
            v.sort();
            v[4]
        })
    }
}

struct Shot {
    picture: Picture,
    camera: ViewCamera,
    viewport: [f64; 4],
    /// Label boxes drawn over the view, [min x, min y, max x, max y] in pixels.
    labels: Vec<[f64; 4]>,
}

impl Shot {
    /// Pixel of a scene point.
    fn pixel(&self, p: V3) -> [f64; 2] {
        let q = self.camera.project(p, [self.viewport[2], self.viewport[3]]).expect("in front of the camera");
        [self.viewport[0] + q[0], self.viewport[1] + q[1]]
    }
    /// Whether a label box (its border included) lies over this pixel.
    fn under_label(&self, p: [f64; 2]) -> bool {
        self.labels.iter().any(|b| p[0] >= b[0] - 2.0 && p[0] <= b[2] + 2.0 && p[1] >= b[1] - 2.0 && p[1] <= b[3] + 2.0)
    }
}

/// The display tests take turns: a window opening or closing on the shared display is an event
/// for every other window on it (the idle editor rightly draws for it), and the pictures should
/// not depend on what else is on the screen.
fn display_to_myself() -> std::sync::MutexGuard<'static, ()> {
    static DISPLAY: std::sync::Mutex<()> = std::sync::Mutex::new(());
    DISPLAY.lock().unwrap_or_else(|e| e.into_inner())
}

fn out_dir() -> PathBuf {
    let d = std::env::temp_dir().join(format!("plateload-render-{}", std::process::id()));
    std::fs::create_dir_all(&d).expect("temp dir");
    d
}

fn snapshot(scene: &str, view: &str) -> Shot {
    snapshot_with(scene, view, &[])
}

fn snapshot_with(scene: &str, view: &str, extra: &[&str]) -> Shot {
    let dir = out_dir();
    let tag = extra.join("").replace('-', "");
    let png = dir.join(format!("{scene}-{view}{tag}.png"));
    let cam = dir.join(format!("{scene}-{view}{tag}.json"));
    let file = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes").join(format!("{scene}.ron"));
    let out = Command::new(env!("CARGO_BIN_EXE_plateload"))
        .args(["snapshot", &file.display().to_string(), "-o", &png.display().to_string(), "--size", "1400x900", "--view", view, "--camera-json", &cam.display().to_string()])
        .args(extra)
        .output()
        .expect("the plateload binary runs");
    assert!(out.status.success(), "snapshot failed: {}", String::from_utf8_lossy(&out.stderr));
    let json: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&cam).expect("camera written")).expect("camera JSON");
    let v3 = |k: &str| -> V3 {
        let a = json[k].as_array().expect("array");
        [0, 1, 2].map(|i| a[i].as_f64().expect("number"))
    };
    let f = |k: &str| json[k].as_f64().expect("number");
    let camera = ViewCamera {
        target: v3("target"),
        yaw_deg: f("yaw_deg"),
        pitch_deg: f("pitch_deg"),
        distance: f("distance"),
        fov_y_deg: f("fov_y_deg"),
        orthographic: json["orthographic"].as_bool().expect("bool"),
    };
    let vp = json["viewport"].as_array().expect("viewport");
    let viewport = [0, 1, 2, 3].map(|i| vp[i].as_f64().expect("number"));
    let labels = json["labels"].as_array().expect("label boxes").iter().map(|b| [0, 1, 2, 3].map(|i| b[i].as_f64().expect("number"))).collect();
    Shot { picture: Picture::read(&png), camera, viewport, labels }
}

fn scene(name: &str) -> Scene {
    plateload::scene::io::read_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes").join(format!("{name}.ron"))).expect("demo scene")
}

fn close(a: [u8; 3], b: [u8; 3], tol: u8) -> bool {
    (0..3).all(|k| a[k].abs_diff(b[k]) <= tol)
}

fn is_white(c: [u8; 3]) -> bool {
    c.iter().all(|&v| v >= 235)
}

fn luminance(c: [u8; 3]) -> f64 {
    0.2126 * c[0] as f64 + 0.7152 * c[1] as f64 + 0.0722 * c[2] as f64
}

/// Whether the cue band (black, white, black) crosses the line from `inner` to `outer` pixels:
/// white in the middle and a dark pixel on the way out. White there from a label box (white,
/// with a dark border) is not a cue.
fn band_at(shot: &Shot, inner: V3, mid: V3, outer: V3) -> bool {
    let p = &shot.picture;
    let white = is_white(p.median(shot.pixel(mid))) && !shot.under_label(shot.pixel(mid));
    let (a, b) = (shot.pixel(inner), shot.pixel(outer));
    let steps = 24;
    let darkest = (0..=steps)
        .map(|i| {
            let t = i as f64 / steps as f64;
            p.at((a[0] + t * (b[0] - a[0])).round() as i64, (a[1] + t * (b[1] - a[1])).round() as i64)
        })
        .map(luminance)
        .fold(f64::INFINITY, f64::min);
    white && darkest < 80.0
}

/// Check every plate of one picture; returns how many over-capacity and lifting plates were
/// checked for their cue.
fn check(scene_name: &str, view: &str) -> (usize, usize) {
    let s = scene(scene_name);
    let a = analyse(&s).expect("the demo solves");
    let shot = snapshot(scene_name, view);
    let mut failures = Vec::new();
    let (mut over, mut lift) = (0, 0);
    for plate in &a.plates {
        // By id: not every post need stand on a plate of its own.
        let post = s.posts.iter().find(|p| p.id == plate.id).expect("the plate's post");
        let u = plate.governing().utilisation;
        let want = Band::of(u).colour();
        // The top of the base plate, where the colour is drawn (10 mm plate; drawing size).
        let z = plate.base_level + 0.01;
        let at = shot.pixel([plate.x, plate.y, z]);
        let got = shot.picture.median(at);
        if !close(got, want, 6) {
            failures.push(format!("{scene_name} {view}: plate {} at {:.0},{:.0} is {got:?}, its band {:?} ({:.1} %) is {want:?}", plate.id, at[0], at[1], Band::of(u), 100.0 * u));
        }
        let support = s.support_types.iter().find(|t| Some(&t.id) == post.support.as_ref()).expect("support");
        let b = support.bearing_plate();
        let hx = b.width_m.max(support.base_plate.width_m) / 2.0;
        let hy = b.length_m.max(support.base_plate.length_m) / 2.0;
        let z = plate.base_level + 0.011;
        // Square frame: measured out along +x from the footprint's edge.
        let frame = band_at(
            &shot,
            [plate.x + hx + CUE_GAP_M / 2.0, plate.y, z],
            [plate.x + hx + CUE_GAP_M + CUE_BAND_M / 2.0, plate.y, z],
            [plate.x + hx + CUE_GAP_M + CUE_BAND_M + CUE_EDGE_M, plate.y, z],
        );
        // Round ring: around the frame's corners, measured in the four axis directions. A load
        // arrow, a label or the centre-of-gravity mark may cover it on one side, and a mark on
        // one side is not a ring: it counts as shown where at least two sides show it.
        let r = plateload::edit::pick::uplift_ring_radius(hx, hy);
        let ring_side = |(dx, dy): (f64, f64)| {
            let at = |d: f64| [plate.x + dx * d, plate.y + dy * d, z];
            band_at(&shot, at(r - CUE_GAP_M / 2.0), at(r + CUE_BAND_M / 2.0), at(r + CUE_BAND_M + CUE_EDGE_M))
        };
        let ring = [(1.0, 0.0), (-1.0, 0.0), (0.0, 1.0), (0.0, -1.0)].into_iter().filter(|&d| ring_side(d)).count() >= 2;
        // A failing plate shows its cue; a plate that is fine shows neither. (The ring of a
        // lifting plate can reach where a neighbour's frame would be measured on a tight grid,
        // so a plate with one cue is not checked for the absence of the other.)
        let st = plate.status;
        if st.over && !frame {
            failures.push(format!("{scene_name} {view}: plate {} is over capacity but shows no frame", plate.id));
        }
        if st.uplift && !ring {
            failures.push(format!("{scene_name} {view}: plate {} lifts but shows no ring", plate.id));
        }
        if st.is_ok() && (frame || ring) {
            failures.push(format!("{scene_name} {view}: plate {} is fine but shows a {}", plate.id, if frame { "frame" } else { "ring" }));
        }
        over += plate.status.over as usize;
        lift += plate.status.uplift as usize;
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
    (over, lift)
}

#[test]
#[ignore = "needs display: run under Xvfb with Mesa llvmpipe (.ci/run does)"]
fn from_above_in_the_editor_every_plate_shows_its_band_colour_across_its_face() {
    let _display = display_to_myself();
    // common practice, no source: in plan nothing may hide a plate — not the decks, members or
    // posts above it, nor the editor's legend, summary or labels. Looked at in the editor's own
    // layout (panels, legend strip) at the centre and near the four corners of each plate.
    let mut checked = 0;
    for scene_name in ["larkfield-falsework", "tannery-loading-bay", "harbour-sheeted-face"] {
        let s = scene(scene_name);
        let a = analyse(&s).expect("the demo solves");
        let shot = snapshot_with(scene_name, "plan", &["--with-panels"]);
        let [vx, vy, vw, vh] = shot.viewport;
        let mut failures = Vec::new();
        for plate in &a.plates {
            let post = s.posts.iter().find(|p| p.id == plate.id).expect("the plate's post");
            let support = s.support_types.iter().find(|t| Some(&t.id) == post.support.as_ref()).expect("support");
            // The coloured face: the larger of base plate and sole plate, each way.
            let b = support.bearing_plate();
            let hx = b.width_m.max(support.base_plate.width_m) / 2.0;
            let hy = b.length_m.max(support.base_plate.length_m) / 2.0;
            let want = Band::of(plate.governing().utilisation).colour();
            for (fx, fy) in [(0.0, 0.0), (-0.6, -0.6), (0.6, -0.6), (0.6, 0.6), (-0.6, 0.6)] {
                let at = shot.pixel([plate.x + fx * hx, plate.y + fy * hy, plate.base_level + 0.01]);
                let inside = at[0] >= vx + 2.0 && at[1] >= vy + 2.0 && at[0] <= vx + vw - 2.0 && at[1] <= vy + vh - 2.0;
                let got = shot.picture.median(at);
                if !inside || !close(got, want, 6) {
                    failures.push(format!("{scene_name}: plate {} at {:.0},{:.0} ({fx:+}, {fy:+}) is {got:?}, its band is {want:?}{}", plate.id, at[0], at[1], if inside { "" } else { " (outside the view)" }));
                }
                checked += 1;
            }
        }
        assert!(failures.is_empty(), "{}", failures.join("\n"));
    }
    assert!(checked >= 5 * 40, "{checked} points checked");
}

#[test]
#[ignore = "needs display: run under Xvfb with Mesa llvmpipe (.ci/run does)"]
fn plates_show_their_band_colour_and_failures_their_cue() {
    let _display = display_to_myself();
    // The demo sites hold over-capacity plates (Larkfield, Tannery) and lifting ones (Tannery,
    // Harbour), so both cues are seen; the engine's results decide which plate should show what.
    let mut seen = (0, 0);
    for (scene, view) in [("tannery-loading-bay", "plan"), ("tannery-loading-bay", "iso"), ("larkfield-falsework", "plan"), ("harbour-sheeted-face", "plan")] {
        let (o, l) = check(scene, view);
        seen = (seen.0 + o, seen.1 + l);
    }
    assert!(seen.0 >= 3 && seen.1 >= 4, "too few failing plates to check the cues on: {seen:?}");
}

/// Frames drawn so far by an editor started with `--count-updates`.
fn frames(file: &Path) -> Option<u64> {
    std::fs::read_to_string(file).ok()?.trim().parse().ok()
}

/// CPU time a process has used (user + system), from /proc.
fn cpu_time(pid: u32) -> Option<std::time::Duration> {
    let stat = std::fs::read_to_string(format!("/proc/{pid}/stat")).ok()?;
    // Fields after the command name, which is in parentheses and may hold spaces.
    let rest = stat.rsplit_once(')')?.1;
    let f: Vec<&str> = rest.split_whitespace().collect();
    // source: proc(5), fields 14 and 15 (utime, stime) in clock ticks; 100 ticks per second on Linux
    let ticks: u64 = f.get(11)?.parse::<u64>().ok()? + f.get(12)?.parse::<u64>().ok()?;
    Some(std::time::Duration::from_millis(ticks * 10))
}

#[test]
#[ignore = "needs display: run under Xvfb with Mesa llvmpipe (.ci/run does)"]
fn the_open_editor_draws_nothing_while_nothing_happens() {
    let _display = display_to_myself();
    // common practice, no source: a desktop editor draws on demand. The editor opens a new
    // file (so a recovery copy is pending and its timer runs), settles, and is then left alone.
    let dir = out_dir().join("idle");
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("temp dir");
    let counter = dir.join("frames.txt");
    let mut child = Command::new(env!("CARGO_BIN_EXE_plateload"))
        .args(["edit", &dir.join("idle-site.ron").display().to_string(), "--count-updates", &counter.display().to_string()])
        // Its settings and recovery copies go to the test's directory, not the user's.
        .env("XDG_CONFIG_HOME", dir.join("config"))
        .env("XDG_CACHE_HOME", dir.join("cache"))
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .spawn()
        .expect("the plateload binary runs");
    let pid = child.id();
    let started_at = std::time::Instant::now();
    let wait = |secs: f64| std::thread::sleep(std::time::Duration::from_secs_f64(secs));
    // Up and drawing (a software renderer takes a while over the first frames).
    let mut started = false;
    for _ in 0..600 {
        if frames(&counter).is_some_and(|n| n >= 3) {
            started = true;
            break;
        }
        wait(0.1);
    }
    let result = (|| {
        if !started {
            return Err(format!("the editor did not start drawing (frames: {:?})", frames(&counter)));
        }
        // Settled: no new frame for 2 s (the first frames, and shaders compiling in the
        // background, take a while on a busy machine); then left alone for 5 s.
        let mut last = (frames(&counter), std::time::Instant::now());
        loop {
            wait(0.25);
            let n = frames(&counter);
            if n != last.0 {
                last = (n, std::time::Instant::now());
            } else if last.1.elapsed().as_secs_f64() >= 2.0 {
                break;
            }
            if started_at.elapsed().as_secs() > 120 {
                return Err(format!("the editor kept drawing for 2 minutes after it started ({n:?} frames)"));
            }
        }
        let (n0, c0) = (frames(&counter), cpu_time(pid));
        wait(5.0);
        let (n1, c1) = (frames(&counter), cpu_time(pid));
        let (Some(n0), Some(n1)) = (n0, n1) else { return Err("the frame count could not be read".into()) };
        let cpu = match (c0, c1) {
            (Some(a), Some(b)) => format!("{:.1} % of one core", 100.0 * (b - a).as_secs_f64() / 5.0),
            _ => "unknown".into(),
        };
        eprintln!("idle editor: {} frames in 5 s, CPU {cpu}", n1 - n0);
        if n1 > n0 + 1 {
            return Err(format!("the editor drew {} frames in 5 s with nothing happening (CPU {cpu})", n1 - n0));
        }
        Ok(())
    })();
    let _ = child.kill();
    let _ = child.wait();
    let _ = std::fs::remove_dir_all(&dir);
    if let Err(e) = result {
        panic!("{e}");
    }
}

#[test]
#[ignore = "needs display: run under Xvfb with Mesa llvmpipe (.ci/run does)"]
fn the_spare_overlay_shows_the_maps_bands_on_the_decks_and_hides_no_plate() {
    let _display = display_to_myself();
    // source: the engine's own map (`spare_map`) and band colours; common practice, no source:
    // an overlay on the decks must leave every plate's colour in view
    use plateload::check::spare::{spare_map, SpareSettings};
    use plateload::export::palette::SpareBand;
    let name = "tannery-loading-bay";
    let s = scene(name);
    let a = analyse(&s).expect("the demo solves");
    let map = spare_map(&s, &a, &SpareSettings::default()).expect("a map");
    let shot = snapshot_with(name, "plan", &["--with-panels", "--spare-overlay", "point"]);
    let [vx, vy, vw, vh] = shot.viewport;
    let inside = |at: [f64; 2]| at[0] >= vx + 2.0 && at[1] >= vy + 2.0 && at[0] <= vx + vw - 2.0 && at[1] <= vy + vh - 2.0;
    // Every plate keeps its band colour at its centre.
    for plate in &a.plates {
        let at = shot.pixel([plate.x, plate.y, plate.base_level + 0.01]);
        let want = Band::of(plate.governing().utilisation).colour();
        assert!(inside(at) && close(shot.picture.median(at), want, 6), "plate {} is {:?}, its band is {want:?}", plate.id, shot.picture.median(at));
    }
    // Inner grid points, off the hatch's diagonal, away from plates, rings and labels: the
    // colour of their band. (Load arrows standing on the deck hide a few.)
    // Reach of each plate's cues (the uplift ring is the widest), m.
    let reach: Vec<f64> = s
        .posts
        .iter()
        .map(|q| {
            let t = s.support_types.iter().find(|t| Some(&t.id) == q.support.as_ref()).expect("support");
            let b = t.bearing_plate();
            let (hx, hy) = (b.width_m.max(t.base_plate.width_m) / 2.0, b.length_m.max(t.base_plate.length_m) / 2.0);
            plateload::edit::pick::uplift_ring_radius(hx, hy) + CUE_BAND_M + 0.05
        })
        .collect();
    let (mut checked, mut right, mut wrong) = (0, 0, Vec::new());
    for d in &map.decks {
        let deck = s.decks.iter().find(|k| k.id == d.deck).expect("deck");
        for p in &d.points {
            // Two spots either side of the hatch's diagonal: a leader or a brace line drawn over
            // the deck seldom crosses both.
            let inner = p.x > deck.extent.x.0 + 0.2 && p.x < deck.extent.x.1 - 0.2 && p.y > deck.extent.y.0 + 0.2 && p.y < deck.extent.y.1 - 0.2;
            let near_plate = s.posts.iter().zip(&reach).any(|(q, r)| (q.x - p.x).hypot(q.y - p.y) < *r);
            let spots = [(0.06, -0.06), (-0.06, 0.06)].map(|(dx, dy)| shot.pixel([p.x + dx, p.y + dy, deck.level + 0.005]));
            if !inner || near_plate || spots.iter().any(|at| !inside(*at) || shot.under_label(*at)) {
                continue;
            }
            checked += 1;
            let want = SpareBand::of(p.kn, p.already_at_limit).colour();
            let got = spots.map(|at| shot.picture.median(at));
            if got.iter().any(|c| close(*c, want, 6)) {
                right += 1;
            } else {
                wrong.push(format!("({:.2}, {:.2}) is {got:?}, its band is {want:?}", p.x, p.y));
            }
        }
    }
    eprintln!("{right} of {checked} grid points show their band");
    assert!(checked >= 60, "{checked} points checked");
    assert!(right * 10 >= checked * 9, "{right} of {checked} points show their band:\n{}", wrong.join("\n"));
}
