//! Recovery copies of unsaved work, so a crash loses at most a few seconds of editing.
//!
//! The editor writes the scene it holds to a recovery file every little while when it has
//! unsaved changes, atomically (see [`crate::scene::io::write_atomic`]), and deletes the file when it
//! closes normally or saves. A recovery file still there at the next start means the last
//! session did not close normally; the editor offers it. One file per scene file (named by a
//! hash of its absolute path), one for an untitled scene. The file is an ordinary scene file
//! with two comment lines in front naming the scene file it belongs to and when it was written.

use std::path::{Path, PathBuf};
use std::time::{SystemTime, UNIX_EPOCH};

use crate::scene::io::{parse_scene, scene_to_ron, write_atomic, SceneFileError};
use crate::scene::model::Scene;

/// Where recovery copies live.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RecoveryStore {
    dir: PathBuf,
}

/// A recovery copy found on disk.
#[derive(Debug, Clone, PartialEq)]
pub struct Recovered {
    /// The recovery file.
    pub path: PathBuf,
    /// The scene file it belongs to (`None`: an untitled scene).
    pub original: Option<PathBuf>,
    /// When it was written, seconds since 1970-01-01 UTC.
    pub written_unix_s: u64,
    /// The scene it holds.
    pub scene: Scene,
}

const ORIGINAL_TAG: &str = "// plateload recovery copy of: ";
const WRITTEN_TAG: &str = "// written (unix seconds): ";
const UNTITLED: &str = "<untitled>";

/// FNV-1a, 64 bit: a hash that stays the same across builds and platforms.
// source: Fowler–Noll–Vo hash, FNV-1a variant, 64-bit offset basis and prime (IETF draft
// draft-eastlake-fnv)
fn fnv1a(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for b in bytes {
        h ^= u64::from(*b);
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

impl RecoveryStore {
    /// A store in `dir` (created when first written to).
    pub fn at(dir: impl Into<PathBuf>) -> Self {
        RecoveryStore { dir: dir.into() }
    }

    /// The store in the user's cache directory: `$XDG_CACHE_HOME/plateload/recovery`, else
    /// `$HOME/.cache/plateload/recovery` (`%LOCALAPPDATA%` on Windows); `None` if neither is set.
    pub fn in_user_cache() -> Option<Self> {
        let var = |k: &str| std::env::var_os(k).filter(|v| !v.is_empty()).map(PathBuf::from);
        let base = var("XDG_CACHE_HOME").or_else(|| var("HOME").map(|h| h.join(".cache"))).or_else(|| var("LOCALAPPDATA"))?;
        Some(RecoveryStore::at(base.join("plateload").join("recovery")))
    }

    /// The directory.
    pub fn dir(&self) -> &Path {
        &self.dir
    }

    /// The recovery file for a scene file (or for an untitled scene).
    pub fn path_for(&self, original: Option<&Path>) -> PathBuf {
        match original {
            None => self.dir.join("recovery-untitled.ron"),
            Some(p) => {
                let abs = std::path::absolute(p).unwrap_or_else(|_| p.to_owned());
                let stem = p.file_stem().map(|s| s.to_string_lossy().chars().filter(|c| c.is_alphanumeric() || *c == '-' || *c == '_').take(40).collect::<String>()).unwrap_or_default();
                self.dir.join(format!("recovery-{stem}-{:016x}.ron", fnv1a(abs.as_os_str().as_encoded_bytes())))
            }
        }
    }

    /// Write the recovery copy of a scene, atomically; returns the file written.
    pub fn write(&self, original: Option<&Path>, scene: &Scene) -> std::io::Result<PathBuf> {
        std::fs::create_dir_all(&self.dir)?;
        let path = self.path_for(original);
        let name = original
            .map(|p| std::path::absolute(p).unwrap_or_else(|_| p.to_owned()).display().to_string())
            .filter(|s| !s.contains('\n') && !s.contains('\r'))
            .unwrap_or_else(|| UNTITLED.to_owned());
        let now = SystemTime::now().duration_since(UNIX_EPOCH).map_or(0, |d| d.as_secs());
        let text = format!("{ORIGINAL_TAG}{name}\n{WRITTEN_TAG}{now}\n{}", scene_to_ron(scene));
        write_atomic(&path, text.as_bytes())?;
        Ok(path)
    }

    /// The recovery copy for a scene file, if there is one. A copy that cannot be read is
    /// reported as an error rather than silently ignored, so it can be looked at by hand.
    pub fn find(&self, original: Option<&Path>) -> Result<Option<Recovered>, SceneFileError> {
        let path = self.path_for(original);
        let text = match std::fs::read_to_string(&path) {
            Ok(t) => t,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(None),
            Err(source) => return Err(SceneFileError::Io { path, source }),
        };
        let mut original_path = None;
        let mut written = 0;
        for line in text.lines().take(2) {
            if let Some(rest) = line.strip_prefix(ORIGINAL_TAG) {
                original_path = (rest != UNTITLED).then(|| PathBuf::from(rest));
            } else if let Some(rest) = line.strip_prefix(WRITTEN_TAG) {
                written = rest.trim().parse().unwrap_or(0);
            }
        }
        let scene = parse_scene(&text, &path.display().to_string())?;
        Ok(Some(Recovered { path, original: original_path, written_unix_s: written, scene }))
    }

    /// Delete the recovery copy for a scene file, if any.
    pub fn discard(&self, original: Option<&Path>) -> std::io::Result<()> {
        match std::fs::remove_file(self.path_for(original)) {
            Err(e) if e.kind() != std::io::ErrorKind::NotFound => Err(e),
            _ => Ok(()),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn temp_dir(name: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("plateload-recovery-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        d
    }

    #[test]
    fn fnv1a_known_values() {
        // source: FNV test vectors (draft-eastlake-fnv appendix): FNV-1a 64 of "" and "a"
        assert_eq!(fnv1a(b""), 0xcbf2_9ce4_8422_2325);
        assert_eq!(fnv1a(b"a"), 0xaf63_dc4c_8601_ec8c);
    }

    #[test]
    fn write_find_discard_round_trip() {
        // common practice, no source
        let store = RecoveryStore::at(temp_dir("rt"));
        let scene = crate::scene::demo::default_scene();
        let file = Path::new("/some/where/bay.ron");
        assert_eq!(store.find(Some(file)).unwrap(), None);
        let written = store.write(Some(file), &scene).unwrap();
        assert!(written.file_name().unwrap().to_string_lossy().starts_with("recovery-bay-"));
        let found = store.find(Some(file)).unwrap().unwrap();
        assert_eq!(found.scene, scene);
        assert_eq!(found.original.as_deref(), Some(file));
        assert!(found.written_unix_s > 1_600_000_000);
        // Another file and the untitled scene have their own copies.
        assert_eq!(store.find(Some(Path::new("/other.ron"))).unwrap(), None);
        store.write(None, &scene).unwrap();
        assert_eq!(store.find(None).unwrap().unwrap().original, None);
        store.discard(Some(file)).unwrap();
        assert_eq!(store.find(Some(file)).unwrap(), None);
        store.discard(Some(file)).unwrap();
        let _ = std::fs::remove_dir_all(store.dir());
    }

    #[test]
    fn a_damaged_copy_is_an_error_not_silence() {
        // common practice, no source
        let store = RecoveryStore::at(temp_dir("bad"));
        std::fs::create_dir_all(store.dir()).unwrap();
        std::fs::write(store.path_for(None), "// plateload recovery copy of: <untitled>\n(format: 1, site: (").unwrap();
        let err = store.find(None).unwrap_err();
        assert!(err.to_string().contains("recovery-untitled.ron:"), "{err}");
        let _ = std::fs::remove_dir_all(store.dir());
    }
}
