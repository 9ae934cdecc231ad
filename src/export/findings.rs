//! The findings at a glance, in words, shared by the command line, the report, the schedule,
//! the JSON and the editor: failed checks first (overturning, sliding, ground bearing, plates over
//! capacity, lifting, sliding), then checks that could not be made, then the rest.

use crate::check::analysis::Analysis;

/// How a finding stands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, serde::Serialize)]
pub enum Verdict {
    /// A check fails: act on it.
    Fails,
    /// A check could not be made: the reason says what to enter.
    NotChecked,
    /// A check passes.
    Passes,
}

impl Verdict {
    /// Word for outputs.
    pub fn label(self) -> &'static str {
        match self {
            Verdict::Fails => "FAILS",
            Verdict::NotChecked => "NOT CHECKED",
            Verdict::Passes => "ok",
        }
    }
}

/// One finding.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Finding {
    /// Fails, not checked, or passes.
    pub verdict: Verdict,
    /// What was checked: `overturning`, `sliding`, `ground bearing`, `granular layer`,
    /// `base plates`, `uplift`.
    pub check: &'static str,
    /// What was found, with ids and numbers.
    pub text: String,
}

/// A number with `dp` decimals, never `-0.00`.
fn num(v: f64, dp: usize) -> String {
    let s = format!("{v:.dp$}");
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') { s[1..].to_owned() } else { s }
}

/// At most `n` ids, then how many more.
fn ids(list: &[&str], n: usize) -> String {
    let shown = list.iter().take(n).copied().collect::<Vec<_>>().join(", ");
    if list.len() > n { format!("{shown} and {} more", list.len() - n) } else { shown }
}

/// Every finding, failures first (in the order of the checks), then not checked, then passes.
pub fn findings(a: &Analysis) -> Vec<Finding> {
    let mut out = Vec::new();
    overturning(a, &mut out);
    sliding(a, &mut out);
    bearing(a, &mut out);
    plates(a, &mut out);
    out.sort_by_key(|f| f.verdict);
    out
}

fn overturning(a: &Analysis, out: &mut Vec<Finding>) {
    let st = &a.stability;
    let t = st.target_factor;
    let push = |out: &mut Vec<Finding>, verdict, text| out.push(Finding { verdict, check: "overturning", text });
    if let Some(reason) = &st.refused {
        push(out, Verdict::NotChecked, format!("overturning not checked: {reason}"));
        return;
    }
    let mut any = false;
    for s in &st.structures {
        let failing: Vec<&crate::check::stability::TippingAxis> = s.axes.iter().filter(|x| !x.passes()).collect();
        for ax in &failing {
            any = true;
            let factor = ax.factor.map_or_else(|| "—".to_owned(), |f| num(f, 2));
            let equ = ax.equ_utilisation.map_or_else(|| "—".to_owned(), |u| if u.is_finite() { format!("{} %", num(100.0 * u, 1)) } else { "no restoring load".into() });
            let fix = match &ax.kentledge {
                Some(k) => match (k.needed_kn, &k.cannot) {
                    (Some(w), _) => format!(
                        "needs {} kN kentledge over plate{} {} (lever {} m), secured to the standards",
                        num(w, 2),
                        if k.plates.len() == 1 { "" } else { "s" },
                        ids(&k.plates.iter().map(String::as_str).collect::<Vec<_>>(), 6),
                        num(k.lever_m, 3)
                    ),
                    (None, Some(why)) => why.clone(),
                    (None, None) => String::new(),
                },
                None => String::new(),
            };
            push(
                out,
                Verdict::Fails,
                format!(
                    "{}: tipping towards {} about {}: factor {factor} against target {} (restoring {} / overturning {} kN·m); equilibrium E_dst/E_stb {equ}{}{fix}",
                    s.label,
                    ax.towards,
                    ax.about,
                    num(t, 2),
                    num(ax.permanent_stabilising_knm, 2),
                    num(ax.permanent_destabilising_knm + ax.imposed_destabilising_knm + ax.horizontal_destabilising_knm, 2),
                    if fix.is_empty() { "" } else { "; " }
                ),
            );
        }
    }
    if !any {
        match st.lowest_factor() {
            Some((s, ax, f)) => push(
                out,
                Verdict::Passes,
                format!(
                    "lowest overturning factor {} (target {}) for {}, tipping towards {} about {}; equilibrium met about every axis",
                    num(f, 2),
                    num(t, 2),
                    s.label,
                    ax.towards,
                    ax.about
                ),
            ),
            None => push(out, Verdict::Passes, "nothing overturns".into()),
        }
    }
}

fn sliding(a: &Analysis, out: &mut Vec<Finding>) {
    let sl = &a.sliding;
    let push = |out: &mut Vec<Finding>, verdict, text| out.push(Finding { verdict, check: "sliding", text });
    // Not checked: once per structure and reason, with the directions it covers.
    let mut unchecked: Vec<(&str, &str, usize)> = Vec::new();
    for c in sl.not_checked() {
        let why = c.not_checked.as_deref().unwrap_or_default();
        match unchecked.iter_mut().find(|u| u.0 == c.structure && u.1 == why) {
            Some(u) => u.2 += 1,
            None => unchecked.push((&c.structure, why, 1)),
        }
    }
    for (structure, why, n) in unchecked {
        push(out, Verdict::NotChecked, format!("sliding of {structure} not checked ({n} direction{} of horizontal load): {why}", if n == 1 { "" } else { "s" }));
    }
    for c in &sl.checks {
        if c.not_checked.is_some() {
            continue;
        } else if !(c.meets_target && c.equ_ok) {
            push(
                out,
                Verdict::Fails,
                format!(
                    "{} slides {}: friction {} kN against {} kN, factor {} (target {}); factored {} kN against {} kN",
                    c.structure,
                    c.towards,
                    num(c.friction_kn, 2),
                    num(c.horizontal_kn, 2),
                    c.factor.map_or_else(|| "—".into(), |f| num(f, 2)),
                    num(sl.target_factor, 2),
                    num(c.equ_horizontal_kn, 2),
                    num(c.equ_friction_kn, 2)
                ),
            );
        }
    }
    let sliding: Vec<(&str, f64)> = a.plates.iter().filter_map(|p| p.sliding.as_ref().filter(|s| s.slides).map(|s| (p.id.as_str(), s.restraint_kn))).collect();
    if !sliding.is_empty() {
        let (most, kn) = sliding.iter().copied().max_by(|x, y| x.1.total_cmp(&y.1)).expect("non-empty");
        let list: Vec<&str> = sliding.iter().map(|s| s.0).collect();
        push(out, Verdict::Fails, format!("{} plate(s) must be restrained against sliding: {} (most {} kN at {most})", list.len(), ids(&list, 12), num(kn, 2)));
    }
    if !out.iter().any(|f| f.check == "sliding") {
        match sl.lowest() {
            Some(c) => push(out, Verdict::Passes, format!("lowest sliding factor {} (target {}) for {} {}", c.factor.map_or_else(|| "—".into(), |f| num(f, 2)), num(sl.target_factor, 2), c.structure, c.towards)),
            None => push(out, Verdict::Passes, "no horizontal load: nothing slides".into()),
        }
    }
}

fn bearing(a: &Analysis, out: &mut Vec<Finding>) {
    let g = &a.ground;
    let worst = |f: &dyn Fn(&crate::check::PlateCombination) -> Option<f64>| -> Option<(usize, usize, f64)> {
        a.plates
            .iter()
            .enumerate()
            .flat_map(|(i, p)| p.combinations.iter().enumerate().filter(|(c, _)| a.combinations[*c].checks_capacity).filter_map(move |(c, pc)| f(pc).map(|u| (i, c, u))))
            .max_by(|x, y| x.2.total_cmp(&y.2))
    };
    let basis = if g.layer.is_some() {
        format!(", {} (layer weight {} kPa {})", g.basis.label(), num(g.layer.map_or(0.0, |l| l.self_weight_kpa()), 2), if g.layer_weight_added_kpa() > 0.0 { "added" } else { "not added" })
    } else {
        String::new()
    };
    match g.allowable_kpa {
        None => out.push(Finding { verdict: Verdict::NotChecked, check: "ground bearing", text: "ground bearing at formation not checked: no allowable bearing pressure entered for the site".into() }),
        Some(allow) => {
            if let Some((i, c, u)) = worst(&|pc| pc.bearing_utilisation) {
                let p = &a.plates[i];
                let pc = &p.combinations[c];
                let over: Vec<&str> = a.plates.iter().filter(|p| p.combinations.iter().zip(&a.combinations).any(|(pc, comb)| comb.checks_capacity && pc.bearing_utilisation.is_some_and(|u| u > 1.0 + 1e-9))).map(|p| p.id.as_str()).collect();
                let verdict = if over.is_empty() { Verdict::Passes } else { Verdict::Fails };
                let group = p.formation_group.or(if g.layer.is_none() { p.surface_group } else { None }).map_or_else(String::new, |_| " (overlapping spread areas taken together)".into());
                let head = if over.is_empty() { String::new() } else { format!("{} plate(s) over the allowable at formation: {}; ", over.len(), ids(&over, 12)) };
                out.push(Finding {
                    verdict,
                    check: "ground bearing",
                    text: format!(
                        "{head}worst ground bearing at formation {} kPa of {} kPa allowable{basis} ({} %) at {}{group}, {}",
                        num(pc.bearing_kpa, 1),
                        num(allow, 1),
                        num(100.0 * u, 1),
                        p.id,
                        a.combinations[c].name
                    ),
                });
            }
        }
    }
    if let Some(layer) = g.layer {
        match layer.allowable_kpa {
            None => out.push(Finding { verdict: Verdict::NotChecked, check: "granular layer", text: "pressure on the granular layer under the plates not checked: no allowable pressure entered for the layer".into() }),
            Some(allow) => {
                if let Some((i, c, u)) = worst(&|pc| pc.layer_utilisation) {
                    let p = &a.plates[i];
                    let verdict = if u > 1.0 + 1e-9 { Verdict::Fails } else { Verdict::Passes };
                    out.push(Finding {
                        verdict,
                        check: "granular layer",
                        text: format!(
                            "worst pressure on the granular layer {} kPa of {} kPa allowable ({} %) under {}, {}",
                            num(p.combinations[c].layer_top_kpa.unwrap_or(0.0), 1),
                            num(allow, 1),
                            num(100.0 * u, 1),
                            p.id,
                            a.combinations[c].name
                        ),
                    });
                }
            }
        }
    }
    let groups = g.formation_groups.len() + g.surface_groups.len();
    if groups > 0 {
        let shared: usize = g.formation_groups.iter().chain(&g.surface_groups).map(|s| s.plates.len()).sum();
        out.push(Finding {
            verdict: Verdict::Passes,
            check: "ground bearing",
            text: format!("{groups} group(s) of plates have overlapping bearing areas ({shared} plates): each is checked on the larger of its own pressure and the group's total load over the union of their areas"),
        });
    }
}

fn plates(a: &Analysis, out: &mut Vec<Finding>) {
    let over: Vec<&str> = a.plates.iter().filter(|p| p.status.over).map(|p| p.id.as_str()).collect();
    let lift: Vec<&crate::check::PlateResult> = a.plates.iter().filter(|p| p.status.uplift).collect();
    if !over.is_empty() {
        out.push(Finding { verdict: Verdict::Fails, check: "base plates", text: format!("{} plate(s) over capacity: {}", over.len(), ids(&over, 12)) });
    }
    if !lift.is_empty() {
        let list: Vec<&str> = lift.iter().map(|p| p.id.as_str()).collect();
        let most = lift.iter().filter_map(|p| p.hold_down.map(|h| (p, h))).max_by(|x, y| x.1.anchor_kn.total_cmp(&y.1.anchor_kn));
        let hold = most.map_or_else(String::new, |(p, h)| {
            let k = h.kentledge_kn.map_or_else(String::new, |k| format!(" or {} kN secured kentledge", num(k, 2)));
            format!("; most: {} needs an anchor for {} kN{k} ({})", p.id, num(h.anchor_kn, 2), a.combinations[h.combination].name)
        });
        let through: Vec<&str> = (0..a.plates.len()).filter(|&i| a.lifts_only_through_continuity(i)).map(|i| a.plates[i].id.as_str()).collect();
        let why = if through.is_empty() {
            String::new()
        } else {
            format!(
                "; {} of them ({}) lift only where members run continuous over their supports (in simple spans none lifts): if those members are not fixed to their heads they lift off there instead — check the fixing before holding the plates down",
                through.len(),
                ids(&through, 8)
            )
        };
        out.push(Finding { verdict: Verdict::Fails, check: "uplift", text: format!("{} plate(s) lift and need holding down: {}{hold}{why}", lift.len(), ids(&list, 12)) });
    }
    let pulling: Vec<&str> = a.lifts.iter().filter(|l| !l.status.is_ok()).map(|l| l.id.as_str()).collect();
    if !pulling.is_empty() {
        out.push(Finding { verdict: Verdict::Fails, check: "posts on members", text: format!("{} post(s) standing on other members pull up or are over their support's load: {}", pulling.len(), ids(&pulling, 12)) });
    }
    if let Some(w) = a.worst_plate() {
        let p = &a.plates[w];
        let g = p.governing();
        if !p.status.over {
            out.push(Finding {
                verdict: Verdict::Passes,
                check: "base plates",
                text: format!("most utilised plate {} at {} % ({}, {})", p.id, num(100.0 * g.utilisation, 1), g.governed_by(), a.combinations[p.governing].name),
            });
        }
    }
}

/// Name of a plate's overlap groups for tables: `F1` (spread areas overlapping at formation),
/// `S2` (plates or sole boards overlapping on the layer or ground), both, or empty.
pub fn group_label(formation: Option<u32>, surface: Option<u32>) -> String {
    let mut out = Vec::new();
    if let Some(k) = formation {
        out.push(format!("F{}", k + 1));
    }
    if let Some(k) = surface {
        out.push(format!("S{}", k + 1));
    }
    out.join(" ")
}
