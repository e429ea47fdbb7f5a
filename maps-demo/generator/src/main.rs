//! `make-demo`: writes stratamap's invented demo dataset, or a large synthetic one for
//! benchmarks. The same seed always gives the same files.

mod bench;
mod demo;
mod geometry;
mod irregular;
mod model;
mod names;
mod raking;

#[cfg(test)]
mod tests;

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::Parser;

#[derive(Debug, Parser)]
#[command(
    name = "make-demo",
    about = "Writes stratamap's invented demo dataset (dataset.json, districts.geojson, \
             electorate.csv, poll.csv), or with --districts a large synthetic one for benchmarks"
)]
struct Cli {
    /// Folder to write the dataset into (created if missing).
    #[arg(long)]
    out: PathBuf,
    /// Seed of the generator (Pcg64).
    #[arg(long, default_value_t = demo::DEFAULT_SEED)]
    seed: u64,
    /// Benchmark mode: number of districts (simple shapes on a lattice).
    #[arg(long, value_parser = clap::value_parser!(u32).range(1..=200_000))]
    districts: Option<u32>,
    /// Benchmark mode: number of groups.
    #[arg(long, requires = "districts", value_parser = clap::value_parser!(u32).range(1..=64))]
    groups: Option<u32>,
    /// Benchmark mode: number of parties.
    #[arg(long, requires = "districts", value_parser = clap::value_parser!(u32).range(2..=12))]
    parties: Option<u32>,
    /// Benchmark mode: district shapes, `lattice` (jittered octagons, 8 vertices) or
    /// `irregular` (Voronoi cells whose shared edges wiggle, about --vertices each).
    #[arg(long, requires = "districts", value_enum, default_value_t = bench::Shapes::Lattice)]
    shapes: bench::Shapes,
    /// Benchmark mode with irregular shapes: about this many vertices per district.
    #[arg(long, requires = "districts", default_value_t = 200,
          value_parser = clap::value_parser!(u32).range(12..=5000))]
    vertices: u32,
}

/// The benchmark mode writes only into a new folder or over an earlier benchmark dataset,
/// never over the committed demo.
fn check_bench_target(dir: &Path) -> Result<(), String> {
    let manifest = dir.join(model::MANIFEST_FILE);
    if !manifest.exists() {
        return Ok(());
    }
    let text = std::fs::read_to_string(&manifest)
        .map_err(|e| format!("reading {}: {e}", manifest.display()))?;
    let value: serde_json::Value =
        serde_json::from_str(&text).map_err(|e| format!("reading {}: {e}", manifest.display()))?;
    let source = value.get("source").and_then(|s| s.as_str()).unwrap_or("");
    if source.starts_with(bench::SOURCE_PREFIX) {
        Ok(())
    } else {
        Err(format!(
            "{} holds a dataset that is not a benchmark dataset; choose another --out folder",
            dir.display()
        ))
    }
}

fn run(cli: &Cli) -> Result<(), String> {
    let dataset = match cli.districts {
        Some(districts) => {
            check_bench_target(&cli.out)?;
            let size = bench::BenchSize {
                districts: districts as usize,
                groups: cli.groups.unwrap_or(24) as usize,
                parties: cli.parties.unwrap_or(4) as usize,
                shapes: cli.shapes,
                vertices: cli.vertices as usize,
            };
            let dataset = bench::build(cli.seed, size)?;
            println!(
                "benchmark dataset: {} districts ({} shapes), {} groups, {} parties, {} rows, seed {}",
                dataset.districts.len(),
                match cli.shapes {
                    bench::Shapes::Lattice => "lattice",
                    bench::Shapes::Irregular => "irregular",
                },
                dataset.groups.len(),
                dataset.parties.len(),
                dataset.rows.len(),
                cli.seed
            );
            dataset
        }
        None => {
            let demo = demo::build(cli.seed)?;
            let ds = &demo.dataset;
            let multi = ds.districts.iter().filter(|d| d.seats > 1).count();
            println!("{}", ds.title);
            println!(
                "{} districts ({} with more than one seat), {} seats, majority {}, {} groups, seed {}",
                ds.districts.len(),
                multi,
                ds.total_seats(),
                ds.majority(),
                ds.groups.len(),
                cli.seed
            );
            let area: f64 = ds
                .districts
                .iter()
                .map(|d| geo::Area::unsigned_area(&d.geometry))
                .sum();
            println!(
                "district area {:.5} vs coastline {:.5} square degrees; {} cells cut in pieces by the coast; tuned lean {:+.3}",
                area, geo::Area::unsigned_area(&demo.coastline), demo.split_cells, demo.lean
            );
            let none = vec![0.0; ds.groups.len()];
            println!("{}", ds.describe("baseline", &ds.tally(&none)?));
            println!(
                "{}",
                ds.describe("from the poll", &ds.tally(&ds.poll_swing()?)?)
            );
            let respondents: u32 = ds.poll.iter().map(|p| p.sample_size).sum();
            println!("poll: {respondents} respondents");
            demo.dataset
        }
    };
    dataset.write_to(&cli.out)?;
    if cli.districts.is_none() {
        raking::write_to(&dataset, &cli.out)?;
    }
    println!("wrote {}", cli.out.display());
    Ok(())
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(&cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("make-demo: {e}");
            ExitCode::FAILURE
        }
    }
}
