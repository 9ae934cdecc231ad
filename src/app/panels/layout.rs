//! The layout generator: a whole regular scaffold or birdcage in one undoable step.

use bevy_egui::egui;
use plateload::edit::Edit;
use plateload::scene::catalogue::{self, Catalogue};
use plateload::scene::layout::LayoutSpec;
use plateload::Scene;

use crate::app::{Action, ViewRequest};

/// The generator's settings.
#[derive(Debug)]
pub struct LayoutPanel {
    /// What to generate.
    pub spec: LayoutSpec,
    /// Lifts with a deck, as typed (e.g. "2, 4").
    pub deck_lifts: String,
    /// Replace the scene instead of adding beside it.
    pub replace: bool,
    /// Use an existing support type instead of the spec's own.
    pub use_support: Option<String>,
}

impl Default for LayoutPanel {
    fn default() -> Self {
        let spec = LayoutSpec::default();
        let deck_lifts = spec.deck_lifts.iter().map(|l| l.to_string()).collect::<Vec<_>>().join(", ");
        LayoutPanel { spec, deck_lifts, replace: true, use_support: None }
    }
}

impl LayoutPanel {
    /// Draw the generator.
    pub fn ui(&mut self, ui: &mut egui::Ui, scene: &Scene, cat: &Catalogue, actions: &mut Vec<Action>) {
        let Self { spec, deck_lifts, replace, use_support } = self;
        ui.heading("Generate a layout");
        egui::Grid::new("layout").num_columns(2).show(ui, |ui| {
            ui.label("Bays along x");
            ui.add(egui::DragValue::new(&mut spec.bays_x).range(1..=400));
            ui.end_row();
            ui.label("Bays along y");
            ui.add(egui::DragValue::new(&mut spec.bays_y).range(1..=400));
            ui.end_row();
            ui.label("Bay width x");
            ui.add(egui::DragValue::new(&mut spec.bay_x_m).speed(0.05).range(0.1..=20.0).suffix(" m"));
            ui.end_row();
            ui.label("Bay width y");
            ui.add(egui::DragValue::new(&mut spec.bay_y_m).speed(0.05).range(0.1..=20.0).suffix(" m"));
            ui.end_row();
            ui.label("First post at");
            ui.horizontal(|ui| {
                ui.add(egui::DragValue::new(&mut spec.origin.0).speed(0.1).prefix("x ").suffix(" m"));
                ui.add(egui::DragValue::new(&mut spec.origin.1).speed(0.1).prefix("y ").suffix(" m"));
            });
            ui.end_row();
            ui.label("Base level");
            ui.add(egui::DragValue::new(&mut spec.base_level).speed(0.05).suffix(" m"));
            ui.end_row();
            ui.label("Lifts");
            ui.add(egui::DragValue::new(&mut spec.lifts).range(1..=100));
            ui.end_row();
            ui.label("Lift height");
            ui.add(egui::DragValue::new(&mut spec.lift_m).speed(0.05).range(0.1..=10.0).suffix(" m"));
            ui.end_row();
            ui.label("Decks on lifts");
            ui.add(egui::TextEdit::singleline(deck_lifts).desired_width(80.0).hint_text("e.g. 2, 4"));
            ui.end_row();
            ui.label("Decking");
            egui::ComboBox::from_id_salt("layout-decking").selected_text(spec.decking.clone().unwrap_or_else(|| "own value".into())).show_ui(ui, |ui| {
                for e in &cat.decks {
                    if ui.selectable_label(spec.decking.as_deref() == Some(&e.id), format!("{}: {} kPa", e.id, e.self_weight_kpa)).on_hover_text(e.source.as_str()).clicked() {
                        spec.deck_self_weight_kpa = e.self_weight_kpa;
                        spec.decking = Some(e.id.clone());
                    }
                }
            });
            ui.end_row();
            ui.label("  self-weight");
            if ui.add(egui::DragValue::new(&mut spec.deck_self_weight_kpa).speed(0.01).range(0.0..=50.0).suffix(" kPa")).changed() {
                spec.decking = None;
            }
            ui.end_row();
            ui.label("Members");
            egui::ComboBox::from_id_salt("layout-section").selected_text(spec.section.clone().unwrap_or_else(|| "own value".into())).show_ui(ui, |ui| {
                for m in &cat.members {
                    if ui.selectable_label(spec.section.as_deref() == Some(&m.id), format!("{}: {} kN/m", m.id, m.self_weight_kn_per_m)).on_hover_text(m.source.as_str()).clicked() {
                        spec.member_self_weight_kn_per_m = m.self_weight_kn_per_m;
                        spec.section = Some(m.id.clone());
                    }
                }
            });
            ui.end_row();
            ui.label("  self-weight");
            if ui.add(egui::DragValue::new(&mut spec.member_self_weight_kn_per_m).speed(0.001).range(0.0..=10.0).suffix(" kN/m")).changed() {
                spec.section = None;
            }
            ui.end_row();
            ui.label("load class");
            let mut class = spec.load_class.unwrap_or(0);
            egui::ComboBox::from_id_salt("load-class").selected_text(if class == 0 { "none".into() } else { format!("class {class}") }).show_ui(ui, |ui| {
                ui.selectable_value(&mut class, 0, "none");
                for c in 1..=6u8 {
                    let q = plateload::scene::loads::LoadClass::get(c).map_or(0.0, |d| d.uniform_kpa);
                    ui.selectable_value(&mut class, c, format!("class {c} ({q} kPa)"));
                }
            });
            spec.load_class = (class > 0).then_some(class);
            ui.end_row();
            ui.label("Support type");
            let label = use_support.clone().unwrap_or_else(|| format!("new: {}", spec.support.id));
            egui::ComboBox::from_id_salt("layout-support").selected_text(label).show_ui(ui, |ui| {
                ui.selectable_value(use_support, None, format!("new: {}", spec.support.id));
                for s in &scene.support_types {
                    ui.selectable_value(use_support, Some(s.id.clone()), s.id.as_str());
                }
            });
            ui.end_row();
            if use_support.is_none() {
                ui.label("  base jack");
                let shown = spec.support.catalogue_id.clone().unwrap_or_else(|| "own values".into());
                egui::ComboBox::from_id_salt("layout-jack").selected_text(shown).show_ui(ui, |ui| {
                    for j in &cat.jacks {
                        let tag = if j.example { " — EXAMPLE" } else { "" };
                        let text = format!("{}: {} kN up to {} m extension{tag}", j.id, j.swl_kn, j.max_extension_m);
                        if ui.selectable_label(spec.support.catalogue_id.as_deref() == Some(&j.id), text).on_hover_text(j.source.as_str()).clicked() {
                            catalogue::apply_jack(&mut spec.support, j);
                        }
                    }
                });
                ui.end_row();
                if spec.support.example {
                    ui.label("");
                    ui.colored_label(egui::Color32::from_rgb(0xb0, 0x20, 0x20), "example SWL: replace it with the manufacturer's");
                    ui.end_row();
                }
                ui.label("  SWL");
                ui.add(egui::DragValue::new(&mut spec.support.swl_kn).speed(0.5).range(0.1..=1.0e4).suffix(" kN"));
                ui.end_row();
                ui.label("  base plate");
                ui.horizontal(|ui| {
                    ui.add(egui::DragValue::new(&mut spec.support.base_plate.width_m).speed(0.005).range(0.01..=5.0).suffix(" m"));
                    ui.add(egui::DragValue::new(&mut spec.support.base_plate.length_m).speed(0.005).range(0.01..=5.0).suffix(" m"));
                });
                ui.end_row();
                ui.label("  sole plate");
                let shown = match (&spec.support.sole_plate, &spec.support.sole_plate_id) {
                    (None, _) => "none".to_owned(),
                    (Some(_), Some(id)) => id.clone(),
                    (Some(_), None) => "own size".to_owned(),
                };
                egui::ComboBox::from_id_salt("layout-sole").selected_text(shown).show_ui(ui, |ui| {
                    if ui.selectable_label(spec.support.sole_plate.is_none(), "none").clicked() {
                        catalogue::apply_sole_plate(&mut spec.support, None);
                    }
                    for e in &cat.sole_plates {
                        if ui.selectable_label(spec.support.sole_plate_id.as_deref() == Some(&e.id), format!("{}: {}", e.id, e.name)).on_hover_text(e.source.as_str()).clicked() {
                            catalogue::apply_sole_plate(&mut spec.support, Some(e));
                        }
                    }
                });
                ui.end_row();
                if let Some(sole) = &mut spec.support.sole_plate {
                    let before = *sole;
                    ui.label("");
                    ui.horizontal(|ui| {
                        ui.add(egui::DragValue::new(&mut sole.width_m).speed(0.005).range(0.01..=5.0).suffix(" m"));
                        ui.add(egui::DragValue::new(&mut sole.length_m).speed(0.005).range(0.01..=5.0).suffix(" m"));
                    });
                    ui.end_row();
                    if *sole != before {
                        spec.support.sole_plate_id = None;
                    }
                }
            }
            ui.label("Braces in every line");
            ui.checkbox(&mut spec.braced, "");
            ui.end_row();
            if spec.braced {
                ui.label("  braced bay every");
                ui.add(egui::DragValue::new(&mut spec.brace_every).range(1..=20).suffix(" bays"));
                ui.end_row();
            }
            ui.label("Plan braces at every lift");
            ui.checkbox(&mut spec.plan_braced, "");
            ui.end_row();
            ui.label("Id prefix");
            ui.add(egui::TextEdit::singleline(&mut spec.id_prefix).desired_width(80.0));
            ui.end_row();
        });
        let lifts: Result<Vec<usize>, _> = deck_lifts.split(',').map(str::trim).filter(|s| !s.is_empty()).map(str::parse::<usize>).collect();
        let posts = (spec.bays_x + 1) * (spec.bays_y + 1);
        ui.label(format!("{posts} posts, {} members.", spec.lifts * (spec.bays_x + spec.bays_y + 2)));
        ui.checkbox(replace, "Replace the whole scene (site and combinations stay)");
        match lifts {
            Ok(l) if l.iter().all(|&x| x >= 1 && x <= spec.lifts) => {
                if ui.button(if *replace { "Generate (replaces the scene)" } else { "Generate beside the scene" }).clicked() {
                    let mut s = spec.clone();
                    s.deck_lifts = l;
                    if let Some(id) = use_support.as_ref().and_then(|id| scene.support_types.iter().find(|t| t.id == *id)) {
                        s.support = id.clone();
                    }
                    actions.push(Action::Edit { edit: Edit::ApplyLayout { spec: s, replace: *replace }, merge: None, select: Some(Vec::new()) });
                    actions.push(Action::View(ViewRequest::Fit));
                }
            }
            _ => {
                ui.colored_label(egui::Color32::from_rgb(0xb0, 0x20, 0x20), format!("deck lifts must be numbers from 1 to {}, separated by commas", spec.lifts));
            }
        }
    }
}
