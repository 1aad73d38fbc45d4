//! Colours, dashes and markers for the report's figures.
//!
//! The pathway colours are our own picks along a path from yellow-green through teal, blue
//! and violet to dark plum, chosen so that CIE L* falls steadily (about 71, 58, 47, 35, 20): in
//! greyscale print the lowest-emission pathway is the lightest and the highest the darkest, and
//! readers with a colour-vision deficiency still separate them by lightness. Each pathway also
//! has its own dash pattern and marker, so a photocopy still tells them apart. The tests below
//! check the lightness steps and the separation under simulated colour-vision deficiencies.

use plotters::style::RGBColor;

/// Pathway line colours, lowest emissions first.
pub const PATHWAY_COLOURS: [RGBColor; 5] = [
    RGBColor(0x9A, 0xB8, 0x3A),
    RGBColor(0x2A, 0x9A, 0x8E),
    RGBColor(0x4A, 0x6A, 0xC4),
    RGBColor(0x7E, 0x2F, 0x8C),
    RGBColor(0x4A, 0x1D, 0x4F),
];

/// How a pathway's line is drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dash {
    Solid,
    /// Dash length and gap, px.
    Dashed(u32, u32),
}

/// Marker shape drawn on a pathway's line at the horizon years.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Marker {
    Circle,
    Square,
    Triangle,
    Diamond,
    /// Triangle pointing down.
    TriangleDown,
}

/// The full drawing style of one pathway.
#[derive(Debug, Clone, Copy)]
pub struct PathwayStyle {
    pub colour: RGBColor,
    pub dash: Dash,
    pub marker: Marker,
}

const DASHES: [Dash; 5] = [
    Dash::Solid,
    Dash::Dashed(14, 4),
    Dash::Dashed(8, 4),
    Dash::Dashed(4, 3),
    Dash::Dashed(2, 3),
];

const MARKERS: [Marker; 5] = [
    Marker::Circle,
    Marker::Square,
    Marker::Triangle,
    Marker::Diamond,
    Marker::TriangleDown,
];

/// Style of pathway `index` out of `count` pathways. With fewer than five pathways the colours
/// are spread over the whole lightness range; beyond five, colours repeat with other dashes.
pub fn pathway_style(index: usize, count: usize) -> PathwayStyle {
    let n = PATHWAY_COLOURS.len();
    let colour_index = if count <= 1 {
        2
    } else if count <= n {
        // Spread evenly over 0..n-1 (rounded), e.g. 3 pathways → 0, 2, 4.
        (index * (n - 1) + (count - 1) / 2) / (count - 1)
    } else {
        index % n
    };
    let colour_index = colour_index.min(n - 1);
    let colour = PATHWAY_COLOURS[colour_index];
    // Dash and marker follow the colour, so a pathway looks the same in every figure of a
    // report; past five pathways they shift so that repeated colours get another pattern.
    let style_index = if count > n {
        (index + index / n) % n
    } else {
        colour_index
    };
    PathwayStyle {
        colour,
        dash: DASHES[style_index],
        marker: MARKERS[style_index],
    }
}

/// Threshold-class band fills, from the highest class (lightest) down; neutral warm greys so
/// they do not compete with the pathway colours, about 8.5 L* apart (100, 91, 83, 74, 65) so
/// that neighbouring classes stay apart in greyscale print. Classes beyond the list reuse the
/// last.
pub const CLASS_FILLS: [RGBColor; 5] = [
    RGBColor(0xFF, 0xFF, 0xFF),
    RGBColor(0xEB, 0xE6, 0xDB),
    RGBColor(0xD5, 0xCD, 0xBC),
    RGBColor(0xBF, 0xB5, 0xA1),
    RGBColor(0xA9, 0x9E, 0x89),
];

/// Fill of threshold class `index` (0 = highest Ω_ar).
pub fn class_fill(index: usize) -> RGBColor {
    CLASS_FILLS[index.min(CLASS_FILLS.len() - 1)]
}

/// Text and axis colour.
pub const INK: RGBColor = RGBColor(0x22, 0x22, 0x22);
/// Secondary text (band labels, notes).
pub const MUTED: RGBColor = RGBColor(0x5A, 0x5A, 0x5A);
/// Light grid lines.
pub const GRID: RGBColor = RGBColor(0xDD, 0xDD, 0xDD);

/// Colours of the three seasonal-cycle quantities (Ω_ar, pH_T, temperature).
pub const SEASONAL_COLOURS: [RGBColor; 3] = [
    RGBColor(0x3F, 0x76, 0xC0),
    RGBColor(0x35, 0x7F, 0x74),
    RGBColor(0xB0, 0x4A, 0x2E),
];

/// `#rrggbb` for a colour (used by the template for table swatches).
pub fn hex(c: RGBColor) -> String {
    format!("#{:02x}{:02x}{:02x}", c.0, c.1, c.2)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn linear(c: u8) -> f64 {
        let c = f64::from(c) / 255.0;
        if c <= 0.04045 {
            c / 12.92
        } else {
            ((c + 0.055) / 1.055).powf(2.4)
        }
    }

    /// CIE L*a*b* (D65) of a linear-RGB triple (sRGB matrix and L* formula from IEC 61966-2-1
    /// and CIE 15; standard, written from memory).
    fn lab_linear(r: f64, g: f64, b: f64) -> [f64; 3] {
        let x = 0.4124 * r + 0.3576 * g + 0.1805 * b;
        let y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
        let z = 0.0193 * r + 0.1192 * g + 0.9505 * b;
        let f = |t: f64| {
            if t > 216.0 / 24389.0 {
                t.cbrt()
            } else {
                (24389.0 / 27.0 * t + 16.0) / 116.0
            }
        };
        let (fx, fy, fz) = (f(x / 0.95047), f(y), f(z / 1.08883));
        [116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)]
    }

    fn lab(c: RGBColor) -> [f64; 3] {
        lab_linear(linear(c.0), linear(c.1), linear(c.2))
    }

    fn delta_e(a: [f64; 3], b: [f64; 3]) -> f64 {
        ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt()
    }

    #[test]
    fn pathway_lightness_falls_in_clear_steps() {
        let l: Vec<f64> = PATHWAY_COLOURS.iter().map(|c| lab(*c)[0]).collect();
        for w in l.windows(2) {
            assert!(w[0] - w[1] >= 10.0, "lightness steps too small: {l:?}");
        }
        // The lightest line must still read on white paper and over the class bands (at most
        // L* 72, about 28 below white paper: common practice for thin lines), the darkest still
        // be distinct from black text.
        assert!(l[0] <= 72.0 && l[4] >= 15.0, "{l:?}");
    }

    #[test]
    fn pathways_stay_distinct_under_simulated_colour_blindness() {
        // Machado, Oliveira & Fernandes (2009, IEEE TVCG 15:1291) severity-1.0 matrices for
        // protanopia, deuteranopia and tritanopia, applied in linear RGB (from memory).
        let matrices: [(&str, [[f64; 3]; 3]); 3] = [
            (
                "protanopia",
                [
                    [0.152286, 1.052583, -0.204868],
                    [0.114503, 0.786281, 0.099216],
                    [-0.003882, -0.048116, 1.051998],
                ],
            ),
            (
                "deuteranopia",
                [
                    [0.367322, 0.860646, -0.227968],
                    [0.280085, 0.672501, 0.047413],
                    [-0.011820, 0.042940, 0.968881],
                ],
            ),
            (
                "tritanopia",
                [
                    [1.255528, -0.076749, -0.178779],
                    [-0.078411, 0.930809, 0.147602],
                    [0.004733, 0.691367, 0.303900],
                ],
            ),
        ];
        for (name, m) in matrices {
            let sim: Vec<[f64; 3]> = PATHWAY_COLOURS
                .iter()
                .map(|c| {
                    let v = [linear(c.0), linear(c.1), linear(c.2)];
                    let o: Vec<f64> = (0..3)
                        .map(|i| (0..3).map(|j| m[i][j] * v[j]).sum::<f64>().clamp(0.0, 1.0))
                        .collect();
                    lab_linear(o[0], o[1], o[2])
                })
                .collect();
            for i in 0..sim.len() {
                for j in i + 1..sim.len() {
                    let d = delta_e(sim[i], sim[j]);
                    // ΔE*ab ≥ 15 is well above "clearly different" (common practice: ~10).
                    assert!(
                        d >= 15.0,
                        "{name}: pathways {i} and {j} only ΔE {d:.1} apart"
                    );
                }
            }
        }
    }

    #[test]
    fn class_fills_darken_towards_low_omega_in_clear_steps() {
        let l: Vec<f64> = CLASS_FILLS.iter().map(|c| lab(*c)[0]).collect();
        // Neighbouring classes at least 8 L* apart, so that they stay distinct when printed
        // in grey (common practice: differences under about 5 L* are lost in print).
        for w in l.windows(2) {
            assert!(w[0] - w[1] >= 8.0, "{l:?}");
        }
        // Still light enough for black lines and text on top.
        assert!(l[l.len() - 1] >= 65.0, "{l:?}");
    }

    #[test]
    fn class_fills_stay_apart_in_greyscale() {
        // Grey level of each fill as a greyscale conversion computes it (ITU-R BT.601 luma,
        // 0.299 R + 0.587 G + 0.114 B on the 8-bit values; from memory): neighbours at least
        // 20 of 255 apart.
        let grey: Vec<f64> = CLASS_FILLS
            .iter()
            .map(|c| 0.299 * f64::from(c.0) + 0.587 * f64::from(c.1) + 0.114 * f64::from(c.2))
            .collect();
        for w in grey.windows(2) {
            assert!(w[0] - w[1] >= 20.0, "{grey:?}");
        }
    }

    #[test]
    fn styles_are_unique_for_up_to_five_pathways() {
        for count in 1..=5 {
            let styles: Vec<PathwayStyle> = (0..count).map(|i| pathway_style(i, count)).collect();
            for i in 0..count {
                for j in i + 1..count {
                    assert_ne!(styles[i].colour, styles[j].colour, "count {count}");
                    assert_ne!(styles[i].marker, styles[j].marker, "count {count}");
                    assert_ne!(styles[i].dash, styles[j].dash, "count {count}");
                }
            }
        }
        // Three pathways use the two ends and the middle of the lightness range.
        assert_eq!(pathway_style(0, 3).colour, PATHWAY_COLOURS[0]);
        assert_eq!(pathway_style(1, 3).colour, PATHWAY_COLOURS[2]);
        assert_eq!(pathway_style(2, 3).colour, PATHWAY_COLOURS[4]);
        // More than five: no panic, and the sixth differs from the first in dash or marker.
        let a = pathway_style(0, 7);
        let b = pathway_style(5, 7);
        assert!(a.marker != b.marker || a.dash != b.dash);
    }
}
