package dsc

import "math"

// lineFit is a straight line y = Intercept + Slope·x fitted by least squares,
// with the standard errors of its coefficients (NaN with fewer than three
// points, where the residual variance is undefined).
type lineFit struct {
	Slope, Intercept     float64
	SlopeSE, InterceptSE float64
	R2                   float64 // coefficient of determination
	N                    int     // number of points
}

// fitLine fits a straight line to (x, y) by ordinary least squares, with
// the textbook standard errors s·√(1/Sxx) and s·√(1/n + x̄²/Sxx), s² =
// SSR/(n − 2) (e.g. Montgomery & Runger, Applied Statistics and Probability
// for Engineers, §11.4). With fewer than two distinct x the slope is NaN.
func fitLine(x, y []float64) lineFit {
	n := len(x)
	l := lineFit{N: n, Slope: math.NaN(), Intercept: math.NaN(), SlopeSE: math.NaN(), InterceptSE: math.NaN(), R2: math.NaN()}
	if n < 2 {
		return l
	}
	var mx, my float64
	for i := range n {
		mx += x[i]
		my += y[i]
	}
	mx /= float64(n)
	my /= float64(n)
	var sxx, sxy, syy float64
	for i := range n {
		dx, dy := x[i]-mx, y[i]-my
		sxx += dx * dx
		sxy += dx * dy
		syy += dy * dy
	}
	if !(sxx > 0) {
		return l
	}
	l.Slope = sxy / sxx
	l.Intercept = my - l.Slope*mx
	ssr := max(syy-l.Slope*sxy, 0)
	if syy > 0 {
		l.R2 = 1 - ssr/syy
	}
	if n > 2 {
		s2 := ssr / float64(n-2)
		l.SlopeSE = math.Sqrt(s2 / sxx)
		l.InterceptSE = math.Sqrt(s2 * (1/float64(n) + mx*mx/sxx))
	}
	return l
}

// polyFit fits a polynomial of the given degree (≤ 3) to (x, y) by least
// squares through the normal equations (x should be centred and scaled to
// order 1) and returns its coefficients c[0] + c[1]x + …; ok is false when
// the system is singular.
func polyFit(x, y []float64, degree int) (c [4]float64, ok bool) {
	m := degree + 1
	var a [4][5]float64
	for i := range x {
		var p [7]float64
		p[0] = 1
		for k := 1; k < 2*m-1; k++ {
			p[k] = p[k-1] * x[i]
		}
		for r := range m {
			for s := range m {
				a[r][s] += p[r+s]
			}
			a[r][m] += p[r] * y[i]
		}
	}
	return solveNormal(&a, m)
}

// solveNormal solves the m×m normal equations held in a (the right-hand
// side in column m) by Gaussian elimination with partial pivoting, in
// place; ok is false when the system is singular or the solution is not
// finite.
func solveNormal(a *[4][5]float64, m int) (c [4]float64, ok bool) {
	for col := range m {
		piv := col
		for r := col + 1; r < m; r++ {
			if math.Abs(a[r][col]) > math.Abs(a[piv][col]) {
				piv = r
			}
		}
		if a[piv][col] == 0 {
			return c, false
		}
		a[col], a[piv] = a[piv], a[col]
		for r := col + 1; r < m; r++ {
			f := a[r][col] / a[col][col]
			for s := col; s <= m; s++ {
				a[r][s] -= f * a[col][s]
			}
		}
	}
	for r := m - 1; r >= 0; r-- {
		v := a[r][m]
		for s := r + 1; s < m; s++ {
			v -= a[r][s] * c[s]
		}
		c[r] = v / a[r][r]
	}
	for _, v := range c {
		if !finite(v) {
			return c, false
		}
	}
	return c, true
}

// smoothQuad returns y smoothed by a local quadratic least-squares fit in t
// over the samples i−h … i+h (clipped at the ends), evaluated at t[i]: a
// Savitzky–Golay filter (Savitzky & Golay, Anal. Chem. 36:1627, 1964) that
// also accepts uneven sampling. A quadratic keeps the height of a peak that
// spans many windows.
//
// Method: up to directSmooth samples of half-width, each window is fitted
// on its own (polyFit, centred on t[i]). Wider windows, whose half-width
// grows with the length of the scan, use running sums instead: the samples
// are taken in blocks of h; within a block the moments Σu^k (k ≤ 4) and
// Σy·u^k (k ≤ 2) of the window, in a coordinate u centred and scaled on the
// block and its neighbours (|u| ≤ 1, so the normal equations stay well
// conditioned), are updated by adding the sample that enters and removing
// the one that leaves, and restarted from scratch at each block so that
// rounding does not accumulate. The fitted value at t[i] does not depend
// on the coordinate, so both ways give the same result to rounding.
//
// Cost O(n·h) up to directSmooth, O(n) above (about four sample updates
// per sample); one output slice.
func smoothQuad(t, y []float64, h int) []float64 {
	out, _ := smoothQuadWork(t, y, h)
	return out
}

// directSmooth is the widest half-width that smoothQuad fits window by
// window.
const directSmooth = 16

// smoothQuadWork is smoothQuad that also returns the number of sample
// updates made (each a few multiply–adds), the measure of its cost.
func smoothQuadWork(t, y []float64, h int) ([]float64, int) {
	if h < 1 || len(y) < 3 {
		return append([]float64(nil), y...), 0
	}
	if h <= directSmooth {
		return smoothDirect(t, y, h)
	}
	return smoothRunning(t, y, h)
}

// smoothDirect fits each window on its own, centred on t[i] and scaled to
// [−1, 1] (a straight line where the window holds fewer than five
// samples). Cost O(n·h).
func smoothDirect(t, y []float64, h int) ([]float64, int) {
	n := len(y)
	out := make([]float64, n)
	work := 0
	xs := make([]float64, 0, 2*h+1)
	for i := range n {
		lo, hi := max(0, i-h), min(n-1, i+h)
		scale := max(t[hi]-t[i], t[i]-t[lo])
		xs = xs[:0]
		for j := lo; j <= hi; j++ {
			xs = append(xs, (t[j]-t[i])/scale)
		}
		work += hi - lo + 1
		deg := 2
		if hi-lo < 4 {
			deg = 1
		}
		if c, ok := polyFit(xs, y[lo:hi+1], deg); ok {
			out[i] = c[0]
		} else {
			out[i] = y[i]
		}
	}
	return out, work
}

// smoothRunning computes the same fits from running sums of the window's
// moments, block by block (see smoothQuad). Precondition: h ≥ 4, so that
// every window holds at least five samples (smoothDirect fits a straight
// line to fewer). Cost O(n): about four sample updates per sample.
func smoothRunning(t, y []float64, h int) ([]float64, int) {
	n := len(y)
	out := make([]float64, n)
	work := 0
	var mom [5]float64 // Σ u^k over the window
	var rhs [3]float64 // Σ y·u^k over the window
	var c0, sc float64 // u = (t − c0)/sc
	add := func(j int, sign float64) {
		u := (t[j] - c0) / sc
		u2 := u * u
		mom[0] += sign
		mom[1] += sign * u
		mom[2] += sign * u2
		mom[3] += sign * u2 * u
		mom[4] += sign * u2 * u2
		rhs[0] += sign * y[j]
		rhs[1] += sign * y[j] * u
		rhs[2] += sign * y[j] * u2
		work++
	}
	for b0 := 0; b0 < n; b0 += h {
		b1 := min(n, b0+h) // the block is [b0, b1)
		first, last := max(0, b0-h), min(n-1, b1-1+h)
		c0, sc = 0.5*(t[first]+t[last]), 0.5*(t[last]-t[first])
		mom, rhs = [5]float64{}, [3]float64{}
		lo, hi := first, min(n-1, b0+h)
		for j := lo; j <= hi; j++ {
			add(j, 1)
		}
		for i := b0; i < b1; i++ {
			for ; lo < i-h; lo++ {
				add(lo, -1)
			}
			for hi < min(n-1, i+h) {
				hi++
				add(hi, 1)
			}
			a := [4][5]float64{
				{mom[0], mom[1], mom[2], rhs[0]},
				{mom[1], mom[2], mom[3], rhs[1]},
				{mom[2], mom[3], mom[4], rhs[2]},
			}
			if c, ok := solveNormal(&a, 3); ok {
				u := (t[i] - c0) / sc
				out[i] = c[0] + u*(c[1]+u*c[2])
			} else {
				out[i] = y[i]
			}
		}
	}
	return out, work
}

// cumTrapz returns the running trapezoidal integral of y over t, starting
// at 0.
func cumTrapz(t, y []float64) []float64 {
	out := make([]float64, len(y))
	for i := 1; i < len(y); i++ {
		out[i] = out[i-1] + 0.5*(y[i]+y[i-1])*(t[i]-t[i-1])
	}
	return out
}

// mean returns the mean of y[lo:hi+1], clipped to the slice.
func mean(y []float64, lo, hi int) float64 {
	lo, hi = max(lo, 0), min(hi, len(y)-1)
	var s float64
	for _, v := range y[lo : hi+1] {
		s += v
	}
	return s / float64(hi-lo+1)
}
