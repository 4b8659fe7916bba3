//! One simulated participant on one task variant, from persona to checked runs:
//! behaviour from the generating learner, a maximum-likelihood fit of every candidate
//! learner to that behaviour (as a real analysis would fit them), the candidates'
//! trial-wise quantities at their fitted parameters, then the same design check a
//! study gets.

use super::fit::{Fit, fit_learner};
use super::learners::{ChoiceOutcome, Learner, LearnerModel, TrialQuantities};
use super::simulate::{Persona, RunPlan, Stream, behave, plan_run, stream};
use super::spec::{ForecastSpec, TaskVariant};
use crate::assess::{AssessedRun, assess_run};
use crate::design::DesignSpec;
use crate::settings::{AnalysisOptions, RunSettings};
use crate::study::{ModelSpec, ModulatorSpec};
use crate::trials::{EventTrials, ModulatorValues, RunTrials};

/// Event names and trial-table columns of a simulated study.
pub const CUE: &str = "cue";
pub const OUTCOME: &str = "outcome";
pub const CUE_ONSET: &str = "cue_onset";
pub const OUTCOME_ONSET: &str = "outcome_onset";

/// Everything simulated for one participant on one variant.
#[derive(Debug, Clone)]
pub struct SimulatedParticipant {
    pub label: String,
    pub persona: Persona,
    pub plans: Vec<RunPlan>,
    pub behaviour: Vec<Vec<ChoiceOutcome>>,
    /// One fit per candidate learner, in spec order.
    pub fits: Vec<Fit>,
    /// Per candidate learner, per run, per trial: quantities at the fitted parameters.
    pub traces: Vec<Vec<Vec<TrialQuantities>>>,
}

/// The label of participant `number` (1-based) among `count`: zero-padded to the same
/// width for all, at least two digits, so that labels sort as numbers do.
pub fn label(number: usize, count: usize) -> String {
    let width = count.to_string().len().max(2);
    format!("{number:0width$}")
}

/// Simulates and fits participant `persona` on `variant`.
pub fn simulate(
    spec: &ForecastSpec,
    variant: &TaskVariant,
    persona: &Persona,
) -> SimulatedParticipant {
    let task = &variant.task;
    let mut plan_rng = stream(spec.seed, persona.number, Stream::Plan);
    let plans: Vec<RunPlan> = (0..task.runs)
        .map(|_| plan_run(task, &mut plan_rng))
        .collect();
    let generator = &spec.learners[persona.generator];
    let (learning, beta) = persona.truth.split_at(persona.truth.len() - 1);
    let truth = LearnerModel::new(generator.kind, learning);
    let mut behaviour_rng = stream(spec.seed, persona.number, Stream::Behaviour);
    let behaviour: Vec<Vec<ChoiceOutcome>> = plans
        .iter()
        .map(|plan| {
            behave(
                &truth,
                beta[0],
                spec.initial_value,
                &plan.probabilities,
                &mut behaviour_rng,
            )
        })
        .collect();
    let fits: Vec<Fit> = spec
        .learners
        .iter()
        .map(|l| {
            fit_learner(
                l.kind,
                &l.fixed(),
                task.options,
                spec.initial_value,
                &behaviour,
            )
        })
        .collect();
    let traces = spec
        .learners
        .iter()
        .zip(&fits)
        .map(|(l, fit)| {
            let learning = &fit.parameters[..fit.parameters.len() - 1];
            let model = LearnerModel::new(l.kind, learning);
            behaviour
                .iter()
                .map(|run| model.trace(task.options, spec.initial_value, run))
                .collect()
        })
        .collect();
    SimulatedParticipant {
        label: label(persona.number, spec.participants),
        persona: persona.clone(),
        plans,
        behaviour,
        fits,
        traces,
    }
}

/// The run settings a real analysis of this variant would use: the spec's design,
/// noise model, GLMs and thresholds, modulators mean-centred, one model per candidate
/// learner with its quantities as modulators of the cue or the outcome.
pub fn settings_for(spec: &ForecastSpec, variant: &TaskVariant) -> RunSettings {
    let design = DesignSpec {
        tr: variant.task.tr,
        microtime: spec.design.microtime,
        reference: spec.design.reference,
        high_pass: spec.design.high_pass,
        derivative: spec.design.derivative,
        centre: true,
        models: spec
            .learners
            .iter()
            .map(|l| ModelSpec {
                name: l.name.clone(),
                modulators: l
                    .quantities
                    .iter()
                    .map(|&q| ModulatorSpec {
                        event: if q.at_cue() { CUE } else { OUTCOME }.into(),
                        column: l.column(q),
                    })
                    .collect(),
            })
            .collect(),
        noise: spec.noise,
        source: spec.path.clone(),
    };
    RunSettings::new(
        design,
        spec.glms.clone(),
        spec.thresholds,
        AnalysisOptions::default(),
    )
}

/// The participant's runs as the design builder takes them.
pub fn run_trials(
    spec: &ForecastSpec,
    variant: &TaskVariant,
    participant: &SimulatedParticipant,
) -> Vec<RunTrials> {
    let task = &variant.task;
    participant
        .plans
        .iter()
        .enumerate()
        .map(|(r, plan)| {
            let event = |name: &str, onsets: &[f64], at_cue: bool, duration: f64| EventTrials {
                name: name.into(),
                onsets: onsets.to_vec(),
                durations: vec![duration; onsets.len()],
                lines: (1..=onsets.len()).collect(),
                missing_durations: 0,
                modulators: spec
                    .learners
                    .iter()
                    .enumerate()
                    .flat_map(|(l, learner)| {
                        let trace = &participant.traces[l][r];
                        learner
                            .quantities
                            .iter()
                            .filter(move |q| q.at_cue() == at_cue)
                            .map(move |&q| ModulatorValues {
                                model: Some(learner.name.clone()),
                                column: learner.column(q),
                                values: trace.iter().map(|t| t.get(q)).collect(),
                            })
                    })
                    .collect(),
            };
            RunTrials {
                subject: participant.label.clone(),
                run: (r + 1).to_string(),
                session: None,
                flags: Vec::new(),
                scans: plan.scans,
                events: vec![
                    event(CUE, &plan.cue_onsets, true, task.cue_duration),
                    event(OUTCOME, &plan.outcome_onsets, false, task.outcome_duration),
                ],
            }
        })
        .collect()
}

/// Checks every run of the participant with the study's full diagnostics.
pub fn check_runs(settings: &RunSettings, runs: &[RunTrials]) -> crate::Result<Vec<AssessedRun>> {
    runs.iter()
        .map(|run| assess_run(settings, run, None, None))
        .collect()
}
