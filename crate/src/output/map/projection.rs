//! Albers equal-area conic projection on the sphere, and the fit of projected
//! coordinates into an SVG viewport.
//!
//! The projection formulas are those for the sphere in Snyder, J. P. (1987),
//! *Map Projections — A Working Manual*, U.S. Geological Survey Professional
//! Paper 1395, section "Albers Equal-Area Conic":
//!
//! ```text
//! n  = (sin φ1 + sin φ2) / 2
//! C  = cos² φ1 + 2 n sin φ1
//! ρ  = R √(C − 2 n sin φ) / n        ρ0 = R √(C − 2 n sin φ0) / n
//! θ  = n (λ − λ0)
//! x  = ρ sin θ                        y  = ρ0 − ρ cos θ
//! ```
//!
//! When the two standard parallels are symmetric about the equator, `n` is 0
//! and the cone becomes a cylinder; the limit of the formulas is then the
//! cylindrical equal-area projection with standard parallel φ1
//! (`x = R (λ − λ0) cos φ1`, `y = R (sin φ − sin φ0) / cos φ1`), which is used
//! for `|n|` below [`CYLINDRICAL_LIMIT`].

use geo::{Coord, Rect};

/// Below this `|n|` the cone is treated as its limiting cylinder (see the
/// module documentation); the two formulas agree to far better than a pixel there.
pub const CYLINDRICAL_LIMIT: f64 = 1e-6;

/// Fraction of the target width kept free on each side of the map.
pub const MARGIN_FRACTION: f64 = 0.025;

/// The tallest map, as a multiple of its width; taller extents are scaled down
/// to fit this height and centred horizontally.
pub const MAX_ASPECT: f64 = 2.0;

/// Width used when the requested width is not a positive finite number.
pub const DEFAULT_WIDTH: f64 = 800.0;

/// An Albers equal-area conic projection on the unit sphere (R = 1).
///
/// Angles are given in degrees; [`Albers::project`] takes longitude and latitude
/// in degrees and returns plane coordinates in units of the sphere's radius,
/// with y pointing north.
///
/// ```
/// use stratamap::output::map::projection::Albers;
/// // Standard parallels 29.5° and 45.5° N, origin 23° N 96° W.
/// let albers = Albers::new(29.5, 45.5, 23.0, -96.0);
/// let origin = albers.project(-96.0, 23.0);
/// assert!(origin.x.abs() < 1e-12 && origin.y.abs() < 1e-12);
/// // East of the central meridian maps to positive x.
/// assert!(albers.project(-80.0, 30.0).x > 0.0);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Albers {
    lambda0: f64,
    n: f64,
    c: f64,
    rho0: f64,
    sin_phi0: f64,
    cos_phi1: f64,
}

impl Albers {
    /// A projection with standard parallels `phi1`, `phi2`, origin latitude `phi0`
    /// and central meridian `lambda0`, all in degrees.
    pub fn new(phi1: f64, phi2: f64, phi0: f64, lambda0: f64) -> Self {
        let (sin1, cos1) = phi1.to_radians().sin_cos();
        let sin2 = phi2.to_radians().sin();
        let sin_phi0 = phi0.to_radians().sin();
        let n = (sin1 + sin2) / 2.0;
        let c = cos1 * cos1 + 2.0 * n * sin1;
        let rho0 = (c - 2.0 * n * sin_phi0).max(0.0).sqrt() / n;
        Albers {
            lambda0: lambda0.to_radians(),
            n,
            c,
            rho0,
            sin_phi0,
            cos_phi1: cos1,
        }
    }

    /// The projection for a longitude/latitude extent (degrees): standard
    /// parallels at 1/6 and 5/6 of the latitude range, origin latitude and
    /// central meridian at the extent's centre.
    ///
    /// ```
    /// use geo::{coord, Rect};
    /// use stratamap::output::map::projection::Albers;
    /// let extent = Rect::new(coord! { x: 10.0, y: 40.0 }, coord! { x: 20.0, y: 46.0 });
    /// assert_eq!(Albers::for_extent(extent), Albers::new(41.0, 45.0, 43.0, 15.0));
    /// ```
    pub fn for_extent(extent: Rect<f64>) -> Self {
        let (min, max) = (extent.min(), extent.max());
        let span = max.y - min.y;
        Albers::new(
            min.y + span / 6.0,
            min.y + span * 5.0 / 6.0,
            (min.y + max.y) / 2.0,
            (min.x + max.x) / 2.0,
        )
    }

    /// Projects a longitude/latitude pair (degrees) onto the plane (R = 1).
    ///
    /// Longitudes are not wrapped: a dataset is drawn on the side of the central
    /// meridian where its numbers put it.
    pub fn project(&self, lon: f64, lat: f64) -> Coord<f64> {
        let dlambda = lon.to_radians() - self.lambda0;
        let sin_phi = lat.to_radians().sin();
        if self.n.abs() < CYLINDRICAL_LIMIT {
            return Coord {
                x: dlambda * self.cos_phi1,
                y: (sin_phi - self.sin_phi0) / self.cos_phi1,
            };
        }
        let rho = (self.c - 2.0 * self.n * sin_phi).max(0.0).sqrt() / self.n;
        let (sin_t, cos_t) = (self.n * dlambda).sin_cos();
        Coord {
            x: rho * sin_t,
            y: self.rho0 - rho * cos_t,
        }
    }
}

/// A uniform scale with the y axis flipped, placing projected coordinates in an
/// SVG viewport `width` × `height` (user units, y down), centred, with a margin
/// of [`MARGIN_FRACTION`] of the width on each side.
///
/// ```
/// use geo::{coord, Rect};
/// use stratamap::output::map::projection::Fit;
/// let fit = Fit::new(Some(Rect::new(coord! { x: 0.0, y: 0.0 }, coord! { x: 2.0, y: 1.0 })), 800.0);
/// assert_eq!(fit.width, 800.0);
/// assert_eq!(fit.height, 420.0); // 760 × 380 of map plus 20 on each side
/// let top_left = fit.apply(coord! { x: 0.0, y: 1.0 });
/// assert!((top_left.x - 20.0).abs() < 1e-9 && (top_left.y - 20.0).abs() < 1e-9);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fit {
    /// SVG units per projected unit.
    pub scale: f64,
    /// Projected point that lands at the viewport's centre.
    pub centre: Coord<f64>,
    /// Viewport width (user units).
    pub width: f64,
    /// Viewport height (user units).
    pub height: f64,
}

impl Fit {
    /// Fits the projected `bounds` into `width` (user units). `None`, or an
    /// extent that is a single point, gives a viewport half as tall as it is
    /// wide with every point at its centre.
    pub fn new(bounds: Option<Rect<f64>>, width: f64) -> Self {
        let width = if width.is_finite() && width > 0.0 {
            width
        } else {
            DEFAULT_WIDTH
        };
        let margin = width * MARGIN_FRACTION;
        let degenerate = Fit {
            scale: 0.0,
            centre: bounds.map_or(Coord { x: 0.0, y: 0.0 }, |b| b.center()),
            width,
            height: width / 2.0,
        };
        let Some(b) = bounds else {
            return degenerate;
        };
        let (pw, ph) = (b.width(), b.height());
        if !(pw.is_finite() && ph.is_finite()) {
            return degenerate;
        }
        let inner_w = width - 2.0 * margin;
        let inner_h = width * MAX_ASPECT - 2.0 * margin;
        let by_width = if pw > 0.0 {
            inner_w / pw
        } else {
            f64::INFINITY
        };
        let by_height = if ph > 0.0 {
            inner_h / ph
        } else {
            f64::INFINITY
        };
        let scale = by_width.min(by_height);
        if !scale.is_finite() || scale <= 0.0 {
            return degenerate;
        }
        // A flat extent (zero height) still gets a usable strip.
        let height = (ph * scale + 2.0 * margin).max(width / 4.0);
        Fit {
            scale,
            centre: b.center(),
            width,
            height,
        }
    }

    /// Maps a projected point to SVG user units (y down).
    pub fn apply(&self, c: Coord<f64>) -> Coord<f64> {
        Coord {
            x: self.width / 2.0 + (c.x - self.centre.x) * self.scale,
            y: self.height / 2.0 - (c.y - self.centre.y) * self.scale,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::{coord, Area, LineString, Polygon};

    /// From memory, Snyder 1987 numerical example (Albers, sphere): R = 1,
    /// φ1 = 29.5°, φ2 = 45.5°, φ0 = 23°, λ0 = −96°; φ = 35° N, λ = 75° W
    /// gives x = 0.2952720, y = 0.2416774.
    #[test]
    fn snyder_sphere_example() {
        let p = Albers::new(29.5, 45.5, 23.0, -96.0).project(-75.0, 35.0);
        assert!((p.x - 0.2952720).abs() < 5e-7, "x = {}", p.x);
        assert!((p.y - 0.2416774).abs() < 5e-7, "y = {}", p.y);
    }

    /// The area on the unit sphere of the zone between latitudes φ1 and φ2
    /// over a longitude span Δλ is Δλ (sin φ2 − sin φ1) (the published
    /// spherical zone area formula); an equal-area projection must keep it.
    fn check_box_area(albers: &Albers, lon: (f64, f64), lat: (f64, f64)) {
        const STEPS: usize = 2000;
        let mut ring = Vec::with_capacity(4 * STEPS + 1);
        let lerp = |a: f64, b: f64, i: usize| a + (b - a) * i as f64 / STEPS as f64;
        for i in 0..STEPS {
            ring.push(albers.project(lerp(lon.0, lon.1, i), lat.0));
        }
        for i in 0..STEPS {
            ring.push(albers.project(lon.1, lerp(lat.0, lat.1, i)));
        }
        for i in 0..STEPS {
            ring.push(albers.project(lerp(lon.1, lon.0, i), lat.1));
        }
        for i in 0..STEPS {
            ring.push(albers.project(lon.0, lerp(lat.1, lat.0, i)));
        }
        let projected = Polygon::new(LineString::from(ring), vec![]).unsigned_area();
        let zone =
            (lon.1 - lon.0).to_radians() * (lat.1.to_radians().sin() - lat.0.to_radians().sin());
        let rel = (projected - zone).abs() / zone;
        assert!(
            rel < 1e-6,
            "relative area error {rel:e} for {lon:?} {lat:?}"
        );
    }

    #[test]
    fn equal_area_small_boxes() {
        let albers = Albers::new(29.5, 45.5, 23.0, -96.0);
        check_box_area(&albers, (-100.0, -99.0), (30.0, 31.0));
        check_box_area(&albers, (-80.0, -79.5), (50.0, 50.5));
        check_box_area(&albers, (-120.0, -118.0), (10.0, 11.0));
        // Symmetric parallels: the cylindrical limit must be equal-area too.
        let cylinder = Albers::new(-20.0, 20.0, 0.0, 5.0);
        check_box_area(&cylinder, (4.0, 5.0), (-1.0, 0.5));
        // Southern hemisphere (n < 0).
        let south = Albers::new(-40.0, -20.0, -30.0, 140.0);
        check_box_area(&south, (141.0, 142.0), (-35.0, -34.0));
    }

    #[test]
    fn cylinder_limit_is_continuous() {
        // Just above the limit the conic formula must agree with the cylinder.
        let cone = Albers::new(-10.0, 10.0 + 2e-4, 0.0, 0.0);
        let cyl = Albers::new(-10.0, 10.0, 0.0, 0.0);
        let (a, b) = (cone.project(3.0, 4.0), cyl.project(3.0, 4.0));
        assert!(
            (a.x - b.x).abs() < 1e-5 && (a.y - b.y).abs() < 1e-5,
            "{a:?} {b:?}"
        );
    }

    #[test]
    fn fit_keeps_width_and_handles_degenerate_extents() {
        let flat = Rect::new(coord! { x: 0.0, y: 3.0 }, coord! { x: 5.0, y: 3.0 });
        let f = Fit::new(Some(flat), 800.0);
        assert_eq!(f.width, 800.0);
        assert!(f.height > 0.0 && f.height.is_finite());
        let mid = f.apply(coord! { x: 2.5, y: 3.0 });
        assert!((mid.x - 400.0).abs() < 1e-9 && (mid.y - f.height / 2.0).abs() < 1e-9);

        let point = Rect::new(coord! { x: 1.0, y: 1.0 }, coord! { x: 1.0, y: 1.0 });
        let f = Fit::new(Some(point), 800.0);
        assert_eq!(
            f.apply(coord! { x: 1.0, y: 1.0 }),
            coord! { x: 400.0, y: 200.0 }
        );

        let f = Fit::new(None, f64::NAN);
        assert_eq!((f.width, f.height), (DEFAULT_WIDTH, DEFAULT_WIDTH / 2.0));

        // A tall extent is limited to MAX_ASPECT and centred horizontally.
        let tall = Rect::new(coord! { x: 0.0, y: 0.0 }, coord! { x: 1.0, y: 100.0 });
        let f = Fit::new(Some(tall), 800.0);
        assert!((f.height - 1600.0).abs() < 1e-9);
        let left = f.apply(coord! { x: 0.0, y: 50.0 });
        let right = f.apply(coord! { x: 1.0, y: 50.0 });
        assert!(((left.x + right.x) / 2.0 - 400.0).abs() < 1e-9);
    }
}
