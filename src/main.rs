//! The `tangle` binary: parses arguments, calls the library, maps errors to exit codes
//! (0 done · 1 bad input or usage · 2 internal error · 3 a `--fail-on` status reached).

use std::io::IsTerminal;
use std::path::Path;
use std::process::ExitCode;

use clap::Parser;
use indicatif::{ProgressBar, ProgressStyle};
use tangle::check::{CheckOptions, check_file, prepare, stream_json};
use tangle::cli::{Cli, Command, FailOn, ForecastArgs, Format, Orthogonalise, OutputArgs};
use tangle::cohort::SubjectSummary;
use tangle::error::Error;
use tangle::files::DiskFiles;
use tangle::forecast::{ForecastOptions, read_spec, run_forecast};
use tangle::output::{deliver, print_to_stdout, write_trial_folders};
use tangle::render::{check_report, forecast_report};
use tangle::screen::Status;
use tangle::settings::{AnalysisOptions, Orthogonalisation};
use tangle::signal::BootstrapSettings;

/// A whole-cohort check makes millions of small allocations across threads (a run's
/// report is built, rendered and dropped on a worker); mimalloc takes about a fifth off
/// the wall time of the 1,000-participant benchmark (BENCHMARKS.md).
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() -> ExitCode {
    let cli = Cli::parse();
    // A panic is a bug in tangle, never the user's fault: report it as an internal error (2).
    std::panic::catch_unwind(|| run(&cli)).unwrap_or_else(|_| {
        eprintln!("tangle: internal error (please report it, with the input that caused it)");
        ExitCode::from(2)
    })
}

fn run(cli: &Cli) -> ExitCode {
    let result = match &cli.command {
        Command::Check { study, output } if output.format == Format::Json => {
            check_streaming(study, output)
        }
        Command::Check { study, output } => check_file(&DiskFiles, study, options(output))
            .and_then(|report| {
                deliver(check_report(&report, output.format), output.out.as_deref())?;
                Ok(fail_on(&report.subjects, output))
            }),
        Command::Merge { files, format, out } => merge(files, *format, out.as_deref()),
        Command::Demo { output } => tangle::demo::check_demo(options(output)).and_then(|report| {
            deliver(check_report(&report, output.format), output.out.as_deref())?;
            Ok(fail_on(&report.subjects, output))
        }),
        Command::Forecast(args) => forecast(args),
    };
    match result {
        Ok(code) => code,
        Err(err) => {
            eprintln!("tangle: {err}");
            ExitCode::from(match err {
                Error::Internal(_) => 2,
                _ => 1,
            })
        }
    }
}

fn forecast(args: &ForecastArgs) -> tangle::Result<ExitCode> {
    let spec = read_spec(&DiskFiles, &args.spec, args.participants, args.seed)?;
    let total = (spec.participants * spec.variants.len()) as u64;
    let bar = if args.quiet || !std::io::stderr().is_terminal() {
        ProgressBar::hidden()
    } else {
        let bar = ProgressBar::new(total);
        bar.set_style(
            ProgressStyle::with_template(
                "simulating {bar:40} {pos}/{len} participant-variants, {eta} left",
            )
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
        );
        bar
    };
    let options = ForecastOptions {
        keep_participants: args.write_trials.is_some(),
    };
    let result = run_forecast(&spec, options, &|| bar.inc(1));
    bar.finish_and_clear();
    let result = result?;
    let document = forecast_report(&result.report, args.format);
    if let Some(dir) = &args.write_trials {
        write_trial_folders(dir, &spec, &result)?;
    }
    deliver(document, args.out.as_deref())?;
    Ok(ExitCode::SUCCESS)
}

/// `check --format json`: runs are written as they are checked, never all held at once.
fn check_streaming(study: &Path, output: &OutputArgs) -> tangle::Result<ExitCode> {
    let text = tangle::files::read_text(&DiskFiles, study)?;
    let study = tangle::study::parse_study(study, &text)?;
    let prepared = prepare(&DiskFiles, &study, options(output))?;
    // The writers take an I/O callback: the check's own outcome is kept beside it.
    let mut outcome = None;
    let mut write = |out: &mut dyn std::io::Write| -> std::io::Result<()> {
        let result = stream_json(&prepared, &DiskFiles, out);
        let failed = result.is_err();
        outcome = Some(result);
        if failed {
            Err(std::io::Error::other("the check failed"))
        } else {
            Ok(())
        }
    };
    let written = match &output.out {
        Some(path) => tangle::output::write_atomically_with(path, &mut write),
        None => {
            let mut buffered = std::io::BufWriter::new(std::io::stdout().lock());
            write(&mut buffered).map_err(|source| Error::Output {
                path: "standard output".into(),
                source,
            })
        }
    };
    let summaries = match outcome {
        Some(Err(Error::Output { source, .. }))
            if source.kind() == std::io::ErrorKind::BrokenPipe && output.out.is_none() =>
        {
            return Ok(ExitCode::SUCCESS); // e.g. piped into `head`
        }
        Some(result) => result?,
        None => {
            return Err(written
                .err()
                .unwrap_or_else(|| Error::Internal("the check did not run".into())));
        }
    };
    written?;
    Ok(fail_on(&summaries.subjects, output))
}

fn merge(
    files: &[std::path::PathBuf],
    format: Format,
    out: Option<&Path>,
) -> tangle::Result<ExitCode> {
    let mut shards = Vec::new();
    for path in files {
        let text = tangle::files::read_text(&DiskFiles, path)?;
        shards.push((path.clone(), text));
    }
    let merged = tangle::merge::merge(&shards)?;
    if format != Format::Json {
        deliver(check_report(&merged.report()?, format), out)?;
        return Ok(ExitCode::SUCCESS);
    }
    match out {
        Some(path) => tangle::output::write_atomically_with(path, &mut |out| {
            merged
                .write_json(out)
                .map_err(|err| std::io::Error::other(err.to_string()))
        })?,
        None => {
            let mut text = Vec::new();
            merged.write_json(&mut text)?;
            print_to_stdout(&text)?;
        }
    }
    Ok(ExitCode::SUCCESS)
}

fn fail_on(subjects: &[SubjectSummary], output: &OutputArgs) -> ExitCode {
    let limit = output.fail_on.map(|level| match level {
        FailOn::Caution => Status::Caution,
        FailOn::Severe => Status::Severe,
    });
    let reached = limit.is_some_and(|limit| subjects.iter().any(|s| s.status >= limit));
    if reached {
        ExitCode::from(3)
    } else {
        ExitCode::SUCCESS
    }
}

fn options(output: &OutputArgs) -> CheckOptions {
    CheckOptions {
        analysis: AnalysisOptions {
            centre: !output.no_centring,
            orthogonalise: match output.orthogonalise {
                Orthogonalise::None => Orthogonalisation::None,
                Orthogonalise::Serial => Orthogonalisation::Serial,
                Orthogonalise::WithinEvent => Orthogonalisation::WithinEvent,
            },
            glms: (!output.glm.is_empty()).then(|| output.glm.clone()),
            bootstrap: BootstrapSettings {
                resamples: output.resamples,
                seed: output.seed,
            },
        },
        signal: output.signal.clone(),
        subjects: output.subjects.clone(),
        shard: output.shard,
    }
}
