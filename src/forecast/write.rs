//! `--write-trials`: each variant's simulated trial table and a study file that reads
//! it, so that `tangle check` (or any other analysis) can be run on the simulated
//! study. Numbers are written at full precision (shortest round-trip decimal), so the
//! check of the written files gives exactly the forecast's numbers.

use std::fmt::Write as _;

use super::participant::{CUE, CUE_ONSET, OUTCOME, OUTCOME_ONSET, SimulatedParticipant};
use super::spec::{ForecastSpec, RunLength, TaskVariant};
use crate::study::NoiseModel;

/// The files of one variant's folder: (file name, contents).
pub fn variant_files(
    spec: &ForecastSpec,
    variant: &TaskVariant,
    participants: &[SimulatedParticipant],
) -> Vec<(String, String)> {
    let mut files = vec![
        ("trials.csv".to_string(), trial_table(spec, participants)),
        ("study.toml".to_string(), study_toml(spec, variant)),
        (
            "parameters.csv".to_string(),
            parameter_table(spec, participants),
        ),
    ];
    if matches!(variant.task.scans, RunLength::AfterLastOutcome(_)) {
        files.push(("scans.csv".to_string(), scans_table(participants)));
    }
    files
}

/// A folder name for variant `index` (1-based): the index, then the name in lower case
/// with every run of other characters turned into one `-`.
pub fn folder_name(index: usize, name: &str) -> String {
    let mut slug = String::new();
    for c in name.chars() {
        if c.is_ascii_alphanumeric() {
            slug.push(c.to_ascii_lowercase());
        } else if !slug.ends_with('-') {
            slug.push('-');
        }
    }
    format!("{index}-{}", slug.trim_matches('-'))
}

fn trial_table(spec: &ForecastSpec, participants: &[SimulatedParticipant]) -> String {
    let mut out = format!("subject,run,trial,{CUE_ONSET},{OUTCOME_ONSET},choice,reward");
    for learner in &spec.learners {
        for &q in &learner.quantities {
            out.push(',');
            out.push_str(&learner.column(q));
        }
    }
    out.push('\n');
    for p in participants {
        for (r, plan) in p.plans.iter().enumerate() {
            for t in 0..plan.cue_onsets.len() {
                let trial = p.behaviour[r][t];
                let _ = write!(
                    out,
                    "{},{},{},{},{},{},{}",
                    p.label,
                    r + 1,
                    t + 1,
                    plan.cue_onsets[t],
                    plan.outcome_onsets[t],
                    trial.choice,
                    trial.reward
                );
                for (l, learner) in spec.learners.iter().enumerate() {
                    for &q in &learner.quantities {
                        match p.traces[l][r][t].get(q) {
                            Some(v) => {
                                let _ = write!(out, ",{v}");
                            }
                            None => out.push_str(",n/a"),
                        }
                    }
                }
                out.push('\n');
            }
        }
    }
    out
}

fn scans_table(participants: &[SimulatedParticipant]) -> String {
    let mut out = String::from("subject,run,scans\n");
    for p in participants {
        for (r, plan) in p.plans.iter().enumerate() {
            let _ = writeln!(out, "{},{},{}", p.label, r + 1, plan.scans);
        }
    }
    out
}

/// True and fitted parameters of every participant, for recovery checks of one's own.
fn parameter_table(spec: &ForecastSpec, participants: &[SimulatedParticipant]) -> String {
    let mut out = String::from("subject,generator");
    for learner in &spec.learners {
        for info in learner.kind.all_parameters() {
            let _ = write!(out, ",{}_{}_fitted", learner.name, info.name);
        }
        let _ = write!(out, ",{}_log_likelihood", learner.name);
    }
    out.push_str(",true_parameters\n");
    for p in participants {
        let generator = &spec.learners[p.persona.generator];
        let _ = write!(out, "{},{}", p.label, generator.name);
        for fit in &p.fits {
            for v in &fit.parameters {
                let _ = write!(out, ",{v}");
            }
            let _ = write!(out, ",{}", fit.log_likelihood);
        }
        let truth: Vec<String> = generator
            .kind
            .all_parameters()
            .iter()
            .zip(&p.persona.truth)
            .map(|(info, v)| format!("{}={v}", info.name))
            .collect();
        let _ = writeln!(out, ",\"{}\"", truth.join(" "));
    }
    out
}

fn study_toml(spec: &ForecastSpec, variant: &TaskVariant) -> String {
    let task = &variant.task;
    let scans = match task.scans {
        RunLength::Fixed(n) => format!("scans = {n}"),
        RunLength::AfterLastOutcome(_) => "scans_file = \"scans.csv\"".to_string(),
    };
    let mut out = format!(
        "# Written by `tangle forecast` from {spec_file}: SIMULATED participants, not data.\n\
         # Variant \"{variant}\"; seed {seed}. Check it with: tangle check study.toml\n\n\
         [study]\nname = {name}\n\n\
         [acquisition]\ntr = {tr:?}\n{scans}\nmicrotime = {microtime}\nreference = {reference:?}\n\n\
         [filter]\nhigh_pass = {high_pass:?}\n\n\
         [hrf]\nderivative = {derivative}\n\n\
         [trials]\nfile = \"trials.csv\"\nsubject = \"subject\"\nrun = \"run\"\n\n\
         [[event]]\nname = \"{CUE}\"\nonset = \"{CUE_ONSET}\"\nduration = {cue:?}\n\n\
         [[event]]\nname = \"{OUTCOME}\"\nonset = \"{OUTCOME_ONSET}\"\nduration = {outcome:?}\n",
        spec_file = one_line(&spec.path.display().to_string()),
        variant = one_line(&variant.name),
        seed = spec.seed,
        name = toml_string(&format!("{} ({}, simulated)", spec.name, variant.name)),
        tr = task.tr,
        microtime = spec.design.microtime,
        reference = spec.design.reference,
        high_pass = spec.design.high_pass,
        derivative = spec.design.derivative,
        cue = task.cue_duration,
        outcome = task.outcome_duration,
    );
    for learner in &spec.learners {
        let _ = write!(
            out,
            "\n[[model]]\nname = \"{}\"\nmodulators = [\n",
            learner.name
        );
        for &q in &learner.quantities {
            let event = if q.at_cue() { CUE } else { OUTCOME };
            let _ = writeln!(
                out,
                "  {{ event = \"{event}\", column = \"{}\" }},",
                learner.column(q)
            );
        }
        out.push_str("]\n");
    }
    for glm in &spec.glms {
        let models: Vec<String> = glm.models.iter().map(|m| toml_string(m)).collect();
        let _ = write!(
            out,
            "\n[[glm]]\nname = {}\nmodels = [{}]\n",
            toml_string(&glm.name),
            models.join(", ")
        );
    }
    if let NoiseModel::Ar1(rho) = spec.noise {
        let _ = write!(out, "\n[noise]\nmodel = \"ar1\"\nar1 = {rho:?}\n");
    }
    let t = &spec.thresholds;
    let _ = write!(
        out,
        "\n[thresholds]\nvif_caution = {:?}\nvif_severe = {:?}\ncondition_index = {:?}\n\
         condition_index_severe = {:?}\nshared_over_unique = {:?}\n",
        t.vif_caution,
        t.vif_severe,
        t.condition_index,
        t.condition_index_severe,
        t.shared_over_unique
    );
    out
}

/// A TOML basic string with every character that needs it escaped.
fn toml_string(text: &str) -> String {
    toml::Value::String(text.to_string()).to_string()
}

/// Text safe inside a `#` comment line.
fn one_line(text: &str) -> String {
    text.replace(['\n', '\r'], " ")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn folder_names_are_plain() {
        assert_eq!(folder_name(1, "as planned"), "1-as-planned");
        assert_eq!(
            folder_name(3, "Outcome 0.5 s after cue!"),
            "3-outcome-0-5-s-after-cue"
        );
    }
}
