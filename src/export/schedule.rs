//! The support-load schedule: one CSV row per base plate, for the ground-bearing check.
//!
//! Plain ASCII so it opens cleanly in any spreadsheet, apart from the words of the horizontal
//! path; header lines first (scene, caution, units, combinations with their factors and what each
//! does, where horizontal load is shared, the notional load, equilibrium), a blank line, then the
//! table (ending with the vertical components of the brace forces at each plate)
//! and a totals row whose case columns equal the applied load of each case.

use crate::check::analysis::Analysis;
use crate::format::{num, push_fixed};
use crate::scene::loads::Case;

/// A CSV text being built by the `csv` crate (quoting, RFC 4180 line ends), with a reused
/// buffer for numbers.
struct Csv {
    w: csv::Writer<Vec<u8>>,
    number: String,
}

impl Csv {
    fn new(capacity: usize) -> Self {
        Csv { w: Self::writer(Vec::with_capacity(capacity)), number: String::with_capacity(32) }
    }
    fn writer(into: Vec<u8>) -> csv::Writer<Vec<u8>> {
        // Records have different lengths (header lines, then the table), hence `flexible`.
        csv::WriterBuilder::new().flexible(true).terminator(csv::Terminator::CRLF).from_writer(into)
    }
    fn field(&mut self, v: &str) {
        self.w.write_field(v).expect("writing to memory cannot fail");
    }
    /// A number with a fixed count of decimals, never a negative zero.
    fn fixed(&mut self, v: f64, decimals: u32) {
        self.number.clear();
        push_fixed(&mut self.number, v, decimals);
        self.w.write_field(&self.number).expect("writing to memory cannot fail");
    }
    fn end(&mut self) {
        self.w.write_record(None::<&[u8]>).expect("writing to memory cannot fail");
    }
    fn record<S: AsRef<str>>(&mut self, fields: &[S]) {
        self.w.write_record(fields.iter().map(|f| f.as_ref())).expect("writing to memory cannot fail");
    }
    /// An empty line (the `csv` crate writes an empty record as `""`).
    fn blank_line(&mut self) {
        let w = std::mem::replace(&mut self.w, Self::writer(Vec::new()));
        let mut bytes = w.into_inner().expect("writing to memory cannot fail");
        bytes.extend_from_slice(b"\r\n");
        self.w = Self::writer(bytes);
    }
    fn finish(self) -> String {
        let bytes = self.w.into_inner().expect("writing to memory cannot fail");
        // Every field came from a `&str`, so the bytes are UTF-8.
        String::from_utf8(bytes).expect("UTF-8 in, UTF-8 out")
    }
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
    let mut w = Csv::new(256 * (analysis.plates.len() + 16));
    w.record(&["Support-load schedule", analysis.scene_name.as_str()]);
    w.record(&["Caution", crate::CAUTION]);
    w.record(&["Units", "loads kN (upward reaction positive; negative = uplift); positions m; areas m2; pressures kPa; utilisation as a ratio (1.000 = capacity)"]);
    for c in &analysis.combinations {
        let f = c.factors;
        w.record(&[
            "Combination".to_string(),
            c.name.clone(),
            format!("G unfavourable {}", num(f.g_unfavourable)),
            format!("G favourable {}", num(f.g_favourable)),
            format!("Q {}", num(f.q)),
            format!("W {}", num(f.w)),
            format!("checks capacity: {}", if c.checks_capacity { "yes" } else { "no" }),
            format!("checks uplift: {}", if c.checks_uplift { "yes" } else { "no" }),
            c.source.clone(),
            ascii(&crate::check::actions::describe(c, analysis.working_levels)),
        ]);
    }
    let whole = if analysis.whole_loads.is_empty() { "none".to_owned() } else { analysis.whole_loads.join(" ") };
    w.record(&["Imposed loads", "each split into cells and loaded where unfavourable at each plate", &format!("applied whole as set: {whole}"), analysis.working_levels.label()]);
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
        if !e.one_state {
            w.record(&[name, "support by support: each two-span model balances".into(), format!("relative {:.1e}", num(e.relative)), "reactions exceed the applied load by design".into()]);
            continue;
        }
        w.record(&[
            name,
            format!("applied {:.3} kN", num(e.applied.down())),
            format!("reactions {:.3} kN", num(e.reactions.force[2])),
            format!("|sum F| {:.3e} kN", num(e.force_residual_kn)),
            format!("|sum M| {:.3e} kN.m", num(e.moment_residual_knm)),
            format!("relative {:.1e}", num(e.relative)),
        ]);
    }
    w.blank_line();
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
            "imposed load arrangement for max",
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
        let notes: Vec<String> = analysis.arrangements_at(i).iter().map(|n| format!("{} {}/{} cells", n.load, n.loaded_for_max, n.cells)).collect();
        w.field(&notes.join("; "));
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
        w.blank_line();
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
    w.finish()
}
