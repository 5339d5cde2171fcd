package dsc

import (
	"context"
	"fmt"
	"math"
)

// Baseline is the kind of baseline subtracted from a dynamic scan.
type Baseline int

const (
	// LinearBaseline is the straight line between the heat flow at the
	// onset and at the end of the reaction.
	LinearBaseline Baseline = iota
	// SigmoidalBaseline moves from the tangent before the reaction to the
	// tangent after it in proportion to the degree of cure, for a sample
	// whose heat capacity changes as it cures.
	SigmoidalBaseline
)

// String returns "linear" or "sigmoidal".
func (b Baseline) String() string {
	if b == SigmoidalBaseline {
		return "sigmoidal"
	}
	return "linear"
}

// Window is the integration window of a dynamic scan given as temperatures
// in K; a zero field is detected from the data.
type Window struct {
	Onset, End float64
}

// Peak is the maximum of the baseline-subtracted heat flow.
type Peak struct {
	Time   float64 // s
	Temp   float64 // K
	Height float64 // W/kg
}

// Curve is a scan reduced to its reaction: the integration window, the
// baseline, the net heat flow and the degree of cure over the window.
type Curve struct {
	Scan    *Scan
	Program Program
	// On and End are the first and last samples of the window (indices
	// into the scan); Time, Temp and the slices below cover them.
	On, End  int
	Time     []float64 // s
	Temp     []float64 // K
	Baseline []float64 // W/kg
	Net      []float64 // heat flow − baseline, W/kg (as measured, noisy)
	Smooth   []float64 // Net smoothed (local quadratic fits), W/kg
	Heat     float64   // ∫ Net dt over the window, J/kg
	// Total is the heat that α is measured against, J/kg: Heat unless
	// Normalize gave another (an isothermal scan measured against the total
	// heat of the dynamic scans).
	Total float64
	Alpha []float64 // degree of cure, ∫ Net dt / Total from the window start
	Rate  []float64 // dα/dt = Smooth/Total, 1/s
	Peak  Peak
	// HalfWidth is the full width at half maximum of the peak, s.
	HalfWidth float64
	// Notes are caveats about this scan (a reaction cut off by the start
	// or end of the data).
	Notes []string
}

// Normalize measures α and dα/dt of c against the heat total (J/kg > 0).
func (c *Curve) Normalize(total float64) {
	c.Total = total
	cum := cumTrapz(c.Time, c.Net)
	c.Alpha = make([]float64, len(cum))
	c.Rate = make([]float64, len(cum))
	for i := range cum {
		c.Alpha[i] = cum[i] / total
		c.Rate[i] = c.Smooth[i] / total
	}
}

// Process detects the temperature program of s, subtracts a baseline and
// integrates the net heat flow to the reaction heat and the degree of cure.
//
// Dynamic scans: the window runs from the onset to the end of the exotherm.
// Unless given in w, both are detected: a first straight baseline is fitted
// to the first and last 5 % of the scan; the window is where the smoothed
// heat flow above it exceeds 2 % of the peak height, widened by half its
// length on each side (into the flat parts, so that no tail of the peak is
// lost) and clipped to the data; the baseline is then the line between the
// levels at the window ends, each read from a straight line fitted to the
// flat part beside it (the outer quarter of the widening and as much again
// as the 2 % extent beyond it, clipped to the data: many samples, little
// noise), and the detection is repeated twice against it. A window given
// in w takes its levels from the quarter-window outside each end. A
// sigmoidal baseline (b = SigmoidalBaseline) replaces the line by
// (1 − α)·L₀(t) + α·L₁(t), where L₀ and L₁ are straight lines with one
// common slope fitted to all the data from the start of the scan to the end
// of the first flat part and from the start of the second to the end
// (everything outside a given window), iterated with α until it no longer changes (the "sigmoidal
// baseline" of the DSC literature, which follows the sample's changing heat
// capacity); for a linear instrument baseline with a step in heat capacity
// proportional to α it recovers the reaction heat exactly. A note is added
// when the exotherm comes close to either end of the data.
//
// Isothermal scans: the window runs from the first sample on the isotherm
// (Program.Start) to the end; the baseline is the constant mean heat flow
// of the last 10 % of the scan, where the reaction has stopped. A scan
// whose heat flow still drifts there gets a note. w and b are not used.
//
// The net heat flow is smoothed by local quadratic fits over about 1/16 of
// the peak's half width (Savitzky–Golay, no loss of peak height); the peak
// time is refined by a least-squares cubic through the raw net heat flow
// within 0.3 half-widths of the peak, re-centred three times, so its
// resolution is much finer than the sampling.
//
// Errors are *ScanError: invalid samples (Validate), an unrecognised
// program (DetectProgram), no exotherm above the noise, a window outside the
// scan. Cost O(n) for n samples (the smoothing is linear, see smoothQuad);
// O(n log n) for the median of DetectProgram; a sigmoidal baseline adds up
// to 200 passes over the window.
func Process(s *Scan, b Baseline, w Window) (*Curve, error) {
	return process(context.Background(), s, b, w)
}

// process is Process; a cancelled ctx stops the iterations of a sigmoidal
// baseline (the caller checks ctx afterwards).
func process(ctx context.Context, s *Scan, b Baseline, w Window) (*Curve, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	p, err := DetectProgram(s)
	if err != nil {
		return nil, err
	}
	c := &Curve{Scan: s, Program: p}
	var base []float64
	if p.Kind == Isothermal {
		base, err = c.isothermalBaseline()
	} else {
		base, err = c.dynamicBaseline(ctx, b, w)
	}
	if err != nil {
		return nil, err
	}
	c.Time, c.Temp = s.Time[c.On:c.End+1], s.Temp[c.On:c.End+1]
	c.Baseline = base
	c.Net = make([]float64, len(base))
	for i := range base {
		c.Net[i] = s.HeatFlow[c.On+i] - base[i]
	}
	cum := cumTrapz(c.Time, c.Net)
	c.Heat = cum[len(cum)-1]
	if !(c.Heat > 0) {
		return nil, scanErr(s, "the net heat over the window is not exothermic (%.3g J/g)", c.Heat/1000)
	}
	c.findPeak()
	c.Normalize(c.Heat)
	return c, nil
}

// edgeHalf is the half-width, in samples, of the neighbourhoods whose mean
// heat flow fixes the ends of a linear baseline.
func edgeHalf(n int) int { return max(3, n/100) }

// dynamicBaseline sets c.On, c.End and returns the baseline over them (see
// Process): the window detected from the data (detectWindow), the ends
// given in w imposed on it (impose), a note for an exotherm cut by an end
// of the data, and the straight baseline turned sigmoidal if b asks for it.
func (c *Curve) dynamicBaseline(ctx context.Context, b Baseline, w Window) ([]float64, error) {
	s := c.Scan
	t := s.Time
	e := edgeHalf(len(t))
	d, err := detectWindow(s, e)
	if err != nil {
		return nil, err
	}
	if w.Onset != 0 || w.End != 0 {
		if err := d.impose(s, w, e); err != nil {
			return nil, err
		}
	}
	if d.startCut {
		c.Notes = append(c.Notes, "the exotherm is already under way near the start of the scan: some heat may be lost; start the scan lower")
	}
	if d.endCut {
		c.Notes = append(c.Notes, "the exotherm has not died out well before the end of the scan: some heat may be lost; run the scan higher")
	}
	c.On, c.End = d.on, d.end
	base := make([]float64, d.end-d.on+1)
	for i := range base {
		base[i] = d.icpt + d.slope*t[d.on+i]
	}
	if b == SigmoidalBaseline && !c.sigmoidal(ctx, base, d.flat0, d.flat1) {
		c.Notes = append(c.Notes, "too little flat baseline outside the exotherm for a sigmoidal baseline: a linear one is used")
	}
	return base, nil
}

// dynWindow is the integration window of a dynamic scan and the straight
// baseline icpt + slope·t over it.
type dynWindow struct {
	on, end          int     // the first and last samples of the window
	flat0, flat1     int     // the ends of the flat parts before and after the exotherm
	startCut, endCut bool    // the exotherm comes close to the start (end) of the data
	slope, icpt      float64 // W/kg/s, W/kg
}

// detectWindow finds the window and the straight baseline of a dynamic scan
// from its data, with e = edgeHalf(n) for n samples (see Process for the
// method). The noise is the root mean square of the heat flow about its
// smoothing (smoothQuad over about n/200 samples each side); it fails with
// a *ScanError when the peak above the baseline is not above 8 times the
// noise. Cost: O(n) per pass, four passes.
func detectWindow(s *Scan, e int) (dynWindow, error) {
	t, q := s.Time, s.HeatFlow
	n := len(t)
	qs := smoothQuad(t, q, max(2, n/200))
	var noise float64
	for i := range q {
		noise += (q[i] - qs[i]) * (q[i] - qs[i])
	}
	noise = math.Sqrt(noise / float64(n))

	// First guess: a line through the first and last 5 % of the scan.
	k := max(e, n/20)
	xs := append(append([]float64{}, t[:k]...), t[n-k:]...)
	ys := append(append([]float64{}, q[:k]...), q[n-k:]...)
	l := fitLine(xs, ys)
	d := dynWindow{slope: l.Slope, icpt: l.Intercept}
	for range 3 {
		pk, h := 0, math.Inf(-1)
		for i := range n {
			if r := qs[i] - (d.icpt + d.slope*t[i]); r > h {
				pk, h = i, r
			}
		}
		if !(h > 8*noise) || !(h > 0) {
			return d, scanErr(s, "no exotherm found: the largest heat flow above the baseline (%.3g W/g) is within the noise (%.3g W/g)", h/1000, noise/1000)
		}
		thr := 0.02 * h
		a := pk
		for a > 0 && qs[a]-(d.icpt+d.slope*t[a]) > thr {
			a--
		}
		z := pk
		for z < n-1 && qs[z]-(d.icpt+d.slope*t[z]) > thr {
			z++
		}
		wd := z - a
		// Cut: the 2 % level is not reached inside the data, or the flat
		// part beyond it is shorter than a quarter of the peak's extent.
		d.startCut, d.endCut = a == 0 || a < wd/4, z == n-1 || n-1-z < wd/4
		d.on, d.end = max(a-wd/2, min(e, a)), min(z+wd/2, max(n-1-e, z))
		d.flat0, d.flat1 = d.on+(a-d.on)/4, d.end-(d.end-z)/4
		d.through(t, levelAt(t, q, d.flat0-wd, d.flat0, d.on, e), levelAt(t, q, d.flat1, d.flat1+wd, d.end, e))
	}
	return d, nil
}

// impose replaces the detected ends of the window by those given in w
// (each only where not zero, as a temperature the scan must reach; the
// window then starts at the first sample at or above w.Onset and ends at
// the last at or below w.End), which no longer count as cut, and refits
// the straight baseline to the levels at the window ends, each read from
// the quarter-window outside it (levelAt). Errors (*ScanError): an end
// outside the scan, or a window of fewer than MinPoints+1 samples.
func (d *dynWindow) impose(s *Scan, w Window, e int) error {
	t, q, T := s.Time, s.HeatFlow, s.Temp
	n := len(t)
	if w.Onset != 0 {
		if w.Onset < T[0] || w.Onset >= T[n-1] {
			return scanErr(s, "the onset %.6g C is outside the scan (%.6g C to %.6g C)", w.Onset-273.15, T[0]-273.15, T[n-1]-273.15)
		}
		d.on = 0
		for d.on < n-1 && T[d.on] < w.Onset {
			d.on++
		}
		d.flat0 = d.on
		d.startCut = false
	}
	if w.End != 0 {
		if w.End <= T[0] || w.End > T[n-1] {
			return scanErr(s, "the end %.6g C is outside the scan (%.6g C to %.6g C)", w.End-273.15, T[0]-273.15, T[n-1]-273.15)
		}
		d.end = n - 1
		for d.end > 0 && T[d.end] > w.End {
			d.end--
		}
		d.flat1 = d.end
		d.endCut = false
	}
	on, end := d.on, d.end
	if end-on < MinPoints {
		return scanErr(s, "the window from %.6g C to %.6g C holds %d samples; at least %d are needed",
			T[on]-273.15, T[end]-273.15, max(end-on+1, 0), MinPoints+1)
	}
	wd := (end - on) / 4
	d.through(t, levelAt(t, q, on-wd, on, on, e), levelAt(t, q, end, end+wd, end, e))
	return nil
}

// through sets the straight baseline through the level ya at the first
// sample of the window and yb at the last (t the sample times).
func (d *dynWindow) through(t []float64, ya, yb float64) {
	d.slope = (yb - ya) / (t[d.end] - t[d.on])
	d.icpt = ya - d.slope*t[d.on]
}

// levelAt returns the baseline level at sample at from the flat stretch
// [lo, hi] (clipped to the data): the value there of a least-squares line
// through the stretch, which averages the noise of all its samples; the
// mean of the samples within e of at when the stretch holds fewer than
// 2e+1 samples.
func levelAt(t, q []float64, lo, hi, at, e int) float64 {
	lo, hi = max(lo, 0), min(hi, len(t)-1)
	if hi-lo+1 < 2*e+1 {
		return mean(q, at-e, at+e)
	}
	l := fitLine(t[lo:hi+1], q[lo:hi+1])
	return l.Intercept + l.Slope*t[at]
}

// sigmoidal turns the linear baseline base (over the window) into the
// sigmoidal one, in place, with the flat parts of the scan [0, flat0] and
// [flat1, n−1]; false (base unchanged) when either holds fewer than
// edgeHalf+1 samples.
//
// The lines before and after the reaction share one slope, fitted by least
// squares with two intercepts to the flat parts: a sample's heat capacity
// changes the level of the baseline as it cures much more than its slope,
// and one slope from all the flat data is far less sensitive to noise than
// two tangents extrapolated across the window.
func (c *Curve) sigmoidal(ctx context.Context, base []float64, flat0, flat1 int) bool {
	s := c.Scan
	t, q := s.Time, s.HeatFlow
	n := len(t)
	on, end := c.On, c.End
	e := edgeHalf(n)
	if flat0+1 < e+1 || n-flat1 < e+1 {
		return false
	}
	// Two intercepts, one slope: centre each group on its mean time.
	var sxy, sxx float64
	var means [2][2]float64 // [group]{mean t, mean q}
	for g, r := range [2][2]int{{0, flat0}, {flat1, n - 1}} {
		mt, mq := mean(t, r[0], r[1]), mean(q, r[0], r[1])
		means[g] = [2]float64{mt, mq}
		for i := r[0]; i <= r[1]; i++ {
			sxy += (t[i] - mt) * (q[i] - mq)
			sxx += (t[i] - mt) * (t[i] - mt)
		}
	}
	if !(sxx > 0) {
		return false
	}
	slope := sxy / sxx
	l0 := func(x float64) float64 { return means[0][1] + slope*(x-means[0][0]) }
	l1 := func(x float64) float64 { return means[1][1] + slope*(x-means[1][0]) }
	tw := t[on : end+1]
	net := make([]float64, len(base))
	alpha := make([]float64, len(base))
	for i := range alpha { // start from the linear baseline's α
		net[i] = q[on+i] - base[i]
	}
	for range 200 {
		if ctx.Err() != nil {
			return true
		}
		cum := cumTrapz(tw, net)
		h := cum[len(cum)-1]
		if !(h > 0) {
			return true
		}
		var change float64
		for i := range alpha {
			a := min(max(cum[i]/h, 0), 1)
			change = max(change, math.Abs(a-alpha[i]))
			alpha[i] = a
			base[i] = (1-a)*l0(tw[i]) + a*l1(tw[i])
			net[i] = q[on+i] - base[i]
		}
		if change < 1e-10 {
			return true
		}
	}
	return true
}

// isothermalBaseline sets c.On, c.End and returns the constant baseline.
func (c *Curve) isothermalBaseline() ([]float64, error) {
	s := c.Scan
	n := len(s.Time)
	c.On, c.End = c.Program.Start, n-1
	if c.End-c.On+1 < MinPoints {
		return nil, scanErr(s, "has %d samples on the isotherm; at least %d are needed", c.End-c.On+1, MinPoints)
	}
	k := max(3, (c.End-c.On+1)/10)
	lo := n - k
	level := mean(s.HeatFlow, lo, n-1)
	base := make([]float64, c.End-c.On+1)
	for i := range base {
		base[i] = level
	}
	// A heat flow still drifting at the end means the reaction goes on.
	l := fitLine(s.Time[lo:], s.HeatFlow[lo:])
	drift := math.Abs(l.Slope) * (s.Time[n-1] - s.Time[lo])
	var top float64
	for _, v := range s.HeatFlow[c.On:] {
		top = max(top, v-level)
	}
	if drift > 0.02*top {
		c.Notes = append(c.Notes, fmt.Sprintf("the heat flow still changes by %.2g %% of the peak over the last tenth of the scan: "+
			"the reaction may not have finished and its heat is underestimated; record longer", 100*drift/top))
	}
	return base, nil
}

// findPeak smooths the net heat flow and locates its peak.
func (c *Curve) findPeak() {
	t, y := c.Time, c.Net
	n := len(t)
	sm := smoothQuad(t, y, max(2, n/200))
	ipk := argmax(sm)
	half := sm[ipk] / 2
	a, z := ipk, ipk
	for a > 0 && sm[a-1] > half {
		a--
	}
	for z < n-1 && sm[z+1] > half {
		z++
	}
	c.HalfWidth = t[z] - t[a]
	if c.HalfWidth == 0 {
		c.HalfWidth = t[min(z+1, n-1)] - t[max(a-1, 0)]
	}
	c.Smooth = smoothQuad(t, y, max(2, (z-a+1)/16))
	ipk = argmax(c.Smooth)
	tp, yp := t[ipk], c.Smooth[ipk]
	if ipk > 0 && ipk < n-1 {
		tp, yp = refinePeak(t, y, tp, yp, c.HalfWidth/2)
	}
	c.Peak = Peak{Time: tp, Temp: interp(t, c.Temp, tp), Height: yp}
}

func argmax(y []float64) int {
	k := 0
	for i, v := range y {
		if v > y[k] {
			k = i
		}
	}
	return k
}

// refinePeak returns the time and height of the maximum of y near t0 by
// least-squares cubics over |t − tp| ≤ 0.3·hw re-centred on their maximum;
// it keeps (t0, y0) when the data around the peak are too few or a cubic
// has no maximum inside its window.
func refinePeak(t, y []float64, t0, y0, hw float64) (float64, float64) {
	tp, yp := t0, y0
	w := 0.3 * hw
	var xs, ys []float64
	for range 4 {
		xs, ys = xs[:0], ys[:0]
		for i, ti := range t {
			if math.Abs(ti-tp) <= w {
				xs = append(xs, (ti-tp)/w)
				ys = append(ys, y[i])
			}
		}
		if len(xs) < 7 || tp-w < t[0] || tp+w > t[len(t)-1] {
			return t0, y0
		}
		cf, ok := polyFit(xs, ys, 3)
		if !ok {
			return t0, y0
		}
		// Stationary points: c1 + 2 c2 x + 3 c3 x² = 0; take the maximum
		// nearest the centre.
		x, found := math.NaN(), false
		a, b, cc := 3*cf[3], 2*cf[2], cf[1]
		var roots []float64
		if math.Abs(a) < 1e-12*math.Abs(b) {
			roots = []float64{-cc / b}
		} else if d := b*b - 4*a*cc; d >= 0 {
			sq := math.Sqrt(d)
			roots = []float64{(-b + sq) / (2 * a), (-b - sq) / (2 * a)}
		}
		for _, r := range roots {
			if b+2*a*r < 0 && math.Abs(r) <= 1 && (!found || math.Abs(r) < math.Abs(x)) {
				x, found = r, true
			}
		}
		if !found {
			return t0, y0
		}
		tp += x * w
		yp = cf[0] + x*(cf[1]+x*(cf[2]+x*cf[3]))
		if math.Abs(x) < 1e-9 {
			break
		}
	}
	return tp, yp
}
