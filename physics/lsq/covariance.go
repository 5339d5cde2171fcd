package lsq

import (
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Covariance returns the asymptotic covariance of least-squares estimates
//
//	C = s²·(JᵀJ)⁻¹,  s² = 2·cost/(m − p) = ‖r‖²/(m − p),
//
// for the m×p Jacobian J of the (weighted) residuals at the optimum and the
// cost ½‖r‖² there: the linear approximation of Bates & Watts, Nonlinear
// Regression Analysis and Its Applications, 1988, ch. 2. For a model linear
// in its parameters it is the exact covariance of the ordinary
// least-squares estimates (for the straight line: Draper & Smith, Applied
// Regression Analysis, 3rd ed., 1998, ch. 1).
//
// Method: Cholesky factorisation of JᵀJ and its inverse. ok is false when
// m ≤ p (no residual degrees of freedom) or JᵀJ is not numerically positive
// definite (some combination of the parameters is not determined by the
// data; Nullspace says which).
//
// Cost: O(m·p² + p³).
func Covariance(J *mat.Dense, cost float64) (*mat.SymDense, bool) {
	m, p := J.Dims()
	if m <= p {
		return nil, false
	}
	var A mat.SymDense
	A.SymOuterK(1, J.T())
	var chol mat.Cholesky
	if !chol.Factorize(&A) {
		return nil, false
	}
	var inv mat.SymDense
	if err := chol.InverseTo(&inv); err != nil {
		return nil, false
	}
	inv.ScaleSym(2*cost/float64(m-p), &inv)
	return &inv, true
}

// Correlation returns the correlation matrix of the covariance C:
//
//	R_ij = C_ij / √(C_ii·C_jj),
//
// with R_ij NaN where a variance is not positive. It is unchanged by
// rescaling any parameter by a positive factor, so the correlations of the
// scaled variables of Fit are those of the values.
//
// Cost: O(p²).
func Correlation(C *mat.SymDense) *mat.SymDense {
	p := C.SymmetricDim()
	R := mat.NewSymDense(p, nil)
	for i := range p {
		for j := i; j < p; j++ {
			d := math.Sqrt(C.At(i, i) * C.At(j, j))
			v := math.NaN()
			if d > 0 {
				v = C.At(i, j) / d
			}
			if i == j && d > 0 {
				v = 1
			}
			R.SetSym(i, j, v)
		}
	}
	return R
}

// Nullspace returns the unit vector v (in the variables of J) with the
// smallest ‖Jv‖ and the ratio of the smallest to the largest singular value
// of J: when the ratio is near zero, the data determine the combination v
// of the variables poorly or not at all; its large components name the
// variables involved.
//
// Method: the singular value decomposition of J (gonum mat.SVD); the last
// right singular vector, with its largest component made positive.
//
// Cost: O(m·p² + p³).
func Nullspace(J *mat.Dense) (v []float64, ratio float64) {
	_, p := J.Dims()
	var svd mat.SVD
	if !svd.Factorize(J, mat.SVDThin) {
		return nil, math.NaN()
	}
	s := svd.Values(nil)
	var V mat.Dense
	svd.VTo(&V)
	k := len(s) - 1
	v = make([]float64, p)
	big := 0
	for i := range p {
		v[i] = V.At(i, k)
		if math.Abs(v[i]) > math.Abs(v[big]) {
			big = i
		}
	}
	if v[big] < 0 {
		for i := range v {
			v[i] = -v[i]
		}
	}
	if !(s[0] > 0) {
		return v, 0
	}
	return v, s[k] / s[0]
}

// TQuantile returns the two-sided Student-t quantile t such that an
// interval ±t·(standard error) holds a parameter with probability level
// (0.95 for a 95 % interval) on dof degrees of freedom: the (1 + level)/2
// quantile of Student's t (gonum distuv.StudentsT, through the inverse
// regularised incomplete beta function). It is NaN for dof < 1.
func TQuantile(level float64, dof int) float64 {
	if dof < 1 || !(level > 0 && level < 1) {
		return math.NaN()
	}
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(dof)}.Quantile((1 + level) / 2)
}
