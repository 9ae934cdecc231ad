//! The 3D editor and picture maker (bevy + bevy_egui), a shell over the engine.
//!
//! Add [`PlateloadPlugins`] and insert a [`SceneDoc`]. The shell holds no engineering logic:
//! panels and tools send [`Action`]s; [`editor`] turns them into undoable
//! [`plateload::edit::Edit`]s on the document, re-solves with [`plateload::analyse`] when the
//! scene changed, and [`view`] shows the engine's drawing geometry ([`plateload::edit::pick::shapes`])
//! coloured by the engine's results with the engine's palette. Picking and the camera maths are
//! the engine's too ([`plateload::edit::pick`]).
//!
//! Frame order ([`EditorSystems`], chained in `Update`): input → apply actions → solve → draw
//! the scene → recolour. The egui panels run afterwards in `EguiPrimaryContextPass` and their
//! actions are applied at the start of the next frame.

pub mod catalogue;
pub mod doc;
pub mod editor;
pub mod panels;
pub mod settings;
pub mod shipped;
pub mod snapshot;
pub mod view;

#[cfg(test)]
mod tests;

use std::path::PathBuf;

use bevy::app::PluginGroupBuilder;
use bevy::prelude::*;
use plateload::edit::{DeleteMode, Edit, ElementRef};
use plateload::edit::pick::ViewPreset;
use plateload::Scene;

pub use doc::SceneDoc;
pub use editor::EditorPlugin;
pub use panels::PanelsPlugin;
pub use view::ViewPlugin;

/// Everything the shell can be asked to do, from a panel, a tool or a key.
#[derive(Message, Debug, Clone, PartialEq)]
pub enum Action {
    /// Apply an edit; `merge` folds it into the previous step with the same key; `select`
    /// selects these elements afterwards.
    Edit {
        /// The edit.
        edit: Edit,
        /// Merge key (a field being dragged or typed into).
        merge: Option<String>,
        /// Elements to select after the edit.
        select: Option<Vec<ElementRef>>,
    },
    /// Undo the last step.
    Undo,
    /// Redo the last undone step.
    Redo,
    /// End the current merge of edits (a drag or text entry finished).
    Seal,
    /// Select exactly these elements.
    Select(Vec<ElementRef>),
    /// Add an element to the selection or take it out.
    ToggleSelect(ElementRef),
    /// Delete the selected elements.
    DeleteSelected(DeleteMode),
    /// Delete given elements.
    Delete {
        /// What to delete.
        targets: Vec<ElementRef>,
        /// What happens to their dependants.
        mode: DeleteMode,
    },
    /// Copy the selected elements, offset by (dx, dy, dz) m.
    DuplicateSelected([f64; 3]),
    /// Lay a bearer on these posts (in any order).
    BuildBearer(Vec<String>),
    /// Lay a deck across these bearers (in any order).
    BuildDeck(Vec<String>),
    /// Move the selected elements by (dx, dy, dz) m.
    MoveSelected([f64; 3]),
    /// Open a scene file (asks first if there are unsaved changes).
    Open(PathBuf),
    /// Start from another scene without a file (asks first if there are unsaved changes).
    New(Box<Scene>),
    /// Save to the document's file (asks for one if it has none).
    Save,
    /// Save to a new file and make it the document's file; then carry on with `then`, if
    /// given and the save worked.
    SaveAs {
        /// The file.
        path: PathBuf,
        /// What was waiting for the save.
        then: Option<Then>,
    },
    /// Write the support-load schedule CSV.
    ExportSchedule(PathBuf),
    /// Write the printable HTML report, with a revision note for its title block.
    WriteReport {
        /// The file.
        path: PathBuf,
        /// Revision note.
        note: String,
    },
    /// Close the editor (asks first if there are unsaved changes).
    Quit,
    /// Answer to "unsaved changes": carry on with `then`, saving first if `save` is set.
    Continue {
        /// What was asked for.
        then: Then,
        /// Save before carrying on.
        save: bool,
    },
    /// Restore the offered recovery copy (`true`) or delete it (`false`).
    Recover(bool),
    /// Move, turn or zoom the view.
    View(ViewRequest),
}

/// What to do once unsaved changes are dealt with.
#[derive(Debug, Clone, PartialEq)]
pub enum Then {
    /// Open a file.
    Open(PathBuf),
    /// Start from a scene without a file.
    New(Box<Scene>),
    /// Close the editor.
    Quit,
}

/// A change of the view.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ViewRequest {
    /// Frame the whole scene, keeping the direction.
    Fit,
    /// Look from a preset direction and frame the scene.
    Preset(ViewPreset),
    /// Switch between perspective and parallel projection.
    TogglePerspective,
    /// Frame the selection.
    FitSelection,
}

/// What the app is for this run.
#[derive(Resource, Debug, Clone, PartialEq)]
pub enum Mode {
    /// The interactive editor.
    Editor,
    /// Render one picture and exit.
    Picture(snapshot::PictureSpec),
}

/// The frame's system order, chained in `Update`.
#[derive(SystemSet, Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum EditorSystems {
    /// Keys, mouse and tools turn into actions.
    Input,
    /// Actions change the document.
    Apply,
    /// The changed scene is solved.
    Solve,
    /// The view's entities follow the scene.
    Sync,
    /// Plates and cues take the colours of the results.
    Recolour,
}

/// The editor's plugins: document and commands, 3D view, panels, the catalogue, and the fonts
/// and window icon shipped in `assets/`.
pub struct PlateloadPlugins;

impl PluginGroup for PlateloadPlugins {
    fn build(self) -> PluginGroupBuilder {
        PluginGroupBuilder::start::<Self>()
            .add(EditorPlugin)
            .add(settings::SettingsPlugin)
            .add(ViewPlugin)
            .add(PanelsPlugin)
            .add(catalogue::CataloguePlugin)
            .add(shipped::ShippedAssetsPlugin)
    }
}

fn window_plugin(title: String, size: Option<[u32; 2]>) -> WindowPlugin {
    let mut window = Window { title, ..default() };
    if let Some([w, h]) = size {
        window.resolution = bevy::window::WindowResolution::new(w, h).with_scale_factor_override(1.0);
        window.resizable = false;
    } else {
        window.resolution = bevy::window::WindowResolution::new(1400, 900);
    }
    WindowPlugin {
        primary_window: Some(window),
        // Closing asks about unsaved changes first (see `editor::close_requests`).
        close_when_requested: false,
        ..default()
    }
}

fn base_app(doc: SceneDoc, mode: Mode, title: String, size: Option<[u32; 2]>) -> App {
    let mut app = App::new();
    app.add_plugins(DefaultPlugins.set(window_plugin(title, size)))
        .add_plugins(bevy_egui::EguiPlugin::default())
        .insert_resource(mode)
        .insert_resource(doc)
        .add_plugins(PlateloadPlugins);
    app
}

/// Open the editor on a scene (read from `path`, if given) and run until it is closed.
/// `count_updates`: write the number of frames so far to this file after each one (to check
/// that the editor sleeps when nothing happens).
pub fn run(doc: SceneDoc, count_updates: Option<PathBuf>) -> anyhow::Result<()> {
    let title = doc.title();
    let mut app = base_app(doc, Mode::Editor, title, None);
    app.insert_resource(editor::RecoveryState::in_user_cache());
    app.insert_resource(settings::SettingsFile::in_user_config());
    // Draw on demand; `editor::pace_updates` keeps the wake-up timer of the recovery copy.
    app.insert_resource(bevy::winit::WinitSettings::desktop_app());
    if let Some(file) = count_updates {
        app.add_systems(Last, move |mut n: Local<u64>| {
            *n += 1;
            let _ = plateload::scene::io::write_atomic(&file, n.to_string().as_bytes());
        });
    }
    match app.run() {
        AppExit::Success => Ok(()),
        AppExit::Error(code) => anyhow::bail!("the editor stopped with code {code}"),
    }
}

/// Render a picture of a scene to a PNG file and exit.
pub fn snapshot(scene: Scene, spec: snapshot::PictureSpec) -> anyhow::Result<()> {
    let out = spec.out.clone();
    let size = spec.size;
    let doc = SceneDoc::new(scene, None);
    let without = view::Without(spec.without.clone());
    let mut app = base_app(doc, Mode::Picture(spec), "plateload picture".into(), Some(size));
    app.insert_resource(without);
    app.add_plugins(snapshot::SnapshotPlugin);
    match app.run() {
        AppExit::Success => Ok(()),
        AppExit::Error(_) => anyhow::bail!("the picture {} could not be made (see the messages above)", out.display()),
    }
}
