//! The scene's entities: one per engine shape, kept in step with the scene without respawning,
//! and coloured by the results.
//!
//! Meshes are shared (one unit bar, cone, cube, and one cue mesh per plate size) and so are
//! materials (one per utilisation band, one per member kind and load case), so an edit only
//! changes the transforms and material handles of the entities it affects.

use std::collections::{HashMap, HashSet};

use bevy::asset::RenderAssetUsages;
use bevy::camera::visibility::RenderLayers;
use bevy::mesh::{Indices, PrimitiveTopology};
use bevy::prelude::*;
use plateload::edit::ElementRef;
use plateload::scene::model::{BeamRole, ElementKind};
use plateload::export::palette::{Band, Cue};
use plateload::edit::pick::{self, Part, Prim, Shape, ShapeOptions, CUE_BAND_M, CUE_EDGE_M, CUE_GAP_M, V3};
use plateload::{Analysis, Case, PlateResult, Status as PlateStatus};

use super::flat::FlatMaterial;
use super::{to_bevy, ViewState, ON_TOP_LAYER, SCENE_LAYER};
use crate::app::doc::{SceneDoc, Selection};
use crate::app::editor::ToolState;
use crate::app::EditorSystems;

/// Keeps the drawing in step with the document.
pub struct DrawPlugin;

impl Plugin for DrawPlugin {
    fn build(&self, app: &mut App) {
        app.init_resource::<SceneShapes>()
            .init_resource::<Drawn>()
            .add_systems(Startup, init_assets)
            .add_systems(Update, sync_entities.in_set(EditorSystems::Sync))
            .add_systems(Update, recolour.in_set(EditorSystems::Recolour));
    }
}

/// The metric grid and the highlights (needs bevy's gizmos, so not in headless tests).
pub struct GizmoDrawPlugin;

impl Plugin for GizmoDrawPlugin {
    fn build(&self, app: &mut App) {
        app.init_gizmo_group::<OnTopGizmos>()
            .add_systems(Startup, configure_gizmos)
            .add_systems(Update, (draw_grid, draw_bracing, draw_highlights).after(EditorSystems::Recolour));
    }
}

/// The engine's drawing of the current scene, as last drawn; picking uses the same.
#[derive(Resource, Default)]
pub struct SceneShapes {
    /// Every solid.
    pub shapes: Vec<Shape>,
    /// The base and sole plates among them: drawn over everything, so picked first.
    pub plates: Vec<Shape>,
    /// Box around them.
    pub bounds: Option<(V3, V3)>,
    /// Level of the ground plane, m.
    pub ground_z: f64,
    /// Sizes used.
    pub options: Option<ShapeOptions>,
}

/// What an entity draws.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub enum DrawKey {
    /// An engine shape of an element.
    Shape(ElementRef, Part, u32),
    /// The over-capacity frame around a post's plate.
    OverCue(String),
    /// The uplift ring around a post's plate.
    UpliftCue(String),
    /// The uplift arrow above a post's plate.
    UpliftArrow(String),
    /// The centre-of-gravity mark.
    CentreOfGravity,
}

/// Tags an entity with what it draws.
#[derive(Component, Debug, Clone)]
pub struct DrawnPart(pub DrawKey);

/// Entities of a post's plate, for recolouring.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct PlateEntities {
    /// Post tube.
    pub post: Option<Entity>,
    /// Base and sole plate.
    pub plates: Vec<Entity>,
    /// Over-capacity frame.
    pub over: Option<Entity>,
    /// Uplift ring and arrow.
    pub uplift: Vec<Entity>,
}

/// Every drawn entity by key, and the document revision drawn.
#[derive(Resource, Default)]
pub struct Drawn {
    /// Entity of each key.
    pub entities: HashMap<DrawKey, Entity>,
    /// Plate entities by post id.
    pub plates: HashMap<String, PlateEntities>,
    /// Keys and entities in the order the last sync visited them.
    order: Vec<(DrawKey, Entity)>,
    /// Revision of the scene drawn.
    pub revision: u64,
    /// Whether loads and decks were drawn (settings at the last sync).
    shown: (bool, bool),
    /// What the colours were last set from.
    coloured: Option<ColourKey>,
    /// How many entities the last sync spawned, updated and removed.
    pub last_sync: [usize; 3],
    /// How long the last sync and the last recolouring took.
    pub last_times: [std::time::Duration; 2],
}

#[derive(Debug, Clone, PartialEq)]
struct ColourKey {
    sync_revision: u64,
    solved_revision: u64,
    combination: Option<usize>,
    colour_posts: bool,
    selection: Vec<ElementRef>,
    picked: Vec<String>,
}

/// Shared meshes and materials.
#[derive(Resource)]
pub struct ViewAssets {
    bar: Handle<Mesh>,
    /// A bar without end caps, for braces: their ends lie inside the standards they join.
    open_bar: Handle<Mesh>,
    /// The same with four sides, for braces of scenes with more than [`COARSE_BRACES_FROM`].
    coarse_bar: Handle<Mesh>,
    cone: Handle<Mesh>,
    cube: Handle<Mesh>,
    cog: Handle<Mesh>,
    ground: Handle<Mesh>,
    /// Cue meshes per plate footprint (mm × mm): over frame, uplift ring.
    cues: HashMap<(i64, i64), (Handle<Mesh>, Handle<Mesh>)>,
    /// Exact band colours for plates.
    pub bands: [Handle<FlatMaterial>; 5],
    /// Shaded band colours for posts.
    bands_lit: [Handle<FlatMaterial>; 5],
    no_result: Handle<FlatMaterial>,
    steel: Handle<FlatMaterial>,
    ledger: Handle<FlatMaterial>,
    transom: Handle<FlatMaterial>,
    brace: Handle<FlatMaterial>,
    deck: Handle<FlatMaterial>,
    loads: [Handle<FlatMaterial>; 3],
    sheets: [Handle<FlatMaterial>; 3],
    selected: Handle<FlatMaterial>,
    cue: Handle<FlatMaterial>,
    ground_mat: Handle<FlatMaterial>,
}

/// Sides of the round bars (posts, members, arrow shafts).
const BAR_SIDES: u32 = 8;

/// From this many braces on, braces are drawn with four sides instead of eight: so many braces
/// belong to a site seen mostly from afar, where a brace is a pixel or two wide, and on a
/// software renderer four sides took a sixth off each frame of a 2,000-post birdcage (3,990
/// braces). Smaller scenes keep round braces.
pub const COARSE_BRACES_FROM: usize = 1000;

/// Colour of highlights (selection, picked elements): a saturated blue, apart from every
/// band of the utilisation ramp.
pub const HIGHLIGHT: Color = Color::srgb(0.0, 0.45, 1.0);

/// Colour of the ground: a dark slate. The bands run from nearly white to nearly black, so no
/// colour stands clear of all of them by lightness alone; a dark ground sets the light bands
/// (most plates, and the ones that vanished on a pale ground) off best, and differs from the
/// dark ones in hue. Over-capacity plates also carry their black and white frame.
pub const GROUND: [u8; 3] = [0x3d, 0x4a, 0x55];

/// Colour of a plate with no utilisation to show: no result, or a combination that does not
/// check capacity. A neutral grey, apart from every band of the utilisation ramp.
pub const NOT_CHECKED: [u8; 3] = [0x9a, 0x9a, 0x9a];

/// Load case colours of arrows: grey, indigo, green (none of them on the utilisation ramp).
pub const CASE_COLOURS: [[u8; 3]; 3] = [[0x5a, 0x5a, 0x5a], [0x33, 0x4a, 0xa8], [0x1f, 0x7a, 0x4a]];

fn srgb([r, g, b]: [u8; 3]) -> Color {
    Color::srgb_u8(r, g, b)
}

fn unlit(materials: &mut Assets<FlatMaterial>, c: Color) -> Handle<FlatMaterial> {
    materials.add(FlatMaterial::flat(c))
}

fn lit(materials: &mut Assets<FlatMaterial>, c: Color) -> Handle<FlatMaterial> {
    materials.add(FlatMaterial::shaded(c))
}

fn init_assets(mut commands: Commands, mut meshes: ResMut<Assets<Mesh>>, mut materials: ResMut<Assets<FlatMaterial>>) {
    let m = &mut *materials;
    let translucent = |m: &mut Assets<FlatMaterial>, c: Color| m.add(FlatMaterial::translucent(c));
    let assets = ViewAssets {
        // Eight sides: a tube is a few pixels wide on screen, and a software renderer spends
        // its time per triangle (bevy's default of 32 sides made 2,000 posts cost several times
        // as much to draw).
        bar: meshes.add(Cylinder::new(1.0, 1.0).mesh().resolution(BAR_SIDES)),
        // A generated birdcage has two braces to a standard: the caps were 12 of each brace's
        // 28 triangles, never seen.
        open_bar: meshes.add(Cylinder::new(1.0, 1.0).mesh().resolution(BAR_SIDES).without_caps()),
        coarse_bar: meshes.add(Cylinder::new(1.0, 1.0).mesh().resolution(4).without_caps()),
        // Arrow tips and uplift cones are small on screen; every plate of a large birdcage
        // that lifts carries one.
        cone: meshes.add(Cone { radius: 1.0, height: 1.0 }.mesh().resolution(BAR_SIDES)),
        cube: meshes.add(Cuboid::new(1.0, 1.0, 1.0)),
        cog: meshes.add(cog_mesh()),
        ground: meshes.add(Plane3d::default().mesh().size(1.0, 1.0)),
        cues: HashMap::new(),
        bands: Band::ALL.map(|b| unlit(m, srgb(b.colour()))),
        bands_lit: Band::ALL.map(|b| lit(m, srgb(b.colour()))),
        no_result: unlit(m, srgb(NOT_CHECKED)),
        steel: lit(m, Color::srgb_u8(0x8c, 0x93, 0x9b)),
        ledger: lit(m, Color::srgb_u8(0x74, 0x7c, 0x86)),
        transom: lit(m, Color::srgb_u8(0x9e, 0x8f, 0x7a)),
        brace: lit(m, Color::srgb_u8(0x6f, 0x8a, 0x6f)),
        deck: translucent(m, Color::srgba_u8(0xb8, 0x9a, 0x6a, 0x30)),
        loads: CASE_COLOURS.map(|c| lit(m, srgb(c))),
        sheets: CASE_COLOURS.map(|[r, g, b]| translucent(m, Color::srgba_u8(r, g, b, 0x14))),
        selected: unlit(m, HIGHLIGHT),
        // White; the cues' shader draws their black edges (a fraction `edge` of the band), and
        // the centre-of-gravity mark carries its own black and white vertex colours.
        cue: m.add(FlatMaterial { params: super::flat::FlatParams { edge: (CUE_EDGE_M / CUE_BAND_M) as f32, ..FlatMaterial::flat(Color::WHITE).params }, ..FlatMaterial::flat(Color::WHITE) }),
        // Flat, so the ground keeps one known colour: never white, which is the colour of the
        // cues, and apart from every band (see the tests below).
        ground_mat: unlit(m, srgb(GROUND)),
    };
    // The ground: a large plane under everything, scaled to the scene when it is drawn.
    commands.spawn((Mesh3d(assets.ground.clone()), MeshMaterial3d(assets.ground_mat.clone()), Transform::from_scale(Vec3::ZERO), GroundPlane, RenderLayers::layer(SCENE_LAYER)));
    commands.insert_resource(assets);
}

/// Marks the ground plane.
#[derive(Component)]
pub struct GroundPlane;

/// Gizmos drawn on top (highlights, picked elements).
#[derive(Default, Reflect, GizmoConfigGroup)]
pub struct OnTopGizmos;

fn configure_gizmos(mut store: ResMut<GizmoConfigStore>) {
    let (cfg, _) = store.config_mut::<OnTopGizmos>();
    cfg.render_layers = RenderLayers::layer(ON_TOP_LAYER);
    cfg.line.width = 2.0;
    cfg.depth_bias = -1.0;
    let (cfg, _) = store.config_mut::<DefaultGizmoConfigGroup>();
    cfg.render_layers = RenderLayers::layer(SCENE_LAYER);
    cfg.line.width = 1.0;
}

/// Flat disc in quarters, black and white: the usual centre-of-gravity mark. Radius 1.
fn cog_mesh() -> Mesh {
    let mut pos = Vec::new();
    let mut col = Vec::new();
    let seg = 12;
    for q in 0..4 {
        let c = if q % 2 == 0 { [0.0, 0.0, 0.0, 1.0] } else { [1.0, 1.0, 1.0, 1.0] };
        for i in 0..seg {
            let a0 = (q * seg + i) as f32 / (4 * seg) as f32 * std::f32::consts::TAU;
            let a1 = (q * seg + i + 1) as f32 / (4 * seg) as f32 * std::f32::consts::TAU;
            pos.extend([[0.0, 0.0, 0.0], [a1.cos(), 0.0, a1.sin()], [a0.cos(), 0.0, a0.sin()]]);
            col.extend([c; 3]);
        }
    }
    flat_mesh(pos, col)
}

/// A horizontal triangle list facing up, with vertex colours.
pub(super) fn flat_mesh(pos: Vec<[f32; 3]>, col: Vec<[f32; 4]>) -> Mesh {
    let n = pos.len();
    Mesh::new(PrimitiveTopology::TriangleList, RenderAssetUsages::default())
        .with_inserted_attribute(Mesh::ATTRIBUTE_POSITION, pos)
        .with_inserted_attribute(Mesh::ATTRIBUTE_NORMAL, vec![[0.0f32, 1.0, 0.0]; n])
        .with_inserted_attribute(Mesh::ATTRIBUTE_COLOR, col)
        .with_inserted_indices(Indices::U32((0..n as u32).collect()))
}


/// Over-capacity frame (square, black–white–black) and uplift ring (round, the same bands)
/// around a plate footprint of half sizes `hx` × `hy` (bevy x, z), in metres. Each is one flat
/// square of two triangles that the view's shader cuts to its band (see
/// [`super::flat::cue_band`]): with every plate of a large birdcage lifting and most over
/// capacity, rings and frames of small triangles took half of each frame on a software renderer.
fn cue_meshes(hx: f64, hy: f64) -> (Mesh, Mesh) {
    let band = CUE_BAND_M as f32;
    let (ix, iy) = ((hx + CUE_GAP_M) as f32, (hy + CUE_GAP_M) as f32);
    let frame = super::flat::cue_band(ix + band, iy + band, band, [ix, iy]);
    let r0 = pick::uplift_ring_radius(hx, hy) as f32;
    let ring = super::flat::cue_band(r0 + band, r0 + band, band, [r0, -1.0]);
    (cue_mesh(frame), cue_mesh(ring))
}

/// A cue's quad as a mesh (positions, offsets and inner edge from [`super::flat::cue_band`]).
fn cue_mesh((pos, uv, inner): super::flat::CueQuad) -> Mesh {
    let n = pos.len();
    Mesh::new(PrimitiveTopology::TriangleList, RenderAssetUsages::default())
        .with_inserted_attribute(Mesh::ATTRIBUTE_POSITION, pos)
        .with_inserted_attribute(Mesh::ATTRIBUTE_NORMAL, vec![[0.0f32, 1.0, 0.0]; n])
        .with_inserted_attribute(Mesh::ATTRIBUTE_UV_0, uv)
        .with_inserted_attribute(Mesh::ATTRIBUTE_UV_1, inner)
        .with_inserted_indices(Indices::U32((0..n as u32).collect()))
}

/// Make every triangle face up (+y), whatever order its corners were listed in.
pub(super) fn fix_winding(mut pos: Vec<[f32; 3]>) -> Vec<[f32; 3]> {
    for t in pos.chunks_mut(3) {
        let (a, b, c) = (Vec3::from(t[0]), Vec3::from(t[1]), Vec3::from(t[2]));
        if (b - a).cross(c - a).y < 0.0 {
            t.swap(1, 2);
        }
    }
    pos
}

/// Transform of a unit mesh (bar or cone along +y, centred; cube 1 m) for a solid.
fn prim_transform(prim: &Prim) -> Option<Transform> {
    match *prim {
        Prim::Bar { a, b, radius } | Prim::Cone { base: a, tip: b, radius } => {
            let (a, b) = (to_bevy(a), to_bevy(b));
            let d = b - a;
            let len = d.length();
            if !(len > 1e-6 && len.is_finite()) {
                return None;
            }
            let rot = Quat::from_rotation_arc(Vec3::Y, d / len);
            Some(Transform { translation: (a + b) / 2.0, rotation: rot, scale: Vec3::new(radius as f32, len, radius as f32) })
        }
        Prim::Cuboid { min, max } => {
            let (a, b) = (to_bevy(min), to_bevy(max));
            let size = (b - a).abs();
            (size.is_finite()).then(|| Transform { translation: (a + b) / 2.0, rotation: Quat::IDENTITY, scale: size.max(Vec3::splat(1e-4)) })
        }
    }
}

/// Whether a shape is drawn on top of everything.
fn on_top(part: Part) -> bool {
    matches!(part, Part::BasePlate | Part::SolePlate)
}

/// What an entity should draw, borrowed from the scene: compared with the last frame's keys
/// without building a key, so an edit costs no allocation per unchanged entity.
#[derive(Clone, Copy)]
enum Want<'a> {
    Shape(&'a ElementRef, Part, u32),
    Over(&'a str),
    Uplift(&'a str),
    Arrow(&'a str),
    Cog,
}

impl Want<'_> {
    fn matches(&self, k: &DrawKey) -> bool {
        match (self, k) {
            (Want::Shape(e, p, i), DrawKey::Shape(ke, kp, ki)) => p == kp && i == ki && *e == ke,
            (Want::Over(id), DrawKey::OverCue(k)) | (Want::Uplift(id), DrawKey::UpliftCue(k)) | (Want::Arrow(id), DrawKey::UpliftArrow(k)) => *id == k,
            (Want::Cog, DrawKey::CentreOfGravity) => true,
            _ => false,
        }
    }
    fn key(&self) -> DrawKey {
        match *self {
            Want::Shape(e, p, i) => DrawKey::Shape(e.clone(), p, i),
            Want::Over(id) => DrawKey::OverCue(id.to_owned()),
            Want::Uplift(id) => DrawKey::UpliftCue(id.to_owned()),
            Want::Arrow(id) => DrawKey::UpliftArrow(id.to_owned()),
            Want::Cog => DrawKey::CentreOfGravity,
        }
    }
}

/// Matching this frame's wanted entities against last frame's, in order.
struct Reconcile {
    old: Vec<Option<(DrawKey, Entity)>>,
    cursor: usize,
    order: Vec<(DrawKey, Entity)>,
    reused: bevy::ecs::entity::EntityHashSet,
    spawned: usize,
    updated: usize,
}

/// How far ahead of the expected position a wanted entity is looked for before the hash map:
/// enough to step over a few deleted elements.
const LOOKAHEAD: usize = 8;

impl Reconcile {
    /// The entity for `want`: last frame's (moved if needed) or a new one.
    #[allow(clippy::too_many_arguments)]
    fn place(
        &mut self,
        want: Want,
        mesh: &Handle<Mesh>,
        t: Transform,
        layer: usize,
        hidden: bool,
        map: &mut HashMap<DrawKey, Entity>,
        commands: &mut Commands,
        transforms: &mut Query<(&mut Transform, &mut Mesh3d), (With<DrawnPart>, Without<GroundPlane>)>,
        material: &Handle<FlatMaterial>,
    ) -> Entity {
        let hit = (0..=LOOKAHEAD).map(|d| self.cursor + d).find(|&i| matches!(self.old.get(i), Some(Some((k, _))) if want.matches(k)));
        let found = match hit {
            Some(i) => {
                self.cursor = i + 1;
                self.old[i].take()
            }
            None => {
                let key = want.key();
                map.get(&key).copied().map(|e| (key, e))
            }
        };
        if let Some((key, e)) = found {
            if let Ok((mut tr, mut m)) = transforms.get_mut(e) {
                if *tr != t {
                    *tr = t;
                    self.updated += 1;
                }
                if m.0 != *mesh {
                    m.0 = mesh.clone();
                }
            }
            self.reused.insert(e);
            self.order.push((key, e));
            return e;
        }
        let key = want.key();
        self.spawned += 1;
        let vis = if hidden { Visibility::Hidden } else { Visibility::Inherited };
        let e = commands.spawn((DrawnPart(key.clone()), Mesh3d(mesh.clone()), MeshMaterial3d(material.clone()), t, vis, RenderLayers::layer(layer))).id();
        map.insert(key.clone(), e);
        self.reused.insert(e);
        self.order.push((key, e));
        e
    }
}

/// Make the entities follow the scene: update what moved, spawn what is new, despawn what went.
#[allow(clippy::too_many_arguments)]
fn sync_entities(
    mut commands: Commands,
    doc: Res<SceneDoc>,
    view: Res<ViewState>,
    mut shapes: ResMut<SceneShapes>,
    mut drawn: ResMut<Drawn>,
    mut assets: ResMut<ViewAssets>,
    mut meshes: ResMut<Assets<Mesh>>,
    mut transforms: Query<(&mut Transform, &mut Mesh3d), (With<DrawnPart>, Without<GroundPlane>)>,
    mut ground: Query<&mut Transform, With<GroundPlane>>,
) {
    let shown = (view.settings.show_loads, view.settings.show_decks);
    if drawn.revision == doc.revision && drawn.shown == shown && drawn.revision != 0 {
        return;
    }
    let started = std::time::Instant::now();
    let analysis = doc.analysis();
    let mut opts = ShapeOptions::for_scene(&doc.scene, analysis);
    opts.loads = view.settings.show_loads;
    let mut list = pick::shapes(&doc.scene, &opts, analysis);
    if !view.settings.show_decks {
        list.retain(|s| s.part != Part::Deck);
    }
    let (lo, hi) = pick::structure_bounds(&doc.scene);
    let ground_z = doc.scene.posts.iter().map(|p| p.base_level).fold(f64::INFINITY, f64::min);
    let ground_z = if ground_z.is_finite() { ground_z - opts.sole_plate_thickness_m - 0.002 } else { 0.0 };
    let drawn = &mut *drawn;
    let material = assets.no_result.clone();
    let old = std::mem::take(&mut drawn.order);
    let mut rc = Reconcile { old: old.into_iter().map(Some).collect(), cursor: 0, order: Vec::with_capacity(drawn.entities.len()), reused: default(), spawned: 0, updated: 0 };
    let post_index: HashMap<&str, usize> = doc.scene.posts.iter().enumerate().map(|(i, p)| (p.id.as_str(), i)).collect();
    let mut plate_vec: Vec<PlateEntities> = vec![PlateEntities::default(); doc.scene.posts.len()];
    let map = &mut drawn.entities;
    let brace_mesh = if list.iter().filter(|s| s.part == Part::Brace).count() >= COARSE_BRACES_FROM { &assets.coarse_bar } else { &assets.open_bar };
    for s in &list {
        let Some(t) = prim_transform(&s.prim) else { continue };
        let mesh = match s.prim {
            Prim::Bar { .. } if s.part == Part::Brace => brace_mesh,
            Prim::Bar { .. } => &assets.bar,
            Prim::Cone { .. } => &assets.cone,
            Prim::Cuboid { .. } => &assets.cube,
        };
        let layer = if on_top(s.part) { ON_TOP_LAYER } else { SCENE_LAYER };
        let e = rc.place(Want::Shape(&s.element, s.part, s.index), mesh, t, layer, false, map, &mut commands, &mut transforms, &material);
        if s.element.kind == ElementKind::Post {
            if let Some(&i) = post_index.get(s.element.id.as_str()) {
                match s.part {
                    Part::Post => plate_vec[i].post = Some(e),
                    Part::BasePlate | Part::SolePlate => plate_vec[i].plates.push(e),
                    _ => {}
                }
            }
        }
    }
    // Cues around each plate footprint (the larger of base and sole plate), hidden until a
    // result calls for them.
    let supports: HashMap<&str, &plateload::scene::model::SupportType> = doc.scene.support_types.iter().map(|s| (s.id.as_str(), s)).collect();
    let mut cue_reach = 0.0f64;
    for (i, p) in doc.scene.posts.iter().enumerate() {
        let Some(s) = p.support.as_deref().and_then(|s| supports.get(s)) else { continue };
        let b = s.bearing_plate();
        let (hx, hy) = ((b.width_m.max(s.base_plate.width_m)) / 2.0, (b.length_m.max(s.base_plate.length_m)) / 2.0);
        if !(hx.is_finite() && hy.is_finite() && hx > 0.0 && hy > 0.0) {
            continue;
        }
        cue_reach = cue_reach.max(pick::uplift_ring_radius(hx, hy) + CUE_BAND_M - hx.min(hy));
        let key = ((hx * 2000.0).round() as i64, (hy * 2000.0).round() as i64);
        let (frame, ring) = assets.cues.entry(key).or_insert_with(|| {
            let (f, r) = cue_meshes(hx, hy);
            (meshes.add(f), meshes.add(r))
        });
        let (frame, ring) = (frame.clone(), ring.clone());
        let at = to_bevy([p.x, p.y, p.base_level + opts.base_plate_thickness_m + 0.001]);
        let t = Transform::from_translation(at);
        let over = rc.place(Want::Over(&p.id), &frame, t, ON_TOP_LAYER, true, map, &mut commands, &mut transforms, &material);
        let ring_e = rc.place(Want::Uplift(&p.id), &ring, t, ON_TOP_LAYER, true, map, &mut commands, &mut transforms, &material);
        // An upward cone standing above the plate: uplift reads in elevation too.
        let h = (0.5 * hx.hypot(hy) + 0.15).min(0.6);
        let cone = Prim::Cone { base: [p.x, p.y, p.base_level + 0.35], tip: [p.x, p.y, p.base_level + 0.35 + h], radius: 0.35 * h };
        // In the scene layer: seen from above it stays under the plate, so never hides its colour.
        let arrow_e = prim_transform(&cone).map(|t| rc.place(Want::Arrow(&p.id), &assets.cone, t, SCENE_LAYER, true, map, &mut commands, &mut transforms, &material));
        plate_vec[i].over = Some(over);
        plate_vec[i].uplift = std::iter::once(ring_e).chain(arrow_e).collect();
    }
    if let Some((x, y)) = analysis.and_then(|a| a.stability.centre_of_gravity) {
        let r = (0.02 * (hi[0] - lo[0]).max(hi[1] - lo[1])).clamp(0.12, 1.5) as f32;
        let t = Transform::from_translation(to_bevy([x, y, ground_z + 0.004])).with_scale(Vec3::new(r, 1.0, r));
        rc.place(Want::Cog, &assets.cog, t, ON_TOP_LAYER, false, map, &mut commands, &mut transforms, &material);
    }
    // Whatever last frame had and this one does not want goes.
    let mut removed = 0;
    for (k, e) in rc.old.into_iter().flatten() {
        if !rc.reused.contains(&e) {
            map.remove(&k);
            commands.entity(e).despawn();
            removed += 1;
        }
    }
    if let Ok(mut g) = ground.single_mut() {
        let pad = 4.0 + 0.3 * (hi[0] - lo[0]).max(hi[1] - lo[1]);
        let (cx, cy) = ((lo[0] + hi[0]) / 2.0, (lo[1] + hi[1]) / 2.0);
        let t = Transform::from_translation(to_bevy([cx, cy, ground_z - 0.002])).with_scale(Vec3::new((hi[0] - lo[0] + 2.0 * pad) as f32, 1.0, (hi[1] - lo[1] + 2.0 * pad) as f32));
        if *g != t {
            *g = t;
        }
    }
    // The by-id table of plate entities only changes when entities came or went, and even
    // then mostly not: a load put on or taken off spawns or removes its own entities only.
    // Looking each post up costs less than building the table again (an id string per post).
    let unchanged = |plates: &HashMap<String, PlateEntities>| plates.len() == doc.scene.posts.len() && doc.scene.posts.iter().zip(&plate_vec).all(|(p, pe)| plates.get(p.id.as_str()) == Some(pe));
    if (rc.spawned + removed > 0 || drawn.plates.len() != doc.scene.posts.len()) && !unchanged(&drawn.plates) {
        drawn.plates = doc.scene.posts.iter().zip(plate_vec).map(|(p, pe)| (p.id.clone(), pe)).collect();
    }
    drawn.order = rc.order;
    drawn.revision = doc.revision;
    drawn.shown = shown;
    drawn.last_sync = [rc.spawned, rc.updated, removed];
    drawn.last_times[0] = started.elapsed();
    // Frame the cues too: the ring around a lifting plate reaches past its corners.
    let reach = cue_reach.max(0.0);
    shapes.bounds = pick::shapes_bounds(&list).map(|(lo, hi)| ([lo[0] - reach, lo[1] - reach, lo[2]], [hi[0] + reach, hi[1] + reach, hi[2]]));
    shapes.plates = list.iter().filter(|s| on_top(s.part)).cloned().collect();
    shapes.shapes = list;
    shapes.ground_z = ground_z;
    shapes.options = Some(opts);
}

/// What a plate shows for the chosen combination.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reading {
    /// The combination read: the chosen one, else the plate's governing one.
    pub combination: usize,
    /// Utilisation, where that combination checks capacity. `None` where it does not: its
    /// factored load over a working-load capacity is not a utilisation, so only kN are shown.
    pub utilisation: Option<f64>,
    /// Findings: of the chosen combination, else over every combination.
    pub status: PlateStatus,
    /// Largest and smallest combined load in that combination, kN.
    pub max_kn: f64,
    /// Smallest combined load, kN (negative: uplift).
    pub min_kn: f64,
}

impl Reading {
    /// Band of the utilisation, where there is one.
    pub fn band(&self) -> Option<Band> {
        self.utilisation.map(Band::of)
    }
    /// Utilisation for sorting: not checked counts as below any value.
    pub fn sort_key(&self) -> f64 {
        self.utilisation.unwrap_or(f64::NEG_INFINITY)
    }
}

/// What a plate shows in the chosen combination (`None`: its governing one).
pub fn reading(a: &Analysis, plate: &PlateResult, combination: Option<usize>) -> Reading {
    let chosen = combination.filter(|&c| c < plate.combinations.len());
    let c = chosen.unwrap_or(plate.governing).min(plate.combinations.len().saturating_sub(1));
    let Some(pc) = plate.combinations.get(c) else {
        return Reading { combination: c, utilisation: None, status: plate.status, max_kn: f64::NAN, min_kn: f64::NAN };
    };
    let checks = a.combinations.get(c).is_some_and(|k| k.checks_capacity);
    Reading {
        combination: c,
        utilisation: checks.then_some(pc.utilisation),
        status: if chosen.is_some() { pc.status } else { plate.status },
        max_kn: pc.max_kn,
        min_kn: pc.min_kn,
    }
}

/// Set every entity's material from the results, the selection and the settings.
#[allow(clippy::too_many_arguments)]
fn recolour(
    doc: Res<SceneDoc>,
    view: Res<ViewState>,
    selection: Res<Selection>,
    tools: Res<ToolState>,
    mut drawn: ResMut<Drawn>,
    assets: Res<ViewAssets>,
    mut parts: Query<(&DrawnPart, &mut MeshMaterial3d<FlatMaterial>, &mut Visibility)>,
    without: Option<Res<super::Without>>,
) {
    let no_cues = without.is_some_and(|w| w.has(super::ViewPart::Cues));
    let key = ColourKey {
        sync_revision: drawn.revision,
        solved_revision: doc.solved_revision,
        combination: view.settings.combination,
        colour_posts: view.settings.colour_posts,
        selection: selection.items.clone(),
        picked: tools.picked.clone(),
    };
    if drawn.coloured.as_ref() == Some(&key) {
        return;
    }
    let started = std::time::Instant::now();
    let analysis = doc.analysis();
    let readings: HashMap<&str, Reading> = analysis.map(|a| a.plates.iter().map(|p| (p.id.as_str(), reading(a, p, key.combination))).collect()).unwrap_or_default();
    let selected: HashSet<&ElementRef> = selection.items.iter().collect();
    let picked: HashSet<&str> = tools.picked.iter().map(String::as_str).collect();
    for (part, mut mat, mut vis) in &mut parts {
        let (want, show) = match &part.0 {
            DrawKey::Shape(e, p, _) => {
                let sel = selected.contains(e) || picked.contains(e.id.as_str());
                let band = readings.get(e.id.as_str()).and_then(|r| r.band()).map(|b| b as usize);
                let m = match p {
                    // A selected plate keeps its colour; it is outlined instead.
                    Part::BasePlate | Part::SolePlate => match band {
                        Some(b) => &assets.bands[b],
                        None => &assets.no_result,
                    },
                    _ if sel => &assets.selected,
                    Part::Post => match band {
                        Some(b) if key.colour_posts => &assets.bands_lit[b],
                        _ => &assets.steel,
                    },
                    Part::Bearer(BeamRole::Bearer) => &assets.steel,
                    Part::Bearer(BeamRole::Ledger) => &assets.ledger,
                    Part::Bearer(BeamRole::Transom) => &assets.transom,
                    Part::Brace => &assets.brace,
                    Part::Deck | Part::ExistingStructure => &assets.deck,
                    Part::LoadArrow | Part::LoadSpread => {
                        let case = match e.kind {
                            ElementKind::Load => doc.scene.loads.iter().find(|l| l.id == e.id).map_or(Case::G, |l| l.case),
                            _ => Case::G,
                        };
                        if *p == Part::LoadArrow { &assets.loads[case.index()] } else { &assets.sheets[case.index()] }
                    }
                };
                (m, true)
            }
            DrawKey::OverCue(id) => (&assets.cue, readings.get(id.as_str()).is_some_and(|r| matches!(Cue::of(r.status), Cue::Over | Cue::OverAndUplift))),
            DrawKey::UpliftCue(id) | DrawKey::UpliftArrow(id) => {
                let m = if matches!(part.0, DrawKey::UpliftArrow(_)) { &assets.loads[0] } else { &assets.cue };
                (m, readings.get(id.as_str()).is_some_and(|r| matches!(Cue::of(r.status), Cue::Uplift | Cue::OverAndUplift)))
            }
            DrawKey::CentreOfGravity => (&assets.cue, true),
        };
        if mat.0 != *want {
            mat.0 = want.clone();
        }
        let cue = matches!(part.0, DrawKey::OverCue(_) | DrawKey::UpliftCue(_) | DrawKey::UpliftArrow(_));
        let v = if show && !(cue && no_cues) { Visibility::Inherited } else { Visibility::Hidden };
        if *vis != v {
            *vis = v;
        }
    }
    drawn.coloured = Some(key);
    drawn.last_times[1] = started.elapsed();
}

/// Metric grid on the ground: 1 m lines, every 5 m darker.
fn draw_grid(mut gizmos: Gizmos, shapes: Res<SceneShapes>) {
    let Some((lo, hi)) = shapes.bounds else { return };
    let pad = 2.0;
    let (x0, x1) = ((lo[0] - pad).floor(), (hi[0] + pad).ceil());
    let (y0, y1) = ((lo[1] - pad).floor(), (hi[1] + pad).ceil());
    let z = shapes.ground_z;
    // At most a few hundred lines: coarser steps on large sites.
    let span = (x1 - x0).max(y1 - y0);
    let step = if span > 400.0 { 10.0 } else if span > 120.0 { 5.0 } else { 1.0 };
    // Light lines on the dark ground.
    let minor = Color::srgba(1.0, 1.0, 1.0, 0.16);
    let major = Color::srgba(1.0, 1.0, 1.0, 0.4);
    let mut x = (x0 / step).floor() * step;
    while x <= x1 {
        let c = if (x / (5.0 * step)).round() * 5.0 * step == x { major } else { minor };
        gizmos.line(to_bevy([x, y0, z]), to_bevy([x, y1, z]), c);
        x += step;
    }
    let mut y = (y0 / step).floor() * step;
    while y <= y1 {
        let c = if (y / (5.0 * step)).round() * 5.0 * step == y { major } else { minor };
        gizmos.line(to_bevy([x0, y, z]), to_bevy([x1, y, z]), c);
        y += step;
    }
}

/// Braced planes (green, from the ground to the top of their bracing; bracing above a lift with
/// no brace in red), and diaphragms (blue, at their level).
fn draw_bracing(mut gizmos: Gizmos, doc: Res<SceneDoc>) {
    let Ok(a) = &doc.result else { return };
    for (from, to, kind) in pick::bracing_lines(&doc.scene, &a.bracing) {
        let c = match kind {
            pick::BracingLine::Plane => Color::srgba(0.10, 0.55, 0.20, 0.9),
            pick::BracingLine::NotCounted => Color::srgba(0.80, 0.15, 0.10, 0.9),
            pick::BracingLine::Diaphragm => Color::srgba(0.10, 0.35, 0.85, 0.9),
        };
        gizmos.line(to_bevy(from), to_bevy(to), c);
    }
}

/// Outline the hovered element, and the selected ones.
fn draw_highlights(mut gizmos: Gizmos<OnTopGizmos>, shapes: Res<SceneShapes>, selection: Res<Selection>) {
    // Boxes are outlined by a rectangle on their top face, a little outside it, so a plate's
    // colour stays visible inside its highlight.
    let mut outline = |s: &Shape, c: Color, pad: f64| match s.prim {
        Prim::Cuboid { min, max } => {
            let z = max[2];
            let corners = [[min[0] - pad, min[1] - pad], [max[0] + pad, min[1] - pad], [max[0] + pad, max[1] + pad], [min[0] - pad, max[1] + pad]];
            for k in 0..4 {
                let (a, b) = (corners[k], corners[(k + 1) % 4]);
                gizmos.line(to_bevy([a[0], a[1], z]), to_bevy([b[0], b[1], z]), c);
            }
        }
        Prim::Bar { a, b, .. } | Prim::Cone { base: a, tip: b, .. } => {
            gizmos.line(to_bevy(a), to_bevy(b), c);
        }
    };
    if let Some(h) = &selection.hovered {
        for s in shapes.shapes.iter().filter(|s| &s.element == h) {
            outline(s, Color::srgb(1.0, 0.55, 0.0), 0.02);
        }
    }
    if !selection.items.is_empty() {
        let sel: HashSet<&ElementRef> = selection.items.iter().collect();
        // A selected post's plate footprint, outlined outside any cue so its colour shows.
        let pad = CUE_GAP_M + CUE_BAND_M + 0.03;
        for s in shapes.shapes.iter().filter(|s| sel.contains(&s.element) && s.part == Part::SolePlate) {
            outline(s, HIGHLIGHT, pad);
        }
        for s in shapes.shapes.iter().filter(|s| sel.contains(&s.element) && s.part == Part::BasePlate) {
            // Without a sole plate the base plate is the footprint.
            if !shapes.shapes.iter().any(|o| o.element == s.element && o.part == Part::SolePlate) {
                outline(s, HIGHLIGHT, pad);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    use plateload::export::palette::contrast_ratio as contrast;

    /// OKLab of an sRGB colour.
    fn oklab(c: [u8; 3]) -> [f64; 3] {
        // source: B. Ottosson, "A perceptual color space for image processing" (2020), sRGB → OKLab matrices
        let [r, g, b] = c.map(|v| {
            let s = v as f64 / 255.0;
            if s <= 0.04045 { s / 12.92 } else { ((s + 0.055) / 1.055).powf(2.4) }
        });
        let l = (0.412_221_470_8 * r + 0.536_332_536_3 * g + 0.051_445_992_9 * b).cbrt();
        let m = (0.211_903_498_2 * r + 0.680_699_545_1 * g + 0.107_396_956_6 * b).cbrt();
        let s = (0.088_302_461_9 * r + 0.281_718_837_6 * g + 0.629_978_700_5 * b).cbrt();
        [0.210_454_255_3 * l + 0.793_617_785 * m - 0.004_072_046_8 * s, 1.977_998_495_1 * l - 2.428_592_205 * m + 0.450_593_709_9 * s, 0.025_904_037_1 * l + 0.782_771_766_2 * m - 0.808_675_766 * s]
    }

    #[test]
    fn the_ground_stands_apart_from_every_band() {
        // This converter is the inverse of the palette's: white is L = 1, and every band
        // comes back to itself through the palette's OKLab → sRGB.
        assert!(oklab([255, 255, 255]).iter().zip([1.0, 0.0, 0.0]).all(|(a, b)| (a - b).abs() < 1e-3));
        let bands = Band::ALL.map(|b| (b, b.colour()));
        for (b, c) in bands {
            let back = plateload::export::palette::oklab_to_srgb(oklab(c));
            assert!((0..3).all(|k| back[k].abs_diff(c[k]) <= 1), "{b:?}: {c:?} → {back:?}");
        }
        // The bands span nearly the whole range of lightness, so no single colour reaches the
        // 3 : 1 of WCAG 2.1 SC 1.4.11 (non-text contrast) against all of them: the best is
        // about 1.7 : 1, between the two darkest bands. The ground takes that, gives the light
        // bands (which vanished on the old pale ground, 1.3 : 1) the full 3 : 1, and differs
        // from every band in colour as well.
        for (b, c) in bands {
            let k = contrast(GROUND, c);
            let d = oklab(GROUND).iter().zip(oklab(c)).map(|(x, y)| (x - y).powi(2)).sum::<f64>().sqrt();
            assert!(k >= 1.7, "{b:?}: contrast {k:.2} : 1 with the ground");
            // common practice, no source: a difference of about 0.02 in OKLab is just noticeable
            assert!(d >= 0.14, "{b:?}: OKLab difference {d:.3} from the ground");
            if matches!(b, Band::Light | Band::Moderate) {
                // source: WCAG 2.1 SC 1.4.11, 3 : 1 for graphical objects
                assert!(k >= 3.0, "{b:?}: contrast {k:.2} : 1 with the ground");
            }
        }
        // The old ground failed this: the check can fail.
        assert!(contrast([0xbf, 0xbc, 0xb4], Band::Light.colour()) < 1.7);
        // Nor is the ground the colour of the cues (white) or of a plate without a result.
        assert!(contrast(GROUND, [255, 255, 255]) >= 4.5 && contrast(GROUND, NOT_CHECKED) >= 1.7);
    }
}
