//! Pinch-zoom and pan of the tray with two fingers: the gesture's arithmetic, apart from the DOM so
//! it is tested natively. The content point under the fingers' midpoint stays under it, the zoom
//! stays between 1 and [`Zoom::MAX`], and the zoomed tray always covers its frame.

/// A zoom of the tray within its frame: content point p shows at `scale`·p + (x, y).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Zoom {
    /// Magnification, 1 to [`Zoom::MAX`].
    pub scale: f64,
    /// Horizontal shift, px (≤ 0).
    pub x: f64,
    /// Vertical shift, px (≤ 0).
    pub y: f64,
}

fn mid(p: [(f64, f64); 2]) -> (f64, f64) {
    (0.5 * (p[0].0 + p[1].0), 0.5 * (p[0].1 + p[1].1))
}

fn apart(p: [(f64, f64); 2]) -> f64 {
    (p[0].0 - p[1].0).hypot(p[0].1 - p[1].1)
}

impl Zoom {
    /// No zoom.
    pub const NONE: Zoom = Zoom {
        scale: 1.0,
        x: 0.0,
        y: 0.0,
    };
    /// Largest magnification.
    pub const MAX: f64 = 6.0;

    /// The zoom after two fingers moved from `from` to `to` (points in the frame, px), starting
    /// from this zoom, in a frame of `size` (width, height) px.
    pub fn pinched(self, from: [(f64, f64); 2], to: [(f64, f64); 2], size: (f64, f64)) -> Zoom {
        let scale = (self.scale * apart(to) / apart(from).max(1.0)).clamp(1.0, Self::MAX);
        let (m0, m1) = (mid(from), mid(to));
        // The content point under the first midpoint, kept under the second.
        let (cx, cy) = ((m0.0 - self.x) / self.scale, (m0.1 - self.y) / self.scale);
        let cover = |shift: f64, length: f64| shift.clamp(length * (1.0 - scale), 0.0);
        Zoom {
            scale,
            x: cover(m1.0 - cx * scale, size.0),
            y: cover(m1.1 - cy * scale, size.1),
        }
    }

    /// The CSS transform (with the origin at the top left).
    pub fn css(self) -> String {
        format!(
            "translate({:.1}px, {:.1}px) scale({:.4})",
            self.x, self.y, self.scale
        )
    }
}

#[cfg(test)]
mod tests {
    use super::Zoom;

    const FRAME: (f64, f64) = (400.0, 300.0);

    #[test]
    fn spreading_the_fingers_twice_as_far_doubles_the_zoom_about_their_midpoint() {
        let z = Zoom::NONE.pinched(
            [(150.0, 150.0), (250.0, 150.0)],
            [(100.0, 150.0), (300.0, 150.0)],
            FRAME,
        );
        assert_eq!(z.scale, 2.0);
        // The content point at the midpoint (200, 150) still shows there.
        assert_eq!(
            (200.0 * z.scale + z.x, 150.0 * z.scale + z.y),
            (200.0, 150.0)
        );
    }

    #[test]
    fn moving_both_fingers_pans_and_the_tray_keeps_covering_its_frame() {
        let z = Zoom::NONE.pinched(
            [(150.0, 150.0), (250.0, 150.0)],
            [(100.0, 150.0), (300.0, 150.0)],
            FRAME,
        );
        let panned = z.pinched(
            [(100.0, 150.0), (300.0, 150.0)],
            [(80.0, 150.0), (280.0, 150.0)],
            FRAME,
        );
        assert_eq!(panned.scale, 2.0);
        assert_eq!(panned.x, z.x - 20.0);
        let far = z.pinched(
            [(100.0, 150.0), (300.0, 150.0)],
            [(1100.0, 150.0), (1300.0, 150.0)],
            FRAME,
        );
        assert_eq!(far.x, 0.0, "never shows past the tray's left edge");
    }

    #[test]
    fn the_zoom_stays_between_one_and_the_most() {
        let out = Zoom::NONE.pinched(
            [(100.0, 100.0), (300.0, 100.0)],
            [(190.0, 100.0), (210.0, 100.0)],
            FRAME,
        );
        assert_eq!(out, Zoom::NONE);
        let lots = Zoom::NONE.pinched(
            [(199.0, 100.0), (201.0, 100.0)],
            [(0.0, 100.0), (400.0, 100.0)],
            FRAME,
        );
        assert_eq!(lots.scale, Zoom::MAX);
    }
}
