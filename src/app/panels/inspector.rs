//! The inspector: every field of the selected element, edited through undoable replacements,
//! and, for a post, its base plate's results.

use bevy_egui::egui;
use plateload::edit::{dependants, DeleteMode, Edit, Element};
use plateload::scene::loads::{Case, Face, Intensity, KentledgeForm, KentledgePlace, LoadKind, PlanDirection};
use plateload::scene::catalogue::{self, Catalogue};
use plateload::scene::model::{BeamMethod, BeamRole, ElementKind, Interface, PlateSize, Rect};
use plateload::Scene;

use super::rgb;
use crate::app::doc::{SceneDoc, Selection};
use crate::app::{Action, ViewRequest};

/// The inspector's state.
#[derive(Debug, Default)]
pub struct InspectorPanel {
    /// Text being typed into a list-of-ids or id field, by field key.
    drafts: std::collections::HashMap<String, String>,
}

/// Edits gathered while drawing one element's fields.
struct Fields<'a> {
    key: String,
    merge: Option<String>,
    seal: bool,
    drafts: &'a mut std::collections::HashMap<String, String>,
}

impl Fields<'_> {
    /// A number field; dragging or typing merges into one undo step per field.
    fn num(&mut self, ui: &mut egui::Ui, label: &str, v: &mut f64, speed: f64, unit: &str) {
        ui.label(label);
        let r = ui.add(egui::DragValue::new(v).speed(speed).max_decimals(4).suffix(unit));
        if r.changed() {
            self.merge = Some(format!("{}.{label}", self.key));
        }
        if r.drag_stopped() || r.lost_focus() {
            self.seal = true;
        }
        ui.end_row();
    }
    /// A text field applied when Enter is pressed or the field is left.
    fn text(&mut self, ui: &mut egui::Ui, label: &str, v: &mut String) -> bool {
        ui.label(label);
        let k = format!("{}.{label}", self.key);
        let draft = self.drafts.entry(k.clone()).or_insert_with(|| v.clone());
        let r = ui.add(egui::TextEdit::singleline(draft).desired_width(170.0));
        ui.end_row();
        if r.lost_focus() {
            let d = self.drafts.remove(&k).unwrap_or_default();
            if d != *v {
                *v = d;
                return true;
            }
        } else if !r.has_focus() {
            // Not being typed in: follow the scene (undo, other edits).
            *self.drafts.get_mut(&k).expect("inserted above") = v.clone();
        }
        false
    }
    /// A comma-separated list of ids.
    fn ids(&mut self, ui: &mut egui::Ui, label: &str, v: &mut Vec<String>) -> bool {
        let mut s = v.join(", ");
        if self.text(ui, label, &mut s) {
            *v = s.split(',').map(|p| p.trim().to_owned()).filter(|p| !p.is_empty()).collect();
            return true;
        }
        false
    }
}

/// The interfaces under a support and their friction coefficients.
fn friction_ui(ui: &mut egui::Ui, f: &mut Fields, list: &mut Vec<Interface>) {
    let named = [Interface::SteelOnCastConcrete, Interface::SteelOnTrowelledConcrete, Interface::ConcreteOnConcrete, Interface::TimberOnConcrete];
    let mut remove = None;
    for (k, i) in list.iter_mut().enumerate() {
        ui.label(if k == 0 { "Friction interfaces" } else { "" });
        ui.horizontal(|ui| {
            match i {
                Interface::Given { mu, source } => {
                    if ui.add(egui::DragValue::new(mu).speed(0.01).range(0.0..=1.5).prefix("μ ")).changed() {
                        f.merge = Some(format!("{}.mu{k}", f.key));
                    }
                    let r = ui.add(egui::TextEdit::singleline(source).hint_text("source of μ").desired_width(120.0));
                    if r.changed() {
                        f.merge = Some(format!("{}.source{k}", f.key));
                    }
                }
                named => {
                    ui.label(format!("μ {:.2}: {}", named.mu(), named.label()));
                }
            }
            if ui.small_button("✕").clicked() {
                remove = Some(k);
            }
        });
        ui.end_row();
    }
    if let Some(k) = remove {
        list.remove(k);
    }
    ui.label(if list.is_empty() { "Friction interfaces" } else { "" });
    egui::ComboBox::from_id_salt(format!("{}-friction", f.key)).selected_text(if list.is_empty() { "none: sliding not checked" } else { "add an interface" }).show_ui(ui, |ui| {
        for i in named {
            if ui.selectable_label(false, format!("μ {:.2}: {}", i.mu(), i.label())).clicked() {
                list.push(i.clone());
            }
        }
        if ui.selectable_label(false, "a coefficient with its source").clicked() {
            list.push(Interface::Given { mu: 0.3, source: String::new() });
        }
    });
    ui.end_row();
}

/// A choice among ids.
fn pick_id(ui: &mut egui::Ui, label: &str, salt: &str, v: &mut String, options: &[&str]) {
    ui.label(label);
    egui::ComboBox::from_id_salt(salt).selected_text(v.as_str()).show_ui(ui, |ui| {
        for o in options {
            ui.selectable_value(v, (*o).to_owned(), *o);
        }
    });
    ui.end_row();
}

fn direction_ui(ui: &mut egui::Ui, salt: &str, d: &mut PlanDirection) {
    ui.label("Direction");
    ui.horizontal(|ui| {
        let label = match d {
            PlanDirection::PlusX => "+x".to_string(),
            PlanDirection::MinusX => "−x".into(),
            PlanDirection::PlusY => "+y".into(),
            PlanDirection::MinusY => "−y".into(),
            PlanDirection::Degrees(a) => format!("{a}°"),
        };
        egui::ComboBox::from_id_salt(salt).selected_text(label).show_ui(ui, |ui| {
            ui.selectable_value(d, PlanDirection::PlusX, "+x");
            ui.selectable_value(d, PlanDirection::MinusX, "−x");
            ui.selectable_value(d, PlanDirection::PlusY, "+y");
            ui.selectable_value(d, PlanDirection::MinusY, "−y");
            if ui.selectable_label(matches!(d, PlanDirection::Degrees(_)), "angle").clicked() && !matches!(d, PlanDirection::Degrees(_)) {
                *d = PlanDirection::Degrees(45.0);
            }
        });
        if let PlanDirection::Degrees(a) = d {
            ui.add(egui::DragValue::new(a).speed(1.0).suffix("° from +x"));
        }
    });
    ui.end_row();
}

fn intensity_ui(ui: &mut egui::Ui, f: &mut Fields, i: &mut Intensity) {
    ui.label("Intensity");
    ui.horizontal(|ui| {
        let mut kind = match i {
            Intensity::Kpa(_) => 0,
            Intensity::LoadClassUniform(_) => 1,
            Intensity::LoadClassPartial(_) => 2,
        };
        let was = kind;
        egui::ComboBox::from_id_salt(format!("{}-int", f.key)).selected_text(["pressure", "load class q1", "load class q2"][kind]).show_ui(ui, |ui| {
            ui.selectable_value(&mut kind, 0, "pressure");
            ui.selectable_value(&mut kind, 1, "load class q1 (uniform)");
            ui.selectable_value(&mut kind, 2, "load class q2 (partial area)");
        });
        if kind != was {
            *i = match kind {
                0 => Intensity::Kpa(i.kpa().unwrap_or(1.0)),
                1 => Intensity::LoadClassUniform(3),
                _ => Intensity::LoadClassPartial(4),
            };
        }
        match i {
            Intensity::Kpa(q) => {
                if ui.add(egui::DragValue::new(q).speed(0.05).suffix(" kPa")).changed() {
                    f.merge = Some(format!("{}.kpa", f.key));
                }
            }
            Intensity::LoadClassUniform(c) | Intensity::LoadClassPartial(c) => {
                ui.add(egui::DragValue::new(c).range(1..=6).prefix("class "));
            }
        }
    });
    ui.end_row();
    if let Some(q) = i.kpa() {
        ui.label("");
        ui.label(format!("= {q} kPa"));
        ui.end_row();
    }
}

impl InspectorPanel {
    /// Draw the selected element's fields and results.
    pub fn ui(&mut self, ui: &mut egui::Ui, doc: &SceneDoc, cat: &Catalogue, selection: &Selection, actions: &mut Vec<Action>) {
        let scene = &doc.scene;
        let Some(r) = selection.single().cloned() else {
            if selection.items.is_empty() {
                ui.label("Select an element in the view or in the list.");
            } else {
                ui.label(format!("{} elements selected.", selection.items.len()));
                selection_buttons(ui, actions);
            }
            return;
        };
        if r.kind == ElementKind::Site {
            ui.label("The site is edited in the “Site & combinations” tab.");
            return;
        }
        let Some(original) = plateload::edit::get(scene, &r) else {
            ui.label(format!("{r} is no longer in the scene."));
            return;
        };
        ui.heading(r.to_string());
        let mut e = original.clone();
        let mut f = Fields { key: r.to_string(), merge: None, seal: false, drafts: &mut self.drafts };
        let mut committed = false;
        let post_ids: Vec<&str> = scene.posts.iter().map(|p| p.id.as_str()).collect();
        let deck_ids: Vec<&str> = scene.decks.iter().map(|p| p.id.as_str()).collect();
        let bearer_ids: Vec<&str> = scene.bearers.iter().map(|p| p.id.as_str()).collect();
        let support_ids: Vec<&str> = scene.support_types.iter().map(|p| p.id.as_str()).collect();
        egui::Grid::new(format!("fields-{r}")).num_columns(2).striped(true).show(ui, |ui| match &mut e {
            Element::Post(p) => {
                committed |= f.text(ui, "Id", &mut p.id);
                f.num(ui, "x", &mut p.x, 0.01, " m");
                f.num(ui, "y", &mut p.y, 0.01, " m");
                f.num(ui, "Base level", &mut p.base_level, 0.01, " m");
                f.num(ui, "Top level", &mut p.top_level, 0.01, " m");
                let mut s = p.support.clone().unwrap_or_default();
                pick_id(ui, "Support type", "post-support", &mut s, &support_ids);
                p.support = (!s.is_empty()).then_some(s);
                f.num(ui, "Self-weight", &mut p.self_weight_kn_per_m, 0.001, " kN/m");
                section_ui(ui, "post-section", &mut p.section, &mut p.self_weight_kn_per_m, cat);
            }
            Element::Bearer(b) => {
                committed |= f.text(ui, "Id", &mut b.id);
                ui.label("Role");
                egui::ComboBox::from_id_salt("role").selected_text(format!("{:?}", b.role).to_lowercase()).show_ui(ui, |ui| {
                    for role in [BeamRole::Bearer, BeamRole::Ledger, BeamRole::Transom] {
                        ui.selectable_value(&mut b.role, role, format!("{role:?}").to_lowercase());
                    }
                });
                ui.end_row();
                f.num(ui, "Level", &mut b.level, 0.01, " m");
                committed |= f.ids(ui, "Posts (in order)", &mut b.posts);
                f.num(ui, "Overhang at start", &mut b.overhang_start_m, 0.01, " m");
                f.num(ui, "Overhang at end", &mut b.overhang_end_m, 0.01, " m");
                f.num(ui, "Self-weight", &mut b.self_weight_kn_per_m, 0.001, " kN/m");
                section_ui(ui, "bearer-section", &mut b.section, &mut b.self_weight_kn_per_m, cat);
                method_choice(ui, "bearer-method", &mut b.method, scene.analysis.method);
            }
            Element::Deck(d) => {
                committed |= f.text(ui, "Id", &mut d.id);
                f.num(ui, "Level", &mut d.level, 0.01, " m");
                f.num(ui, "Extent x from", &mut d.extent.x.0, 0.01, " m");
                f.num(ui, "Extent x to", &mut d.extent.x.1, 0.01, " m");
                f.num(ui, "Extent y from", &mut d.extent.y.0, 0.01, " m");
                f.num(ui, "Extent y to", &mut d.extent.y.1, 0.01, " m");
                committed |= f.ids(ui, "Bearers (across the span)", &mut d.bearers);
                f.num(ui, "Self-weight", &mut d.self_weight_kpa, 0.01, " kPa");
                decking_ui(ui, d, cat);
                method_choice(ui, "deck-method", &mut d.method, scene.analysis.method);
            }
            Element::Brace(b) => {
                committed |= f.text(ui, "Id", &mut b.id);
                pick_id(ui, "From post", "brace-from", &mut b.from.post, &post_ids);
                f.num(ui, "at level", &mut b.from.level, 0.01, " m");
                pick_id(ui, "To post", "brace-to", &mut b.to.post, &post_ids);
                f.num(ui, "at level", &mut b.to.level, 0.01, " m");
            }
            Element::ExistingStructure(x) => {
                committed |= f.text(ui, "Id", &mut x.id);
                committed |= f.text(ui, "Description", &mut x.description);
                f.num(ui, "Top level", &mut x.level, 0.01, " m");
                f.num(ui, "Extent x from", &mut x.extent.x.0, 0.01, " m");
                f.num(ui, "Extent x to", &mut x.extent.x.1, 0.01, " m");
                f.num(ui, "Extent y from", &mut x.extent.y.0, 0.01, " m");
                f.num(ui, "Extent y to", &mut x.extent.y.1, 0.01, " m");
                f.num(ui, "Allowable pressure", &mut x.allowable_kpa, 5.0, " kPa");
            }
            Element::SupportType(s) => {
                committed |= f.text(ui, "Id", &mut s.id);
                ui.label("Base jack");
                let jack = s.catalogue_id.as_deref().and_then(|id| cat.jack(id));
                let shown = match (&s.catalogue_id, jack) {
                    (Some(id), Some(_)) => id.clone(),
                    (Some(id), None) => format!("{id} (not in this catalogue)"),
                    (None, _) => "own values".to_owned(),
                };
                egui::ComboBox::from_id_salt("support-jack").selected_text(shown).width(190.0).show_ui(ui, |ui| {
                    for j in &cat.jacks {
                        let tag = if j.example { " — EXAMPLE" } else { "" };
                        let text = format!("{}: {} kN up to {} m extension{tag}", j.id, j.swl_kn, j.max_extension_m);
                        if ui.selectable_label(s.catalogue_id.as_deref() == Some(&j.id), text).on_hover_text(j.source.as_str()).clicked() {
                            catalogue::apply_jack(s, j);
                        }
                    }
                });
                ui.end_row();
                f.num(ui, "Base plate width", &mut s.base_plate.width_m, 0.005, " m");
                f.num(ui, "Base plate length", &mut s.base_plate.length_m, 0.005, " m");
                f.num(ui, "Safe working load", &mut s.swl_kn, 0.5, " kN");
                ui.label("… up to extension");
                let mut known = s.max_extension_m.is_some();
                ui.horizontal(|ui| {
                    ui.checkbox(&mut known, "");
                    if let Some(e) = &mut s.max_extension_m {
                        ui.add(egui::DragValue::new(e).speed(0.01).range(0.0..=5.0).suffix(" m"));
                    }
                });
                ui.end_row();
                if known != s.max_extension_m.is_some() {
                    s.max_extension_m = known.then_some(0.0);
                }
                committed |= f.text(ui, "Source of the SWL", &mut s.source);
                ui.label("Example values");
                ui.checkbox(&mut s.example, "replace with the manufacturer's").on_hover_text("While this is ticked, validation warns that the safe working load is not a manufacturer's figure.");
                ui.end_row();
                ui.label("Sole plate");
                let shown = match (&s.sole_plate, &s.sole_plate_id) {
                    (None, _) => "none".to_owned(),
                    (Some(_), Some(id)) => id.clone(),
                    (Some(_), None) => "own size".to_owned(),
                };
                egui::ComboBox::from_id_salt("support-sole").selected_text(shown).width(190.0).show_ui(ui, |ui| {
                    if ui.selectable_label(s.sole_plate.is_none(), "none").clicked() {
                        catalogue::apply_sole_plate(s, None);
                    }
                    for e in &cat.sole_plates {
                        if ui.selectable_label(s.sole_plate_id.as_deref() == Some(&e.id), format!("{}: {}", e.id, e.name)).on_hover_text(e.source.as_str()).clicked() {
                            catalogue::apply_sole_plate(s, Some(e));
                        }
                    }
                    if ui.selectable_label(s.sole_plate.is_some() && s.sole_plate_id.is_none(), "own size").clicked() && (s.sole_plate.is_none() || s.sole_plate_id.is_some()) {
                        s.sole_plate = Some(s.sole_plate.unwrap_or(PlateSize { width_m: 0.225, length_m: 0.45 }));
                        s.sole_plate_id = None;
                    }
                });
                ui.end_row();
                if let Some(sole) = &mut s.sole_plate {
                    let before = *sole;
                    f.num(ui, "Sole plate width", &mut sole.width_m, 0.005, " m");
                    f.num(ui, "Sole plate length", &mut sole.length_m, 0.005, " m");
                    if *sole != before {
                        // Sized by hand: no longer the catalogue's entry.
                        s.sole_plate_id = None;
                    }
                }
                friction_ui(ui, &mut f, &mut s.friction);
            }
            Element::Load(l) => {
                committed |= f.text(ui, "Id", &mut l.id);
                ui.label("Case");
                ui.horizontal(|ui| {
                    for c in Case::ALL {
                        ui.selectable_value(&mut l.case, c, c.name());
                    }
                });
                ui.end_row();
                ui.label("Kind");
                ui.label(l.kind.label());
                ui.end_row();
                let key = f.key.clone();
                match &mut l.kind {
                    LoadKind::DeckArea { deck, intensity } => {
                        pick_id(ui, "Deck", "load-deck", deck, &deck_ids);
                        intensity_ui(ui, &mut f, intensity);
                    }
                    LoadKind::DeckPatch { deck, area, intensity } => {
                        pick_id(ui, "Deck", "load-deck", deck, &deck_ids);
                        rect_ui(ui, &mut f, area);
                        intensity_ui(ui, &mut f, intensity);
                    }
                    LoadKind::DeckPoint { deck, x, y, kn } => {
                        pick_id(ui, "Deck", "load-deck", deck, &deck_ids);
                        f.num(ui, "x", x, 0.01, " m");
                        f.num(ui, "y", y, 0.01, " m");
                        f.num(ui, "Force", kn, 0.05, " kN");
                    }
                    LoadKind::BearerPoint { bearer, at_m, kn } => {
                        pick_id(ui, "Bearer", "load-bearer", bearer, &bearer_ids);
                        f.num(ui, "From first post", at_m, 0.01, " m");
                        f.num(ui, "Force", kn, 0.05, " kN");
                    }
                    LoadKind::BearerLine { bearer, from_m, to_m, kn_per_m } => {
                        pick_id(ui, "Bearer", "load-bearer", bearer, &bearer_ids);
                        f.num(ui, "From", from_m, 0.01, " m");
                        f.num(ui, "To", to_m, 0.01, " m");
                        f.num(ui, "Intensity", kn_per_m, 0.05, " kN/m");
                    }
                    LoadKind::PostTop { post, kn } => {
                        pick_id(ui, "Post", "load-post", post, &post_ids);
                        f.num(ui, "Force", kn, 0.05, " kN");
                    }
                    LoadKind::Horizontal { x, y, level, kn, direction } => {
                        f.num(ui, "x", x, 0.01, " m");
                        f.num(ui, "y", y, 0.01, " m");
                        f.num(ui, "Level", level, 0.01, " m");
                        f.num(ui, "Force", kn, 0.05, " kN");
                        direction_ui(ui, &format!("{key}-dir"), direction);
                    }
                    LoadKind::Wind { face, kpa, direction } => {
                        face_ui(ui, &mut f, face);
                        f.num(ui, "Net pressure", kpa, 0.01, " kPa");
                        direction_ui(ui, &format!("{key}-dir"), direction);
                    }
                    LoadKind::Kentledge { on, kn, form, secured } => {
                        match on {
                            KentledgePlace::Plates(ids) => {
                                committed |= f.ids(ui, "On plates", ids);
                            }
                            KentledgePlace::Deck { deck, x, y } => {
                                pick_id(ui, "Deck", "load-deck", deck, &deck_ids);
                                f.num(ui, "x", x, 0.01, " m");
                                f.num(ui, "y", y, 0.01, " m");
                            }
                        }
                        f.num(ui, "Weight", kn, 0.1, " kN");
                        ui.label("Form");
                        egui::ComboBox::from_id_salt(format!("{key}-form")).selected_text(form.label()).show_ui(ui, |ui| {
                            for k in [KentledgeForm::Removable, KentledgeForm::WaterFilled, KentledgeForm::Fixed] {
                                ui.selectable_value(form, k, k.label());
                            }
                        });
                        ui.end_row();
                        ui.label("Secured");
                        ui.checkbox(secured, "against removal (chained or clamped to the standards)");
                        ui.end_row();
                        if !(*secured || *form == KentledgeForm::Fixed) {
                            ui.label("");
                            ui.colored_label(egui::Color32::from_rgb(0xb0, 0x20, 0x20), "not secured: it never counts as holding down");
                            ui.end_row();
                        }
                    }
                    LoadKind::Notional { percent, direction, basis } => {
                        f.num(ui, "Percent of vertical load", percent, 0.1, " %");
                        direction_ui(ui, &format!("{key}-dir"), direction);
                        ui.label("Of the cases");
                        ui.horizontal(|ui| {
                            for c in [Case::G, Case::Q] {
                                let mut on = basis.contains(&c);
                                if ui.checkbox(&mut on, c.name()).changed() {
                                    if on {
                                        basis.push(c);
                                        basis.sort();
                                    } else {
                                        basis.retain(|b| *b != c);
                                    }
                                }
                            }
                        });
                        ui.end_row();
                    }
                }
            }
        });
        let merge = f.merge.clone();
        let seal = f.seal;
        if e != original {
            // Typed ids and lists are whole steps; number fields merge while dragged or typed.
            let merge = if committed { None } else { merge.or_else(|| Some(format!("{r}.choice"))) };
            let select = (e.id() != original.id()).then(|| vec![e.to_ref()]);
            actions.push(Action::Edit { edit: Edit::Replace { id: original.id().to_owned(), with: e }, merge, select });
        }
        if seal {
            actions.push(Action::Seal);
        }
        ui.separator();
        selection_buttons(ui, actions);
        if r.kind == ElementKind::Post {
            plate_results(ui, doc, &r.id);
        }
        let deps = dependants(scene, &r);
        if !deps.is_empty() {
            ui.separator();
            ui.label(format!("Depend on it ({}):", deps.len()));
            ui.horizontal_wrapped(|ui| {
                for d in deps.iter().take(40) {
                    if ui.link(d.to_string()).clicked() {
                        actions.push(Action::Select(vec![d.clone()]));
                    }
                }
            });
        }
        refs_of(ui, scene, &original, actions);
    }
}

/// The catalogue section of a post or member: choosing one copies its self-weight; a self-weight
/// typed by hand no longer names a section.
fn section_ui(ui: &mut egui::Ui, salt: &str, section: &mut Option<String>, self_weight: &mut f64, cat: &Catalogue) {
    let entry = section.as_deref().and_then(|id| cat.member(id));
    if let Some(e) = entry
        && e.self_weight_kn_per_m != *self_weight
    {
        *section = None;
    }
    ui.label("Section");
    egui::ComboBox::from_id_salt(salt).selected_text(section.clone().unwrap_or_else(|| "own value".into())).width(190.0).show_ui(ui, |ui| {
        for m in &cat.members {
            if ui.selectable_label(section.as_deref() == Some(&m.id), format!("{}: {} kN/m", m.id, m.self_weight_kn_per_m)).on_hover_text(m.source.as_str()).clicked() {
                *self_weight = m.self_weight_kn_per_m;
                *section = Some(m.id.clone());
            }
        }
    });
    ui.end_row();
}

/// The catalogue decking of a deck, as [`section_ui`].
fn decking_ui(ui: &mut egui::Ui, d: &mut plateload::Deck, cat: &Catalogue) {
    if let Some(e) = d.decking.as_deref().and_then(|id| cat.deck(id))
        && e.self_weight_kpa != d.self_weight_kpa
    {
        d.decking = None;
    }
    ui.label("Decking");
    egui::ComboBox::from_id_salt("deck-decking").selected_text(d.decking.clone().unwrap_or_else(|| "own value".into())).width(190.0).show_ui(ui, |ui| {
        for e in &cat.decks {
            if ui.selectable_label(d.decking.as_deref() == Some(&e.id), format!("{}: {} kPa", e.id, e.self_weight_kpa)).on_hover_text(e.source.as_str()).clicked() {
                catalogue::apply_deck(d, e);
            }
        }
    });
    ui.end_row();
}

fn selection_buttons(ui: &mut egui::Ui, actions: &mut Vec<Action>) {
    ui.horizontal(|ui| {
        if ui.button("Delete").clicked() {
            actions.push(Action::DeleteSelected(DeleteMode::Refuse));
        }
        if ui.button("Frame").on_hover_text("Shift+F").clicked() {
            actions.push(Action::View(ViewRequest::FitSelection));
        }
    });
}

/// Links to the elements this one rests on.
fn refs_of(ui: &mut egui::Ui, _scene: &Scene, e: &Element, actions: &mut Vec<Action>) {
    let refs = plateload::edit::references(e);
    if refs.is_empty() {
        return;
    }
    ui.label("Rests on / refers to:");
    ui.horizontal_wrapped(|ui| {
        for d in refs.iter().take(40) {
            if ui.link(d.to_string()).clicked() {
                actions.push(Action::Select(vec![d.clone()]));
            }
        }
    });
}

fn rect_ui(ui: &mut egui::Ui, f: &mut Fields, r: &mut Rect) {
    f.num(ui, "x from", &mut r.x.0, 0.01, " m");
    f.num(ui, "x to", &mut r.x.1, 0.01, " m");
    f.num(ui, "y from", &mut r.y.0, 0.01, " m");
    f.num(ui, "y to", &mut r.y.1, 0.01, " m");
}

fn face_ui(ui: &mut egui::Ui, f: &mut Fields, face: &mut Face) {
    f.num(ui, "Face from x", &mut face.from.0, 0.01, " m");
    f.num(ui, "Face from y", &mut face.from.1, 0.01, " m");
    f.num(ui, "Face to x", &mut face.to.0, 0.01, " m");
    f.num(ui, "Face to y", &mut face.to.1, 0.01, " m");
    f.num(ui, "Face bottom", &mut face.bottom, 0.01, " m");
    f.num(ui, "Face top", &mut face.top, 0.01, " m");
}

/// A member's own analysis method, or the scene's.
fn method_choice(ui: &mut egui::Ui, salt: &str, method: &mut Option<BeamMethod>, scene_method: BeamMethod) {
    ui.label("Analysis");
    let text = |m: Option<BeamMethod>| match m {
        None => format!("as the scene ({})", scene_method.label()),
        Some(m) => m.label().to_string(),
    };
    egui::ComboBox::from_id_salt(salt).selected_text(text(*method)).show_ui(ui, |ui| {
        for m in [None, Some(BeamMethod::SimpleSpans), Some(BeamMethod::Continuous), Some(BeamMethod::Envelope)] {
            ui.selectable_value(method, m, text(m));
        }
    });
    ui.end_row();
}

/// The base plate's results: loads per case, every combination, utilisation and bearing.
pub fn plate_results(ui: &mut egui::Ui, doc: &SceneDoc, id: &str) {
    ui.separator();
    let Some(a) = doc.analysis() else {
        ui.label("No results: the scene has problems (see the results panel).");
        return;
    };
    let Some(p) = a.plates.iter().find(|p| p.id == id) else { return };
    let g = p.governing();
    let r = crate::app::view::draw::reading(a, p, None);
    ui.horizontal(|ui| {
        let (rect, _) = ui.allocate_exact_size(egui::vec2(18.0, 18.0), egui::Sense::hover());
        ui.painter().rect_filled(rect, 2.0, rgb(r.band().map_or(crate::app::view::draw::NOT_CHECKED, |b| b.colour())));
        match r.utilisation {
            Some(u) => ui.heading(format!("Base plate {}: {:.1} % — {}", p.id, 100.0 * u, p.status)),
            None => ui.heading(format!("Base plate {}: {:.1} kN — no combination checks capacity", p.id, g.max_kn)),
        };
    });
    if r.utilisation.is_some() {
        ui.label(format!("Governed by {} in “{}”.", g.governed_by(), a.combinations[p.governing].name));
    }
    let i = a.plate_index(id).unwrap_or(0);
    if a.method_count() > 1 {
        ui.label(format!("Method: the maximum comes from {}, the minimum from {}.", a.governing_method_label(i), a.min_method_label(i)));
    } else {
        ui.label(format!("Method: {}.", a.method_label(0)));
    }
    egui::Grid::new("plate-cases").num_columns(4).striped(true).show(ui, |ui| {
        ui.label("");
        for c in Case::ALL {
            ui.strong(format!("{c} kN"));
        }
        ui.end_row();
        ui.label(if a.method_count() > 1 { format!("{} (up +)", a.method_label(0)) } else { "vertical (up +)".to_string() });
        for c in Case::ALL {
            ui.label(format!("{:.3}", p.case_kn[c.index()]));
        }
        ui.end_row();
        // Each further method pass, so the effect of continuity on this plate can be read off.
        for (m, loads) in p.case_kn_by_method.iter().enumerate().skip(1) {
            ui.label(a.method_label(m));
            for c in Case::ALL {
                ui.label(format!("{:.3}", loads[c.index()]));
            }
            ui.end_row();
        }
    });
    egui::Grid::new("plate-combs").num_columns(7).striped(true).show(ui, |ui| {
        for h in ["combination", "max kN", "min kN", "util %", "on layer kPa", "formation kPa", "status"] {
            ui.strong(h);
        }
        ui.end_row();
        for (c, pc) in a.combinations.iter().zip(&p.combinations) {
            // A factored load over a working-load capacity is not a utilisation: kN only.
            let checked = c.checks_capacity;
            ui.label(if checked { c.name.clone() } else { format!("{} (no capacity check)", c.name) });
            ui.label(format!("{:.3}", pc.max_kn));
            ui.label(format!("{:.3}", pc.min_kn));
            ui.label(if checked { format!("{:.1}", 100.0 * pc.utilisation) } else { "—".into() });
            ui.label(if checked { pc.layer_top_kpa.map_or_else(|| "—".to_owned(), |q| format!("{q:.1}")) } else { "—".into() });
            ui.label(if checked { format!("{:.1}", pc.bearing_kpa) } else { "—".into() });
            ui.label(super::results::status_text(pc.status, checked));
            ui.end_row();
        }
    });
    let allowable = match p.allowable_kpa {
        Some(q) => format!("{q:.0} kPa allowable ({})", a.ground.basis.label()),
        None => "no allowable entered: ground bearing not checked".to_owned(),
    };
    ui.label(format!("Support {}: SWL {:.1} kN; bearing area at formation {:.4} m², {allowable}.", p.support, p.swl_kn, p.bearing_area_m2));
    if let Some(l) = a.ground.layer {
        ui.label(match l.allowable_kpa {
            Some(q) => format!("On the granular layer: {:.4} m² under the plate, {q:.0} kPa allowable.", p.plate_area_m2),
            None => format!("On the granular layer: {:.4} m² under the plate; no allowable entered, not checked.", p.plate_area_m2),
        });
    }
    if let Some(h) = p.hold_down {
        let k = h.kentledge_kn.map_or_else(String::new, |k| format!(" or {k:.2} kN secured kentledge on it"));
        ui.colored_label(egui::Color32::from_rgb(0xb0, 0x20, 0x20), format!("Lifts: needs an anchor for {:.2} kN{k} ({}).", h.anchor_kn, a.combinations[h.combination].name));
    }
    if let Some(s) = &p.sliding {
        let text = match (s.mu, s.factor) {
            (Some(mu), Some(f)) if s.slides => format!("Slides {}: shear {:.2} kN, μ {mu:.2}, factor {f:.2}: restrain it for {:.2} kN.", s.towards, s.shear_kn, s.restraint_kn),
            (Some(mu), Some(f)) => format!("Sliding {}: shear {:.2} kN, μ {mu:.2}, factor {f:.2}.", s.towards, s.shear_kn),
            _ => format!("Sliding {}: shear {:.2} kN, not checked (no friction given for its support type).", s.towards, s.shear_kn),
        };
        if s.slides {
            ui.colored_label(egui::Color32::from_rgb(0xb0, 0x20, 0x20), text);
        } else {
            ui.label(text);
        }
    }
}
