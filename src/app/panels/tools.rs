//! The tool bar: which placement tool the next click uses, and its values.

use bevy_egui::egui;
use plateload::scene::loads::Case;
use plateload::Scene;

use crate::app::editor::{LoadTool, Tool, ToolState};
use crate::app::Action;

/// The tools panel (its state is the editor's [`ToolState`]).
#[derive(Debug, Default)]
pub struct ToolsPanel;

impl ToolsPanel {
    /// Draw the tools and their settings.
    pub fn ui(&mut self, ui: &mut egui::Ui, tools: &mut ToolState, scene: &Scene, actions: &mut Vec<Action>) {
        ui.heading("Tools");
        let before = tools.tool;
        ui.horizontal_wrapped(|ui| {
            for (t, label, tip) in [
                (Tool::Select, "Select", "Click to select, Shift+click to add; drag a selected element to move it (S)"),
                (Tool::Post, "Post", "Click the ground to place a post (T)"),
                (Tool::Bearer, "Bearer", "Click posts along a line, then Enter (B)"),
                (Tool::Deck, "Deck", "Click parallel bearers, then Enter (K)"),
                (Tool::Brace, "Brace", "Click two posts (X)"),
            ] {
                ui.selectable_value(&mut tools.tool, t, label).on_hover_text(tip);
            }
        });
        ui.horizontal_wrapped(|ui| {
            ui.label("Load:");
            for (k, label) in [(LoadTool::Point, "point"), (LoadTool::Patch, "patch"), (LoadTool::Area, "area"), (LoadTool::Line, "line"), (LoadTool::Horizontal, "horizontal")] {
                ui.selectable_value(&mut tools.tool, Tool::Load(k), label);
            }
        });
        if tools.tool != before {
            tools.picked.clear();
        }
        egui::Grid::new("tool-settings").num_columns(2).show(ui, |ui| {
            ui.label("Grid snap");
            ui.add(egui::DragValue::new(&mut tools.snap_m).speed(0.01).range(0.0..=10.0).suffix(" m"));
            ui.end_row();
            match tools.tool {
                Tool::Select => {
                    ui.label("Duplicate offset");
                    ui.horizontal(|ui| {
                        for v in &mut tools.duplicate_by {
                            ui.add(egui::DragValue::new(v).speed(0.05).suffix(" m"));
                        }
                    });
                    ui.end_row();
                }
                Tool::Post => {
                    if scene.posts.is_empty() {
                        ui.label("Post height");
                        ui.add(egui::DragValue::new(&mut tools.post_height_m).speed(0.05).range(0.1..=100.0).suffix(" m"));
                        ui.end_row();
                    }
                }
                Tool::Deck => {
                    ui.label("Deck self-weight");
                    ui.add(egui::DragValue::new(&mut tools.deck_kpa).speed(0.01).range(0.0..=100.0).suffix(" kPa"));
                    ui.end_row();
                }
                Tool::Load(kind) => {
                    ui.label("Case");
                    ui.horizontal(|ui| {
                        for c in Case::ALL {
                            ui.selectable_value(&mut tools.case, c, c.name());
                        }
                    });
                    ui.end_row();
                    match kind {
                        LoadTool::Point | LoadTool::Horizontal => {
                            ui.label("Force");
                            ui.add(egui::DragValue::new(&mut tools.kn).speed(0.1).suffix(" kN"));
                            ui.end_row();
                        }
                        LoadTool::Patch | LoadTool::Area => {
                            ui.label("Pressure");
                            ui.add(egui::DragValue::new(&mut tools.kpa).speed(0.05).suffix(" kPa"));
                            ui.end_row();
                        }
                        LoadTool::Line => {
                            ui.label("Intensity");
                            ui.add(egui::DragValue::new(&mut tools.kn_per_m).speed(0.05).suffix(" kN/m"));
                            ui.end_row();
                            ui.label("Length");
                            ui.add(egui::DragValue::new(&mut tools.line_m).speed(0.05).range(0.02..=1000.0).suffix(" m"));
                            ui.end_row();
                        }
                    }
                    if kind == LoadTool::Patch {
                        ui.label("Patch size");
                        ui.horizontal(|ui| {
                            ui.add(egui::DragValue::new(&mut tools.patch_m[0]).speed(0.05).range(0.02..=1000.0).prefix("x ").suffix(" m"));
                            ui.add(egui::DragValue::new(&mut tools.patch_m[1]).speed(0.05).range(0.02..=1000.0).prefix("y ").suffix(" m"));
                        });
                        ui.end_row();
                    }
                    if kind == LoadTool::Horizontal {
                        ui.label("Direction");
                        ui.add(egui::DragValue::new(&mut tools.direction_deg).speed(1.0).range(0.0..=359.9).suffix("° from +x"));
                        ui.end_row();
                    }
                }
                Tool::Bearer | Tool::Brace => {}
            }
        });
        match tools.tool {
            Tool::Bearer | Tool::Deck => {
                let what = if tools.tool == Tool::Bearer { "posts" } else { "bearers" };
                ui.label(format!("Picked {what}: {}", if tools.picked.is_empty() { "none yet".into() } else { tools.picked.join(", ") }));
                ui.horizontal(|ui| {
                    let need = if tools.tool == Tool::Bearer { 2 } else { 2 };
                    if ui.add_enabled(tools.picked.len() >= need, egui::Button::new("Finish (Enter)")).clicked() {
                        let picked = std::mem::take(&mut tools.picked);
                        actions.push(if tools.tool == Tool::Bearer { Action::BuildBearer(picked) } else { Action::BuildDeck(picked) });
                    }
                    if ui.button("Clear").clicked() {
                        tools.picked.clear();
                    }
                });
            }
            Tool::Brace if !tools.picked.is_empty() => {
                ui.label(format!("From post {}; click the other post", tools.picked[0]));
            }
            _ => {}
        }
    }
}
