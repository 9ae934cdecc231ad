//! The open document: the scene, its undo history, its file, and the latest results.
//!
//! Everything here is plain state with no systems; [`crate::app::editor`] drives it. The scene
//! only changes through [`SceneDoc::apply`], [`SceneDoc::undo`], [`SceneDoc::redo`] and
//! [`SceneDoc::replace`], and each of them moves [`SceneDoc::revision`] on, which is what the
//! solver and the view watch.

use std::path::{Path, PathBuf};
use std::time::Duration;

use bevy::prelude::*;
use plateload::edit::{self, Edit, EditError, ElementRef, History};
use plateload::{Analysis, AnalysisError, Scene};

/// The scene being edited and everything known about it.
#[derive(Resource)]
pub struct SceneDoc {
    /// The scene.
    pub scene: Scene,
    /// Undo and redo steps.
    pub history: History,
    /// The file it was read from or last saved to.
    pub path: Option<PathBuf>,
    /// History state at the last open or save; `None` when the scene was never saved as it is
    /// (a restored recovery copy).
    saved_state: Option<u64>,
    /// Moves on with every change of the scene.
    pub revision: u64,
    /// Results of the latest solve, or why there are none.
    pub result: Result<Analysis, AnalysisError>,
    /// Revision the result belongs to.
    pub solved_revision: u64,
    /// How long the latest solve took.
    pub solve_time: Duration,
}

impl SceneDoc {
    /// A document for a scene (solved at once) read from `path`, if any.
    pub fn new(scene: Scene, path: Option<PathBuf>) -> Self {
        let t = std::time::Instant::now();
        let result = plateload::analyse(&scene);
        let solve_time = t.elapsed();
        SceneDoc { scene, history: History::default(), path, saved_state: Some(0), revision: 1, result, solved_revision: 1, solve_time }
    }

    /// A document for a file that does not exist yet: an empty scene named after the file,
    /// unsaved until the first save writes it.
    pub fn new_file(path: PathBuf) -> Self {
        let name = path.file_stem().map_or("new site".into(), |n| n.to_string_lossy().into_owned());
        let mut doc = SceneDoc::new(new_scene(&name), Some(path));
        doc.saved_state = None;
        doc
    }

    /// Whether the scene differs from its file.
    pub fn is_dirty(&self) -> bool {
        self.saved_state != Some(self.history.state())
    }

    /// Apply an edit as one undo step (or folded into the last step with the same `merge` key).
    pub fn apply(&mut self, edit: &Edit, merge: Option<&str>) -> Result<(), EditError> {
        let before = self.history.state();
        self.history.apply_merging(&mut self.scene, edit, merge)?;
        if self.history.state() != before {
            self.revision += 1;
        }
        Ok(())
    }

    /// Undo; returns what was undone.
    pub fn undo(&mut self) -> Option<String> {
        let label = self.history.undo(&mut self.scene)?;
        self.revision += 1;
        Some(label)
    }

    /// Redo; returns what was redone.
    pub fn redo(&mut self) -> Option<String> {
        let label = self.history.redo(&mut self.scene)?;
        self.revision += 1;
        Some(label)
    }

    /// Put another scene in (opened or restored), forgetting the history. `saved` says whether
    /// it is the content of `path` as it is on disk.
    pub fn replace(&mut self, scene: Scene, path: Option<PathBuf>, saved: bool) {
        self.scene = scene;
        self.history.clear();
        self.path = path;
        self.saved_state = saved.then_some(self.history.state());
        self.revision += 1;
    }

    /// Save to `path` atomically and make it the document's file.
    pub fn save_to(&mut self, path: &Path) -> Result<(), plateload::scene::io::SceneFileError> {
        plateload::scene::io::save_scene(path, &self.scene)?;
        self.path = Some(path.to_owned());
        self.saved_state = Some(self.history.state());
        self.history.seal();
        Ok(())
    }

    /// Solve the scene if it changed since the last solve.
    pub fn solve_if_stale(&mut self) -> bool {
        if self.solved_revision == self.revision {
            return false;
        }
        let t = std::time::Instant::now();
        self.result = plateload::analyse(&self.scene);
        self.solve_time = t.elapsed();
        self.solved_revision = self.revision;
        true
    }

    /// The results, when the scene could be solved.
    pub fn analysis(&self) -> Option<&Analysis> {
        self.result.as_ref().ok()
    }

    /// Whether an element exists.
    pub fn has(&self, r: &ElementRef) -> bool {
        edit::index_of(&self.scene, r).is_some() || matches!(r.kind, plateload::scene::model::ElementKind::Site)
    }

    /// The file name for titles.
    pub fn title(&self) -> String {
        let name = self.path.as_ref().and_then(|p| p.file_name()).map_or("untitled".into(), |n| n.to_string_lossy().into_owned());
        format!("{}{name} — plateload", if self.is_dirty() { "● " } else { "" })
    }
}

/// An empty scene: no support types, posts or members; the default combinations and settings.
pub fn new_scene(name: &str) -> Scene {
    // No allowable bearing pressure until the planner enters the site's: until then ground
    // bearing is reported as not checked, never judged against a made-up figure.
    let mut scene = Scene::empty(name, 0.0);
    scene.site.allowable_bearing_kpa = None;
    scene
}

/// The selected elements and the one under the pointer.
#[derive(Resource, Default, Debug, Clone, PartialEq)]
pub struct Selection {
    /// Selected elements, in the order picked.
    pub items: Vec<ElementRef>,
    /// Element under the pointer in the 3D view.
    pub hovered: Option<ElementRef>,
}

impl Selection {
    /// The single selected element, if exactly one is selected.
    pub fn single(&self) -> Option<&ElementRef> {
        match &self.items[..] {
            [one] => Some(one),
            _ => None,
        }
    }
    /// Whether an element is selected.
    pub fn contains(&self, r: &ElementRef) -> bool {
        self.items.contains(r)
    }
    /// Add or remove `r`.
    pub fn toggle(&mut self, r: ElementRef) {
        match self.items.iter().position(|x| *x == r) {
            Some(i) => {
                self.items.remove(i);
            }
            None => self.items.push(r),
        }
    }
}

/// A short message for the status line.
#[derive(Resource, Default, Debug, Clone, PartialEq)]
pub struct Status {
    /// The text.
    pub text: String,
    /// Whether it reports a failure.
    pub error: bool,
}

impl Status {
    /// Report something done.
    pub fn info(&mut self, text: impl Into<String>) {
        self.text = text.into();
        self.error = false;
    }
    /// Report a failure.
    pub fn error(&mut self, text: impl Into<String>) {
        self.text = text.into();
        self.error = true;
    }
}
