//! The `tangle` binary: parses arguments, calls the library, maps errors to exit codes
//! (0 done · 1 bad input or usage · 2 internal error · 3 a `--fail-on` status reached).

use std::process::ExitCode;

use clap::Parser;
use tangle::check::{CheckOptions, check_file};
use tangle::cli::{Cli, Command, FailOn, Format, Orthogonalise, OutputArgs};
use tangle::error::Error;
use tangle::files::DiskFiles;
use tangle::partition::signal::BootstrapSettings;
use tangle::report::{self, Report};
use tangle::screen::Status;

fn main() -> ExitCode {
    let cli = Cli::parse();
    // A panic is a bug in tangle, never the user's fault: report it as an internal error (2).
    std::panic::catch_unwind(|| run(&cli)).unwrap_or_else(|_| {
        eprintln!("tangle: internal error (please report it, with the input that caused it)");
        ExitCode::from(2)
    })
}

fn run(cli: &Cli) -> ExitCode {
    let (result, output) = match &cli.command {
        Command::Check { study, output } => {
            (check_file(&DiskFiles, study, options(output)), output)
        }
        Command::Demo { output } => (tangle::demo::check_demo(options(output)), output),
    };
    match result.and_then(|report| deliver(&report, output)) {
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

fn options(output: &OutputArgs) -> CheckOptions {
    CheckOptions {
        centre: !output.no_centring,
        orthogonalise: output.orthogonalise == Orthogonalise::Serial,
        signal: output.signal.clone(),
        subjects: output.subjects.clone(),
        bootstrap: BootstrapSettings {
            resamples: output.resamples,
            seed: output.seed,
        },
    }
}

fn deliver(report: &Report, output: &OutputArgs) -> tangle::Result<ExitCode> {
    let text = match output.format {
        Format::Table => report::table::render(report),
        Format::Tsv => report::tsv::render_joined(report),
        Format::Json => report::json::render(report),
        Format::Html => report::html::render(report),
        Format::Methods => report::methods::render(report),
    };
    match (&output.out, output.format) {
        (Some(path), Format::Tsv) => {
            tangle::output::write_tables(path, &report::tsv::render(report))?
        }
        (Some(path), _) => tangle::output::write_atomically(path, &text)?,
        (None, _) => print_to_stdout(&text)?,
    }
    let limit = output.fail_on.map(|level| match level {
        FailOn::Caution => Status::Caution,
        FailOn::Severe => Status::Severe,
    });
    let reached = limit.is_some_and(|limit| report.subjects.iter().any(|s| s.status >= limit));
    Ok(if reached {
        ExitCode::from(3)
    } else {
        ExitCode::SUCCESS
    })
}
