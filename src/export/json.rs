//! The machine-readable result: one JSON document whose shape is documented in the README
//! ("JSON output") and versioned by `plateload_json`.
//!
//! Version 2 (this one): `allowable_kpa` and `bearing_utilisation` are `null` where no allowable
//! is entered; each combination adds `layer_top_kpa` and `layer_utilisation`; each base adds
//! `plate_area_m2`, `hold_down`, `sliding`, `formation_group`, `surface_group`; the document adds
//! `findings`, `ground` and `sliding`, and `stability` lists each structure's tipping axes.
//!
//! Method fields (added without a version change; old readers can ignore them): `methods` lists
//! the method passes solved, primary first (its loads fill `cases_kn` and `equilibrium`); each
//! base has `governing_method` and `min_method` (a pass name, or `any (methods agree)`) and
//! `cases_kn_by_method`; each base combination has `max_method` and `min_method`;
//! `equilibrium_by_method` proves every pass.
//!
//! Horizontal fields (also added without a version change): each base has `brace` — the largest
//! downward (`max_kn`) and upward (`min_kn`) vertical components of the brace forces it carries,
//! unfactored, and the braced `bays` they come from; `horizontal_path` lists the braced `planes`,
//! the `diaphragms` (and that load is shared nowhere else), how the `notional` load was made, what
//! each of the `combinations` does, and the diaphragm `sharing` when two ways were solved.

use serde::Serialize;

use crate::check::{Analysis, CaseEquilibrium};
use crate::scene::loads::Case;
use crate::check::stability::Stability;

/// Version of the JSON shape. 2: the allowable bearing pressure may be `null` (not entered, not
/// checked); overturning per structure and axis in both forms; sliding, ground, hold-down and the
/// findings at a glance.
pub const JSON_VERSION: u32 = 2;

#[derive(Serialize)]
struct PerCase<T> {
    #[serde(rename = "G")]
    g: T,
    #[serde(rename = "Q")]
    q: T,
    #[serde(rename = "W")]
    w: T,
}

impl<T: Copy> PerCase<T> {
    fn of(v: [T; 3]) -> Self {
        PerCase { g: v[0], q: v[1], w: v[2] }
    }
}

#[derive(Serialize)]
struct Doc<'a> {
    plateload_json: u32,
    caution: &'static str,
    scene: &'a str,
    units: Units,
    combinations: &'a [crate::Combination],
    methods: Vec<&'a str>,
    imposed_loads: ImposedLoads<'a>,
    bases: Vec<Base<'a>>,
    lifts: Vec<Lift<'a>>,
    totals: Totals,
    equilibrium: Vec<Equilibrium>,
    horizontal_loads: Vec<HorizontalLoad<'a>>,
    horizontal_path: Path<'a>,
    equilibrium_by_method: Vec<MethodEquilibrium<'a>>,
    findings: Vec<crate::export::findings::Finding>,
    ground: GroundDoc<'a>,
    stability: &'a Stability,
    sliding: &'a crate::check::sliding::Sliding,
    warnings: Vec<String>,
}

/// How the imposed loads are placed.
#[derive(Serialize)]
struct ImposedLoads<'a> {
    /// Every imposed load spread over a deck or bearer is split into cells and loaded where
    /// unfavourable at each plate, except these (applied whole, as the planner set).
    whole: &'a [String],
    working_levels: &'static str,
}

#[derive(Serialize)]
struct GroundDoc<'a> {
    allowable_kpa: Option<f64>,
    basis: &'static str,
    layer: Option<crate::scene::model::GranularLayer>,
    layer_weight_added_kpa: f64,
    formation_groups: Vec<GroupDoc<'a>>,
    surface_groups: Vec<GroupDoc<'a>>,
}

#[derive(Serialize)]
struct GroupDoc<'a> {
    plates: Vec<&'a str>,
    union_area_m2: f64,
    levels_differ: bool,
}

#[derive(Serialize)]
struct HorizontalLoad<'a> {
    id: &'a str,
    case: Case,
    base_shear_kn: [f64; 2],
}

#[derive(Serialize)]
struct Units {
    force: &'static str,
    length: &'static str,
    pressure: &'static str,
    moment: &'static str,
}

#[derive(Serialize)]
struct Base<'a> {
    id: &'a str,
    x: f64,
    y: f64,
    base_level: f64,
    support: &'a str,
    on_structure: Option<&'a str>,
    swl_kn: f64,
    bearing_area_m2: f64,
    plate_area_m2: f64,
    allowable_kpa: Option<f64>,
    cases_kn: PerCase<f64>,
    shear_kn: PerCase<[f64; 2]>,
    combinations: Vec<BaseCombination<'a>>,
    utilisation: f64,
    bearing_kpa: f64,
    governing_combination: &'a str,
    governing_method: &'a str,
    min_method: &'a str,
    cases_kn_by_method: Vec<MethodCases<'a>>,
    hold_down: Option<HoldDownDoc<'a>>,
    sliding: Option<&'a crate::check::sliding::PlateSliding>,
    formation_group: Option<u32>,
    surface_group: Option<u32>,
    arrangements: Vec<crate::check::ArrangementAt>,
    status: &'static str,
    brace: Brace<'a>,
}

/// Brace forces at a base: largest push down and pull up, kN, and the braced bays.
#[derive(Serialize)]
struct Brace<'a> {
    max_kn: f64,
    min_kn: f64,
    bays: Vec<&'a str>,
}

/// The horizontal load path with the braced bays named.
#[derive(Serialize)]
struct Path<'a> {
    #[serde(flatten)]
    summary: &'a crate::check::horizontal::HorizontalSummary,
    bay_names: &'a [String],
}

/// A post standing on another member: the load it passes on at its base.
#[derive(Serialize)]
struct Lift<'a> {
    id: &'a str,
    stands_on: &'a str,
    /// Continues the standard under it: a negative minimum is tension in the splice.
    spliced: bool,
    base_level: f64,
    swl_kn: Option<f64>,
    cases_kn: PerCase<f64>,
    combinations: Vec<LiftCombination<'a>>,
    status: &'static str,
}

#[derive(Serialize)]
struct LiftCombination<'a> {
    name: &'a str,
    max_kn: f64,
    min_kn: f64,
}

#[derive(Serialize)]
struct HoldDownDoc<'a> {
    combination: &'a str,
    anchor_kn: f64,
    kentledge_kn: Option<f64>,
}

#[derive(Serialize)]
struct MethodCases<'a> {
    method: &'a str,
    #[serde(flatten)]
    cases_kn: PerCase<f64>,
}

#[derive(Serialize)]
struct MethodEquilibrium<'a> {
    method: &'a str,
    cases: Vec<Equilibrium>,
}

#[derive(Serialize)]
struct BaseCombination<'a> {
    name: &'a str,
    max_kn: f64,
    min_kn: f64,
    load_utilisation: f64,
    bearing_kpa: f64,
    bearing_utilisation: Option<f64>,
    layer_top_kpa: Option<f64>,
    layer_utilisation: Option<f64>,
    utilisation: f64,
    status: &'static str,
    max_method: &'a str,
    min_method: &'a str,
}

#[derive(Serialize)]
struct Totals {
    applied_kn: PerCase<f64>,
    reactions_kn: PerCase<f64>,
    base_shear_kn: PerCase<[f64; 2]>,
}

#[derive(Serialize)]
struct Equilibrium {
    case: Case,
    force_residual_kn: f64,
    moment_residual_knm: f64,
    relative: f64,
    one_state: bool,
}

impl From<&CaseEquilibrium> for Equilibrium {
    fn from(e: &CaseEquilibrium) -> Self {
        Equilibrium { case: e.case, force_residual_kn: e.force_residual_kn, moment_residual_knm: e.moment_residual_knm, relative: e.relative, one_state: e.one_state }
    }
}

/// The analysis as a pretty-printed JSON document.
pub fn analysis_json(a: &Analysis) -> String {
    let bay_names = a.bay_names();
    let bases = a
        .plates
        .iter()
        .enumerate()
        .map(|(i, p)| Base {
            id: &p.id,
            x: p.x,
            y: p.y,
            base_level: p.base_level,
            support: &p.support,
            on_structure: p.on_structure.as_deref(),
            swl_kn: p.swl_kn,
            bearing_area_m2: p.bearing_area_m2,
            plate_area_m2: p.plate_area_m2,
            allowable_kpa: p.allowable_kpa,
            cases_kn: PerCase::of(p.case_kn),
            shear_kn: PerCase::of(p.case_shear_kn),
            combinations: p
                .combinations
                .iter()
                .zip(&a.combinations)
                .map(|(c, comb)| BaseCombination {
                    name: &comb.name,
                    max_kn: c.max_kn,
                    min_kn: c.min_kn,
                    load_utilisation: c.load_utilisation,
                    bearing_kpa: c.bearing_kpa,
                    bearing_utilisation: c.bearing_utilisation,
                    layer_top_kpa: c.layer_top_kpa,
                    layer_utilisation: c.layer_utilisation,
                    utilisation: c.utilisation,
                    status: c.status.label(),
                    max_method: a.method_label(c.max_method),
                    min_method: a.method_label(c.min_method),
                })
                .collect(),
            utilisation: p.governing().utilisation,
            bearing_kpa: p.governing().bearing_kpa,
            governing_combination: &a.combinations[p.governing].name,
            governing_method: a.governing_method_label(i),
            min_method: a.min_method_label(i),
            cases_kn_by_method: p.case_kn_by_method.iter().enumerate().map(|(m, &c)| MethodCases { method: a.method_label(m), cases_kn: PerCase::of(c) }).collect(),
            hold_down: p.hold_down.map(|h| HoldDownDoc { combination: &a.combinations[h.combination].name, anchor_kn: h.anchor_kn, kentledge_kn: h.kentledge_kn }),
            sliding: p.sliding.as_ref(),
            formation_group: p.formation_group,
            surface_group: p.surface_group,
            arrangements: a.arrangements_at(i),
            status: p.status.label(),
            brace: Brace { max_kn: p.brace.max_kn, min_kn: p.brace.min_kn, bays: p.brace.bays.iter().map(|&b| bay_names.get(b as usize).map_or("?", String::as_str)).collect() },
        })
        .collect();
    let doc = Doc {
        plateload_json: JSON_VERSION,
        caution: crate::CAUTION,
        scene: &a.scene_name,
        units: Units { force: "kN", length: "m", pressure: "kPa", moment: "kN.m" },
        combinations: &a.combinations,
        methods: (0..a.method_count()).map(|m| a.method_label(m)).collect(),
        imposed_loads: ImposedLoads { whole: &a.whole_loads, working_levels: a.working_levels.label() },
        bases,
        lifts: a
            .lifts
            .iter()
            .map(|l| Lift {
                id: &l.id,
                stands_on: &l.stands_on,
                spliced: l.spliced,
                base_level: l.base_level,
                swl_kn: l.swl_kn,
                cases_kn: PerCase::of(l.case_kn),
                combinations: a.combinations.iter().zip(&l.combinations).map(|(c, r)| LiftCombination { name: &c.name, max_kn: r.max_kn, min_kn: r.min_kn }).collect(),
                status: l.status.label(),
            })
            .collect(),
        totals: Totals {
            applied_kn: PerCase::of(a.equilibrium.map(|e| e.applied.down())),
            reactions_kn: PerCase::of(a.equilibrium.map(|e| e.reactions.force[2])),
            base_shear_kn: PerCase::of(a.base_shear()),
        },
        equilibrium: a.equilibrium.iter().map(Equilibrium::from).collect(),
        horizontal_path: Path { summary: &a.horizontal, bay_names: &bay_names },
        horizontal_loads: a.horizontal_base_shear().into_iter().map(|(id, case, base_shear_kn)| HorizontalLoad { id, case, base_shear_kn }).collect(),
        equilibrium_by_method: a
            .equilibrium_by_method
            .iter()
            .enumerate()
            .map(|(m, eq)| MethodEquilibrium { method: a.method_label(m), cases: eq.iter().map(Equilibrium::from).collect() })
            .collect(),
        findings: crate::export::findings::findings(a),
        ground: GroundDoc {
            allowable_kpa: a.ground.allowable_kpa,
            basis: a.ground.basis.label(),
            layer: a.ground.layer,
            layer_weight_added_kpa: a.ground.layer_weight_added_kpa(),
            formation_groups: groups(a, &a.ground.formation_groups),
            surface_groups: groups(a, &a.ground.surface_groups),
        },
        stability: &a.stability,
        sliding: &a.sliding,
        warnings: a.warnings.iter().map(|w| w.to_string()).collect(),
    };
    // Non-finite numbers cannot occur in a valid analysis; serde_json writes them as null.
    let mut out = Vec::with_capacity(1024 + 2048 * a.plates.len());
    let mut ser = serde_json::Serializer::with_formatter(&mut out, Numbers(serde_json::ser::PrettyFormatter::new()));
    doc.serialize(&mut ser).expect("the document is plain data");
    String::from_utf8(out).expect("serde_json writes UTF-8")
}

/// serde_json's pretty layout, with every number written through [`crate::format`]: no
/// negative zero.
struct Numbers(serde_json::ser::PrettyFormatter<'static>);

impl serde_json::ser::Formatter for Numbers {
    fn write_f64<W: ?Sized + std::io::Write>(&mut self, w: &mut W, v: f64) -> std::io::Result<()> {
        self.0.write_f64(w, crate::format::no_negative_zero(v))
    }
    fn write_f32<W: ?Sized + std::io::Write>(&mut self, w: &mut W, v: f32) -> std::io::Result<()> {
        self.0.write_f32(w, if v == 0.0 { 0.0 } else { v })
    }
    fn begin_array<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.begin_array(w)
    }
    fn end_array<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.end_array(w)
    }
    fn begin_array_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W, first: bool) -> std::io::Result<()> {
        self.0.begin_array_value(w, first)
    }
    fn end_array_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.end_array_value(w)
    }
    fn begin_object<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.begin_object(w)
    }
    fn end_object<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.end_object(w)
    }
    fn begin_object_key<W: ?Sized + std::io::Write>(&mut self, w: &mut W, first: bool) -> std::io::Result<()> {
        self.0.begin_object_key(w, first)
    }
    fn begin_object_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.begin_object_value(w)
    }
    fn end_object_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.end_object_value(w)
    }
}

/// Overlap groups with their plates' ids (the groups hold post indices).
fn groups<'a>(a: &'a Analysis, list: &'a [crate::check::bearing::SpreadGroup]) -> Vec<GroupDoc<'a>> {
    let mut id_of: Vec<&str> = vec![""; a.solution.plates.len()];
    for p in &a.plates {
        id_of[p.post] = &p.id;
    }
    list.iter().map(|g| GroupDoc { plates: g.plates.iter().map(|&p| id_of[p as usize]).collect(), union_area_m2: g.union_area_m2, levels_differ: g.levels_differ }).collect()
}
