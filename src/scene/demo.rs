//! The invented demo sites shipped in `scenes/`. The first is the editor's default scene.

use crate::scene::io::{parse_scene, SceneFileError};
use crate::scene::model::Scene;

/// (file name, RON text) of every demo scene, default first.
pub const DEMO_SCENES: [(&str, &str); 3] = [
    ("larkfield-falsework.ron", include_str!("../../scenes/larkfield-falsework.ron")),
    ("tannery-loading-bay.ron", include_str!("../../scenes/tannery-loading-bay.ron")),
    ("harbour-sheeted-face.ron", include_str!("../../scenes/harbour-sheeted-face.ron")),
];

/// The default demo scene.
pub fn default_scene() -> Scene {
    demo_scene(0).expect("the embedded default scene parses")
}

/// Demo scene by position in [`DEMO_SCENES`].
pub fn demo_scene(i: usize) -> Result<Scene, SceneFileError> {
    let (name, text) = DEMO_SCENES[i.min(DEMO_SCENES.len() - 1)];
    parse_scene(text, name)
}
