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
        FlatMaterial { params: FlatParams { color: color.into(), shade: 0.0 }, alpha_mode: AlphaMode::Opaque }
    }
    /// The colour with one light term, opaque.
    pub fn shaded(color: Color) -> Self {
        FlatMaterial { params: FlatParams { color: color.into(), shade: 1.0 }, alpha_mode: AlphaMode::Opaque }
    }
    /// The colour exactly, blended by its alpha.
    pub fn translucent(color: Color) -> Self {
        FlatMaterial { params: FlatParams { color: color.into(), shade: 0.0 }, alpha_mode: AlphaMode::Blend }
    }
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
