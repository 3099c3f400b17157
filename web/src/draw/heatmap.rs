//! Heatmaps: one image per map (the pixels filled in memory and put at once), with a legend strip
//! that states its range, and what is clipped.
//!
//! Empty cells are hatched grey; cells inside their band on the off-band map are white with a dot,
//! so neither is mistaken for the other.

use crate::units::Unit;
use traycast_plan::model::Plan;
use wasm_bindgen::Clamped;
use web_sys::{HtmlCanvasElement, ImageData};

/// The off-band map's scale is clipped at ± this, K: one outlier cannot wash the rest out.
pub const OFF_BAND_CLIP_K: f64 = 10.0;

/// What a heatmap's colours mean.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Scale {
    /// Temperatures from `lo` to `hi`, °C (shared by the maps set side by side).
    Temperature {
        /// Coldest end, °C.
        lo: f64,
        /// Warmest end, °C.
        hi: f64,
    },
    /// Signed distance outside the band, K, clipped at ±[`OFF_BAND_CLIP_K`].
    OffBand,
}

impl Scale {
    /// A temperature scale spanning every finite value of `sets` (at least 1 K wide).
    pub fn spanning(sets: &[&[f64]]) -> Scale {
        let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
        for v in sets.iter().flat_map(|s| s.iter()).filter(|v| v.is_finite()) {
            lo = lo.min(*v);
            hi = hi.max(*v);
        }
        if !lo.is_finite() {
            return Scale::Temperature { lo: 0.0, hi: 1.0 };
        }
        Scale::Temperature {
            lo,
            hi: hi.max(lo + 1.0),
        }
    }

    fn ends(self) -> (f64, f64) {
        match self {
            Scale::Temperature { lo, hi } => (lo, hi),
            Scale::OffBand => (-OFF_BAND_CLIP_K, OFF_BAND_CLIP_K),
        }
    }

    /// The colour of `v`, RGB.
    fn colour(self, v: f64) -> [u8; 3] {
        let (lo, hi) = self.ends();
        let t = ((v - lo) / (hi - lo)).clamp(0.0, 1.0);
        let c = match self {
            // Blue below the band, red above (ColorBrewer RdBu, colour-blind safe).
            Scale::OffBand => colorous::RED_BLUE.eval_continuous(1.0 - t),
            Scale::Temperature { .. } => colorous::CIVIDIS.eval_continuous(t),
        };
        [c.r, c.g, c.b]
    }
}

const EMPTY: [u8; 3] = [0xe6, 0xe3, 0xde];
const HATCH: [u8; 3] = [0xc4, 0xbf, 0xb7];
const IN_BAND: [u8; 3] = [0xff, 0xff, 0xff];
const DOT: [u8; 3] = [0x6b, 0x72, 0x7a];

/// The pixels of the map, `w`×`h` cells of `px` pixels, row-major RGBA.
fn pixels(plan: &Plan, values: &[f64], px: usize, scale: Scale) -> Vec<u8> {
    let (w, h) = (plan.tray.width, plan.tray.height);
    let stride = w * px;
    let mut buf = vec![0u8; stride * h * px * 4];
    let dot = (px / 5).max(1);
    let (d0, d1) = ((px - dot) / 2, (px + dot) / 2);
    for (i, &v) in values.iter().enumerate().take(w * h) {
        let (cx, cy) = ((i % w) * px, (i / w) * px);
        let in_band = scale == Scale::OffBand && v == 0.0;
        let fill = if !v.is_finite() {
            None
        } else if in_band {
            Some(IN_BAND)
        } else {
            Some(scale.colour(v))
        };
        for y in 0..px {
            let row = ((cy + y) * stride + cx) * 4;
            for x in 0..px {
                let rgb = match fill {
                    None if (x + y) % 4 == 0 => HATCH,
                    None => EMPTY,
                    Some(_) if in_band && (d0..=d1).contains(&x) && (d0..=d1).contains(&y) => DOT,
                    Some(c) => c,
                };
                let at = row + x * 4;
                buf[at..at + 4].copy_from_slice(&[rgb[0], rgb[1], rgb[2], 255]);
            }
        }
    }
    buf
}

/// Draws `values` (one per cell: °C, or K off band) with a legend strip below it.
pub fn heatmap(
    canvas: &HtmlCanvasElement,
    plan: &Plan,
    values: &[f64],
    px: f64,
    scale: Scale,
    unit: Unit,
    label: &str,
) {
    let (w, h) = (plan.tray.width, plan.tray.height);
    let legend = 34.0;
    let (map_w, map_h) = (w as f64 * px, h as f64 * px);
    let width = map_w.max(220.0);
    let Some(g) = super::prepare(canvas, width, map_h + legend) else {
        return;
    };
    g.set_fill_style_str("#ffffff");
    g.fill_rect(0.0, 0.0, width, map_h + legend);
    // The image goes straight to device pixels (no transform applies to it).
    let cell = (px * super::pixel_ratio()).round().max(1.0) as usize;
    let buf = pixels(plan, values, cell, scale);
    let (iw, ih) = ((w * cell) as u32, (h * cell) as u32);
    if let Ok(img) = ImageData::new_with_u8_clamped_array_and_sh(Clamped(&buf), iw, ih) {
        let _ = g.put_image_data(&img, 0.0, 0.0);
    }
    // Legend: a strip with its ends and middle, saying where the scale is clipped.
    let (lo, hi) = scale.ends();
    let y0 = map_h + 6.0;
    let steps = 60;
    for s in 0..steps {
        let v = lo + (hi - lo) * s as f64 / (steps - 1) as f64;
        let [r, gr, b] = scale.colour(v);
        g.set_fill_style_str(&format!("rgb({r},{gr},{b})"));
        let x = s as f64 * width / steps as f64;
        g.fill_rect(x, y0, width / steps as f64 + 1.0, 10.0);
    }
    g.set_fill_style_str("#333");
    g.set_font("11px system-ui, sans-serif");
    let (first, mid, end) = match scale {
        Scale::OffBand => {
            let k = unit.diff(OFF_BAND_CLIP_K);
            let d = unit.diff_symbol();
            (
                format!("≤ −{k:.0}"),
                "0 in band".to_string(),
                format!("≥ +{k:.0} {d} off band"),
            )
        }
        Scale::Temperature { lo, hi } => (
            format!("{:.0}", unit.temp(lo)),
            format!("{:.0}", unit.temp(0.5 * (lo + hi))),
            format!("{:.0} {}", unit.temp(hi), unit.symbol()),
        ),
    };
    let _ = g.fill_text(&first, 0.0, y0 + 24.0);
    let _ = g.fill_text(&mid, width / 2.0 - 12.0, y0 + 24.0);
    let end_x = (width - 6.5 * end.chars().count() as f64).max(width / 2.0 + 40.0);
    let _ = g.fill_text(&end, end_x, y0 + 24.0);
    canvas.set_title(label);
}

#[cfg(test)]
mod tests {
    use super::{OFF_BAND_CLIP_K, Scale};

    #[test]
    fn a_shared_scale_spans_every_map_and_skips_empty_cells() {
        let a = [20.0, f64::NAN, 60.0];
        let b = [35.0, 75.0];
        assert_eq!(
            Scale::spanning(&[&a, &b]),
            Scale::Temperature { lo: 20.0, hi: 75.0 }
        );
        assert_eq!(
            Scale::spanning(&[&[f64::NAN]]),
            Scale::Temperature { lo: 0.0, hi: 1.0 }
        );
    }

    #[test]
    fn off_band_colours_clip_at_the_stated_range() {
        let s = Scale::OffBand;
        assert_eq!(s.colour(3.0 * OFF_BAND_CLIP_K), s.colour(OFF_BAND_CLIP_K));
        assert_eq!(s.colour(-50.0), s.colour(-OFF_BAND_CLIP_K));
        assert_ne!(s.colour(-1.0), s.colour(1.0));
    }
}
