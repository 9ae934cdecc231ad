//! The utilisation colour ramp shared by the 3D view, the pictures and the report.
//!
//! Lightness falls steadily from a pale aqua (lightly used) through warm sand to a deep brick
//! red (at capacity), interpolated in the OKLab perceptual space, so the order reads in grey
//! scale and for red–green colour-blind readers alike. Over capacity is a near-black aubergine,
//! and is also drawn with a second cue (see [`Cue`]) so it never depends on colour alone.

use crate::check::Status;

/// Utilisation bands used for colouring and in legends.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize)]
pub enum Band {
    /// Below 50 %.
    Light,
    /// 50 % to 70 %.
    Moderate,
    /// 70 % to 85 %.
    High,
    /// 85 % to 100 %.
    Near,
    /// Above 100 %.
    Over,
}

impl Band {
    /// All bands, lowest first.
    pub const ALL: [Band; 5] = [Band::Light, Band::Moderate, Band::High, Band::Near, Band::Over];

    /// The band of a utilisation ratio (1.0 = capacity). NaN counts as over: never look safe.
    pub fn of(utilisation: f64) -> Band {
        match utilisation {
            u if u < 0.5 => Band::Light,
            u if u < 0.7 => Band::Moderate,
            u if u < 0.85 => Band::High,
            u if u <= 1.0 + 1e-9 => Band::Near,
            _ => Band::Over,
        }
    }

    /// Range of utilisation covered, as ratios (upper bound `None` for over).
    pub fn range(self) -> (f64, Option<f64>) {
        match self {
            Band::Light => (0.0, Some(0.5)),
            Band::Moderate => (0.5, Some(0.7)),
            Band::High => (0.7, Some(0.85)),
            Band::Near => (0.85, Some(1.0)),
            Band::Over => (1.0, None),
        }
    }

    /// Legend label, e.g. `70–85 %`.
    pub fn label(self) -> String {
        match self.range() {
            (lo, Some(hi)) => format!("{:.0}–{:.0} %", lo * 100.0, hi * 100.0),
            (lo, None) => format!("over {:.0} %", lo * 100.0),
        }
    }

    /// sRGB colour of the band: the ramp at the band's middle; a fixed dark colour for over.
    pub fn colour(self) -> [u8; 3] {
        match self {
            Band::Over => OVER_COLOUR,
            b => {
                let (lo, hi) = b.range();
                ramp(0.5 * (lo + hi.unwrap_or(1.0)))
            }
        }
    }
}

/// Colour of over-capacity plates.
pub const OVER_COLOUR: [u8; 3] = [0x3a, 0x16, 0x36];

/// Ramp control points in OKLab (L, a, b): pale aqua, warm sand, deep brick red.
const STOPS: [[f64; 3]; 3] = [[0.95, -0.045, -0.012], [0.80, 0.012, 0.075], [0.50, 0.125, 0.070]];

/// Continuous ramp colour for a utilisation ratio in 0..=1 (clamped), sRGB.
pub fn ramp(utilisation: f64) -> [u8; 3] {
    let t = if utilisation.is_nan() { 1.0 } else { utilisation.clamp(0.0, 1.0) } * (STOPS.len() - 1) as f64;
    let i = (t.floor() as usize).min(STOPS.len() - 2);
    let f = t - i as f64;
    let lab = [0, 1, 2].map(|k| STOPS[i][k] + f * (STOPS[i + 1][k] - STOPS[i][k]));
    oklab_to_srgb(lab)
}

/// OKLab → sRGB (8-bit, gamut-clipped).
pub fn oklab_to_srgb([l, a, b]: [f64; 3]) -> [u8; 3] {
    let l_ = l + 0.396_337_777_4 * a + 0.215_803_757_3 * b;
    let m_ = l - 0.105_561_345_8 * a - 0.063_854_172_8 * b;
    let s_ = l - 0.089_484_177_5 * a - 1.291_485_548 * b;
    let (l3, m3, s3) = (l_ * l_ * l_, m_ * m_ * m_, s_ * s_ * s_);
    let lin = [
        4.076_741_662_1 * l3 - 3.307_711_591_3 * m3 + 0.230_969_929_2 * s3,
        -1.268_438_004_6 * l3 + 2.609_757_401_1 * m3 - 0.341_319_396_5 * s3,
        -0.004_196_086_3 * l3 - 0.703_418_614_7 * m3 + 1.707_614_701 * s3,
    ];
    lin.map(|c| {
        let c = c.clamp(0.0, 1.0);
        let s = if c <= 0.003_130_8 { 12.92 * c } else { 1.055 * c.powf(1.0 / 2.4) - 0.055 };
        (s * 255.0).round() as u8
    })
}

/// The second cue drawn besides colour, so a finding never rests on colour alone.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize)]
pub enum Cue {
    /// Nothing extra.
    None,
    /// Over capacity: a bold square frame around the plate (in print also a cross-hatch).
    Over,
    /// The plate lifts: a bold round ring around the plate, with an upward marker (a raised
    /// cone in the 3D view).
    Uplift,
    /// Both.
    OverAndUplift,
}

impl Cue {
    /// The cue for a plate's status.
    pub fn of(status: Status) -> Cue {
        match (status.over, status.uplift) {
            (false, false) => Cue::None,
            (true, false) => Cue::Over,
            (false, true) => Cue::Uplift,
            (true, true) => Cue::OverAndUplift,
        }
    }
}

/// Relative luminance of an sRGB colour, 0 (black) to 1 (white): how the bands and the cues are
/// told apart without hue.
// source: WCAG 2.1, definition of relative luminance (sRGB linearisation, Rec. 709 weights)
pub fn relative_luminance(c: [u8; 3]) -> f64 {
    let lin = c.map(|v| {
        let s = v as f64 / 255.0;
        if s <= 0.04045 { s / 12.92 } else { ((s + 0.055) / 1.055).powf(2.4) }
    });
    0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2]
}

/// Contrast ratio of two colours, 1 to 21.
// source: WCAG 2.1, definition of contrast ratio (L1 + 0.05) / (L2 + 0.05)
pub fn contrast_ratio(a: [u8; 3], b: [u8; 3]) -> f64 {
    let (la, lb) = (relative_luminance(a), relative_luminance(b));
    (la.max(lb) + 0.05) / (la.min(lb) + 0.05)
}

#[cfg(test)]
mod tests {
    use super::*;

    use super::relative_luminance as luminance;

    #[test]
    fn oklab_white_and_black() {
        // source: OKLab definition (B. Ottosson, 2020): L=1, a=b=0 is white; L=0 is black
        assert_eq!(oklab_to_srgb([1.0, 0.0, 0.0]), [255, 255, 255]);
        assert_eq!(oklab_to_srgb([0.0, 0.0, 0.0]), [0, 0, 0]);
    }

    #[test]
    fn bands_darken_monotonically_so_they_read_without_hue() {
        // common practice, no source: a sequential scale must be ordered in lightness
        let lum: Vec<f64> = Band::ALL.iter().map(|b| luminance(b.colour())).collect();
        for w in lum.windows(2) {
            assert!(w[1] < w[0] * 0.85, "bands too close in lightness: {lum:?}");
        }
    }

    #[test]
    fn band_edges() {
        // common practice, no source
        assert_eq!(Band::of(0.0), Band::Light);
        assert_eq!(Band::of(0.5), Band::Moderate);
        assert_eq!(Band::of(1.0), Band::Near);
        assert_eq!(Band::of(1.01), Band::Over);
        assert_eq!(Band::of(f64::NAN), Band::Over);
    }
}

/// Bands of the spare-capacity map ([`crate::check::spare`]): how much extra load a point of a
/// deck takes, kN. One hue, light where there is much room and dark where there is little, so it
/// reads in grey scale and is not confused with the utilisation ramp; a point already at a limit
/// is near-black and also hatched, so it never depends on colour alone.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize)]
pub enum SpareBand {
    /// A limit is already reached: no extra load.
    AtLimit,
    /// Up to 1 kN.
    UpTo1,
    /// 1 to 2.5 kN.
    UpTo2_5,
    /// 2.5 to 5 kN.
    UpTo5,
    /// 5 to 10 kN.
    UpTo10,
    /// 10 to 20 kN.
    UpTo20,
    /// More than 20 kN.
    Above20,
    /// Nothing limits it (no capacity known on its path).
    Unlimited,
}

impl SpareBand {
    /// All bands, least room first.
    pub const ALL: [SpareBand; 8] =
        [SpareBand::AtLimit, SpareBand::UpTo1, SpareBand::UpTo2_5, SpareBand::UpTo5, SpareBand::UpTo10, SpareBand::UpTo20, SpareBand::Above20, SpareBand::Unlimited];

    /// The band of a spare load (kN; `None` where nothing limits it).
    pub fn of(kn: Option<f64>, already_at_limit: bool) -> SpareBand {
        match kn {
            None => SpareBand::Unlimited,
            Some(_) if already_at_limit => SpareBand::AtLimit,
            Some(k) if k <= 0.0 => SpareBand::AtLimit,
            Some(k) if k < 1.0 => SpareBand::UpTo1,
            Some(k) if k < 2.5 => SpareBand::UpTo2_5,
            Some(k) if k < 5.0 => SpareBand::UpTo5,
            Some(k) if k < 10.0 => SpareBand::UpTo10,
            Some(k) if k < 20.0 => SpareBand::UpTo20,
            Some(_) => SpareBand::Above20,
        }
    }

    /// Legend label.
    pub fn label(self) -> &'static str {
        match self {
            SpareBand::AtLimit => "none: a limit is already reached",
            SpareBand::UpTo1 => "under 1 kN",
            SpareBand::UpTo2_5 => "1–2.5 kN",
            SpareBand::UpTo5 => "2.5–5 kN",
            SpareBand::UpTo10 => "5–10 kN",
            SpareBand::UpTo20 => "10–20 kN",
            SpareBand::Above20 => "over 20 kN",
            SpareBand::Unlimited => "no limit found",
        }
    }

    /// sRGB colour.
    pub fn colour(self) -> [u8; 3] {
        match self {
            SpareBand::AtLimit => [0x24, 0x1f, 0x2b],
            SpareBand::UpTo1 => [0x1d, 0x3f, 0x73],
            SpareBand::UpTo2_5 => [0x2b, 0x5f, 0x9e],
            SpareBand::UpTo5 => [0x4f, 0x86, 0xc2],
            SpareBand::UpTo10 => [0x86, 0xb0, 0xdc],
            SpareBand::UpTo20 => [0xbd, 0xd4, 0xec],
            SpareBand::Above20 => [0xe9, 0xf1, 0xf9],
            SpareBand::Unlimited => [0xf7, 0xf7, 0xf2],
        }
    }
}

#[cfg(test)]
mod spare_band_tests {
    use super::*;

    use super::relative_luminance as luminance;

    #[test]
    fn spare_bands_get_lighter_with_more_room() {
        // source: WCAG 2.1 relative luminance definition; the order must read in grey scale
        let l: Vec<f64> = SpareBand::ALL[..7].iter().map(|b| luminance(b.colour())).collect();
        assert!(l.windows(2).all(|w| w[1] > w[0]), "{l:?}");
        assert_eq!(SpareBand::of(Some(0.0), false), SpareBand::AtLimit);
        assert_eq!(SpareBand::of(Some(3.0), true), SpareBand::AtLimit);
        assert_eq!(SpareBand::of(Some(7.5), false), SpareBand::UpTo10);
        assert_eq!(SpareBand::of(None, false), SpareBand::Unlimited);
    }
}
