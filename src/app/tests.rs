//! Headless tests of the editor: a bevy `App` with the editor's plugins and no renderer or
//! window, driven by actions, clicks and keys, checked on the document and the entities.

mod mouse;
mod spare;

use std::path::PathBuf;

use bevy::input::keyboard::KeyCode;
use bevy::prelude::*;
use plateload::edit::{DeleteMode, Edit, Element, ElementRef};
use plateload::scene::layout::LayoutSpec;
use plateload::scene::loads::{Case, Load, LoadKind};
use plateload::scene::model::ElementKind;
use plateload::export::palette::Band;
use plateload::edit::pick::{Hit, Part};
use plateload::edit::recovery::RecoveryStore;
use plateload::Scene;

use super::doc::{SceneDoc, Selection, Status};
use super::editor::{EditorPlugin, Prompt, Prompts, RecoveryState, Tool, ToolState, ViewClick};
use super::view::draw::{DrawKey, DrawPlugin, Drawn, ViewAssets};
use super::view::ViewState;
use super::{Action, Mode, Then};

/// An editor app without window or renderer, on a scene, after its first frame.
fn app_with(scene: Scene, recovery: Option<RecoveryStore>) -> App {
    let mut app = App::new();
    app.add_plugins((MinimalPlugins, bevy::asset::AssetPlugin::default(), bevy::transform::TransformPlugin));
    app.init_asset::<Mesh>().init_asset::<super::view::flat::FlatMaterial>();
    app.init_resource::<ButtonInput<KeyCode>>();
    app.insert_resource(Mode::Editor).insert_resource(SceneDoc::new(scene, None)).init_resource::<ViewState>();
    app.insert_resource(RecoveryState { store: recovery, interval: std::time::Duration::ZERO, ..default() });
    app.add_plugins((EditorPlugin, DrawPlugin));
    app.update();
    app
}

fn act(app: &mut App, a: Action) {
    app.world_mut().write_message(a);
    app.update();
}

fn doc(app: &App) -> &SceneDoc {
    app.world().resource::<SceneDoc>()
}

fn temp_dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("plateload-app-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).expect("temp dir");
    d
}

fn demo() -> Scene {
    plateload::scene::demo::default_scene()
}

#[test]
fn add_post_resolves_at_once_and_undo_restores_the_scene() {
    // common practice, no source: an edit is solved in the same frame; undo restores exactly.
    // Without horizontal loads a post standing on its own is a valid structure (with them it is
    // refused: see the next test).
    let mut scene = demo();
    scene.loads.retain(|l| !l.kind.is_horizontal());
    scene.horizontal.notional = plateload::scene::model::NotionalRule::Off;
    let mut app = app_with(scene, None);
    let before = doc(&app).scene.clone();
    let n = before.posts.len();
    let post = plateload::edit::place::post_at(&before, 7.5, 0.0, 0.0, 3.6);
    act(&mut app, Action::Edit { edit: Edit::Add(Element::Post(post.clone())), merge: None, select: Some(vec![ElementRef::post(&post.id)]) });
    let d = doc(&app);
    assert_eq!(d.scene.posts.len(), n + 1);
    assert_eq!(d.solved_revision, d.revision, "solved in the frame of the edit");
    let a = d.analysis().expect("the scene with a free-standing post still solves");
    let r = a.plates.iter().find(|p| p.id == post.id).expect("a result for the new plate");
    // A lone post carries only its own weight: 3.6 m of 48.3 × 4.0 tube.
    // source: EN 39:2001 tube mass 4.37 kg/m → 0.0429 kN/m (the engine's constant)
    assert!((r.case_kn[Case::G.index()] - 3.6 * 0.0429).abs() < 1e-9, "{:?}", r.case_kn);
    assert!(d.is_dirty());
    assert_eq!(app.world().resource::<Selection>().items, vec![ElementRef::post(&post.id)]);
    act(&mut app, Action::Undo);
    let d = doc(&app);
    assert_eq!(d.scene, before);
    assert!(!d.is_dirty(), "back to the state of the file");
    assert_eq!(d.analysis().unwrap().plates.len(), n);
    assert!(app.world().resource::<Selection>().items.is_empty(), "the undone post is no longer selected");
}

#[test]
fn a_lone_post_beside_a_braced_structure_under_horizontal_load_is_reported_at_once() {
    // common practice, no source: a post joined to nothing is held by no bracing, so its notional
    // horizontal load has no way to the ground; the editor shows why instead of a number
    let mut app = app_with(demo(), None);
    let before = doc(&app).scene.clone();
    let post = plateload::edit::place::post_at(&before, 7.5, 0.0, 0.0, 3.6);
    act(&mut app, Action::Edit { edit: Edit::Add(Element::Post(post.clone())), merge: None, select: None });
    let d = doc(&app);
    assert_eq!(d.solved_revision, d.revision, "solved in the frame of the edit");
    let err = d.result.as_ref().err().expect("refused").to_string();
    assert!(err.contains("not held") && err.contains(&post.id), "{err}");
    act(&mut app, Action::Undo);
    assert!(doc(&app).analysis().is_some());
}

#[test]
fn post_tool_click_places_a_snapped_post_and_a_support_type_in_an_empty_scene() {
    // common practice, no source
    let mut app = app_with(Scene::empty("t", 100.0), None);
    app.world_mut().resource_mut::<ToolState>().tool = Tool::Post;
    app.world_mut().write_message(ViewClick { hit: None, ground: Some([1.13, 2.38]), shift: false });
    app.update(); // the click becomes an action
    app.update(); // the action is applied
    let d = doc(&app);
    assert_eq!(d.scene.posts.len(), 1);
    let p = &d.scene.posts[0];
    assert_eq!((p.x, p.y), (1.25, 2.5), "snapped to the 0.25 m grid");
    assert_eq!(d.scene.support_types.len(), 1);
    assert_eq!(p.support.as_deref(), Some(d.scene.support_types[0].id.as_str()));
    // A post on its own is held by no bracing, so the notional load of the default falsework rule
    // has no way to the ground: refused at once, naming the post, rather than solved.
    let err = d.result.as_ref().err().expect("refused").to_string();
    assert!(err.contains("not held") && err.contains(&p.id), "{err}");
    // One undo step takes both away.
    act(&mut app, Action::Undo);
    assert_eq!(doc(&app).scene, Scene::empty("t", 100.0));
}

#[test]
fn bearer_tool_lays_a_bearer_on_the_picked_posts() {
    // common practice, no source
    let mut app = app_with(demo(), None);
    app.world_mut().resource_mut::<ToolState>().tool = Tool::Bearer;
    for id in ["C4", "A4"] {
        let hit = Hit { element: ElementRef::post(id), part: Part::Post, distance: 1.0, point: [0.0; 3] };
        app.world_mut().write_message(ViewClick { hit: Some(hit), ground: None, shift: false });
        app.update();
    }
    assert_eq!(app.world().resource::<ToolState>().picked, ["C4", "A4"]);
    act(&mut app, Action::BuildBearer(vec!["C4".into(), "B4".into(), "A4".into()]));
    let d = doc(&app);
    let b = d.scene.bearers.last().unwrap();
    assert_eq!(b.posts, ["A4", "B4", "C4"]);
    assert!(d.analysis().is_some());
}

#[test]
fn layout_generator_makes_the_counts_asked_for() {
    // common practice, no source: (bx+1)(by+1) posts; per lift (by+1) ledgers + (bx+1) transoms;
    // one deck per deck lift; braces in every line every third bay: bays 0 and 3 along x on 4
    // lines, bay 0 along y on 6 lines, per lift
    let mut app = app_with(demo(), None);
    let spec = LayoutSpec { bays_x: 5, bays_y: 3, lifts: 4, deck_lifts: vec![2, 4], ..LayoutSpec::default() };
    act(&mut app, Action::Edit { edit: Edit::ApplyLayout { spec, replace: true }, merge: None, select: Some(Vec::new()) });
    let d = doc(&app);
    assert_eq!(d.scene.posts.len(), 6 * 4);
    assert_eq!(d.scene.bearers.len(), 4 * (4 + 6));
    assert_eq!(d.scene.decks.len(), 2);
    assert_eq!(d.scene.braces.len(), 4 * (4 * 2 + 6));
    assert_eq!(d.scene.site, demo().site, "the site stays");
    let a = d.analysis().expect("a generated layout solves");
    assert_eq!(a.plates.len(), 24);
    // The view drew every post's plate.
    let drawn = app.world().resource::<Drawn>();
    assert_eq!(drawn.plates.len(), 24);
}

#[test]
fn delete_with_dependants_asks_then_cascades_and_undo_restores() {
    // common practice, no source
    let mut app = app_with(demo(), None);
    let before = doc(&app).scene.clone();
    act(&mut app, Action::Select(vec![ElementRef::post("B2")]));
    act(&mut app, Action::DeleteSelected(DeleteMode::Refuse));
    assert_eq!(doc(&app).scene, before, "refused: nothing deleted");
    let prompts = &app.world().resource::<Prompts>().0;
    let Some(Prompt::Dependants { targets, message }) = prompts.first() else { panic!("no question asked: {prompts:?}") };
    assert_eq!(targets, &vec![ElementRef::post("B2")]);
    assert!(message.contains("bearer L1-2") && message.contains("brace PB2-A1") && message.contains("7 elements depend"), "{message}");
    let status = app.world().resource::<Status>();
    assert!(status.error && status.text == *message);
    act(&mut app, Action::Delete { targets: vec![ElementRef::post("B2")], mode: DeleteMode::Cascade });
    let d = doc(&app);
    assert!(!d.scene.posts.iter().any(|p| p.id == "B2"));
    assert!(d.scene.decks.is_empty(), "the deck rested on a bearer that went");
    // With B2 and its plan braces gone, what is left of the diaphragm at 3.6 m meets its braced
    // planes at one corner and cannot resist the twist, and posts of rows 2 and B lose their
    // hold: refused, naming the braces and posts and what to change, rather than solved.
    let err = d.result.as_ref().err().expect("refused").to_string();
    assert!(err.contains("cannot reach the ground through the bracing") && err.contains("PB2-C3") && err.contains("cannot resist the twist") && err.contains("not held"), "{err}");
    act(&mut app, Action::Undo);
    assert_eq!(doc(&app).scene, before);
}

#[test]
fn keyboard_undo_and_redo() {
    // common practice, no source: Ctrl+Z undoes, Ctrl+Y redoes
    let mut app = app_with(demo(), None);
    let before = doc(&app).scene.clone();
    act(&mut app, Action::Edit { edit: Edit::Move { targets: vec![ElementRef::post("A1")], by: [0.5, 0.0, 0.0] }, merge: None, select: None });
    let moved = doc(&app).scene.clone();
    assert_ne!(moved, before);
    let press = |app: &mut App, keys: &[KeyCode]| {
        {
            let mut input = app.world_mut().resource_mut::<ButtonInput<KeyCode>>();
            for k in keys {
                input.press(*k);
            }
        }
        app.update(); // the shortcut becomes an action
        app.update(); // the action is applied
        let mut input = app.world_mut().resource_mut::<ButtonInput<KeyCode>>();
        input.release_all();
        input.clear();
    };
    press(&mut app, &[KeyCode::ControlLeft, KeyCode::KeyZ]);
    assert_eq!(doc(&app).scene, before);
    press(&mut app, &[KeyCode::ControlLeft, KeyCode::KeyY]);
    assert_eq!(doc(&app).scene, moved);
    press(&mut app, &[KeyCode::ControlLeft, KeyCode::ShiftLeft, KeyCode::KeyZ]);
    assert_eq!(doc(&app).scene, moved, "nothing left to redo");
}

#[test]
fn opening_over_unsaved_changes_asks_first() {
    // common practice, no source
    let dir = temp_dir("open");
    let other = dir.join("other.ron");
    plateload::scene::io::save_scene(&other, &plateload::scene::demo::demo_scene(1).unwrap()).unwrap();
    let mut app = app_with(demo(), None);
    act(&mut app, Action::Edit { edit: Edit::Move { targets: vec![ElementRef::post("A1")], by: [0.5, 0.0, 0.0] }, merge: None, select: None });
    let edited = doc(&app).scene.clone();
    act(&mut app, Action::Open(other.clone()));
    assert_eq!(doc(&app).scene, edited, "not opened over the changes");
    assert!(matches!(app.world().resource::<Prompts>().0.first(), Some(Prompt::Unsaved { then: Then::Open(_) })));
    act(&mut app, Action::Continue { then: Then::Open(other.clone()), save: false });
    let d = doc(&app);
    assert_eq!(d.scene, plateload::scene::demo::demo_scene(1).unwrap());
    assert_eq!(d.path.as_deref(), Some(other.as_path()));
    assert!(!d.is_dirty());
    // A file with a syntax error is refused with its line and column; the document stays.
    let bad = dir.join("bad.ron");
    std::fs::write(&bad, "(format: 1,\n  site: (name: \"x\", allowable_bearing_kpa: ),\n)").unwrap();
    act(&mut app, Action::Open(bad.clone()));
    let status = app.world().resource::<Status>();
    assert!(status.error && status.text.contains(&format!("{}:2:", bad.display())), "{}", status.text);
    assert_eq!(doc(&app).path.as_deref(), Some(other.as_path()));
    let _ = std::fs::remove_dir_all(dir);
}

#[test]
fn closing_with_unsaved_changes_asks_and_saving_writes_the_file() {
    // common practice, no source
    let dir = temp_dir("quit");
    let mut app = app_with(demo(), None);
    act(&mut app, Action::Edit { edit: Edit::Move { targets: vec![ElementRef::post("A1")], by: [0.5, 0.0, 0.0] }, merge: None, select: None });
    act(&mut app, Action::Quit);
    assert!(app.world().resource::<Messages<AppExit>>().is_empty(), "did not exit over unsaved changes");
    assert!(matches!(app.world().resource::<Prompts>().0.first(), Some(Prompt::Unsaved { then: Then::Quit })));
    // "Save" on an untitled scene asks for a name; saving under it then closes.
    act(&mut app, Action::Continue { then: Then::Quit, save: true });
    assert!(matches!(app.world().resource::<Prompts>().0.first(), Some(Prompt::SaveAs { then: Some(Then::Quit) })));
    let path = dir.join("saved.ron");
    act(&mut app, Action::SaveAs { path: path.clone(), then: Some(Then::Quit) });
    assert_eq!(plateload::scene::io::read_scene(&path).unwrap(), doc(&app).scene);
    assert!(!doc(&app).is_dirty());
    let exits: Vec<AppExit> = app.world_mut().resource_mut::<Messages<AppExit>>().drain().collect();
    assert_eq!(exits, vec![AppExit::Success]);
    let _ = std::fs::remove_dir_all(dir);
}

#[test]
fn unsaved_work_is_kept_in_a_recovery_copy_and_offered_on_the_next_start() {
    // common practice, no source
    let dir = temp_dir("recovery");
    let store = RecoveryStore::at(dir.join("store"));
    let mut app = app_with(demo(), Some(store.clone()));
    assert!(store.find(None).unwrap().is_none(), "nothing written while the scene is unchanged");
    act(&mut app, Action::Edit { edit: Edit::Move { targets: vec![ElementRef::post("A1")], by: [0.5, 0.0, 0.0] }, merge: None, select: None });
    let edited = doc(&app).scene.clone();
    let copy = store.find(None).unwrap().expect("a recovery copy of the unsaved change");
    assert_eq!(copy.scene, edited);
    // The "crash": the app goes away without closing. The next start offers the copy.
    drop(app);
    let mut app = app_with(demo(), Some(store.clone()));
    assert!(matches!(app.world().resource::<Prompts>().0.first(), Some(Prompt::Recovery(_))));
    act(&mut app, Action::Recover(true));
    let d = doc(&app);
    assert_eq!(d.scene, edited);
    assert!(d.is_dirty(), "restored work is not saved yet");
    // Saving removes the copy.
    act(&mut app, Action::SaveAs { path: dir.join("kept.ron"), then: None });
    assert!(store.find(Some(&dir.join("kept.ron"))).unwrap().is_none());
    assert!(store.find(None).unwrap().is_none());
    let _ = std::fs::remove_dir_all(dir);
}

#[test]
fn the_view_follows_edits_in_place_and_recolours_plates() {
    // common practice, no source: no respawn on an edit; a plate past capacity takes the over
    // colour and shows its frame
    let mut app = app_with(demo(), None);
    let entities = |app: &App| {
        let mut v: Vec<(DrawKey, Entity)> = app.world().resource::<Drawn>().entities.iter().map(|(k, e)| (k.clone(), *e)).collect();
        v.sort_by_key(|(_, e)| *e);
        v
    };
    let before = entities(&app);
    let key = DrawKey::Shape(ElementRef::post("A1"), Part::Post, 0);
    let post_entity = app.world().resource::<Drawn>().entities[&key];
    let x0 = app.world().get::<Transform>(post_entity).unwrap().translation.x;
    // Move the whole first line of posts out by 0.25 m: every member stays straight, so the
    // scene still solves.
    let line: Vec<ElementRef> = ["A1", "A2", "A3", "A4"].map(ElementRef::post).to_vec();
    act(&mut app, Action::Edit { edit: Edit::Move { targets: line, by: [-0.25, 0.0, 0.0] }, merge: None, select: None });
    assert!(doc(&app).analysis().is_some(), "{:?}", doc(&app).result.as_ref().err());
    let after = entities(&app);
    let gone: Vec<_> = before.iter().filter(|x| !after.contains(x)).collect();
    let new: Vec<_> = after.iter().filter(|x| !before.contains(x)).collect();
    assert!(gone.is_empty() && new.is_empty(), "respawned: {gone:?} became {new:?}");
    let x1 = app.world().get::<Transform>(post_entity).unwrap().translation.x;
    assert!((x1 - x0 + 0.25).abs() < 1e-5, "{x0} → {x1}");
    let [spawned, updated, removed] = app.world().resource::<Drawn>().last_sync;
    assert_eq!((spawned, removed), (0, 0));
    // At least the 4 posts with their base and sole plates, the 8 ledgers and 2 transoms on them.
    assert!(updated >= 4 * 3 + 8 + 2, "{updated} entities updated");
    // Overload A4 with a 40 kN point load on its top: over its 30 kN jack.
    let load = Load::new("test-load", Case::Q, LoadKind::PostTop { post: "A4".into(), kn: 40.0 });
    act(&mut app, Action::Edit { edit: Edit::Add(Element::Load(load)), merge: None, select: None });
    let d = doc(&app);
    let a = d.analysis().unwrap();
    let plate = a.plates.iter().find(|p| p.id == "A4").unwrap();
    assert!(plate.status.over);
    let drawn = app.world().resource::<Drawn>();
    let assets = app.world().resource::<ViewAssets>();
    let pe = &drawn.plates["A4"];
    for e in &pe.plates {
        let m = app.world().get::<MeshMaterial3d<super::view::flat::FlatMaterial>>(*e).unwrap();
        assert_eq!(m.0, assets.bands[Band::Over as usize]);
    }
    assert_eq!(*app.world().get::<Visibility>(pe.over.unwrap()).unwrap(), Visibility::Inherited, "the over-capacity frame shows");
    // A plate that is fine keeps its band and no frame.
    let ok = &drawn.plates["A1"];
    let u = a.plates.iter().find(|p| p.id == "A1").unwrap().governing().utilisation;
    let m = app.world().get::<MeshMaterial3d<super::view::flat::FlatMaterial>>(ok.plates[0]).unwrap();
    assert_eq!(m.0, assets.bands[Band::of(u) as usize]);
    assert_eq!(*app.world().get::<Visibility>(ok.over.unwrap()).unwrap(), Visibility::Hidden);
    // Deleting the load takes its arrow entities away and leaves the rest.
    let n = drawn.entities.len();
    act(&mut app, Action::Delete { targets: vec![ElementRef::new(ElementKind::Load, "test-load")], mode: DeleteMode::Refuse });
    let drawn = app.world().resource::<Drawn>();
    assert_eq!(drawn.entities.len(), n - 2, "shaft and head of the arrow");
}

#[test]
fn inspector_drags_merge_into_one_undo_step() {
    // common practice, no source
    let mut app = app_with(demo(), None);
    let before = doc(&app).scene.clone();
    for x in [0.1, 0.2, 0.3] {
        let mut p = before.posts[0].clone();
        p.x = x;
        act(&mut app, Action::Edit { edit: Edit::Replace { id: p.id.clone(), with: Element::Post(p) }, merge: Some("post A1.x".into()), select: None });
    }
    act(&mut app, Action::Seal);
    assert_eq!(doc(&app).history.undo_len(), 1);
    act(&mut app, Action::Undo);
    assert_eq!(doc(&app).scene, before);
}

#[test]
fn schedule_and_report_are_written_from_the_editor() {
    // common practice, no source: the exports carry the caution and one entry per base plate
    let dir = temp_dir("exports");
    let mut app = app_with(demo(), None);
    let csv = dir.join("site.schedule.csv");
    let html = dir.join("site.report.html");
    act(&mut app, Action::ExportSchedule(csv.clone()));
    act(&mut app, Action::WriteReport { path: html.clone(), note: "Rev C <for ground check>".into() });
    let n = doc(&app).scene.posts.len();
    let schedule = std::fs::read_to_string(&csv).expect("schedule written");
    assert!(schedule.contains(plateload::CAUTION));
    assert_eq!(schedule.lines().filter(|l| l.starts_with(|c: char| c.is_ascii_uppercase()) && l.contains(",jack-")).count(), n);
    let report = std::fs::read_to_string(&html).expect("report written");
    assert!(report.contains("PLANNING AID ONLY"), "the report carries the caution");
    assert!(report.contains("Rev C &lt;for ground check&gt;"), "the revision note, escaped");
    for p in &doc(&app).scene.posts {
        assert!(report.contains(&p.id), "report names plate {}", p.id);
    }
}

#[test]
fn the_analysis_method_is_an_undoable_edit_and_the_results_name_it() {
    // source: two equal spans under uniform load, middle support 10/8 wL continuous against
    // 1.0 wL on simple spans (beam tables) — so switching the method must change some plate
    let mut app = app_with(demo(), None);
    let env = doc(&app).analysis().unwrap().method_count();
    assert!(env > 1, "the demo is solved as an envelope by default");
    let mut settings = doc(&app).scene.analysis;
    settings.method = plateload::BeamMethod::SimpleSpans;
    act(&mut app, Action::Edit { edit: Edit::SetAnalysis(settings), merge: None, select: None });
    let simple = doc(&app).analysis().unwrap();
    assert_eq!(simple.method_count(), 1);
    assert_eq!(simple.method_label(0), "simple spans");
    let max_simple: Vec<f64> = simple.plates.iter().map(|p| p.governing().max_kn).collect();
    act(&mut app, Action::Undo);
    let back = doc(&app).analysis().unwrap();
    assert_eq!(back.method_count(), env);
    let changed = back.plates.iter().zip(&max_simple).filter(|(p, s)| p.governing().max_kn > **s + 1e-9).count();
    assert!(changed > 0, "continuity raises some plate's maximum");
}

/// Counts the RequestRedraw messages written since it last looked.
struct RedrawCounter(bevy::ecs::message::MessageCursor<bevy::window::RequestRedraw>);

impl RedrawCounter {
    fn new(app: &App) -> Self {
        RedrawCounter(app.world().resource::<Messages<bevy::window::RequestRedraw>>().get_cursor_current())
    }
    /// Run one update; how many redraws it asked for.
    fn next(&mut self, app: &mut App) -> usize {
        app.update();
        self.0.read(app.world().resource::<Messages<bevy::window::RequestRedraw>>()).count()
    }
}

#[test]
fn the_editor_asks_for_no_frames_when_nothing_happens() {
    // common practice, no source: a desktop editor draws on demand; here nothing but the
    // editor's own systems could ask for a frame, so none may be asked for while idle
    let mut app = app_with(demo(), None);
    for _ in 0..3 {
        app.update();
    }
    let mut redraws = RedrawCounter::new(&app);
    let idle: usize = (0..30).map(|_| redraws.next(&mut app)).sum();
    assert_eq!(idle, 0, "frames asked for with no input");
    // An action asks for the frame that finishes its work, and the asking stops after it.
    app.world_mut().write_message(Action::Edit { edit: Edit::Move { targets: vec![ElementRef::post("A1")], by: [0.25, 0.0, 0.0] }, merge: None, select: None });
    let busy = redraws.next(&mut app);
    assert!(busy > 0, "an edit asks for a frame");
    let after: Vec<usize> = (0..5).map(|_| redraws.next(&mut app)).collect();
    assert!(after.iter().skip(1).all(|&n| n == 0), "still asking after the edit: {after:?}");
}

#[test]
fn the_editor_sleeps_until_the_recovery_copy_is_due() {
    // common practice, no source: reactive updates, woken by the recovery timer only while a
    // copy is pending
    use bevy::winit::{UpdateMode, WinitSettings};
    let dir = temp_dir("pacing");
    let store = RecoveryStore::at(dir.join("store"));
    let mut app = app_with(demo(), Some(store.clone()));
    let interval = std::time::Duration::from_secs(3600);
    app.world_mut().resource_mut::<RecoveryState>().interval = interval;
    app.insert_resource(WinitSettings::game());
    app.update();
    let wait = |app: &App| match app.world().resource::<WinitSettings>().focused_mode {
        UpdateMode::Reactive { wait, .. } => wait,
        UpdateMode::Continuous => panic!("draws continuously"),
    };
    assert_eq!(wait(&app), std::time::Duration::MAX, "nothing to do: sleeps until input");
    // A first edit is copied at once (no copy written yet); a second one waits for the interval.
    act(&mut app, Action::Edit { edit: Edit::Move { targets: vec![ElementRef::post("A1")], by: [0.25, 0.0, 0.0] }, merge: None, select: None });
    assert!(store.find(None).unwrap().is_some());
    assert_eq!(wait(&app), std::time::Duration::MAX, "copy written: nothing pending");
    act(&mut app, Action::Edit { edit: Edit::Move { targets: vec![ElementRef::post("A1")], by: [0.25, 0.0, 0.0] }, merge: None, select: None });
    assert_eq!(wait(&app), interval, "a copy is pending: woken when it is due");
    assert!(matches!(app.world().resource::<WinitSettings>().unfocused_mode, UpdateMode::Reactive { react_to_device_events: false, .. }));
    // Once due, it is written and the timer stops.
    app.world_mut().resource_mut::<RecoveryState>().interval = std::time::Duration::ZERO;
    app.update();
    assert_eq!(store.find(None).unwrap().unwrap().scene, doc(&app).scene);
    assert_eq!(wait(&app), std::time::Duration::MAX);
    let _ = std::fs::remove_dir_all(dir);
}

#[test]
fn a_new_file_starts_empty_and_unsaved_and_its_first_save_creates_it() {
    // common practice, no source
    let dir = temp_dir("newfile");
    let path = dir.join("new-site.ron");
    let mut app = App::new();
    app.add_plugins((MinimalPlugins, bevy::asset::AssetPlugin::default(), bevy::transform::TransformPlugin));
    app.init_asset::<Mesh>().init_asset::<super::view::flat::FlatMaterial>();
    app.init_resource::<ButtonInput<KeyCode>>().init_resource::<ViewState>().init_resource::<super::panels::Panels>();
    app.insert_resource(Mode::Editor).insert_resource(SceneDoc::new_file(path.clone()));
    app.add_plugins((EditorPlugin, DrawPlugin));
    app.add_systems(Update, super::panels::layout_for_empty_scene);
    app.update();
    let d = doc(&app);
    assert!(d.scene.posts.is_empty() && d.scene.bearers.is_empty() && d.scene.decks.is_empty() && d.scene.loads.is_empty());
    assert_eq!(d.scene.site.name, "new-site");
    assert_eq!(d.scene.site.allowable_bearing_kpa, None, "no allowable until the planner enters one");
    assert!(d.is_dirty(), "marked unsaved");
    assert!(d.title().starts_with('●'), "{}", d.title());
    assert!(!path.exists(), "nothing written before a save");
    assert_eq!(app.world().resource::<super::panels::Panels>().right, super::panels::RightTab::Layout, "the layout generator at hand");
    let status = app.world().resource::<Status>();
    assert!(status.text.contains("not saved yet") && status.text.contains("allowable bearing pressure"), "{}", status.text);
    // The first save writes this scene, not a demo.
    act(&mut app, Action::Save);
    let saved = plateload::scene::io::read_scene(&path).expect("created by the save");
    assert_eq!(saved, doc(&app).scene);
    assert!(saved.posts.is_empty());
    assert!(!doc(&app).is_dirty());
    let _ = std::fs::remove_dir_all(dir);
}

#[test]
fn combinations_that_do_not_check_capacity_read_as_kilonewtons_only() {
    // common practice, no source: a factored load over a working-load capacity is not a
    // utilisation, so such a combination gives no percentage and no OK/OVER verdict
    use super::panels::results::status_text;
    use super::view::draw::reading;
    let scene = demo();
    let a = plateload::analyse(&scene).unwrap();
    let checked = a.combinations.iter().position(|c| c.checks_capacity).expect("a capacity combination");
    let unchecked = a.combinations.iter().position(|c| !c.checks_capacity).expect("a combination without");
    for p in &a.plates {
        let r = reading(&a, p, Some(unchecked));
        assert_eq!(r.utilisation, None, "{}", p.id);
        assert_eq!(r.band(), None);
        assert_eq!(r.max_kn, p.combinations[unchecked].max_kn);
        assert!(!r.status.over);
        assert!(matches!(status_text(r.status, false), "—" | "UPLIFT"));
        let r = reading(&a, p, Some(checked));
        assert_eq!(r.utilisation, Some(p.combinations[checked].utilisation));
        assert_eq!(status_text(r.status, true), p.combinations[checked].status.label());
        // Governing: the plate's own, a capacity combination.
        let g = reading(&a, p, None);
        assert!(a.combinations[g.combination].checks_capacity && g.utilisation == Some(p.governing().utilisation));
    }
    // The demo's factored loads exceed some jack's working load: shown as a percentage this
    // would read as a failure (or, with OK, as a pass) that the check never made.
    assert!(a.plates.iter().any(|p| p.combinations[unchecked].utilisation > 1.0 && !p.combinations[unchecked].status.over));
}

#[test]
fn the_catalogue_follows_the_open_file() {
    // common practice, no source: a catalogue.ron beside the scene adds to the shipped one,
    // and opening a file elsewhere reads that folder's instead
    let site = temp_dir("catalogue-site");
    let other = temp_dir("catalogue-other");
    std::fs::write(site.join("catalogue.ron"), r#"(members: [(id: "site-beam", self_weight_kn_per_m: 0.2, confidence: Confirmed, source: "supplier's sheet")])"#).unwrap();
    let first = site.join("a.ron");
    let second = other.join("b.ron");
    plateload::scene::io::save_scene(&first, &demo()).unwrap();
    plateload::scene::io::save_scene(&second, &demo()).unwrap();
    let mut app = App::new();
    app.add_plugins(MinimalPlugins);
    app.insert_resource(SceneDoc::new(demo(), Some(first.clone())));
    app.add_plugins(super::catalogue::CataloguePlugin);
    app.update();
    let cat = |app: &App| app.world().resource::<super::catalogue::EditorCatalogue>().loaded.clone();
    assert!(cat(&app).catalogue.member("site-beam").is_some(), "{:?}", cat(&app).files);
    assert!(cat(&app).catalogue.jack(plateload::scene::catalogue::DEFAULT_JACK).is_some(), "shipped entries stay");
    app.world_mut().resource_mut::<SceneDoc>().path = Some(second);
    app.update();
    assert!(cat(&app).catalogue.member("site-beam").is_none());
}

#[test]
fn the_shipped_icon_and_fonts_load() {
    // source: PNG specification (ISO/IEC 15948): the icon decodes to 8-bit RGBA; the font files
    // start with the TrueType version tag 0x00010000 (OpenType specification, 'sfnt version')
    let (rgba, w, h) = super::shipped::icon_rgba().unwrap();
    assert_eq!((w, h, rgba.len()), (128, 128, 128 * 128 * 4));
    assert!(rgba.chunks(4).any(|p| p[3] == 0) && rgba.chunks(4).any(|p| p[3] == 255), "rounded corners are transparent, the body opaque");
    for font in [super::shipped::SANS, super::shipped::MONO] {
        assert_eq!(&font[..4], &[0, 1, 0, 0]);
    }
    let defs = super::shipped::font_definitions();
    use bevy_egui::egui::FontFamily;
    assert_eq!(defs.families[&FontFamily::Proportional][0], "DejaVu Sans");
    assert_eq!(defs.families[&FontFamily::Monospace][0], "DejaVu Sans Mono");
    assert!(defs.families[&FontFamily::Proportional].len() > 1, "egui's own fonts stay as fallbacks");
}
