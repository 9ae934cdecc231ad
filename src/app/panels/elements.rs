//! The list of elements: click to select (Shift+click adds), filter by id and kind.

use bevy_egui::egui;
use plateload::edit::ElementRef;
use plateload::scene::model::ElementKind;
use plateload::Scene;

use crate::app::doc::Selection;
use crate::app::Action;

/// The element list's state.
#[derive(Debug, Default)]
pub struct ElementsPanel {
    /// Text an id must contain.
    pub filter: String,
    /// Only this kind.
    pub kind: Option<ElementKind>,
}

const KINDS: [ElementKind; 7] =
    [ElementKind::Post, ElementKind::Bearer, ElementKind::Deck, ElementKind::Brace, ElementKind::Load, ElementKind::SupportType, ElementKind::ExistingStructure];

impl ElementsPanel {
    /// Draw the list.
    pub fn ui(&mut self, ui: &mut egui::Ui, scene: &Scene, selection: &Selection, actions: &mut Vec<Action>) {
        let Self { filter, kind } = self;
        ui.heading("Elements");
        ui.horizontal(|ui| {
            ui.label("Find:");
            ui.add(egui::TextEdit::singleline(filter).desired_width(90.0).hint_text("id"));
            let label = kind.map_or("all kinds".to_string(), |k| format!("{k}s"));
            egui::ComboBox::from_id_salt("kind-filter").selected_text(label).show_ui(ui, |ui| {
                ui.selectable_value(kind, None, "all kinds");
                for k in KINDS {
                    ui.selectable_value(kind, Some(k), format!("{k}s"));
                }
            });
        });
        let needle = filter.to_lowercase();
        let rows: Vec<(ElementKind, &str)> = std::iter::once((ElementKind::Site, ""))
            .chain(scene.element_ids())
            .filter(|(k, id)| kind.is_none_or(|want| want == *k) && (needle.is_empty() || id.to_lowercase().contains(&needle)))
            .collect();
        let shift = ui.input(|i| i.modifiers.shift);
        egui::ScrollArea::vertical().id_salt("element-list").auto_shrink([false, false]).show_rows(ui, 18.0, rows.len(), |ui, range| {
            for &(k, id) in &rows[range] {
                let r = ElementRef::new(k, id);
                let text = if k == ElementKind::Site { format!("site: {}", scene.site.name) } else { format!("{k} {id}") };
                let resp = ui.selectable_label(selection.contains(&r), text);
                if resp.clicked() {
                    actions.push(if shift { Action::ToggleSelect(r) } else { Action::Select(vec![r]) });
                }
            }
        });
    }
}
