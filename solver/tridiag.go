package solver

// The tridiagonal solver of Newton's iteration: a twisted factorisation
// that eliminates from both ends towards the middle row, so that the two
// halves form independent dependency chains the processor overlaps (the
// plain Thomas algorithm is one chain of divisions, latency-bound). Each
// half is the Thomas algorithm; the middle row joins them (the "burn at both
// ends" or twisted factorisation: Meurant, SIAM J. Matrix Anal. Appl.
// 13(3):707–728, 1992, §2; stable without pivoting for the diagonally
// dominant matrices of implicit conduction as the Thomas algorithm is,
// Golub & Van Loan, Matrix Computations, 4th ed., §4.3).
//
// The matrix has sub-diagonal lo (lo[0] unused), diagonal di and
// super-diagonal up (up[n−1] unused). With m = n/2 the middle row:
//
//	rows i < m, downwards:  b_i = di_i − lo_i c_{i−1},  c_i = up_i/b_i
//	rows i > m, upwards:    b_i = di_i − up_i e_{i+1},  e_i = lo_i/b_i
//	row m:                  b_m = di_m − lo_m c_{m−1} − up_m e_{m+1}
//
// factor stores 1/b_i in inv, c_i (i < m) and e_i (i > m) in ce, and
// scales lo_i (i < m) and up_i (i > m) by 1/b_i in place; substitute then
// solves for any right-hand side with multiplications only.

// factor computes the twisted factors of (lo, di, up) into ce and inv,
// scaling lo and up in place as described above. It reports false on a
// zero or non-finite pivot. O(n), no allocation.
func factor(lo, di, up, ce, inv []float64) bool {
	n := len(di)
	lo, up, ce, inv = lo[:n], up[:n], ce[:n], inv[:n]
	m := n / 2
	ok := true
	for k := 0; k < m; k++ { // row k from the top, row n−1−k from the bottom
		i := k
		b := di[i]
		if i > 0 {
			b -= lo[i] * ce[i-1]
		}
		ib := 1 / b
		inv[i], ce[i] = ib, up[i]*ib
		lo[i] *= ib
		ok = ok && b != 0 && b-b == 0
		if j := n - 1 - k; j > m {
			b := di[j]
			if j < n-1 {
				b -= up[j] * ce[j+1]
			}
			ib := 1 / b
			inv[j], ce[j] = ib, lo[j]*ib
			up[j] *= ib
			ok = ok && b != 0 && b-b == 0
		}
	}
	b := di[m]
	if m > 0 {
		b -= lo[m] * ce[m-1]
	}
	if m < n-1 {
		b -= up[m] * ce[m+1]
	}
	inv[m], ce[m] = 1/b, 0
	return ok && b != 0 && b-b == 0
}

// substitute solves the system factored by factor (lo, ce, inv as factor
// left them; up as well) for the right-hand side rhs, in place. O(n), no
// division.
func substitute(lo, up, ce, inv, rhs []float64) {
	n := len(rhs)
	lo, up, ce, inv = lo[:n], up[:n], ce[:n], inv[:n]
	m := n / 2
	// Eliminate towards the middle: y_i = rhs_i/b_i − (lo_i/b_i) y_{i−1}
	// above it, z_j = rhs_j/b_j − (up_j/b_j) z_{j+1} below it.
	for k := 0; k < m; k++ {
		i := k
		y := rhs[i] * inv[i]
		if i > 0 {
			y -= lo[i] * rhs[i-1]
		}
		rhs[i] = y
		if j := n - 1 - k; j > m {
			z := rhs[j] * inv[j]
			if j < n-1 {
				z -= up[j] * rhs[j+1]
			}
			rhs[j] = z
		}
	}
	x := rhs[m]
	if m > 0 {
		x -= lo[m] * rhs[m-1]
	}
	if m < n-1 {
		x -= up[m] * rhs[m+1]
	}
	rhs[m] = x * inv[m]
	// And back out: x_i = y_i − c_i x_{i+1} above, x_j = z_j − e_j x_{j−1}
	// below.
	for k := 1; k <= m; k++ {
		if i := m - k; i >= 0 {
			rhs[i] -= ce[i] * rhs[i+1]
		}
		if j := m + k; j < n {
			rhs[j] -= ce[j] * rhs[j-1]
		}
	}
}
