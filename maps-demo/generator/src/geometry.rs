//! Invented coastline, Voronoi districts clipped to it, and the conversion to rounded
//! longitude/latitude with shared vertices snapped so that neighbours share edges exactly.
//!
//! Shapes are built in a local plane (x = east, y = north, both in degrees of latitude,
//! so cells are not stretched), then mapped to longitude/latitude by [`Frame`].

use std::collections::BTreeMap;
use std::f64::consts::TAU;

use geo::orient::Direction;
use geo::{
    Area, BooleanOps, BoundingRect, Centroid, Contains, Coord, Distance, Euclidean, Intersects,
    LineString, MultiPoint, MultiPolygon, Orient, Point, Polygon, Rect, Validation, Voronoi,
    VoronoiClip, VoronoiParams,
};
use rand::RngExt;
use rand_distr::StandardNormal;
use rand_pcg::Pcg64;

/// Coordinates are written with 5 decimals (about a metre).
pub const COORD_SCALE: f64 = 100_000.0;

/// Maps the local plane to longitude/latitude around a centre.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Frame {
    pub lon0: f64,
    pub lat0: f64,
    pub x_per_lon: f64,
}

impl Frame {
    pub fn new(lon0: f64, lat0: f64) -> Self {
        Self {
            lon0,
            lat0,
            x_per_lon: lat0.to_radians().cos(),
        }
    }

    pub fn to_lonlat(self, c: Coord<f64>) -> Coord<f64> {
        Coord {
            x: self.lon0 + c.x / self.x_per_lon,
            y: self.lat0 + c.y,
        }
    }
}

pub fn normal(rng: &mut Pcg64, sd: f64) -> f64 {
    let z: f64 = rng.sample(StandardNormal);
    z * sd
}

/// A star-shaped blob: an ellipse whose radius is modulated by a few random harmonics.
/// Star-shaped around its centre, so the ring is always simple; vertices run counter-clockwise.
pub fn radial_blob(
    rng: &mut Pcg64,
    centre: Coord<f64>,
    rx: f64,
    ry: f64,
    vertices: usize,
    roughness: f64,
) -> Polygon<f64> {
    let harmonics: Vec<(f64, f64, f64)> = (2..=28)
        .map(|k| {
            let k = f64::from(k);
            let scale = if k <= 9.0 {
                roughness / k.powf(0.8)
            } else {
                roughness * 0.45 / k.sqrt()
            };
            let amp = scale * rng.random_range(0.3..1.0);
            (k, amp, rng.random_range(0.0..TAU))
        })
        .collect();
    let ring: Vec<Coord<f64>> = (0..vertices)
        .map(|i| {
            let theta = TAU * i as f64 / vertices as f64;
            let f: f64 = 1.0
                + harmonics
                    .iter()
                    .map(|(k, a, phase)| a * (k * theta + phase).cos())
                    .sum::<f64>();
            let f = f.max(0.35);
            Coord {
                x: centre.x + rx * f * theta.cos(),
                y: centre.y + ry * f * theta.sin(),
            }
        })
        .collect();
    Polygon::new(LineString::new(ring), vec![])
}

/// The country: a mainland and one offshore island, in the local plane.
#[derive(Debug, Clone)]
pub struct Land {
    pub mainland: Polygon<f64>,
    pub island: Polygon<f64>,
}

impl Land {
    pub fn invent(rng: &mut Pcg64) -> Self {
        let origin = Coord { x: 0.0, y: 0.0 };
        let mainland = radial_blob(rng, origin, 2.35, 1.55, 480, 0.13);
        let angle: f64 = rng.random_range(-1.2..-0.3); // south-east of the centre
        let dir = Coord {
            x: angle.cos(),
            y: angle.sin(),
        };
        let mut distance = 1.2;
        loop {
            let centre = Coord {
                x: dir.x * 2.35 * distance,
                y: dir.y * 1.55 * distance,
            };
            let island = radial_blob(rng, centre, 0.24, 0.15, 96, 0.08);
            let gap = Euclidean.distance(&island, &mainland);
            if !island.intersects(&mainland) && gap > 0.15 {
                return Self { mainland, island };
            }
            distance += 0.05;
        }
    }

    pub fn contains(&self, c: Coord<f64>) -> bool {
        self.mainland.contains(&Point::from(c))
    }
}

/// Voronoi cells of `sites`, indexed like `sites`, bounded by `clip`.
pub fn voronoi_cells(sites: &[Coord<f64>], clip: Rect<f64>) -> Result<Vec<Polygon<f64>>, String> {
    let points = MultiPoint::from(sites.iter().map(|&c| Point::from(c)).collect::<Vec<_>>());
    let clip_polygon = clip.to_polygon();
    let cells = points
        .voronoi_cells_with_params(VoronoiParams::new().clip(VoronoiClip::Polygon(&clip_polygon)))
        .map_err(|e| format!("Voronoi cells: {e}"))?;
    // The library does not promise the order of the cells: match each to the site inside it.
    let mut by_site: Vec<Option<Polygon<f64>>> = vec![None; sites.len()];
    for cell in cells {
        let site = sites
            .iter()
            .position(|&s| cell.contains(&Point::from(s)))
            .ok_or_else(|| "a Voronoi cell holds none of the sites".to_string())?;
        if by_site[site].replace(cell).is_some() {
            return Err(format!("two Voronoi cells hold site {site}"));
        }
    }
    by_site
        .into_iter()
        .enumerate()
        .map(|(i, c)| c.ok_or_else(|| format!("site {i} has no Voronoi cell")))
        .collect()
}

/// Clips each cell to the mainland.
pub fn clip_cells(cells: &[Polygon<f64>], land: &Land) -> Vec<MultiPolygon<f64>> {
    cells
        .iter()
        .map(|c| c.intersection(&land.mainland))
        .collect()
}

/// Sites scattered over the mainland, denser around the cities, at least `spacing` apart,
/// then moved towards their cells' centroids (Lloyd relaxation) `lloyd_steps` times.
pub fn district_sites(
    rng: &mut Pcg64,
    land: &Land,
    cities: &[(Coord<f64>, f64)],
    count: usize,
    spacing: f64,
    lloyd_steps: usize,
) -> Result<Vec<Coord<f64>>, String> {
    let bounds = land
        .mainland
        .bounding_rect()
        .ok_or("the coastline is empty")?;
    let total_weight: f64 = cities.iter().map(|(_, w)| w).sum();
    let mut sites: Vec<Coord<f64>> = Vec::with_capacity(count);
    let mut attempts = 0usize;
    while sites.len() < count {
        attempts += 1;
        if attempts > 1_000_000 {
            return Err(format!(
                "could not place {count} district centres {spacing} apart"
            ));
        }
        let candidate = if cities.is_empty() || rng.random_bool(0.55) {
            Coord {
                x: rng.random_range(bounds.min().x..bounds.max().x),
                y: rng.random_range(bounds.min().y..bounds.max().y),
            }
        } else {
            let mut pick = rng.random_range(0.0..total_weight);
            let mut centre = cities[0].0;
            for (c, w) in cities {
                if pick < *w {
                    centre = *c;
                    break;
                }
                pick -= w;
            }
            Coord {
                x: centre.x + normal(rng, 0.35),
                y: centre.y + normal(rng, 0.3),
            }
        };
        if !land.contains(candidate) {
            continue;
        }
        if sites
            .iter()
            .any(|s| (s.x - candidate.x).hypot(s.y - candidate.y) < spacing)
        {
            continue;
        }
        sites.push(candidate);
    }
    let clip = padded(bounds, 0.5);
    for _ in 0..lloyd_steps {
        let cells = clip_cells(&voronoi_cells(&sites, clip)?, land);
        for (site, cell) in sites.iter_mut().zip(&cells) {
            if let Some(c) = cell.centroid() {
                if land.contains(c.0) {
                    *site = c.0;
                }
            }
        }
    }
    Ok(sites)
}

pub fn padded(r: Rect<f64>, pad: f64) -> Rect<f64> {
    Rect::new(
        Coord {
            x: r.min().x - pad,
            y: r.min().y - pad,
        },
        Coord {
            x: r.max().x + pad,
            y: r.max().y + pad,
        },
    )
}

/// A vertex in units of 1e-5 degrees.
pub type Units = (i64, i64);
/// An undirected edge between two vertices, smaller end first.
pub type Edge = (Units, Units);

pub fn to_edge(a: Coord<f64>, b: Coord<f64>) -> Edge {
    let (a, b) = (to_units(a), to_units(b));
    if a < b {
        (a, b)
    } else {
        (b, a)
    }
}

pub fn to_units(c: Coord<f64>) -> Units {
    (
        (c.x * COORD_SCALE).round() as i64,
        (c.y * COORD_SCALE).round() as i64,
    )
}

fn from_units(u: Units) -> Coord<f64> {
    Coord {
        x: u.0 as f64 / COORD_SCALE,
        y: u.1 as f64 / COORD_SCALE,
    }
}

/// Rounds coordinates to 5 decimals and makes vertices that several shapes compute
/// independently (and so may round one unit apart) identical: the first vertex seen
/// within one unit in each direction is used for all later ones.
#[derive(Debug, Default)]
pub struct Snapper {
    canonical: BTreeMap<Units, Units>,
}

impl Snapper {
    pub fn new() -> Self {
        Self::default()
    }

    fn snap(&mut self, c: Coord<f64>) -> Units {
        let u = to_units(c);
        if let Some(&known) = self.canonical.get(&u) {
            return known;
        }
        for dx in -1..=1 {
            for dy in -1..=1 {
                if let Some(&known) = self.canonical.get(&(u.0 + dx, u.1 + dy)) {
                    self.canonical.insert(u, known);
                    return known;
                }
            }
        }
        self.canonical.insert(u, u);
        u
    }

    fn ring(
        &mut self,
        ring: &LineString<f64>,
        map: impl Fn(Coord<f64>) -> Coord<f64>,
    ) -> Option<LineString<f64>> {
        let mut units: Vec<Units> = Vec::with_capacity(ring.0.len());
        for &c in &ring.0 {
            let u = self.snap(map(c));
            if units.last() != Some(&u) {
                units.push(u);
            }
        }
        while units.len() > 1 && units.first() == units.last() {
            units.pop();
        }
        // Drop spikes (a vertex that goes and comes straight back).
        let mut changed = true;
        while changed && units.len() >= 3 {
            changed = false;
            let n = units.len();
            for i in 0..n {
                if units[(i + n - 1) % n] == units[(i + 1) % n] {
                    units.remove(i);
                    let j = i % units.len();
                    units.remove(j);
                    changed = true;
                    break;
                }
            }
        }
        if units.len() < 3 {
            return None;
        }
        Some(LineString::new(units.into_iter().map(from_units).collect()))
    }

    /// Maps a shape to longitude/latitude, rounds and snaps it, drops rings that collapse,
    /// and orients it the RFC 7946 way (exteriors counter-clockwise).
    pub fn shape(
        &mut self,
        shape: &MultiPolygon<f64>,
        map: impl Fn(Coord<f64>) -> Coord<f64> + Copy,
    ) -> MultiPolygon<f64> {
        let polygons = shape
            .0
            .iter()
            .filter_map(|p| {
                let exterior = self.ring(p.exterior(), map)?;
                let interiors = p
                    .interiors()
                    .iter()
                    .filter_map(|r| self.ring(r, map))
                    .collect();
                let polygon = Polygon::new(exterior, interiors);
                (polygon.unsigned_area() > 0.0).then_some(polygon)
            })
            .collect();
        MultiPolygon::new(polygons).orient(Direction::Default)
    }
}

/// Checks what the GeoJSON promises: valid shapes, closed rings, exteriors counter-clockwise.
pub fn check_shape(shape: &MultiPolygon<f64>) -> Result<(), String> {
    if shape.0.is_empty() {
        return Err("no polygon left".into());
    }
    shape
        .check_validation()
        .map_err(|e| format!("invalid shape: {e}"))?;
    for p in &shape.0 {
        if !p.exterior().is_closed() || p.interiors().iter().any(|r| !r.is_closed()) {
            return Err("ring not closed".into());
        }
        if p.exterior().signed_area_ccw() <= 0.0 {
            return Err("exterior ring is not counter-clockwise".into());
        }
    }
    Ok(())
}

trait SignedRingArea {
    fn signed_area_ccw(&self) -> f64;
}

impl SignedRingArea for LineString<f64> {
    fn signed_area_ccw(&self) -> f64 {
        Polygon::new(self.clone(), vec![]).signed_area()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;

    #[test]
    fn blobs_are_valid_and_counter_clockwise() {
        let mut rng = Pcg64::seed_from_u64(11);
        for _ in 0..20 {
            let blob = radial_blob(&mut rng, Coord { x: 1.0, y: 2.0 }, 2.0, 1.0, 200, 0.12);
            assert!(blob.is_valid());
            assert!(blob.signed_area() > 0.0);
        }
    }

    #[test]
    fn voronoi_cells_follow_their_sites() {
        let sites = [
            Coord { x: 0.0, y: 0.0 },
            Coord { x: 1.0, y: 0.1 },
            Coord { x: 0.4, y: 1.0 },
            Coord { x: 1.2, y: 1.3 },
        ];
        let clip = Rect::new(Coord { x: -2.0, y: -2.0 }, Coord { x: 3.0, y: 3.0 });
        let cells = voronoi_cells(&sites, clip).unwrap();
        assert_eq!(cells.len(), sites.len());
        for (site, cell) in sites.iter().zip(&cells) {
            assert!(cell.contains(&Point::from(*site)));
        }
        let total: f64 = cells.iter().map(|c| c.unsigned_area()).sum();
        // Clipping works on a fine integer grid, hence the tolerance.
        assert!(
            (total - 25.0).abs() < 1e-6,
            "cells cover the clip box: {total}"
        );
    }

    #[test]
    fn snapping_merges_vertices_one_unit_apart() {
        let mut snapper = Snapper::new();
        let a = snapper.snap(Coord {
            x: 1.000_004_9,
            y: 2.0,
        });
        let b = snapper.snap(Coord {
            x: 1.000_005_1,
            y: 2.0,
        });
        assert_eq!(a, b);
        let c = snapper.snap(Coord {
            x: 1.000_03,
            y: 2.0,
        });
        assert_ne!(a, c);
    }

    #[test]
    fn shapes_come_out_counter_clockwise() {
        let clockwise = Polygon::new(
            LineString::from(vec![
                (0.0, 0.0),
                (0.0, 1.0),
                (1.0, 1.0),
                (1.0, 0.0),
                (0.0, 0.0),
            ]),
            vec![],
        );
        let mut snapper = Snapper::new();
        let shape = snapper.shape(&MultiPolygon::new(vec![clockwise]), |c| c);
        check_shape(&shape).unwrap();
    }
}
