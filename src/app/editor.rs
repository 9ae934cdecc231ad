//! The editor's document logic: actions become undoable edits, the scene is re-solved when it
//! changes, tools turn clicks into new elements, keys into actions, and unsaved work is kept in
//! a recovery copy. Nothing here needs a window or a renderer, so all of it runs in headless
//! `App` tests.

use std::path::PathBuf;
use std::time::{Duration, Instant};

use bevy::input::keyboard::KeyCode;
use bevy::prelude::*;
use bevy::window::{RequestRedraw, WindowCloseRequested};
use plateload::edit::{place, DeleteMode, Edit, EditError, Element, ElementRef};
use plateload::scene::loads::{Case, Intensity, Load, LoadKind, PlanDirection};
use plateload::scene::model::{ElementKind, Rect};
use plateload::edit::pick::Hit;
use plateload::edit::recovery::{RecoveryStore, Recovered};

use super::doc::{SceneDoc, Selection, Status};
use super::{Action, EditorSystems, Then, ViewRequest};

/// Document, actions, solving, tools, shortcuts and recovery copies.
pub struct EditorPlugin;

impl Plugin for EditorPlugin {
    fn build(&self, app: &mut App) {
        app.add_message::<Action>()
            .add_message::<ViewRequestMessage>()
            .add_message::<WindowCloseRequested>()
            .add_message::<ViewClick>()
            .add_message::<ViewDrag>()
            .init_resource::<Selection>()
            .init_resource::<Status>()
            .init_resource::<Prompts>()
            .init_resource::<ToolState>()
            .init_resource::<UiFocus>()
            .init_resource::<EditTimings>()
            .init_resource::<RecoveryState>()
            .configure_sets(
                Update,
                (EditorSystems::Input, EditorSystems::Apply, EditorSystems::Solve, EditorSystems::Sync, EditorSystems::Recolour).chain(),
            )
            .add_systems(Startup, offer_recovery)
            .add_systems(Update, (shortcuts, tool_clicks, drag_moves, close_requests).in_set(EditorSystems::Input).after(super::view::PointerSystems))
            .add_systems(Update, (handle_actions, prune_selection).chain().in_set(EditorSystems::Apply))
            .add_systems(Update, solve.run_if(resource_changed::<SceneDoc>).in_set(EditorSystems::Solve))
            .add_systems(Update, own_timing.after(EditorSystems::Recolour))
            .add_message::<RequestRedraw>()
            .add_systems(Last, (write_recovery, finish_timing, settle, pace_updates).chain());
    }
}

/// A question the user has to answer before the editor carries on.
#[derive(Debug, Clone, PartialEq)]
pub enum Prompt {
    /// The scene has unsaved changes.
    Unsaved {
        /// What was asked for.
        then: Then,
    },
    /// Elements depend on what is to be deleted.
    Dependants {
        /// What was to be deleted.
        targets: Vec<ElementRef>,
        /// The refusal, listing the dependants.
        message: String,
    },
    /// A recovery copy of unsaved work was found.
    Recovery(Box<Recovered>),
    /// Ask for a file name before saving (the document has none yet).
    SaveAs {
        /// What to do after saving.
        then: Option<Then>,
    },
}

/// Open questions; the panels show the first.
#[derive(Resource, Default, Debug, Clone)]
pub struct Prompts(pub Vec<Prompt>);

/// Whether egui is using the keyboard or the pointer this frame (set by the panels).
#[derive(Resource, Debug, Clone, Copy)]
pub struct UiFocus {
    /// A text field or other widget has the keyboard.
    pub keyboard: bool,
    /// The pointer is over the 3D view and not over a panel or window.
    pub pointer_in_view: bool,
}

impl Default for UiFocus {
    fn default() -> Self {
        UiFocus { keyboard: false, pointer_in_view: true }
    }
}

/// A click (press and release without a drag) in the 3D view.
#[derive(Message, Debug, Clone, PartialEq)]
pub struct ViewClick {
    /// What is under the pointer.
    pub hit: Option<Hit>,
    /// Where the pointer's ray meets the ground (the lowest base level), m.
    pub ground: Option<[f64; 2]>,
    /// Shift was held: add to the selection.
    pub shift: bool,
}

/// A left-button drag in the 3D view that started on a selected element.
#[derive(Message, Debug, Clone, PartialEq)]
pub struct ViewDrag {
    /// Plan point where the drag started, on the level of the grabbed point, m.
    pub from: [f64; 2],
    /// Plan point under the pointer now, on that level, m.
    pub to: [f64; 2],
    /// The button was released.
    pub done: bool,
    /// Number of the drag, to keep one undo step per drag.
    pub serial: u64,
}

/// The placement tools.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Tool {
    /// Click to select; drag a selected element to move it.
    #[default]
    Select,
    /// Click on the ground to place a post.
    Post,
    /// Click posts along a line, then finish (Enter) to lay a bearer on them.
    Bearer,
    /// Click parallel bearers, then finish (Enter) to lay a deck across them.
    Deck,
    /// Click two posts to brace between them.
    Brace,
    /// Click to place a load of the chosen kind.
    Load(LoadTool),
}

/// Kinds of load the load tool places.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum LoadTool {
    /// A point load on the deck, bearer or post top clicked.
    #[default]
    Point,
    /// A patch on the deck clicked, centred where clicked.
    Patch,
    /// A pressure over the whole deck clicked.
    Area,
    /// A line load along the bearer clicked, centred where clicked.
    Line,
    /// A horizontal force at the point clicked.
    Horizontal,
}

/// Tool settings: what the next click makes.
#[derive(Resource, Debug, Clone, PartialEq)]
pub struct ToolState {
    /// The tool.
    pub tool: Tool,
    /// Grid snap of placed and moved points, m (0 = off).
    pub snap_m: f64,
    /// Ids picked so far for a bearer, deck or brace.
    pub picked: Vec<String>,
    /// Height of a post placed where no post stands yet, m.
    pub post_height_m: f64,
    /// Load case of placed loads.
    pub case: Case,
    /// Force of point and horizontal loads, kN.
    pub kn: f64,
    /// Pressure of patch and area loads, kPa.
    pub kpa: f64,
    /// Patch size (x, y), m.
    pub patch_m: [f64; 2],
    /// Line load intensity, kN/m.
    pub kn_per_m: f64,
    /// Line load length, m.
    pub line_m: f64,
    /// Direction of horizontal loads.
    pub direction_deg: f64,
    /// Self-weight of new decks, kPa.
    pub deck_kpa: f64,
    /// Offset of duplicates, m.
    pub duplicate_by: [f64; 3],
}

impl Default for ToolState {
    fn default() -> Self {
        // Starting values of the tool fields; the planner types the real ones before placing.
        ToolState {
            tool: Tool::Select,
            snap_m: 0.25,
            picked: Vec::new(),
            post_height_m: 2.0,
            case: Case::Q,
            kn: 1.0,
            kpa: 1.0,
            patch_m: [1.0, 1.0],
            kn_per_m: 1.0,
            line_m: 1.0,
            direction_deg: 0.0,
            deck_kpa: 0.25,
            duplicate_by: [1.0, 0.0, 0.0],
        }
    }
}

/// Timing of edits: from applying an edit to the end of the frame that shows it recoloured.
#[derive(Resource, Debug, Default, Clone)]
pub struct EditTimings {
    /// When the edit of this frame started, if any.
    pub started: Option<Instant>,
    /// Recent edit → recoloured durations (the ECS part of the frame), newest last.
    pub recent: Vec<Duration>,
    /// The part of each of those spent in this editor's own systems (edit, solve, drawing,
    /// recolouring — up to the end of `Update`); the rest is bevy's transform, visibility
    /// and egui work of the same frame.
    pub own: Vec<Duration>,
    /// Log every measurement (set by `PLATELOAD_FRAME_LOG`).
    pub log: bool,
}

impl EditTimings {
    const KEEP: usize = 240;
    /// Record one measurement.
    pub fn push(&mut self, d: Duration) {
        if self.recent.len() == Self::KEEP {
            self.recent.remove(0);
        }
        self.recent.push(d);
    }
    /// Record the editor's own part of one measurement.
    pub fn push_own(&mut self, d: Duration) {
        if self.own.len() == Self::KEEP {
            self.own.remove(0);
        }
        self.own.push(d);
    }
}

/// Recovery copies: where, and when the last one was written.
#[derive(Resource, Debug, Clone)]
pub struct RecoveryState {
    /// Where copies go; `None` disables them.
    pub store: Option<RecoveryStore>,
    /// Shortest time between two copies.
    pub interval: Duration,
    /// Revision of the last copy written.
    pub written_revision: u64,
    /// When the last copy was written.
    pub last_write: Option<Instant>,
}

impl Default for RecoveryState {
    fn default() -> Self {
        RecoveryState { store: None, interval: Duration::from_secs(20), written_revision: 0, last_write: None }
    }
}

impl RecoveryState {
    /// Copies in the user's cache directory (see [`RecoveryStore::in_user_cache`]).
    pub fn in_user_cache() -> Self {
        RecoveryState { store: RecoveryStore::in_user_cache(), ..default() }
    }
}

/// Re-solve the scene after a change.
fn solve(mut doc: ResMut<SceneDoc>) {
    // Writing the result must not count as a change of the document, or this would run again
    // every frame; the view reacts to the same change that triggered this system.
    doc.bypass_change_detection().solve_if_stale();
}

/// The editor's own share of an edit frame ends with the recolouring.
fn own_timing(mut timings: ResMut<EditTimings>) {
    if let Some(t0) = timings.started {
        timings.push_own(t0.elapsed());
    }
}

/// Remember when the frame's edit started and stop the clock when the frame is done.
fn finish_timing(mut timings: ResMut<EditTimings>) {
    if let Some(t0) = timings.started.take() {
        let d = t0.elapsed();
        timings.push(d);
        if timings.log {
            info!("edit → recoloured (ECS) {:.2} ms", d.as_secs_f64() * 1e3);
        }
    }
}

/// Apply the actions of this frame.
#[allow(clippy::too_many_arguments)]
fn handle_actions(
    mut actions: MessageReader<Action>,
    mut doc: ResMut<SceneDoc>,
    mut selection: ResMut<Selection>,
    mut status: ResMut<Status>,
    mut prompts: ResMut<Prompts>,
    mut recovery: ResMut<RecoveryState>,
    mut timings: ResMut<EditTimings>,
    mut tools: ResMut<ToolState>,
    mut exit: MessageWriter<AppExit>,
    mut view: MessageWriter<ViewRequestMessage>,
) {
    for action in actions.read() {
        let started = Instant::now();
        let before = doc.revision;
        match action.clone() {
            Action::Edit { edit, merge, select } => {
                apply_edit(&mut doc, &mut status, &mut prompts, &edit, merge.as_deref());
                if doc.revision != before {
                    if let Some(sel) = select {
                        selection.items = sel;
                    }
                }
            }
            Action::Undo => match doc.undo() {
                Some(l) => status.info(format!("undone: {l}")),
                None => status.info("nothing to undo"),
            },
            Action::Redo => match doc.redo() {
                Some(l) => status.info(format!("redone: {l}")),
                None => status.info("nothing to redo"),
            },
            Action::Seal => doc.history.seal(),
            Action::Select(items) => selection.items = items,
            Action::ToggleSelect(r) => selection.toggle(r),
            Action::DeleteSelected(mode) => {
                let targets = selection.items.clone();
                delete(&mut doc, &mut status, &mut prompts, targets, mode);
            }
            Action::Delete { targets, mode } => delete(&mut doc, &mut status, &mut prompts, targets, mode),
            Action::DuplicateSelected(by) => {
                let targets = selection.items.clone();
                if targets.is_empty() {
                    status.info("select something to duplicate");
                } else {
                    let before: std::collections::HashSet<ElementRef> = doc.scene.element_ids().map(|(k, id)| ElementRef::new(k, id)).collect();
                    if apply_edit(&mut doc, &mut status, &mut prompts, &Edit::Duplicate { targets, by }, None) {
                        // Select the copies: the elements that were not there before.
                        selection.items = doc.scene.element_ids().map(|(k, id)| ElementRef::new(k, id)).filter(|r| !before.contains(r)).collect();
                    }
                }
            }
            Action::BuildBearer(ids) => match place::bearer_on(&doc.scene, &ids, None) {
                Ok(b) => {
                    let r = ElementRef::new(ElementKind::Bearer, &b.id);
                    if apply_edit(&mut doc, &mut status, &mut prompts, &Edit::Add(Element::Bearer(b)), None) {
                        selection.items = vec![r];
                    }
                }
                Err(e) => status.error(e.to_string()),
            },
            Action::BuildDeck(ids) => match place::deck_on(&doc.scene, &ids, tools.deck_kpa) {
                Ok(d) => {
                    let r = ElementRef::new(ElementKind::Deck, &d.id);
                    if apply_edit(&mut doc, &mut status, &mut prompts, &Edit::Add(Element::Deck(d)), None) {
                        selection.items = vec![r];
                    }
                }
                Err(e) => status.error(e.to_string()),
            },
            Action::MoveSelected(by) => {
                let targets = move_targets(&doc, &selection.items);
                if !targets.is_empty() {
                    apply_edit(&mut doc, &mut status, &mut prompts, &Edit::Move { targets, by }, None);
                }
            }
            Action::Open(path) => {
                if doc.is_dirty() {
                    prompts.0.push(Prompt::Unsaved { then: Then::Open(path) });
                } else {
                    carry_on(Then::Open(path), &mut doc, &mut selection, &mut status, &mut prompts, &mut recovery, &mut exit, &mut view);
                }
            }
            Action::New(scene) => {
                if doc.is_dirty() {
                    prompts.0.push(Prompt::Unsaved { then: Then::New(scene) });
                } else {
                    carry_on(Then::New(scene), &mut doc, &mut selection, &mut status, &mut prompts, &mut recovery, &mut exit, &mut view);
                }
            }
            Action::Save => match doc.path.clone() {
                Some(p) => {
                    save(&mut doc, &mut status, &mut recovery, &p);
                }
                None => prompts.0.push(Prompt::SaveAs { then: None }),
            },
            Action::SaveAs { path, then } => {
                if save(&mut doc, &mut status, &mut recovery, &path) {
                    if let Some(then) = then {
                        carry_on(then, &mut doc, &mut selection, &mut status, &mut prompts, &mut recovery, &mut exit, &mut view);
                    }
                }
            }
            Action::ExportSchedule(path) => match doc.analysis() {
                Some(a) => {
                    let csv = plateload::export::schedule::schedule_csv(a);
                    match plateload::scene::io::write_atomic(&path, csv.as_bytes()) {
                        Ok(()) => status.info(format!("wrote the schedule of {} base plates to {}", a.plates.len(), path.display())),
                        Err(e) => status.error(format!("could not write {}: {e}", path.display())),
                    }
                }
                None => status.error("the scene cannot be solved, so there is no schedule to write; see the problems listed"),
            },
            Action::WriteReport { path, note } => match doc.analysis() {
                Some(a) => {
                    let source = doc.path.as_ref().and_then(|p| p.file_name()).map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
                    let opts = plateload::export::report::ReportOptions { revision_note: note, date: plateload::export::report::today_utc(), source, ..Default::default() };
                    match plateload::export::report::save_report(&path, &doc.scene, a, &opts) {
                        Ok(()) => status.info(format!("wrote the report of {} base plates to {}", a.plates.len(), path.display())),
                        Err(e) => status.error(format!("could not write {}: {e}", path.display())),
                    }
                }
                None => status.error("the scene cannot be solved, so there is no report to write; see the problems listed"),
            },
            Action::Quit => {
                if doc.is_dirty() {
                    if !prompts.0.iter().any(|p| matches!(p, Prompt::Unsaved { then: Then::Quit })) {
                        prompts.0.push(Prompt::Unsaved { then: Then::Quit });
                    }
                } else {
                    carry_on(Then::Quit, &mut doc, &mut selection, &mut status, &mut prompts, &mut recovery, &mut exit, &mut view);
                }
            }
            Action::Continue { then, save: save_first } => {
                prompts.0.retain(|p| !matches!(p, Prompt::Unsaved { .. }));
                if save_first {
                    match doc.path.clone() {
                        Some(p) => {
                            if !save(&mut doc, &mut status, &mut recovery, &p) {
                                continue;
                            }
                        }
                        None => {
                            prompts.0.push(Prompt::SaveAs { then: Some(then) });
                            continue;
                        }
                    }
                } else if let Some(store) = &recovery.store {
                    // The changes are given up on purpose: their recovery copy goes too.
                    let _ = store.discard(doc.path.as_deref());
                }
                carry_on(then, &mut doc, &mut selection, &mut status, &mut prompts, &mut recovery, &mut exit, &mut view);
            }
            Action::Recover(restore) => {
                let Some(i) = prompts.0.iter().position(|p| matches!(p, Prompt::Recovery(_))) else { continue };
                let Prompt::Recovery(found) = prompts.0.remove(i) else { unreachable!() };
                if restore {
                    let path = doc.path.clone();
                    doc.replace(found.scene.clone(), path, false);
                    selection.items.clear();
                    status.info(format!("restored the recovery copy {}; save to keep it", found.path.display()));
                    view.write(ViewRequestMessage(ViewRequest::Fit));
                } else {
                    let _ = std::fs::remove_file(&found.path);
                    status.info("deleted the recovery copy");
                }
            }
            Action::View(v) => {
                view.write(ViewRequestMessage(v));
            }
        }
        if doc.revision != before {
            // A changed scene invalidates half-made bearers and decks.
            tools.picked.retain(|id| doc.scene.element_ids().any(|(_, i)| i == id));
            timings.started.get_or_insert(started);
        }
    }
}

/// A view change asked for by an action, for the view plugin.
#[derive(Message, Debug, Clone, Copy, PartialEq)]
pub struct ViewRequestMessage(pub ViewRequest);

/// Apply an edit, reporting the outcome; true if it was applied.
fn apply_edit(doc: &mut SceneDoc, status: &mut Status, prompts: &mut Prompts, edit: &Edit, merge: Option<&str>) -> bool {
    match doc.apply(edit, merge) {
        Ok(()) => {
            if merge.is_none() {
                status.info(edit.label());
            }
            true
        }
        Err(EditError::HasDependants { .. }) if matches!(edit, Edit::Delete { .. }) => {
            let Edit::Delete { targets, .. } = edit else { unreachable!() };
            let message = doc.apply(edit, None).err().map(|e| e.to_string()).unwrap_or_default();
            prompts.0.push(Prompt::Dependants { targets: targets.clone(), message: message.clone() });
            status.error(message);
            false
        }
        Err(e) => {
            status.error(e.to_string());
            false
        }
    }
}

fn delete(doc: &mut SceneDoc, status: &mut Status, prompts: &mut Prompts, targets: Vec<ElementRef>, mode: DeleteMode) {
    let targets: Vec<ElementRef> = targets.into_iter().filter(|t| t.kind != ElementKind::Site && t.kind != ElementKind::Combination).collect();
    if targets.is_empty() {
        status.info("select something to delete");
        return;
    }
    prompts.0.retain(|p| !matches!(p, Prompt::Dependants { .. }));
    apply_edit(doc, status, prompts, &Edit::Delete { targets, mode }, None);
}

/// What moves when the selection is moved: a bearer takes its posts with it in plan.
pub fn move_targets(doc: &SceneDoc, selection: &[ElementRef]) -> Vec<ElementRef> {
    let mut out: Vec<ElementRef> = Vec::new();
    let mut push = |r: ElementRef| {
        if !out.contains(&r) {
            out.push(r);
        }
    };
    for r in selection {
        if r.kind == ElementKind::Bearer {
            if let Some(b) = doc.scene.bearers.iter().find(|b| b.id == r.id) {
                b.posts.iter().for_each(|p| push(ElementRef::post(p)));
            }
            push(r.clone());
        } else if matches!(r.kind, ElementKind::Post | ElementKind::Deck | ElementKind::Brace | ElementKind::Load) {
            push(r.clone());
        }
    }
    out
}

fn save(doc: &mut SceneDoc, status: &mut Status, recovery: &mut RecoveryState, path: &std::path::Path) -> bool {
    let old = doc.path.clone();
    match doc.save_to(path) {
        Ok(()) => {
            status.info(format!("saved {}", path.display()));
            if let Some(store) = &recovery.store {
                let _ = store.discard(old.as_deref());
                let _ = store.discard(Some(path));
            }
            true
        }
        Err(e) => {
            status.error(format!("not saved: {e}"));
            false
        }
    }
}

#[allow(clippy::too_many_arguments)]
fn carry_on(
    then: Then,
    doc: &mut SceneDoc,
    selection: &mut Selection,
    status: &mut Status,
    prompts: &mut Prompts,
    recovery: &mut RecoveryState,
    exit: &mut MessageWriter<AppExit>,
    view: &mut MessageWriter<ViewRequestMessage>,
) {
    match then {
        Then::Quit => {
            if let Some(store) = &recovery.store {
                if !doc.is_dirty() {
                    let _ = store.discard(doc.path.as_deref());
                }
            }
            exit.write(AppExit::Success);
        }
        Then::Open(path) => match plateload::scene::io::read_scene(&path) {
            Ok(scene) => {
                doc.replace(scene, Some(path.clone()), true);
                selection.items.clear();
                status.info(format!("opened {}", path.display()));
                offer_recovery_for(doc, recovery, prompts, status);
                view.write(ViewRequestMessage(ViewRequest::Fit));
            }
            // The message carries file:line:col for syntax errors.
            Err(e) => status.error(format!("not opened: {e}")),
        },
        Then::New(scene) => {
            doc.replace(*scene, None, false);
            selection.items.clear();
            status.info("new scene (not saved yet)");
            view.write(ViewRequestMessage(ViewRequest::Fit));
        }
    }
}

/// Offer a recovery copy of the document's file, if one is there and differs from it.
fn offer_recovery_for(doc: &SceneDoc, recovery: &RecoveryState, prompts: &mut Prompts, status: &mut Status) {
    let Some(store) = &recovery.store else { return };
    match store.find(doc.path.as_deref()) {
        Ok(Some(found)) if found.scene != doc.scene => prompts.0.push(Prompt::Recovery(Box::new(found))),
        Ok(Some(_)) => {
            let _ = store.discard(doc.path.as_deref());
        }
        Ok(None) => {}
        Err(e) => status.error(format!("a recovery copy was found but cannot be read (left in place): {e}")),
    }
}

fn offer_recovery(doc: Res<SceneDoc>, recovery: Res<RecoveryState>, mut prompts: ResMut<Prompts>, mut status: ResMut<Status>) {
    offer_recovery_for(&doc, &recovery, &mut prompts, &mut status);
}

/// Keep a recovery copy of unsaved changes, at most every `interval`.
fn write_recovery(doc: Res<SceneDoc>, mut recovery: ResMut<RecoveryState>, mut status: ResMut<Status>) {
    if !doc.is_dirty() || recovery.written_revision == doc.revision {
        return;
    }
    if recovery.last_write.is_some_and(|t| t.elapsed() < recovery.interval) {
        return;
    }
    let Some(store) = recovery.store.clone() else { return };
    match store.write(doc.path.as_deref(), &doc.scene) {
        Ok(_) => {
            recovery.written_revision = doc.revision;
            recovery.last_write = Some(Instant::now());
        }
        Err(e) => {
            // Try again after the interval rather than every frame.
            recovery.last_write = Some(Instant::now());
            status.error(format!("could not write the recovery copy: {e}"));
        }
    }
}

/// How long the editor may sleep without input: until the next recovery copy could be due
/// while one is pending, else until something happens (input, a window event, a redraw asked
/// for by the panels).
pub fn idle_wait(doc: &SceneDoc, recovery: &RecoveryState) -> Duration {
    let pending = recovery.store.is_some() && doc.is_dirty() && recovery.written_revision != doc.revision;
    if pending {
        // Woken at the latest `interval` after the last update, which is no earlier than the
        // last copy: so the copy is due by then and is written at once.
        recovery.interval.max(Duration::from_millis(100))
    } else {
        Duration::MAX
    }
}

/// Draw only when something happened: the window's event loop sleeps until input, a window
/// event or a redraw request, or until the recovery copy is due. (Only where a window runs the
/// app; a picture keeps drawing until it is taken.)
fn pace_updates(mode: Res<super::Mode>, doc: Res<SceneDoc>, recovery: Res<RecoveryState>, settings: Option<ResMut<bevy::winit::WinitSettings>>) {
    use bevy::winit::UpdateMode;
    let Some(mut settings) = settings else { return };
    if !matches!(*mode, super::Mode::Editor) {
        return;
    }
    let wait = idle_wait(&doc, &recovery);
    // Unfocused, mouse movement over other windows does not wake it.
    let (focused, unfocused) = (UpdateMode::reactive(wait), UpdateMode::reactive_low_power(wait));
    if settings.focused_mode != focused || settings.unfocused_mode != unfocused {
        settings.focused_mode = focused;
        settings.unfocused_mode = unfocused;
    }
}

/// Ask for one more frame when this one may have left work for the next: actions or view
/// requests (the panels write theirs after the frame's actions were applied), clicks and
/// drags, a changed scene, a fit waiting for the size of the view. Without input nothing else
/// wakes the editor, so this is what lets a chain of frames finish.
#[allow(clippy::too_many_arguments)]
fn settle(
    mut actions: MessageReader<Action>,
    mut views: MessageReader<ViewRequestMessage>,
    mut clicks: MessageReader<ViewClick>,
    mut drags: MessageReader<ViewDrag>,
    doc: Res<SceneDoc>,
    selection: Res<Selection>,
    view: Res<super::view::ViewState>,
    mut redraw: MessageWriter<RequestRedraw>,
) {
    // Every reader must see its messages, so no short-cut evaluation here.
    let busy = [actions.read().count(), views.read().count(), clicks.read().count(), drags.read().count()].iter().any(|&n| n > 0);
    // A fit waits for the view's size; once known it is done in the next frame. (Before, the
    // window's events wake the editor anyway.)
    let fit_due = view.pending_fit.is_some() && view.ready();
    if busy || doc.is_changed() || selection.is_changed() || fit_due {
        redraw.write(RequestRedraw);
    }
}

/// Drop selected elements that no longer exist.
fn prune_selection(doc: Res<SceneDoc>, mut selection: ResMut<Selection>) {
    if !doc.is_changed() {
        return;
    }
    let keep: Vec<ElementRef> = selection.items.iter().filter(|r| doc.has(r)).cloned().collect();
    if keep.len() != selection.items.len() {
        selection.items = keep;
    }
    if selection.hovered.as_ref().is_some_and(|h| !doc.has(h)) {
        selection.hovered = None;
    }
}

/// The window's close button asks about unsaved changes first.
fn close_requests(mut closes: MessageReader<WindowCloseRequested>, mut actions: MessageWriter<Action>) {
    if closes.read().count() > 0 {
        actions.write(Action::Quit);
    }
}

/// Keyboard shortcuts.
fn shortcuts(
    keys: Option<Res<ButtonInput<KeyCode>>>,
    focus: Res<UiFocus>,
    selection: Res<Selection>,
    mut tools: ResMut<ToolState>,
    mut actions: MessageWriter<Action>,
    mut prompts: ResMut<Prompts>,
) {
    let Some(keys) = keys else { return };
    if focus.keyboard {
        return;
    }
    let ctrl = keys.any_pressed([KeyCode::ControlLeft, KeyCode::ControlRight, KeyCode::SuperLeft, KeyCode::SuperRight]);
    let shift = keys.any_pressed([KeyCode::ShiftLeft, KeyCode::ShiftRight]);
    let hit = |k: KeyCode| keys.just_pressed(k);
    if ctrl {
        if hit(KeyCode::KeyZ) && shift || hit(KeyCode::KeyY) {
            actions.write(Action::Redo);
        } else if hit(KeyCode::KeyZ) {
            actions.write(Action::Undo);
        } else if hit(KeyCode::KeyS) && shift {
            prompts.0.push(Prompt::SaveAs { then: None });
        } else if hit(KeyCode::KeyS) {
            actions.write(Action::Save);
        } else if hit(KeyCode::KeyD) {
            actions.write(Action::DuplicateSelected(tools.duplicate_by));
        } else if hit(KeyCode::KeyQ) {
            actions.write(Action::Quit);
        } else if hit(KeyCode::KeyA) {
            // Handled by the panels (select all needs the scene's ids); nothing here.
        }
        return;
    }
    if hit(KeyCode::Delete) || hit(KeyCode::Backspace) {
        actions.write(Action::DeleteSelected(DeleteMode::Refuse));
    }
    if hit(KeyCode::Escape) {
        if tools.tool != Tool::Select || !tools.picked.is_empty() {
            tools.picked.clear();
            tools.tool = Tool::Select;
        } else if !selection.items.is_empty() {
            actions.write(Action::Select(Vec::new()));
        }
    }
    if hit(KeyCode::Enter) || hit(KeyCode::NumpadEnter) {
        finish_tool(&mut tools, &mut actions);
    }
    if hit(KeyCode::KeyF) {
        actions.write(Action::View(if shift { ViewRequest::FitSelection } else { ViewRequest::Fit }));
    }
    for (k, preset) in [
        (KeyCode::Digit1, plateload::edit::pick::ViewPreset::Iso),
        (KeyCode::Digit2, plateload::edit::pick::ViewPreset::Plan),
        (KeyCode::Digit3, plateload::edit::pick::ViewPreset::Front),
        (KeyCode::Digit4, plateload::edit::pick::ViewPreset::Side),
    ] {
        if hit(k) {
            actions.write(Action::View(ViewRequest::Preset(preset)));
        }
    }
    if hit(KeyCode::KeyP) {
        actions.write(Action::View(ViewRequest::TogglePerspective));
    }
    // Nudge the selection by the snap step (the level with Page Up / Down).
    let step = if tools.snap_m > 0.0 { tools.snap_m } else { 0.1 };
    for (k, by) in [
        (KeyCode::ArrowRight, [step, 0.0, 0.0]),
        (KeyCode::ArrowLeft, [-step, 0.0, 0.0]),
        (KeyCode::ArrowUp, [0.0, step, 0.0]),
        (KeyCode::ArrowDown, [0.0, -step, 0.0]),
        (KeyCode::PageUp, [0.0, 0.0, step]),
        (KeyCode::PageDown, [0.0, 0.0, -step]),
    ] {
        if hit(k) && !selection.items.is_empty() {
            actions.write(Action::MoveSelected(by));
        }
    }
    for (k, tool) in [
        (KeyCode::KeyS, Tool::Select),
        (KeyCode::KeyT, Tool::Post),
        (KeyCode::KeyB, Tool::Bearer),
        (KeyCode::KeyK, Tool::Deck),
        (KeyCode::KeyX, Tool::Brace),
        (KeyCode::KeyL, Tool::Load(LoadTool::Point)),
    ] {
        if hit(k) {
            tools.tool = tool;
            tools.picked.clear();
        }
    }
}

/// Make the bearer or deck from what was picked (Enter or the panel's button).
pub fn finish_tool(tools: &mut ToolState, actions: &mut MessageWriter<Action>) {
    match tools.tool {
        Tool::Bearer if !tools.picked.is_empty() => {
            actions.write(Action::BuildBearer(std::mem::take(&mut tools.picked)));
        }
        Tool::Deck if !tools.picked.is_empty() => {
            actions.write(Action::BuildDeck(std::mem::take(&mut tools.picked)));
        }
        _ => {}
    }
}

/// Clicks in the 3D view, by tool.
fn tool_clicks(mut clicks: MessageReader<ViewClick>, doc: Res<SceneDoc>, mut tools: ResMut<ToolState>, mut actions: MessageWriter<Action>, mut status: ResMut<Status>) {
    for click in clicks.read() {
        match tool_click(&doc, &mut tools, click) {
            Ok(Some(a)) => {
                actions.write(a);
            }
            Ok(None) => {}
            Err(e) => status.error(e.to_string()),
        }
    }
}

/// What one click does with the current tool. Public for the tests.
pub fn tool_click(doc: &SceneDoc, tools: &mut ToolState, click: &ViewClick) -> Result<Option<Action>, EditError> {
    let scene = &doc.scene;
    let snap = |v: f64| place::snap(v, tools.snap_m);
    let hit_kind = |k: ElementKind| click.hit.as_ref().filter(|h| h.element.kind == k);
    let add = |e: Element| {
        let sel = vec![e.to_ref()];
        Action::Edit { edit: Edit::Add(e), merge: None, select: Some(sel) }
    };
    Ok(match tools.tool {
        Tool::Select => Some(match &click.hit {
            Some(h) if click.shift => Action::ToggleSelect(h.element.clone()),
            Some(h) => Action::Select(vec![h.element.clone()]),
            None if click.shift => return Ok(None),
            None => Action::Select(Vec::new()),
        }),
        Tool::Post => {
            let Some([x, y]) = click.ground else { return Ok(None) };
            let (x, y) = (snap(x), snap(y));
            if let Some(p) = place::post_near(scene, x, y) {
                return Err(EditError::Placement(format!("post {} already stands at ({x:.3}, {y:.3})", p.id)));
            }
            let base = scene.posts.iter().map(|p| p.base_level).fold(f64::INFINITY, f64::min);
            let base = if base.is_finite() { base } else { 0.0 };
            let mut post = place::post_at(scene, x, y, base, tools.post_height_m);
            if post.support.is_none() {
                let support = place::starter_support(&place::fresh_id(scene, "base-"));
                post.support = Some(support.id.clone());
                let sel = vec![ElementRef::post(&post.id)];
                Some(Action::Edit {
                    edit: Edit::Batch { label: format!("add post {}", post.id), edits: vec![Edit::Add(Element::SupportType(support)), Edit::Add(Element::Post(post))] },
                    merge: None,
                    select: Some(sel),
                })
            } else {
                Some(add(Element::Post(post)))
            }
        }
        Tool::Bearer | Tool::Deck => {
            let want = if tools.tool == Tool::Bearer { ElementKind::Post } else { ElementKind::Bearer };
            let Some(h) = hit_kind(want) else {
                return Err(EditError::Placement(format!("click a {want} (press Enter to finish, Esc to stop)")));
            };
            let id = h.element.id.clone();
            match tools.picked.iter().position(|p| *p == id) {
                Some(i) => {
                    tools.picked.remove(i);
                }
                None => tools.picked.push(id),
            }
            Some(Action::Select(tools.picked.iter().map(|p| ElementRef::new(want, p)).collect()))
        }
        Tool::Brace => {
            let Some(h) = hit_kind(ElementKind::Post) else {
                return Err(EditError::Placement("click two posts to brace between them".into()));
            };
            tools.picked.push(h.element.id.clone());
            if tools.picked.len() < 2 {
                return Ok(Some(Action::Select(vec![h.element.clone()])));
            }
            let picked = std::mem::take(&mut tools.picked);
            Some(add(Element::Brace(place::brace_between(scene, &picked[0], &picked[1], None)?)))
        }
        Tool::Load(kind) => {
            let Some(h) = &click.hit else { return Err(EditError::Placement("click an element to load".into())) };
            let id = place::fresh_id(scene, "Load-");
            let p = h.point;
            let kind = load_at(doc, tools, kind, h, [snap(p[0]), snap(p[1]), p[2]])?;
            Some(add(Element::Load(Load::new(id, tools.case, kind))))
        }
    })
}

/// The load the load tool makes where it hit.
fn load_at(doc: &SceneDoc, tools: &ToolState, kind: LoadTool, h: &Hit, p: [f64; 3]) -> Result<LoadKind, EditError> {
    let scene = &doc.scene;
    let need = |what: &str| EditError::Placement(format!("click a {what} for this load"));
    // A deck hit by the click, or the deck above the post/bearer clicked.
    let deck = || -> Option<&plateload::scene::model::Deck> {
        match h.element.kind {
            ElementKind::Deck => scene.decks.iter().find(|d| d.id == h.element.id),
            ElementKind::Load => {
                let l = scene.loads.iter().find(|l| l.id == h.element.id)?;
                match &l.kind {
                    LoadKind::DeckArea { deck, .. } | LoadKind::DeckPatch { deck, .. } | LoadKind::DeckPoint { deck, .. } => scene.decks.iter().find(|d| d.id == *deck),
                    _ => None,
                }
            }
            _ => None,
        }
    };
    Ok(match kind {
        LoadTool::Point => match h.element.kind {
            ElementKind::Post => LoadKind::PostTop { post: h.element.id.clone(), kn: tools.kn },
            ElementKind::Bearer => {
                let b = scene.bearers.iter().find(|b| b.id == h.element.id).ok_or_else(|| need("bearer"))?;
                let at_m = along_bearer(scene, b, p).ok_or_else(|| need("bearer"))?;
                LoadKind::BearerPoint { bearer: b.id.clone(), at_m: place::snap(at_m, tools.snap_m), kn: tools.kn }
            }
            _ => {
                let d = deck().ok_or_else(|| need("deck, bearer or post"))?;
                LoadKind::DeckPoint { deck: d.id.clone(), x: p[0], y: p[1], kn: tools.kn }
            }
        },
        LoadTool::Patch => {
            let d = deck().ok_or_else(|| need("deck"))?;
            let [w, l] = tools.patch_m;
            // Kept on the deck: a patch hanging over an edge is moved in.
            let fit = |c: f64, half: f64, (lo, hi): (f64, f64)| {
                let half = half.min((hi - lo) / 2.0);
                let c = c.clamp(lo + half, hi - half);
                (c - half, c + half)
            };
            let area = Rect { x: fit(p[0], w / 2.0, d.extent.x), y: fit(p[1], l / 2.0, d.extent.y) };
            LoadKind::DeckPatch { deck: d.id.clone(), area, intensity: Intensity::Kpa(tools.kpa) }
        }
        LoadTool::Area => {
            let d = deck().ok_or_else(|| need("deck"))?;
            LoadKind::DeckArea { deck: d.id.clone(), intensity: Intensity::Kpa(tools.kpa) }
        }
        LoadTool::Line => {
            let b = scene.bearers.iter().find(|b| b.id == h.element.id && h.element.kind == ElementKind::Bearer).ok_or_else(|| need("bearer"))?;
            let at = along_bearer(scene, b, p).ok_or_else(|| need("bearer"))?;
            let (lo, hi) = bearer_range(scene, b).ok_or_else(|| need("bearer"))?;
            let half = (tools.line_m / 2.0).min((hi - lo) / 2.0);
            let c = place::snap(at, tools.snap_m).clamp(lo + half, hi - half);
            LoadKind::BearerLine { bearer: b.id.clone(), from_m: c - half, to_m: c + half, kn_per_m: tools.kn_per_m }
        }
        LoadTool::Horizontal => {
            let direction = match tools.direction_deg.rem_euclid(360.0) {
                d if d == 0.0 => PlanDirection::PlusX,
                d if d == 90.0 => PlanDirection::PlusY,
                d if d == 180.0 => PlanDirection::MinusX,
                d if d == 270.0 => PlanDirection::MinusY,
                d => PlanDirection::Degrees(d),
            };
            LoadKind::Horizontal { x: p[0], y: p[1], level: p[2], kn: tools.kn, direction }
        }
    })
}

/// Distance of a point along a bearer from its first post, m.
fn along_bearer(scene: &plateload::Scene, b: &plateload::Bearer, p: [f64; 3]) -> Option<f64> {
    let first = scene.posts.iter().find(|q| Some(&q.id) == b.posts.first())?;
    let last = scene.posts.iter().find(|q| Some(&q.id) == b.posts.last())?;
    let (dx, dy) = (last.x - first.x, last.y - first.y);
    let len = dx.hypot(dy);
    let (ux, uy) = if len > 1e-9 { (dx / len, dy / len) } else { (1.0, 0.0) };
    Some((p[0] - first.x) * ux + (p[1] - first.y) * uy)
}

/// Range of a bearer along itself from its first post (overhangs included), m.
fn bearer_range(scene: &plateload::Scene, b: &plateload::Bearer) -> Option<(f64, f64)> {
    let first = scene.posts.iter().find(|q| Some(&q.id) == b.posts.first())?;
    let last = scene.posts.iter().find(|q| Some(&q.id) == b.posts.last())?;
    Some((-b.overhang_start_m, (last.x - first.x).hypot(last.y - first.y) + b.overhang_end_m))
}

/// Dragging selected elements moves them; one drag is one undo step.
fn drag_moves(mut drags: MessageReader<ViewDrag>, doc: Res<SceneDoc>, selection: Res<Selection>, tools: Res<ToolState>, mut applied: Local<(u64, [f64; 2])>, mut actions: MessageWriter<Action>) {
    for d in drags.read() {
        if applied.0 != d.serial {
            *applied = (d.serial, [0.0, 0.0]);
        }
        let total = [place::snap(d.to[0] - d.from[0], tools.snap_m), place::snap(d.to[1] - d.from[1], tools.snap_m)];
        let step = [total[0] - applied.1[0], total[1] - applied.1[1]];
        if step[0] != 0.0 || step[1] != 0.0 {
            let targets = move_targets(&doc, &selection.items);
            if !targets.is_empty() {
                actions.write(Action::Edit { edit: Edit::Move { targets, by: [step[0], step[1], 0.0] }, merge: Some(format!("drag-{}", d.serial)), select: None });
                applied.1 = total;
            }
        }
        if d.done {
            actions.write(Action::Seal);
        }
    }
}

/// Path with another extension, for default export names.
pub fn with_extension(path: Option<&std::path::Path>, ext: &str, fallback: &str) -> PathBuf {
    match path {
        Some(p) => p.with_extension(ext),
        None => PathBuf::from(format!("{fallback}.{ext}")),
    }
}
