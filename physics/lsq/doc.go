// Package lsq is nonlinear least squares: Levenberg–Marquardt on a
// residual function, and on top of it the estimate of bounded, scaled
// unknowns with their standard errors, 95 % intervals and correlations.
//
// Two levels:
//
//   - Minimize minimises ½‖r(x)‖² over x ∈ ℝᵖ for a residual function r
//     that the caller has already weighted and scaled (x of order one).
//     The DSC kinetics fit uses it directly.
//   - Fit estimates named unknowns in their own units (Var: a start, optional
//     bounds, linear or logarithmic scale) from unweighted residuals and
//     optional weights. It maps every unknown to an unbounded variable of
//     order one (bounds by transformation), calls Minimize, and returns the
//     values with the asymptotic covariance s²(JᵀWJ)⁻¹, the standard errors,
//     Student-t intervals with m − p degrees of freedom, the correlation
//     matrix and the convergence status.
//
// The Jacobian is by finite differences in the scaled variables; its
// columns can be computed concurrently (Settings.Workers) when the residual
// function is expensive and safe for concurrent calls, as a solver run is.
//
// References: K. Madsen, H. B. Nielsen and O. Tingleff, Methods for
// Non-Linear Least Squares Problems, 2nd ed., IMM DTU, 2004 (the algorithm);
// D. M. Bates and D. G. Watts, Nonlinear Regression Analysis and Its
// Applications, Wiley, 1988, ch. 2 (the linear approximation: covariance,
// standard errors and t intervals); N. R. Draper and H. Smith, Applied
// Regression Analysis, 3rd ed., Wiley, 1998, ch. 1 (the straight line the
// tests check against).
//
// # Invariants
//
//   - Residual functions write into the slice they are given and never
//     keep it; they must not modify x.
//   - A residual vector that is not finite (NaN or ±Inf anywhere) marks a
//     point where the model cannot be evaluated: Minimize rejects a step
//     there like one that raises the cost.
//   - Results own their slices and matrices.
package lsq
