// The view's only surface shader: a flat colour, times the mesh's vertex colour when it has one,
// optionally with one light term. A software renderer spends most of a frame in fragment
// shaders, so this stays as small as the picture allows.
#import bevy_pbr::forward_io::VertexOutput

struct FlatParams {
    // Linear RGBA; with `shade` 0 it is written unchanged, so band colours stay exact.
    color: vec4<f32>,
    // 0: flat. 1: lit by one fixed light from above (dimmed to `1 - 0.45 * shade` facing away).
    shade: f32,
    // Width of a cue's black edges, as a fraction of its band.
    edge: f32,
}

@group(#{MATERIAL_BIND_GROUP}) @binding(0) var<uniform> params: FlatParams;

@fragment
fn fragment(in: VertexOutput) -> @location(0) vec4<f32> {
    var c = params.color;
#ifdef VERTEX_COLORS
    c = c * in.color;
#endif
#ifdef VERTEX_UVS_A
#ifdef VERTEX_UVS_B
    // A cue drawn on one flat quad (see `cue_band` in flat.rs): `uv` is the offset from its
    // centre and `uv_b` the inner edge of its band, in widths of the band: a circle of radius
    // `uv_b.x` where `uv_b.y` is negative (the uplift ring), else a rectangle of half sizes
    // `uv_b` (the over-capacity frame, square corners). Black edges, white between, nothing
    // outside the band.
    var t: f32;
    if in.uv_b.y < 0.0 {
        t = length(in.uv) - in.uv_b.x;
    } else {
        let d = abs(in.uv) - in.uv_b;
        t = max(d.x, d.y);
    }
    if t < 0.0 || t > 1.0 {
        discard;
    }
    if t < params.edge || t > 1.0 - params.edge {
        c = vec4<f32>(0.0, 0.0, 0.0, c.a);
    }
#endif
#endif
    if params.shade > 0.0 {
        // Towards the light: (−4, 10, 6) in bevy axes, up and a little towards −x and +z.
        let l = vec3<f32>(-0.324, 0.811, 0.487);
        let lambert = max(dot(normalize(in.world_normal), l), 0.0);
        let k = 1.0 - params.shade * 0.45 * (1.0 - lambert);
        c = vec4<f32>(c.rgb * k, c.a);
    }
    return c;
}
