//! What is drawn over the 3D view: the legend with the numeric scale and the cues, labels on
//! the worst plates (and the hovered and selected ones), a summary of the worst plate, and in
//! pictures the title and the caution.

use bevy_egui::egui::{self, Align2, Color32, FontId, Pos2, Rect, Stroke, StrokeKind, Vec2};
use plateload::export::palette::Band;
use plateload::{Analysis, AnalysisError, CAUTION};

use super::rgb;
use crate::app::doc::{SceneDoc, Selection};
use crate::app::view::draw::{reading, CASE_COLOURS, NOT_CHECKED};
use plateload::edit::pick::{CUE_BAND_M, CUE_GAP_M};
use crate::app::view::ViewState;

/// Most plates labelled without being hovered or selected.
pub const MAX_LABELS: usize = 12;

/// Width of the side column of a picture (summary and legend), pixels.
const PICTURE_SIDE_W: f32 = 350.0;
/// Height of a picture's title strip, pixels.
const PICTURE_TITLE_H: f32 = 44.0;
/// Font size of the caution in pictures.
const CAUTION_SIZE: f32 = 15.0;

/// The part of a picture the 3D view takes: the window less the title strip, the caution and
/// (when the picture is wide enough) the side column with the summary and the legend.
pub fn picture_view_rect(ctx: &egui::Context, full: Rect) -> Rect {
    let caution_h = ctx.fonts_mut(|f| f.layout(CAUTION.to_string(), FontId::proportional(CAUTION_SIZE), Color32::BLACK, full.width() - 32.0).size().y) + 12.0;
    let side = if full.width() >= 900.0 { PICTURE_SIDE_W } else { 0.0 };
    Rect::from_min_max(Pos2::new(full.min.x, full.min.y + PICTURE_TITLE_H), Pos2::new(full.max.x - side, full.max.y - caution_h))
}

/// Draw the overlay: labels inside `rect` (the 3D view); in a picture also the summary and the
/// legend beside it (or inside it, when narrow), the title and the caution. The editor shows
/// its summary and legend in a strip under the view instead ([`legend_strip`]), so nothing
/// but the labels, which keep clear of the plates, lies over the scene.
pub fn draw(ctx: &egui::Context, full: Rect, rect: Rect, doc: &SceneDoc, view: &ViewState, selection: &Selection, picture: bool, cache: &mut LabelCache) {
    if rect.width() < 50.0 || rect.height() < 50.0 || !view.ready() {
        return;
    }
    let painter = ctx.layer_painter(egui::LayerId::new(egui::Order::Middle, egui::Id::new("view-overlay")));
    let in_view = painter.with_clip_rect(rect);
    let comb_name = view.settings.combination.and_then(|c| doc.scene.combinations.get(c)).map_or("governing combination".to_string(), |c| format!("combination “{}”", c.name));
    // Where the summary and the legend go: the side column of a picture, else the view.
    let side = picture && rect.max.x < full.max.x - 100.0;
    let column = if side { Rect::from_min_max(Pos2::new(rect.max.x + 10.0, rect.min.y), Pos2::new(full.max.x - 10.0, rect.max.y)) } else { rect.shrink(10.0) };
    if picture {
        // Backgrounds go under everything else egui draws (the legend is an area of its own).
        let back = ctx.layer_painter(egui::LayerId::background());
        back.rect_filled(Rect::from_min_max(full.min, Pos2::new(full.max.x, rect.min.y)), 0.0, Color32::WHITE);
        if side {
            back.rect_filled(Rect::from_min_max(Pos2::new(rect.max.x, rect.min.y), Pos2::new(full.max.x, rect.max.y)), 0.0, Color32::from_gray(246));
        }
        let title = format!("{} — base plate utilisation, {comb_name}", doc.scene.site.name);
        painter.text(Pos2::new(full.min.x + 12.0, full.min.y + 10.0), Align2::LEFT_TOP, title, FontId::proportional(22.0), Color32::BLACK);
    }
    match &doc.result {
        Ok(a) => {
            // Summary and legend first: the labels keep clear of them.
            let (s, l) = if picture {
                let s = summary(&painter, column, a, view.settings.combination, &comb_name, side);
                let legend_at = if side { Some(Pos2::new(column.min.x, s.max.y + 10.0)) } else { None };
                (s, legend(ctx, column, legend_at, a, view.settings.combination, &comb_name))
            } else {
                (Rect::NOTHING, Rect::NOTHING)
            };
            let cog = a.stability.centre_of_gravity.and_then(|(x, y)| {
                let z = doc.scene.posts.iter().map(|p| p.base_level).fold(f64::INFINITY, f64::min);
                view.to_window([x, y, if z.is_finite() { z } else { 0.0 }]).map(|p| Pos2::new(p[0], p[1]))
            });
            let keep_clear = if side { Vec::new() } else { [s, l].into_iter().filter(|r| r.is_positive()).map(|r| r.expand(4.0)).collect() };
            plate_labels(&in_view, rect, a, doc, view, selection, cog, &keep_clear, cache);
            if let Some(h) = selection.hovered.as_ref().filter(|h| h.kind == plateload::scene::model::ElementKind::Post) {
                if let (Some(i), Some(pointer)) = (a.plate_index(&h.id), ctx.pointer_hover_pos().filter(|p| rect.contains(*p))) {
                    hover_card(&painter, rect, pointer, a, i, view.settings.combination);
                }
            }
        }
        Err(e) => {
            let n = match e {
                AnalysisError::Invalid(v) => format!("{} problem(s) stop the solve", v.problems.len()),
                other => other.to_string(),
            };
            let text = format!("No results: {n} — see the results panel.");
            let at = if side { Pos2::new(column.min.x, column.min.y) } else { Pos2::new(column.max.x, column.min.y) };
            let align = if side { Align2::LEFT_TOP } else { Align2::RIGHT_TOP };
            painter.text(at, align, text, FontId::proportional(16.0), Color32::from_rgb(0xb0, 0x20, 0x20));
        }
    }
    if picture {
        caution_banner(&painter, full);
    }
}

/// The hovered plate's numbers beside the pointer: kN per case, the combined load, the
/// utilisation and the bearing pressure.
fn hover_card(painter: &egui::Painter, rect: Rect, pointer: Pos2, a: &Analysis, i: usize, comb: Option<usize>) {
    let p = &a.plates[i];
    let r = reading(a, p, comb);
    let c = r.combination;
    let pc = &p.combinations[c];
    let name = &a.combinations[c].name;
    let cases = format!("G {:.2} kN · Q {:.2} kN · W {:.2} kN", p.case_kn[0], p.case_kn[1], p.case_kn[2]);
    let mut text = match r.utilisation {
        Some(u) => {
            let bearing = match p.allowable_kpa {
                Some(q) => format!("bearing {:.1} kPa of {q:.0} kPa allowed ({})", pc.bearing_kpa, a.ground.basis.label()),
                None => format!("bearing {:.1} kPa, not checked (no allowable)", pc.bearing_kpa),
            };
            let mut t = format!("base plate {} — {:.1} % {}\n{cases}\n{name}: max {:.2} kN, min {:.2} kN (SWL {:.1} kN)\n{bearing}", p.id, 100.0 * u, r.status.label(), pc.max_kn, pc.min_kn, p.swl_kn);
            if let Some(q) = pc.layer_top_kpa {
                t += &match pc.layer_utilisation {
                    Some(l) => format!("\non the layer {q:.1} kPa ({:.0} %)", 100.0 * l),
                    None => format!("\non the layer {q:.1} kPa, not checked"),
                };
            }
            t
        }
        // Factored loads are not compared with working-load capacities: kN only.
        None => format!(
            "base plate {}{}\n{cases}\n{name} (not a capacity check): max {:.2} kN, min {:.2} kN",
            p.id,
            if r.status.uplift { " — UPLIFT" } else { "" },
            pc.max_kn,
            pc.min_kn,
        ),
    };
    if let Some(h) = p.hold_down {
        text += &format!("\nlifts: anchor {:.2} kN{}", h.anchor_kn, h.kentledge_kn.map_or_else(String::new, |k| format!(" or {k:.2} kN kentledge")));
        if a.lifts_only_through_continuity(i) {
            text += "\n(only through members continuous over it: check how they are fixed at their heads first)";
        }
    }
    if let Some(s) = p.sliding.as_ref().filter(|s| s.slides) {
        text += &format!("\nslides: restrain for {:.2} kN", s.restraint_kn);
    }
    // Which braced bays' brace forces it carries.
    if !p.brace.bays.is_empty() || p.brace.max_kn > 5e-10 || p.brace.min_kn < -5e-10 {
        let bays = a.bays_of(&p.brace);
        let from = if bays.is_empty() { "posts above".to_owned() } else { format!("braced bay{} {}", if bays.len() == 1 { "" } else { "s" }, bays.join(", ")) };
        text.push_str(&format!("\nbrace forces {:+.2} / {:+.2} kN from {from}", plateload::format::num(p.brace.max_kn), plateload::format::num(p.brace.min_kn)));
    }
    text += &format!("\nmax by {}", a.method_label(pc.max_method));
    pointer_card(painter, rect, pointer, text, band_colour(r.band()));
}

/// A card of text beside the pointer, kept inside `rect`, with a strip of `colour` down its left
/// edge: the hover cards of plates and of spare-capacity points.
pub fn pointer_card(painter: &egui::Painter, rect: Rect, pointer: Pos2, text: String, colour: Color32) {
    let g = painter.layout_no_wrap(text, FontId::proportional(13.0), Color32::BLACK);
    let size = g.size() + Vec2::new(20.0, 10.0);
    let mut at = pointer + Vec2::new(18.0, 18.0);
    if at.x + size.x > rect.max.x {
        at.x = pointer.x - 18.0 - size.x;
    }
    if at.y + size.y > rect.max.y {
        at.y = pointer.y - 18.0 - size.y;
    }
    let bx = Rect::from_min_size(at, size);
    painter.rect_filled(bx, 4.0, Color32::from_rgba_unmultiplied(255, 255, 255, 245));
    painter.rect_filled(Rect::from_min_size(bx.min, Vec2::new(7.0, size.y)), 2.0, colour);
    painter.rect_stroke(bx, 4.0, Stroke::new(1.0, Color32::from_gray(60)), StrokeKind::Inside);
    painter.galley(bx.min + Vec2::new(14.0, 5.0), g, Color32::BLACK);
}

/// The caution across the bottom of a picture.
fn caution_banner(painter: &egui::Painter, rect: Rect) {
    let galley = painter.layout(CAUTION.to_string(), FontId::proportional(CAUTION_SIZE), Color32::BLACK, rect.width() - 32.0);
    let h = galley.size().y + 12.0;
    let band = Rect::from_min_max(Pos2::new(rect.min.x, rect.max.y - h), rect.max);
    painter.rect_filled(band, 0.0, Color32::from_rgb(0xff, 0xe0, 0x82));
    painter.galley(Pos2::new(rect.min.x + 16.0, band.min.y + 6.0), galley, Color32::BLACK);
}

/// The summary's four lines (worst plate, what governs it, counts, what the colours show), its
/// band and whether that plate fails; `None` without plates.
pub fn summary_lines(a: &Analysis, comb: Option<usize>, comb_name: &str) -> Option<([String; 4], Option<Band>, bool)> {
    let &w = worst_first(a, comb).first()?;
    let p = &a.plates[w];
    let r = reading(a, p, comb);
    let c = r.combination;
    let pc = &p.combinations[c];
    let over = a.plates.iter().filter(|p| reading(a, p, comb).status.over).count();
    let lift = a.plates.iter().filter(|p| reading(a, p, comb).status.uplift).count();
    let lines = match r.utilisation {
        Some(u) => {
            let by = match pc.governed_by() {
                "ground bearing" => format!("ground bearing {:.0} kPa of {:.0} kPa allowed", pc.bearing_kpa, p.allowable_kpa.unwrap_or(0.0)),
                "granular layer" => format!("{:.0} kPa on the granular layer", pc.layer_top_kpa.unwrap_or(0.0)),
                _ => format!("{:.1} kN on a {:.1} kN jack", pc.max_kn, p.swl_kn),
            };
            [
                format!("Worst base plate: {} at {:.1} %", p.id, 100.0 * u),
                format!("{by} ({})", a.combinations[c].name),
                format!("{over} over capacity · {lift} lifting · {} base plates", a.plates.len()),
                format!("colours: {comb_name}"),
            ]
        }
        None => [
            format!("Largest load: {} with {:.1} kN", p.id, pc.max_kn),
            format!("“{}” is not a capacity check: factored kN only", a.combinations[c].name),
            format!("{lift} lifting · {} base plates", a.plates.len()),
            "plates in grey: no utilisation in this combination".to_string(),
        ],
    };
    Some((lines, r.band(), !r.status.is_ok()))
}

/// Whole-structure checks that fail or were refused (overturning, sliding), one line each.
pub fn structure_alerts(a: &Analysis) -> Vec<String> {
    let mut lines = Vec::new();
    if let Some(why) = &a.stability.refused {
        lines.push(format!("overturning NOT CHECKED: {why}"));
    } else if a.stability.fails() {
        if let Some((_, ax)) = a.stability.governing() {
            let need = ax.kentledge.as_ref().and_then(|k| k.needed_kn).map_or_else(String::new, |k| format!(", needs {k:.2} kN kentledge"));
            lines.push(format!("overturning FAILS towards {} (factor {}){need}", ax.towards, ax.factor.map_or_else(|| "—".to_owned(), |f| format!("{f:.2}"))));
        }
    }
    if a.sliding.fails() {
        lines.push(format!("sliding FAILS: {} plate(s) to restrain", a.sliding.plates_to_restrain));
    }
    lines
}

/// Worst plate and counts: at the top of `column` (left-aligned beside the view, else
/// right-aligned inside it). Returns where it was drawn.
fn summary(painter: &egui::Painter, column: Rect, a: &Analysis, comb: Option<usize>, comb_name: &str, side: bool) -> Rect {
    let Some((lines, band, failing)) = summary_lines(a, comb, comb_name) else { return Rect::from_min_size(column.min, Vec2::ZERO) };
    let [worst, by, counts, colours] = lines;
    // Whole-structure checks that fail come before the colours line (details in "Equilibrium &
    // stability").
    let mut lines = vec![(worst, 20.0), (by, 14.0), (counts, 14.0)];
    lines.extend(structure_alerts(a).into_iter().map(|t| (t, 14.0)));
    lines.push((colours, 12.0));
    // Wrapped to the column beside a picture; one line each inside the editor's view.
    let wrap = if side { column.width() - 24.0 } else { f32::INFINITY };
    let galleys: Vec<_> = lines.into_iter().map(|(t, s)| painter.layout(t, FontId::proportional(s), Color32::BLACK, wrap)).collect();
    let w_box = galleys.iter().map(|g| g.size().x).fold(0.0, f32::max) + 24.0;
    let h_box = galleys.iter().map(|g| g.size().y + 2.0).sum::<f32>() + 14.0;
    let w_box = if side { column.width() } else { w_box };
    let x = if side { column.min.x } else { column.max.x - w_box };
    let bx = Rect::from_min_size(Pos2::new(x, column.min.y), Vec2::new(w_box, h_box));
    painter.rect_filled(bx, 4.0, Color32::from_rgba_unmultiplied(255, 255, 255, 235));
    let stripe = Rect::from_min_size(bx.min, Vec2::new(8.0, h_box));
    painter.rect_filled(stripe, 2.0, band_colour(band));
    if failing {
        painter.rect_stroke(bx, 4.0, Stroke::new(3.0, Color32::BLACK), StrokeKind::Inside);
    }
    let mut y = bx.min.y + 7.0;
    for g in galleys {
        let h = g.size().y;
        painter.galley(Pos2::new(bx.min.x + 16.0, y), g, Color32::BLACK);
        y += h + 2.0;
    }
    bx
}

/// Legend: numeric scale, plate counts per band, cues, load cases.
/// `at`: top-left corner (beside the view); `None`: bottom-left corner of `column`.
/// Returns where it was drawn.
fn legend(ctx: &egui::Context, column: Rect, at: Option<Pos2>, a: &Analysis, comb: Option<usize>, comb_name: &str) -> Rect {
    let (counts, not_checked) = band_counts(a, comb);
    let beside = at.is_some();
    let (pivot, pos) = match at {
        Some(p) => (Align2::LEFT_TOP, p),
        None => (Align2::LEFT_BOTTOM, Pos2::new(column.min.x, column.max.y)),
    };
    let shown = egui::Area::new(egui::Id::new("legend"))
        .order(egui::Order::Middle)
        .pivot(pivot)
        .fixed_pos(pos)
        .constrain_to(column)
        .show(ctx, |ui| {
            egui::Frame::new().fill(Color32::from_rgba_unmultiplied(255, 255, 255, 235)).corner_radius(4.0).inner_margin(10.0).show(ui, |ui| {
                ui.visuals_mut().override_text_color = Some(Color32::BLACK);
                ui.set_max_width((column.width() - 24.0).min(360.0));
                ui.label(egui::RichText::new("Base plate utilisation").strong().size(15.0).color(Color32::BLACK));
                ui.label(egui::RichText::new(format!("larger of load ÷ SWL and pressure ÷ allowable; {comb_name}")).size(11.0));
                let _ = beside;
                for b in Band::ALL.iter().rev() {
                    ui.horizontal(|ui| {
                        let (r, _) = ui.allocate_exact_size(Vec2::new(26.0, 16.0), egui::Sense::hover());
                        ui.painter().rect_filled(r, 2.0, rgb(b.colour()));
                        ui.painter().rect_stroke(r, 2.0, Stroke::new(1.0, Color32::from_gray(90)), StrokeKind::Inside);
                        let n = counts[*b as usize];
                        ui.label(egui::RichText::new(format!("{:<10} {n} plate{}", b.label(), if n == 1 { "" } else { "s" })).monospace().size(13.0));
                    });
                }
                if not_checked > 0 {
                    ui.horizontal(|ui| {
                        let (r, _) = ui.allocate_exact_size(Vec2::new(26.0, 16.0), egui::Sense::hover());
                        ui.painter().rect_filled(r, 2.0, rgb(NOT_CHECKED));
                        ui.painter().rect_stroke(r, 2.0, Stroke::new(1.0, Color32::from_gray(90)), StrokeKind::Inside);
                        ui.label(egui::RichText::new(format!("not a capacity check: {not_checked} plate{} (kN only)", if not_checked == 1 { "" } else { "s" })).size(13.0));
                    });
                }
                ui.add_space(4.0);
                ui.horizontal(|ui| {
                    let (r, _) = ui.allocate_exact_size(Vec2::new(26.0, 18.0), egui::Sense::hover());
                    cue_square(ui.painter(), r.center(), 8.0);
                    ui.label("square frame: over capacity");
                });
                ui.horizontal(|ui| {
                    let (r, _) = ui.allocate_exact_size(Vec2::new(26.0, 18.0), egui::Sense::hover());
                    cue_ring(ui.painter(), r.center(), 8.0);
                    ui.label("round ring and raised cone: plate lifts");
                });
                ui.horizontal(|ui| {
                    let (r, _) = ui.allocate_exact_size(Vec2::new(26.0, 18.0), egui::Sense::hover());
                    cog_symbol(ui.painter(), r.center(), 7.0);
                    ui.label("centre of gravity of permanent load");
                });
                ui.horizontal_wrapped(|ui| {
                    ui.label("load arrows:");
                    for (c, col) in ["G permanent", "Q imposed", "W horizontal"].iter().zip(CASE_COLOURS) {
                        let (r, _) = ui.allocate_exact_size(Vec2::new(12.0, 12.0), egui::Sense::hover());
                        ui.painter().rect_filled(r, 1.0, rgb(col));
                        ui.label(*c);
                    }
                });
            });
        });
    shown.response.rect
}

/// The editor's summary and legend: a strip of its own under the 3D view, so neither covers the
/// scene. The first line names the worst plate; unfolded, the bands with their counts and the
/// cues follow; folded, the bands and counts stay on that first line.
pub fn legend_strip(ui: &mut egui::Ui, a: &Analysis, comb: Option<usize>, comb_name: &str, open: &mut bool) {
    let (counts, not_checked) = band_counts(a, comb);
    let swatch = |c: Color32| move |p: &egui::Painter, r: Rect| {
        let r = Rect::from_center_size(r.center(), Vec2::new(20.0, 13.0));
        p.rect_filled(r, 2.0, c);
        p.rect_stroke(r, 2.0, Stroke::new(1.0, Color32::from_gray(90)), StrokeKind::Inside);
    };
    let bands = |ui: &mut egui::Ui, long: bool| {
        for b in Band::ALL.iter().rev() {
            let n = counts[*b as usize];
            let text = if long { format!("{} {n}", b.label()) } else { n.to_string() };
            ui.add(chip(swatch(rgb(b.colour())), text)).on_hover_text(format!("{}: {n} plate{}", b.label(), if n == 1 { "" } else { "s" }));
        }
        if not_checked > 0 {
            let text = if long { format!("no capacity check {not_checked}") } else { not_checked.to_string() };
            ui.add(chip(swatch(rgb(NOT_CHECKED)), text)).on_hover_text("this combination's factored loads are not compared with working-load capacities: kN only");
        }
    };
    ui.horizontal_wrapped(|ui| {
        if ui.small_button(if *open { "hide legend" } else { "legend" }).on_hover_text(if *open { "fold the legend to one line" } else { "show the bands and the cues" }).clicked() {
            *open = !*open;
        }
        if let Some(([worst, by, counts_line, _], band, failing)) = summary_lines(a, comb, comb_name) {
            ui.add(chip(swatch(band_colour(band)), egui::RichText::new(worst).strong().color(if failing { Color32::from_rgb(0xb0, 0x20, 0x20) } else { ui.visuals().strong_text_color() })));
            ui.label(format!("— {by} · {counts_line}"));
        }
        for alert in structure_alerts(a) {
            ui.label(egui::RichText::new(alert).strong().color(Color32::from_rgb(0xb0, 0x20, 0x20)));
        }
        if !*open {
            ui.separator();
            bands(ui, false);
        }
    });
    if !*open {
        return;
    }
    ui.horizontal_wrapped(|ui| {
        ui.label(format!("Base plate utilisation, the larger of load ÷ SWL and pressure ÷ allowable ({comb_name}):"));
        bands(ui, true);
    });
    ui.horizontal_wrapped(|ui| {
        ui.add(chip(|p: &egui::Painter, r: Rect| cue_square(p, r.center(), 7.0), "square frame: over capacity"));
        ui.add(chip(|p: &egui::Painter, r: Rect| cue_ring(p, r.center(), 7.0), "round ring and raised cone: plate lifts"));
        ui.add(chip(|p: &egui::Painter, r: Rect| cog_symbol(p, r.center(), 7.0), "centre of gravity of permanent load"));
        ui.label("load arrows:");
        for (c, col) in ["G permanent", "Q imposed", "W horizontal"].iter().zip(CASE_COLOURS) {
            ui.add(chip(
                move |p: &egui::Painter, r: Rect| {
                    p.rect_filled(Rect::from_center_size(r.center(), Vec2::splat(12.0)), 1.0, rgb(col));
                },
                *c,
            ));
        }
    });
}

/// A symbol and its text as one piece, so a wrapping line breaks between pieces, never inside.
fn chip(symbol: impl Fn(&egui::Painter, Rect), text: impl Into<egui::WidgetText>) -> impl egui::Widget {
    move |ui: &mut egui::Ui| {
        let galley = text.into().into_galley(ui, Some(egui::TextWrapMode::Extend), f32::INFINITY, egui::TextStyle::Body);
        let icon = Vec2::new(24.0, galley.size().y.max(18.0));
        let (rect, response) = ui.allocate_exact_size(Vec2::new(icon.x + galley.size().x, icon.y), egui::Sense::hover());
        if ui.is_rect_visible(rect) {
            symbol(ui.painter(), Rect::from_min_size(rect.min, icon));
            let colour = ui.visuals().text_color();
            ui.painter().galley(Pos2::new(rect.min.x + icon.x, rect.center().y - galley.size().y / 2.0), galley, colour);
        }
        response
    }
}

fn cue_square(p: &egui::Painter, c: Pos2, h: f32) {
    let r = Rect::from_center_size(c, Vec2::splat(2.0 * h));
    p.rect_stroke(r, 0.0, Stroke::new(5.0, Color32::BLACK), StrokeKind::Middle);
    p.rect_stroke(r, 0.0, Stroke::new(2.5, Color32::WHITE), StrokeKind::Middle);
}

fn cue_ring(p: &egui::Painter, c: Pos2, r: f32) {
    p.circle_stroke(c, r, Stroke::new(5.0, Color32::BLACK));
    p.circle_stroke(c, r, Stroke::new(2.5, Color32::WHITE));
}

fn cog_symbol(p: &egui::Painter, c: Pos2, r: f32) {
    p.circle_filled(c, r, Color32::WHITE);
    for q in [0.0f32, 2.0] {
        let a0 = q * std::f32::consts::FRAC_PI_2;
        let pts: Vec<Pos2> = std::iter::once(c).chain((0..=8).map(|i| {
            let t = a0 + i as f32 / 8.0 * std::f32::consts::FRAC_PI_2;
            c + Vec2::new(t.cos(), -t.sin()) * r
        })).collect();
        p.add(egui::Shape::convex_polygon(pts, Color32::BLACK, Stroke::NONE));
    }
    p.circle_stroke(c, r, Stroke::new(1.0, Color32::BLACK));
}

/// A label to place: the plate's screen footprint and its text.
#[derive(Debug, Clone, PartialEq)]
pub struct LabelRequest {
    /// Plate footprint on screen (with its cue), pixels.
    pub anchor: Rect,
    /// Label size, pixels.
    pub size: Vec2,
    /// Where its leader starts: the plate's coloured face (without the cue), pixels.
    pub face: Rect,
    /// Shown even where every place near it covers another plate (the worst plate's label):
    /// then in the place that covers the fewest plates.
    pub must: bool,
}

/// Place labels near their anchors without covering any plate, another label or a box to keep
/// clear: the first of eight positions around the anchor (then further out) that is free and
/// inside `bounds`, preferring one whose leader crosses no other plate's cue, then one whose
/// leader crosses no other plate's coloured face (`faces`: every plate's). `None` (no label)
/// when there is no such place, as in a dense grid seen from afar: a label never hides a plate,
/// except one that must be shown ([`LabelRequest::must`]), which takes the place that covers the
/// fewest other plates ([`forced_place`]).
pub fn place_labels(requests: &[LabelRequest], plates: &[Rect], faces: &[Rect], keep_clear: &[Rect], bounds: Rect) -> Vec<Option<Rect>> {
    let all_plates = plates;
    let mut placed: Vec<Option<Rect>> = Vec::with_capacity(requests.len());
    for req in requests {
        let a = req.anchor;
        let (w, h) = (req.size.x, req.size.y);
        let c = a.center();
        let rects: Vec<Rect> = [10.0f32, 40.0, 90.0]
            .iter()
            .flat_map(|&gap| {
                [
                    Pos2::new(a.max.x + gap, a.min.y - gap - h),
                    Pos2::new(a.min.x - gap - w, a.min.y - gap - h),
                    Pos2::new(a.max.x + gap, a.max.y + gap),
                    Pos2::new(a.min.x - gap - w, a.max.y + gap),
                    Pos2::new(c.x - w / 2.0, a.min.y - gap - h),
                    Pos2::new(c.x - w / 2.0, a.max.y + gap),
                    Pos2::new(a.max.x + gap, c.y - h / 2.0),
                    Pos2::new(a.min.x - gap - w, c.y - h / 2.0),
                ]
            })
            .map(|p| Rect::from_min_size(p, req.size))
            .collect();
        // Only plates near the anchor can be in the way of a label or its leader.
        let reach = Rect::from_min_max(a.min - req.size - Vec2::splat(100.0), a.max + req.size + Vec2::splat(100.0));
        let plates: Vec<&Rect> = plates.iter().filter(|p| p.intersects(reach)).collect();
        let allowed = |r: &Rect| {
            bounds.contains_rect(*r)
                && !keep_clear.iter().any(|k| k.intersects(*r))
                && !placed.iter().flatten().any(|o| o.expand(2.0).intersects(*r))
                && !plates.iter().any(|p| p.intersects(*r))
        };
        // Leaders are drawn over the scene: one across another plate's face hides a strip of
        // its colour. (Footprints with cues overlap their neighbours' when seen obliquely, so
        // the plates whose cue touches this one's are left out of the first, stricter test.)
        let leader = |r: &Rect| (leader_start(req.face, r.center()), r.center());
        let clean_of_cues = |r: &Rect| !plates.iter().filter(|p| !p.intersects(a)).any(|p| segment_hits_rect(leader(r).0, leader(r).1, **p));
        let faces: Vec<&Rect> = faces.iter().filter(|f| f.intersects(reach) && **f != req.face).collect();
        let clean_of_faces = |r: &Rect| !faces.iter().any(|f| segment_hits_rect(leader(r).0, leader(r).1, **f));
        placed.push(
            rects
                .iter()
                .find(|r| allowed(r) && clean_of_faces(r) && clean_of_cues(r))
                .or_else(|| rects.iter().find(|r| allowed(r) && clean_of_faces(r)))
                .or_else(|| rects.iter().find(|r| allowed(r)))
                .copied()
                .or_else(|| if req.must { forced_place(req, &rects, all_plates, keep_clear, &placed, bounds) } else { None }),
        );
    }
    placed
}

/// A place for a label that must be shown where no free one was found: among the places tried
/// and places further out (each also moved inside `bounds`), the one that covers the fewest
/// plates, nearest first. Never over its own plate, a label placed before it or a box to keep
/// clear, and always inside `bounds`; `None` only where no such place exists at all.
fn forced_place(req: &LabelRequest, near: &[Rect], plates: &[Rect], keep_clear: &[Rect], placed: &[Option<Rect>], bounds: Rect) -> Option<Rect> {
    let a = req.anchor;
    let size = req.size;
    let c = a.center();
    let further = [160.0f32, 260.0, 400.0].into_iter().flat_map(|gap| {
        [
            Pos2::new(a.max.x + gap, a.min.y - gap - size.y),
            Pos2::new(a.min.x - gap - size.x, a.min.y - gap - size.y),
            Pos2::new(a.max.x + gap, a.max.y + gap),
            Pos2::new(a.min.x - gap - size.x, a.max.y + gap),
            Pos2::new(c.x - size.x / 2.0, a.min.y - gap - size.y),
            Pos2::new(c.x - size.x / 2.0, a.max.y + gap),
        ]
        .map(|p| Rect::from_min_size(p, size))
    });
    // Moved inside the bounds along the way it points, where it fits at all.
    let inside = |r: Rect| -> Option<Rect> {
        if size.x > bounds.width() || size.y > bounds.height() {
            return None;
        }
        let min = Pos2::new(r.min.x.clamp(bounds.min.x, bounds.max.x - size.x), r.min.y.clamp(bounds.min.y, bounds.max.y - size.y));
        Some(Rect::from_min_size(min, size))
    };
    let candidates = near.iter().copied().chain(further).filter_map(inside);
    let ok = |r: &Rect| !r.intersects(a) && !keep_clear.iter().any(|k| k.intersects(*r)) && !placed.iter().flatten().any(|o| o.expand(2.0).intersects(*r));
    let mut best: Option<(usize, f32, Rect)> = None;
    for r in candidates.filter(ok) {
        let covered = plates.iter().filter(|p| p.intersects(r)).count();
        let dist = (r.center() - c).length();
        if best.is_none_or(|(n, d, _)| (covered, dist) < (n, d)) {
            best = Some((covered, dist, r));
        }
    }
    best.map(|b| b.2)
}

/// Plate indices from the highest utilisation down, then (where there is none, in a
/// combination that does not check capacity) from the largest load down; ties in scene order.
pub fn worst_first(a: &Analysis, comb: Option<usize>) -> Vec<usize> {
    let key: Vec<(f64, f64)> = a.plates.iter().map(|p| reading(a, p, comb)).map(|r| (r.sort_key(), r.max_kn)).collect();
    let mut order: Vec<usize> = (0..a.plates.len()).collect();
    order.sort_by(|&i, &j| key[j].partial_cmp(&key[i]).unwrap_or(std::cmp::Ordering::Equal));
    order
}

/// Plates per utilisation band, and plates without a utilisation in this combination.
fn band_counts(a: &Analysis, comb: Option<usize>) -> ([usize; 5], usize) {
    let (mut counts, mut none) = ([0usize; 5], 0);
    for p in &a.plates {
        match reading(a, p, comb).band() {
            Some(b) => counts[b as usize] += 1,
            None => none += 1,
        }
    }
    (counts, none)
}

/// Colour of a band, or the neutral grey of a plate with no utilisation.
fn band_colour(b: Option<Band>) -> Color32 {
    rgb(b.map_or(NOT_CHECKED, |b| b.colour()))
}

/// Where a leader leaves a plate's footprint towards a label centre.
pub fn leader_start(anchor: Rect, to: Pos2) -> Pos2 {
    Pos2::new(to.x.clamp(anchor.min.x, anchor.max.x), to.y.clamp(anchor.min.y, anchor.max.y))
}

/// Whether the segment a–b passes through the rectangle (slab test).
pub fn segment_hits_rect(a: Pos2, b: Pos2, r: Rect) -> bool {
    segment_in_rect(a, b, r).is_some()
}

/// The part of segment a–b inside the rectangle, as parameters `t0..t1` along it (slab test).
fn segment_in_rect(a: Pos2, b: Pos2, r: Rect) -> Option<(f32, f32)> {
    let (mut t0, mut t1) = (0.0f32, 1.0f32);
    for (o, d, lo, hi) in [(a.x, b.x - a.x, r.min.x, r.max.x), (a.y, b.y - a.y, r.min.y, r.max.y)] {
        if d.abs() < 1e-6 {
            if o < lo || o > hi {
                return None;
            }
        } else {
            let (u, v) = ((lo - o) / d, (hi - o) / d);
            t0 = t0.max(u.min(v));
            t1 = t1.min(u.max(v));
            if t0 > t1 {
                return None;
            }
        }
    }
    Some((t0, t1))
}

/// The pieces of segment a–b outside every rectangle, in order from `a`.
pub fn segment_outside_rects(a: Pos2, b: Pos2, rects: &[Rect]) -> Vec<[Pos2; 2]> {
    let mut inside: Vec<(f32, f32)> = rects.iter().filter_map(|r| segment_in_rect(a, b, *r)).collect();
    inside.sort_by(|x, y| x.0.total_cmp(&y.0));
    let mut pieces = Vec::new();
    let mut t = 0.0f32;
    for (t0, t1) in inside {
        if t0 > t {
            pieces.push([a.lerp(b, t), a.lerp(b, t0)]);
        }
        t = t.max(t1);
    }
    if t < 1.0 {
        pieces.push([a.lerp(b, t), b]);
    }
    pieces
}

/// Label the worst plates, every plate that is over capacity or lifts (up to [`MAX_LABELS`]),
/// and the hovered and selected ones. Returns the label rectangles.
/// The centre of gravity's label, at `cog`, is placed the same way, last. Placing looks at
/// every plate, so it is done again only when the view, the results or the selection change.
#[allow(clippy::too_many_arguments)]
fn plate_labels(painter: &egui::Painter, rect: Rect, a: &Analysis, doc: &SceneDoc, view: &ViewState, selection: &Selection, cog: Option<Pos2>, keep_clear: &[Rect], cache: &mut LabelCache) {
    let key = LabelKey {
        revision: doc.revision,
        solved: doc.solved_revision,
        camera: view.camera,
        viewport: view.viewport,
        settings: (view.settings.combination, view.settings.labels),
        selection: selection.items.clone(),
        hovered: selection.hovered.clone(),
        rect,
        keep_clear: keep_clear.to_vec(),
    };
    if cache.key.as_ref() != Some(&key) {
        cache.labels = place_plate_labels(painter, rect, a, doc, view, selection, cog, keep_clear);
        cache.key = Some(key);
    }
    paint_labels(painter, &cache.labels);
}

/// What the label cache was made from.
#[derive(Debug, Clone, PartialEq)]
struct LabelKey {
    revision: u64,
    solved: u64,
    camera: plateload::edit::pick::ViewCamera,
    viewport: [f32; 4],
    settings: (Option<usize>, bool),
    selection: Vec<plateload::edit::ElementRef>,
    hovered: Option<plateload::edit::ElementRef>,
    rect: Rect,
    keep_clear: Vec<Rect>,
}

/// One placed label, ready to paint.
#[derive(Debug, Clone)]
struct PlacedLabel {
    rect: Rect,
    leader_from: Pos2,
    /// The leader's visible pieces: it passes under other plates' faces, so it never hides
    /// their colour.
    leader: Vec<[Pos2; 2]>,
    /// Band colour (grey without a utilisation) and whether the plate fails; `None` for the
    /// centre of gravity.
    band: Option<(Color32, bool)>,
    text: std::sync::Arc<egui::Galley>,
}

/// Labels placed for the last view, kept between frames.
#[derive(Debug, Default)]
pub struct LabelCache {
    key: Option<LabelKey>,
    labels: Vec<PlacedLabel>,
}

impl LabelCache {
    /// The boxes of the labels last placed, [min x, min y, max x, max y] in window pixels.
    pub fn boxes(&self) -> Vec<[f32; 4]> {
        self.labels.iter().map(|l| [l.rect.min.x, l.rect.min.y, l.rect.max.x, l.rect.max.y]).collect()
    }
}

fn paint_labels(painter: &egui::Painter, labels: &[PlacedLabel]) {
    for l in labels {
        let lr = l.rect;
        match l.band {
            Some((band, failing)) => {
                for piece in &l.leader {
                    painter.line_segment(*piece, Stroke::new(2.0, Color32::from_gray(20)));
                }
                painter.circle_filled(l.leader_from, 3.0, Color32::from_gray(20));
                painter.rect_filled(lr, 3.0, Color32::from_rgba_unmultiplied(255, 255, 255, 240));
                painter.rect_filled(Rect::from_min_size(lr.min, Vec2::new(7.0, lr.height())), 2.0, band);
                let stroke = if failing { Stroke::new(2.5, Color32::BLACK) } else { Stroke::new(1.0, Color32::from_gray(60)) };
                painter.rect_stroke(lr, 3.0, stroke, StrokeKind::Inside);
                painter.galley(Pos2::new(lr.min.x + 12.0, lr.min.y + 3.0), l.text.clone(), Color32::BLACK);
            }
            None => {
                for piece in &l.leader {
                    painter.line_segment(*piece, Stroke::new(1.0, Color32::from_gray(40)));
                }
                painter.rect_filled(lr, 2.0, Color32::from_rgba_unmultiplied(255, 255, 255, 200));
                painter.galley(lr.min + Vec2::new(4.0, 2.0), l.text.clone(), Color32::BLACK);
            }
        }
    }
}

#[allow(clippy::too_many_arguments)]
fn place_plate_labels(painter: &egui::Painter, rect: Rect, a: &Analysis, doc: &SceneDoc, view: &ViewState, selection: &Selection, cog: Option<Pos2>, keep_clear: &[Rect]) -> Vec<PlacedLabel> {
    let comb = view.settings.combination;
    let labels_on = view.settings.labels;
    let supports: std::collections::HashMap<&str, &plateload::SupportType> = doc.scene.support_types.iter().map(|s| (s.id.as_str(), s)).collect();
    // Screen footprint of every plate, its cue included (the ring of a lifting plate reaches
    // its corners' circle).
    let footprint = |i: usize, with_cue: bool| -> Option<Rect> {
        let p = &a.plates[i];
        let post = doc.scene.posts.get(p.post)?;
        let s = post.support.as_deref().and_then(|s| supports.get(s))?;
        let b = s.bearing_plate();
        let st = reading(a, p, comb).status;
        let pad = if with_cue && !st.is_ok() { CUE_GAP_M + CUE_BAND_M } else { 0.0 };
        let (mut hx, mut hy) = (b.width_m.max(s.base_plate.width_m) / 2.0, b.length_m.max(s.base_plate.length_m) / 2.0);
        if with_cue && st.uplift {
            let r = hx.hypot(hy);
            (hx, hy) = (r, r);
        }
        let (hx, hy) = (hx + pad, hy + pad);
        let mut out: Option<Rect> = None;
        for (dx, dy) in [(-hx, -hy), (hx, -hy), (hx, hy), (-hx, hy)] {
            let q = view.to_window([p.x + dx, p.y + dy, p.base_level])?;
            let pt = Pos2::new(q[0], q[1]);
            out = Some(out.map_or(Rect::from_min_max(pt, pt), |o| o.union(Rect::from_min_max(pt, pt))));
        }
        out.map(|o| o.expand(2.0))
    };
    let plates: Vec<Option<Rect>> = (0..a.plates.len()).map(|i| footprint(i, true)).collect();
    let faces: Vec<Option<Rect>> = (0..a.plates.len()).map(|i| footprint(i, false)).collect();
    let order = worst_first(a, comb);
    let mut chosen: Vec<usize> = Vec::new();
    let add = |i: usize, chosen: &mut Vec<usize>| {
        if !chosen.contains(&i) {
            chosen.push(i);
        }
    };
    for &i in &order {
        let r = reading(a, &a.plates[i], comb);
        // The three worst, then every plate that fails or is near capacity, up to the limit.
        let notable = !r.status.is_ok() || r.utilisation.is_some_and(|u| u >= Band::Near.range().0);
        if labels_on && (chosen.len() < 3 || notable) && chosen.len() < MAX_LABELS {
            add(i, &mut chosen);
        }
    }
    for r in selection.items.iter().chain(selection.hovered.iter()) {
        if let Some(i) = a.plate_index(&r.id).filter(|_| r.kind == plateload::scene::model::ElementKind::Post) {
            add(i, &mut chosen);
        }
    }
    let font = FontId::proportional(14.0);
    let texts: Vec<String> = chosen
        .iter()
        .map(|&i| {
            let p = &a.plates[i];
            let r = reading(a, p, comb);
            let pc = &p.combinations[r.combination];
            // Without a capacity check, the factored load alone.
            let mut t = match r.utilisation {
                Some(u) => format!("{}  {:.1} %", p.id, 100.0 * u),
                None => format!("{}  {:.1} kN", p.id, pc.max_kn),
            };
            if r.status.over {
                t.push_str("  OVER");
            }
            if r.status.uplift {
                // The least load where uplift is looked for: in the chosen combination, else
                // over the combinations that check for it.
                let least = match comb {
                    Some(_) => pc.min_kn,
                    None => p.combinations.iter().zip(&a.combinations).filter(|(_, c)| c.checks_uplift).map(|(pc, _)| pc.min_kn).fold(f64::INFINITY, f64::min),
                };
                t.push_str(&format!("  lifts {least:.2} kN"));
            }
            t
        })
        .collect();
    let galleys: Vec<_> = texts.iter().map(|t| painter.layout_no_wrap(t.clone(), font.clone(), Color32::BLACK)).collect();
    let mut requests: Vec<LabelRequest> = chosen
        .iter()
        .zip(&galleys)
        // The worst plate, which the summary names, is always labelled where it is in view.
        .filter_map(|(&i, g)| Some(LabelRequest { anchor: plates[i]?, size: g.size() + Vec2::new(18.0, 6.0), face: faces[i]?, must: Some(&i) == order.first() && rect.intersects(plates[i]?) }))
        .collect();
    let cog_galley = painter.layout_no_wrap("centre of gravity (G)".into(), FontId::proportional(13.0), Color32::BLACK);
    if let Some(c) = cog {
        let anchor = Rect::from_center_size(c, Vec2::splat(16.0));
        requests.push(LabelRequest { anchor, size: cog_galley.size() + Vec2::new(8.0, 4.0), face: anchor, must: false });
    }
    let all_plates: Vec<Rect> = plates.iter().flatten().copied().collect();
    let all_faces: Vec<Rect> = faces.iter().flatten().copied().collect();
    let bounds = rect.shrink(4.0);
    let placed = place_labels(&requests, &all_plates, &all_faces, keep_clear, bounds);
    let mut out = Vec::new();
    let mut k = 0;
    for (n, &i) in chosen.iter().enumerate() {
        let (Some(_), Some(anchor)) = (plates[i], faces[i]) else { continue };
        let slot = placed[k];
        k += 1;
        let Some(lr) = slot else { continue };
        let r = reading(a, &a.plates[i], comb);
        let from = leader_start(anchor, lr.center());
        let others: Vec<Rect> = all_faces.iter().filter(|f| **f != anchor).copied().collect();
        let leader = segment_outside_rects(from, lr.center(), &others);
        out.push(PlacedLabel { rect: lr, leader_from: from, leader, band: Some((band_colour(r.band()), !r.status.is_ok())), text: galleys[n].clone() });
    }
    if let (Some(c), Some(Some(lr))) = (cog, placed.get(k)) {
        let anchor = Rect::from_center_size(c, Vec2::splat(16.0));
        let from = leader_start(anchor, lr.center());
        let leader = segment_outside_rects(from, lr.center(), &all_faces);
        out.push(PlacedLabel { rect: *lr, leader_from: from, leader, band: None, text: cog_galley });
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn crowded_labels_are_left_out_rather_than_piled_up() {
        // common practice, no source
        let plate = Rect::from_min_size(Pos2::new(50.0, 50.0), Vec2::splat(10.0));
        let bounds = Rect::from_min_size(Pos2::ZERO, Vec2::new(160.0, 110.0));
        let req = LabelRequest { anchor: plate, size: Vec2::new(60.0, 30.0), face: plate, must: false };
        let placed = place_labels(&vec![req; 12], &[plate], &[plate], &[], bounds);
        let shown: Vec<Rect> = placed.iter().flatten().copied().collect();
        assert!(!shown.is_empty() && shown.len() < 12, "{}", shown.len());
        for (i, r) in shown.iter().enumerate() {
            for o in &shown[i + 1..] {
                assert!(!o.intersects(*r));
            }
        }
    }

    #[test]
    fn a_leader_does_not_cross_a_neighbour_plate_whose_cue_touches_its_own() {
        // common practice, no source: a leader drawn across another plate hides a strip of its
        // colour. Here the neighbour's cue overlaps this plate's (as rings do seen obliquely)
        // and its face lies on the leader to the first place tried (up and to the right).
        let face = Rect::from_min_max(Pos2::new(100.0, 100.0), Pos2::new(120.0, 120.0));
        let anchor = face.expand(10.0);
        let other_face = Rect::from_min_max(Pos2::new(133.0, 89.0), Pos2::new(137.0, 93.0));
        let other = other_face.expand(6.0);
        assert!(other.intersects(anchor));
        let req = LabelRequest { anchor, size: Vec2::new(60.0, 18.0), face, must: false };
        let first = Rect::from_min_size(Pos2::new(anchor.max.x + 10.0, anchor.min.y - 10.0 - 18.0), req.size);
        assert!(segment_hits_rect(leader_start(face, first.center()), first.center(), other_face), "the first place would cross it");
        let bounds = Rect::from_min_size(Pos2::ZERO, Vec2::splat(400.0));
        let placed = place_labels(&[req], &[anchor, other], &[face, other_face], &[], bounds)[0].expect("room for the label");
        assert!(!segment_hits_rect(leader_start(face, placed.center()), placed.center(), other_face), "{placed:?}");
        assert!(!placed.intersects(other) && !placed.intersects(anchor));
    }

    #[test]
    fn a_leader_is_drawn_only_outside_other_plates() {
        // common practice, no source: a line passing under two boxes shows three pieces, none
        // of them inside a box; a line clear of the boxes is drawn whole
        let a = Pos2::new(0.0, 10.0);
        let b = Pos2::new(100.0, 10.0);
        let boxes = [Rect::from_min_max(Pos2::new(60.0, 0.0), Pos2::new(70.0, 20.0)), Rect::from_min_max(Pos2::new(20.0, 0.0), Pos2::new(30.0, 20.0))];
        let pieces = segment_outside_rects(a, b, &boxes);
        let xs = |pieces: &[[Pos2; 2]]| pieces.iter().map(|[p, q]| [p.x.round(), q.x.round()]).collect::<Vec<_>>();
        assert_eq!(xs(&pieces), vec![[0.0, 20.0], [30.0, 60.0], [70.0, 100.0]]);
        assert_eq!(segment_outside_rects(a, b, &[Rect::from_min_max(Pos2::new(40.0, 30.0), Pos2::new(50.0, 40.0))]), vec![[a, b]]);
        // Overlapping boxes, and one that covers the end.
        let pieces = segment_outside_rects(a, b, &[Rect::from_min_max(Pos2::new(20.0, 0.0), Pos2::new(50.0, 20.0)), Rect::from_min_max(Pos2::new(40.0, 0.0), Pos2::new(60.0, 20.0)), Rect::from_min_max(Pos2::new(90.0, 0.0), Pos2::new(120.0, 20.0))]);
        assert_eq!(xs(&pieces), vec![[0.0, 20.0], [60.0, 90.0]]);
    }

    #[test]
    fn labels_avoid_plates_and_each_other() {
        // common practice, no source: labels must not hide what they label
        let plates = vec![Rect::from_min_size(Pos2::new(100.0, 100.0), Vec2::splat(20.0)), Rect::from_min_size(Pos2::new(140.0, 60.0), Vec2::splat(20.0))];
        let req = |p: &Rect| LabelRequest { anchor: *p, size: Vec2::new(60.0, 18.0), face: *p, must: false };
        let bounds = Rect::from_min_size(Pos2::ZERO, Vec2::splat(400.0));
        let placed = place_labels(&[req(&plates[0]), req(&plates[1]), req(&plates[0])], &plates, &plates, &[], bounds);
        let placed: Vec<Rect> = placed.into_iter().map(|r| r.expect("room for every label")).collect();
        for (i, r) in placed.iter().enumerate() {
            assert!(bounds.contains_rect(*r));
            assert!(!plates.iter().any(|p| p.intersects(*r)), "label {i} covers a plate: {r:?}");
            for (j, o) in placed.iter().enumerate() {
                assert!(i == j || !o.intersects(*r), "labels {i} and {j} overlap");
            }
        }
    }

    #[test]
    fn a_label_that_must_be_shown_takes_the_place_covering_fewest_plates() {
        // common practice, no source: a dense grid of plates leaves no free place for a label;
        // the one that must be shown still is, inside the view, off its own plate and clear of
        // the boxes kept clear, and the others are left out
        let bounds = Rect::from_min_size(Pos2::ZERO, Vec2::new(300.0, 200.0));
        let plates: Vec<Rect> = (0..15).flat_map(|i| (0..10).map(move |j| Rect::from_min_size(Pos2::new(20.0 * i as f32, 20.0 * j as f32), Vec2::splat(14.0)))).collect();
        let anchor = plates[7 * 10 + 5];
        // The bottom row of plates is left out: a place down there covers fewer of them.
        let plates: Vec<Rect> = plates.into_iter().filter(|p| p.min.y < 180.0 || *p == anchor).collect();
        let keep_clear = [Rect::from_min_size(Pos2::new(0.0, 0.0), Vec2::new(300.0, 30.0))];
        let req = |must| LabelRequest { anchor, size: Vec2::new(90.0, 18.0), face: anchor.shrink(3.0), must };
        let placed = place_labels(&[req(true), req(false)], &plates, &plates, &keep_clear, bounds);
        let r = placed[0].expect("the label that must be shown");
        assert!(bounds.contains_rect(r) && !r.intersects(anchor) && !r.intersects(keep_clear[0]), "{r:?}");
        let covered = plates.iter().filter(|p| p.intersects(r)).count();
        assert!(covered <= 4, "it covers {covered} plates: {r:?}");
        assert_eq!(placed[1], None, "no free place for the others: {:?}", placed[1]);
        // Without `must`, the same label finds no place (the check above can fail).
        assert_eq!(place_labels(&[req(false)], &plates, &plates, &keep_clear, bounds)[0], None);
    }

    #[test]
    fn in_a_crowded_small_plan_view_the_worst_plate_is_labelled_first() {
        // common practice, no source: the plate the summary names as the worst is labelled in
        // every view it is in, however crowded; labels follow the plates from the worst down
        let spec = plateload::scene::layout::LayoutSpec { bays_x: 29, bays_y: 29, lifts: 3, deck_lifts: vec![3], ..Default::default() };
        let scene = plateload::scene::layout::generate("crowded", 100.0, &spec);
        let doc = SceneDoc::new(scene, None);
        let a = doc.analysis().expect("the birdcage solves");
        let (lo, hi) = plateload::edit::pick::structure_bounds(&doc.scene);
        let (w, h) = (520.0f32, 400.0f32);
        let mut view = ViewState { viewport: [0.0, 0.0, w, h], pending_fit: None, ..ViewState::default() };
        view.camera = plateload::edit::pick::ViewCamera::fit(lo, hi, plateload::edit::pick::ViewPreset::Plan, (w / h) as f64, true);
        let rect = Rect::from_min_size(Pos2::ZERO, Vec2::new(w, h));
        let ctx = egui::Context::default();
        let mut labels = Vec::new();
        let mut out = ctx.run_ui(egui::RawInput::default(), |ui| {
            let painter = ui.ctx().layer_painter(egui::LayerId::background());
            labels = place_plate_labels(&painter, rect, a, &doc, &view, &Selection::default(), None, &[]);
        });
        // No renderer here to take the font texture.
        out.textures_delta.clear();
        let order = worst_first(a, None);
        let worst = &a.plates[order[0]].id;
        let texts: Vec<String> = labels.iter().map(|l| l.text.text().to_owned()).collect();
        assert!(texts.first().is_some_and(|t| t.starts_with(&format!("{worst}  "))), "the worst plate {worst} is labelled first: {texts:?}");
        // The others shown come in order of utilisation, from the worst down.
        let rank = |t: &String| order.iter().position(|&i| t.starts_with(&format!("{}  ", a.plates[i].id))).expect("a plate's label");
        let ranks: Vec<usize> = texts.iter().map(rank).collect();
        assert!(ranks.windows(2).all(|w| w[0] < w[1]), "{ranks:?}");
        for l in &labels {
            assert!(rect.contains_rect(l.rect), "{:?}", l.rect);
        }
    }
}
