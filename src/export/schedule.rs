//! The support-load schedule: one CSV row per base plate, for the ground-bearing check.
//!
//! Plain ASCII so it opens cleanly in any spreadsheet, apart from the words of the horizontal
//! path; header lines first (scene, caution, units, combinations with their factors and what each
//! does, where horizontal load is shared, the notional load, equilibrium), a blank line, then the
//! table (ending with the vertical components of the brace forces at each plate)
//! and a totals row whose case columns equal the applied load of each case.

use crate::check::analysis::Analysis;
use crate::scene::loads::Case;

/// A CSV text being built: fields are quoted only when they need it.
struct Csv {
    out: String,
    first: bool,
}

impl Csv {
    fn field(&mut self, v: &str) {
        if !self.first {
            self.out.push(',');
        }
        self.first = false;
        if v.contains([',', '"', '\n', '\r']) {
            self.out.push('"');
            self.out.push_str(&v.replace('"', "\"\""));
            self.out.push('"');
        } else {
            self.out.push_str(v);
        }
    }
    /// A number with a fixed count of decimals, without going through `format!` (the schedule
    /// of a large scene has hundreds of thousands of them).
    fn fixed(&mut self, v: f64, decimals: u32) {
        if !self.first {
            self.out.push(',');
        }
        self.first = false;
        push_fixed(&mut self.out, v, decimals);
    }
    fn end(&mut self) {
        self.out.push_str("\r\n");
        self.first = true;
    }
    fn record<S: AsRef<str>>(&mut self, fields: &[S]) {
        for f in fields {
            self.field(f.as_ref());
        }
        self.end();
    }
}

/// Append `v` rounded to `decimals` places (at most 6), like `format!("{v:.3}")` but without the
/// negative zero.
pub fn push_fixed(out: &mut String, v: f64, decimals: u32) {
    use std::fmt::Write;
    let decimals = decimals.min(6);
    let scale = 10u64.pow(decimals);
    let scaled = (v * scale as f64).round();
    if !scaled.is_finite() || scaled.abs() >= 9.0e15 {
        let _ = write!(out, "{v:.*}", decimals as usize);
        return;
    }
    // Digits right to left into a stack buffer: sign, integer part, point, `decimals` digits.
    let negative = scaled < 0.0;
    let mut n = scaled.abs() as u64;
    let mut buf = [0u8; 32];
    let mut i = buf.len();
    let mut put = |b: u8| {
        i -= 1;
        buf[i] = b;
    };
    for _ in 0..decimals {
        put(b'0' + (n % 10) as u8);
        n /= 10;
    }
    if decimals > 0 {
        put(b'.');
    }
    loop {
        put(b'0' + (n % 10) as u8);
        n /= 10;
        if n == 0 {
            break;
        }
    }
    if negative && scaled != 0.0 {
        put(b'-');
    }
    out.push_str(std::str::from_utf8(&buf[i..]).expect("ASCII digits"));
}

/// Engine words in plain ASCII: the few typographic signs they use spelt out.
fn ascii(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '–' | '—' | '−' => out.push('-'),
            '·' => out.push('*'),
            'ψ' => out.push_str("psi"),
            '°' => out.push_str(" deg"),
            '≥' => out.push_str(">="),
            '≤' => out.push_str("<="),
            '×' => out.push('x'),
            '÷' => out.push('/'),
            '…' => out.push_str("..."),
            c if c.is_ascii() => out.push(c),
            _ => out.push('?'),
        }
    }
    out
}

/// Write the schedule as CSV text.
pub fn schedule_csv(analysis: &Analysis) -> String {
    let mut w = Csv { out: String::with_capacity(256 * (analysis.plates.len() + 16)), first: true };
    w.record(&["Support-load schedule", analysis.scene_name.as_str()]);
    w.record(&["Caution", crate::CAUTION]);
    w.record(&["Units", "loads kN (upward reaction positive; negative = uplift); positions m; areas m2; pressures kPa; utilisation as a ratio (1.000 = capacity)"]);
    for c in &analysis.combinations {
        let f = c.factors;
        w.record(&[
            "Combination".to_string(),
            c.name.clone(),
            format!("G unfavourable {}", f.g_unfavourable),
            format!("G favourable {}", f.g_favourable),
            format!("Q {}", f.q),
            format!("W {}", f.w),
            format!("checks capacity: {}", if c.checks_capacity { "yes" } else { "no" }),
            format!("checks uplift: {}", if c.checks_uplift { "yes" } else { "no" }),
            c.source.clone(),
            ascii(&crate::check::actions::describe(c)),
        ]);
    }
    // Where horizontal load goes: the diaphragms (and that it is shared nowhere else), the
    // notional load.
    for d in &analysis.horizontal.diaphragms {
        w.record(&["Horizontal path".to_string(), ascii(d)]);
    }
    if let Some(sharing) = analysis.horizontal.sharing {
        w.record(&["Horizontal path".to_string(), ascii(sharing)]);
    }
    w.record(&["Notional load".to_string(), ascii(&analysis.horizontal.notional)]);
    let methods = analysis.method_count();
    if methods == 1 {
        w.record(&["Method", analysis.method_label(0)]);
    } else {
        let all: Vec<&str> = (0..methods).map(|m| analysis.method_label(m)).collect();
        w.record(&[
            "Method".to_string(),
            "envelope: each max and min is the worse of the methods".into(),
            format!("methods: {}", all.join("; ")),
            format!("G, Q, W columns: {}", analysis.method_label(0)),
        ]);
    }
    let tagged = analysis.equilibrium_by_method.iter().enumerate().flat_map(|(m, eq)| eq.iter().map(move |e| (m, e)));
    for (m, e) in tagged {
        let name = if m == 0 { format!("Equilibrium {}", e.case) } else { format!("Equilibrium {} [{}]", e.case, analysis.method_label(m)) };
        w.record(&[
            name,
            format!("applied {:.3} kN", e.applied.down()),
            format!("reactions {:.3} kN", e.reactions.force[2]),
            format!("|sum F| {:.3e} kN", e.force_residual_kn),
            format!("|sum M| {:.3e} kN.m", e.moment_residual_knm),
            format!("relative {:.1e}", e.relative),
        ]);
    }
    w.end();
    let mut head: Vec<String> = ["id", "x (m)", "y (m)", "base level (m)", "support", "bears on", "G (kN)", "Q (kN)", "W (kN)"].map(String::from).to_vec();
    for c in &analysis.combinations {
        head.push(format!("{} max (kN)", c.name));
        head.push(format!("{} min (kN)", c.name));
    }
    head.extend(
        [
            "SWL (kN)",
            "utilisation",
            "governing combination",
            "method for max",
            "method for min",
            "bearing area (m2)",
            "bearing pressure (kPa)",
            "allowable (kPa)",
            "bearing utilisation",
            "status",
            "brace down (kN)",
            "brace up (kN)",
        ]
        .map(String::from),
    );
    w.record(&head);
    let mut totals = [0.0; 3];
    for (i, p) in analysis.plates.iter().enumerate() {
        let g = p.governing();
        w.field(&p.id);
        w.fixed(p.x, 3);
        w.fixed(p.y, 3);
        w.fixed(p.base_level, 3);
        w.field(&p.support);
        match &p.on_structure {
            Some(e) => w.field(&format!("existing structure {e} (for the permanent-works designer)")),
            None => w.field("ground"),
        }
        for c in Case::ALL {
            w.fixed(p.case_kn[c.index()], 3);
            totals[c.index()] += p.case_kn[c.index()];
        }
        for pc in &p.combinations {
            w.fixed(pc.max_kn, 3);
            w.fixed(pc.min_kn, 3);
        }
        w.fixed(p.swl_kn, 3);
        w.fixed(g.utilisation, 3);
        w.field(&analysis.combinations[p.governing].name);
        w.field(analysis.governing_method_label(i));
        w.field(analysis.min_method_label(i));
        w.fixed(p.bearing_area_m2, 4);
        w.fixed(g.bearing_kpa, 1);
        w.fixed(p.allowable_kpa, 1);
        w.fixed(g.bearing_utilisation, 3);
        w.field(p.status.label());
        w.fixed(p.brace.max_kn, 3);
        w.fixed(p.brace.min_kn, 3);
        w.end();
    }
    for f in ["TOTAL", "", "", "", "", ""] {
        w.field(f);
    }
    for t in totals {
        w.fixed(t, 3);
    }
    w.end();
    if !analysis.lifts.is_empty() {
        w.end();
        w.record(&["Posts standing on other members", "load passed on at the base (kN, downward positive; negative = pulls up: tension in a splice or lifting off)"]);
        let mut head: Vec<String> = ["id", "stands on", "base level (m)", "G (kN)", "Q (kN)", "W (kN)"].map(String::from).to_vec();
        for c in &analysis.combinations {
            head.push(format!("{} max (kN)", c.name));
            head.push(format!("{} min (kN)", c.name));
        }
        head.push("status".into());
        w.record(&head);
        for l in &analysis.lifts {
            w.field(&l.id);
            w.field(&l.stands_on);
            w.fixed(l.base_level, 3);
            for c in Case::ALL {
                w.fixed(l.case_kn[c.index()], 3);
            }
            for pc in &l.combinations {
                w.fixed(pc.max_kn, 3);
                w.fixed(pc.min_kn, 3);
            }
            w.field(l.status.label());
            w.end();
        }
    }
    w.out
}

#[cfg(test)]
mod tests {
    use super::push_fixed;

    #[test]
    fn fixed_matches_standard_formatting() {
        // source: Rust std `{:.N}` formatting as the reference; ties may round either way, so
        // the check is that both lie within half a unit in the last place of the true value.
        for v in [0.0, 1.0, -1.0, 0.5, 2.675, -12.3456, 1234567.891, 0.0004, 99.9995, 1e-9, 42.0, -7.25] {
            for d in [0, 1, 3, 4] {
                let mut s = String::new();
                push_fixed(&mut s, v, d);
                let expect = format!("{v:.*}", d as usize);
                let half = 0.5 * 10f64.powi(-(d as i32)) * (1.0 + 1e-9);
                let got: f64 = s.parse().unwrap();
                assert!((got - v).abs() <= half, "{v} {d}: {s} vs {expect}");
                assert_eq!(s.split('.').nth(1).map_or(0, str::len), d as usize, "{s}");
                if (v * 10f64.powi(d as i32)).fract().abs() != 0.5 {
                    assert_eq!(s.trim_start_matches('-'), expect.trim_start_matches('-'), "{v} {d}");
                }
            }
        }
        let mut s = String::new();
        push_fixed(&mut s, -0.0001, 3);
        assert_eq!(s, "0.000", "no negative zero");
    }
}
