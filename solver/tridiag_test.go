package solver

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// TestTridiagonalAgainstLAPACK solves random diagonally dominant
// tridiagonal systems of every size from 1 to 40 and a few large ones with
// factor and substitute. Every solution must have a backward error
// ‖b − A x‖∞ ≤ 16 ε ‖A‖∞ ‖x‖∞ (the method is backward stable for these
// matrices), and on strongly dominant systems (well conditioned) it must
// agree with LAPACK's Dgtsv as implemented by gonum, the reference library,
// to 1e-12 of the solution's size.
// Source: Anderson et al., LAPACK Users' Guide, 3rd ed., SIAM 1999 (xGTSV);
// Golub & Van Loan, Matrix Computations, 4th ed., §4.3 (diagonal dominance,
// stability without pivoting); Higham, Accuracy and Stability of Numerical
// Algorithms, 2nd ed., §9.5 (tridiagonal backward error).
func TestTridiagonalAgainstLAPACK(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	sizes := []int{}
	for n := 1; n <= 40; n++ {
		sizes = append(sizes, n)
	}
	sizes = append(sizes, 149, 150, 1001)
	for _, n := range sizes {
		for trial := range 5 {
			lo, di, up, rhs := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
			for i := range n {
				// Off-diagonals of conduction's sign and size, spread over
				// decades like a graded mesh; the diagonal dominates.
				if i > 0 {
					lo[i] = -math.Pow(10, 4*rng.Float64())
				}
				if i < n-1 {
					up[i] = -math.Pow(10, 4*rng.Float64())
				}
				di[i] = -(lo[i] + up[i]) * (1 + math.Pow(10, -6+6*rng.Float64()))
				if trial < 2 {
					di[i] = -(lo[i] + up[i]) * (2 + rng.Float64()) // strongly dominant
				}
				if n == 1 {
					di[i] = 1 + rng.Float64() // no neighbours
				}
				if trial == 4 && i%7 == 3 {
					di[i] = -(lo[i] + up[i]) + 1e-3 // barely dominant rows
				}
				rhs[i] = 100 * (rng.Float64() - 0.5)
			}
			// Reference: Dgtsv overwrites its copies.
			dl, d, du := make([]float64, max(n-1, 0)), append([]float64(nil), di...), make([]float64, max(n-1, 0))
			for i := 0; i < n-1; i++ {
				dl[i], du[i] = lo[i+1], up[i]
			}
			want := append([]float64(nil), rhs...)
			if !lapack64.Gtsv(blas.NoTrans, lapack64.Tridiagonal{N: n, DL: dl, D: d, DU: du},
				blas64.General{Rows: n, Cols: 1, Stride: 1, Data: want}) {
				t.Fatalf("n = %d: reference solve failed", n)
			}
			a := struct{ lo, di, up []float64 }{append([]float64(nil), lo...), append([]float64(nil), di...), append([]float64(nil), up...)}
			ce, inv := make([]float64, n), make([]float64, n)
			got := append([]float64(nil), rhs...)
			if !factor(lo, di, up, ce, inv) {
				t.Fatalf("n = %d: factor reported a zero pivot", n)
			}
			substitute(lo, up, ce, inv, got)
			// Backward error, with the original matrix (factor scaled lo
			// and up in place, so keep copies).
			normA, normX, res := 0.0, 0.0, 0.0
			for i := range n {
				row := math.Abs(a.di[i])
				ax := a.di[i] * got[i]
				if i > 0 {
					row += math.Abs(a.lo[i])
					ax += a.lo[i] * got[i-1]
				}
				if i < n-1 {
					row += math.Abs(a.up[i])
					ax += a.up[i] * got[i+1]
				}
				normA, normX = max(normA, row), max(normX, math.Abs(got[i]))
				res = max(res, math.Abs(rhs[i]-ax))
			}
			if res > 16*0x1p-52*normA*normX {
				t.Fatalf("n = %d, trial %d: backward error %.3g of ‖A‖‖x‖ = %.3g", n, trial, res, normA*normX)
			}
			if trial < 2 {
				scale := 0.0
				for i := range n {
					scale = max(scale, math.Abs(want[i]))
				}
				for i := range n {
					if math.Abs(got[i]-want[i]) > 1e-12*scale {
						t.Fatalf("n = %d, trial %d, row %d: %.17g, LAPACK %.17g", n, trial, i, got[i], want[i])
					}
				}
			}
			// The factors serve any number of right-hand sides.
			again := append([]float64(nil), rhs...)
			substitute(lo, up, ce, inv, again)
			for i := range n {
				if again[i] != got[i] {
					t.Fatalf("n = %d: second solve with the same factors differs", n)
				}
			}
		}
	}
}

// TestTridiagonalZeroPivot: a singular matrix is reported, not solved.
func TestTridiagonalZeroPivot(t *testing.T) {
	for _, n := range []int{1, 2, 3, 6, 7} {
		lo, di, up := make([]float64, n), make([]float64, n), make([]float64, n)
		for i := range n {
			if i > 0 {
				lo[i] = -1
			}
			if i < n-1 {
				up[i] = -1
			}
			di[i] = -(lo[i] + up[i])
		}
		// Rows summing to zero everywhere (insulated conduction with no
		// capacity) make the matrix singular: some pivot is 0.
		if n == 1 {
			di[0] = 0
		}
		if factor(lo, di, up, make([]float64, n), make([]float64, n)) {
			t.Errorf("n = %d: singular matrix factored", n)
		}
	}
}
