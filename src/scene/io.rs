//! Scene files: reading RON with file:line:col errors, writing one element per line, atomically.
//!
//! The reader is shared with the component catalogue ([`parse_ron`]).

use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

use ron::extensions::Extensions;

use crate::scene::model::Scene;

/// A scene (or catalogue) file that could not be read.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum SceneFileError {
    /// The file could not be read or written.
    #[error("{path}: {source}")]
    Io {
        /// File path.
        path: PathBuf,
        /// What the system said.
        source: std::io::Error,
    },
    /// The text is not a valid scene (or catalogue).
    #[error("{origin}:{line}:{col}: {message}")]
    Syntax {
        /// File path or other name of the text.
        origin: String,
        /// Line, from 1.
        line: usize,
        /// Column, from 1.
        col: usize,
        /// What is wrong.
        message: String,
    },
}

fn options() -> ron::Options {
    // Optional fields may be written without `Some(..)`.
    ron::Options::default().with_default_extension(Extensions::IMPLICIT_SOME)
}

/// Parse scene text; `origin` names it in errors (a path, or e.g. `<demo>`).
pub fn parse_scene(text: &str, origin: &str) -> Result<Scene, SceneFileError> {
    parse_ron(text, origin)
}

/// Parse any RON text the way scene files are read (optional values may be written bare),
/// with `origin:line:col` syntax errors.
pub fn parse_ron<T: serde::de::DeserializeOwned>(text: &str, origin: &str) -> Result<T, SceneFileError> {
    options().from_str::<T>(text).map_err(|e| SceneFileError::Syntax {
        origin: origin.to_owned(),
        line: e.span.start.line,
        col: e.span.start.col,
        message: e.code.to_string(),
    })
}

/// Read a scene file.
pub fn read_scene(path: &Path) -> Result<Scene, SceneFileError> {
    let text = fs::read_to_string(path).map_err(|source| SceneFileError::Io { path: path.to_owned(), source })?;
    parse_scene(&text, &path.display().to_string())
}

/// The scene as RON text, the way scene files are written: the top-level fields one per line,
/// each element of a list (support type, post, bearer, deck, brace, load, combination…) on a
/// line of its own with its fields in declaration order, and the site and settings spread over
/// a few lines. The layout comes from the nesting depth alone, so fields and lists added to the
/// model later are written the same way without a change here. Every field is written except
/// those the model itself leaves out (`skip_serializing_if`), which are only ever informative.
pub fn scene_to_ron(scene: &Scene) -> String {
    to_ron_lines(scene)
}

/// Any value as RON the way scene files are written (see [`scene_to_ron`]): pretty down to the
/// elements of the top-level lists, each of those compact on one line.
pub fn to_ron_lines<T: serde::Serialize>(value: &T) -> String {
    // Depth 1: the top-level struct's fields; depth 2: the items of its lists (and the fields
    // of the site and settings); deeper: compact, on the item's line. Strings are written as
    // typed (no `\'` for an apostrophe); one holding `"` or `\` becomes a raw string.
    let config = ron::ser::PrettyConfig::new()
        .indentor("  ")
        .struct_names(false)
        .depth_limit(2)
        .escape_strings(false)
        .extensions(Extensions::IMPLICIT_SOME);
    let mut text = options().to_string_pretty(value, config).expect("scene data is always serialisable");
    text.push('\n');
    text
}

/// The comment block at the top of a scene text (comment and blank lines before the first
/// other line), with its line ends; it is kept when a file is written again ([`rewrite_scene`]).
pub fn header_comments(text: &str) -> &str {
    let mut end = 0;
    for line in text.split_inclusive('\n') {
        let t = line.trim();
        if !(t.is_empty() || t.starts_with("//")) {
            break;
        }
        end += line.len();
    }
    &text[..end]
}

/// Lines (from 1) after the header that hold a comment, which writing the scene again would
/// drop. Strings are skipped, so `"//"` inside a name is not a comment.
pub fn comments_after_header(text: &str) -> Vec<usize> {
    let header = header_comments(text);
    let mut lines = Vec::new();
    let mut line = 1 + header.matches('\n').count();
    let mut in_string = false;
    let mut chars = text[header.len()..].chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '\n' => line += 1,
            '\\' if in_string => {
                if chars.next() == Some('\n') {
                    line += 1;
                }
            }
            '"' => in_string = !in_string,
            '/' if !in_string && matches!(chars.peek(), Some('/' | '*')) => {
                if lines.last() != Some(&line) {
                    lines.push(line);
                }
            }
            _ => {}
        }
    }
    lines
}

/// A scene text written again the way scene files are written ([`scene_to_ron`]), its header
/// comments kept. Comments further down are not kept (see [`comments_after_header`]).
pub fn rewrite_scene(text: &str, origin: &str) -> Result<String, SceneFileError> {
    let scene = parse_scene(text, origin)?;
    let header = header_comments(text);
    let mut out = String::with_capacity(text.len());
    out.push_str(header);
    if !header.is_empty() && !header.ends_with('\n') {
        out.push('\n');
    }
    out.push_str(&scene_to_ron(&scene));
    Ok(out)
}

/// Write a file so that a crash or full disk part-way leaves the old file whole: the bytes go to
/// a temporary file beside it, are flushed to disk, and only then replace the old one by rename.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    write_atomic_with(path, bytes, |_| Ok(()))
}

/// [`write_atomic`] with a hook run after the temporary file is written and before the rename;
/// tests use it to simulate a crash mid-save.
pub fn write_atomic_with(path: &Path, bytes: &[u8], before_rename: impl FnOnce(&Path) -> std::io::Result<()>) -> std::io::Result<()> {
    let dir = path.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "scene".into());
    let tmp = dir.join(format!(".{name}.tmp-{}", std::process::id()));
    let result = (|| {
        let mut f = fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        drop(f);
        before_rename(&tmp)?;
        fs::rename(&tmp, path)?;
        // Make the rename itself durable where the platform allows opening a directory.
        if let Ok(d) = fs::File::open(dir) {
            let _ = d.sync_all();
        }
        Ok(())
    })();
    if result.is_err() {
        let _ = fs::remove_file(&tmp);
    }
    result
}

/// Save a scene atomically.
pub fn save_scene(path: &Path, scene: &Scene) -> Result<(), SceneFileError> {
    write_atomic(path, scene_to_ron(scene).as_bytes()).map_err(|source| SceneFileError::Io { path: path.to_owned(), source })
}
