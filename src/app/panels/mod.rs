//! The egui panels. One system hands the egui context to each panel; every panel is a plain
//! struct with a `ui` method that reads the document and pushes [`Action`]s — no panel changes
//! the scene itself.

pub mod elements;
pub mod files;
pub mod inspector;
pub mod layout;
pub mod overlay;
pub mod results;
pub mod site;
pub mod spare;
pub mod tools;

use bevy::prelude::*;
use bevy::window::PrimaryWindow;
use bevy_egui::{egui, EguiContexts, EguiPrimaryContextPass};
use plateload::edit::DeleteMode;
use plateload::CAUTION;

use super::doc::{SceneDoc, Selection, Status};
use super::editor::{EditTimings, Prompt, Prompts, ToolState, UiFocus};
use super::view::draw::Drawn;
use super::view::ViewState;
use super::{Action, Mode, Then};

/// The editor's panels and the view's overlay (legend, labels, caution).
pub struct PanelsPlugin;

impl Plugin for PanelsPlugin {
    fn build(&self, app: &mut App) {
        app.init_resource::<Panels>()
            .add_systems(PreUpdate, quiet_modifiers.after(bevy_egui::EguiPreUpdateSet::ProcessInput).before(bevy_egui::EguiPreUpdateSet::BeginPass))
            .add_systems(EguiPrimaryContextPass, draw_ui)
            .add_systems(Update, (window_title, layout_for_empty_scene));
    }
}

/// Which tab the right-hand panel shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum RightTab {
    /// The selected element.
    #[default]
    Inspector,
    /// Site, ground and combinations.
    Site,
    /// The layout generator.
    Layout,
}

/// State of every panel.
#[derive(Resource)]
pub struct Panels {
    /// Element list.
    pub elements: elements::ElementsPanel,
    /// Inspector.
    pub inspector: inspector::InspectorPanel,
    /// Site panel.
    pub site: site::SitePanel,
    /// Layout generator.
    pub layout: layout::LayoutPanel,
    /// Results.
    pub results: results::ResultsPanel,
    /// Tools.
    pub tools: tools::ToolsPanel,
    /// File dialog.
    pub files: files::FileDialog,
    /// Right panel tab.
    pub right: RightTab,
    /// Show the results panel.
    pub show_results: bool,
    /// Labels of the 3D view, placed once per view.
    pub labels: overlay::LabelCache,
}

impl Default for Panels {
    fn default() -> Self {
        Panels {
            elements: default(),
            inspector: default(),
            site: default(),
            layout: default(),
            results: default(),
            tools: default(),
            files: default(),
            right: default(),
            show_results: true,
            labels: default(),
        }
    }
}

/// Colours for egui, as `Color32`.
pub fn rgb([r, g, b]: [u8; 3]) -> egui::Color32 {
    egui::Color32::from_rgb(r, g, b)
}

fn window_title(doc: Res<SceneDoc>, mode: Res<Mode>, mut windows: Query<&mut Window, With<PrimaryWindow>>) {
    if !doc.is_changed() || !matches!(*mode, Mode::Editor) {
        return;
    }
    if let Ok(mut w) = windows.single_mut() {
        let t = doc.title();
        if w.title != t {
            w.title = t;
        }
    }
}

/// bevy_egui reports the modifier keys to egui as an event every frame, and egui asks for
/// another frame after any event, so the editor would never go to sleep. egui keeps the keys'
/// state between frames, so the event is passed on only when they changed (or along with other
/// events, which wake the editor anyway).
fn quiet_modifiers(mut inputs: Query<&mut bevy_egui::EguiInput>, mut last: Local<Option<egui::Modifiers>>) {
    for mut input in &mut inputs {
        let events = &mut input.0.events;
        let Some(m) = events.iter().rev().find_map(|e| if let egui::Event::ModifiersChanged(m) = e { Some(*m) } else { None }) else { continue };
        let others = events.iter().any(|e| !matches!(e, egui::Event::ModifiersChanged(_)));
        if !others && *last == Some(m) {
            events.retain(|e| !matches!(e, egui::Event::ModifiersChanged(_)));
        }
        *last = Some(m);
    }
}

/// A new, empty scene opens with the layout generator at hand and says what to enter first.
pub fn layout_for_empty_scene(doc: Res<SceneDoc>, mut panels: ResMut<Panels>, mut status: ResMut<Status>) {
    if !doc.is_changed() || !doc.scene.posts.is_empty() || doc.history.undo_len() + doc.history.redo_len() > 0 {
        return;
    }
    panels.right = RightTab::Layout;
    let what = if doc.path.as_ref().is_some_and(|p| !p.exists()) { "new file, not saved yet" } else { "empty scene" };
    status.info(format!("{what}: lay out posts and members with the layout generator (right) or the tools (left), and enter the site's allowable bearing pressure under Site & combinations (ground bearing is not checked until then)"));
}

/// Draw the panels (editor) or only the overlay (picture), and note where the 3D view is.
#[allow(clippy::too_many_arguments)]
fn draw_ui(
    mut contexts: EguiContexts,
    mode: Res<Mode>,
    doc: Res<SceneDoc>,
    selection: Res<Selection>,
    status: Res<Status>,
    mut prompts: ResMut<Prompts>,
    mut tools: ResMut<ToolState>,
    mut view: ResMut<ViewState>,
    mut panels: ResMut<Panels>,
    mut focus: ResMut<UiFocus>,
    timings: Res<EditTimings>,
    drawn: Res<Drawn>,
    (without, mut spare): (Option<Res<super::view::Without>>, Option<ResMut<super::view::spare::SpareView>>),
    mut settings: ResMut<super::settings::EditorSettings>,
    catalogue: Res<crate::app::catalogue::EditorCatalogue>,
    mut out: MessageWriter<Action>,
) -> Result {
    let ctx = contexts.ctx_mut()?.clone();
    let mut actions: Vec<Action> = Vec::new();
    let picture = matches!(&*mode, Mode::Picture(spec) if !spec.editor_ui);
    // The overlay's settings as the panels found them: changed only when a control changed them
    // (a change asks for the frame that works the map out again).
    let spare_asked = spare.as_ref().map(|s| s.asked());
    let mut spare_on = spare.as_ref().map(|s| s.on);
    let mut root = egui::Ui::new(ctx.clone(), "plateload-root".into(), egui::UiBuilder::new().layer_id(egui::LayerId::background()).max_rect(ctx.viewport_rect()));
    if !picture {
        let panels = &mut *panels;
        caution_strip(&mut root);
        egui::Panel::top("menu").show(&mut root, |ui| menu_bar(ui, &doc, &selection, &mut view, panels, &tools, &mut spare_on, &mut actions));
        egui::Panel::bottom("status").show(&mut root, |ui| status_bar(ui, &doc, &status, &timings, &drawn));
        egui::Panel::left("left").default_size(250.0).show(&mut root, |ui| {
            panels.tools.ui(ui, &mut tools, &doc.scene, &mut actions);
            ui.separator();
            panels.elements.ui(ui, &doc.scene, &selection, &mut actions);
        });
        egui::Panel::right("right").default_size(330.0).show(&mut root, |ui| {
            ui.horizontal(|ui| {
                ui.selectable_value(&mut panels.right, RightTab::Inspector, "Inspector");
                ui.selectable_value(&mut panels.right, RightTab::Site, "Site & combinations");
                ui.selectable_value(&mut panels.right, RightTab::Layout, "Layout generator");
            });
            ui.separator();
            egui::ScrollArea::vertical().id_salt("right-scroll").show(ui, |ui| match panels.right {
                RightTab::Inspector => panels.inspector.ui(ui, &doc, &catalogue.loaded.catalogue, &selection, &mut actions),
                RightTab::Site => panels.site.ui(ui, &doc.scene, &mut actions),
                RightTab::Layout => {
                    ui.label(crate::app::catalogue::summary(&catalogue.loaded)).on_hover_text(catalogue.loaded.problems.join("\n"));
                    panels.layout.ui(ui, &doc.scene, &catalogue.loaded.catalogue, &mut actions)
                }
            });
        });
        if panels.show_results {
            egui::Panel::bottom("results").resizable(true).default_size(230.0).show(&mut root, |ui| panels.results.ui(ui, &doc, &view.settings, &selection, &mut actions));
        }
        if let Ok(a) = &doc.result {
            let comb = view.settings.combination;
            let comb_name = comb.and_then(|c| doc.scene.combinations.get(c)).map_or("governing combination".to_string(), |c| format!("combination “{}”", c.name));
            let mut open = settings.legend_open;
            egui::Panel::bottom("legend").show(&mut root, |ui| overlay::legend_strip(ui, a, comb, &comb_name, &mut open));
            if open != settings.legend_open {
                settings.legend_open = open;
            }
        }
        if let (Some(s), Some(on)) = (spare.as_mut(), spare_on) {
            let s = s.bypass_change_detection();
            s.on = on;
            if s.on {
                let checking = doc.analysis().map(super::view::spare::checking_combinations).unwrap_or_default();
                egui::Panel::bottom("spare").show(&mut root, |ui| spare::strip(ui, s, &checking));
            }
        }
        let (open, all) = ctx.input(|i| (i.modifiers.command && i.key_pressed(egui::Key::O), i.modifiers.command && i.key_pressed(egui::Key::A)));
        if open && !ctx.egui_wants_keyboard_input() {
            panels.files.open_for(files::Purpose::Open, &doc);
        }
        if all && !ctx.egui_wants_keyboard_input() {
            actions.push(Action::Select(doc.scene.posts.iter().map(|p| plateload::edit::ElementRef::post(&p.id)).collect()));
        }
        panels.files.ui(&ctx, &doc, &mut actions);
        prompt_windows(&ctx, &mut prompts, &doc, &mut panels.files, &mut actions);
    }
    // What is left is the 3D view (in a picture: what the title, caution and legend leave).
    let full = ctx.viewport_rect();
    let rect = if picture { overlay::picture_view_rect(&ctx, full) } else { root.available_rect_before_wrap() };
    let vp = [rect.min.x, rect.min.y, rect.width().max(0.0), rect.height().max(0.0)];
    if view.viewport != vp {
        view.viewport = vp;
    }
    if !without.is_some_and(|w| w.has(super::view::ViewPart::Overlay)) {
        overlay::draw(&ctx, full, rect, &doc, &view, &selection, picture, &mut panels.labels);
        if let Some(s) = spare.as_deref().filter(|s| s.on) {
            if picture {
                let side = rect.max.x < full.max.x - 100.0;
                let (at, w) = if side { (egui::Pos2::new(rect.max.x + 10.0, rect.max.y - 10.0), full.max.x - rect.max.x - 20.0) } else { (egui::Pos2::new(rect.min.x + 10.0, rect.max.y - 10.0), 380.0) };
                spare::picture_legend(&ctx, at, w, s);
            } else if let Some(p) = ctx.pointer_hover_pos().filter(|p| rect.contains(*p)) {
                let painter = ctx.layer_painter(egui::LayerId::new(egui::Order::Middle, egui::Id::new("spare-hover")));
                spare::hover_card(&painter, rect, p, s);
            }
        }
    }
    if let Some(s) = spare.as_mut() {
        if Some(s.asked()) != spare_asked {
            s.set_changed();
        }
    }
    let pointer_in_view = !picture && ctx.pointer_latest_pos().is_some_and(|p| rect.contains(p)) && !ctx.is_pointer_over_egui() && !ctx.egui_is_using_pointer();
    let keyboard = ctx.egui_wants_keyboard_input();
    if focus.pointer_in_view != pointer_in_view || focus.keyboard != keyboard {
        *focus = UiFocus { keyboard, pointer_in_view };
    }
    for a in actions {
        out.write(a);
    }
    Ok(())
}

/// The caution, always in view above everything else.
fn caution_strip(root: &mut egui::Ui) {
    egui::Panel::top("caution").frame(egui::Frame::new().fill(egui::Color32::from_rgb(0xff, 0xe0, 0x82)).inner_margin(egui::Margin::symmetric(8, 4))).show(root, |ui| {
        ui.label(egui::RichText::new(CAUTION).color(egui::Color32::BLACK).strong());
    });
}

#[allow(clippy::too_many_arguments)]
fn menu_bar(ui: &mut egui::Ui, doc: &SceneDoc, selection: &Selection, view: &mut ViewState, panels: &mut Panels, tools: &ToolState, spare_on: &mut Option<bool>, actions: &mut Vec<Action>) {
    egui::MenuBar::new().ui(ui, |ui| {
        ui.menu_button("File", |ui| {
            if ui.button("Open…  (Ctrl+O)").clicked() {
                panels.files.open_for(files::Purpose::Open, doc);
                ui.close();
            }
            ui.menu_button("Open a demo site", |ui| {
                for (i, (name, _)) in plateload::scene::demo::DEMO_SCENES.iter().enumerate() {
                    if ui.button(name.trim_end_matches(".ron")).clicked() {
                        if let Ok(s) = plateload::scene::demo::demo_scene(i) {
                            actions.push(Action::New(Box::new(s)));
                        }
                        ui.close();
                    }
                }
            });
            if ui.button("New empty scene").clicked() {
                actions.push(Action::New(Box::new(super::doc::new_scene("New site"))));
                ui.close();
            }
            ui.separator();
            if ui.button("Save  (Ctrl+S)").clicked() {
                actions.push(Action::Save);
                ui.close();
            }
            if ui.button("Save as…  (Ctrl+Shift+S)").clicked() {
                panels.files.open_for(files::Purpose::SaveAs, doc);
                ui.close();
            }
            ui.separator();
            if ui.add_enabled(doc.analysis().is_some(), egui::Button::new("Export schedule CSV…")).clicked() {
                panels.files.open_for(files::Purpose::Schedule, doc);
                ui.close();
            }
            if ui.add_enabled(doc.analysis().is_some(), egui::Button::new("Write report…")).clicked() {
                panels.files.open_for(files::Purpose::Report, doc);
                ui.close();
            }
            ui.separator();
            if ui.button("Quit  (Ctrl+Q)").clicked() {
                actions.push(Action::Quit);
                ui.close();
            }
        });
        ui.menu_button("Edit", |ui| {
            let undo = doc.history.undo_label().map_or("Undo".into(), |l| format!("Undo {l}"));
            if ui.add_enabled(doc.history.undo_len() > 0, egui::Button::new(format!("{undo}  (Ctrl+Z)"))).clicked() {
                actions.push(Action::Undo);
                ui.close();
            }
            let redo = doc.history.redo_label().map_or("Redo".into(), |l| format!("Redo {l}"));
            if ui.add_enabled(doc.history.redo_len() > 0, egui::Button::new(format!("{redo}  (Ctrl+Y)"))).clicked() {
                actions.push(Action::Redo);
                ui.close();
            }
            ui.separator();
            let any = !selection.items.is_empty();
            if ui.add_enabled(any, egui::Button::new("Duplicate  (Ctrl+D)")).clicked() {
                actions.push(Action::DuplicateSelected(tools.duplicate_by));
                ui.close();
            }
            if ui.add_enabled(any, egui::Button::new("Delete  (Del)")).clicked() {
                actions.push(Action::DeleteSelected(DeleteMode::Refuse));
                ui.close();
            }
            if ui.button("Select all posts").clicked() {
                actions.push(Action::Select(doc.scene.posts.iter().map(|p| plateload::edit::ElementRef::post(&p.id)).collect()));
                ui.close();
            }
        });
        ui.menu_button("View", |ui| {
            use plateload::edit::pick::ViewPreset as P;
            for (label, p) in [("Isometric  (1)", P::Iso), ("Plan  (2)", P::Plan), ("Elevation, looking along +y  (3)", P::Front), ("Elevation, looking along −x  (4)", P::Side)] {
                if ui.button(label).clicked() {
                    actions.push(Action::View(super::ViewRequest::Preset(p)));
                    ui.close();
                }
            }
            if ui.button("Fit the scene  (F)").clicked() {
                actions.push(Action::View(super::ViewRequest::Fit));
                ui.close();
            }
            if ui.button("Fit the selection  (Shift+F)").clicked() {
                actions.push(Action::View(super::ViewRequest::FitSelection));
                ui.close();
            }
            let persp = if view.camera.orthographic { "Perspective  (P)" } else { "Parallel projection  (P)" };
            if ui.button(persp).clicked() {
                actions.push(Action::View(super::ViewRequest::TogglePerspective));
                ui.close();
            }
            ui.separator();
            let s = &mut view.settings;
            ui.checkbox(&mut s.show_loads, "Load arrows");
            ui.checkbox(&mut s.show_decks, "Decks");
            ui.checkbox(&mut s.labels, "Labels on the worst plates");
            ui.checkbox(&mut s.colour_posts, "Colour posts like their plates");
            ui.checkbox(&mut panels.show_results, "Results panel");
            if let Some(on) = spare_on.as_mut() {
                ui.separator();
                ui.checkbox(on, "Spare capacity on the decks").on_hover_text("where the next load can go: the largest extra imposed load at each point of the decks; D places it where the pointer is");
            }
        });
        ui.separator();
        ui.label("Colour by:");
        let names: Vec<String> = doc.scene.combinations.iter().map(|c| if c.checks_capacity { c.name.clone() } else { format!("{} (not a capacity check)", c.name) }).collect();
        let current = view.settings.combination.and_then(|c| names.get(c).cloned()).unwrap_or_else(|| "governing combination".into());
        let mut choice = view.settings.combination;
        egui::ComboBox::from_id_salt("combination").selected_text(current).show_ui(ui, |ui| {
            ui.selectable_value(&mut choice, None, "governing combination");
            for (i, n) in names.iter().enumerate() {
                ui.selectable_value(&mut choice, Some(i), n);
            }
        });
        if choice != view.settings.combination {
            view.settings.combination = choice;
        }
    });
}

fn status_bar(ui: &mut egui::Ui, doc: &SceneDoc, status: &Status, timings: &EditTimings, drawn: &Drawn) {
    ui.horizontal(|ui| {
        let colour = if status.error { egui::Color32::from_rgb(0xb0, 0x20, 0x20) } else { ui.visuals().text_color() };
        ui.label(egui::RichText::new(&status.text).color(colour));
        ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
            let last = timings.recent.last().map_or(String::new(), |d| format!("edit → view {:.1} ms · ", d.as_secs_f64() * 1e3));
            ui.label(format!(
                "{last}solve {:.1} ms · {} posts · {} entities · {}",
                doc.solve_time.as_secs_f64() * 1e3,
                doc.scene.posts.len(),
                drawn.entities.len(),
                if doc.is_dirty() { "unsaved changes" } else { "saved" }
            ));
        });
    });
}

/// Modal questions: unsaved changes, dependants of a deletion, a recovery copy, a file name.
fn prompt_windows(ctx: &egui::Context, prompts: &mut Prompts, doc: &SceneDoc, files: &mut files::FileDialog, actions: &mut Vec<Action>) {
    let Some(first) = prompts.0.first().cloned() else { return };
    let mut close = false;
    match first {
        Prompt::Unsaved { then } => {
            let what = match &then {
                Then::Quit => "closing".to_string(),
                Then::Open(p) => format!("opening {}", p.display()),
                Then::New(_) => "starting another scene".to_string(),
            };
            egui::Modal::new(egui::Id::new("unsaved")).show(ctx, |ui| {
                ui.heading("Unsaved changes");
                ui.label(format!("The scene has changes that are not saved. Save them before {what}?"));
                ui.horizontal(|ui| {
                    if ui.button("Save").clicked() {
                        actions.push(Action::Continue { then: then.clone(), save: true });
                    }
                    if ui.button("Don't save").clicked() {
                        actions.push(Action::Continue { then: then.clone(), save: false });
                    }
                    if ui.button("Cancel").clicked() {
                        close = true;
                    }
                });
            });
        }
        Prompt::Dependants { targets, message } => {
            egui::Modal::new(egui::Id::new("dependants")).show(ctx, |ui| {
                ui.heading("Other elements depend on this");
                ui.label(&message);
                ui.horizontal(|ui| {
                    if ui.button("Delete them too").on_hover_text("Delete everything that rests on it, all the way down").clicked() {
                        actions.push(Action::Delete { targets: targets.clone(), mode: DeleteMode::Cascade });
                        close = true;
                    }
                    if ui
                        .button("Unhook members")
                        .on_hover_text("Bearers and decks keep standing on their other supports where they have two; what cannot stand is deleted")
                        .clicked()
                    {
                        actions.push(Action::Delete { targets: targets.clone(), mode: DeleteMode::Detach });
                        close = true;
                    }
                    if ui.button("Cancel").clicked() {
                        close = true;
                    }
                });
            });
        }
        Prompt::Recovery(found) => {
            egui::Modal::new(egui::Id::new("recovery")).show(ctx, |ui| {
                ui.heading("Unsaved work was found");
                let whose = found.original.as_ref().map_or("an untitled scene".into(), |p| p.display().to_string());
                ui.label(format!(
                    "The last session did not close normally. A recovery copy of {whose} ({} posts) is in {}.",
                    found.scene.posts.len(),
                    found.path.display()
                ));
                ui.horizontal(|ui| {
                    if ui.button("Restore it").clicked() {
                        actions.push(Action::Recover(true));
                    }
                    if ui.button("Delete it").clicked() {
                        actions.push(Action::Recover(false));
                    }
                    if ui.button("Decide later").on_hover_text("Keep the copy; it is offered again next time").clicked() {
                        close = true;
                    }
                });
            });
        }
        Prompt::SaveAs { then } => {
            files.open_for_then(files::Purpose::SaveAs, doc, then);
            close = true;
        }
    }
    if close {
        prompts.0.remove(0);
    }
}
