//! The mouse path, headless: the cursor and the buttons are synthesised as the window system
//! would deliver them (the window's cursor position, button and motion messages through bevy's
//! input plugin), and the view's own systems turn them into picks, drags, clicks and camera
//! moves. Checked on the scene, the selection and the undo history.

use bevy::input::keyboard::{Key, KeyboardInput};
use bevy::input::mouse::{MouseButtonInput, MouseMotion, MouseScrollUnit, MouseWheel};
use bevy::input::touch::TouchPhase;
use bevy::input::ButtonState;
use bevy::prelude::*;
use bevy::window::{CursorMoved, PrimaryWindow, WindowResolution};
use plateload::edit::pick::ViewPreset;
use plateload::edit::ElementRef;
use plateload::scene::model::ElementKind;
use plateload::Scene;

use crate::app::doc::{SceneDoc, Selection};
use crate::app::editor::{EditorPlugin, Tool, ToolState};
use crate::app::view::draw::DrawPlugin;
use crate::app::view::{ViewInputPlugin, ViewState};
use crate::app::{Action, Mode, ViewRequest};

const W: f32 = 1000.0;
const H: f32 = 700.0;

/// The editor with its view's input systems, a window (no renderer) and bevy's input plugin,
/// framed in plan.
pub(super) fn mouse_app(scene: Scene) -> App {
    let mut app = App::new();
    let window = Window { resolution: WindowResolution::new(W as u32, H as u32).with_scale_factor_override(1.0), ..default() };
    app.add_plugins((
        MinimalPlugins,
        bevy::asset::AssetPlugin::default(),
        bevy::transform::TransformPlugin,
        bevy::input::InputPlugin,
        bevy::window::WindowPlugin { primary_window: Some(window), exit_condition: bevy::window::ExitCondition::DontExit, close_when_requested: false, ..default() },
    ));
    app.init_asset::<Mesh>().init_asset::<crate::app::view::flat::FlatMaterial>();
    app.insert_resource(Mode::Editor).insert_resource(SceneDoc::new(scene, None));
    app.add_plugins((EditorPlugin, ViewInputPlugin, DrawPlugin, crate::app::view::spare::SparePlugin));
    app.update();
    // The panels leave the whole window to the view here; the first frame with a size fits
    // the scene, and then the plan view is asked for.
    app.world_mut().resource_mut::<ViewState>().viewport = [0.0, 0.0, W, H];
    app.update();
    assert!(app.world().resource::<ViewState>().pending_fit.is_none(), "framed");
    app.world_mut().write_message(Action::View(ViewRequest::Preset(ViewPreset::Plan)));
    app.update();
    let cam = app.world().resource::<ViewState>().camera;
    assert!(cam.orthographic && cam.pitch_deg == ViewPreset::Plan.angles().1, "in plan: {cam:?}");
    app
}

fn window(app: &mut App) -> Entity {
    app.world_mut().query_filtered::<Entity, With<PrimaryWindow>>().single(app.world()).expect("a primary window")
}

/// The pointer moves to `p` (logical pixels): the window's cursor and a cursor message.
pub(super) fn move_to(app: &mut App, p: Vec2) {
    let w = window(app);
    let delta = app.world().get::<Window>(w).and_then(|win| win.cursor_position()).map(|c| p - c);
    app.world_mut().get_mut::<Window>(w).unwrap().set_cursor_position(Some(p));
    app.world_mut().write_message(CursorMoved { window: w, position: p, delta });
    if let Some(d) = delta {
        app.world_mut().write_message(MouseMotion { delta: d });
    }
    app.update();
}

fn button(app: &mut App, button: MouseButton, state: ButtonState) {
    let window = window(app);
    app.world_mut().write_message(MouseButtonInput { button, state, window });
    app.update();
}

fn click(app: &mut App, at: Vec2) {
    assert!(at.x > 0.0 && at.y > 0.0 && at.x < W && at.y < H, "click at {at} is outside the view");
    move_to(app, at);
    button(app, MouseButton::Left, ButtonState::Pressed);
    button(app, MouseButton::Left, ButtonState::Released);
    app.update(); // the action written by the tool is applied
}

/// The wheel turns by `lines` (negative: towards the user, zooming out) over the middle of the view.
fn scroll(app: &mut App, lines: f32) {
    move_to(app, Vec2::new(W / 2.0, H / 2.0));
    let window = window(app);
    let before = app.world().resource::<ViewState>().camera.distance;
    app.world_mut().write_message(MouseWheel { unit: MouseScrollUnit::Line, x: 0.0, y: lines, window, phase: TouchPhase::Moved });
    app.update();
    let after = app.world().resource::<ViewState>().camera.distance;
    // common practice, no source: each line of the wheel scales the distance by 0.88
    assert!((after / before - 0.88f64.powf(lines as f64)).abs() < 1e-9, "zoom {before} → {after}");
}

pub(super) fn key(app: &mut App, key_code: KeyCode) {
    let window = window(app);
    for state in [ButtonState::Pressed, ButtonState::Released] {
        app.world_mut().write_message(KeyboardInput { key_code, logical_key: Key::Unidentified(bevy::input::keyboard::NativeKey::Unidentified), state, text: None, repeat: false, window });
        app.update();
    }
    app.update();
}

pub(super) fn ctrl_z(app: &mut App) {
    let window = window(app);
    let send = |app: &mut App, key_code: KeyCode, state: ButtonState| {
        app.world_mut().write_message(KeyboardInput { key_code, logical_key: Key::Unidentified(bevy::input::keyboard::NativeKey::Unidentified), state, text: None, repeat: false, window });
        app.update();
    };
    send(app, KeyCode::ControlLeft, ButtonState::Pressed);
    send(app, KeyCode::KeyZ, ButtonState::Pressed);
    send(app, KeyCode::KeyZ, ButtonState::Released);
    send(app, KeyCode::ControlLeft, ButtonState::Released);
    app.update();
}

/// Window position of a scene point.
pub(super) fn at(app: &App, p: [f64; 3]) -> Vec2 {
    let q = app.world().resource::<ViewState>().to_window(p).expect("in view");
    Vec2::new(q[0], q[1])
}

/// Window position of a post's base plate.
fn plate_at(app: &App, id: &str) -> Vec2 {
    let s = &app.world().resource::<SceneDoc>().scene;
    let p = s.posts.iter().find(|p| p.id == id).expect("post");
    at(app, [p.x, p.y, p.base_level])
}

fn post_xy(app: &App, id: &str) -> (f64, f64) {
    let p = app.world().resource::<SceneDoc>().scene.posts.iter().find(|p| p.id == id).cloned().expect("post");
    (p.x, p.y)
}

fn selection(app: &App) -> Vec<ElementRef> {
    app.world().resource::<Selection>().items.clone()
}

pub(super) fn scene(app: &App) -> Scene {
    app.world().resource::<SceneDoc>().scene.clone()
}

#[test]
fn clicking_a_plate_selects_its_post_and_clicking_the_ground_clears() {
    // common practice, no source: in plan the plates are drawn over the members on them, so a
    // click on a plate picks the plate's post (not the bearer resting on it)
    let mut app = mouse_app(plateload::scene::demo::default_scene());
    let before = scene(&app);
    // On the plate's face beside the post, under the members that run along x over it.
    let (x, y) = post_xy(&app, "B2");
    let p = at(&app, [x + 0.07, y, 0.0]);
    click(&mut app, p);
    assert_eq!(selection(&app), vec![ElementRef::post("B2")], "the plate's post, not a member above it");
    // Off the structure (zoomed out to see around it): nothing under the pointer, the
    // selection is cleared.
    scroll(&mut app, -3.0);
    let (x, y) = post_xy(&app, "A1");
    let p = at(&app, [x - 1.5, y - 1.5, 0.0]);
    click(&mut app, p);
    assert!(selection(&app).is_empty());
    assert_eq!(scene(&app), before, "clicks do not edit");
}

#[test]
fn dragging_a_selected_post_moves_it_by_snapped_steps_in_one_undo_step() {
    // common practice, no source: grid snap 0.25 m; 0.6 m of pointer travel moves 0.5 m
    let mut app = mouse_app(plateload::scene::demo::default_scene());
    assert_eq!(app.world().resource::<ToolState>().snap_m, 0.25);
    let before = scene(&app);
    let undo_before = app.world().resource::<SceneDoc>().history.undo_len();
    let p = plate_at(&app, "B2");
    click(&mut app, p);
    assert_eq!(selection(&app), vec![ElementRef::post("B2")]);
    let (x, y) = post_xy(&app, "B2");
    let from = plate_at(&app, "B2");
    button(&mut app, MouseButton::Left, ButtonState::Pressed);
    // Move in a few steps, as a hand would.
    let to = at(&app, [x + 0.6, y, 0.0]);
    for k in 1..=4 {
        move_to(&mut app, from + (to - from) * k as f32 / 4.0);
    }
    button(&mut app, MouseButton::Left, ButtonState::Released);
    app.update();
    let (x1, y1) = post_xy(&app, "B2");
    assert!((x1 - (x + 0.5)).abs() < 1e-9 && (y1 - y).abs() < 1e-9, "B2 at ({x1}, {y1}), was ({x}, {y})");
    let others_moved = scene(&app).posts.iter().zip(&before.posts).filter(|(a, b)| a.id != "B2" && (a.x, a.y) != (b.x, b.y)).count();
    assert_eq!(others_moved, 0);
    assert_eq!(selection(&app), vec![ElementRef::post("B2")], "still selected");
    assert_eq!(app.world().resource::<SceneDoc>().history.undo_len(), undo_before + 1, "one drag, one step");
    ctrl_z(&mut app);
    assert_eq!(scene(&app), before);
}

#[test]
fn right_drag_orbits_the_camera_and_edits_nothing() {
    // common practice, no source: 0.3° of yaw per pixel of horizontal travel, pitch for vertical
    let mut app = mouse_app(plateload::scene::demo::default_scene());
    let p = plate_at(&app, "C3");
    click(&mut app, p);
    let before = (scene(&app), selection(&app));
    let cam0 = app.world().resource::<ViewState>().camera;
    let start = Vec2::new(W / 2.0, H / 2.0);
    move_to(&mut app, start);
    button(&mut app, MouseButton::Right, ButtonState::Pressed);
    move_to(&mut app, start + Vec2::new(100.0, 0.0));
    move_to(&mut app, start + Vec2::new(100.0, -50.0));
    button(&mut app, MouseButton::Right, ButtonState::Released);
    let cam1 = app.world().resource::<ViewState>().camera;
    assert!((cam1.yaw_deg - (cam0.yaw_deg - 30.0)).abs() < 1e-6, "yaw {} → {}", cam0.yaw_deg, cam1.yaw_deg);
    assert!((cam1.pitch_deg - (cam0.pitch_deg - 15.0).clamp(-89.0, 90.0)).abs() < 1e-6, "pitch {} → {}", cam0.pitch_deg, cam1.pitch_deg);
    assert_eq!((scene(&app), selection(&app)), before);
    // Moving without a button pressed turns nothing.
    move_to(&mut app, start);
    assert_eq!(app.world().resource::<ViewState>().camera, cam1);
}

#[test]
fn the_post_tool_places_a_snapped_post_where_clicked_and_undo_takes_it_away() {
    // common practice, no source
    let mut app = mouse_app(plateload::scene::demo::default_scene());
    let before = scene(&app);
    key(&mut app, KeyCode::KeyT);
    assert_eq!(app.world().resource::<ToolState>().tool, Tool::Post);
    scroll(&mut app, -3.0);
    // Beyond the last column, off the grid by a few centimetres.
    let x = before.posts.iter().map(|p| p.x).fold(f64::MIN, f64::max) + 2.07;
    let y = before.posts.iter().map(|p| p.y).fold(f64::MAX, f64::min) + 0.11;
    let z = before.posts.iter().map(|p| p.base_level).fold(f64::MAX, f64::min);
    let p = at(&app, [x, y, z]);
    click(&mut app, p);
    let s = scene(&app);
    assert_eq!(s.posts.len(), before.posts.len() + 1);
    let new = s.posts.iter().find(|p| !before.posts.iter().any(|q| q.id == p.id)).expect("a new post");
    let snap = |v: f64| (v / 0.25).round() * 0.25;
    assert!((new.x - snap(x)).abs() < 1e-9 && (new.y - snap(y)).abs() < 1e-9, "placed at ({}, {}), clicked ({x}, {y})", new.x, new.y);
    assert_eq!(selection(&app), vec![ElementRef::post(&new.id)]);
    ctrl_z(&mut app);
    assert_eq!(scene(&app), before);
    assert!(selection(&app).is_empty(), "the undone post is not selected");
}

#[test]
fn the_bearer_tool_lays_a_bearer_on_the_clicked_posts_and_undo_takes_it_away() {
    // common practice, no source
    let mut app = mouse_app(plateload::scene::demo::default_scene());
    let before = scene(&app);
    key(&mut app, KeyCode::KeyB);
    assert_eq!(app.world().resource::<ToolState>().tool, Tool::Bearer);
    for id in ["C4", "B4", "A4"] {
        let p = plate_at(&app, id);
        click(&mut app, p);
    }
    assert_eq!(app.world().resource::<ToolState>().picked, ["C4", "B4", "A4"]);
    assert_eq!(selection(&app), ["C4", "B4", "A4"].map(ElementRef::post).to_vec(), "picked posts show as selected");
    key(&mut app, KeyCode::Enter);
    let s = scene(&app);
    assert_eq!(s.bearers.len(), before.bearers.len() + 1);
    let b = s.bearers.iter().find(|b| !before.bearers.iter().any(|o| o.id == b.id)).expect("a new bearer");
    assert_eq!(b.posts, ["A4", "B4", "C4"], "in order along its line");
    assert_eq!(selection(&app), vec![ElementRef::new(ElementKind::Bearer, &b.id)]);
    ctrl_z(&mut app);
    assert_eq!(scene(&app), before);
    assert!(selection(&app).is_empty());
}
