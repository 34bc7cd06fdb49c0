//! Typed errors of the solver. Every variant carries the numbers needed to act on it.

/// What can go wrong while building or running a model.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum SolverError {
    /// An input value is outside its physical range. `field` is the case-file path.
    #[error("{field}: {reason}")]
    InvalidInput {
        /// Case-file path of the offending value, e.g. `pack.porosity`.
        field: String,
        /// What is wrong with it, including the value.
        reason: String,
    },
    /// A pivot of the tridiagonal elimination vanished (should not happen for an M-matrix).
    #[error("tridiagonal solve failed: zero pivot at row {row}")]
    TridiagSingular {
        /// Row of the zero pivot.
        row: usize,
    },
    /// The Newton iteration for the nonlinear losses did not converge.
    #[error(
        "Newton iteration did not converge at t = {time_s:.6e} s: relative residual \
         {residual:.3e} after {iterations} iterations"
    )]
    NewtonFailed {
        /// Time at the end of the failing step, s.
        time_s: f64,
        /// Iterations taken.
        iterations: usize,
        /// Relative residual reached.
        residual: f64,
    },
    /// A head became NaN or infinite.
    #[error("non-finite head at t = {time_s:.6e} s in unknown {index}")]
    NonFinite {
        /// Time at the end of the failing step, s.
        time_s: f64,
        /// Index of the unknown (0 = well, 1.. = cells).
        index: usize,
    },
    /// A time step failed even after it was retried with smaller steps.
    #[error(
        "time step {step} from t = {time_s:.6e} s{stage} failed after {retries} retries with \
         smaller steps (last tried {dt_s:.3e} s): {cause}"
    )]
    StepFailed {
        /// Start time of the failing step, s.
        time_s: f64,
        /// Number of the step (accepted steps before it + 1).
        step: u64,
        /// Where in a schedule, e.g. " (stage 2 of 3)"; empty for a single drive.
        stage: String,
        /// Retries made.
        retries: usize,
        /// Last step length tried, s.
        dt_s: f64,
        /// The error of the last try.
        cause: Box<SolverError>,
    },
    /// A result passed to the outputs was NaN or infinite.
    #[error(
        "{quantity} is {value} at t = {time_s:.6e} s (step {step}): the inputs are outside what \
         double precision can represent (check lengths, rates and conductivities), or the \
         solution diverged"
    )]
    NonFiniteResult {
        /// Name of the quantity, e.g. `face flux`.
        quantity: &'static str,
        /// Its value (NaN or ±inf).
        value: f64,
        /// Time at the end of the step, s.
        time_s: f64,
        /// Step number.
        step: u64,
    },
}

impl SolverError {
    /// Shorthand for [`SolverError::InvalidInput`].
    pub fn invalid(field: impl Into<String>, reason: impl Into<String>) -> Self {
        SolverError::InvalidInput {
            field: field.into(),
            reason: reason.into(),
        }
    }
}
