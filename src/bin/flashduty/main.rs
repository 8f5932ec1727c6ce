//! The flashduty command-line tool: a thin layer over the library's public API that reads
//! case files and spreadsheets and prints reports. Contract: docs/CLI.md.

mod batch;
mod case;
mod check;
mod components;
mod compute;
mod demo;
mod error;
mod fit;
mod fit_pair;
#[cfg(test)]
mod fuzz_tests;
mod output_units;
mod plot;
mod sheet;
mod text;

use case::Command;
use clap::{Args, Parser, Subcommand};
use error::{CliError, CliResult};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

const ABOUT: &str = "Rachford–Rice flash, bubble and dew points, heater duty and heating curves of ideal \
(Raoult's-law) mixtures, with every constant traced to a published source.";

const LONG_ABOUT: &str = "Rachford–Rice flash, bubble and dew points, heater duty and heating curves of ideal \
(Raoult's-law) mixtures, with every constant traced to a published source.

Caution: results are estimates from ideal-mixture models (Raoult's law, ideal liquid, ideal-gas vapour, \
at most a second-virial correction to the vapour's enthalpy), or, with liquid_model, from an activity \
model whose parameters were fitted to limited data. Check that the models suit your mixture and \
conditions (strongly non-ideal liquids need liquid_model; pressures below a few bar). Equipment design and \
operation follow the applicable local codes and the judgement of a qualified, licensed engineer.";

const AFTER_HELP: &str = "\
Usage pattern: flashduty <command> [--json] <case-file | ->   ('-' reads the case from standard input)

A case file is JSON (TOML when the name ends in .toml) with these keys:
  components       library names or CAS numbers (add your own with --components FILE)
  z | flows        mole fractions (summing to 1), or component flows (mol/s, or \"3.6 kmol/h\", \"36 kg/h\")
  K                K-values, for a flash with given K (with z; components optional)
  T, P             a number in K or Pa, or text with a unit: \"65 degC\", \"149 degF\", \"1 atm\", \"14.7 psia\"
  vapour_fraction  0 to 1
  flow             total flow: a number in mol/s, or \"3.6 kmol/h\", or a mass flow \"1200 kg/h\" (default 1 mol/s)
  inlet, outlet    objects with two of T, P and vapour_fraction
  duty             heat into the stream: a number in W or text such as \"250 kW\"
  reference        {\"phase\": \"liquid\" | \"vapour\", \"T\": ...}   (default liquid at 298.15 K)
  path             \"boiling-point\" (default), \"stream-temperature\" or \"reference-temperature\"
  vapour_model     \"ideal-gas\" (default) or \"second-virial\" (real-gas vapour enthalpy from the
                   Pitzer–Curl second virial coefficient; warns where it is stretched)
  points           curve points (curve only; --points overrides)
  water_phase      \"one-liquid\" (default) or \"immiscible\": water forms its own liquid beside the
                   organic one (or {\"model\": \"immiscible\", \"water_in_organic\": x,
                   \"organic_in_water\": {name: x}} with solubilities as mole fractions)
  liquid_model     \"ideal\" (default: Raoult's law), \"wilson\", \"nrtl\" or \"uniquac\": K = γ Psat / P with
                   an activity model of the liquid and its excess enthalpy (built-in pairs: see README)
  binary_parameters  a parameter file's path (JSON or TOML) or the object itself, {\"pairs\": [...]}:
                   pairs added to the built-in set (the `fit-pair` command writes such a file)
  note             free text
Unknown keys, and keys a command does not use, are errors.

Exit codes: 0 success; 1 a check found rows outside tolerance, or a --batch row failed (all rows
are written); 2 bad input or a calculation that cannot be done (one line on stderr naming the
field and value; with --json, one JSON object {\"error\": {\"kind\", \"field\", \"message\"}}).

The full contract is in docs/CLI.md; example cases are in examples/.";

#[derive(Debug, Parser)]
#[command(
    name = "flashduty",
    version,
    about = ABOUT,
    long_about = LONG_ABOUT,
    after_help = AFTER_HELP,
    color = clap::ColorChoice::Never,
    max_term_width = 100
)]
struct Cli {
    /// Write one JSON object to standard output instead of the human-readable report.
    #[arg(long, global = true)]
    json: bool,

    /// Units of the report: si (the default), field (°F, psia, lbmol/h, lb/h, Btu/h,
    /// Btu/lbmol) or a JSON/TOML file naming a unit per quantity. The JSON keeps its SI keys
    /// and adds the same values in these units under keys that name them.
    /// (`--units` is the fit command's Antoine unit convention, so this one is
    /// `--output-units`.)
    #[arg(
        long = "output-units",
        global = true,
        value_name = "si|field|FILE",
        default_value = "si"
    )]
    output_units: String,

    /// Add the components of a component file (JSON, or TOML by extension) to the library.
    /// May be repeated.
    #[arg(long = "components", global = true, value_name = "FILE")]
    component_files: Vec<PathBuf>,

    #[command(subcommand)]
    command: Cmd,
}

#[derive(Debug, Args)]
struct CaseArgs {
    /// The case file (JSON, or TOML by extension), or '-' for standard input.
    #[arg(value_name = "CASE", required_unless_present = "batch")]
    case: Option<String>,

    /// Compute every row of a spreadsheet (a workbook or CSV; columns as for 'check') in
    /// parallel; writes CSV, or JSON lines with --json.
    #[arg(long, value_name = "FILE", conflicts_with = "case")]
    batch: Option<PathBuf>,

    /// The workbook's sheet to read with --batch (default: the first).
    #[arg(long, value_name = "NAME", requires = "batch")]
    sheet: Option<String>,

    /// Write the batch output to FILE instead of standard output; a name ending in .xlsx
    /// writes a workbook with the results beside the inputs.
    #[arg(long, short, value_name = "FILE", requires = "batch")]
    output: Option<PathBuf>,
}

#[derive(Debug, Subcommand)]
enum Cmd {
    /// Phase split at T and P, at T or P with a vapour fraction, or with given z and K.
    Flash(CaseArgs),
    /// Bubble point: give T (pressure found) or P (temperature found).
    Bubble(CaseArgs),
    /// Dew point: give T (pressure found) or P (temperature found).
    Dew(CaseArgs),
    /// Heater duty between an inlet and an outlet state, or the outlet for a given duty.
    Duty(CaseArgs),
    /// Heating or cooling curve between the inlet and the outlet.
    Curve {
        /// The case file, or '-' for standard input.
        #[arg(value_name = "CASE")]
        case: String,
        /// Number of points evenly spaced in duty (bubble and dew points are added).
        #[arg(long, value_name = "N", value_parser = clap::value_parser!(u32).range(2..=case::MAX_POINTS as i64))]
        points: Option<u32>,
        /// Draw the curve to an SVG file.
        #[arg(long, value_name = "FILE")]
        svg: Option<PathBuf>,
        /// Write the curve points to a CSV file.
        #[arg(long, value_name = "FILE")]
        csv: Option<PathBuf>,
    },
    /// The azeotropes of a binary at T or P, under the case's liquid_model.
    Azeotropes(CaseArgs),
    /// Run a design spreadsheet's rows and compare them with its expected values.
    Check {
        /// The spreadsheet: a workbook (.xlsx, .xlsm, .xls, .ods) or CSV (comma- or
        /// semicolon-separated).
        #[arg(value_name = "FILE")]
        file: PathBuf,
        /// The workbook's sheet to read (default: the first).
        #[arg(long, value_name = "NAME")]
        sheet: Option<String>,
        /// Also write the results as JUnit XML.
        #[arg(long, value_name = "FILE")]
        junit: Option<PathBuf>,
    },
    /// List the component library, or show one component with its sources.
    Components {
        /// A component name, synonym or CAS number.
        #[arg(value_name = "NAME")]
        name: Option<String>,
    },
    /// Run the built-in example (an invented preheater and partial vaporiser).
    Demo,
    /// Fit a vapour-pressure or heat-capacity correlation to data points in a CSV file.
    Fit(fit::FitArgs),
    /// Fit a Wilson, NRTL or UNIQUAC pair to vapour–liquid equilibrium data in a CSV file,
    /// test the data's consistency, and write a parameter file.
    FitPair(fit_pair::FitPairArgs),
}

/// Writes to standard output; a closed pipe (e.g. `| head`) ends quietly.
fn print(text: &str) -> CliResult<()> {
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        Err(e) => Err(CliError::new(format!("standard output: {e}"))),
    }
}

fn print_json(v: &serde_json::Value) -> CliResult<()> {
    let mut v = v.clone();
    output_units::augment(&mut v);
    let v = &v;
    let text = serde_json::to_string_pretty(v).map_err(|e| CliError::new(format!("JSON output: {e}")))?;
    print(&format!("{text}\n"))
}

fn read_file(path: &Path, what: &str) -> CliResult<Vec<u8>> {
    std::fs::read(path).map_err(|e| CliError::new(format!("{what} '{}': cannot read it ({e})", path.display())))
}

fn write_file(path: &Path, what: &str, text: &str) -> CliResult<()> {
    std::fs::write(path, text).map_err(|e| CliError::new(format!("{what} '{}': cannot write it ({e})", path.display())))
}

fn case_command(cli: &Cli, command: Command, args: &CaseArgs) -> CliResult<u8> {
    let lib = compute::library(&cli.component_files)?;
    if let Some(batch) = &args.batch {
        // The file is read as the rows are computed (CSV), not whole.
        let file = std::fs::File::open(batch)
            .map_err(|e| CliError::new(format!("--batch '{}': cannot read it ({e})", batch.display())))?;
        let input = || Box::new(std::io::BufReader::with_capacity(1 << 16, file));
        let xlsx = args
            .output
            .as_ref()
            .is_some_and(|p| p.extension().is_some_and(|e| e.eq_ignore_ascii_case("xlsx")));
        let format = match (xlsx, cli.json) {
            (true, true) => {
                return Err(CliError::new(
                    "--output: a .xlsx workbook is written without --json (JSON lines go to a .jsonl file)",
                ));
            }
            (true, false) => batch::Format::Workbook,
            (false, true) => batch::Format::JsonLines,
            (false, false) => batch::Format::Csv,
        };
        let name = batch.display().to_string();
        let sheet = args.sheet.as_deref();
        // Rows are written as they are computed, a chunk at a time.
        let failed = match &args.output {
            Some(p) => {
                let file = std::fs::File::create(p)
                    .map_err(|e| CliError::new(format!("--output '{}': cannot write it ({e})", p.display())))?;
                let mut w = std::io::BufWriter::new(file);
                batch::run(&lib, command, &name, input(), sheet, format, &mut w)?
            }
            None => {
                let mut w = std::io::BufWriter::new(std::io::stdout().lock());
                batch::run(&lib, command, &name, input(), sheet, format, &mut w)?
            }
        };
        // Every row is written; the exit code says whether any failed.
        return Ok(u8::from(failed > 0));
    }
    let Some(arg) = &args.case else {
        return Err(CliError::new(
            "CASE: give a case file, '-' for standard input, or --batch FILE.csv",
        ));
    };
    let (name, case) = case::load(arg, command)?;
    let outcome = compute::run(&lib, command, &case, None).map_err(|e| e.context(&name))?;
    if cli.json {
        print_json(&outcome.to_json())?;
    } else {
        print(&text::report(&outcome, Some(&name)))?;
    }
    Ok(0)
}

fn run(cli: &Cli) -> CliResult<u8> {
    output_units::set(output_units::Units::choose(&cli.output_units)?);
    match &cli.command {
        Cmd::Flash(a) => case_command(cli, Command::Flash, a),
        Cmd::Bubble(a) => case_command(cli, Command::Bubble, a),
        Cmd::Dew(a) => case_command(cli, Command::Dew, a),
        Cmd::Duty(a) => case_command(cli, Command::Duty, a),
        Cmd::Azeotropes(a) => case_command(cli, Command::Azeotropes, a),
        Cmd::Curve { case, points, svg, csv } => {
            let lib = compute::library(&cli.component_files)?;
            let (name, c) = case::load(case, Command::Curve)?;
            let outcome =
                compute::run(&lib, Command::Curve, &c, points.map(|p| p as usize)).map_err(|e| e.context(&name))?;
            if let compute::Outcome::Curve(curve) = &outcome {
                if let Some(p) = svg {
                    plot::write_svg(p, curve)?;
                }
                if let Some(p) = csv {
                    plot::write_csv(p, curve)?;
                }
            }
            if cli.json {
                print_json(&outcome.to_json())?;
            } else {
                print(&text::report(&outcome, Some(&name)))?;
            }
            Ok(0)
        }
        Cmd::Check { file, sheet, junit } => {
            let lib = compute::library(&cli.component_files)?;
            let name = file.display().to_string();
            let bytes = read_file(file, "check file")?;
            let results = check::run(&lib, &name, &bytes, sheet.as_deref())?;
            if let Some(j) = junit {
                write_file(j, "--junit", &check::junit(&name, &results))?;
            }
            if cli.json {
                print_json(&check::to_json(&name, &results))?;
            } else {
                print(&check::report(&name, &results))?;
            }
            Ok(u8::from(results.iter().any(|r| !r.passed())))
        }
        Cmd::Components { name } => {
            let lib = compute::library(&cli.component_files)?;
            match (name, cli.json) {
                (None, false) => print(&components::list_text(&lib))?,
                (None, true) => print_json(&components::list_json(&lib))?,
                (Some(n), false) => print(&components::one_text(&lib, n)?)?,
                (Some(n), true) => print_json(&components::one_json(&lib, n)?)?,
            }
            Ok(0)
        }
        Cmd::Demo => {
            let lib = compute::library(&cli.component_files)?;
            if cli.json {
                print_json(&demo::json(&lib)?)?;
            } else {
                print(&demo::text(&lib)?)?;
            }
            Ok(0)
        }
        Cmd::Fit(args) => {
            let out = fit::run(args, cli.json)?;
            print(&out)?;
            Ok(0)
        }
        Cmd::FitPair(args) => {
            let lib = compute::library(&cli.component_files)?;
            let out = fit_pair::run(&lib, args, cli.json)?;
            print(&out)?;
            Ok(0)
        }
    }
}

/// A clap error folded into one line (its first paragraph).
fn clap_line(e: &clap::Error) -> String {
    let full = e.render().to_string();
    let first = full.split("\n\n").next().unwrap_or(&full);
    let line = error::one_line(first);
    let line = line.strip_prefix("error: ").unwrap_or(&line).to_string();
    format!("{line} (see 'flashduty --help')")
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            use clap::error::ErrorKind;
            return match e.kind() {
                ErrorKind::DisplayHelp | ErrorKind::DisplayVersion => {
                    let _ = print(&e.render().to_string());
                    ExitCode::SUCCESS
                }
                ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand | ErrorKind::MissingSubcommand => {
                    let _ = writeln!(std::io::stderr(), "error: no command given (see 'flashduty --help')");
                    ExitCode::from(2)
                }
                _ => {
                    let line = clap_line(&e);
                    if std::env::args().any(|a| a == "--json") {
                        let e = CliError::with_kind("invalid-arguments", line);
                        let _ = writeln!(std::io::stderr(), "{}", e.to_json());
                    } else {
                        let _ = writeln!(std::io::stderr(), "error: {line}");
                    }
                    ExitCode::from(2)
                }
            };
        }
    };
    match run(&cli) {
        Ok(code) => ExitCode::from(code),
        Err(e) => {
            // With --json the error is one JSON object on stderr, as one line.
            if cli.json {
                let _ = writeln!(std::io::stderr(), "{}", e.to_json());
            } else {
                let _ = writeln!(std::io::stderr(), "error: {e}");
            }
            ExitCode::from(2)
        }
    }
}
