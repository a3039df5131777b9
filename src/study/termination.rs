//! The minimiser's stopping reason in plain words, for documents.

use levenberg_marquardt::TerminationReason;

/// Why the minimiser stopped, as a plain word or phrase for documents:
/// `converged` (relative reduction of the sum of squares or of the step
/// below the tolerance, J. J. Moré, "The Levenberg-Marquardt algorithm:
/// implementation and theory", Lecture Notes in Mathematics 630 (1978)),
/// `residuals zero`, `orthogonal` (residuals orthogonal to the Jacobian's
/// columns), or the reason it failed.
pub fn termination_word(t: &TerminationReason) -> String {
    match t {
        TerminationReason::Converged { .. } => "converged".into(),
        TerminationReason::ResidualsZero => "residuals zero".into(),
        TerminationReason::Orthogonal => "orthogonal".into(),
        TerminationReason::LostPatience => "too many evaluations".into(),
        TerminationReason::NoImprovementPossible(why) => format!("no improvement possible ({why})"),
        TerminationReason::NoParameters => "no free parameters".into(),
        TerminationReason::NoResiduals => "no data rows".into(),
        TerminationReason::User(why) => format!("stopped ({why})"),
        TerminationReason::Numerical(why) => format!("numerical failure ({why})"),
        TerminationReason::WrongDimensions(why) => format!("wrong dimensions ({why})"),
    }
}
