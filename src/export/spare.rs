//! The spare-capacity map as text, CSV and JSON.

use std::fmt::Write as _;

use crate::check::spare::{DeckSpare, SpareMap};
use crate::format::num;

/// Words for what is placed.
fn footprint_words(map: &SpareMap) -> String {
    let f = map.settings.footprint;
    let what = if f.is_point() { "a point load".to_owned() } else { format!("a load spread over {} × {} m (x × y)", num(f.x_m), num(f.y_m)) };
    let dynamic = if map.settings.dynamic_factor > 1.0 { format!(", dynamic factor {}", num(map.settings.dynamic_factor)) } else { String::new() };
    format!("{what}, grid {} m{dynamic}; combinations: {}", num(map.settings.spacing_m), map.combinations.join(", "))
}

/// The lines every output of the map starts with.
fn preamble(map: &SpareMap) -> Vec<String> {
    vec![
        crate::CAUTION.to_owned(),
        format!("Spare capacity: the largest extra imposed load (characteristic, kN) at each point for {}.", footprint_words(map)),
        "Each value is for one load placed there alone, on top of the existing loads in their worst arrangement; values do not add — after placing one, work the map out again.".to_owned(),
        format!("Not checked here (no capacity known): {}.", if map.not_checked.is_empty() { "none".to_owned() } else { map.not_checked.join(", ") }),
    ]
    .into_iter()
    .chain(map.not_included.as_ref().map(|w| format!("Not included: {w}.")))
    .chain(map.notional.as_ref().map(|w| format!("Notional load: {w}.")))
    .collect()
}

/// A value in a table cell: kN to one decimal, `0 !` where a limit is already reached, `-` where
/// nothing limits it.
fn cell(p: &crate::check::spare::SparePoint) -> String {
    match p.kn {
        None => "-".into(),
        Some(_) if p.already_at_limit => "0 !".into(),
        // Rounded down: a table must never show more than the map gives.
        Some(kn) => format!("{:.1}", round_down_kn(kn)),
    }
}

/// One point of the map in words, as shown where the pointer is: e.g. `up to 6.4 kN here —
/// limited by plate C2, ground bearing (service)`. The value is rounded down, never up.
pub fn point_words(p: &crate::check::spare::SparePoint) -> String {
    match p.kn {
        None => "no limit found here: nothing on this point's load path has a known capacity".to_owned(),
        Some(_) if p.already_at_limit => format!("no extra load here — a limit is already reached: {}", p.limit.words()),
        Some(kn) => format!("up to {} kN here — limited by {}", num(round_down_kn(kn)), p.limit.words()),
    }
}

/// What is already at a limit before anything is added, in words, where some point of the map
/// is: the distinct limits of those points (at most `shown`, then how many more).
pub fn already_reached_words(map: &SpareMap, shown: usize) -> Option<String> {
    let mut limits: Vec<String> = map.decks.iter().flat_map(|d| &d.points).filter(|p| p.already_at_limit).map(|p| p.limit.words()).collect();
    if limits.is_empty() {
        return None;
    }
    limits.sort();
    limits.dedup();
    let more = limits.len().saturating_sub(shown);
    limits.truncate(shown);
    let tail = if more > 0 { format!(" and {more} more") } else { String::new() };
    Some(format!("already at a limit before anything is added: {}{tail} — these must be resolved (held down, restrained, relieved or re-planned) before the map can show room there", limits.join("; ")))
}

/// A spare load rounded down to 0.1 kN, as shown and as offered to place: never more than the
/// map gives.
pub fn round_down_kn(kn: f64) -> f64 {
    if kn.is_finite() { ((kn * 10.0) + 1e-9).floor().max(0.0) / 10.0 } else { 0.0 }
}

/// The map as plain text: one grid per deck (rows from the far side down, as on a plan), then what
/// limits the smallest values.
pub fn spare_text(map: &SpareMap) -> String {
    let mut s = String::new();
    for line in preamble(map) {
        let _ = writeln!(s, "{line}");
    }
    for d in &map.decks {
        deck_text(&mut s, d);
    }
    s
}

fn deck_text(s: &mut String, d: &DeckSpare) {
    let class = d.load_class.map_or("no load class known: the deck itself is not checked".to_owned(), |c| format!("checked against load class {c}"));
    let _ = writeln!(s, "\ndeck {} at {} m ({class}); kN, '0 !' = a limit already reached, '-' = nothing limits it", d.deck, num(d.level));
    let cols = d.columns.max(1);
    let rows: Vec<&[crate::check::spare::SparePoint]> = d.points.chunks(cols).collect();
    // Columns along x, rows along y, the highest y first as on a plan.
    let transposed = rows.first().is_some_and(|r| r.len() > 1 && (r[1].x - r[0].x).abs() < 1e-12);
    let grid: Vec<Vec<&crate::check::spare::SparePoint>> = if transposed {
        (0..cols).map(|j| rows.iter().map(|r| &r[j]).collect()).collect()
    } else {
        rows.iter().map(|r| r.iter().collect()).collect()
    };
    let mut ordered = grid;
    ordered.sort_by(|a, b| b[0].y.total_cmp(&a[0].y));
    let _ = write!(s, "{:>9}", "y \\ x");
    for p in &ordered[0] {
        let _ = write!(s, " {:>7}", num(p.x));
    }
    let _ = writeln!(s);
    for row in &ordered {
        let _ = write!(s, "{:>9}", num(row[0].y));
        for p in row {
            let _ = write!(s, " {:>7}", cell(p));
        }
        let _ = writeln!(s);
    }
    // The least value and what limits it, and how many points are already at a limit.
    if let Some(least) = d.points.iter().filter(|p| p.kn.is_some()).min_by(|a, b| a.kn.unwrap_or(0.0).total_cmp(&b.kn.unwrap_or(0.0))) {
        let _ = writeln!(s, "least: {:.1} kN at ({}, {}) — limited by {}", round_down_kn(least.kn.unwrap_or(0.0)), num(least.x), num(least.y), least.limit.words());
    }
    let full = d.points.iter().filter(|p| p.already_at_limit).count();
    if full > 0 {
        let _ = writeln!(s, "{full} of {} points can take no extra load: a limit is already reached there", d.points.len());
    }
    let mut limits: Vec<String> = d.points.iter().map(|p| p.limit.words()).collect();
    limits.sort();
    limits.dedup();
    let _ = writeln!(s, "limited by: {}", limits.join("; "));
}

/// The map as CSV: the preamble lines, then one row per grid point.
pub fn spare_csv(map: &SpareMap) -> String {
    let mut w = csv::WriterBuilder::new().flexible(true).terminator(csv::Terminator::CRLF).from_writer(Vec::new());
    for line in preamble(map) {
        let _ = w.write_record([line]);
    }
    let _ = w.write_record(["deck", "x (m)", "y (m)", "spare load (kN)", "already at a limit", "limited by"]);
    for d in &map.decks {
        for p in &d.points {
            let kn = p.kn.map_or(String::new(), |k| format!("{k:.3}"));
            let _ = w.write_record([d.deck.as_str(), &format!("{:.3}", p.x), &format!("{:.3}", p.y), &kn, if p.already_at_limit { "yes" } else { "no" }, &p.limit.words()]);
        }
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

/// The map as a JSON document.
pub fn spare_json(map: &SpareMap) -> String {
    #[derive(serde::Serialize)]
    struct Doc<'a> {
        plateload_spare_json: u32,
        caution: &'static str,
        units: &'static str,
        map: &'a SpareMap,
    }
    serde_json::to_string_pretty(&Doc { plateload_spare_json: 1, caution: crate::CAUTION, units: "kN, m", map }).expect("the map is plain data")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::check::spare::{Limit, SparePoint};

    fn at(kn: Option<f64>, already: bool) -> SparePoint {
        let limit = Limit::Plate { plate: "C2".into(), check: "ground bearing", combination: "service".into(), method: "simple".into() };
        SparePoint { x: 1.0, y: 2.0, kn, already_at_limit: already, limit }
    }

    #[test]
    fn point_words_round_down_and_keep_a_reached_limit_apart() {
        // common practice, no source: a capacity shown to a user is rounded towards safety
        assert_eq!(point_words(&at(Some(6.49), false)), "up to 6.4 kN here — limited by plate C2, ground bearing (service)");
        assert_eq!(round_down_kn(6.99), 6.9);
        assert_eq!(round_down_kn(0.3), 0.3, "0.3 is not shown as 0.2 through floating-point noise");
        assert_eq!(round_down_kn(-1.0), 0.0);
        assert!(point_words(&at(Some(0.0), true)).starts_with("no extra load here — a limit is already reached: plate C2"));
        assert!(point_words(&at(None, false)).starts_with("no limit found here"));
    }

    #[test]
    fn what_is_already_at_a_limit_is_named_once_each() {
        // common practice, no source: a list for a site manager names each limit once
        let deck = |points: Vec<SparePoint>| crate::check::spare::DeckSpare { deck: "D".into(), level: 2.0, load_class: None, columns: points.len(), points };
        let map = |points: Vec<SparePoint>| SpareMap {
            settings: crate::check::spare::SpareSettings::default(),
            combinations: vec!["service".into()],
            decks: vec![deck(points)],
            not_checked: Vec::new(),
            not_included: None,
            notional: None,
        };
        assert_eq!(already_reached_words(&map(vec![at(Some(3.0), false)]), 4), None);
        let mut lifts = at(Some(0.0), true);
        lifts.limit = Limit::Plate { plate: "A1".into(), check: "uplift", combination: "service".into(), method: "simple".into() };
        let words = already_reached_words(&map(vec![at(Some(0.0), true), lifts.clone(), at(Some(0.0), true), at(Some(2.0), false)]), 4).unwrap();
        assert!(words.starts_with("already at a limit before anything is added: plate A1 would lift (service); plate C2, ground bearing (service) —"), "{words}");
        let words = already_reached_words(&map(vec![at(Some(0.0), true), lifts]), 1).unwrap();
        assert!(words.contains("(service) and 1 more —"), "{words}");
    }
}
