//! Shared helpers: small hand-built scenes and the demo scenes on disk.

use std::path::PathBuf;

use plateload::scene::loads::{Case, Intensity, Load, LoadKind, PlanDirection};
use plateload::scene::model::{Bearer, BeamRole, Brace, Deck, PlateSize, Post, PostNode, Rect, Scene, SupportType};

/// Path of a file under the repository's `scenes/`.
pub fn scene_path(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenes").join(name)
}

/// Every demo scene file with its parsed scene.
pub fn demo_scenes() -> Vec<(String, Scene)> {
    let mut out: Vec<(String, Scene)> = std::fs::read_dir(scene_path(""))
        .expect("scenes/ exists")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "ron"))
        .map(|p| (p.file_name().unwrap().to_string_lossy().into_owned(), plateload::scene::io::read_scene(&p).unwrap_or_else(|e| panic!("{e}"))))
        .collect();
    out.sort_by(|a, b| a.0.cmp(&b.0));
    assert!(out.len() >= 3, "expected the three demo scenes");
    out
}

/// An empty scene with one weightless support type "S" (SWL 30 kN, 150 × 150 plate), and no
/// notional load generated: the vertical load paths are tested on their own.
pub fn bare_scene() -> Scene {
    let mut s = Scene::empty("test site", 100.0);
    s.horizontal.notional = plateload::scene::model::NotionalRule::Off;
    s.support_types.push(SupportType::new("S", PlateSize { width_m: 0.15, length_m: 0.15 }, 30.0, None));
    s
}

/// A weightless post.
pub fn post(id: &str, x: f64, y: f64, top: f64) -> Post {
    Post { id: id.into(), x, y, base_level: 0.0, top_level: top, support: Some("S".into()), self_weight_kn_per_m: 0.0, section: None }
}

/// A weightless bearer on the given posts.
pub fn bearer(id: &str, level: f64, posts: &[&str]) -> Bearer {
    Bearer {
        id: id.into(),
        role: BeamRole::Bearer,
        level,
        posts: posts.iter().map(|p| p.to_string()).collect(),
        overhang_start_m: 0.0,
        overhang_end_m: 0.0,
        self_weight_kn_per_m: 0.0,
        method: None,
        joints: None,
        section: None,
    }
}

/// A weightless deck.
pub fn deck(id: &str, level: f64, x: (f64, f64), y: (f64, f64), bearers: &[&str]) -> Deck {
    Deck { id: id.into(), level, extent: Rect { x, y }, bearers: bearers.iter().map(|b| b.to_string()).collect(), self_weight_kpa: 0.0, method: None, joints: None, decking: None, diaphragm: false }
}

/// A load.
pub fn load(id: &str, case: Case, kind: LoadKind) -> Load {
    Load::new(id, case, kind)
}

/// A brace between two posts from level 0 to `top`.
pub fn brace(id: &str, a: &str, b: &str, top: f64) -> Brace {
    Brace { id: id.into(), from: PostNode { post: a.into(), level: 0.0 }, to: PostNode { post: b.into(), level: top } }
}

/// Four weightless posts at (0|2, 0|4), two bearers along x at y = 0 and y = 4, level 2,
/// a weightless deck over x 0..2 spanning y between them.
pub fn one_bay_deck(y_extent: (f64, f64)) -> Scene {
    let mut s = bare_scene();
    s.posts = vec![post("A1", 0.0, 0.0, 2.0), post("B1", 2.0, 0.0, 2.0), post("A2", 0.0, 4.0, 2.0), post("B2", 2.0, 4.0, 2.0)];
    s.bearers = vec![bearer("B-south", 2.0, &["A1", "B1"]), bearer("B-north", 2.0, &["A2", "B2"])];
    s.decks = vec![deck("D", 2.0, (0.0, 2.0), y_extent, &["B-south", "B-north"])];
    s
}

/// Plate load of one case at a post, kN.
pub fn case_load(a: &plateload::Analysis, id: &str, case: Case) -> f64 {
    a.plates[a.plate_index(id).unwrap_or_else(|| panic!("no plate {id}"))].case_kn[case.index()]
}

/// Assert two numbers agree to `tol`, naming what they are.
#[track_caller]
pub fn close(what: &str, actual: f64, expected: f64, tol: f64) {
    assert!((actual - expected).abs() <= tol, "{what}: expected {expected}, got {actual}");
}

/// Intensity shorthand.
pub fn kpa(q: f64) -> Intensity {
    Intensity::Kpa(q)
}

/// Direction shorthand.
pub const PLUS_X: PlanDirection = PlanDirection::PlusX;
