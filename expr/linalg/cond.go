package linalg

// condIterations is the largest number of gradient steps of the estimator
// (LAPACK's xLACN2 uses 5).
const condIterations = 5

// Cond returns an estimate of the 1-norm condition number of the scaled
// matrix, κ₁(B) = ‖B‖₁·‖B⁻¹‖₁. ‖B‖₁ = max_j Σ_i |B_ij| is computed exactly;
// ‖B⁻¹‖₁ is estimated from the LU factors without forming B⁻¹, by the
// method of Hager (1984) as refined by Higham (1988; Accuracy and Stability
// of Numerical Algorithms, 2nd ed., section 15.3, Algorithm 15.4; LAPACK's
// xLACN2):
//
// ‖C‖₁ = max{‖Cx‖₁ : ‖x‖₁ = 1} for C = B⁻¹, and the maximum of the convex
// function f(x) = ‖Cx‖₁ over the unit 1-norm ball is attained at a vertex
// ±e_j (up to a unit factor for complex x). Where y = Cx has no zero entry,
// f is differentiable and, with ξ_i = y_i/|y_i| and z = Cᴴξ,
//
//	f(x') ≥ f(x) + Re zᴴ(x' − x)       for every x' (convexity),
//
// so the vertex e_j with j = argmax |z_j| is the best next point unless
// |z_j| ≤ Re zᴴx, in which case x is a local maximum. Starting from
// x = (1/n, …, 1/n) the estimator steps to such vertices, at most 5 times,
// stopping when ‖Cx‖₁ no longer grows or the vertex repeats. Every value it
// takes is ‖Cx‖₁ for some x with ‖x‖₁ = 1, so the result is a lower bound
// on ‖B⁻¹‖₁; to guard against the rare matrices that mislead the gradient
// it also takes 2‖Cv‖₁/(3n) for v_i = (−1)^i (1 + i/(n−1)) (‖v‖₁ ≤ 3n/2)
// if that is larger. The estimate is usually exact and in practice within a
// factor 3 of the true norm (Higham, loc. cit.).
//
// Each step costs one solve with B and one with Bᴴ by the triangular
// factors, O(n²) each, so the estimate costs at most 11 solves, O(n²), far
// less than the O(n³) factorisation. For a singular matrix Cond is the
// Singular's estimate (+Inf for an exactly zero pivot). The result is cached.
func (f *LU[T]) Cond() float64 {
	if f.cond != 0 {
		return f.cond
	}
	f.cond = f.norm1 * f.invNorm1()
	return f.cond
}

// CheckCond returns an *IllConditioned when Cond exceeds limit (or is NaN),
// the *Singular of a singular matrix, and nil otherwise.
func (f *LU[T]) CheckCond(limit float64) error {
	if f.sing != nil {
		return f.sing
	}
	if c := f.Cond(); !(c <= limit) {
		return &IllConditioned{Cond: c, Limit: limit}
	}
	return nil
}

func norm1T[T Scalar](v []T) float64 {
	s := 0.0
	for _, x := range v {
		s += absT(x)
	}
	return s
}

// invNorm1 is the Hager–Higham estimate of ‖B⁻¹‖₁ described at Cond.
func (f *LU[T]) invNorm1() float64 {
	n := f.n
	x := make([]T, n)
	for i := range x {
		x[i] = fromF[T](1 / float64(n))
	}
	f.solveB(x)
	est := norm1T(x)
	if n == 1 {
		return est // B⁻¹ is the number 1/B_11, its norm exact
	}
	sgn := make([]T, n) // ξ
	z := make([]T, n)
	for i, v := range x {
		sgn[i] = signT(v)
	}
	copy(z, sgn)
	f.solveBH(z)
	j := argmaxAbs(z)
	for iter := 2; ; iter++ {
		for i := range x {
			x[i] = 0
		}
		x[j] = fromF[T](1)
		f.solveB(x)
		old := est
		est = norm1T(x)
		if est <= old {
			est = old
			break
		}
		if sameSigns(x, sgn) {
			// a real ξ that repeats: the next step would repeat this one
			break
		}
		for i, v := range x {
			sgn[i] = signT(v)
		}
		copy(z, sgn)
		f.solveBH(z)
		last := j
		j = argmaxAbs(z)
		if absT(z[last]) == absT(z[j]) || iter >= condIterations {
			break
		}
	}
	// the alternating vector, against misleading gradients
	for i := range x {
		s := 1 + float64(i)/float64(n-1)
		if i%2 == 1 {
			s = -s
		}
		x[i] = fromF[T](s)
	}
	f.solveB(x)
	if t := 2 * norm1T(x) / float64(3*n); t > est {
		est = t
	}
	return est
}

func argmaxAbs[T Scalar](v []T) int {
	j, best := 0, -1.0
	for i, x := range v {
		if a := absT(x); a > best {
			j, best = i, a
		}
	}
	return j
}

// sameSigns reports, for real vectors only, whether sign(y) equals the
// previous sign vector prev (LAPACK's xLACN2 test); for complex vectors it
// reports false.
func sameSigns[T Scalar](y, prev []T) bool {
	var z T
	if _, ok := any(z).(float64); !ok {
		return false
	}
	for i, v := range y {
		if realT(signT(v)) != realT(prev[i]) {
			return false
		}
	}
	return true
}
