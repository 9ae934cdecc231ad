//! Site panel: ground bearing, granular layer, stability target, combination factors and the
//! support types.

use bevy_egui::egui;
use plateload::scene::combination::{Combination, Factors};
use plateload::edit::{place, Edit, Element, ElementRef};
use plateload::scene::model::{AllowableBasis, BeamMethod, ElementKind, GranularLayer, LoadSpread};
use plateload::Scene;

use crate::app::Action;

/// The site panel's state.
#[derive(Debug, Default)]
pub struct SitePanel {
    name_draft: Option<String>,
}

/// Push an edit, merged per field while it is dragged or typed.
fn push(actions: &mut Vec<Action>, edit: Edit, key: &str, r: &egui::Response) {
    actions.push(Action::Edit { edit, merge: Some(key.to_owned()), select: None });
    if r.drag_stopped() || r.lost_focus() {
        actions.push(Action::Seal);
    }
}

impl SitePanel {
    /// Draw the panel.
    pub fn ui(&mut self, ui: &mut egui::Ui, scene: &Scene, actions: &mut Vec<Action>) {
        ui.heading("Site and ground");
        let mut site = scene.site.clone();
        egui::Grid::new("site").num_columns(2).show(ui, |ui| {
            ui.label("Name");
            let draft = self.name_draft.get_or_insert_with(|| site.name.clone());
            let r = ui.add(egui::TextEdit::singleline(draft).desired_width(200.0));
            if r.lost_focus() {
                if *draft != site.name {
                    let mut s = site.clone();
                    s.name = draft.clone();
                    actions.push(Action::Edit { edit: Edit::SetSite(s), merge: None, select: None });
                }
                self.name_draft = None;
            } else if !r.has_focus() {
                self.name_draft = None;
            }
            ui.end_row();
            ui.label("Allowable bearing pressure");
            ui.horizontal(|ui| {
                let mut entered = site.allowable_bearing_kpa.is_some();
                if ui.checkbox(&mut entered, "entered").changed() {
                    // A starting value only when the box is ticked; the planner enters the site's.
                    site.allowable_bearing_kpa = entered.then_some(100.0);
                    actions.push(Action::Edit { edit: Edit::SetSite(site.clone()), merge: None, select: None });
                }
                match &mut site.allowable_bearing_kpa {
                    Some(q) => {
                        let r = ui.add(egui::DragValue::new(q).speed(1.0).range(0.0..=1.0e5).suffix(" kPa"));
                        if r.changed() {
                            push(actions, Edit::SetSite(site.clone()), "site.allowable", &r);
                        }
                    }
                    None => {
                        ui.label("not entered: bearing not checked");
                    }
                }
            });
            ui.end_row();
            ui.label("Allowable is");
            let before = site.allowable_basis;
            egui::ComboBox::from_id_salt("basis").selected_text(site.allowable_basis.label()).show_ui(ui, |ui| {
                ui.selectable_value(&mut site.allowable_basis, AllowableBasis::Gross, "gross: add the layer's weight");
                ui.selectable_value(&mut site.allowable_basis, AllowableBasis::Net, "net: layer weight is overburden");
            });
            ui.end_row();
            if site.allowable_basis != before {
                actions.push(Action::Edit { edit: Edit::SetSite(site.clone()), merge: None, select: None });
            }
            ui.label("Granular layer");
            let mut has = site.granular_layer.is_some();
            if ui.checkbox(&mut has, "spreads the load").changed() {
                // Starting thickness only; the planner enters the layer actually placed.
                site.granular_layer = has.then_some(GranularLayer::new(0.15, LoadSpread::TwoToOne));
                actions.push(Action::Edit { edit: Edit::SetSite(site.clone()), merge: None, select: None });
            }
            ui.end_row();
            if let Some(layer) = &mut site.granular_layer {
                ui.label("Thickness");
                let r = ui.add(egui::DragValue::new(&mut layer.thickness_m).speed(0.005).range(0.0..=10.0).suffix(" m"));
                ui.end_row();
                ui.label("Spread");
                let before = layer.spread;
                egui::ComboBox::from_id_salt("spread")
                    .selected_text(match layer.spread {
                        LoadSpread::TwoToOne => "2 vertical : 1 horizontal".to_string(),
                        LoadSpread::FortyFive => "45°".into(),
                        LoadSpread::AngleDeg(a) => format!("{a}° from vertical"),
                    })
                    .show_ui(ui, |ui| {
                        ui.selectable_value(&mut layer.spread, LoadSpread::TwoToOne, "2 vertical : 1 horizontal");
                        ui.selectable_value(&mut layer.spread, LoadSpread::FortyFive, "45°");
                        if ui.selectable_label(matches!(layer.spread, LoadSpread::AngleDeg(_)), "angle").clicked() {
                            layer.spread = LoadSpread::AngleDeg(30.0);
                        }
                    });
                let mut angle_r = None;
                if let LoadSpread::AngleDeg(a) = &mut layer.spread {
                    angle_r = Some(ui.add(egui::DragValue::new(a).speed(0.5).range(0.0..=89.0).suffix("°")));
                }
                ui.end_row();
                ui.label("Unit weight");
                let w = ui.add(egui::DragValue::new(&mut layer.unit_weight_kn_m3).speed(0.1).range(5.0..=30.0).suffix(" kN/m³"));
                ui.end_row();
                ui.label("Allowable on the layer");
                let mut top_r = None;
                let mut top_toggled = false;
                ui.horizontal(|ui| {
                    let mut entered = layer.allowable_kpa.is_some();
                    if ui.checkbox(&mut entered, "entered").changed() {
                        layer.allowable_kpa = entered.then_some(100.0);
                        top_toggled = true;
                    }
                    match &mut layer.allowable_kpa {
                        Some(q) => top_r = Some(ui.add(egui::DragValue::new(q).speed(1.0).range(0.0..=1.0e5).suffix(" kPa"))),
                        None => {
                            ui.label("not entered: not checked");
                        }
                    }
                });
                ui.end_row();
                let changed = r.changed() || layer.spread != before && !angle_r.as_ref().is_some_and(|a| a.changed()) || angle_r.as_ref().is_some_and(|a| a.changed());
                if changed {
                    push(actions, Edit::SetSite(site.clone()), "site.layer", angle_r.as_ref().unwrap_or(&r));
                } else if w.changed() {
                    push(actions, Edit::SetSite(site.clone()), "site.layer.weight", &w);
                } else if let Some(t) = top_r.as_ref().filter(|t| t.changed()) {
                    push(actions, Edit::SetSite(site.clone()), "site.layer.allowable", t);
                } else if top_toggled {
                    actions.push(Action::Edit { edit: Edit::SetSite(site.clone()), merge: None, select: None });
                }
            }
            ui.label("Overturning: target factor");
            let mut st = scene.stability.clone();
            let r = ui.add(egui::DragValue::new(&mut st.target_factor).speed(0.01).range(0.0..=100.0));
            ui.end_row();
            if r.changed() {
                push(actions, Edit::SetStability(st.clone()), "stability", &r);
            }
            ui.label("Sliding: target factor");
            let r = ui.add(egui::DragValue::new(&mut st.sliding_target_factor).speed(0.01).range(0.0..=100.0));
            ui.end_row();
            if r.changed() {
                push(actions, Edit::SetStability(st.clone()), "stability.sliding", &r);
            }
            ui.label("Equilibrium γG dst / stb, γQ, γW");
            let mut changed: Option<(String, egui::Response)> = None;
            ui.horizontal(|ui| {
                let Factors { g_unfavourable, g_favourable, q, w } = &mut st.equilibrium;
                for (k, v) in [("gu", g_unfavourable), ("gf", g_favourable), ("q", q), ("w", w)] {
                    let r = ui.add(egui::DragValue::new(v).speed(0.01).range(0.0..=100.0).max_decimals(3));
                    if r.changed() {
                        changed = Some((format!("stability.{k}"), r));
                    }
                }
            });
            ui.end_row();
            if let Some((key, r)) = changed {
                push(actions, Edit::SetStability(st.clone()), &key, &r);
            }
            ui.label("Members analysed as");
            let mut analysis = scene.analysis;
            egui::ComboBox::from_id_salt("method").selected_text(method_text(analysis.method)).show_ui(ui, |ui| {
                for m in [BeamMethod::Envelope, BeamMethod::SimpleSpans, BeamMethod::Continuous] {
                    ui.selectable_value(&mut analysis.method, m, method_text(m));
                }
            });
            ui.end_row();
            if analysis != scene.analysis {
                actions.push(Action::Edit { edit: Edit::SetAnalysis(analysis), merge: None, select: None });
            }
        });

        ui.separator();
        ui.heading("Load combinations");
        let mut combs = scene.combinations.clone();
        let mut changed: Option<(String, egui::Response)> = None;
        let mut structural = false;
        egui::Grid::new("combinations").num_columns(7).striped(true).show(ui, |ui| {
            for h in ["name", "γG unfav.", "γG fav.", "γQ", "γW", "capacity", "uplift"] {
                ui.strong(h);
            }
            ui.end_row();
            for (i, c) in combs.iter_mut().enumerate() {
                ui.label(&c.name);
                let Factors { g_unfavourable, g_favourable, q, w } = &mut c.factors;
                for (k, v) in [("gu", g_unfavourable), ("gf", g_favourable), ("q", q), ("w", w)] {
                    let r = ui.add(egui::DragValue::new(v).speed(0.01).range(0.0..=100.0).max_decimals(3));
                    if r.changed() {
                        changed = Some((format!("comb.{i}.{k}"), r));
                    }
                }
                structural |= ui.checkbox(&mut c.checks_capacity, "").on_hover_text("Compare with the safe working load and allowable bearing").changed();
                structural |= ui.checkbox(&mut c.checks_uplift, "").on_hover_text("Report a negative minimum as uplift").changed();
                ui.end_row();
            }
        });
        if let Some((key, r)) = changed {
            push(actions, Edit::SetCombinations(combs.clone()), &key, &r);
        } else if structural {
            actions.push(Action::Edit { edit: Edit::SetCombinations(combs.clone()), merge: None, select: None });
        }
        for c in &scene.combinations {
            if !c.source.is_empty() {
                ui.small(format!("{}: {}", c.name, c.source));
            }
        }
        if ui.button("Reset to the default combinations").clicked() {
            actions.push(Action::Edit { edit: Edit::SetCombinations(Combination::defaults()), merge: None, select: None });
        }

        ui.separator();
        ui.heading("Support types");
        for s in &scene.support_types {
            let used = scene.posts.iter().filter(|p| p.support.as_deref() == Some(&s.id)).count();
            let sole = s.sole_plate.map_or("no sole plate".into(), |p| format!("sole plate {:.0} × {:.0} mm", p.width_m * 1e3, p.length_m * 1e3));
            let text = format!("{}: SWL {:.1} kN, base {:.0} × {:.0} mm, {sole} — {used} posts", s.id, s.swl_kn, s.base_plate.width_m * 1e3, s.base_plate.length_m * 1e3);
            if ui.link(text).clicked() {
                actions.push(Action::Select(vec![ElementRef::new(ElementKind::SupportType, &s.id)]));
            }
        }
        if ui.button("Add a support type").clicked() {
            let s = place::starter_support(&place::fresh_id(scene, "base-"));
            let sel = vec![ElementRef::new(ElementKind::SupportType, &s.id)];
            actions.push(Action::Edit { edit: Edit::Add(Element::SupportType(s)), merge: None, select: Some(sel) });
        }
    }
}

/// Words for a member analysis method in the site panel.
fn method_text(m: BeamMethod) -> &'static str {
    match m {
        BeamMethod::Envelope => "envelope: the worse of simple spans and continuous",
        BeamMethod::SimpleSpans => "simple spans (jointed at every support)",
        BeamMethod::Continuous => "continuous over their supports",
    }
}
