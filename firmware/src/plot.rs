//! What the small plots share: a linear value-to-pixel map and clipped polylines.

use crate::ui::{row_box, Align, Font, Inspect, Painter, BODY_W, MARGIN};
use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::*;
use embedded_graphics::primitives::Rectangle;

/// A linear map of a value range onto pixels. Values far outside the range (or not
/// finite) are held a few box widths away, so a clipped line still points the right way
/// and no pixel arithmetic can overflow.
#[derive(Debug, Clone, Copy)]
pub struct Axis {
    /// Value at `p0`.
    pub lo: f64,
    /// Value at `p1`.
    pub hi: f64,
    /// Pixel of `lo`.
    pub p0: i32,
    /// Pixel of `hi`.
    pub p1: i32,
}

impl Axis {
    /// The pixel of value `v`.
    pub fn at(&self, v: f64) -> i32 {
        let t = if self.hi > self.lo {
            (v - self.lo) / (self.hi - self.lo)
        } else {
            0.5
        };
        let t = if t.is_finite() {
            t.clamp(-4.0, 5.0)
        } else {
            0.5
        };
        self.p0 + (t * (self.p1 - self.p0) as f64) as i32
    }
}

/// The box inside a 1-pixel frame.
pub fn inside(area: Rectangle) -> Rectangle {
    Rectangle::new(
        area.top_left + Point::new(1, 1),
        area.size.saturating_sub(Size::new(2, 2)),
    )
}

/// Draw a polyline through `pts`, `width` pixels thick, dashed (every other segment) or
/// not, with nothing inked outside `area`.
pub fn polyline<D, I>(
    p: &mut Painter<'_, D, I>,
    area: Rectangle,
    pts: impl Iterator<Item = Point>,
    width: u32,
    dashed: bool,
) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let mut last: Option<Point> = None;
    for (i, q) in pts.enumerate() {
        if let Some(a) = last {
            if !dashed || i % 2 == 0 {
                p.line_in(area, a, q, width)?;
            }
        }
        last = Some(q);
    }
    Ok(())
}

/// A plot's scales: one line of body text per row from the top of the body.
pub fn scale_rows<D, I>(p: &mut Painter<'_, D, I>, rows: &[&str]) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    for (r, t) in rows.iter().enumerate() {
        p.text(
            row_box(r, MARGIN, BODY_W),
            t,
            Font::Body,
            Align::Left,
            false,
        )?;
    }
    Ok(())
}

/// A dashed horizontal line at row `y` across `area` (4 px ink, 4 px gap).
pub fn dashed_row<D, I>(p: &mut Painter<'_, D, I>, area: Rectangle, y: i32) -> Result<(), D::Error>
where
    D: DrawTarget<Color = BinaryColor>,
    I: Inspect,
{
    let left = area.top_left.x;
    let right = left + area.size.width as i32 - 1;
    let mut c = left;
    while c < right {
        p.line_in(area, Point::new(c, y), Point::new((c + 3).min(right), y), 1)?;
        c += 8;
    }
    Ok(())
}

/// A target for the plots' unit tests.
#[cfg(test)]
pub(crate) mod testing {
    use embedded_graphics::pixelcolor::BinaryColor;
    use embedded_graphics::prelude::*;
    use embedded_graphics::primitives::Rectangle;

    /// Counts inked pixels inside and outside a box of the 400×240 screen.
    pub struct Ink {
        pub area: Rectangle,
        pub inside: usize,
        pub outside: usize,
    }
    impl Ink {
        pub fn new(area: Rectangle) -> Self {
            Ink {
                area,
                inside: 0,
                outside: 0,
            }
        }
    }
    impl OriginDimensions for Ink {
        fn size(&self) -> Size {
            Size::new(400, 240)
        }
    }
    impl DrawTarget for Ink {
        type Color = BinaryColor;
        type Error = core::convert::Infallible;
        fn draw_iter<It: IntoIterator<Item = Pixel<BinaryColor>>>(
            &mut self,
            pixels: It,
        ) -> Result<(), Self::Error> {
            for Pixel(q, c) in pixels {
                if c == BinaryColor::On {
                    if self.area.contains(q) {
                        self.inside += 1;
                    } else {
                        self.outside += 1;
                    }
                }
            }
            Ok(())
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn axis_maps_ends_and_holds_wild_values_near_the_box() {
        let a = Axis {
            lo: 0.0,
            hi: 10.0,
            p0: 100,
            p1: 0,
        };
        assert_eq!(a.at(0.0), 100);
        assert_eq!(a.at(10.0), 0);
        assert_eq!(a.at(5.0), 50);
        assert_eq!(a.at(1e300), -400);
        assert_eq!(a.at(-1e300), 500);
        assert_eq!(a.at(f64::NAN), 50);
        let flat = Axis { hi: 0.0, ..a };
        assert_eq!(flat.at(3.0), 50);
    }
}
