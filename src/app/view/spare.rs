//! The spare-capacity overlay: the engine's map ([`plateload::check::spare`]) drawn on the decks
//! in the map's bands, the words for the point under the pointer, and one key (D) that puts the
//! footprint down there as a real imposed load.
//!
//! The map is worked out again after each solve while the overlay is on (never in a frame where
//! nothing changed); its influence coefficients are kept while only loads change, so an edit of
//! loads costs the cheap half only. Every value shown comes from the engine.

use bevy::camera::visibility::RenderLayers;
use bevy::prelude::*;
use bevy::window::PrimaryWindow;
use plateload::check::spare::{spare_influences, spare_map_from, SpareInfluences, SpareMap, SparePoint, SpareSettings};
use plateload::edit::place;
use plateload::edit::{Edit, Element, ElementRef};
use plateload::export::palette::SpareBand;
use plateload::scene::model::ElementKind;
use plateload::solve::influence::Footprint;
use plateload::Scene;

use super::flat::FlatMaterial;
use super::{to_bevy, ViewState, SCENE_LAYER};
use crate::app::doc::{SceneDoc, Status};
use crate::app::editor::UiFocus;
use crate::app::{Action, EditorSystems};

/// The overlay's state, its map and systems.
pub struct SparePlugin;

impl Plugin for SparePlugin {
    fn build(&self, app: &mut App) {
        app.init_resource::<SpareView>()
            .add_systems(Startup, init_material)
            .add_systems(Update, (refresh_map, draw_cells).chain().in_set(EditorSystems::Sync))
            .add_systems(Update, hide_sheets.after(EditorSystems::Recolour))
            .add_systems(Update, (hover, place_key).chain().in_set(EditorSystems::Input).after(super::PointerSystems))
            .add_systems(Last, ask_for_frame);
    }
}

/// The spare-capacity overlay: what the planner asked for and what the engine returned.
#[derive(Resource, Debug)]
pub struct SpareView {
    /// Show the overlay.
    pub on: bool,
    /// Footprint of the extra load (x, y), m; 0 × 0 is a point load.
    pub footprint_m: [f64; 2],
    /// Grid spacing, m.
    pub spacing_m: f64,
    /// Load to place with D, kN; `None`: the spare value at the point, rounded down.
    pub place_kn: Option<f64>,
    /// Factor on the placed load for landing it (1.0: none; see
    /// [`plateload::check::spare::HOISTED_FACTOR`]).
    pub dynamic_factor: f64,
    /// Combinations the map checks, by name; empty: every one that checks capacity or uplift.
    pub combinations: Vec<String>,
    /// The map of the current analysis, or why there is none (`None` until first worked out).
    pub map: Option<Result<SpareMap, String>>,
    /// Cells of each deck of the map: (x min, x max, y min, y max) per point, m.
    pub cells: Vec<Vec<[f64; 4]>>,
    /// The point under the pointer, if any.
    pub hover: Option<SpareHover>,
    /// Counts up each time the map is worked out.
    pub generation: u64,
    /// How long the last map took (coefficients included, where they were worked out).
    pub last_time: std::time::Duration,
    /// Whether the last map reused the coefficients of the one before.
    pub reused: bool,
    computed_for: Option<(u64, SpareSettings)>,
    influences: Option<(Scene, SpareInfluences)>,
    drawn_generation: Option<(u64, bool)>,
}

impl Default for SpareView {
    fn default() -> Self {
        let s = SpareSettings::default();
        SpareView {
            on: false,
            footprint_m: [s.footprint.x_m, s.footprint.y_m],
            spacing_m: s.spacing_m,
            place_kn: None,
            dynamic_factor: s.dynamic_factor,
            combinations: s.combinations,
            map: None,
            cells: Vec::new(),
            hover: None,
            generation: 0,
            last_time: default(),
            reused: false,
            computed_for: None,
            influences: None,
            drawn_generation: None,
        }
    }
}

impl SpareView {
    /// The engine's settings for the map asked for.
    pub fn settings(&self) -> SpareSettings {
        SpareSettings { spacing_m: self.spacing_m, footprint: self.footprint(), dynamic_factor: self.dynamic_factor, combinations: self.combinations.clone(), ..SpareSettings::default() }
    }
    /// What the planner asked for, to see whether a control changed it.
    pub fn asked(&self) -> (bool, SpareSettings, Option<f64>) {
        (self.on, self.settings(), self.place_kn)
    }
    /// The footprint turned a quarter: its sides swapped.
    pub fn turn_footprint(&mut self) {
        self.footprint_m.swap(0, 1);
    }
    /// The footprint asked for.
    pub fn footprint(&self) -> Footprint {
        Footprint { x_m: self.footprint_m[0], y_m: self.footprint_m[1] }
    }
    /// The map, when there is one.
    pub fn map(&self) -> Option<&SpareMap> {
        self.map.as_ref().and_then(|m| m.as_ref().ok())
    }
    /// The point under the pointer.
    pub fn hovered_point(&self) -> Option<&SparePoint> {
        let h = self.hover.as_ref()?;
        self.map()?.decks.get(h.deck)?.points.get(h.point)
    }
    /// What D would place at the hovered point, kN: the value asked for, else the spare value
    /// there rounded down; `None` where there is nothing to place.
    pub fn load_to_place(&self) -> Option<f64> {
        match self.place_kn {
            Some(kn) => (kn > 0.0).then_some(kn),
            None => {
                let p = self.hovered_point()?;
                let kn = plateload::export::spare::round_down_kn(p.kn?);
                (!p.already_at_limit && kn > 0.0).then_some(kn)
            }
        }
    }
}

/// The map point under the pointer.
#[derive(Debug, Clone, PartialEq)]
pub struct SpareHover {
    /// Index of the deck in the map.
    pub deck: usize,
    /// Index of the point in that deck's map.
    pub point: usize,
    /// The point in words, from the engine's export module.
    pub words: String,
}

/// Material of the cells: white, so the vertex colours show exactly.
#[derive(Resource)]
struct CellMaterial(Handle<FlatMaterial>);

/// Marks an entity of the overlay (one mesh per deck).
#[derive(Component)]
pub struct SpareCells;

fn init_material(mut commands: Commands, mut materials: ResMut<Assets<FlatMaterial>>) {
    commands.insert_resource(CellMaterial(materials.add(FlatMaterial::flat(Color::WHITE))));
}

/// Work the map out again after a solve, or when its settings changed, while the overlay is on.
fn refresh_map(doc: Res<SceneDoc>, mut spare: ResMut<SpareView>) {
    if !spare.on {
        return;
    }
    // Combinations chosen that the analysis no longer has (renamed, removed, no longer checking
    // capacity or uplift) are dropped: the choice falls back to every one rather than to none.
    if let Some(a) = doc.analysis() {
        let known = checking_combinations(a);
        if spare.combinations.iter().any(|c| !known.contains(c)) {
            spare.combinations.retain(|c| known.contains(c));
        }
    }
    let settings = spare.settings();
    let key = (doc.solved_revision, settings.clone());
    if spare.computed_for.as_ref() == Some(&key) {
        return;
    }
    let started = std::time::Instant::now();
    let spare = &mut *spare;
    let result = match doc.analysis() {
        None => Err("no results to map: the scene does not solve (see the results panel)".to_owned()),
        Some(a) => {
            // The coefficients depend on the structure, the footprint and the grid, not on the
            // loads: kept while only loads change.
            let mut structure = doc.scene.clone();
            structure.loads.clear();
            spare.reused = spare.influences.as_ref().is_some_and(|(s, inf)| *s == structure && inf.fits(a, &settings));
            if !spare.reused {
                spare.influences = spare_influences(&doc.scene, a, &settings).ok().map(|inf| (structure, inf));
            }
            match &spare.influences {
                Some((_, inf)) => spare_map_from(&doc.scene, a, &settings, inf).map_err(|e| e.to_string()),
                // The same checks again, for the reason.
                None => Err(spare_influences(&doc.scene, a, &settings).err().map_or_else(|| "the map could not be worked out".to_owned(), |e| e.to_string())),
            }
        }
    };
    spare.cells = result.as_ref().map(|m| m.decks.iter().map(|d| cell_rects(d, &doc.scene, settings.spacing_m)).collect()).unwrap_or_default();
    spare.map = Some(result);
    spare.computed_for = Some(key);
    spare.generation += 1;
    spare.hover = None;
    spare.last_time = started.elapsed();
}

/// Names of the analysis's combinations the map can check: those that check capacity or uplift.
pub fn checking_combinations(a: &plateload::Analysis) -> Vec<String> {
    a.combinations.iter().filter(|c| c.checks_capacity || c.checks_uplift).map(|c| c.name.clone()).collect()
}

/// The cell of each grid point: halfway to its neighbours, and half a spacing past the outer
/// points (not past the deck's edge).
fn cell_rects(d: &plateload::check::spare::DeckSpare, scene: &Scene, spacing: f64) -> Vec<[f64; 4]> {
    let extent = scene.decks.iter().find(|k| k.id == d.deck).map(|k| k.extent);
    let axis = |vals: Vec<f64>, (lo, hi): (f64, f64)| {
        let mut v = vals;
        v.sort_by(f64::total_cmp);
        v.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
        let bounds: Vec<(f64, f64, f64)> = (0..v.len())
            .map(|i| {
                let below = if i > 0 { 0.5 * (v[i] + v[i - 1]) } else { (v[i] - 0.5 * spacing).max(lo) };
                let above = if i + 1 < v.len() { 0.5 * (v[i] + v[i + 1]) } else { (v[i] + 0.5 * spacing).min(hi) };
                (v[i], below, above)
            })
            .collect();
        move |c: f64| bounds.iter().min_by(|a, b| (a.0 - c).abs().total_cmp(&(b.0 - c).abs())).map_or((c, c), |b| (b.1, b.2))
    };
    let (ex, ey) = extent.map_or(((f64::NEG_INFINITY, f64::INFINITY), (f64::NEG_INFINITY, f64::INFINITY)), |e| (e.x, e.y));
    let fx = axis(d.points.iter().map(|p| p.x).collect(), ex);
    let fy = axis(d.points.iter().map(|p| p.y).collect(), ey);
    d.points
        .iter()
        .map(|p| {
            let (x0, x1) = fx(p.x);
            let (y0, y1) = fy(p.y);
            [x0, x1, y0, y1]
        })
        .collect()
}

/// Height of the cells above the deck's top, m: over the deck's face, under anything standing
/// on it.
pub const LIFT_M: f64 = 0.004;

/// Colour of the hatch across cells where a limit is already reached (white, as in the
/// report): the second cue, so those cells never rest on colour alone.
pub const HATCH: [u8; 3] = [0xff, 0xff, 0xff];

/// One mesh per deck, rebuilt when the map changed or the overlay was turned on or off.
fn draw_cells(mut commands: Commands, spare: Res<SpareView>, doc: Res<SceneDoc>, material: Option<Res<CellMaterial>>, mut meshes: ResMut<Assets<Mesh>>, old: Query<(Entity, &Mesh3d), With<SpareCells>>) {
    let want = (spare.generation, spare.on);
    if spare.drawn_generation == Some(want) {
        return;
    }
    let Some(material) = material else { return };
    for (e, m) in &old {
        meshes.remove(&m.0);
        commands.entity(e).despawn();
    }
    if spare.on {
        if let Some(map) = spare.map() {
            for (d, cells) in map.decks.iter().zip(&spare.cells) {
                let level = doc.scene.decks.iter().find(|k| k.id == d.deck).map_or(d.level, |k| k.level);
                let mesh = cells_mesh(d, cells, level + LIFT_M);
                commands.spawn((SpareCells, Name::new(format!("spare capacity of deck {}", d.deck)), Mesh3d(meshes.add(mesh)), MeshMaterial3d(material.0.clone()), Transform::IDENTITY, Visibility::Inherited, RenderLayers::layer(SCENE_LAYER)));
            }
        }
    }
    // Bookkeeping of this system only: not a change of the overlay's state.
    commands.queue(move |world: &mut World| {
        if let Some(mut s) = world.get_resource_mut::<SpareView>() {
            s.bypass_change_detection().drawn_generation = Some(want);
        }
    });
}

/// The overlay changed (turned on, a new map, a new hovered point): one more frame shows it.
fn ask_for_frame(spare: Res<SpareView>, mut redraw: MessageWriter<bevy::window::RequestRedraw>) {
    if spare.is_changed() && !spare.is_added() {
        redraw.write(bevy::window::RequestRedraw);
    }
}

/// While the overlay is on, the see-through sheets over distributed loads are left out: drawn
/// over the cells they would change their colours. The load arrows stay.
fn hide_sheets(spare: Res<SpareView>, drawn: Res<super::draw::Drawn>, mut parts: Query<(&super::draw::DrawnPart, &mut Visibility)>) {
    if !spare.is_changed() && !drawn.is_changed() {
        return;
    }
    for (part, mut vis) in &mut parts {
        if let super::draw::DrawKey::Shape(_, plateload::edit::pick::Part::LoadSpread, _) = part.0 {
            let v = if spare.on { Visibility::Hidden } else { Visibility::Inherited };
            if *vis != v {
                *vis = v;
            }
        }
    }
}

/// Linear RGBA of an sRGB colour, as vertex colours want it.
pub fn linear([r, g, b]: [u8; 3]) -> [f32; 4] {
    Color::srgb_u8(r, g, b).to_linear().to_f32_array()
}

/// The cells of one deck as coloured quads at level `z`, a small gap between cells; cells where
/// a limit is already reached carry a diagonal hatch bar.
fn cells_mesh(d: &plateload::check::spare::DeckSpare, cells: &[[f64; 4]], z: f64) -> Mesh {
    let (mut pos, mut col) = (Vec::new(), Vec::new());
    let mut quad = |corners: [[f64; 2]; 4], z: f64, c: [f32; 4]| {
        let p = corners.map(|[x, y]| to_bevy([x, y, z]).to_array());
        for k in [0, 1, 2, 0, 2, 3] {
            pos.push(p[k]);
            col.push(c);
        }
    };
    for (p, &[x0, x1, y0, y1]) in d.points.iter().zip(cells) {
        let band = SpareBand::of(p.kn, p.already_at_limit);
        let gap = (0.04 * (x1 - x0).min(y1 - y0)).min(0.02);
        let (x0, x1, y0, y1) = (x0 + gap, x1 - gap, y0 + gap, y1 - gap);
        quad([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], z, linear(band.colour()));
        if band == SpareBand::AtLimit {
            // A thin bar from corner to corner.
            let (dx, dy) = (x1 - x0, y1 - y0);
            let len = dx.hypot(dy).max(1e-9);
            let w = 0.05 * dx.min(dy);
            let (nx, ny) = (-dy / len * w, dx / len * w);
            let (ax, ay, bx, by) = (x0 + 0.15 * dx, y0 + 0.15 * dy, x1 - 0.15 * dx, y1 - 0.15 * dy);
            quad([[ax - nx, ay - ny], [ax + nx, ay + ny], [bx + nx, by + ny], [bx - nx, by - ny]], z + 0.001, linear(HATCH));
        }
    }
    super::draw::flat_mesh(super::draw::fix_winding(pos), col)
}

/// The map point under the pointer: on the highest deck whose cells it is over.
#[allow(clippy::too_many_arguments)]
fn hover(windows: Query<&Window, With<PrimaryWindow>>, focus: Res<UiFocus>, view: Res<ViewState>, doc: Res<SceneDoc>, mut spare: ResMut<SpareView>, mut last: Local<Option<(Vec2, u64, [f64; 4])>>) {
    if !spare.on {
        if spare.hover.is_some() {
            spare.hover = None;
        }
        return;
    }
    let cursor = windows.single().ok().and_then(|w| w.cursor_position()).filter(|c| view.ready() && view.contains(*c) && focus.pointer_in_view);
    let Some(c) = cursor else {
        if spare.hover.is_some() {
            spare.hover = None;
        }
        *last = None;
        return;
    };
    let cam = &view.camera;
    let key = (c, spare.generation, [cam.yaw_deg, cam.pitch_deg, cam.distance, cam.target[0] + cam.target[1] * 1e3 + cam.target[2] * 1e6]);
    if *last == Some(key) {
        return;
    }
    *last = Some(key);
    let found = spare.map().and_then(|map| {
        let ray = view.ray_at(c);
        let mut order: Vec<usize> = (0..map.decks.len()).collect();
        let level = |i: usize| doc.scene.decks.iter().find(|k| k.id == map.decks[i].deck).map_or(map.decks[i].level, |k| k.level);
        order.sort_by(|&a, &b| level(b).total_cmp(&level(a)));
        order.into_iter().find_map(|i| {
            let [x, y] = plateload::edit::pick::ray_plane_z(&ray, level(i) + LIFT_M)?;
            let j = spare.cells.get(i)?.iter().position(|&[x0, x1, y0, y1]| x >= x0 && x <= x1 && y >= y0 && y <= y1)?;
            Some(SpareHover { deck: i, point: j, words: plateload::export::spare::point_words(&map.decks[i].points[j]) })
        })
    });
    if spare.hover != found {
        spare.hover = found;
    }
}

/// D puts the footprint down at the hovered point as a real imposed load (one undo step); the
/// map is then worked out again with it, since values do not add.
fn place_key(keys: Option<Res<ButtonInput<KeyCode>>>, focus: Res<UiFocus>, doc: Res<SceneDoc>, spare: Res<SpareView>, mut status: ResMut<Status>, mut actions: MessageWriter<Action>) {
    let Some(keys) = keys else { return };
    if !spare.on || focus.keyboard || !keys.just_pressed(KeyCode::KeyD) || keys.any_pressed([KeyCode::ControlLeft, KeyCode::ControlRight, KeyCode::SuperLeft, KeyCode::SuperRight]) {
        return;
    }
    if let Some(action) = place_action(&doc, &spare, &mut status) {
        actions.write(action);
    }
}

/// The edit that puts the footprint down at the hovered point, or why not (in the status line).
pub fn place_action(doc: &SceneDoc, spare: &SpareView, status: &mut Status) -> Option<Action> {
    let (Some(h), Some(map), Some(p)) = (spare.hover.as_ref(), spare.map(), spare.hovered_point()) else {
        status.info("point at a deck with the spare-capacity overlay on to place a load there");
        return None;
    };
    let Some(kn) = spare.load_to_place() else {
        status.error(if p.kn.is_none() { "no spare value here to place: enter the load to place" } else { "no spare capacity here: nothing placed" });
        return None;
    };
    let deck = &map.decks[h.deck].deck;
    match place::footprint_load(&doc.scene, deck, (p.x, p.y), spare.footprint(), kn) {
        Ok(load) => {
            let r = ElementRef::new(ElementKind::Load, &load.id);
            Some(Action::Edit { edit: Edit::Add(Element::Load(load)), merge: None, select: Some(vec![r]) })
        }
        Err(e) => {
            status.error(e.to_string());
            None
        }
    }
}
