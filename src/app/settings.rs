//! The editor's own settings, kept between runs in a small RON file in the user's config
//! directory (`$XDG_CONFIG_HOME/plateload/editor.ron`, else `~/.config/plateload/editor.ron`).
//!
//! Only how the editor looks is kept here, never anything about a scene. A missing or unreadable
//! file gives the defaults (an unreadable one is reported once and left in place until the next
//! change overwrites it); writes are atomic.

use std::path::{Path, PathBuf};

use bevy::prelude::*;
use serde::{Deserialize, Serialize};

/// What the editor remembers between runs.
#[derive(Resource, Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct EditorSettings {
    /// The legend under the 3D view is unfolded.
    pub legend_open: bool,
}

impl Default for EditorSettings {
    fn default() -> Self {
        EditorSettings { legend_open: true }
    }
}

/// Where the settings are read from and written to; `None`: not kept (tests, pictures).
#[derive(Resource, Debug, Clone, Default, PartialEq)]
pub struct SettingsFile(pub Option<PathBuf>);

impl SettingsFile {
    /// The file in the user's config directory, if there is one.
    pub fn in_user_config() -> Self {
        let var = |k: &str| std::env::var_os(k).filter(|v| !v.is_empty()).map(PathBuf::from);
        let base = var("XDG_CONFIG_HOME").or_else(|| var("HOME").map(|h| h.join(".config"))).or_else(|| var("APPDATA"));
        SettingsFile(base.map(|b| b.join("plateload").join("editor.ron")))
    }
}

impl EditorSettings {
    /// Read the settings; the defaults if the file is missing. An unreadable file is an error
    /// with its path and, for syntax, line and column.
    pub fn read(path: &Path) -> Result<EditorSettings, String> {
        let text = match std::fs::read_to_string(path) {
            Ok(t) => t,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(EditorSettings::default()),
            Err(e) => return Err(format!("{}: {e}", path.display())),
        };
        ron::from_str(&text).map_err(|e| format!("{}:{}:{}: {}", path.display(), e.span.start.line, e.span.start.col, e.code))
    }

    /// Write the settings atomically, making the directory if needed.
    pub fn write(&self, path: &Path) -> std::io::Result<()> {
        if let Some(dir) = path.parent() {
            std::fs::create_dir_all(dir)?;
        }
        let text = ron::ser::to_string_pretty(self, ron::ser::PrettyConfig::default()).map_err(std::io::Error::other)?;
        plateload::scene::io::write_atomic(path, text.as_bytes())
    }
}

/// Reads the settings at start and writes them when they change.
pub struct SettingsPlugin;

impl Plugin for SettingsPlugin {
    fn build(&self, app: &mut App) {
        app.init_resource::<SettingsFile>()
            .init_resource::<EditorSettings>()
            .add_systems(PreStartup, load_settings)
            .add_systems(Last, save_settings.run_if(resource_changed::<EditorSettings>));
    }
}

fn load_settings(file: Res<SettingsFile>, mut settings: ResMut<EditorSettings>, mut status: ResMut<super::doc::Status>) {
    let Some(path) = &file.0 else { return };
    match EditorSettings::read(path) {
        Ok(s) => *settings = s,
        Err(e) => status.error(format!("editor settings not read, using the defaults: {e}")),
    }
}

fn save_settings(file: Res<SettingsFile>, settings: Res<EditorSettings>, mut last: Local<Option<EditorSettings>>, mut status: ResMut<super::doc::Status>) {
    let Some(path) = &file.0 else { return };
    // The first run sees the values just read: nothing to write.
    let Some(before) = last.replace(settings.clone()) else { return };
    if before != *settings {
        if let Err(e) = settings.write(path) {
            status.error(format!("could not save the editor settings to {}: {e}", path.display()));
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn temp(name: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("plateload-settings-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        d
    }

    #[test]
    fn settings_round_trip_through_a_new_directory() {
        // common practice, no source: what is written is read back
        let path = temp("round").join("sub").join("editor.ron");
        assert_eq!(EditorSettings::read(&path).unwrap(), EditorSettings::default(), "missing file: defaults");
        let s = EditorSettings { legend_open: false };
        s.write(&path).unwrap();
        assert_eq!(EditorSettings::read(&path).unwrap(), s);
        let leftovers: Vec<_> = std::fs::read_dir(path.parent().unwrap()).unwrap().map(|e| e.unwrap().file_name()).collect();
        assert_eq!(leftovers.len(), 1, "no temporary file left: {leftovers:?}");
    }

    #[test]
    fn a_broken_settings_file_is_reported_with_its_position() {
        // common practice, no source
        let dir = temp("broken");
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("editor.ron");
        std::fs::write(&path, "(\n  legend_open: maybe,\n)").unwrap();
        let e = EditorSettings::read(&path).unwrap_err();
        assert!(e.contains("editor.ron:2:"), "{e}");
        // Fields it does not know (from a newer version) and missing ones do not stop it.
        std::fs::write(&path, "(legend_open: false, kept_by_a_later_version: 3)").unwrap();
        assert_eq!(EditorSettings::read(&path).unwrap(), EditorSettings { legend_open: false });
        std::fs::write(&path, "()").unwrap();
        assert_eq!(EditorSettings::read(&path).unwrap(), EditorSettings::default());
    }
}
