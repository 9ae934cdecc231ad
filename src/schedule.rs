//! The support-load schedule: one CSV row per base plate, for the ground-bearing check.
//!
//! Plain ASCII so it opens cleanly in any spreadsheet; header lines first (scene, caution,
//! units, combinations and their factors, equilibrium), a blank line, then the table and a
//! totals row whose case columns equal the applied load of each case.

use crate::analysis::Analysis;
use crate::loads::Case;

/// Write the schedule as CSV text.
pub fn schedule_csv(analysis: &Analysis) -> String {
    let mut w = csv::WriterBuilder::new().flexible(true).from_writer(Vec::new());
    let f3 = |v: f64| format!("{v:.3}");
    let mut rec = |fields: Vec<String>| w.write_record(&fields).expect("writing to memory");
    rec(vec!["Support-load schedule".into(), analysis.scene_name.clone()]);
    rec(vec!["Caution".into(), crate::CAUTION.into()]);
    rec(vec!["Units".into(), "loads kN (upward reaction positive; negative = uplift); positions m; areas m2; pressures kPa; utilisation as a ratio (1.000 = capacity)".into()]);
    for c in &analysis.combinations {
        let f = c.factors;
        rec(vec![
            "Combination".into(),
            c.name.clone(),
            format!("G unfavourable {}", f.g_unfavourable),
            format!("G favourable {}", f.g_favourable),
            format!("Q {}", f.q),
            format!("W {}", f.w),
            format!("checks capacity: {}", if c.checks_capacity { "yes" } else { "no" }),
            format!("checks uplift: {}", if c.checks_uplift { "yes" } else { "no" }),
            c.source.clone(),
        ]);
    }
    let methods = analysis.method_count();
    if methods == 1 {
        rec(vec!["Method".into(), analysis.method_label(0).into()]);
    } else {
        let all: Vec<&str> = (0..methods).map(|m| analysis.method_label(m)).collect();
        rec(vec![
            "Method".into(),
            "envelope: each max and min is the worse of the methods".into(),
            format!("methods: {}", all.join("; ")),
            format!("G, Q, W columns: {}", analysis.method_label(0)),
        ]);
    }
    let tagged = analysis.equilibrium_by_method.iter().enumerate().flat_map(|(m, eq)| eq.iter().map(move |e| (m, e)));
    for (m, e) in tagged {
        let name = if m == 0 { format!("Equilibrium {}", e.case) } else { format!("Equilibrium {} [{}]", e.case, analysis.method_label(m)) };
        rec(vec![
            name,
            format!("applied {} kN", f3(e.applied.down())),
            format!("reactions {} kN", f3(e.reactions.force[2])),
            format!("|sum F| {:.3e} kN", e.force_residual_kn),
            format!("|sum M| {:.3e} kN.m", e.moment_residual_knm),
            format!("relative {:.1e}", e.relative),
        ]);
    }
    rec(vec![]);
    let mut head: Vec<String> = ["id", "x (m)", "y (m)", "base level (m)", "support", "G (kN)", "Q (kN)", "W (kN)"].map(String::from).to_vec();
    for c in &analysis.combinations {
        head.push(format!("{} max (kN)", c.name));
        head.push(format!("{} min (kN)", c.name));
    }
    head.extend(
        ["SWL (kN)", "utilisation", "governing combination", "method for max", "method for min", "bearing area (m2)", "bearing pressure (kPa)", "allowable (kPa)", "bearing utilisation", "status"]
            .map(String::from),
    );
    rec(head);
    let mut totals = [0.0; 3];
    for (i, p) in analysis.plates.iter().enumerate() {
        let g = p.governing();
        let mut row = vec![p.id.clone(), f3(p.x), f3(p.y), f3(p.base_level), p.support.clone()];
        for c in Case::ALL {
            row.push(f3(p.case_kn[c.index()]));
            totals[c.index()] += p.case_kn[c.index()];
        }
        for pc in &p.combinations {
            row.push(f3(pc.max_kn));
            row.push(f3(pc.min_kn));
        }
        row.extend([
            f3(p.swl_kn),
            f3(g.utilisation),
            analysis.combinations[p.governing].name.clone(),
            analysis.governing_method_label(i).into(),
            analysis.min_method_label(i).into(),
            format!("{:.4}", p.bearing_area_m2),
            format!("{:.1}", g.bearing_kpa),
            format!("{:.1}", p.allowable_kpa),
            f3(g.bearing_utilisation),
            p.status.label().into(),
        ]);
        rec(row);
    }
    let mut row = vec!["TOTAL".into(), String::new(), String::new(), String::new(), String::new()];
    row.extend(totals.iter().map(|&t| f3(t)));
    rec(row);
    String::from_utf8(w.into_inner().expect("in-memory writer")).expect("ASCII and ids are UTF-8")
}
