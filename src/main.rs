//! The `tangle` binary: parses arguments, calls the library, maps errors to exit codes
//! (0 done · 1 bad input or usage · 2 internal error · 3 a `--fail-on` status reached).

use std::io::IsTerminal;
use std::path::Path;
use std::process::ExitCode;

use clap::Parser;
use indicatif::{ProgressBar, ProgressStyle};
use tangle::check::{CheckOptions, check_file, prepare};
use tangle::cli::{Cli, Command, FailOn, ForecastFormat, Format, Orthogonalise, OutputArgs};
use tangle::error::Error;
use tangle::files::DiskFiles;
use tangle::forecast::{ForecastOptions, read_spec, run_forecast, write_trial_folders};
use tangle::render;
use tangle::render::json::stream_check;
use tangle::report::Report;
use tangle::screen::Status;
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
            .and_then(|report| deliver(&report, output)),
        Command::Merge { files, format, out } => merge(files, *format, out.as_deref()),
        Command::Demo { output } => {
            tangle::demo::check_demo(options(output)).and_then(|report| deliver(&report, output))
        }
        Command::Forecast {
            spec,
            participants,
            seed,
            format,
            out,
            write_trials,
            quiet,
        } => forecast(
            spec,
            *participants,
            *seed,
            *format,
            out.as_deref(),
            write_trials.as_deref(),
            *quiet,
        ),
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

#[allow(clippy::too_many_arguments)]
fn forecast(
    path: &Path,
    participants: Option<usize>,
    seed: Option<u64>,
    format: ForecastFormat,
    out: Option<&Path>,
    write_trials: Option<&Path>,
    quiet: bool,
) -> tangle::Result<ExitCode> {
    let spec = read_spec(&DiskFiles, path, participants, seed)?;
    let total = (spec.participants * spec.variants.len()) as u64;
    let bar = if quiet || !std::io::stderr().is_terminal() {
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
        keep_participants: write_trials.is_some(),
    };
    let result = run_forecast(&spec, options, &|| bar.inc(1));
    bar.finish_and_clear();
    let result = result?;
    let report = &result.report;
    let text = match format {
        ForecastFormat::Table => render::forecast::table::render(report),
        ForecastFormat::Tsv => render::forecast::tsv::render_joined(report),
        ForecastFormat::Json => render::forecast::json(report),
        ForecastFormat::Html => render::forecast::html::render(report),
    };
    if let Some(dir) = write_trials {
        write_trial_folders(dir, &spec, &result)?;
    }
    match (out, format) {
        (Some(path), ForecastFormat::Tsv) => {
            tangle::output::write_tables(path, &render::forecast::tsv::render(report), "variants")?
        }
        (Some(path), _) => tangle::output::write_atomically(path, &text)?,
        (None, _) => print_to_stdout(&text)?,
    }
    Ok(ExitCode::SUCCESS)
}

/// Standard output closed early (e.g. piped into `head`) is not an error: the reader has
/// what it wanted.
fn print_to_stdout(text: &str) -> tangle::Result<()> {
    use std::io::Write;
    let mut stdout = std::io::stdout().lock();
    match stdout
        .write_all(text.as_bytes())
        .and_then(|()| stdout.flush())
    {
        Err(err) if err.kind() != std::io::ErrorKind::BrokenPipe => Err(Error::Output {
            path: "standard output".into(),
            source: err,
        }),
        _ => Ok(()),
    }
}

/// `check --format json`: runs are written as they are checked, never all held at once.
fn check_streaming(study: &Path, output: &OutputArgs) -> tangle::Result<ExitCode> {
    let text = tangle::files::read_text(&DiskFiles, study)?;
    let study = tangle::study::parse_study(study, &text)?;
    let prepared = prepare(&DiskFiles, &study, options(output))?;
    // The writers take an I/O callback: the check's own outcome is kept beside it.
    let mut outcome = None;
    let mut write = |out: &mut dyn std::io::Write| -> std::io::Result<()> {
        let result = stream_check(&prepared, &DiskFiles, out);
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
    let mut merged = Vec::new();
    tangle::merge::merge_json(&shards, &mut merged)?;
    if format != Format::Json {
        let report = tangle::merge::merged_report(&merged)?;
        write_report(&report, format, out)?;
        return Ok(ExitCode::SUCCESS);
    }
    let text = String::from_utf8(merged)
        .map_err(|_| Error::Internal("the merged report is not UTF-8".into()))?;
    match out {
        Some(path) => tangle::output::write_atomically(path, &text)?,
        None => print_to_stdout(&text)?,
    }
    Ok(ExitCode::SUCCESS)
}

fn fail_on(subjects: &[tangle::screen::SubjectSummary], output: &OutputArgs) -> ExitCode {
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
        centre: !output.no_centring,
        orthogonalise: output.orthogonalise == Orthogonalise::Serial,
        signal: output.signal.clone(),
        subjects: output.subjects.clone(),
        shard: output.shard,
        bootstrap: BootstrapSettings {
            resamples: output.resamples,
            seed: output.seed,
        },
    }
}

fn deliver(report: &Report, output: &OutputArgs) -> tangle::Result<ExitCode> {
    write_report(report, output.format, output.out.as_deref())?;
    Ok(fail_on(&report.subjects, output))
}

fn write_report(report: &Report, format: Format, out: Option<&Path>) -> tangle::Result<()> {
    let text = match format {
        Format::Table => render::table::render(report),
        Format::Tsv => render::tsv::render_joined(report),
        Format::Json => render::json::render(report),
        Format::Html => render::html::render(report),
        Format::Methods => render::methods::render(report),
    };
    match (out, format) {
        (Some(path), Format::Tsv) => {
            tangle::output::write_tables(path, &render::tsv::render(report), "regressors")?
        }
        (Some(path), _) => tangle::output::write_atomically(path, &text)?,
        (None, _) => print_to_stdout(&text)?,
    }
    Ok(())
}
