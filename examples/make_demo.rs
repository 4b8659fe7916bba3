//! Writes `demo-data/trials.csv`, the trial table of the bundled demo study, with the
//! forecast simulator: the demo's volunteers are the first 20 simulated participants of
//! `demo-data/forecast.toml` on the task as planned.
//!
//! The study is invented: a "harbour lights" reversal-learning task (see
//! `demo-data/README.md`). Each volunteer's choices come from the hybrid associability
//! learner with softmax choice; both candidate learners (delta rule and hybrid) are then
//! fitted to those choices by maximum likelihood, exactly as `tangle forecast` does, and
//! their trial-wise quantities at the fitted parameters are the table's modulator
//! columns. Values are rounded to 6 decimals, as an exported table would be, and two
//! trials of one run lose their associability (a logging gap), so that the demo shows
//! how missing values are reported.
//!
//! Run with `cargo run --release --example make_demo`; the seed in the spec makes the
//! output the same on every machine.

use std::fmt::Write as _;
use std::path::Path;

use tangle::files::DiskFiles;
use tangle::forecast::learners::Quantity;
use tangle::forecast::participant::SimulatedParticipant;
use tangle::forecast::spec::ForecastSpec;
use tangle::forecast::summary::pearson;
use tangle::forecast::{ForecastOptions, read_spec, run_forecast};

const VOLUNTEERS: usize = 20;
/// The volunteer, run and trials whose associability was lost in a logging gap.
const GAP: (&str, usize, [usize; 2]) = ("07", 2, [37, 38]);

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let spec_path = root.join("demo-data/forecast.toml");
    let mut spec = read_spec(&DiskFiles, &spec_path, Some(VOLUNTEERS), None)?;
    spec.variants.truncate(1);
    let options = ForecastOptions {
        keep_participants: true,
    };
    let forecast = run_forecast(&spec, options, &|| {})?;
    let volunteers = &forecast.participants[0];
    let table = trial_table(&spec, volunteers);
    std::fs::write(root.join("demo-data/trials.csv"), &table)?;
    print_summary(&spec, volunteers, table.len());
    Ok(())
}

fn round6(x: f64) -> String {
    // `+ 0.0` turns −0 into 0 so no "-0.000000" is written.
    format!("{:.6}", (x * 1e6).round() / 1e6 + 0.0)
}

fn trial_table(spec: &ForecastSpec, volunteers: &[SimulatedParticipant]) -> String {
    let mut columns = Vec::new();
    for (l, learner) in spec.learners.iter().enumerate() {
        for &q in &learner.quantities {
            columns.push((l, q, learner.column(q)));
        }
    }
    let names: Vec<&str> = columns.iter().map(|c| c.2.as_str()).collect();
    let mut out = format!(
        "subject,run,trial,cue_onset,outcome_onset,choice,reward,{}\n",
        names.join(",")
    );
    for v in volunteers {
        for (r, plan) in v.plans.iter().enumerate() {
            for t in 0..plan.cue_onsets.len() {
                let trial = v.behaviour[r][t];
                let _ = write!(
                    out,
                    "{},{},{},{:.3},{:.3},{},{}",
                    v.label,
                    r + 1,
                    t + 1,
                    plan.cue_onsets[t],
                    plan.outcome_onsets[t],
                    trial.choice,
                    trial.reward
                );
                let in_gap = v.label == GAP.0 && r + 1 == GAP.1 && GAP.2.contains(&(t + 1));
                for (l, q, _) in &columns {
                    let value = v.traces[*l][r][t].get(*q);
                    match value {
                        Some(_) if in_gap && *q == Quantity::Associability => out.push_str(",n/a"),
                        Some(x) => {
                            out.push(',');
                            out.push_str(&round6(x));
                        }
                        None => out.push_str(",n/a"),
                    }
                }
                out.push('\n');
            }
        }
    }
    out
}

/// Per volunteer: true and fitted parameters, and how alike the two learners' quantities
/// are (trial-level correlations pooled over runs).
fn print_summary(spec: &ForecastSpec, volunteers: &[SimulatedParticipant], bytes: usize) {
    println!(
        "harbour lights (invented demo): wrote demo-data/trials.csv ({bytes} bytes), {} volunteers",
        volunteers.len()
    );
    let names: Vec<String> = spec
        .learners
        .iter()
        .flat_map(|l| {
            l.kind
                .all_parameters()
                .into_iter()
                .map(move |p| format!("{}.{}", l.name, p.name))
        })
        .collect();
    println!("columns of 'fitted': {}", names.join(" "));
    for v in volunteers {
        let pooled = |l: usize, q: Quantity| -> Vec<f64> {
            v.traces[l]
                .iter()
                .flatten()
                .filter_map(|t| t.get(q))
                .collect()
        };
        let r = |q| pearson(&pooled(0, q), &pooled(1, q)).unwrap_or(f64::NAN);
        let truth: Vec<String> = v.persona.truth.iter().map(|x| format!("{x:.3}")).collect();
        let fitted: Vec<String> = v
            .fits
            .iter()
            .flat_map(|f| f.parameters.iter().map(|x| format!("{x:.3}")))
            .collect();
        println!(
            "{}  true [{}]  fitted [{}]  r(pe) {:.3}  r(value) {:.3}",
            v.label,
            truth.join(" "),
            fitted.join(" "),
            r(Quantity::PredictionError),
            r(Quantity::Value)
        );
    }
    println!(
        "volunteer {} run {}: hybrid_assoc n/a on trials {} and {} (logging gap)",
        GAP.0, GAP.1, GAP.2[0], GAP.2[1]
    );
}
