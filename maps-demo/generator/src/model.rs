//! The dataset as the generator holds it and the files it writes (SPEC 1); its figures
//! (used to tune the demo and to print a summary) come from stratamap's own tally.

use std::fmt::Write as _;
use std::fs;
use std::path::Path;

use geo::MultiPolygon;
use serde::Serialize;

/// Fixed-point scale of turnout and electorate shares: 4 decimals.
pub const SHARE_UNITS: u32 = 10_000;
/// Fixed-point scale of poll shares: 3 decimals.
pub const POLL_UNITS: u32 = 1_000;

#[derive(Debug, Clone, PartialEq)]
pub struct Party {
    pub id: String,
    pub name: String,
    pub color: String,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Group {
    pub id: String,
    pub name: String,
}

#[derive(Debug, Clone, PartialEq)]
pub struct District {
    pub id: String,
    pub name: String,
    pub seats: u32,
    pub region: Option<String>,
    /// Longitude/latitude, every coordinate already rounded to 5 decimals,
    /// exteriors counter-clockwise, interiors clockwise.
    pub geometry: MultiPolygon<f64>,
}

/// One (district, group) row of `electorate.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct Row {
    pub district: usize,
    pub group: usize,
    pub eligible: u64,
    /// Baseline turnout in units of 1/SHARE_UNITS.
    pub turnout: u32,
    /// Baseline vote shares in units of 1/SHARE_UNITS, one per party, summing to SHARE_UNITS.
    pub shares: Vec<u32>,
}

/// One group's row of `poll.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct PollRow {
    pub group: usize,
    pub sample_size: u32,
    /// Shares in units of 1/POLL_UNITS, summing to POLL_UNITS.
    pub shares: Vec<u32>,
    /// Design effect in hundredths (135 = 1.35).
    pub design_effect: u32,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Preset {
    pub name: String,
    pub scenario: String,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Dataset {
    pub title: String,
    pub source: String,
    pub parties: Vec<Party>,
    /// Indices into `parties`: the margin sliders move from the second to the first.
    pub axis: [usize; 2],
    pub groups: Vec<Group>,
    pub districts: Vec<District>,
    pub rows: Vec<Row>,
    pub poll: Vec<PollRow>,
    pub presets: Vec<Preset>,
}

pub const MANIFEST_FILE: &str = "dataset.json";
pub const DISTRICTS_FILE: &str = "districts.geojson";
pub const ELECTORATE_FILE: &str = "electorate.csv";
pub const POLL_FILE: &str = "poll.csv";

/// Formats a fixed-point value exactly, e.g. `units_to_decimal(4123, 10_000)` is `0.4123`.
pub fn units_to_decimal(value: u32, scale: u32) -> String {
    let digits = scale.ilog10() as usize;
    format!(
        "{}.{:0width$}",
        value / scale,
        value % scale,
        width = digits
    )
}

/// Rounds non-negative weights to integer units that sum to exactly `total`
/// (largest remainder; ties go to the lower index, so the result is deterministic).
pub fn round_to_units(weights: &[f64], total: u32) -> Vec<u32> {
    let sum: f64 = weights.iter().map(|w| w.max(0.0)).sum();
    if weights.is_empty() {
        return Vec::new();
    }
    if sum <= 0.0 || !sum.is_finite() {
        let mut out = vec![0; weights.len()];
        out[0] = total;
        return out;
    }
    let scaled: Vec<f64> = weights
        .iter()
        .map(|w| w.max(0.0) / sum * f64::from(total))
        .collect();
    let mut out: Vec<u32> = scaled.iter().map(|s| s.floor() as u32).collect();
    let assigned: u32 = out.iter().sum();
    let mut order: Vec<usize> = (0..weights.len()).collect();
    order.sort_by(|&a, &b| {
        let fa = scaled[a] - scaled[a].floor();
        let fb = scaled[b] - scaled[b].floor();
        fb.total_cmp(&fa).then(a.cmp(&b))
    });
    for &i in order
        .iter()
        .cycle()
        .take(total.saturating_sub(assigned) as usize)
    {
        out[i] += 1;
    }
    out
}

#[derive(Serialize)]
struct ManifestParty<'a> {
    id: &'a str,
    name: &'a str,
    color: &'a str,
}

#[derive(Serialize)]
struct ManifestGroup<'a> {
    id: &'a str,
    name: &'a str,
}

#[derive(Serialize)]
struct Manifest<'a> {
    title: &'a str,
    source: &'a str,
    parties: Vec<ManifestParty<'a>>,
    axis: [&'a str; 2],
    groups: Vec<ManifestGroup<'a>>,
    districts: &'a str,
    electorate: &'a str,
    #[serde(skip_serializing_if = "Option::is_none")]
    poll: Option<&'a str>,
    #[serde(skip_serializing_if = "<[Preset]>::is_empty")]
    presets: &'a [Preset],
}

#[derive(Serialize)]
struct FeatureProperties<'a> {
    id: &'a str,
    name: &'a str,
    seats: u32,
    #[serde(skip_serializing_if = "Option::is_none")]
    region: Option<&'a str>,
}

#[derive(Serialize)]
struct FeatureOut<'a> {
    #[serde(rename = "type")]
    kind: &'static str,
    properties: FeatureProperties<'a>,
    geometry: geojson::Geometry,
}

fn geometry_value(geometry: &MultiPolygon<f64>) -> geojson::Geometry {
    let ring =
        |ls: &geo::LineString<f64>| -> Vec<[f64; 2]> { ls.0.iter().map(|c| [c.x, c.y]).collect() };
    let polygon = |p: &geo::Polygon<f64>| -> Vec<Vec<[f64; 2]>> {
        std::iter::once(ring(p.exterior()))
            .chain(p.interiors().iter().map(ring))
            .collect()
    };
    if geometry.0.len() == 1 {
        geojson::Geometry::new_polygon(polygon(&geometry.0[0]))
    } else {
        geojson::Geometry::new_multi_polygon(geometry.0.iter().map(polygon))
    }
}

impl Dataset {
    pub fn total_seats(&self) -> u32 {
        self.districts.iter().map(|d| d.seats).sum()
    }

    /// SPEC 1.1 default majority: floor(total seats / 2) + 1.
    pub fn majority(&self) -> u32 {
        self.total_seats() / 2 + 1
    }

    pub fn manifest_json(&self) -> Result<String, String> {
        let manifest = Manifest {
            title: &self.title,
            source: &self.source,
            parties: self
                .parties
                .iter()
                .map(|p| ManifestParty {
                    id: &p.id,
                    name: &p.name,
                    color: &p.color,
                })
                .collect(),
            axis: [
                &self.parties[self.axis[0]].id,
                &self.parties[self.axis[1]].id,
            ],
            groups: self
                .groups
                .iter()
                .map(|g| ManifestGroup {
                    id: &g.id,
                    name: &g.name,
                })
                .collect(),
            districts: DISTRICTS_FILE,
            electorate: ELECTORATE_FILE,
            poll: (!self.poll.is_empty()).then_some(POLL_FILE),
            presets: &self.presets,
        };
        let mut text = serde_json::to_string_pretty(&manifest)
            .map_err(|e| format!("serialising {MANIFEST_FILE}: {e}"))?;
        text.push('\n');
        Ok(text)
    }

    /// The FeatureCollection with one feature per line, so that a diff shows which districts changed.
    pub fn districts_geojson(&self) -> Result<String, String> {
        let mut text = String::from("{\"type\":\"FeatureCollection\",\"features\":[\n");
        for (i, d) in self.districts.iter().enumerate() {
            let feature = FeatureOut {
                kind: "Feature",
                properties: FeatureProperties {
                    id: &d.id,
                    name: &d.name,
                    seats: d.seats,
                    region: d.region.as_deref(),
                },
                geometry: geometry_value(&d.geometry),
            };
            let line = serde_json::to_string(&feature)
                .map_err(|e| format!("serialising {DISTRICTS_FILE} feature {i}: {e}"))?;
            text.push_str(&line);
            text.push_str(if i + 1 < self.districts.len() {
                ",\n"
            } else {
                "\n"
            });
        }
        text.push_str("]}\n");
        Ok(text)
    }

    pub fn electorate_csv(&self) -> Result<String, String> {
        let mut w = csv::Writer::from_writer(Vec::new());
        let mut header = vec!["district", "group", "eligible", "turnout"];
        header.extend(self.parties.iter().map(|p| p.id.as_str()));
        w.write_record(&header)
            .map_err(|e| format!("writing {ELECTORATE_FILE} header: {e}"))?;
        for (i, r) in self.rows.iter().enumerate() {
            let mut record = vec![
                self.districts[r.district].id.clone(),
                self.groups[r.group].id.clone(),
                r.eligible.to_string(),
                units_to_decimal(r.turnout, SHARE_UNITS),
            ];
            record.extend(r.shares.iter().map(|&s| units_to_decimal(s, SHARE_UNITS)));
            w.write_record(&record)
                .map_err(|e| format!("writing {ELECTORATE_FILE} row {}: {e}", i + 2))?;
        }
        let bytes = w
            .into_inner()
            .map_err(|e| format!("writing {ELECTORATE_FILE}: {e}"))?;
        String::from_utf8(bytes).map_err(|e| format!("writing {ELECTORATE_FILE}: {e}"))
    }

    pub fn poll_csv(&self) -> Result<String, String> {
        let mut w = csv::Writer::from_writer(Vec::new());
        let mut header = vec!["group", "sample_size"];
        header.extend(self.parties.iter().map(|p| p.id.as_str()));
        header.push("design_effect");
        w.write_record(&header)
            .map_err(|e| format!("writing {POLL_FILE} header: {e}"))?;
        for (i, p) in self.poll.iter().enumerate() {
            let mut record = vec![self.groups[p.group].id.clone(), p.sample_size.to_string()];
            record.extend(p.shares.iter().map(|&s| units_to_decimal(s, POLL_UNITS)));
            record.push(units_to_decimal(p.design_effect, 100));
            w.write_record(&record)
                .map_err(|e| format!("writing {POLL_FILE} row {}: {e}", i + 2))?;
        }
        let bytes = w
            .into_inner()
            .map_err(|e| format!("writing {POLL_FILE}: {e}"))?;
        String::from_utf8(bytes).map_err(|e| format!("writing {POLL_FILE}: {e}"))
    }

    /// Every file of the dataset as (file name, contents), in a fixed order.
    pub fn files(&self) -> Result<Vec<(&'static str, String)>, String> {
        let mut files = vec![
            (MANIFEST_FILE, self.manifest_json()?),
            (DISTRICTS_FILE, self.districts_geojson()?),
            (ELECTORATE_FILE, self.electorate_csv()?),
        ];
        if !self.poll.is_empty() {
            files.push((POLL_FILE, self.poll_csv()?));
        }
        Ok(files)
    }

    pub fn write_to(&self, dir: &Path) -> Result<(), String> {
        fs::create_dir_all(dir).map_err(|e| format!("creating {}: {e}", dir.display()))?;
        for (name, contents) in self.files()? {
            let path = dir.join(name);
            fs::write(&path, contents).map_err(|e| format!("writing {}: {e}", path.display()))?;
        }
        Ok(())
    }

    /// The dataset as stratamap's core reads it: the files written to text and loaded
    /// back, so the generator's figures come from the same tally as the page's.
    pub fn core(&self) -> Result<stratamap::dataset::Dataset, String> {
        let files = self.files()?;
        let text = |name: &str| {
            files
                .iter()
                .find(|(f, _)| *f == name)
                .map(|(_, t)| t.as_str())
        };
        stratamap::dataset::Dataset::from_sources(&stratamap::dataset::Sources {
            manifest: text(MANIFEST_FILE).unwrap_or(""),
            districts: text(DISTRICTS_FILE).unwrap_or(""),
            electorate: text(ELECTORATE_FILE).unwrap_or(""),
            poll: text(POLL_FILE),
        })
        .map_err(|e| format!("the generated dataset is not valid:\n{e}"))
    }

    /// Margin shift per group (points toward A) when a scenario starts from the poll:
    /// the core's poll swing (SPEC 2.1). Empty when there is no poll.
    pub fn poll_swing(&self) -> Result<Vec<f64>, String> {
        Ok(stratamap::model::tally::poll_swing(&self.core()?).unwrap_or_default())
    }

    /// The core's tally with a margin shift per group in points toward A.
    pub fn tally(&self, margin_shift: &[f64]) -> Result<Tally, String> {
        let core = self.core()?;
        let shifts = stratamap::model::tally::Shifts {
            turnout: vec![0.0; core.group_count()],
            margin: (0..core.group_count())
                .map(|g| margin_shift.get(g).copied().unwrap_or(0.0))
                .collect(),
        };
        let t = stratamap::model::tally::tally(&core, &shifts);
        Ok(Tally {
            seats: t.seats.iter().map(|&s| s as u32).collect(),
            winners: t.winner.clone(),
            margins: t.margin.clone(),
            national_share: t.shares(),
        })
    }

    /// A readable summary of a tally for stdout.
    pub fn describe(&self, label: &str, tally: &Tally) -> String {
        let mut out = String::new();
        let _ = write!(out, "{label}:");
        for (k, p) in self.parties.iter().enumerate() {
            let _ = write!(
                out,
                " {} {} seats ({:.1}%)",
                p.id,
                tally.seats[k],
                tally.national_share[k] * 100.0
            );
        }
        let leader = tally.seats.iter().max().copied().unwrap_or(0);
        let _ = write!(
            out,
            "; leader {} vs majority {}; {} districts within 3 points",
            leader,
            self.majority(),
            tally.close_districts(3.0)
        );
        out
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct Tally {
    pub seats: Vec<u32>,
    pub winners: Vec<Option<usize>>,
    /// First minus second, points of votes cast.
    pub margins: Vec<f64>,
    pub national_share: Vec<f64>,
}

impl Tally {
    pub fn close_districts(&self, points: f64) -> usize {
        self.margins.iter().filter(|&&m| m < points).count()
    }

    pub fn leader_seats(&self) -> u32 {
        self.seats.iter().max().copied().unwrap_or(0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn units_format_exactly() {
        assert_eq!(units_to_decimal(4123, 10_000), "0.4123");
        assert_eq!(units_to_decimal(7, 10_000), "0.0007");
        assert_eq!(units_to_decimal(10_000, 10_000), "1.0000");
        assert_eq!(units_to_decimal(135, 100), "1.35");
        assert_eq!(units_to_decimal(5, 1_000), "0.005");
    }

    #[test]
    fn rounding_keeps_the_total() {
        let w = [1.0, 1.0, 1.0];
        assert_eq!(round_to_units(&w, 10_000), vec![3334, 3333, 3333]);
        let w = [0.123456, 0.5, 0.376544];
        let u = round_to_units(&w, 10_000);
        assert_eq!(u.iter().sum::<u32>(), 10_000);
        assert_eq!(u, vec![1235, 5000, 3765]);
        assert_eq!(round_to_units(&[0.0, 0.0], 100), vec![100, 0]);
    }
}
