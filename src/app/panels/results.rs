//! The results panel: the base table (sortable), equilibrium, stability, warnings and the
//! validation problems (click one to select its element).

use bevy_egui::egui;
use plateload::edit::{place, Edit, Element, ElementRef};
use plateload::scene::loads::{KentledgeForm, KentledgePlace};
use plateload::scene::model::ElementKind;
use plateload::export::findings::Verdict;
use plateload::{AnalysisError, Problem};

use super::rgb;
use crate::app::doc::{SceneDoc, Selection};
use crate::app::view::draw::reading;
use crate::app::view::ViewSettings;
use crate::app::Action;

/// Column the base table is sorted by.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SortBy {
    /// Scene order.
    #[default]
    Order,
    /// Id.
    Id,
    /// Largest combined load.
    Load,
    /// Utilisation.
    Utilisation,
    /// Bearing pressure.
    Bearing,
    /// Smallest combined load (uplift first).
    MinLoad,
}

/// Which part of the results is shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum ResultsTab {
    /// Base plates.
    #[default]
    Bases,
    /// Equilibrium and stability.
    Checks,
    /// Problems and warnings.
    Problems,
}

/// The results panel's state.
#[derive(Debug, Default)]
pub struct ResultsPanel {
    /// Sort column.
    pub sort: SortBy,
    /// Largest first.
    pub descending: bool,
    /// Tab.
    pub tab: ResultsTab,
}

/// A plate's verdict in a combination: OK / OVER / UPLIFT where it checks capacity; where it
/// does not, only uplift (if it checks that), else a dash.
pub fn status_text(status: plateload::Status, checks_capacity: bool) -> &'static str {
    match (checks_capacity, status.uplift) {
        (true, _) => status.label(),
        (false, true) => "UPLIFT",
        (false, false) => "—",
    }
}

fn problem_link(ui: &mut egui::Ui, p: &Problem, actions: &mut Vec<Action>, colour: egui::Color32) {
    let text = egui::RichText::new(p.to_string()).color(colour);
    if matches!(p.kind, ElementKind::Combination | ElementKind::Site) || p.id.is_empty() {
        ui.label(text);
    } else if ui.link(text).on_hover_text("select it").clicked() {
        actions.push(Action::Select(vec![ElementRef::new(p.kind, &p.id)]));
    }
}

impl ResultsPanel {
    /// Draw the panel.
    pub fn ui(&mut self, ui: &mut egui::Ui, doc: &SceneDoc, settings: &ViewSettings, selection: &Selection, actions: &mut Vec<Action>) {
        let Self { sort, descending, tab } = self;
        let problems = match &doc.result {
            Err(AnalysisError::Invalid(v)) => v.problems.len(),
            Err(_) => 1,
            Ok(a) => a.warnings.len(),
        };
        ui.horizontal(|ui| {
            ui.selectable_value(tab, ResultsTab::Bases, "Base plates");
            ui.selectable_value(tab, ResultsTab::Checks, "Equilibrium & stability");
            let label = if doc.result.is_err() { format!("Problems ({problems})") } else { format!("Warnings ({problems})") };
            ui.selectable_value(tab, ResultsTab::Problems, label);
        });
        if doc.result.is_err() && *tab == ResultsTab::Bases {
            *tab = ResultsTab::Problems;
        }
        ui.separator();
        match (&doc.result, *tab) {
            (Err(e), _) => {
                ui.colored_label(egui::Color32::from_rgb(0xb0, 0x20, 0x20), "The scene cannot be solved until these are put right:");
                egui::ScrollArea::vertical().id_salt("problems").show(ui, |ui| match e {
                    AnalysisError::Invalid(v) => {
                        for p in &v.problems {
                            problem_link(ui, p, actions, egui::Color32::from_rgb(0xb0, 0x20, 0x20));
                        }
                    }
                    other => {
                        ui.label(other.to_string());
                    }
                });
            }
            (Ok(a), ResultsTab::Problems) => {
                egui::ScrollArea::vertical().id_salt("warnings").show(ui, |ui| {
                    if a.warnings.is_empty() {
                        ui.label("No warnings.");
                    }
                    for w in &a.warnings {
                        problem_link(ui, w, actions, egui::Color32::from_rgb(0x90, 0x60, 0x00));
                    }
                });
            }
            (Ok(a), ResultsTab::Checks) => {
                egui::ScrollArea::vertical().id_salt("checks").show(ui, |ui| {
                    // The findings first, failures leading.
                    for f in plateload::export::findings::findings(a) {
                        let colour = match f.verdict {
                            Verdict::Fails => egui::Color32::from_rgb(0xb0, 0x20, 0x20),
                            Verdict::NotChecked => egui::Color32::from_rgb(0x90, 0x60, 0x00),
                            Verdict::Passes => ui.visuals().text_color(),
                        };
                        ui.colored_label(colour, format!("{} — {}: {}", f.verdict.label(), f.check, f.text));
                    }
                    ui.separator();
                    egui::Grid::new("equilibrium").striped(true).show(ui, |ui| {
                        for h in ["case", "applied down kN", "reactions up kN", "|ΣF| kN", "|ΣM| kN·m", "relative"] {
                            ui.strong(h);
                        }
                        ui.end_row();
                        for e in &a.equilibrium {
                            ui.label(e.case.name());
                            ui.label(format!("{:.3}", e.applied.down()));
                            ui.label(format!("{:.3}", e.reactions.force[2]));
                            ui.label(format!("{:.1e}", e.force_residual_kn));
                            ui.label(format!("{:.1e}", e.moment_residual_knm));
                            ui.label(format!("{:.1e}", e.relative));
                            ui.end_row();
                        }
                    });
                    ui.label(format!("Worst relative equilibrium residual: {:.1e}", a.worst_residual()));
                    ui.separator();
                    ui.strong("Horizontal loads down the braced bays");
                    let h = &a.horizontal;
                    if h.planes.is_empty() {
                        ui.label("No braced plane.");
                    }
                    for p in &h.planes {
                        let to = p.braced_to_m.map_or("not counted".to_owned(), |z| format!("braced up to {:.3} m", plateload::format::num(z)));
                        let cut = p.cut.as_ref().map_or(String::new(), |c| format!(" — above not counted: {c}"));
                        ui.label(format!("{}: {to}, {} brace(s){cut}", p.name, p.diagonals));
                    }
                    for d in &h.diaphragms {
                        ui.label(d);
                    }
                    if let Some(s) = h.sharing {
                        ui.label(s);
                    }
                    ui.label(format!("Notional load: {}", h.notional));
                    for c in &h.combinations {
                        ui.label(format!("Combination {c}"));
                    }
                    let st = &a.stability;
                    let cog = st.centre_of_gravity.map_or("none".into(), |(x, y)| format!("({x:.3}, {y:.3}) m"));
                    ui.label(format!(
                        "Permanent load {:.3} kN; centre of gravity {cog}; target overturning factor {:.2}; equilibrium γG {:.2}/{:.2}, γQ {:.2}, γW {:.2}.",
                        st.permanent_kn, st.target_factor, st.equilibrium.g_unfavourable, st.equilibrium.g_favourable, st.equilibrium.q, st.equilibrium.w
                    ));
                    if let Some(why) = &st.refused {
                        ui.colored_label(egui::Color32::from_rgb(0xb0, 0x20, 0x20), format!("Overturning not checked: {why}"));
                    }
                    for s in st.structures.iter().filter(|s| s.axes.iter().any(|x| x.factor.is_some() || x.equ_utilisation.is_some())) {
                        ui.strong(format!("{} — plates {}", s.label, s.hull.join(" – ")));
                        for d in &s.axes {
                            let Some(f) = d.factor else { continue };
                            let verdict = if d.passes() {
                                "meets both".to_owned()
                            } else {
                                match d.kentledge.as_ref().map(|k| (k.needed_kn, k)) {
                                    Some((Some(w), k)) => format!("needs {w:.2} kN kentledge over {} (lever {:.2} m)", k.plates.iter().take(4).cloned().collect::<Vec<_>>().join(", "), k.lever_m),
                                    Some((None, k)) => k.cannot.clone().unwrap_or_default(),
                                    None => String::new(),
                                }
                            };
                            let text = format!(
                                "tipping {} about {}: factor {f:.2}; E_dst/E_stb {} — {verdict}",
                                d.towards,
                                d.about,
                                d.equ_utilisation.map_or_else(|| "—".to_owned(), |u| format!("{u:.2}"))
                            );
                            ui.horizontal(|ui| {
                                ui.colored_label(if d.passes() { ui.visuals().text_color() } else { egui::Color32::from_rgb(0xb0, 0x20, 0x20) }, text);
                                // Place the reported kentledge as a scene element (undoable),
                                // secured to the standards as reported; rounded up to 10 N.
                                if let Some((w, k)) = d.kentledge.as_ref().and_then(|k| k.needed_kn.filter(|w| *w > 0.0).map(|w| (w, k))) {
                                    if ui.button("place it").on_hover_text("add this kentledge to the scene, secured to the standards of those plates").clicked() {
                                        let kn = (w * 100.0).ceil() / 100.0;
                                        let load = plateload::Load::new(
                                            place::fresh_id(&doc.scene, "kentledge-"),
                                            plateload::Case::G,
                                            plateload::LoadKind::Kentledge { on: KentledgePlace::Plates(k.plates.clone()), kn, form: KentledgeForm::Removable, secured: true },
                                        );
                                        actions.push(Action::Edit { edit: Edit::Add(Element::Load(load)), merge: None, select: None });
                                    }
                                }
                            });
                        }
                    }
                    for c in &a.sliding.checks {
                        let text = match &c.not_checked {
                            Some(why) => format!("sliding of {} {}: not checked — {why}", c.structure, c.towards),
                            None => format!("sliding of {} {}: factor {:.2} (target {:.2})", c.structure, c.towards, c.factor.unwrap_or(0.0), a.sliding.target_factor),
                        };
                        let bad = c.not_checked.is_none() && !(c.meets_target && c.equ_ok);
                        ui.colored_label(if bad { egui::Color32::from_rgb(0xb0, 0x20, 0x20) } else { ui.visuals().text_color() }, text);
                    }
                });
            }
            (Ok(a), ResultsTab::Bases) => {
                let comb = settings.combination;
                let comb_name = comb.and_then(|c| a.combinations.get(c)).map_or("governing".to_string(), |c| c.name.clone());
                let mut order: Vec<usize> = (0..a.plates.len()).collect();
                let value = |i: usize| -> f64 {
                    let p = &a.plates[i];
                    let pc = comb.and_then(|c| p.combinations.get(c)).unwrap_or(p.governing());
                    match sort {
                        SortBy::Order | SortBy::Id => i as f64,
                        SortBy::Load => pc.max_kn,
                        SortBy::Utilisation => reading(a, p, comb).sort_key(),
                        SortBy::Bearing => pc.bearing_kpa,
                        SortBy::MinLoad => pc.min_kn,
                    }
                };
                if *sort == SortBy::Id {
                    order.sort_by(|&x, &y| a.plates[x].id.cmp(&a.plates[y].id));
                } else {
                    order.sort_by(|&x, &y| value(x).partial_cmp(&value(y)).unwrap_or(std::cmp::Ordering::Equal));
                }
                if *descending {
                    order.reverse();
                }
                let over = a.plates.iter().filter(|p| reading(a, p, comb).status.over).count();
                let uplift = a.plates.iter().filter(|p| reading(a, p, comb).status.uplift).count();
                ui.label(format!("{} base plates — {over} over capacity, {uplift} lifting ({comb_name}). Click a heading to sort, a row to select.", a.plates.len()));
                let mut header = |ui: &mut egui::Ui, label: &str, by: SortBy| {
                    let mark = if *sort == by { if *descending { " ▼" } else { " ▲" } } else { "" };
                    if ui.button(format!("{label}{mark}")).clicked() {
                        if *sort == by {
                            *descending = !*descending;
                        } else {
                            *sort = by;
                            *descending = !matches!(by, SortBy::Id | SortBy::Order | SortBy::MinLoad);
                        }
                    }
                };
                let widths = [70.0, 60.0, 60.0, 62.0, 62.0, 62.0, 75.0, 75.0, 62.0, 68.0, 80.0, 90.0, 230.0];
                let row_h = 20.0;
                ui.horizontal(|ui| {
                    let cols: [(&str, Option<SortBy>); 13] = [
                        ("base", Some(SortBy::Id)),
                        ("x m", None),
                        ("y m", None),
                        ("G kN", None),
                        ("Q kN", None),
                        ("W kN", None),
                        ("max kN", Some(SortBy::Load)),
                        ("min kN", Some(SortBy::MinLoad)),
                        ("util %", Some(SortBy::Utilisation)),
                        ("kPa", Some(SortBy::Bearing)),
                        ("governs", None),
                        ("status", None),
                        ("method (for max)", None),
                    ];
                    for ((label, by), w) in cols.into_iter().zip(widths) {
                        ui.allocate_ui(egui::vec2(w, row_h), |ui| match by {
                            Some(by) => header(ui, label, by),
                            None => {
                                ui.strong(label);
                            }
                        });
                    }
                });
                egui::ScrollArea::vertical().id_salt("bases").auto_shrink([false, false]).show_rows(ui, row_h, order.len(), |ui, range| {
                    for &i in &order[range] {
                        let p = &a.plates[i];
                        let rd = reading(a, p, comb);
                        let (c, status) = (rd.combination, rd.status);
                        let pc = &p.combinations[c];
                        // A combination that does not check capacity: kN only, no percentage,
                        // no pressure and no verdict beyond uplift.
                        let checked = rd.utilisation.is_some();
                        let r = ElementRef::post(&p.id);
                        let selected = selection.contains(&r);
                        let resp = ui
                            .horizontal(|ui| {
                                let cells = [
                                    p.id.clone(),
                                    format!("{:.3}", p.x),
                                    format!("{:.3}", p.y),
                                    format!("{:.3}", p.case_kn[0]),
                                    format!("{:.3}", p.case_kn[1]),
                                    format!("{:.3}", p.case_kn[2]),
                                    format!("{:.3}", pc.max_kn),
                                    format!("{:.3}", pc.min_kn),
                                    rd.utilisation.map_or("—".into(), |u| format!("{:.1}", 100.0 * u)),
                                    if checked { format!("{:.1}", pc.bearing_kpa) } else { "—".into() },
                                    a.combinations[c].name.clone(),
                                    status_text(status, checked).to_string(),
                                    a.method_label(pc.max_method).to_string(),
                                ];
                                for (k, (text, w)) in cells.into_iter().zip(widths).enumerate() {
                                    ui.allocate_ui(egui::vec2(w, row_h), |ui| {
                                        if let (8, Some(b)) = (k, rd.band()) {
                                            let (rect, _) = ui.allocate_exact_size(egui::vec2(10.0, 10.0), egui::Sense::hover());
                                            ui.painter().rect_filled(rect, 1.0, rgb(b.colour()));
                                        }
                                        let t = egui::RichText::new(text);
                                        ui.label(if selected { t.strong() } else if k == 11 && !status.is_ok() { t.strong() } else { t });
                                    });
                                }
                            })
                            .response
                            .interact(egui::Sense::click());
                        if resp.clicked() {
                            actions.push(Action::Select(vec![r]));
                        }
                    }
                });
            }
        }
    }
}
