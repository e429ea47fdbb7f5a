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
        /// Write a small example dataset (manifest, map, electorate and a README that
        /// explains every field) into DIR, to open as it is and edit.
        Template {
            /// The folder to write into (made if missing); existing files are not replaced.
            dir: PathBuf,
        },
        /// Build electorate.csv from per-district margins and a groups table by
        /// iterative proportional fitting (raking); the report goes to standard error.
        Rake {
            /// district,dimension,category,count: eligible people per district by one
            /// dimension at a time.
            #[arg(long)]
            margins: PathBuf,
            /// group,<dimension>…,eligible,turnout,<party id>…[,region]: each group's
            /// categories, seed count, baseline turnout and shares.
            #[arg(long)]
            groups: PathBuf,
            /// district,votes_cast,<party id>…: last election's votes, which each
            /// district's tally is then calibrated to reproduce.
            #[arg(long)]
            results: Option<PathBuf>,
            /// The districts' GeoJSON: district order, and each district's region for
            /// regional seeds.
            #[arg(long)]
            districts: Option<PathBuf>,
            /// Also write a manifest (dataset.json) proposing parties, groups with their
            /// categories, and dimensions, to edit.
            #[arg(long)]
            manifest: Option<PathBuf>,
            /// The electorate CSV to write.
            #[arg(short = 'o', long = "output")]
            output: PathBuf,
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

    fn read_input(p: &std::path::Path) -> Result<(String, String), String> {
        let name = p
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_else(|| p.display().to_string());
        std::fs::read_to_string(p)
            .map(|t| (name, t))
            .map_err(|e| format!("cannot read {}: {e}", p.display()))
    }

    /// `path` relative to `dir`, with forward slashes, for a manifest's file names.
    fn relative_to(path: &std::path::Path, dir: &std::path::Path) -> Result<String, String> {
        let abs = |p: &std::path::Path| -> std::path::PathBuf {
            let p = if p.is_absolute() {
                p.to_path_buf()
            } else {
                std::env::current_dir().unwrap_or_default().join(p)
            };
            // Normalise `.` and `..` without touching the file system.
            let mut out = std::path::PathBuf::new();
            for c in p.components() {
                match c {
                    std::path::Component::CurDir => {}
                    std::path::Component::ParentDir => {
                        out.pop();
                    }
                    other => out.push(other),
                }
            }
            out
        };
        let (p, d) = (abs(path), abs(dir));
        let rel = p.strip_prefix(&d).map_err(|_| {
            format!(
                "{} is not inside the manifest's folder {}; a manifest names its files relative to itself",
                path.display(),
                d.display()
            )
        })?;
        let parts: Vec<String> = rel
            .components()
            .map(|c| c.as_os_str().to_string_lossy().into_owned())
            .collect();
        Ok(parts.join("/"))
    }

    struct RakeArgs {
        margins: PathBuf,
        groups: PathBuf,
        results: Option<PathBuf>,
        districts: Option<PathBuf>,
        manifest: Option<PathBuf>,
        output: PathBuf,
    }

    fn rake(a: RakeArgs) -> Result<String, String> {
        use stratamap::build::rake::{rake, Input, Inputs};
        let margins = read_input(&a.margins)?;
        let groups = read_input(&a.groups)?;
        let results = a.results.as_deref().map(read_input).transpose()?;
        let districts = a.districts.as_deref().map(read_input).transpose()?;
        let inputs = Inputs {
            margins: Input::from((margins.0.as_str(), margins.1.as_str())),
            groups: Input::from((groups.0.as_str(), groups.1.as_str())),
            results: results
                .as_ref()
                .map(|(n, t)| Input::from((n.as_str(), t.as_str()))),
            districts: districts
                .as_ref()
                .map(|(n, t)| Input::from((n.as_str(), t.as_str()))),
        };
        let raked = rake(&inputs).map_err(|e| format!("cannot rake:\n{e}"))?;
        for line in raked.report() {
            eprintln!("stratamap: {line}");
        }
        let geojson = districts.as_ref().map(|(_, t)| t.as_str());
        match raked.check_with_tally(geojson) {
            Ok(Some(worst)) => eprintln!(
                "stratamap: the tally of the raked electorate reproduces the results: largest difference {worst:.3e} votes"
            ),
            Ok(None) => {}
            Err(e) => return Err(format!("the raked electorate does not load as a dataset (a bug):\n{e}")),
        }
        std::fs::write(&a.output, raked.electorate_csv())
            .map_err(|e| format!("cannot write {}: {e}", a.output.display()))?;
        eprintln!("stratamap: wrote {}", a.output.display());
        if let Some(m) = &a.manifest {
            let dir = m
                .parent()
                .filter(|p| !p.as_os_str().is_empty())
                .unwrap_or(std::path::Path::new("."));
            let electorate = relative_to(&a.output, dir)?;
            let districts = match &a.districts {
                Some(p) => relative_to(p, dir)?,
                None => "districts.geojson".to_string(),
            };
            std::fs::write(m, raked.manifest(&districts, &electorate))
                .map_err(|e| format!("cannot write {}: {e}", m.display()))?;
            eprintln!(
                "stratamap: wrote {} (edit its title, source, names and colours{})",
                m.display(),
                if a.districts.is_none() {
                    "; it expects the map in districts.geojson"
                } else {
                    ""
                }
            );
        }
        Ok(String::new())
    }

    fn template(dir: &std::path::Path) -> Result<String, String> {
        use stratamap::build::template::FILES;
        for (name, _) in FILES {
            if dir.join(name).exists() {
                return Err(format!(
                    "{} already exists; give an empty or new folder",
                    dir.join(name).display()
                ));
            }
        }
        std::fs::create_dir_all(dir).map_err(|e| format!("cannot make {}: {e}", dir.display()))?;
        for (name, text) in FILES {
            let p = dir.join(name);
            std::fs::write(&p, text).map_err(|e| format!("cannot write {}: {e}", p.display()))?;
        }
        eprintln!(
            "stratamap: wrote an example dataset in {}; try: stratamap check {}",
            dir.display(),
            dir.display()
        );
        Ok(String::new())
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
            Command::Template { dir } => template(&dir),
            Command::Rake {
                margins,
                groups,
                results,
                districts,
                manifest,
                output,
            } => rake(RakeArgs {
                margins,
                groups,
                results,
                districts,
                manifest,
                output,
            }),
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
