// Package solve is the numeric core of calcdoc's equation-set solver.
//
// It knows nothing about the expression language. The document layer turns a
// solve block into a [Problem]: M real residual functions r(x) of N real
// unknowns x (a complex equation gives two residuals, its real and imaginary
// parts; a complex unknown gives two unknowns), scaled so that unknowns and
// residuals are of order one where possible, with the typical magnitudes
// passed as XScale and RScale.
//
// The package then
//
//   - classifies the set ([Linearize]): it builds A and b of the affine model
//     r(x) = A x − b from N+1 evaluations and confirms the model at
//     [LinearProbes] further pseudo-random points to the relative tolerance
//     [LinearTol]; with [Problem.Blocks] it evaluates each block of residuals
//     only where its own unknowns move and builds A as rows of non-zero
//     entries;
//   - solves a linear set directly ([SolveLinear], [SolveLinearBy]): LU of
//     the equilibrated matrix (the complex matrix of half the order when the
//     set is complex-linear, see [Linear.ComplexLinear]), dense with partial
//     pivoting (package expr/linalg) or, for a large sparse matrix
//     ([UseSparse]), sparse in Markowitz order (package expr/linalg/sparse),
//     the 1-norm condition number estimate, and for a
//     singular or badly conditioned matrix (condition number above
//     [CondLimit]) a [*SingularError] naming, from the SVD null spaces, the
//     unknowns that are not determined and the equations that depend on each
//     other;
//   - solves a non-linear set iteratively ([Newton]): damped Newton–Raphson
//     with a finite-difference Jacobian, a backtracking line search on the
//     scaled residual norm and a Levenberg–Marquardt fallback at singular
//     Jacobians, stopping on [ResidualTol] or [StepTol] and failing with a
//     [*NoConvergenceError] after [MaxIterations] iterations or when no step
//     reduces the residual;
//   - [Solve] chains the three: classify, then solve directly or iteratively.
//
// Notation used in the doc comments. s_k is the scale of unknown k (XScale_k;
// for the two parts of a complex unknown named in Problem.Complex, the larger
// of their two XScale values), q_i the scale of residual i (RScale_i). The
// scaled residual is r_i/q_i and the scaled residual norm is
//
//	‖r‖_q = sqrt( Σ_i (r_i/q_i)² ).
//
// The magnitude m_k(x) of unknown k is |x_k|, or for a part of a complex
// unknown the modulus sqrt(x_re² + x_im²) of that unknown, so that steps do not
// depend on the phasor's angle.
//
// Every function validates its input and reports bad input, evaluation
// failures, singular matrices and non-convergence as error values; none
// panics on bad input. The only randomness (the probe points of Linearize)
// comes from a fixed seed, so all results are deterministic.
package solve

// Tolerances and limits. The README quotes these; change them only together
// with the documentation.
const (
	// LinearTol is the relative tolerance of the affinity test in Linearize.
	// At each probe point p, with d = p − x0, residual i passes when
	//
	//	|r_i(p) − r_i(x0) − Σ_k A_ik d_k| ≤ LinearTol · (q_i + |r_i(x0)| + Σ_k |A_ik d_k|),
	//
	// that is, the departure from the affine model is at most 1e-9 relative to
	// the residual scale plus the size of the residual and of its change. A
	// non-linear term smaller than this over the probed region (and rounding
	// inside the residual function) is taken as linear.
	LinearTol = 1e-9

	// LinearProbes is the number of pseudo-random points at which Linearize
	// checks the affine model after building it.
	LinearProbes = 3

	// CondLimit is the largest accepted 1-norm condition number estimate of a
	// matrix (the equilibrated linear matrix in SolveLinear, the scaled
	// Jacobian in a Newton step). Above it the linear system is reported as
	// singular and the Newton step is replaced by a Levenberg–Marquardt step.
	CondLimit = 1e12

	// NullTol is the threshold for naming unknowns and equations in a
	// SingularError. With V₀ an orthonormal basis of the (numerical) right
	// null space of the equilibrated matrix, unknown k is named when the
	// Euclidean norm of row k of V₀ exceeds NullTol; equations likewise with a
	// basis U₀ of the left null space. For an exactly singular matrix the
	// named entries are those that are non-zero in exact arithmetic.
	NullTol = 1e-6

	// ResidualTol is the default convergence tolerance of Newton on the
	// scaled residual norm: the iteration has converged when ‖r‖_q ≤ 1e-10.
	ResidualTol = 1e-10

	// StepTol is the default tolerance of Newton on the scaled step. The
	// scaled size of a step Δx is max_k |Δx_k| / max(m_k(x), s_k). When a full
	// Newton step computed from a Jacobian with condition number at most
	// CondLimit has scaled size at most 1e-12, the root of the linearised
	// system lies within that relative distance of x; the step is taken and
	// the iteration has converged, whatever the residual (this covers sets
	// whose rounding floor lies above ResidualTol).
	StepTol = 1e-12

	// MaxIterations is the default limit on Newton iterations.
	MaxIterations = 100

	// ArmijoC is the sufficient-decrease constant of the line search: a step
	// x + tΔx along the Newton direction is accepted when
	// ‖r(x+tΔx)‖_q ≤ (1 − ArmijoC·t)·‖r(x)‖_q.
	ArmijoC = 1e-4

	// MinDamping is the smallest line-search factor t tried before the Newton
	// direction is abandoned for Levenberg–Marquardt steps.
	MinDamping = 1e-10
)
