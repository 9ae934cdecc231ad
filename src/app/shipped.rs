//! What the editor ships in `assets/` besides the catalogue: its fonts (DejaVu Sans and Sans
//! Mono, licence in `assets/fonts/`) and its window icon (an original drawing, see
//! `assets/icon/`). Both are built into the binary, so nothing is read from disk at run time.
//!
//! Add [`ShippedAssetsPlugin`]: the fonts are given to egui on the first UI pass, the icon to
//! every window when it is created.

use std::sync::Arc;

use bevy::prelude::*;
use bevy::window::WindowCreated;
use bevy_egui::{egui, EguiContexts, EguiPrimaryContextPass};

/// DejaVu Sans 2.37 (Debian fonts-dejavu-core), the editor's proportional font.
pub const SANS: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");
/// DejaVu Sans Mono 2.37, the editor's monospaced font.
pub const MONO: &[u8] = include_bytes!("../../assets/fonts/DejaVuSansMono.ttf");
/// The window icon, 128 × 128 RGBA PNG.
pub const ICON_PNG: &[u8] = include_bytes!("../../assets/icon/plateload.png");

/// Gives egui the shipped fonts and every window the shipped icon.
pub struct ShippedAssetsPlugin;

impl Plugin for ShippedAssetsPlugin {
    fn build(&self, app: &mut App) {
        app.add_systems(EguiPrimaryContextPass, install_fonts.run_if(|done: Local<bool>| !*done))
            .add_systems(Update, set_window_icon);
    }
}

/// egui's font definitions with the shipped fonts first; egui's own fonts stay behind them as
/// fallbacks for any character the shipped ones lack.
pub fn font_definitions() -> egui::FontDefinitions {
    let mut fonts = egui::FontDefinitions::default();
    for (name, bytes, family) in [("DejaVu Sans", SANS, egui::FontFamily::Proportional), ("DejaVu Sans Mono", MONO, egui::FontFamily::Monospace)] {
        fonts.font_data.insert(name.to_owned(), Arc::new(egui::FontData::from_static(bytes)));
        fonts.families.entry(family).or_default().insert(0, name.to_owned());
    }
    fonts
}

fn install_fonts(mut contexts: EguiContexts, mut done: Local<bool>) -> Result {
    contexts.ctx_mut()?.set_fonts(font_definitions());
    *done = true;
    Ok(())
}

/// The icon as RGBA8 pixels with its width and height, or why it could not be read.
pub fn icon_rgba() -> Result<(Vec<u8>, u32, u32), String> {
    let mut decoder = png::Decoder::new(std::io::Cursor::new(ICON_PNG));
    decoder.set_transformations(png::Transformations::EXPAND);
    let mut reader = decoder.read_info().map_err(|e| e.to_string())?;
    let mut buf = vec![0; reader.output_buffer_size().ok_or("icon too large")?];
    let info = reader.next_frame(&mut buf).map_err(|e| e.to_string())?;
    if info.color_type != png::ColorType::Rgba || info.bit_depth != png::BitDepth::Eight {
        return Err(format!("icon is {:?} {:?}, not 8-bit RGBA", info.color_type, info.bit_depth));
    }
    buf.truncate(info.buffer_size());
    Ok((buf, info.width, info.height))
}

/// Windows are created by winit on the main thread; their icon is set there too (hence the
/// `NonSendMarker`), through bevy's winit window store.
fn set_window_icon(mut created: MessageReader<WindowCreated>, _main_thread: bevy::ecs::system::NonSendMarker) {
    for event in created.read() {
        let icon = match icon_rgba().and_then(|(rgba, w, h)| winit::window::Icon::from_rgba(rgba, w, h).map_err(|e| e.to_string())) {
            Ok(icon) => icon,
            Err(e) => {
                // A window without its icon is no reason to stop.
                warn!("the window icon could not be set: {e}");
                return;
            }
        };
        bevy::winit::WINIT_WINDOWS.with_borrow(|windows| {
            if let Some(window) = windows.get_window(event.window) {
                window.set_window_icon(Some(icon));
            }
        });
    }
}
