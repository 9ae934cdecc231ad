//! A small file dialog (a path field and the scene files of its folder), for open, save as and
//! the schedule and report exports. It needs no desktop toolkit, so it works the same on every platform.

use std::path::{Path, PathBuf};

use bevy_egui::egui;

use crate::app::doc::SceneDoc;
use crate::app::editor::with_extension;
use crate::app::{Action, Then};

/// What the dialog is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Purpose {
    /// Open a scene.
    #[default]
    Open,
    /// Save the scene under a new name.
    SaveAs,
    /// Write the support-load schedule.
    Schedule,
    /// Write the printable report (HTML).
    Report,
}

/// The dialog's state.
#[derive(Debug, Default)]
pub struct FileDialog {
    /// Shown.
    pub open: bool,
    /// What for.
    pub purpose: Purpose,
    /// The path typed.
    pub path: String,
    /// What to do after saving (when the save was asked for by "unsaved changes").
    pub then: Option<Then>,
    /// Revision note for the report's title block.
    pub note: String,
}

impl FileDialog {
    /// Show the dialog for a purpose, with a sensible starting path.
    pub fn open_for(&mut self, purpose: Purpose, doc: &SceneDoc) {
        self.open_for_then(purpose, doc, None);
    }

    /// Like [`FileDialog::open_for`], carrying on with `then` after saving.
    pub fn open_for_then(&mut self, purpose: Purpose, doc: &SceneDoc, then: Option<Then>) {
        let stem = slug(&doc.scene.site.name);
        let path = match purpose {
            Purpose::Open => doc.path.as_ref().and_then(|p| p.parent()).map_or_else(|| "./".into(), |d| format!("{}/", d.display())),
            Purpose::SaveAs => doc.path.clone().unwrap_or_else(|| PathBuf::from(format!("{stem}.ron"))).display().to_string(),
            Purpose::Schedule => with_extension(doc.path.as_deref(), "schedule.csv", &stem).display().to_string(),
            Purpose::Report => with_extension(doc.path.as_deref(), "report.html", &stem).display().to_string(),
        };
        let note = std::mem::take(&mut self.note);
        *self = FileDialog { open: true, purpose, path, then, note };
    }

    /// Draw the dialog if shown.
    pub fn ui(&mut self, ctx: &egui::Context, doc: &SceneDoc, actions: &mut Vec<Action>) {
        if !self.open {
            return;
        }
        let _ = doc;
        let Self { open, purpose, path, then, note } = self;
        let title = match purpose {
            Purpose::Open => "Open a scene",
            Purpose::SaveAs => "Save the scene as",
            Purpose::Schedule => "Export the support-load schedule (CSV)",
            Purpose::Report => "Write the printable load report (HTML)",
        };
        let mut done = false;
        let mut keep_open = true;
        egui::Window::new(title).collapsible(false).resizable(true).default_width(520.0).open(&mut keep_open).show(ctx, |ui| {
            ui.horizontal(|ui| {
                ui.label("File:");
                let r = ui.add(egui::TextEdit::singleline(path).desired_width(400.0));
                if r.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter)) {
                    done = true;
                }
            });
            if *purpose == Purpose::Report {
                ui.horizontal(|ui| {
                    ui.label("Revision note:");
                    ui.add(egui::TextEdit::singleline(note).desired_width(360.0).hint_text("e.g. Rev B: sole boards under row 3"));
                });
            }
            // The .ron (or .csv, .html) files next to the typed path, to click instead of typing.
            let typed = Path::new(path.as_str());
            let dir = if path.ends_with('/') || typed.is_dir() { typed.to_path_buf() } else { typed.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new(".")).to_path_buf() };
            let ext = match purpose {
                Purpose::Schedule => "csv",
                Purpose::Report => "html",
                Purpose::Open | Purpose::SaveAs => "ron",
            };
            let mut entries: Vec<(bool, PathBuf)> = std::fs::read_dir(&dir)
                .map(|rd| {
                    rd.filter_map(Result::ok)
                        .map(|e| e.path())
                        .filter(|p| p.is_dir() || p.extension().is_some_and(|x| x == ext))
                        .map(|p| (p.is_dir(), p))
                        .collect()
                })
                .unwrap_or_default();
            entries.sort_by(|a, b| b.0.cmp(&a.0).then(a.1.cmp(&b.1)));
            ui.label(format!("In {}:", dir.display()));
            egui::ScrollArea::vertical().max_height(220.0).show(ui, |ui| {
                if ui.selectable_label(false, "📁 ..").clicked() {
                    *path = format!("{}/", dir.join("..").display());
                }
                for (is_dir, p) in &entries {
                    let name = p.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
                    let label = if *is_dir { format!("📁 {name}") } else { name };
                    let r = ui.selectable_label(false, label);
                    if r.clicked() {
                        *path = if *is_dir { format!("{}/", p.display()) } else { p.display().to_string() };
                    }
                    if r.double_clicked() && !is_dir {
                        done = true;
                    }
                }
            });
            ui.horizontal(|ui| {
                let verb = match purpose {
                    Purpose::Open => "Open",
                    Purpose::SaveAs => "Save",
                    Purpose::Schedule | Purpose::Report => "Write",
                };
                if ui.button(verb).clicked() {
                    done = true;
                }
                if ui.button("Cancel").clicked() {
                    *open = false;
                }
                if *purpose != Purpose::Open && Path::new(path.as_str()).exists() {
                    ui.label(egui::RichText::new("the file exists and will be replaced").color(egui::Color32::from_rgb(0xb0, 0x60, 0x00)));
                }
            });
        });
        if !keep_open {
            *open = false;
        }
        if done && !path.trim().is_empty() && !path.ends_with('/') {
            let p = PathBuf::from(path.trim());
            match purpose {
                Purpose::Open => actions.push(Action::Open(p)),
                Purpose::SaveAs => actions.push(Action::SaveAs { path: p, then: then.take() }),
                Purpose::Schedule => actions.push(Action::ExportSchedule(p)),
                Purpose::Report => actions.push(Action::WriteReport { path: p, note: note.clone() }),
            }
            *open = false;
        }
    }
}

/// A file-name-friendly version of a site name.
pub fn slug(name: &str) -> String {
    let s: String = name.chars().map(|c| if c.is_alphanumeric() { c.to_ascii_lowercase() } else { '-' }).collect();
    let s = s.split('-').filter(|p| !p.is_empty()).collect::<Vec<_>>().join("-");
    if s.is_empty() { "scene".into() } else { s }
}
