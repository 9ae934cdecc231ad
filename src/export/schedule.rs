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

/// A CSV text being built: fields are quoted only when they need it (RFC 4180: a field holding a
/// comma, a double quote or a line break is quoted, its quotes doubled), records end in CRLF.
///
/// Written by hand rather than with the `csv` crate (which the smaller spare-capacity table
/// uses): measured on the 10,000-post schedule the crate took about 60 % longer (thread CPU
/// time, both writers in one benchmark process), and this schedule is on the path the
/// 10,000-post benchmark target covers. The tests read every schedule back with the `csv`
/// crate's reader.
struct Csv {
    out: String,
    first: bool,
}

impl Csv {
    fn new(capacity: usize) -> Self {
        Csv { out: String::with_capacity(capacity), first: true }
    }
    fn sep(&mut self) {
        if !self.first {
            self.out.push(',');
        }
        self.first = false;
    }
    fn field(&mut self, v: &str) {
        self.sep();
        if v.contains([',', '"', '\n', '\r']) {
            self.out.push('"');
            self.out.push_str(&v.replace('"', "\"\""));
            self.out.push('"');
        } else {
            self.out.push_str(v);
        }
    }
    /// A number with a fixed count of decimals, never a negative zero.
    fn fixed(&mut self, v: f64, decimals: u32) {
        self.sep();
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
    /// An empty line.
    fn blank_line(&mut self) {
        self.end();
    }
    fn finish(self) -> String {
        self.out
    }
}

/// Text as plain ASCII for spreadsheets: the few symbols the outputs use spelt out.
fn ascii(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            c if c.is_ascii() => out.push(c),
            '·' => out.push('.'),
            '–' | '—' | '−' => out.push('-'),
            '÷' => out.push('/'),
            '×' => out.push('x'),
            '²' => out.push('2'),
            '³' => out.push('3'),
            'μ' => out.push_str("mu"),
            'γ' => out.push_str("gamma "),
            '°' => out.push_str(" deg"),
            '…' => out.push_str("..."),
            '≤' => out.push_str("<="),
            '≥' => out.push_str(">="),
            'ψ' => out.push_str("psi"),
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
    for f in crate::export::findings::findings(analysis) {
        w.record(&["Finding", f.verdict.label(), f.check, ascii(&f.text).as_str()]);
    }
    w.record(&["Units", "loads kN (upward reaction positive; negative = uplift); positions m; areas m2; pressures kPa; utilisation as a ratio (1.000 = capacity)"]);
    let g = &analysis.ground;
    let allowable = g.allowable_kpa.map_or_else(|| "allowable at formation not entered: not checked".to_owned(), |a| format!("allowable at formation {} kPa ({})", num(a), g.basis.label()));
    let layer = match g.layer {
        None => "no granular layer".to_owned(),
        Some(l) => format!(
            "granular layer {} m, {} kN/m3 ({} kPa, {}); allowable on its top {}",
            num(l.thickness_m),
            num(l.unit_weight_kn_m3),
            num(l.self_weight_kpa()),
            if g.layer_weight_added_kpa() > 0.0 { "added at formation" } else { "not added: net allowable" },
            l.allowable_kpa.map_or_else(|| "not entered: not checked".to_owned(), |a| format!("{} kPa", num(a)))
        ),
    };
    w.record(&["Ground".to_string(), ascii(&allowable), ascii(&layer)]);
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
            "plate area (m2)",
            "layer top pressure (kPa)",
            "layer utilisation",
            "overlap group",
            "hold-down anchor (kN)",
            "hold-down kentledge (kN)",
            "friction coefficient",
            "base shear (kN)",
            "sliding factor",
            "restraint needed (kN)",
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
        match (p.allowable_kpa, g.bearing_utilisation) {
            (Some(a), Some(u)) => {
                w.fixed(a, 1);
                w.fixed(u, 3);
            }
            _ => {
                w.field("not entered");
                w.field("not checked");
            }
        }
        w.fixed(p.plate_area_m2, 4);
        match g.layer_top_kpa {
            Some(q) => w.fixed(q, 1),
            None => w.field(""),
        }
        match (g.layer_top_kpa, g.layer_utilisation) {
            (_, Some(u)) => w.fixed(u, 3),
            (Some(_), None) => w.field("not checked"),
            (None, None) => w.field(""),
        }
        w.field(&crate::export::findings::group_label(p.formation_group, p.surface_group));
        match p.hold_down {
            Some(h) => {
                w.fixed(h.anchor_kn, 3);
                match h.kentledge_kn {
                    Some(k) => w.fixed(k, 3),
                    None => w.field(""),
                }
            }
            None => {
                w.field("");
                w.field("");
            }
        }
        match &p.sliding {
            Some(sl) => {
                match sl.mu {
                    Some(m) => w.fixed(m, 2),
                    None => w.field("not given"),
                }
                w.fixed(sl.shear_kn, 3);
                match sl.factor {
                    Some(f) => w.fixed(f, 2),
                    None => w.field("not checked"),
                }
                w.fixed(sl.restraint_kn, 3);
            }
            None => {
                for _ in 0..4 {
                    w.field("");
                }
            }
        }
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
