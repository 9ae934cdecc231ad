//! The 3D editor (bevy + bevy_egui). Work in progress: the window shell is built on top of the
//! engine in the following commits.

use std::path::PathBuf;

/// Open the editor on a scene.
pub fn run(scene: plateload::Scene, path: Option<PathBuf>) {
    let _ = (scene, path);
    eprintln!("the editor is not built yet in this revision");
}
