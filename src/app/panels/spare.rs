//! The spare-capacity overlay's controls, legend and the words under the pointer. Everything
//! shown is the engine's: its map, its bands and its words for what limits a point.

use bevy_egui::egui::{self, Align2, Color32, Pos2, Rect, Stroke, StrokeKind, Vec2};
use plateload::check::spare::HOISTED_FACTOR;
use plateload::export::palette::SpareBand;

use super::rgb;
use crate::app::view::spare::{SpareView, HATCH};

/// Per band, the number of grid points of the map in it.
fn band_counts(spare: &SpareView) -> [usize; 8] {
    let mut counts = [0usize; 8];
    if let Some(map) = spare.map() {
        for p in map.decks.iter().flat_map(|d| &d.points) {
            counts[SpareBand::of(p.kn, p.already_at_limit) as usize] += 1;
        }
    }
    counts
}

/// A band's swatch: its colour, and the hatch where a limit is already reached.
fn swatch(p: &egui::Painter, r: Rect, band: SpareBand) {
    let r = Rect::from_center_size(r.center(), Vec2::new(20.0, 13.0));
    p.rect_filled(r, 2.0, rgb(band.colour()));
    if band == SpareBand::AtLimit {
        p.line_segment([r.left_bottom() + Vec2::new(4.0, -2.0), r.right_top() + Vec2::new(-4.0, 2.0)], Stroke::new(3.0, rgb(HATCH)));
    }
    p.rect_stroke(r, 2.0, Stroke::new(1.0, Color32::from_gray(90)), StrokeKind::Inside);
}

/// The editor's strip under the view while the overlay is on: what the map is for (footprint,
/// its turn, grid, landing factor, combinations checked), the load D places, the map's bands
/// with their counts, and how to read it. `checking`: the analysis's combinations the map can
/// check (those that check capacity or uplift).
pub fn strip(ui: &mut egui::Ui, spare: &mut SpareView, checking: &[String]) {
    ui.horizontal_wrapped(|ui| {
        ui.label(egui::RichText::new("Spare capacity").strong());
        ui.label("for one extra imposed load of");
        let mut fp = spare.footprint_m;
        ui.add(egui::DragValue::new(&mut fp[0]).range(0.0..=20.0).speed(0.05).max_decimals(2).suffix(" m"));
        ui.label("×");
        ui.add(egui::DragValue::new(&mut fp[1]).range(0.0..=20.0).speed(0.05).max_decimals(2).suffix(" m")).on_hover_text("0 × 0: a point load");
        // Both sides above zero, or a point.
        if fp != spare.footprint_m {
            if (fp[0] > 0.0) != (fp[1] > 0.0) {
                let side = fp[0].max(fp[1]);
                fp = [side, side];
            }
            spare.footprint_m = fp;
        }
        if spare.footprint_m == [0.0, 0.0] {
            ui.label("(a point load)");
        } else if ui
            .add_enabled(spare.footprint_m[0] != spare.footprint_m[1], egui::Button::new("turn 90°"))
            .on_hover_text("Swap the two sides: the same load landed the other way round (a pallet can land either way).")
            .on_disabled_hover_text("A square lands the same either way.")
            .clicked()
        {
            spare.turn_footprint();
        }
        ui.label("on a grid of");
        let mut g = spare.spacing_m;
        ui.add(egui::DragValue::new(&mut g).range(0.05..=5.0).speed(0.01).max_decimals(2).suffix(" m"));
        if g != spare.spacing_m {
            spare.spacing_m = g;
        }
    });
    ui.horizontal_wrapped(|ui| {
        const LANDING: &str = "A factor on the placed load for landing it: a load set down by crane or hoist lands harder than its weight, so each value on the map is divided by this factor. 1.0: placed by hand, no factor.";
        ui.label("landing factor").on_hover_text(LANDING);
        let mut f = spare.dynamic_factor;
        ui.add(egui::DragValue::new(&mut f).range(1.0..=10.0).speed(0.01).max_decimals(2).prefix("× ")).on_hover_text(LANDING);
        let hoisted = HOISTED_FACTOR;
        let mut by_crane = (f - hoisted).abs() < 1e-9;
        if ui.checkbox(&mut by_crane, format!("set down by crane or hoist (× {})", plateload::format::num(hoisted))).on_hover_text(format!("{LANDING}\nTicked: × {} for a load set down by crane or hoist; not ticked: × 1.0.", plateload::format::num(hoisted))).changed() {
            f = if by_crane { hoisted } else { 1.0 };
        }
        if f != spare.dynamic_factor && f.is_finite() {
            spare.dynamic_factor = f.clamp(1.0, 10.0);
        }
        ui.separator();
        ui.label("checked in");
        combinations_menu(ui, &mut spare.combinations, checking);
    });
    ui.horizontal_wrapped(|ui| {
        ui.label("D places at the pointer, as an imposed load (one undo step):");
        let mut own = spare.place_kn.is_some();
        ui.radio_value(&mut own, false, "the value shown there, rounded down");
        ui.radio_value(&mut own, true, "");
        let mut kn = spare.place_kn.unwrap_or(1.0);
        ui.add_enabled(own, egui::DragValue::new(&mut kn).range(0.1..=500.0).speed(0.1).max_decimals(1).suffix(" kN"));
        let want = own.then_some(kn);
        if spare.place_kn != want {
            spare.place_kn = want;
        }
    });
    match &spare.map {
        Some(Err(why)) => {
            ui.label(egui::RichText::new(format!("no map: {why}")).color(Color32::from_rgb(0xb0, 0x20, 0x20)));
        }
        Some(Ok(map)) => {
            let counts = band_counts(spare);
            ui.horizontal_wrapped(|ui| {
                for b in SpareBand::ALL {
                    let n = counts[b as usize];
                    if n == 0 && b == SpareBand::Unlimited {
                        continue;
                    }
                    ui.add(chip(b, format!("{} {n}", b.label()))).on_hover_text(format!("{}: {n} grid point{}", b.label(), if n == 1 { "" } else { "s" }));
                }
            });
            ui.horizontal_wrapped(|ui| {
                ui.label(egui::RichText::new("Each value is for one load placed there alone, on top of the existing loads; values do not add — after placing one, the map is worked out again.").small());
                if !map.not_checked.is_empty() {
                    let n = map.not_checked.len();
                    ui.label(egui::RichText::new(format!("Not checked here (no capacity known): {n} member{}.", if n == 1 { "" } else { "s" })).small().underline())
                        .on_hover_text(map.not_checked.join(", "));
                }
                if let Some(w) = plateload::export::spare::already_reached_words(map, 4) {
                    ui.label(egui::RichText::new(format!("{}{}.", w[..1].to_uppercase(), &w[1..])).small().color(Color32::from_rgb(0xd0, 0x60, 0x40)));
                }
                if let Some(w) = &map.not_included {
                    ui.label(egui::RichText::new(format!("Not included: {w}.")).small());
                }
                if let Some(w) = &map.notional {
                    ui.label(egui::RichText::new("Its notional horizontal load is included, on the safe side.").small().underline()).on_hover_text(format!("{}{}.", w[..1].to_uppercase(), &w[1..]));
                }
            });
        }
        None => {
            ui.label("working out the map…");
        }
    }
}

/// The combinations the map checks, in words: "every combination" or their names.
pub fn combinations_words(chosen: &[String]) -> String {
    match chosen {
        [] => "every combination that checks capacity or uplift".to_owned(),
        [one] => format!("combination “{one}” only"),
        more => format!("combinations {}", more.iter().map(|c| format!("“{c}”")).collect::<Vec<_>>().join(", ")),
    }
}

/// A drop-down of the combinations to check: "all" (the empty list), or any of `checking`.
fn combinations_menu(ui: &mut egui::Ui, chosen: &mut Vec<String>, checking: &[String]) {
    let shown = match chosen.as_slice() {
        [] => "all combinations".to_owned(),
        [one] => one.clone(),
        more => format!("{} combinations", more.len()),
    };
    egui::ComboBox::from_id_salt("spare-combinations").selected_text(shown).show_ui(ui, |ui| {
        if ui.selectable_label(chosen.is_empty(), "all combinations").on_hover_text("every combination that checks capacity or uplift").clicked() {
            chosen.clear();
        }
        ui.separator();
        for name in checking {
            let mut on = chosen.contains(name);
            if ui.checkbox(&mut on, name.as_str()).changed() {
                if on {
                    chosen.push(name.clone());
                    // In the analysis's order, whatever order they were ticked in.
                    chosen.sort_by_key(|c| checking.iter().position(|n| n == c));
                } else {
                    chosen.retain(|c| c != name);
                }
                // Every one ticked is the same as all.
                if chosen.len() == checking.len() {
                    chosen.clear();
                }
            }
        }
        if checking.is_empty() {
            ui.label("no combination checks capacity or uplift");
        }
    });
}

/// A band swatch and its text as one piece.
fn chip(band: SpareBand, text: String) -> impl egui::Widget {
    move |ui: &mut egui::Ui| {
        let galley = egui::WidgetText::from(text).into_galley(ui, Some(egui::TextWrapMode::Extend), f32::INFINITY, egui::TextStyle::Body);
        let icon = Vec2::new(24.0, galley.size().y.max(18.0));
        let (rect, response) = ui.allocate_exact_size(Vec2::new(icon.x + galley.size().x + 6.0, icon.y), egui::Sense::hover());
        if ui.is_rect_visible(rect) {
            swatch(ui.painter(), Rect::from_min_size(rect.min, icon), band);
            let colour = ui.visuals().text_color();
            ui.painter().galley(Pos2::new(rect.min.x + icon.x, rect.center().y - galley.size().y / 2.0), galley, colour);
        }
        response
    }
}

/// The hovered point in words beside the pointer, with what D would place there.
pub fn hover_card(painter: &egui::Painter, rect: Rect, pointer: Pos2, spare: &SpareView) {
    let (Some(h), Some(p)) = (spare.hover.as_ref(), spare.hovered_point()) else { return };
    let Some(deck) = spare.map().and_then(|m| m.decks.get(h.deck)) else { return };
    let mut text = format!("deck {} at ({:.2}, {:.2})\n{}", deck.deck, p.x, p.y, h.words);
    text += &match spare.load_to_place() {
        Some(kn) => format!("\nD: put {} kN here as an imposed load (case Q)", plateload::format::num(kn)),
        None => "\nnothing to place here".to_owned(),
    };
    super::overlay::pointer_card(painter, rect, pointer, text, rgb(SpareBand::of(p.kn, p.already_at_limit).colour()));
}

/// In a picture: the map's legend at the bottom of the side column (or of the view).
pub fn picture_legend(ctx: &egui::Context, bottom_left: Pos2, width: f32, spare: &SpareView) {
    let counts = band_counts(spare);
    let fp = spare.footprint();
    let what = if fp.is_point() { "a point load".to_owned() } else { format!("a load over {} × {} m", plateload::format::num(fp.x_m), plateload::format::num(fp.y_m)) };
    egui::Area::new(egui::Id::new("spare-legend")).order(egui::Order::Middle).pivot(Align2::LEFT_BOTTOM).fixed_pos(bottom_left).show(ctx, |ui| {
        egui::Frame::new().fill(Color32::from_rgba_unmultiplied(255, 255, 255, 235)).corner_radius(4.0).inner_margin(10.0).show(ui, |ui| {
            ui.visuals_mut().override_text_color = Some(Color32::BLACK);
            ui.set_max_width(width - 24.0);
            ui.label(egui::RichText::new("Spare capacity on the decks").strong().size(15.0).color(Color32::BLACK));
            ui.label(egui::RichText::new(format!("largest extra imposed load, kN, for {what} on a {} m grid; values do not add", plateload::format::num(spare.spacing_m))).size(11.0));
            let mut checked = combinations_words(&spare.combinations);
            if spare.dynamic_factor != 1.0 {
                checked += &format!("; landing factor × {}", plateload::format::num(spare.dynamic_factor));
            }
            ui.label(egui::RichText::new(format!("checked in {checked}")).size(11.0));
            match &spare.map {
                Some(Ok(_)) => {
                    for b in SpareBand::ALL {
                        let n = counts[b as usize];
                        if n == 0 && b == SpareBand::Unlimited {
                            continue;
                        }
                        ui.add(chip(b, format!("{} — {n} point{}", b.label(), if n == 1 { "" } else { "s" })));
                    }
                }
                Some(Err(why)) => {
                    ui.label(format!("no map: {why}"));
                }
                None => {}
            }
        });
    });
}
