//! Maximum-likelihood fitting of a learner's parameters to observed choices.
//!
//! The fit minimises the negative log-likelihood of the choices under the learner with
//! softmax choice (the quantity of [`super::choice::log_likelihood`], evaluated by the
//! faster but equivalent `likelihood` submodule) over the free parameters, the way a
//! model-based analysis fits each participant before building the regressors (e.g. Daw
//! 2011, "Trial-by-trial data analysis using computational models"):
//!
//! 1. Each free parameter is mapped to an unbounded coordinate (the `scale` submodule): logistic
//!    between its bounds for `Bounded` parameters, the log of the value (clamped to the
//!    bounds) for `Log` ones. The search is then unconstrained.
//! 2. A coarse deterministic grid of starting points is evaluated: L levels per free
//!    parameter at fractions (k + ½)/L of its range on the search scale, with L = 7, 6,
//!    4, 3 for 1, 2, 3, 4 free parameters (7, 36, 64, 81 evaluations) and 2 beyond.
//!    A grid guards against starting Nelder–Mead in the wrong basin, the usual reason
//!    for multiple starts in these fits.
//! 3. Nelder–Mead (Nelder & Mead 1965; the `argmin` crate's implementation) runs from
//!    each of the [`STARTS`] best grid points, with an initial simplex of half a grid
//!    step along each coordinate, until the standard deviation of the simplex's costs
//!    falls below [`SCOUT_TOLERANCE`]: enough to tell which basin is deeper. From the
//!    better end point a final run with a fresh simplex of a quarter grid step polishes
//!    the estimate to [`POLISH_TOLERANCE`]; restarting on a new simplex also guards
//!    against the method's known premature collapse (the restart Press et al.,
//!    Numerical Recipes, recommend for the downhill simplex; cited from memory). Every
//!    run stops after [`MAX_ITERATIONS_PER_PARAMETER`]·n iterations at the latest. The
//!    lowest cost seen wins.
//!
//!    On simulated reversal-learning data (the tests' hybrid learner, 300 participants
//!    of 3 × 80 trials) a second start finds a better optimum than the first alone for
//!    about 3 % of fits. Scouting both loosely and polishing once takes about 500
//!    evaluations with four free parameters, against about 675 for two fully converged
//!    starts, and ended within 1e-4 of their log-likelihood in 298 of 300 fits (one
//!    worse by 0.42, one better).
//!
//! A likelihood that is not finite (possible only with non-finite inputs, e.g. a NaN
//! reward) is scored as [`NON_FINITE_COST`], a large finite penalty, so the simplex moves
//! away from it and no NaN reaches the optimiser or the result.
//!
//! Everything is sequential floating-point arithmetic without randomness, so the same
//! input gives the same [`Fit`] every time, whatever the thread count of the caller.

mod likelihood;
mod scale;
#[cfg(test)]
mod tests;

use std::cell::Cell;

use argmin::core::{CostFunction, Error, Executor, State};
use argmin::solver::neldermead::NelderMead;

use super::learners::{ChoiceOutcome, LearnerKind, LearnerModel, ParameterInfo};

/// How many of the best grid points Nelder–Mead starts from.
pub const STARTS: usize = 2;
/// A scouting Nelder–Mead run stops when the sample standard deviation of the negative
/// log-likelihoods at the simplex's vertices is below this (argmin's stopping rule for
/// the method).
pub const SCOUT_TOLERANCE: f64 = 1e-3;
/// The same rule for the final run: small enough that a well-determined parameter's
/// estimate is good to ~1e-5 relative (checked against scipy in the reference tests).
pub const POLISH_TOLERANCE: f64 = 1e-10;
/// The final run's initial simplex, in grid steps.
const POLISH_STEP: f64 = 0.25;
/// The scouting runs' initial simplex, in grid steps.
const SCOUT_STEP: f64 = 0.5;
/// Iteration cap per free parameter for each Nelder–Mead run.
pub const MAX_ITERATIONS_PER_PARAMETER: u64 = 100;
/// Cost given to a parameter vector whose likelihood is not finite: larger than any real
/// negative log-likelihood of a task of human length, and small enough that its square
/// (argmin's stopping rule squares costs) stays finite.
pub const NON_FINITE_COST: f64 = 1e100;

/// The learners have at most four parameters; room for more keeps the evaluation free of
/// allocation.
const MAX_PARAMETERS: usize = 8;

/// Result of fitting one learner to one participant's choices.
#[derive(Debug, Clone, PartialEq)]
pub struct Fit {
    /// Estimates in the order of `kind.all_parameters()` (learning parameters, then the
    /// inverse temperature); fixed parameters hold their fixed value.
    pub parameters: Vec<f64>,
    /// Log-likelihood of the choices at the estimate (finite; −[`NON_FINITE_COST`] if no
    /// parameter vector gave a finite likelihood).
    pub log_likelihood: f64,
    /// Number of likelihood evaluations used.
    pub evaluations: usize,
    /// Per parameter: true where the estimate lies within 1e-3 of the range ends of a
    /// fitted parameter (the fit hit a bound). The 1e-3 is a fraction of the range's
    /// width on the parameter's search scale (log units for `Log` parameters); for the
    /// rates, whose range is [0, 1], it is 1e-3 in value. Always false for fixed ones.
    pub at_bound: Vec<bool>,
}

/// Maximum-likelihood fit. `fixed[i] = Some(v)` holds parameter i at v (not fitted);
/// len(fixed) == kind.all_parameters().len(). Deterministic (no randomness): the same
/// input gives the same Fit on any machine/thread count.
///
/// With no trials at all the free parameters come back at their midpoints (arithmetic
/// for `Bounded`, geometric for `Log` parameters) with log-likelihood 0 and no
/// evaluation.
///
/// # Panics
/// If `fixed` has the wrong length or holds a non-finite value, or a choice is not below
/// `options` (programming errors of the caller).
pub fn fit_learner(
    kind: LearnerKind,
    fixed: &[Option<f64>],
    options: usize,
    initial_value: f64,
    runs: &[Vec<ChoiceOutcome>],
) -> Fit {
    let objective = Objective::new(kind, fixed, options, initial_value, runs);
    let not_at_bound = vec![false; objective.infos.len()];
    if runs.iter().all(|run| run.is_empty()) {
        return Fit {
            parameters: objective.base,
            log_likelihood: 0.0,
            evaluations: 0,
            at_bound: not_at_bound,
        };
    }
    if objective.free.is_empty() {
        let cost = objective.cost(&[]);
        return Fit {
            parameters: objective.base,
            log_likelihood: -cost,
            evaluations: objective.evaluations.get(),
            at_bound: not_at_bound,
        };
    }

    let grid = Grid::for_free(&objective);
    let starts = grid.best_points(&objective, STARTS);
    let mut best = starts[0].clone();
    for (u, _) in &starts {
        let found = nelder_mead(&objective, &grid, u, SCOUT_TOLERANCE, SCOUT_STEP);
        keep_better(&mut best, found);
    }
    let scouted = best.0.clone();
    let found = nelder_mead(&objective, &grid, &scouted, POLISH_TOLERANCE, POLISH_STEP);
    keep_better(&mut best, found);
    let (best_u, best_cost) = best;

    let n = objective.infos.len();
    let parameters = objective.values(&best_u)[..n].to_vec();
    let at_bound = (0..n)
        .map(|i| objective.free.contains(&i) && scale::at_bound(&objective.infos[i], parameters[i]))
        .collect();
    Fit {
        parameters,
        log_likelihood: -best_cost,
        evaluations: objective.evaluations.get(),
        at_bound,
    }
}

/// Replaces `best` by `found` when that has the lower cost.
fn keep_better(best: &mut (Vec<f64>, f64), found: Option<(Vec<f64>, f64)>) {
    if let Some(found) = found {
        if found.1 < best.1 {
            *best = found;
        }
    }
}

/// The negative log-likelihood as a function of the free parameters' search coordinates.
struct Objective<'a> {
    kind: LearnerKind,
    infos: Vec<ParameterInfo>,
    /// Every parameter's value; the free ones are overwritten from the coordinates.
    base: Vec<f64>,
    /// Indices (into `infos`) of the fitted parameters, in order.
    free: Vec<usize>,
    options: usize,
    initial_value: f64,
    runs: &'a [Vec<ChoiceOutcome>],
    evaluations: Cell<usize>,
}

impl<'a> Objective<'a> {
    /// Checks the caller's input (see [`fit_learner`]'s panics) and starts every free
    /// parameter at its midpoint.
    fn new(
        kind: LearnerKind,
        fixed: &[Option<f64>],
        options: usize,
        initial_value: f64,
        runs: &'a [Vec<ChoiceOutcome>],
    ) -> Objective<'a> {
        let infos = kind.all_parameters();
        assert!(
            infos.len() <= MAX_PARAMETERS,
            "{kind:?}: too many parameters"
        );
        assert_eq!(
            fixed.len(),
            infos.len(),
            "{kind:?} has {} parameters to fit or fix",
            infos.len()
        );
        assert!(
            fixed.iter().flatten().all(|v| v.is_finite()),
            "fixed parameter values must be finite: {fixed:?}"
        );
        Objective {
            kind,
            base: infos
                .iter()
                .zip(fixed)
                .map(|(info, f)| f.unwrap_or_else(|| scale::midpoint(info)))
                .collect(),
            free: (0..infos.len()).filter(|&i| fixed[i].is_none()).collect(),
            infos,
            options,
            initial_value,
            runs,
            evaluations: Cell::new(0),
        }
    }

    /// All parameter values for the free parameters' coordinates `u`.
    fn values(&self, u: &[f64]) -> [f64; MAX_PARAMETERS] {
        let mut values = [0.0; MAX_PARAMETERS];
        values[..self.base.len()].copy_from_slice(&self.base);
        for (&i, &ui) in self.free.iter().zip(u) {
            values[i] = scale::to_value(&self.infos[i], ui);
        }
        values
    }

    /// −log L at coordinates `u`, never NaN or infinite.
    fn cost(&self, u: &[f64]) -> f64 {
        self.evaluations.set(self.evaluations.get() + 1);
        let values = self.values(u);
        let n = self.infos.len();
        let learner = LearnerModel::new(self.kind, &values[..n - 1]);
        let ll = likelihood::choice_log_likelihood(
            &learner,
            values[n - 1],
            self.options,
            self.initial_value,
            self.runs,
        );
        if ll.is_finite() { -ll } else { NON_FINITE_COST }
    }
}

/// The starting grid: the same levels for every free parameter's search coordinate.
struct Grid {
    /// levels[j][k]: coordinate of level k of free parameter j.
    levels: Vec<Vec<f64>>,
    /// The distance between neighbouring levels, per free parameter: the unit of
    /// Nelder–Mead's initial simplex.
    steps: Vec<f64>,
    /// The middle of each free parameter's search range.
    centres: Vec<f64>,
}

impl Grid {
    fn for_free(objective: &Objective) -> Grid {
        let per_parameter = match objective.free.len() {
            1 => 7,
            2 => 6,
            3 => 4,
            4 => 3,
            _ => 2,
        };
        let infos = objective.free.iter().map(|&i| &objective.infos[i]);
        let levels: Vec<Vec<f64>> = infos
            .clone()
            .map(|info| {
                (0..per_parameter)
                    .map(|k| scale::coordinate_at(info, (k as f64 + 0.5) / per_parameter as f64))
                    .collect()
            })
            .collect();
        Grid {
            steps: levels.iter().map(|l| l[1] - l[0]).collect(),
            centres: infos.map(|info| scale::coordinate_at(info, 0.5)).collect(),
            levels,
        }
    }

    /// The `count` grid points of lowest cost with their costs, lowest first (ties keep
    /// grid order, so the choice is deterministic).
    fn best_points(&self, objective: &Objective, count: usize) -> Vec<(Vec<f64>, f64)> {
        let per_parameter = self.levels[0].len();
        let mut index = vec![0usize; self.levels.len()];
        let mut points = Vec::new();
        loop {
            let u: Vec<f64> = index.iter().zip(&self.levels).map(|(&k, l)| l[k]).collect();
            let cost = objective.cost(&u);
            points.push((u, cost));
            // Next index in mixed-radix order; done after the last.
            let Some(j) = index.iter().position(|&k| k + 1 < per_parameter) else {
                break;
            };
            index[j] += 1;
            index[..j].fill(0);
        }
        points.sort_by(|a, b| a.1.total_cmp(&b.1));
        points.truncate(count);
        points
    }
}

/// argmin's problem wrapper around the objective.
struct Search<'o, 'a>(&'o Objective<'a>);

impl CostFunction for Search<'_, '_> {
    type Param = Vec<f64>;
    type Output = f64;

    fn cost(&self, u: &Vec<f64>) -> Result<f64, Error> {
        Ok(self.0.cost(u))
    }
}

/// One Nelder–Mead run from `start` with an initial simplex of `step` grid steps and
/// stopping tolerance `tolerance`; the best coordinates and cost, or `None` if argmin
/// reports an error (it does so only for invalid settings, which these are not).
fn nelder_mead(
    objective: &Objective,
    grid: &Grid,
    start: &[f64],
    tolerance: f64,
    step: f64,
) -> Option<(Vec<f64>, f64)> {
    // Simplex: the start and one vertex per coordinate, stepped towards the centre of the
    // range so the first moves stay where the grid found the likelihood informative.
    let mut simplex = vec![start.to_vec()];
    for j in 0..start.len() {
        let mut vertex = start.to_vec();
        let towards_centre = if start[j] <= grid.centres[j] {
            1.0
        } else {
            -1.0
        };
        vertex[j] += towards_centre * step * grid.steps[j];
        simplex.push(vertex);
    }
    let solver = NelderMead::new(simplex).with_sd_tolerance(tolerance).ok()?;
    let iterations = MAX_ITERATIONS_PER_PARAMETER * start.len() as u64;
    let result = Executor::new(Search(objective), solver)
        .configure(|state| state.max_iters(iterations))
        .timer(false)
        .run()
        .ok()?;
    let state = result.state();
    let best = state.get_best_param()?.clone();
    Some((best, state.get_best_cost()))
}
