//! The component catalogue as the editor uses it: the shipped one merged with the user's (from
//! the config directory and from beside the open scene), read again when the scene's file
//! changes. Panels pick entries from it; choosing one copies its values into the scene through
//! the ordinary undoable edits ([`plateload::scene::catalogue`] does the copying).

use std::path::PathBuf;

use bevy::prelude::*;
use plateload::scene::catalogue::{self, LoadedCatalogue};

use crate::app::doc::SceneDoc;

/// The catalogue for the open scene.
#[derive(Resource, Debug, Default)]
pub struct EditorCatalogue {
    /// The merged entries, the user files read, and their notes and problems.
    pub loaded: LoadedCatalogue,
    /// The scene file it was read for (outer `None`: not read yet).
    pub read_for: Option<Option<PathBuf>>,
}

/// Keeps [`EditorCatalogue`] in step with the document's file.
pub struct CataloguePlugin;

impl Plugin for CataloguePlugin {
    fn build(&self, app: &mut App) {
        app.init_resource::<EditorCatalogue>().add_systems(Update, read_catalogue.run_if(resource_changed::<SceneDoc>));
    }
}

fn read_catalogue(doc: Res<SceneDoc>, mut cat: ResMut<EditorCatalogue>) {
    if cat.read_for.as_ref() == Some(&doc.path) {
        return;
    }
    cat.loaded = catalogue::load_for(doc.path.as_deref());
    for p in &cat.loaded.problems {
        warn!("catalogue: {p}");
    }
    for n in &cat.loaded.notes {
        info!("catalogue: {n}");
    }
    cat.read_for = Some(doc.path.clone());
}

/// One line naming what the catalogue holds and where it came from, for the panels.
pub fn summary(cat: &LoadedCatalogue) -> String {
    let files: Vec<String> = cat.files.iter().map(|f| f.display().to_string()).collect();
    let from = if files.is_empty() { "shipped with plateload".to_owned() } else { format!("shipped + {}", files.join(" + ")) };
    format!("Catalogue: {from}")
}
