//! `bandtemp-check RECORD.toml...`: checks instrument records against their tolerances.
//! See `--help` and the README's "Calibration checks in CI".

use bandtemp_check::record::{self, Instrument};
use bandtemp_check::report;
use bandtemp_check::run::{self, CheckResult, Outcome, Status};
use std::io::Write as _;
use std::process::ExitCode;

const USAGE: &str = "\
usage: bandtemp-check [--json] [--junit FILE] [--quiet] RECORD.toml...

Checks each instrument record against its tolerances: fit residuals, coverage of the
range by the blackbody points, the calibration curve against the exact band model, round
trips and monotonicity, the counts against the rails, and the frame table against exact
inversion.

  --json         print the report as JSON on stdout instead of text
  --junit FILE   also write a JUnit XML report to FILE
  -q, --quiet    no progress lines on stderr
  -h, --help     this text
  -V, --version  the version

exit status: 0 every check passed; 1 a check failed; 2 a record could not be read,
or the command line is wrong.";

struct Options {
    json: bool,
    junit: Option<String>,
    quiet: bool,
    records: Vec<String>,
}

/// Hand-written parsing: four options do not need a dependency.
fn parse_args(args: impl Iterator<Item = String>) -> Result<Option<Options>, String> {
    let mut options = Options {
        json: false,
        junit: None,
        quiet: false,
        records: Vec::new(),
    };
    let mut args = args.peekable();
    let mut only_paths = false;
    while let Some(arg) = args.next() {
        if only_paths {
            options.records.push(arg);
            continue;
        }
        match arg.as_str() {
            "-h" | "--help" => {
                println!("{USAGE}");
                return Ok(None);
            }
            "-V" | "--version" => {
                println!("bandtemp-check {}", env!("CARGO_PKG_VERSION"));
                return Ok(None);
            }
            "--json" => options.json = true,
            "-q" | "--quiet" => options.quiet = true,
            "--junit" => match args.next() {
                Some(file) if !file.is_empty() => options.junit = Some(file),
                _ => return Err("--junit needs a file name".to_owned()),
            },
            "--" => only_paths = true,
            other => {
                if let Some(file) = other.strip_prefix("--junit=") {
                    options.junit = Some(file.to_owned());
                } else if other.starts_with('-') && other.len() > 1 {
                    return Err(format!("unknown option `{other}`"));
                } else {
                    options.records.push(arg);
                }
            }
        }
    }
    if options.records.is_empty() {
        return Err("no record given".to_owned());
    }
    Ok(Some(options))
}

/// A record that could not be read, as an outcome (so it shows in JSON and JUnit too).
fn unreadable(source: &str, message: String) -> Outcome {
    Outcome {
        source: source.to_owned(),
        instrument: Instrument {
            name: "(unreadable record)".to_owned(),
            serial: None,
            notes: None,
        },
        calibration: String::new(),
        checks: vec![CheckResult {
            id: "record",
            title: "record",
            status: Status::Error,
            summary: message,
            limit: String::new(),
            value_k: None,
            limit_k: None,
            where_k: None,
            seconds: 0.0,
        }],
    }
}

fn main() -> ExitCode {
    let options = match parse_args(std::env::args().skip(1)) {
        Ok(Some(options)) => options,
        Ok(None) => return ExitCode::SUCCESS,
        Err(message) => {
            eprintln!("bandtemp-check: {message}\n\n{USAGE}");
            return ExitCode::from(2);
        }
    };
    let mut outcomes = Vec::new();
    let mut unreadable_records = false;
    for path in &options.records {
        let outcome = match std::fs::read_to_string(path) {
            Err(error) => Err(format!("cannot read: {error}")),
            Ok(text) => record::parse(&text)
                .map_err(|e| e.to_string())
                .map(|record| {
                    let mut progress = |line: &str| {
                        if !options.quiet {
                            eprintln!("bandtemp-check: {path}: {line}");
                        }
                    };
                    run::run(path, &record, &mut progress)
                }),
        };
        let outcome = outcome.unwrap_or_else(|message| {
            eprintln!("bandtemp-check: {path}: {message}");
            unreadable_records = true;
            unreadable(path, message)
        });
        outcomes.push(outcome);
    }
    let stdout = if options.json {
        report::json(&outcomes)
    } else {
        outcomes.iter().map(report::text).collect()
    };
    let mut lock = std::io::stdout().lock();
    if lock
        .write_all(stdout.as_bytes())
        .and_then(|()| lock.flush())
        .is_err()
    {
        return ExitCode::from(2);
    }
    if let Some(file) = &options.junit {
        if let Err(error) = std::fs::write(file, report::junit(&outcomes)) {
            eprintln!("bandtemp-check: cannot write {file}: {error}");
            return ExitCode::from(2);
        }
    }
    if unreadable_records {
        ExitCode::from(2)
    } else if outcomes.iter().all(Outcome::passed) {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    }
}
