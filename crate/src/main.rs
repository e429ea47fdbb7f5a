//! The `stratamap` command line: the same core as the page, natively (SPEC 4).
//! Exit codes: 0 success, 1 invalid input (message on stderr), 2 usage error.

#[cfg(target_arch = "wasm32")]
fn main() {}

#[cfg(not(target_arch = "wasm32"))]
fn main() -> std::process::ExitCode {
    cli::main()
}

#[cfg(not(target_arch = "wasm32"))]
mod cli {
    use clap::{Parser, Subcommand};
    use std::io::Write;
    use std::path::PathBuf;
    use std::process::ExitCode;
    use stratamap::dataset::{load_path, Dataset};
    use stratamap::facade::engine::Engine;
    use stratamap::model::scenario::Scenario;

    /// What-if turnout maps: apply a scenario to a dataset's districts.
    #[derive(Parser)]
    #[command(name = "stratamap", version, about)]
    struct Cli {
        #[command(subcommand)]
        command: Command,
    }

    /// DATASET, in every command: the manifest's path (dataset.json), or a folder that
    /// holds dataset.json. The files it names are read relative to it.
    const DATASET_HELP: &str =
        "The dataset: its manifest (dataset.json) or a folder holding dataset.json";
    /// The scenario, in every command that takes one.
    const SCENARIO_HELP: &str = "A scenario string, as in a share link: e.g. \"turnout=all:2&margin=young:-3\" (turnout points up, lead points toward the first axis party); empty: no shifts";

    #[derive(Subcommand)]
    enum Command {
        /// Validate a dataset and print a summary of it.
        Check {
            #[arg(help = DATASET_HELP)]
            dataset: PathBuf,
        },
        /// Print one CSV row per district for a scenario (the caution and source go to
        /// standard error; --metadata writes them beside the CSV).
        Tally {
            #[arg(help = DATASET_HELP)]
            dataset: PathBuf,
            #[arg(long, default_value = "", help = SCENARIO_HELP)]
            scenario: String,
            /// Also write W3C CSV on the Web metadata for the CSV to this file: column
            /// titles and types, the dataset's title and source, the scenario and the caution.
            #[arg(long, value_name = "FILE")]
            metadata: Option<PathBuf>,
            /// Instead of the districts, print what it would take for the majority to
            /// change hands: per group (and all groups), the turnout change and the lead
            /// change of that group alone, as CSV.
            #[arg(long)]
            what_it_takes: bool,
        },
        /// Run the Monte Carlo simulation of a scenario; JSON to standard output.
        Simulate {
            #[arg(help = DATASET_HELP)]
            dataset: PathBuf,
            #[arg(long, default_value = "", help = SCENARIO_HELP)]
            scenario: String,
        },
        /// Write the map of a scenario as a standalone SVG: title, legend, seats against
        /// the majority, the scenario in words, source and caution.
        Render {
            #[arg(help = DATASET_HELP)]
            dataset: PathBuf,
            #[arg(long, default_value = "", help = SCENARIO_HELP)]
            scenario: String,
            /// Output file (default: standard output).
            #[arg(short = 'o', long = "output")]
            output: Option<PathBuf>,
        },
        /// Print a scenario as JSON: every value, the canonical string, the scenario in
        /// words, the dataset's title and source, and the caution.
        Scenario {
            #[arg(help = DATASET_HELP)]
            dataset: PathBuf,
            #[arg(long, default_value = "", help = SCENARIO_HELP)]
            scenario: String,
        },
    }

    fn load(path: &std::path::Path) -> Result<Dataset, String> {
        load_path(path).map_err(|e| {
            format!(
                "{} is not a valid dataset:\n{e}",
                stratamap::error::plain(&path.display().to_string(), 200)
            )
        })
    }

    fn engine(path: &std::path::Path, query: &str) -> Result<Engine, String> {
        let ds = load(path)?;
        let q = query.trim_start_matches('?');
        let scenario = Scenario::parse_strict(q, &ds).map_err(|msgs| {
            let lines: Vec<String> = msgs.iter().map(|m| format!("  {m}")).collect();
            format!("the scenario is refused:\n{}", lines.join("\n"))
        })?;
        if scenario.data.is_some() {
            return Err("the scenario is refused:\n  data: names a dataset for the page; give DATASET on the command line instead".into());
        }
        let mut e = Engine::new(ds);
        e.set_scenario(q);
        Ok(e)
    }

    fn check(path: &std::path::Path) -> Result<String, String> {
        let ds = load(path)?;
        let mut out = String::new();
        let parties: Vec<String> = ds
            .parties
            .iter()
            .map(|p| format!("{} ({})", p.name, p.id))
            .collect();
        out += &format!("{} — valid\n", ds.title);
        out += &format!("source: {}\n", ds.source);
        out += &format!("parties: {}\n", parties.join(", "));
        out += &format!(
            "axis: {} vs {}\n",
            ds.parties[ds.axis[0]].id, ds.parties[ds.axis[1]].id
        );
        out += &format!("groups: {}\n", ds.group_count());
        let regions: std::collections::BTreeSet<&str> = ds
            .districts
            .iter()
            .filter_map(|d| d.region.as_deref())
            .collect();
        out += &format!(
            "districts: {} in {} regions, {} seats, majority {}\n",
            ds.district_count(),
            regions.len(),
            ds.total_seats(),
            ds.majority
        );
        out += &format!(
            "seat rules: {}\n",
            stratamap::facade::engine::seat_rules(&ds)
        );
        let eligible: f64 = ds.cells.eligible.iter().sum();
        out += &format!("eligible: {eligible}\n");
        match &ds.poll {
            Some(p) => {
                let n: f64 = p.sample_size.iter().sum();
                out += &format!("poll: {n} respondents in {} groups\n", p.sample_size.len());
            }
            None => out += "poll: none\n",
        }
        out += &format!("presets: {}\n", ds.presets.len());
        Ok(out)
    }

    /// The caution, the source line and where clamps bit, on standard error (the CSV on
    /// standard output keeps exactly its columns for scripts).
    fn notes(e: &Engine) {
        let t = e.tally();
        eprintln!("stratamap: {}", stratamap::CAUTION);
        eprintln!("stratamap: source: {}", e.dataset().source);
        for note in stratamap::facade::engine::seat_notes(e.dataset(), &e.summary()) {
            eprintln!("stratamap: {note}");
        }
        if t.turnout_clamped > 0 {
            eprintln!(
                "stratamap: the turnout clamp to [0, 1] bit in {} cells",
                t.turnout_clamped
            );
        }
        if t.margin_limited > 0 {
            eprintln!(
                "stratamap: the margin shift was limited to the share there in {} cells",
                t.margin_limited
            );
        }
    }

    /// The CSV a metadata file describes, by the CSVW naming convention: `X.csv` for
    /// `X.csv-metadata.json` (or `X-metadata.json`), else the file's stem with `.csv`.
    fn csv_name_for(p: &std::path::Path) -> String {
        let name = p
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default();
        if let Some(stem) = name.strip_suffix("-metadata.json") {
            if stem.ends_with(".csv") {
                return stem.to_string();
            }
            return format!("{stem}.csv");
        }
        let stem = p
            .file_stem()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_else(|| "tally".into());
        format!("{stem}.csv")
    }

    /// Runs when the scenario does not say.
    const DEFAULT_RUNS: u32 = 2000;

    fn simulate(e: &Engine) -> Result<String, String> {
        let ds = e.dataset();
        let s = e.scenario();
        let runs = s.runs.unwrap_or(DEFAULT_RUNS);
        let json = stratamap::analysis::simulate::simulate(ds, s, runs).to_json();
        if runs > 0 {
            return Ok(json);
        }
        // runs=0 asks for no simulation: the same keys, every count 0, and no seat or
        // share statistics (null), since there are no runs to take them from.
        let mut v: serde_json::Value =
            serde_json::from_str(&json).map_err(|err| format!("cannot write JSON: {err}"))?;
        if let Some(parties) = v.get_mut("parties").and_then(|p| p.as_array_mut()) {
            for p in parties {
                p["seats"] = serde_json::Value::Null;
                p["share"] = serde_json::Value::Null;
            }
        }
        serde_json::to_string_pretty(&v)
            .map(|t| t + "\n")
            .map_err(|err| format!("cannot write JSON: {err}"))
    }

    pub fn main() -> ExitCode {
        let cli = match Cli::try_parse() {
            Ok(c) => c,
            Err(e) => {
                let _ = e.print();
                return if e.use_stderr() {
                    ExitCode::from(2)
                } else {
                    ExitCode::SUCCESS
                };
            }
        };
        let result = match cli.command {
            Command::Check { dataset } => check(&dataset),
            Command::Tally {
                dataset,
                scenario,
                metadata,
                what_it_takes,
            } => engine(&dataset, &scenario).and_then(|e| {
                notes(&e);
                if let Some(p) = &metadata {
                    if what_it_takes {
                        return Err(
                            "--metadata describes the districts' CSV; leave out --what-it-takes"
                                .into(),
                        );
                    }
                    std::fs::write(p, e.tally_csvw(&csv_name_for(p)))
                        .map_err(|err| format!("cannot write {}: {err}", p.display()))?;
                }
                Ok(if what_it_takes {
                    e.what_it_takes_csv()
                } else {
                    e.tally_csv()
                })
            }),
            Command::Scenario { dataset, scenario } => {
                engine(&dataset, &scenario).map(|e| e.scenario_json(None))
            }
            Command::Simulate { dataset, scenario } => {
                engine(&dataset, &scenario).and_then(|e| simulate(&e))
            }
            Command::Render {
                dataset,
                scenario,
                output,
            } => engine(&dataset, &scenario).and_then(|e| {
                let svg = e.render_svg();
                match output {
                    Some(p) => std::fs::write(&p, svg)
                        .map(|_| String::new())
                        .map_err(|err| format!("cannot write {}: {err}", p.display())),
                    None => Ok(svg),
                }
            }),
        };
        match result {
            Ok(text) => {
                let mut out = std::io::stdout().lock();
                if out
                    .write_all(text.as_bytes())
                    .and_then(|_| out.flush())
                    .is_err()
                {
                    return ExitCode::from(1);
                }
                ExitCode::SUCCESS
            }
            Err(msg) => {
                eprintln!("stratamap: {msg}");
                ExitCode::from(1)
            }
        }
    }
}
