//! The view's material: a flat colour (exact, for the utilisation bands and cues) or a flat
//! colour with one light term (for members, so their shape reads). On a software renderer the
//! standard PBR material costs most of a frame even unlit; this shader is a few instructions.

use bevy::asset::{embedded_asset, embedded_path, AssetPath};
use bevy::prelude::*;
use bevy::render::render_resource::{AsBindGroup, ShaderType};
use bevy::shader::ShaderRef;

/// Registers the shader and the material's render pipeline.
pub struct FlatMaterialPlugin;

impl Plugin for FlatMaterialPlugin {
    fn build(&self, app: &mut App) {
        embedded_asset!(app, "flat.wgsl");
        app.add_plugins(MaterialPlugin::<FlatMaterial>::default());
    }
}

/// Uniform of [`FlatMaterial`], as the shader reads it.
#[derive(Debug, Clone, Copy, PartialEq, ShaderType)]
pub struct FlatParams {
    /// Colour, linear RGBA; multiplied by the mesh's vertex colours where it has them.
    pub color: LinearRgba,
    /// 0: the colour exactly. 1: lit by one fixed light (faces turned away are up to 45 % darker).
    pub shade: f32,
    /// On meshes that carry a cue (second UV set, see [`cue_band`]): the width of each black
    /// edge as a fraction of the band.
    pub edge: f32,
}

/// A flat colour, optionally with one light term; opaque or blended.
#[derive(Asset, TypePath, AsBindGroup, Debug, Clone)]
pub struct FlatMaterial {
    /// What the shader gets.
    #[uniform(0)]
    pub params: FlatParams,
    /// Opaque, or blended for translucent decks and load sheets.
    pub alpha_mode: AlphaMode,
}

impl FlatMaterial {
    /// The colour exactly, opaque.
    pub fn flat(color: Color) -> Self {
        FlatMaterial { params: FlatParams { color: color.into(), shade: 0.0, edge: 0.0 }, alpha_mode: AlphaMode::Opaque }
    }
    /// The colour with one light term, opaque.
    pub fn shaded(color: Color) -> Self {
        FlatMaterial { params: FlatParams { color: color.into(), shade: 1.0, edge: 0.0 }, alpha_mode: AlphaMode::Opaque }
    }
    /// The colour exactly, blended by its alpha.
    pub fn translucent(color: Color) -> Self {
        FlatMaterial { params: FlatParams { color: color.into(), shade: 0.0, edge: 0.0 }, alpha_mode: AlphaMode::Blend }
    }
}

/// A cue's quad: positions, offsets from the centre and the band's inner edge (see [`cue_band`]).
pub type CueQuad = (Vec<[f32; 3]>, Vec<[f32; 2]>, Vec<[f32; 2]>);

/// The vertices of a cue drawn on one flat quad of half sizes `hx` × `hz` (bevy x, z, m) that the
/// shader cuts to a band of width `band` (m): black edges, white between, nothing outside. The
/// band runs outwards from a circle of radius `inner[0]` (`inner[1]` negative: a ring), or
/// from a rectangle of half sizes `inner` (a square-cornered frame). Positions, the offset from
/// the centre in band widths, and the band's inner edge in band widths.
pub fn cue_band(hx: f32, hz: f32, band: f32, inner: [f32; 2]) -> CueQuad {
    // Two triangles facing up (+y).
    let pos: Vec<[f32; 3]> = [[-hx, -hz], [-hx, hz], [hx, hz], [-hx, -hz], [hx, hz], [hx, -hz]].iter().map(|&[x, z]| [x, 0.0, z]).collect();
    let uv = pos.iter().map(|p| [p[0] / band, p[2] / band]).collect();
    let inner = if inner[1] < 0.0 { [inner[0] / band, -1.0] } else { [inner[0] / band, inner[1] / band] };
    (pos, uv, vec![inner; 6])
}

impl Material for FlatMaterial {
    fn fragment_shader() -> ShaderRef {
        ShaderRef::Path(AssetPath::from_path_buf(embedded_path!("flat.wgsl")).with_source("embedded"))
    }
    fn alpha_mode(&self) -> AlphaMode {
        self.alpha_mode
    }
    // Nothing casts shadows and no pass reads depth or normals before the main pass.
    fn enable_prepass() -> bool {
        false
    }
    fn enable_shadows() -> bool {
        false
    }
}
