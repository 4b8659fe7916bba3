//! Numeric tolerances: the one home of every threshold below which a computed quantity
//! counts as zero, so that code and tests read the same value and the README can state
//! it. Each is relative to the scale named beside it; none is tuned to a data set.
//! Double precision has ε ≈ 2.2e-16; a tolerance well above the rounding error of the
//! computation it guards, and far below any value that carries information, is common
//! practice in numerical linear algebra (Golub & Van Loan 2013, §2.7 and §5.4).

/// A unit-length column whose remainder, after the columns before it are projected
/// out, is shorter than this lies in their span: an exact dependency (its VIF would
/// exceed 1e12). Stated in the README and in every report's settings.
pub const DEPENDENCY: f64 = 1e-6;

/// Coefficients of a dependency smaller than this fraction of the largest are left out
/// of the combination the report writes.
pub const NEGLIGIBLE_COEFFICIENT: f64 = 1e-6;

/// Singular values below this fraction of the largest are treated as zero when solving
/// for a dependency's coefficients.
pub const SINGULAR_VALUE: f64 = 1e-12;

/// A filtered column whose norm is below this fraction of its sampled norm lies inside
/// the drift space (the constant and the cosines) and carries no information.
pub const VANISHING: f64 = 1e-10;

/// A diagonal element of a QR triangle below this fraction of its column's norm makes
/// a predictor set dependent (subset R² and block determinants are then undefined).
pub const TRIANGLE_DEPENDENT: f64 = 1e-12;

/// A residual direction shorter than this fraction of the largest counts as empty when
/// the model-overlap bases are built.
pub const EMPTY_DIRECTION: f64 = 1e-10;

/// A modulator whose remainder after serial orthogonalisation is shorter than this
/// fraction of its length lay entirely in the span of the modulators before it.
pub const ABSORBED: f64 = 1e-8;

/// Modulator values whose spread around their mean is below this fraction of their
/// largest magnitude do not vary: differences at the rounding level of the values.
pub const NO_VARIATION: f64 = 1e-12;

/// A trial-level correlation's denominator below this fraction of n·scale² (scale the
/// largest magnitude of the values) means a value does not vary: undefined.
pub const NO_COVARIANCE: f64 = 1e-24;

/// Two repetition times closer than this many seconds agree.
pub const SAME_TR_SECONDS: f64 = 1e-6;
