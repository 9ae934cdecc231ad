//! How numbers are written in every output — command line, schedule, report, trace, JSON and
//! messages — so that none shows a negative zero ("-0.000 kN").
//!
//! A negative zero is rounding noise (a sum of shares that cancels to -1e-17) or an IEEE `-0.0`;
//! on a load schedule it reads as an uplift that is not there. Every stage formats numbers
//! through this module, which imports nothing from the stages.

use std::fmt::{self, Write as _};

/// A number to print with the usual format specs (`{:>9.3}`, `{:.1e}`, `{}`). A value that
/// shows as zero at the precision asked for is written without a minus sign.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Num(pub f64);

/// Wrap a value for printing: `format!("{:.3}", num(v))`.
pub fn num(v: f64) -> Num {
    Num(v)
}

/// `-0.0` made `0.0`; every other value unchanged. For outputs that write full precision
/// (JSON).
pub fn no_negative_zero(v: f64) -> f64 {
    if v == 0.0 { 0.0 } else { v }
}

/// Whether `v` (negative) would print as zero with `precision` decimals, in fixed notation.
fn shows_as_zero(v: f64, precision: Option<usize>) -> bool {
    match precision {
        None => v == 0.0,
        Some(p) => {
            // Format the magnitude exactly as the caller will, then look at the digits: this
            // follows the standard library's rounding, ties included.
            let mut s = String::with_capacity(24);
            let _ = write!(s, "{:.*}", p, -v);
            s.bytes().all(|b| b == b'0' || b == b'.')
        }
    }
}

impl fmt::Display for Num {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let v = self.0;
        let v = if v.is_sign_negative() && v.is_finite() && shows_as_zero(v, f.precision()) { 0.0 } else { v };
        fmt::Display::fmt(&v, f)
    }
}

impl fmt::LowerExp for Num {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        // In exponent form only an exact zero shows as zero.
        fmt::LowerExp::fmt(&no_negative_zero(self.0), f)
    }
}

/// Append `v` rounded to `decimals` places (at most 6), like `format!("{:.3}", num(v))` but
/// without going through the formatting machinery: the schedule of a large scene writes
/// hundreds of thousands of numbers. Never writes a negative zero.
pub fn push_fixed(out: &mut String, v: f64, decimals: u32) {
    let decimals = decimals.min(6);
    let scale = 10u64.pow(decimals);
    let scaled = (v * scale as f64).round();
    if !scaled.is_finite() || scaled.abs() >= 9.0e15 {
        let _ = write!(out, "{:.*}", decimals as usize, num(v));
        return;
    }
    // Digits right to left into a stack buffer: sign, integer part, point, `decimals` digits.
    let negative = scaled < 0.0;
    let mut n = scaled.abs() as u64;
    let mut buf = [0u8; 32];
    let mut i = buf.len();
    let mut put = |b: u8| {
        i -= 1;
        buf[i] = b;
    };
    for _ in 0..decimals {
        put(b'0' + (n % 10) as u8);
        n /= 10;
    }
    if decimals > 0 {
        put(b'.');
    }
    loop {
        put(b'0' + (n % 10) as u8);
        n /= 10;
        if n == 0 {
            break;
        }
    }
    if negative && scaled != 0.0 {
        put(b'-');
    }
    out.push_str(std::str::from_utf8(&buf[i..]).expect("ASCII digits"));
}

/// Whether a text holds a negative zero written as a number: `-0`, `-0.0`, `-0.000`, `-0e0`
/// and the like, not followed by a non-zero digit. For tests of every output.
pub fn find_negative_zero(text: &str) -> Option<usize> {
    let b = text.as_bytes();
    let mut i = 0;
    while let Some(off) = text[i..].find('-') {
        let start = i + off;
        i = start + 1;
        // A minus that starts a number: not inside a word or another number ("A-0", "1-0").
        if start > 0 && (b[start - 1].is_ascii_alphanumeric() || b[start - 1] == b'.') {
            continue;
        }
        let mut j = start + 1;
        let mut digits = 0;
        let mut nonzero = false;
        while j < b.len() && (b[j].is_ascii_digit() || b[j] == b'.') {
            if b[j].is_ascii_digit() {
                digits += 1;
                nonzero |= b[j] != b'0';
            }
            j += 1;
        }
        if digits == 0 || nonzero || b.get(start + 1) != Some(&b'0') {
            continue;
        }
        // An exponent does not make a zero non-zero.
        if j < b.len() && (b[j] == b'e' || b[j] == b'E') {
            j += 1;
            while j < b.len() && (b[j].is_ascii_digit() || b[j] == b'-' || b[j] == b'+') {
                j += 1;
            }
        }
        if j < b.len() && b[j].is_ascii_alphanumeric() {
            continue;
        }
        return Some(start);
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn no_negative_zero_at_any_precision() {
        // source: Rust std formatting of f64 as the reference for everything but the sign
        for v in [-0.0, -1e-17, -0.0004, -0.00049, 0.0, 1e-17] {
            assert_eq!(format!("{:.3}", num(v)), "0.000", "{v}");
            assert_eq!(format!("{:>8.1}", num(v)), "     0.0", "{v}");
        }
        assert_eq!(format!("{}", num(-0.0)), "0");
        assert_eq!(format!("{:.1e}", num(-0.0)), "0.0e0");
        assert_eq!(format!("{:.3}", num(-0.0006)), "-0.001");
        assert_eq!(format!("{:.1}", num(-2.25)), format!("{:.1}", -2.25));
        assert_eq!(format!("{:<7.2}|", num(-1.5)), "-1.50  |");
        assert_eq!(format!("{:.1e}", num(-3e-17)), "-3.0e-17");
        assert_eq!(format!("{:.2}", num(f64::NAN)), "NaN");
        assert_eq!(format!("{:.2}", num(f64::NEG_INFINITY)), "-inf");
        assert_eq!(no_negative_zero(-0.0).to_bits(), 0.0f64.to_bits());
    }

    #[test]
    fn fixed_matches_standard_formatting() {
        // source: Rust std `{:.N}` formatting as the reference; ties may round either way, so
        // the check is that both lie within half a unit in the last place of the true value.
        for v in [0.0, 1.0, -1.0, 0.5, 2.675, -12.3456, 1234567.891, 0.0004, 99.9995, 1e-9, 42.0, -7.25] {
            for d in [0, 1, 3, 4] {
                let mut s = String::new();
                push_fixed(&mut s, v, d);
                let expect = format!("{v:.*}", d as usize);
                let half = 0.5 * 10f64.powi(-(d as i32)) * (1.0 + 1e-9);
                let got: f64 = s.parse().unwrap();
                assert!((got - v).abs() <= half, "{v} {d}: {s} vs {expect}");
                assert_eq!(s.split('.').nth(1).map_or(0, str::len), d as usize, "{s}");
                if (v * 10f64.powi(d as i32)).fract().abs() != 0.5 {
                    assert_eq!(s.trim_start_matches('-'), expect.trim_start_matches('-'), "{v} {d}");
                }
            }
        }
        let mut s = String::new();
        push_fixed(&mut s, -0.0001, 3);
        assert_eq!(s, "0.000", "no negative zero");
    }

    #[test]
    fn negative_zeros_are_found_and_nothing_else() {
        // common practice, no source
        for bad in ["-0", "x -0.000 kN", "(-0.0,", "\"w\": -0.0\n", "-0e0", "-0.00e-3 ", "applied -0.000"] {
            assert!(find_negative_zero(bad).is_some(), "{bad}");
        }
        for good in ["0.000", "-0.001", "-0.05 kN", "L1-0", "2026-01-02", "-10.0", "1e-0", "-0.0004", "BX1-0a", "x-0"] {
            assert_eq!(find_negative_zero(good), None, "{good}");
        }
    }
}
