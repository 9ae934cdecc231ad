//! The 3D view: cameras, orbit / pan / zoom, pointer picking, and (in [`draw`]) the scene's
//! entities, drawn from the engine's geometry and coloured by the engine's results.
//!
//! The camera is the engine's [`ViewCamera`]; the bevy camera is set from it every time it
//! changes, so the picture, the picking rays and the render test's projections all agree.
//! Base plates, their cues and the centre of gravity are drawn by a second camera on top of
//! everything else, so a deck or a post in front never hides the colour of a plate.

pub mod draw;
pub mod flat;
pub mod spare;

use bevy::camera::visibility::RenderLayers;
use bevy::camera::{CameraOutputMode, ScalingMode, Viewport};
use bevy::core_pipeline::tonemapping::{DebandDither, Tonemapping};
use bevy::input::mouse::{AccumulatedMouseMotion, AccumulatedMouseScroll, MouseScrollUnit};
use bevy::prelude::*;
use bevy::window::PrimaryWindow;
use bevy_egui::PrimaryEguiContext;
use plateload::edit::pick::{self, ViewCamera, ViewPreset, V3};

use super::doc::{SceneDoc, Selection};
use super::editor::{Tool, ToolState, UiFocus, ViewClick, ViewDrag, ViewRequestMessage};
use super::{EditorSystems, Mode, ViewRequest};

/// Render layer of the ordinary scene.
pub const SCENE_LAYER: usize = 0;
/// Render layer drawn on top: base plates, their cues, the centre of gravity, highlights.
pub const ON_TOP_LAYER: usize = 1;

/// Scene (x, y, z up) to bevy (x, y up, −z north): right-handed both.
pub fn to_bevy(p: V3) -> Vec3 {
    Vec3::new(p[0] as f32, p[2] as f32, -p[1] as f32)
}

/// Cameras, input, entities and colours of the 3D view.
pub struct ViewPlugin;

impl Plugin for ViewPlugin {
    fn build(&self, app: &mut App) {
        app.add_plugins((ViewInputPlugin, flat::FlatMaterialPlugin, draw::DrawPlugin, draw::GizmoDrawPlugin, RendererBusyPlugin, spare::SparePlugin))
            .add_systems(Startup, spawn_cameras)
            .add_systems(Update, leave_out.run_if(resource_exists::<Without>))
            // After the panels, which size the view: a new size shows in the same frame.
            .add_systems(PostUpdate, apply_camera.after(bevy_egui::EguiPostUpdateSet::EndPass).before(bevy::camera::CameraUpdateSystems).before(bevy::transform::TransformSystems::Propagate));
    }
}

impl Plugin for RendererBusyPlugin {
    fn build(&self, app: &mut App) {
        app.init_resource::<RendererBusy>();
    }
    fn finish(&self, app: &mut App) {
        let busy = app.world().resource::<RendererBusy>().clone();
        let waker = app.world().get_resource::<bevy::winit::EventLoopProxyWrapper>().map(|p| PipelineWaker((**p).clone()));
        if let Some(render) = app.get_sub_app_mut(bevy::render::RenderApp) {
            render.insert_resource(busy).add_systems(bevy::render::Render, note_pipelines_building.in_set(bevy::render::RenderSystems::Cleanup));
            if let Some(w) = waker {
                render.insert_resource(w);
            }
        }
    }
}

/// Watches the renderer build its pipelines. Shaders compile in the background on first use
/// (seconds, on a software renderer), and a frame drawn before they are ready leaves those
/// things out: so the editor keeps drawing until they are (else it would sleep on that frame),
/// and a picture is not taken before.
struct RendererBusyPlugin;

/// Whether the renderer is still building pipelines, as last seen from the render world.
#[derive(Resource, Clone, Default)]
pub struct RendererBusy(std::sync::Arc<std::sync::atomic::AtomicBool>);

impl RendererBusy {
    /// Pipelines are still being built.
    pub fn get(&self) -> bool {
        self.0.load(std::sync::atomic::Ordering::Relaxed)
    }
}

/// The window's event loop, as seen from the render world.
#[derive(Resource)]
struct PipelineWaker(bevy::winit::EventLoopProxy<bevy::winit::WinitUserEvent>);

fn note_pipelines_building(cache: Res<bevy::render::render_resource::PipelineCache>, busy: Res<RendererBusy>, waker: Option<Res<PipelineWaker>>) {
    let building = cache.waiting_pipelines().next().is_some();
    busy.0.store(building, std::sync::atomic::Ordering::Relaxed);
    if let (true, Some(w)) = (building, waker) {
        let _ = w.0.send_event(bevy::winit::WinitUserEvent::WakeUp);
    }
}

/// The view's camera and pointer: orbit, pan and zoom, hover, clicks and drags, fitting.
/// Needs no renderer (the headless tests drive it with synthesised input).
pub struct ViewInputPlugin;

impl Plugin for ViewInputPlugin {
    fn build(&self, app: &mut App) {
        app.init_resource::<ViewState>()
            // Clicks and drags are read by the editor's tools in the same frame.
            .add_systems(Update, (camera_controls, pointer).chain().in_set(EditorSystems::Input).in_set(PointerSystems))
            .add_systems(Update, view_requests.after(EditorSystems::Sync).before(EditorSystems::Recolour));
    }
}

/// The systems that turn mouse input into view changes, clicks and drags.
#[derive(SystemSet, Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct PointerSystems;

/// What the view shows and how.
#[derive(Debug, Clone, PartialEq)]
pub struct ViewSettings {
    /// Combination whose utilisation colours the plates; `None`: each plate's governing one.
    pub combination: Option<usize>,
    /// Colour posts like their plates.
    pub colour_posts: bool,
    /// Draw load arrows.
    pub show_loads: bool,
    /// Label the worst plates (and the hovered and selected ones).
    pub labels: bool,
    /// Draw decks.
    pub show_decks: bool,
}

impl Default for ViewSettings {
    fn default() -> Self {
        ViewSettings { combination: None, colour_posts: false, show_loads: true, labels: true, show_decks: true }
    }
}

/// The view camera and the part of the window it draws in.
#[derive(Resource, Debug, Clone, PartialEq)]
pub struct ViewState {
    /// The camera.
    pub camera: ViewCamera,
    /// Where the 3D view is in the window: (x, y, width, height), logical pixels from the
    /// top-left corner. Zero size until the window (and the panels) are known.
    pub viewport: [f32; 4],
    /// What to show.
    pub settings: ViewSettings,
    /// Preset to frame the scene with once the viewport is known.
    pub pending_fit: Option<ViewPreset>,
}

impl Default for ViewState {
    fn default() -> Self {
        ViewState { camera: ViewCamera::default(), viewport: [0.0; 4], settings: ViewSettings::default(), pending_fit: Some(ViewPreset::Iso) }
    }
}

impl ViewState {
    /// Viewport size (width, height), pixels.
    pub fn size(&self) -> [f64; 2] {
        [self.viewport[2] as f64, self.viewport[3] as f64]
    }
    /// Whether the viewport is known.
    pub fn ready(&self) -> bool {
        self.viewport[2] >= 1.0 && self.viewport[3] >= 1.0
    }
    /// Window position (logical pixels) of a scene point, if in front of the camera.
    pub fn to_window(&self, p: V3) -> Option<[f32; 2]> {
        let q = self.camera.project(p, self.size())?;
        Some([self.viewport[0] + q[0] as f32, self.viewport[1] + q[1] as f32])
    }
    /// The ray under a window position (logical pixels).
    pub fn ray_at(&self, window_px: Vec2) -> pick::Ray {
        let local = [(window_px.x - self.viewport[0]) as f64, (window_px.y - self.viewport[1]) as f64];
        self.camera.ray(local, self.size())
    }
    /// Whether a window position is inside the viewport.
    pub fn contains(&self, p: Vec2) -> bool {
        let [x, y, w, h] = self.viewport;
        p.x >= x && p.y >= y && p.x < x + w && p.y < y + h
    }
    /// Frame a box from a preset direction (or the current one).
    pub fn frame(&mut self, lo: V3, hi: V3, preset: Option<ViewPreset>) {
        let aspect = if self.ready() { (self.viewport[2] / self.viewport[3]) as f64 } else { 1.6 };
        if let Some(p) = preset {
            let (yaw, pitch) = p.angles();
            self.camera.yaw_deg = yaw;
            self.camera.pitch_deg = pitch;
            if p == ViewPreset::Plan || p == ViewPreset::Front || p == ViewPreset::Side {
                self.camera.orthographic = true;
            }
        }
        self.camera.frame(lo, hi, aspect);
    }
}

/// How far behind the target the eye of a parallel view stands, m.
const ORTHO_BACK_M: f64 = 2_000.0;

/// Marks the camera that draws the scene.
#[derive(Component)]
pub struct SceneCamera;
/// Marks the camera that draws plates on top of the scene.
#[derive(Component)]
pub struct OnTopCamera;

/// Parts of the view that a timing run can leave out, to measure what each one costs
/// (`snapshot --timing-without`). The editor always draws them all.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ViewPart {
    /// The second 3D camera that draws plates and cues on top (they go in the first instead).
    OnTopCamera,
    /// The decks.
    Decks,
    /// The ground plane.
    Ground,
    /// The metric grid and the highlights (gizmo lines).
    Gizmos,
    /// Everything egui draws over the view (legend, labels, summary, title, caution).
    Overlay,
    /// The cues of plates' findings: over-capacity frames, uplift rings and uplift cones.
    Cues,
}

impl ViewPart {
    /// Every part, with its command-line name.
    pub const ALL: [(&'static str, ViewPart); 6] = [
        ("on-top-camera", ViewPart::OnTopCamera),
        ("decks", ViewPart::Decks),
        ("ground", ViewPart::Ground),
        ("gizmos", ViewPart::Gizmos),
        ("overlay", ViewPart::Overlay),
        ("cues", ViewPart::Cues),
    ];
}

/// The parts left out of the view (empty in the editor).
#[derive(Resource, Debug, Clone, Default, PartialEq)]
pub struct Without(pub Vec<ViewPart>);

impl Without {
    /// Whether a part is left out.
    pub fn has(&self, p: ViewPart) -> bool {
        self.0.contains(&p)
    }
}

fn spawn_cameras(mut commands: Commands, mut egui_settings: ResMut<bevy_egui::EguiGlobalSettings>, mode: Res<Mode>, mut view: ResMut<ViewState>, without: Option<Res<Without>>) {
    // The egui context goes on its own full-window camera, so the 3D cameras can draw in the
    // part of the window the panels leave free.
    egui_settings.auto_create_primary_context = false;
    let without = without.map(|w| w.clone()).unwrap_or_default();
    if let Mode::Picture(spec) = &*mode {
        view.settings.combination = spec.combination;
        view.camera.orthographic = true;
        view.pending_fit = Some(spec.view);
    }
    if without.has(ViewPart::Decks) {
        view.settings.show_decks = false;
    }
    // Exact colours: the legend's swatches and the plates must match, so no tonemapping or
    // dithering changes them (the plates are drawn in their flat colour).
    let exact = (Tonemapping::None, DebandDither::Disabled, msaa());
    // All three cameras draw into the same main texture, in order; only the last copies it to
    // the window. (On a software renderer each copy of the window costs a few milliseconds.)
    let keep = CameraOutputMode::Skip;
    let on_top = !without.has(ViewPart::OnTopCamera);
    let scene_layers = if on_top { RenderLayers::layer(SCENE_LAYER) } else { RenderLayers::from_layers(&[SCENE_LAYER, ON_TOP_LAYER]) };
    // Per-mesh data is built on the CPU and drawn directly, not by compute shaders and
    // indirect draws (see `super::base_app`).
    let direct = bevy::render::view::NoIndirectDrawing;
    commands.spawn((SceneCamera, Camera3d::default(), Camera { order: 0, clear_color: ClearColorConfig::Custom(BACKGROUND), output_mode: keep, ..default() }, exact, scene_layers, direct));
    if on_top {
        commands.spawn((OnTopCamera, Camera3d::default(), Camera { order: 1, clear_color: ClearColorConfig::None, output_mode: keep, ..default() }, exact, RenderLayers::layer(ON_TOP_LAYER), bevy::render::view::NoIndirectDrawing));
    }
    // egui draws its panels over the 3D picture in the same texture and writes the result.
    commands.spawn((
        PrimaryEguiContext,
        Camera2d,
        RenderLayers::none(),
        exact,
        Camera { order: 2, output_mode: CameraOutputMode::Write { blend_state: None, clear_color: ClearColorConfig::None }, clear_color: ClearColorConfig::None, ..default() },
    ));
}

/// Hide the ground and turn the gizmos off where a timing run leaves them out.
fn leave_out(without: Res<Without>, mut ground: Query<&mut Visibility, With<draw::GroundPlane>>, mut store: ResMut<GizmoConfigStore>) {
    if without.has(ViewPart::Ground) {
        for mut v in &mut ground {
            if *v != Visibility::Hidden {
                *v = Visibility::Hidden;
            }
        }
    }
    if without.has(ViewPart::Gizmos) && store.config::<DefaultGizmoConfigGroup>().0.enabled {
        store.config_mut::<DefaultGizmoConfigGroup>().0.enabled = false;
        store.config_mut::<draw::OnTopGizmos>().0.enabled = false;
    }
}

/// Colour behind the scene.
pub const BACKGROUND: Color = Color::srgb_u8(0xe9, 0xec, 0xef);

/// Multisampling of the cameras: off by default, since a software renderer spends most of a
/// frame on it; `PLATELOAD_MSAA=4` (or 2, 8) turns it on.
fn msaa() -> Msaa {
    match std::env::var("PLATELOAD_MSAA").ok().as_deref() {
        Some("2") => Msaa::Sample2,
        Some("4") => Msaa::Sample4,
        Some("8") => Msaa::Sample8,
        _ => Msaa::Off,
    }
}

/// Set the bevy cameras from the view camera.
fn apply_camera(view: Res<ViewState>, mode: Res<Mode>, windows: Query<&Window, With<PrimaryWindow>>, mut cams: Query<(&mut Transform, &mut Projection, &mut Camera), Or<(With<SceneCamera>, With<OnTopCamera>)>>) {
    if !view.is_changed() {
        return;
    }
    let c = &view.camera;
    let (_, u, f) = c.basis();
    // Without perspective the eye's distance changes nothing in the picture, so it stands far
    // back and the near plane stays at zero (bevy culls against it).
    let eye = if c.orthographic {
        let back = ORTHO_BACK_M + c.distance;
        let t = c.target;
        let e = c.towards_eye();
        [t[0] + e[0] * back, t[1] + e[1] * back, t[2] + e[2] * back]
    } else {
        c.eye()
    };
    let transform = Transform::from_translation(to_bevy(eye)).looking_to(to_bevy(f), to_bevy(u));
    let projection = if c.orthographic {
        Projection::Orthographic(OrthographicProjection {
            scaling_mode: ScalingMode::FixedVertical { viewport_height: (2.0 * c.half_height()) as f32 },
            near: 0.0,
            far: (2.0 * (ORTHO_BACK_M + c.distance)) as f32,
            ..OrthographicProjection::default_3d()
        })
    } else {
        Projection::Perspective(PerspectiveProjection { fov: c.fov_y_deg.to_radians() as f32, near: 0.05, far: 20_000.0, ..default() })
    };
    let scale = windows.single().map_or(1.0, |w| w.scale_factor());
    let _ = &mode;
    let viewport = view.ready().then(|| {
        let [x, y, w, h] = view.viewport;
        Viewport { physical_position: UVec2::new((x * scale) as u32, (y * scale) as u32), physical_size: UVec2::new(((w * scale) as u32).max(1), ((h * scale) as u32).max(1)), ..default() }
    });
    for (mut t, mut p, mut cam) in &mut cams {
        *t = transform;
        *p = projection.clone();
        let same = match (&cam.viewport, &viewport) {
            (None, None) => true,
            (Some(a), Some(b)) => a.physical_position == b.physical_position && a.physical_size == b.physical_size,
            _ => false,
        };
        if !same {
            cam.viewport = viewport.clone();
        }
    }
}

/// Fit and preset requests; the first fit once the viewport is known.
fn view_requests(mut requests: MessageReader<ViewRequestMessage>, mut view: ResMut<ViewState>, doc: Res<SceneDoc>, selection: Res<Selection>, shapes: Res<draw::SceneShapes>) {
    let bounds = || shapes.bounds.unwrap_or_else(|| pick::structure_bounds(&doc.scene));
    for ViewRequestMessage(r) in requests.read() {
        match r {
            ViewRequest::Fit => view.frame(bounds().0, bounds().1, None),
            ViewRequest::Preset(p) => {
                let (lo, hi) = bounds();
                view.frame(lo, hi, Some(*p));
            }
            ViewRequest::TogglePerspective => {
                view.camera.orthographic = !view.camera.orthographic;
                let (lo, hi) = bounds();
                view.frame(lo, hi, None);
            }
            ViewRequest::FitSelection => {
                let sel: Vec<&pick::Shape> = shapes.shapes.iter().filter(|s| selection.contains(&s.element)).collect();
                let b = sel.iter().map(|s| s.prim.bounds()).reduce(|(a, b), (c, d)| ([0, 1, 2].map(|k| a[k].min(c[k])), [0, 1, 2].map(|k| b[k].max(d[k]))));
                if let Some((lo, hi)) = b {
                    let pad = 0.5;
                    view.frame(lo.map(|v| v - pad), hi.map(|v| v + pad), None);
                }
            }
        }
    }
    if view.ready() && !shapes.shapes.is_empty() || view.ready() && doc.scene.posts.is_empty() {
        if let Some(p) = view.pending_fit.take() {
            let (lo, hi) = bounds();
            view.frame(lo, hi, Some(p));
        }
    }
}

/// Orbit (right drag), pan (middle drag, or shift + right drag) and zoom (wheel).
fn camera_controls(
    buttons: Option<Res<ButtonInput<MouseButton>>>,
    keys: Option<Res<ButtonInput<KeyCode>>>,
    motion: Option<Res<AccumulatedMouseMotion>>,
    scroll: Option<Res<AccumulatedMouseScroll>>,
    focus: Res<UiFocus>,
    windows: Query<&Window, With<PrimaryWindow>>,
    mut view: ResMut<ViewState>,
    mut dragging: Local<bool>,
    mut last_cursor: Local<Option<Vec2>>,
) {
    let (Some(buttons), Some(motion), Some(scroll)) = (buttons, motion, scroll) else { return };
    // How far the pointer moved: by its position in the window where known, which every
    // windowing system reports (a remote desktop or a virtual display may send no raw mouse
    // motion); else by the raw motion.
    let cursor = windows.single().ok().and_then(|w| w.cursor_position());
    let moved = match (cursor, *last_cursor) {
        (Some(c), Some(l)) => c - l,
        _ => motion.delta,
    };
    *last_cursor = cursor;
    let shift = keys.is_some_and(|k| k.any_pressed([KeyCode::ShiftLeft, KeyCode::ShiftRight]));
    let (right, middle) = (buttons.pressed(MouseButton::Right), buttons.pressed(MouseButton::Middle));
    if buttons.any_just_pressed([MouseButton::Right, MouseButton::Middle]) {
        *dragging = focus.pointer_in_view;
    }
    if !right && !middle {
        *dragging = false;
    }
    let d = moved;
    if *dragging && d != Vec2::ZERO {
        let cam = &mut view.camera;
        if middle || (right && shift) {
            let h = view.viewport[3].max(1.0) as f64;
            let per_px = 2.0 * view.camera.half_height() / h;
            let (r, u, _) = view.camera.basis();
            let t = &mut view.camera.target;
            for k in 0..3 {
                t[k] += (-r[k] * d.x as f64 + u[k] * d.y as f64) * per_px;
            }
        } else {
            cam.yaw_deg -= 0.3 * d.x as f64;
            cam.pitch_deg = (cam.pitch_deg + 0.3 * d.y as f64).clamp(-89.0, 90.0);
        }
    }
    if focus.pointer_in_view && scroll.delta.y != 0.0 {
        let lines = match scroll.unit {
            MouseScrollUnit::Line => scroll.delta.y as f64,
            MouseScrollUnit::Pixel => scroll.delta.y as f64 / 40.0,
        };
        let cam = &mut view.camera;
        cam.distance = (cam.distance * 0.88f64.powf(lines)).clamp(0.2, 50_000.0);
    }
}

/// Press state of the left button in the view.
#[derive(Default)]
struct Press {
    at: Option<Vec2>,
    grab: Option<(f64, [f64; 2])>,
    dragging: bool,
    serial: u64,
}

/// Hover picking, clicks and drags of the left button.
#[allow(clippy::too_many_arguments)]
fn pointer(
    buttons: Option<Res<ButtonInput<MouseButton>>>,
    keys: Option<Res<ButtonInput<KeyCode>>>,
    windows: Query<&Window, With<PrimaryWindow>>,
    focus: Res<UiFocus>,
    view: Res<ViewState>,
    shapes: Res<draw::SceneShapes>,
    tools: Res<ToolState>,
    mut selection: ResMut<Selection>,
    mut clicks: MessageWriter<ViewClick>,
    mut drags: MessageWriter<ViewDrag>,
    mut press: Local<Press>,
    mut last_cursor: Local<Option<Vec2>>,
) {
    let (Some(buttons), Ok(window)) = (buttons, windows.single()) else { return };
    let cursor = window.cursor_position().filter(|c| view.ready() && view.contains(*c) && focus.pointer_in_view);
    let shift = keys.is_some_and(|k| k.any_pressed([KeyCode::ShiftLeft, KeyCode::ShiftRight]));
    let tol = view.camera.pick_tolerance(4.0, view.viewport[3].max(1.0) as f64);
    // What is drawn on top is picked first: a plate, then anything else.
    let pick_at = |c: Vec2| {
        let ray = view.ray_at(c);
        pick::pick(&shapes.plates, &ray, &tol).or_else(|| pick::pick(&shapes.shapes, &ray, &tol))
    };
    // Hover: only when the pointer moved or the scene changed under it.
    if cursor != *last_cursor || shapes.is_changed() {
        *last_cursor = cursor;
        let hovered = cursor.and_then(|c| pick_at(c)).map(|h| h.element);
        if selection.hovered != hovered {
            selection.hovered = hovered;
        }
    }
    let Some(c) = cursor else {
        if buttons.just_released(MouseButton::Left) {
            *press = Press { serial: press.serial, ..default() };
        }
        return;
    };
    if buttons.just_pressed(MouseButton::Left) {
        let hit = pick_at(c);
        let grab = hit.filter(|h| tools.tool == Tool::Select && selection.contains(&h.element)).and_then(|h| {
            let ray = view.ray_at(c);
            pick::ray_plane_z(&ray, h.point[2]).map(|g| (h.point[2], g))
        });
        *press = Press { at: Some(c), grab, dragging: false, serial: press.serial + 1 };
    }
    if let (Some(at), Some((z, from))) = (press.at, press.grab) {
        if buttons.pressed(MouseButton::Left) && (press.dragging || c.distance(at) > 4.0) {
            press.dragging = true;
            if let Some(to) = pick::ray_plane_z(&view.ray_at(c), z) {
                drags.write(ViewDrag { from, to, done: false, serial: press.serial });
            }
        }
    }
    if buttons.just_released(MouseButton::Left) {
        if press.dragging {
            if let (Some((z, from)), Some(to)) = (press.grab, pick::ray_plane_z(&view.ray_at(c), press.grab.map_or(0.0, |g| g.0))) {
                let _ = z;
                drags.write(ViewDrag { from, to, done: true, serial: press.serial });
            }
        } else if press.at.is_some_and(|a| a.distance(c) <= 4.0) {
            let ray = view.ray_at(c);
            let ground = pick::ray_plane_z(&ray, shapes.ground_z);
            clicks.write(ViewClick { hit: pick_at(c), ground, shift });
        }
        *press = Press { serial: press.serial, ..default() };
    }
}
