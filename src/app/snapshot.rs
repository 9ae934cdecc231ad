//! Pictures: open a window, frame the scene from a preset, wait until everything is drawn,
//! save a screenshot as PNG (atomically), exit. The view is the editor's own, without panels.
//!
//! With `timing_edits`, the picture run first makes that many edits (a load put on and off),
//! one per frame, and logs how long each took from the edit to its recoloured frame, and the
//! frame times, so the figures come from the real renderer; with `timing_orbit` it then turns
//! the camera a little every frame and logs those frame times.

use std::path::PathBuf;
use std::time::{Duration, Instant};

use bevy::prelude::*;
use bevy::render::view::screenshot::{Screenshot, ScreenshotCaptured};
use plateload::edit::{Edit, Element, ElementRef};
use plateload::edit::pick::ViewPreset;

use super::doc::SceneDoc;
use super::editor::EditTimings;
use super::view::draw::Drawn;
use super::view::ViewState;
use super::{Action, Mode};

/// What picture to make.
#[derive(Debug, Clone, PartialEq)]
pub struct PictureSpec {
    /// PNG file to write.
    pub out: PathBuf,
    /// Size (width, height), pixels.
    pub size: [u32; 2],
    /// Direction of view.
    pub view: ViewPreset,
    /// Combination colouring the plates (`None`: governing).
    pub combination: Option<usize>,
    /// Frames to wait after the scene is drawn, so every pipeline is ready.
    pub settle_frames: u32,
    /// Edits to time before the picture (0: none).
    pub timing_edits: u32,
    /// Frames to time turning the camera, after the edits (0: none).
    pub timing_orbit: u32,
    /// Also write the camera and the viewport used, as JSON (for tests that look at pixels).
    pub camera_out: Option<PathBuf>,
    /// Show the editor's panels instead of the picture layout (to look at the editor).
    pub editor_ui: bool,
    /// Select this element first (its plate is labelled and outlined).
    pub select: Option<plateload::edit::ElementRef>,
    /// Parts of the view left out (to time what each costs).
    pub without: Vec<super::view::ViewPart>,
    /// Draw the spare-capacity map on the decks for one extra load of this footprint.
    pub spare: Option<plateload::solve::influence::Footprint>,
}

/// Takes the picture in picture mode.
pub struct SnapshotPlugin;

impl Plugin for SnapshotPlugin {
    fn build(&self, app: &mut App) {
        app.init_resource::<PictureState>().add_systems(Startup, preselect).add_systems(Last, run_picture);
        // A picture shows the scene, not wherever the display's pointer happens to rest: no
        // hover outline, no clicks or camera drags from the mouse.
        app.configure_sets(Update, super::view::PointerSystems.run_if(|| false));
    }
}

/// Progress of the picture.
#[derive(Resource, Default, Debug)]
pub struct PictureState {
    frames_ready: u32,
    started: Option<Instant>,
    edits_done: u32,
    orbit_done: u32,
    frame_times: Vec<Duration>,
    orbit_times: Vec<Duration>,
    /// Per timed edit: the solve, the redraw (entities following the scene) and the recolouring.
    parts: [Vec<Duration>; 3],
    /// CPU time of the process when the timed frames of the current phase began.
    cpu_at_start: Option<Duration>,
    last_frame: Option<Instant>,
    requested: bool,
    /// Outcome of writing the file, once known.
    pub saved: Option<Result<PathBuf, String>>,
}

/// Longest a picture may take before giving up (a software renderer on a busy machine can
/// take minutes over its first shaders).
const MAX_TIME: Duration = Duration::from_secs(600);

fn preselect(mode: Res<Mode>, mut selection: ResMut<super::doc::Selection>, mut spare: ResMut<super::view::spare::SpareView>) {
    if let Mode::Picture(PictureSpec { select: Some(r), .. }) = &*mode {
        selection.items = vec![r.clone()];
    }
    if let Mode::Picture(PictureSpec { spare: Some(f), .. }) = &*mode {
        spare.on = true;
        spare.footprint_m = [f.x_m, f.y_m];
    }
}

#[allow(clippy::too_many_arguments)]
fn run_picture(
    mut commands: Commands,
    mode: Res<Mode>,
    doc: Res<SceneDoc>,
    drawn: Res<Drawn>,
    mut view: ResMut<ViewState>,
    mut timings: ResMut<EditTimings>,
    busy: Res<super::view::RendererBusy>,
    mut state: ResMut<PictureState>,
    mut actions: MessageWriter<Action>,
    mut exit: MessageWriter<AppExit>,
    panels: Option<Res<super::panels::Panels>>,
) {
    let Mode::Picture(spec) = &*mode else { return };
    let started = *state.started.get_or_insert_with(Instant::now);
    if let Some(result) = state.saved.take() {
        match result {
            Ok(p) => {
                info!("picture saved to {}", p.display());
                exit.write(AppExit::Success);
            }
            Err(e) => {
                error!("{e}");
                exit.write(AppExit::error());
            }
        }
        return;
    }
    if started.elapsed() > MAX_TIME {
        error!("the picture was not ready after {} s", MAX_TIME.as_secs());
        exit.write(AppExit::error());
        return;
    }
    // Pipelines still being built would leave things out of the picture.
    let ready = doc.solved_revision == doc.revision && drawn.revision == doc.revision && view.ready() && view.pending_fit.is_none() && !busy.get();
    if !ready || state.requested {
        return;
    }
    // Timed edits: a point load put on the middle post and taken off again, one edit per
    // frame; the scene stays valid, so each edit is solved and every plate recoloured.
    if state.edits_done < spec.timing_edits {
        timings.log = true;
        let now = Instant::now();
        match state.last_frame.replace(now) {
            Some(t) => {
                state.frame_times.push(now - t);
                // The previous frame's edit is solved, redrawn and recoloured by now.
                for (v, d) in state.parts.iter_mut().zip([doc.solve_time, drawn.last_times[0], drawn.last_times[1]]) {
                    v.push(d);
                }
            }
            None => state.cpu_at_start = process_cpu_time(),
        }
        let Some(post) = doc.scene.posts.get(doc.scene.posts.len() / 2) else {
            state.edits_done = spec.timing_edits;
            return;
        };
        let id = "timing-load";
        let edit = if state.edits_done % 2 == 0 {
            Edit::Add(Element::Load(plateload::Load::new(id, plateload::Case::Q, plateload::LoadKind::PostTop { post: post.id.clone(), kn: 5.0 })))
        } else {
            Edit::Delete { targets: vec![ElementRef::new(plateload::scene::model::ElementKind::Load, id)], mode: Default::default() }
        };
        actions.write(Action::Edit { edit, merge: None, select: None });
        state.edits_done += 1;
        if state.edits_done == spec.timing_edits {
            report_timings(&timings, &state.frame_times, doc.scene.posts.len(), view.viewport);
            let [solve, redraw, recolour] = &state.parts;
            info!("timing on {} posts: of the editor systems, the solve {}; the redraw {}; the recolouring {}", doc.scene.posts.len(), stats(solve), stats(redraw), stats(recolour));
            info!("timing on {} posts: CPU time per frame while editing (all threads, the software renderer's included): {}", doc.scene.posts.len(), cpu_per_frame(state.cpu_at_start, state.frame_times.len()));
            state.last_frame = None;
        }
        return;
    }
    // Timed orbit: the camera turns 2° a frame, as under a dragging mouse; the whole frame
    // (view, labels, panels, GPU) is measured from one frame's end to the next.
    if state.orbit_done < spec.timing_orbit {
        let now = Instant::now();
        match state.last_frame.replace(now) {
            Some(t) => state.orbit_times.push(now - t),
            None => state.cpu_at_start = process_cpu_time(),
        }
        view.camera.yaw_deg += 2.0;
        state.orbit_done += 1;
        if state.orbit_done == spec.timing_orbit {
            // Back to where it started, so the picture is the one asked for.
            view.camera.yaw_deg -= 2.0 * spec.timing_orbit as f64;
            info!("timing on {} posts, view {:.0} × {:.0} px: whole frames while orbiting (GPU included): {}", doc.scene.posts.len(), view.viewport[2], view.viewport[3], stats(&state.orbit_times));
            info!("timing on {} posts: CPU time per frame while orbiting (all threads, the software renderer's included): {}", doc.scene.posts.len(), cpu_per_frame(state.cpu_at_start, state.orbit_times.len()));
        }
        return;
    }
    state.frames_ready += 1;
    if state.frames_ready < spec.settle_frames {
        return;
    }
    state.requested = true;
    if let Some(path) = &spec.camera_out {
        let c = &view.camera;
        let json = serde_json::json!({
            "viewport": view.viewport,
            "target": c.target,
            "yaw_deg": c.yaw_deg,
            "pitch_deg": c.pitch_deg,
            "distance": c.distance,
            "fov_y_deg": c.fov_y_deg,
            "orthographic": c.orthographic,
            // Label boxes as drawn over the view, [min x, min y, max x, max y] in pixels.
            "labels": panels.as_ref().map_or_else(Vec::new, |p| p.labels.boxes()),
        });
        if let Err(e) = plateload::scene::io::write_atomic(path, json.to_string().as_bytes()) {
            error!("could not write {}: {e}", path.display());
            exit.write(AppExit::error());
            return;
        }
    }
    let out = spec.out.clone();
    commands.spawn(Screenshot::primary_window()).observe(move |captured: On<ScreenshotCaptured>, mut state: ResMut<PictureState>| {
        state.saved = Some(write_png(&out, captured.image.clone()));
    });
}

/// CPU time the process has used so far (user + system, every thread), where the system says.
/// On a machine shared with other work the wall-clock time of a frame depends on the load;
/// the CPU time it costs does much less.
fn process_cpu_time() -> Option<Duration> {
    let stat = std::fs::read_to_string("/proc/self/stat").ok()?;
    let fields: Vec<&str> = stat.rsplit_once(')')?.1.split_whitespace().collect();
    // source: proc(5), /proc/pid/stat fields 14 and 15 (utime, stime) in clock ticks; Linux
    // reports them at USER_HZ = 100 ticks per second
    let ticks: u64 = fields.get(11)?.parse::<u64>().ok()? + fields.get(12)?.parse::<u64>().ok()?;
    Some(Duration::from_millis(ticks * 10))
}

/// Mean CPU time per frame since `start`, for `frames` frames.
fn cpu_per_frame(start: Option<Duration>, frames: usize) -> String {
    match (start, process_cpu_time()) {
        (Some(a), Some(b)) if frames > 0 => format!("mean {:.1} ms over {frames} frames", (b - a).as_secs_f64() * 1e3 / frames as f64),
        _ => "not known on this system".into(),
    }
}

/// Count, median, 95th percentile and maximum of some durations, in ms.
fn stats(v: &[Duration]) -> String {
    if v.is_empty() {
        return "no samples".into();
    }
    let mut ms: Vec<f64> = v.iter().map(|d| d.as_secs_f64() * 1e3).collect();
    ms.sort_by(|a, b| a.partial_cmp(b).unwrap_or(std::cmp::Ordering::Equal));
    let q = |f: f64| ms[((ms.len() - 1) as f64 * f).round() as usize];
    format!("n {}, median {:.2} ms, p95 {:.2} ms, max {:.2} ms", ms.len(), q(0.5), q(0.95), ms[ms.len() - 1])
}

fn report_timings(timings: &EditTimings, frames: &[Duration], posts: usize, viewport: [f32; 4]) {
    info!("timing on {posts} posts: edit → recoloured, editor systems (edit, solve, redraw, recolour): {}", stats(&timings.own));
    info!("timing on {posts} posts: edit → recoloured, whole ECS update of the frame (no GPU): {}", stats(&timings.recent));
    info!("timing on {posts} posts, view {:.0} × {:.0} px: whole frames while editing (GPU included): {}", viewport[2], viewport[3], stats(frames));
}

/// Encode a screenshot as PNG and write it atomically.
fn write_png(path: &std::path::Path, image: Image) -> Result<PathBuf, String> {
    let rgb = image.try_into_dynamic().map_err(|e| format!("the screenshot could not be read: {e}"))?.to_rgb8();
    let (w, h) = (rgb.width(), rgb.height());
    let mut bytes = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut bytes, w, h);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        let mut writer = enc.write_header().map_err(|e| format!("PNG: {e}"))?;
        writer.write_image_data(rgb.as_raw()).map_err(|e| format!("PNG: {e}"))?;
    }
    plateload::scene::io::write_atomic(path, &bytes).map_err(|e| format!("could not write {}: {e}", path.display()))?;
    Ok(path.to_owned())
}
