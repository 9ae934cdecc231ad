//! A regular scaffold or birdcage in one step: a grid of posts, members at every lift, decks on
//! chosen lifts, braces in every line of posts (and optionally in plan), and a load-class load.
//! The notional horizontal load comes from the scene's rule ([`crate::scene::model::HorizontalSettings`]).
//! The result is an ordinary [`Scene`], freely editable afterwards.

use serde::{Deserialize, Serialize};

use crate::scene::catalogue;
use crate::scene::loads::{Case, Intensity, Load, LoadKind};
use crate::scene::model::{BeamRole, Bearer, Brace, Deck, Post, PostNode, Rect, Scene, SupportType};

/// What to generate.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LayoutSpec {
    /// Number of bays along x.
    pub bays_x: usize,
    /// Number of bays along y.
    pub bays_y: usize,
    /// Bay width along x, m.
    pub bay_x_m: f64,
    /// Bay width along y, m.
    pub bay_y_m: f64,
    /// Plan position of the first post, m.
    pub origin: (f64, f64),
    /// Base plate level, m.
    pub base_level: f64,
    /// Number of lifts (levels of members above the base).
    pub lifts: usize,
    /// Height of each lift, m.
    pub lift_m: f64,
    /// Lifts (1 = lowest) that carry a deck.
    pub deck_lifts: Vec<usize>,
    /// Self-weight of each deck, kPa.
    pub deck_self_weight_kpa: f64,
    /// Catalogue id of the decking the self-weight was copied from, if any (informative).
    #[serde(default)]
    pub decking: Option<String>,
    /// Self-weight of every post and member, kN/m.
    #[serde(default = "tube_self_weight")]
    pub member_self_weight_kn_per_m: f64,
    /// Catalogue id of the section the member self-weight was copied from, if any (informative).
    #[serde(default)]
    pub section: Option<String>,
    /// Load class (EN 12811-1 Table 3) of the imposed load on every deck (1–6), if any.
    #[serde(alias = "duty_class")]
    pub load_class: Option<u8>,
    /// Support type of every post; its id is used in the scene.
    pub support: SupportType,
    /// Brace every line of posts along x and along y, in every lift: a diagonal in the first
    /// bay and in every `brace_every`-th bay after it.
    pub braced: bool,
    /// Bays between braced bays along a line (1 = every bay). Default 3.
    #[serde(default = "default_brace_every")]
    pub brace_every: usize,
    /// Plan-brace every bay at every lift, making each lift a diaphragm.
    #[serde(default)]
    pub plan_braced: bool,
    /// Prefix for every generated id, so a layout can be added beside others.
    pub id_prefix: String,
}

fn tube_self_weight() -> f64 {
    crate::scene::model::STEEL_TUBE_KN_PER_M
}

impl Default for LayoutSpec {
    /// A small birdcage built from the shipped catalogue's defaults: steel tube members, wet
    /// timber boards, and an example base jack on a sole board (its safe working load is an
    /// example, which validation points out until the planner enters the manufacturer's).
    fn default() -> Self {
        let c = catalogue::shipped();
        let entry = "the shipped catalogue has its default entries (tested)";
        let jack = c.jack(catalogue::DEFAULT_JACK).expect(entry);
        let sole = c.sole_plate(catalogue::DEFAULT_SOLE_PLATE).expect(entry);
        let tube = c.member(catalogue::DEFAULT_MEMBER).expect(entry);
        let boards = c.deck(catalogue::DEFAULT_DECK).expect(entry);
        LayoutSpec {
            bays_x: 3,
            bays_y: 2,
            bay_x_m: 2.0,
            bay_y_m: 1.5,
            origin: (0.0, 0.0),
            base_level: 0.0,
            lifts: 2,
            lift_m: 2.0,
            deck_lifts: vec![2],
            deck_self_weight_kpa: boards.self_weight_kpa,
            decking: Some(boards.id.clone()),
            member_self_weight_kn_per_m: tube.self_weight_kn_per_m,
            section: Some(tube.id.clone()),
            load_class: Some(3),
            support: catalogue::support_type("jack", jack, Some(sole)),
            braced: true,
            brace_every: 3,
            plan_braced: false,
            id_prefix: String::new(),
        }
    }
}

fn default_brace_every() -> usize {
    3
}

/// Grid column name: A, B, …, Z, AA, AB, …
pub fn column_name(mut i: usize) -> String {
    let mut s = Vec::new();
    loop {
        s.push(b'A' + (i % 26) as u8);
        if i < 26 {
            break;
        }
        i = i / 26 - 1;
    }
    s.reverse();
    String::from_utf8(s).expect("ASCII")
}

/// Add a generated layout to a scene (its support type too, unless one with that id exists).
pub fn add_layout(scene: &mut Scene, spec: &LayoutSpec) {
    let p = &spec.id_prefix;
    let (nx, ny) = (spec.bays_x + 1, spec.bays_y + 1);
    let top = spec.base_level + spec.lifts as f64 * spec.lift_m;
    let post_id = |i: usize, j: usize| format!("{p}{}{}", column_name(i), j + 1);
    let x = |i: usize| spec.origin.0 + i as f64 * spec.bay_x_m;
    let y = |j: usize| spec.origin.1 + j as f64 * spec.bay_y_m;
    if !scene.support_types.iter().any(|s| s.id == spec.support.id) {
        scene.support_types.push(spec.support.clone());
    }
    scene.posts.reserve(nx * ny);
    for j in 0..ny {
        for i in 0..nx {
            scene.posts.push(Post {
                id: post_id(i, j),
                x: x(i),
                y: y(j),
                base_level: spec.base_level,
                top_level: top,
                support: Some(spec.support.id.clone()),
                self_weight_kn_per_m: spec.member_self_weight_kn_per_m,
                section: spec.section.clone(),
            });
        }
    }
    for lift in 1..=spec.lifts {
        let level = spec.base_level + lift as f64 * spec.lift_m;
        let deck = spec.deck_lifts.contains(&lift);
        let first_bearer = scene.bearers.len();
        for j in 0..ny {
            scene.bearers.push(Bearer {
                id: format!("{p}L{lift}-{}", j + 1),
                role: if deck { BeamRole::Bearer } else { BeamRole::Ledger },
                level,
                posts: (0..nx).map(|i| post_id(i, j)).collect(),
                overhang_start_m: 0.0,
                overhang_end_m: 0.0,
                self_weight_kn_per_m: spec.member_self_weight_kn_per_m,
                method: None,
                joints: None,
                section: spec.section.clone(),
            });
        }
        for i in 0..nx {
            scene.bearers.push(Bearer {
                id: format!("{p}T{lift}-{}", column_name(i)),
                role: BeamRole::Transom,
                level,
                posts: (0..ny).map(|j| post_id(i, j)).collect(),
                overhang_start_m: 0.0,
                overhang_end_m: 0.0,
                self_weight_kn_per_m: spec.member_self_weight_kn_per_m,
                method: None,
                joints: None,
                section: spec.section.clone(),
            });
        }
        if deck {
            let id = format!("{p}Deck-{lift}");
            scene.decks.push(Deck {
                id: id.clone(),
                level,
                extent: Rect { x: (x(0), x(nx - 1)), y: (y(0), y(ny - 1)) },
                bearers: scene.bearers[first_bearer..first_bearer + ny].iter().map(|b| b.id.clone()).collect(),
                self_weight_kpa: spec.deck_self_weight_kpa,
                method: None,
                joints: None,
                decking: spec.decking.clone(),
                diaphragm: false,
            });
            if let Some(class) = spec.load_class {
                scene.loads.push(Load::new(format!("{p}Q-{id}"), Case::Q, LoadKind::DeckArea { deck: id, intensity: Intensity::LoadClassUniform(class) }));
            }
        }
    }
    if spec.braced {
        // A diagonal in the first bay of every line and every `brace_every`-th bay after it,
        // every lift, both directions.
        let every = spec.brace_every.max(1);
        for lift in 0..spec.lifts {
            let (lo, hi) = (spec.base_level + lift as f64 * spec.lift_m, spec.base_level + (lift + 1) as f64 * spec.lift_m);
            let mut brace = |id: String, a: String, b: String| {
                scene.braces.push(Brace { id, from: PostNode { post: a, level: lo }, to: PostNode { post: b, level: hi } });
            };
            for j in 0..ny {
                for i in (0..nx - 1).step_by(every) {
                    brace(format!("{p}BX{}-{}-{}", lift + 1, j + 1, column_name(i)), post_id(i, j), post_id(i + 1, j));
                }
            }
            for i in 0..nx {
                for j in (0..ny - 1).step_by(every) {
                    brace(format!("{p}BY{}-{}-{}", lift + 1, column_name(i), j + 1), post_id(i, j), post_id(i, j + 1));
                }
            }
        }
    }
    if spec.plan_braced {
        for lift in 1..=spec.lifts {
            let level = spec.base_level + lift as f64 * spec.lift_m;
            for j in 0..ny - 1 {
                for i in 0..nx - 1 {
                    scene.braces.push(Brace {
                        id: format!("{p}PB{lift}-{}{}", column_name(i), j + 1),
                        from: PostNode { post: post_id(i, j), level },
                        to: PostNode { post: post_id(i + 1, j + 1), level },
                    });
                }
            }
        }
    }
}

/// A new scene holding only the generated layout.
pub fn generate(name: &str, allowable_bearing_kpa: f64, spec: &LayoutSpec) -> Scene {
    let mut scene = Scene::empty(name, allowable_bearing_kpa);
    add_layout(&mut scene, spec);
    scene
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn column_names_run_on_past_z() {
        // common practice, no source: spreadsheet-style column letters
        assert_eq!(column_name(0), "A");
        assert_eq!(column_name(25), "Z");
        assert_eq!(column_name(26), "AA");
        assert_eq!(column_name(27), "AB");
        assert_eq!(column_name(26 * 27), "AAA");
    }

    #[test]
    fn generated_counts() {
        // common practice, no source: (bx+1)(by+1) posts; per lift (by+1) ledgers + (bx+1) transoms;
        // braces every third bay: bays 0 and 3 of the 4 along x on each of 4 lines, bay 0 of the 3
        // along y on each of 5 lines
        let spec = LayoutSpec { bays_x: 4, bays_y: 3, lifts: 3, deck_lifts: vec![3], ..LayoutSpec::default() };
        let s = generate("t", 100.0, &spec);
        assert_eq!(s.posts.len(), 20);
        assert_eq!(s.bearers.len(), 3 * (4 + 5));
        assert_eq!(s.decks.len(), 1);
        assert_eq!(s.braces.len(), 3 * (4 * 2 + 5));
        if let Err(e) = crate::validate(&s) {
            panic!("{e}");
        }
    }
}
