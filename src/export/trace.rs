//! Tracing one base plate's load back to where it came from.

use std::fmt::Write;

use crate::check::analysis::Analysis;
use crate::format::num;
use crate::solve::beam::Piece;
use crate::scene::loads::Case;
use crate::scene::model::Scene;
use crate::scene::bracing::Bracing;
use crate::solve::{Contribution, Item, Route};

/// Words for a route, using the scene's ids.
pub fn route_words(scene: &Scene, route: Route) -> String {
    match route {
        Route::Bearer { bearer, piece } => piece_words(scene, bearer, piece),
        Route::Lift { from } => format!("post {} above, spliced onto this one", scene.posts[from as usize].id),
        Route::Transfer { bearer, piece, from } => format!("{} (transfer), from post {} standing on it", piece_words(scene, bearer, piece), scene.posts[from as usize].id),
        Route::PostSelfWeight => "own weight of the post".into(),
        Route::PostTop => "load on the post top".into(),
        Route::Kentledge => "kentledge on the plate".into(),
        Route::Bracing => "the vertical components of the brace forces at its nodes".into(),
    }
}

/// The brace forces behind a [`Route::Bracing`] share of item `item` at post `post`: one line per
/// brace ending on the post, with its braced bay and lever arm; they add up to the share.
pub fn brace_shares(scene: &Scene, bracing: &Bracing, item: &Item, post: u32) -> Vec<(f64, String)> {
    let offsets = crate::solve::braced::plane_offsets(bracing);
    let mut out = Vec::new();
    if item.lift_shear.is_empty() {
        return out;
    }
    for (pk, plane) in bracing.planes.iter().enumerate() {
        for (k, lift) in plane.lifts.iter().enumerate().take(plane.braced_to) {
            let v = item.lift_shear[offsets[pk] + k];
            for d in lift {
                for (end, upper) in [(d.lower, false), (d.upper, true)] {
                    if end == post && v != 0.0 {
                        out.push((crate::solve::braced::diagonal_component(d, v, upper), brace_words(scene, d.brace as usize)));
                    }
                }
            }
        }
    }
    out
}

/// Words for the vertical component of a brace's force: its braced bay and lever arm.
pub fn brace_words(scene: &Scene, brace: usize) -> String {
    let Some(b) = scene.braces.get(brace) else { return "a brace".into() };
    let at = |id: &str| scene.posts.iter().find(|p| p.id == id).map(|p| (p.x, p.y));
    let lever = match (at(&b.from.post), at(&b.to.post)) {
        (Some(a), Some(z)) => format!(", lever {:.3} m", (z.0 - a.0).hypot(z.1 - a.1)),
        _ => String::new(),
    };
    let (lo, hi) = (b.from.level.min(b.to.level), b.from.level.max(b.to.level));
    format!("braced bay {}–{} (brace {}, {:.3}–{:.3} m){lever}", b.from.post, b.to.post, b.id, num(lo), num(hi))
}

fn piece_words(scene: &Scene, bearer: u32, piece: Piece) -> String {
    let b = &scene.bearers[bearer as usize];
    let post = |k: usize| b.posts.get(k).map(String::as_str).unwrap_or("?");
    match piece {
        Piece::Span(j) => format!("{} {}, span {}-{}", role(b.role), b.id, post(j as usize), post(j as usize + 1)),
        Piece::StartOverhang => format!("{} {}, overhang before {}", role(b.role), b.id, post(0)),
        Piece::EndOverhang => format!("{} {}, overhang after {}", role(b.role), b.id, post(b.posts.len() - 1)),
        Piece::Single => format!("{} {} on its single post", role(b.role), b.id),
        Piece::Continuous => format!("{} {}, continuous over {} posts", role(b.role), b.id, b.posts.len()),
        Piece::TwoSpanModel => format!("{} {}, two-span model about this post (joints not known)", role(b.role), b.id),
    }
}

fn role(r: crate::scene::model::BeamRole) -> &'static str {
    match r {
        crate::scene::model::BeamRole::Bearer => "bearer",
        crate::scene::model::BeamRole::Ledger => "ledger",
        crate::scene::model::BeamRole::Transom => "transom",
    }
}

/// A text account of every share that makes up one plate's load, grouped by load item, with
/// per-case totals that equal the plate's case loads. The shares are those of the method pass
/// that governs the plate's maximum; the other passes' case loads follow.
pub fn trace_text(scene: &Scene, analysis: &Analysis, plate: usize) -> String {
    let p = &analysis.plates[plate];
    let mut out = String::new();
    let _ = writeln!(out, "Base {} at ({:.3}, {:.3}), base level {:.3} m, support {}", p.id, num(p.x), num(p.y), num(p.base_level), p.support);
    if let Some(e) = &p.on_structure {
        let _ = writeln!(out, "  on existing structure {e}: this plate's load is for the permanent-works designer");
    }
    let m = p.governing_method;
    let methods = analysis.method_count();
    if methods == 1 {
        let _ = writeln!(out, "  method: {}", analysis.method_label(0));
    } else {
        let all: Vec<&str> = (0..methods).map(|k| analysis.method_label(k)).collect();
        let why = if p.methods_agree { "all methods give this base the same loads" } else { "it governs this base's maximum" };
        let _ = writeln!(out, "  method: {} ({why}; envelope of: {})", analysis.method_label(m), all.join("; "));
    }
    let solution = analysis.solution_of(m);
    let mut shares: Vec<&Contribution> = solution.contributions.iter().collect();
    shares.sort_by_key(|c| (c.post, c.item, c.route));
    let mut totals = [0.0; 3];
    let mut last_item = u32::MAX;
    for c in shares.iter().filter(|c| c.post as usize == p.post) {
        let item = &solution.items[c.item as usize];
        if c.item != last_item {
            let _ = writeln!(out, "  {} ({})", item.id, item.case);
            last_item = c.item;
        }
        write_share(&mut out, scene, (&analysis.bracing, &solution.items), &shares, c, 2);
        totals[item.case.index()] += c.kn;
    }
    let case_kn = p.case_kn_by_method.get(m).copied().unwrap_or(p.case_kn);
    for c in Case::ALL {
        let _ = writeln!(out, "  total {}: {:.3} kN (plate load {:.3} kN)", c, num(totals[c.index()]), num(case_kn[c.index()]));
    }
    for (k, cases) in p.case_kn_by_method.iter().enumerate().filter(|&(k, _)| k != m) {
        let _ = writeln!(out, "  under {}: G {:.3} kN, Q {:.3} kN, W {:.3} kN", analysis.method_label(k), num(cases[0]), num(cases[1]), num(cases[2]));
    }
    for (comb, r) in analysis.combinations.iter().zip(&p.combinations) {
        let _ = write!(
            out,
            "  {:<12} max {:>9.3} kN  min {:>9.3} kN  utilisation {:>6.1}%  bearing {:>7.1} kPa  {}",
            comb.name,
            num(r.max_kn),
            num(r.min_kn),
            num(100.0 * r.utilisation),
            num(r.bearing_kpa),
            r.status
        );
        if methods > 1 && !p.methods_agree {
            let _ = write!(out, "  (max: {}; min: {})", analysis.method_label(r.max_method), analysis.method_label(r.min_method));
        }
        let _ = writeln!(out);
    }
    // Permanent load split as the minimum uses it.
    let parts = crate::check::permanent::permanent_parts(scene, analysis.solution_of(p.min_method))[p.post];
    let _ = write!(out, "  permanent load for the minimum: pushes down {:.3} kN, lifts {:.3} kN", num(parts.down_kn), num(parts.up_kn));
    if parts.down_unreliable_kn != 0.0 {
        let _ = write!(out, ", and {:.3} kN of kentledge that could be taken away (never counted as holding down)", num(parts.down_unreliable_kn));
    }
    let _ = writeln!(out);
    // Ground.
    let g = p.governing();
    let ground = &analysis.ground;
    match g.layer_top_kpa {
        Some(q) => {
            let verdict = g.layer_utilisation.map_or_else(|| "not checked: no allowable for the layer".to_owned(), |u| format!("{:.1} % of the allowable", num(100.0 * u)));
            let _ = writeln!(out, "  on the granular layer under {:.4} m²: {:.1} kPa ({verdict})", num(p.plate_area_m2), num(q));
        }
        None => {}
    }
    let verdict = g.bearing_utilisation.map_or_else(|| "not checked: no allowable bearing pressure entered".to_owned(), |u| format!("{:.1} % of {:.1} kPa allowable, {}", num(100.0 * u), num(p.allowable_kpa.unwrap_or(0.0)), ground.basis.label()));
    let _ = write!(out, "  at formation over {:.4} m²: {:.1} kPa ({verdict})", num(p.bearing_area_m2), num(g.bearing_kpa));
    if ground.layer_weight_added_kpa() > 0.0 {
        let _ = write!(out, ", layer weight {:.2} kPa included", num(ground.layer_weight_added_kpa()));
    }
    let group = crate::export::findings::group_label(p.formation_group, p.surface_group);
    if !group.is_empty() {
        let _ = write!(out, "; overlap group {group}, taken together over the union of the areas");
    }
    let _ = writeln!(out);
    if let Some(h) = p.hold_down {
        let k = h.kentledge_kn.map_or_else(String::new, |k| format!(" or {:.3} kN secured kentledge on the plate", num(k)));
        let _ = writeln!(out, "  hold-down: an anchor for {:.3} kN{k} ({})", num(h.anchor_kn), analysis.combinations[h.combination].name);
        if analysis.lifts_only_through_continuity(plate) {
            let _ = writeln!(out, "  it lifts only where members run continuous over their supports (in simple spans it does not): if they are not fixed to their heads they lift off there instead; check the fixing first");
        }
    }
    if let Some(sl) = &p.sliding {
        match (sl.mu, sl.factor) {
            (Some(mu), Some(f)) => {
                let _ = writeln!(
                    out,
                    "  sliding {}: shear {:.3} kN, least vertical load {:.3} kN, μ {:.2} → factor {:.2}; factored shear {:.3} kN against {:.3} kN friction{}",
                    sl.towards,
                    num(sl.shear_kn),
                    num(sl.normal_kn),
                    num(mu),
                    num(f),
                    num(sl.equ_shear_kn),
                    num(sl.equ_friction_kn),
                    if sl.slides { format!("; must be restrained for {:.3} kN", num(sl.restraint_kn)) } else { String::new() }
                );
            }
            _ => {
                let _ = writeln!(out, "  sliding {}: shear {:.3} kN, not checked: no friction coefficient given for support {}", sl.towards, num(sl.shear_kn), p.support);
            }
        }
    }
    // Horizontal loads: the brace forces this plate carries, and the other way the diaphragms may
    // share them.
    if p.brace.max_kn > 5e-10 || p.brace.min_kn < -5e-10 || !p.brace.bays.is_empty() {
        let bays = if p.brace.bays.is_empty() { "through posts above".to_owned() } else { format!("from braced bays {}", analysis.bays_of(&p.brace).join(", ")) };
        let _ = writeln!(out, "  brace forces (vertical components, unfactored, worst direction): {:+.3} kN down, {:+.3} kN up, {bays}", num(p.brace.max_kn), num(p.brace.min_kn));
    }
    for item in solution.items.iter().filter(|i| i.direction.is_some()) {
        if let Some(alt) = &item.alternative {
            let at = |v: &[(u32, f64)]| v.iter().filter(|e| e.0 as usize == p.post).map(|e| e.1).sum::<f64>();
            let (a, b) = (at(&item.vertical), at(&alt.vertical));
            if (a - b).abs() > 5e-10 {
                let _ = writeln!(out, "  {}: {:.3} kN by the {}, {:.3} kN as a {}; the worse counts", item.id, num(a), alt.primary, num(b), alt.label);
            }
        }
    }
    for d in &analysis.horizontal.diaphragms {
        let _ = writeln!(out, "  {d}");
    }
    arrangement_lines(&mut out, scene, analysis, plate);
    out
}

/// Where each arranged imposed load is placed for this plate's worst maximum and minimum: the
/// cells to load, in plan coordinates, so the arrangement can be set out on site.
fn arrangement_lines(out: &mut String, scene: &Scene, analysis: &Analysis, plate: usize) {
    let notes = analysis.arrangements_at(plate);
    if notes.is_empty() {
        return;
    }
    let p = &analysis.plates[plate];
    let Ok(model) = crate::validate(scene) else { return };
    let pass = analysis.method(p.governing_method);
    let _ = writeln!(out, "  imposed loads in their worst arrangement ({}):", pass.label);
    for note in notes {
        let _ = writeln!(out, "    {}", note.words());
        let Some(load) = scene.loads.iter().position(|l| l.id == note.load) else { continue };
        let item = analysis.solution_of(p.governing_method).items.iter().find(|i| i.id == note.load);
        let (Some(effects), Some(cells)) = (crate::solve::arrangement::cell_effects(&model, pass, load, p.post), item.and_then(|i| i.arranged.as_ref())) else { continue };
        for (what, down) in [("loaded for the maximum", true), ("loaded for the minimum", false)] {
            let picked: Vec<(usize, f64)> = effects.iter().copied().enumerate().filter(|&(_, e)| if down { e > 0.0 } else { e < 0.0 }).collect();
            if picked.is_empty() {
                continue;
            }
            let shown: Vec<String> = picked.iter().take(MAX_CELLS_LISTED).map(|&(c, e)| format!("{} ({e:+.3} kN)", cell_words(scene, &cells.cells[c].place))).collect();
            let more = if picked.len() > MAX_CELLS_LISTED { format!(", and {} more", picked.len() - MAX_CELLS_LISTED) } else { String::new() };
            let _ = writeln!(out, "      {what}: {}{more}", shown.join(", "));
        }
    }
}

/// Cells listed one by one in a trace before the rest are counted.
const MAX_CELLS_LISTED: usize = 12;

/// Where a cell is, in words.
fn cell_words(scene: &Scene, place: &crate::solve::CellPlace) -> String {
    match *place {
        crate::solve::CellPlace::Deck { rect, .. } => format!("x {:.2}–{:.2}, y {:.2}–{:.2} m", rect.x.0, rect.x.1, rect.y.0, rect.y.1),
        crate::solve::CellPlace::Bearer { bearer, from_m, to_m } => format!("{} {:.2}–{:.2} m from its first post", scene.bearers[bearer as usize].id, from_m, to_m),
    }
}

/// One share, and where a share from a post above came from in turn, indented by `depth`.
fn write_share(out: &mut String, scene: &Scene, (bracing, items): (&Bracing, &[Item]), shares: &[&Contribution], c: &Contribution, depth: usize) {
    let pad = "  ".repeat(depth);
    let _ = writeln!(out, "{pad}{:>10.3} kN  via {}", num(c.kn), route_words(scene, c.route));
    if c.route == Route::Bracing {
        for (kn, words) in brace_shares(scene, bracing, &items[c.item as usize], c.post) {
            let _ = writeln!(out, "{pad}    {:>10.3} kN  via {words}", num(kn));
        }
        return;
    }
    let from = match c.route {
        Route::Lift { from } | Route::Transfer { from, .. } => from,
        _ => return,
    };
    // The post above carries this item's load by its own shares (a transfer passes on part of it).
    let lo = shares.partition_point(|s| (s.post, s.item) < (from, c.item));
    let hi = shares.partition_point(|s| (s.post, s.item) <= (from, c.item));
    if matches!(c.route, Route::Transfer { .. }) {
        let total: f64 = shares[lo..hi].iter().map(|s| s.kn).sum();
        let _ = writeln!(out, "{pad}    (part of the {total:.3} kN post {} passes on, which it takes:)", scene.posts[from as usize].id);
    }
    for s in &shares[lo..hi] {
        write_share(out, scene, (bracing, items), shares, s, depth + 2);
    }
}

/// A post standing on another member has no base plate of its own: what it passes on at its
/// base, per case and per combination, and where to follow that load down.
pub fn lift_text(analysis: &Analysis, lift: usize) -> String {
    let l = &analysis.lifts[lift];
    let mut out = String::new();
    let _ = writeln!(out, "Post {} stands on {} at base level {:.3} m: it has no base plate of its own.", l.id, l.stands_on, num(l.base_level));
    let _ = writeln!(out, "  load it passes on at its base (downward positive), method {}:", analysis.method_label(0));
    for c in Case::ALL {
        let _ = writeln!(out, "    {c}: {:+.3} kN", num(l.case_kn[c.index()]));
    }
    for (c, r) in analysis.combinations.iter().zip(&l.combinations) {
        let _ = writeln!(out, "  {}: max {:.3} kN, min {:.3} kN over the methods", c.name, num(r.max_kn), num(r.min_kn));
    }
    if l.status.uplift {
        let what = if l.spliced { "tension in the splice: lock the joint (pinned or bolted spigot) for it" } else { "it pulls up off what it stands on: tie it down or prop it" };
        let _ = writeln!(out, "  {what}");
    }
    let _ = writeln!(out, "  follow the load down by tracing what it stands on ({}); its shares are in the traces of the base plates below.", l.stands_on);
    out
}
