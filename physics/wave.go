package physics

import (
	"fmt"
	"math"
	"math/cmplx"
)

// FreeSpaceImpedance is η0 = 1/(ε0 c) in Ω (CODATA 2018).
const FreeSpaceImpedance = 1 / (VacuumPermittivity * SpeedOfLight)

// Slab is one uniform layer of a stack as a plane wave sees it.
type Slab struct {
	Width        float64 // m, > 0
	Permittivity float64 // relative permittivity ε′ > 0 (1 for a material without a dielectric section)
	Loss         float64 // loss factor ε″ ≥ 0
	// Conductor marks a perfect conductor (a shield): the tangential field
	// is zero at its face and nothing beyond it is reached.
	Conductor bool
}

// Incidence says from which face(s) a plane wave enters the stack.
type Incidence int

// The faces a plane wave may enter by.
const (
	IncidentTop    Incidence = iota // "top": from the air above z = 0
	IncidentBottom                  // "bottom": from the air below the stack
	IncidentBoth                    // "both": one wave from each side, mutually incoherent
)

var incidenceNames = [...]string{"top", "bottom", "both"}

func (i Incidence) String() string {
	if i < 0 || int(i) >= len(incidenceNames) {
		return "Incidence(?)"
	}
	return incidenceNames[i]
}

// Band is a set of Points equally spaced frequencies from Lo to Hi (Hz),
// both ends included. Points = 1 is the single frequency Lo.
type Band struct {
	Lo, Hi float64 // Hz, 0 < Lo ≤ Hi
	Points int     // ≥ 1
}

// DefaultBandPoints is the number of frequencies of a band when none is
// given.
const DefaultBandPoints = 101

// Frequency returns the k-th frequency of the band, k in [0, Points).
func (b Band) Frequency(k int) float64 {
	if b.Points <= 1 {
		return b.Lo
	}
	return b.Lo + (b.Hi-b.Lo)*float64(k)/float64(b.Points-1)
}

func (b Band) valid() bool {
	return b.Lo > 0 && b.Hi >= b.Lo && b.Points >= 1 && !math.IsInf(b.Hi, 0) &&
		(b.Points > 1 || b.Hi == b.Lo)
}

// RefractiveIndex returns the complex refractive index n = n′ − j n″ of a
// medium of relative permittivity ε′ − jε″ (time dependence e^{jωt}):
//
//	n = √(ε′ − jε″),  n′ > 0,  n″ ≥ 0,
//
// the principal square root. The wavelength in the medium is λ0/n′ and the
// power penetration depth λ0/(4π n″), which equals PenetrationDepth.
func RefractiveIndex(eps1, eps2 float64) complex128 {
	return cmplx.Sqrt(complex(eps1, -eps2))
}

// Wavelength returns the wavelength in a medium of permittivity ε′ − jε″
// at frequency f, m: λ0/n′ with λ0 = c/f (n′ from RefractiveIndex).
func Wavelength(f, eps1, eps2 float64) float64 {
	return SpeedOfLight / f / real(RefractiveIndex(eps1, eps2))
}

// WaveShares are the fractions of the incident power that a stack
// reflects, transmits and absorbs, band means; they add up to 1.
type WaveShares struct {
	Reflected, Transmitted, Absorbed float64
}

// Wave computes the field of a plane wave at normal incidence on a layered
// stack and the power each slab absorbs. It owns its buffers: build it once
// per stack size and band (NewWave) and call Absorb as often as the
// permittivities change; Absorb allocates nothing. A Wave serves one
// goroutine at a time.
type Wave struct {
	band  Band
	kLo   float64 // free-space wave number at Lo, 1/m
	dk    float64 // its step between frequencies, 1/m
	cells int
	seg   []segment
	// Per segment and frequency (segment-major): the closed-form integral
	// of |E|² per unit |A|² (lossy segments), and the factor that carries
	// |A|² from the top of the segment to the top of the next (or into the
	// air below, for the last).
	in, on []float64
	// Per frequency, carried up the stack: Γ at the bottom of the current
	// segment (real and imaginary parts) and the factor that carries |A|²
	// into the segment below it. Then, coming down, |A|².
	gr, gi, into []float64
	aa           []float64
	rev          []Slab    // the stack reversed, for incidence from the bottom
	second       []float64 // the bottom source's absorption under IncidentBoth
	lanes        lanes     // the vector kernels' constants and state
}

// segment is a run of slabs that the wave crosses as one uniform medium:
// one lossy slab, or consecutive lossless slabs of equal permittivity.
type segment struct {
	first    int     // its first slab
	width    float64 // m
	eps1     float64 // ε′
	n        complex128
	lossy    bool
	rho, tau complex128 // reflection and transmission at its lower face, from inside
}

// reseed is the number of frequencies after which the recurrences in
// frequency restart from exact exponentials (a multiple of 4).
const reseed = 256

// simd selects the vector kernels (lossy4, lossless4), set at start-up
// where the processor has them (wave_amd64.go).
var simd bool

// padded returns the number of frequencies rounded up to a multiple of 4:
// the per-frequency arrays hold that many, so that the vector kernels run
// whole groups of four (the extra frequencies continue the band beyond Hi
// and are computed but never read).
func padded(nf int) int { return (nf + 3) &^ 3 }

// NewWave returns the workspace for stacks of up to cells slabs over band.
// It panics on an invalid band (Lo ≤ 0, Hi < Lo, Points < 1, or
// Points = 1 with Hi ≠ Lo): package cases validates user input first.
// Cost: about 16·cells·Points bytes.
func NewWave(cells int, band Band) *Wave {
	if !band.valid() || cells < 1 {
		panic(fmt.Sprintf("physics: NewWave with %d cells, band %+v", cells, band))
	}
	nf := padded(band.Points)
	w := &Wave{
		band:   band,
		kLo:    2 * math.Pi * band.Lo / SpeedOfLight,
		cells:  cells,
		seg:    make([]segment, 0, cells),
		in:     make([]float64, cells*nf),
		on:     make([]float64, cells*nf),
		gr:     make([]float64, nf),
		gi:     make([]float64, nf),
		into:   make([]float64, nf),
		aa:     make([]float64, nf),
		rev:    make([]Slab, cells),
		second: make([]float64, cells),
	}
	if band.Points > 1 {
		w.dk = 2 * math.Pi * (band.Hi - band.Lo) / SpeedOfLight / float64(band.Points-1)
	}
	return w
}

// Band returns the frequencies the workspace was built for.
func (w *Wave) Band() Band { return w.band }

// Absorb fills dst[i] with the band-mean absorbed power per unit volume of
// slab i, per unit incident power density and per unit loss factor, K_i in
// 1/m, so that slab i absorbs
//
//	P_i = S ε″_i K_i   (W/m³),   K_i = mean over f of (k0/w_i) ∫_slab |E/E_inc|² dz,
//
// for an incident power density S = |E_inc,rms|²/η0 (W/m²) from each source,
// since P = ω ε0 ε″ |E_rms|² and ω ε0 η0 = k0 = ω/c. It returns the band-mean
// shares of the incident power reflected, transmitted and absorbed,
// averaged over the sources under IncidentBoth (whose two waves, each of
// power S, add their absorption: Σ w_i P_i = 2 S · Absorbed). Lossless
// slabs (ε″ = 0), conductors and slabs the wave cannot reach get K = 0.
//
// Method: each slab is a uniform medium of refractive index
// n = √(ε′ − jε″) in which the field is a forward and a backward wave,
// E = A(e^{−jkζ} + Γ_top e^{jkζ}), k = k0 n = β − jα, ζ from the slab's top.
// One pass up the stack carries the reflection coefficient from the bottom
// (air below, or Γ = −1 on a conductor's face) by the impedance recursion
//
//	Γ_top = Γ_bot y,  y = z² = e^{−2jkw},  Γ_bot(above) = (ρ + Γ_top)/(1 + ρ Γ_top),  ρ = (n_a − n_b)/(n_a + n_b),
//
// and one pass down carries |A|², since A_b = A_a z_a (1 + ρ)/(1 + ρ Γ_top,b)
// gives |A_b|² = |A_a|² |z_a|² |1 + ρ|²/|1 + ρ Γ_top,b|², which never divides
// by a field node. The integral of |E|² over a slab is taken in closed form;
// with e = |z|² = e^{−2αw} and q = 1 − e (k0/(2α) = 1/(2n″), k0/β = 1/n′),
//
//	k0 ∫₀ʷ |E|² dζ = |A|² [ q/(2n″) (1 + |Γ_bot|² e) − (1/n′) (Im Γ_top − e Im Γ_bot) ]
//
// (the cross term 2 Re(Γ_bot z) Im z = Im(Γ_bot (z² − |z|²)) written with
// Γ_top, so that z itself is never needed), which holds no growing
// exponential, so Σ w_i ε″_i K_i = 1 − |Γ|² − |T|² (Poynting's theorem)
// holds to round-off. Over a band the frequencies are equally spaced, so
// each segment's y, e and q follow exact recurrences in frequency,
// y_{f+1} = y_f y_Δ, e_{f+1} = e_f e_Δ, q_{f+1} = q_f + p (1 − q_f) with
// p = 1 − e_Δ (no cancellation for thin slabs), restarted from exact
// exponentials every 256 frequencies (the vector kernels step each of four
// lanes by y_Δ⁴, e_Δ⁴ and 1 − e_Δ⁴): the inner loops over frequencies, on
// separate real and imaginary arrays, are multiplications and one real
// division. The recurrences' relative drift grows by a few rounding units
// per step, so stays below 256 · 4 · 2⁻⁵³ ≈ 1e-13 between restarts (3e-14
// measured over 10001 points against a per-frequency evaluation,
// TestWaveAgainstReference). Consecutive lossless slabs of equal
// permittivity are crossed as one. Reference: Orfanidis, Electromagnetic
// Waves and Antennas, multilayer structures chapter (the recursion); Born &
// Wolf, Principles of Optics, §1.6 (stratified media).
//
// Preconditions: len(dst) = len(slabs) ≤ the workspace's cells, every
// width > 0, ε′ > 0, ε″ ≥ 0 (panics on a length mismatch).
//
// Cost: O(len(slabs) · Points): per slab and frequency some 45 real
// multiplications and additions and one division going up (on amd64 with
// AVX2 and FMA, four frequencies per instruction: about 2.5 ns per slab and
// frequency against 8–12 ns for the scalar loops), two multiplications
// coming down, twice all that for IncidentBoth; plus per slab and 256
// frequencies a complex square root, two sine–cosine pairs and two
// exponentials; no allocation.
func (w *Wave) Absorb(dst []float64, slabs []Slab, inc Incidence) WaveShares {
	n := len(slabs)
	if len(dst) != n || n > w.cells {
		panic(fmt.Sprintf("physics: Wave.Absorb with %d slabs into %d values (workspace for %d)", n, len(dst), w.cells))
	}
	switch inc {
	case IncidentTop:
		return w.oneSided(dst, slabs)
	case IncidentBottom:
		sh := w.oneSided(w.second[:n], w.reversed(slabs))
		for i := range n {
			dst[i] = w.second[n-1-i]
		}
		return sh
	default:
		a := w.oneSided(dst, slabs)
		b := w.oneSided(w.second[:n], w.reversed(slabs))
		for i := range n {
			dst[i] += w.second[n-1-i]
		}
		return WaveShares{
			Reflected:   0.5 * (a.Reflected + b.Reflected),
			Transmitted: 0.5 * (a.Transmitted + b.Transmitted),
			Absorbed:    0.5 * (a.Absorbed + b.Absorbed),
		}
	}
}

func (w *Wave) reversed(slabs []Slab) []Slab {
	n := len(slabs)
	r := w.rev[:n]
	for i := range n {
		r[i] = slabs[n-1-i]
	}
	return r
}

// oneSided is Absorb for a wave from the air above slabs[0]: the segments
// down to the first conductor, one pass up the stack (passUp), one pass
// down (passDown).
func (w *Wave) oneSided(dst []float64, slabs []Slab) WaveShares {
	clear(dst)
	metal := w.segments(slabs)
	if len(w.seg) == 0 {
		// A conductor at the face: total reflection.
		return WaveShares{Reflected: 1}
	}
	w.passUp(metal)
	return w.passDown(dst, slabs)
}

// segments sets w.seg to the segments of slabs down to the first conductor
// (neighbouring lossless slabs of one permittivity merged into one), with
// ρ and τ = 1 + ρ at each segment's lower face (ρ = −1, τ = 0 on a
// conductor). It reports whether a conductor ends the stack.
func (w *Wave) segments(slabs []Slab) (metal bool) {
	w.seg = w.seg[:0]
	for i, s := range slabs {
		if s.Conductor {
			metal = true
			break
		}
		lossy := s.Loss > 0
		if k := len(w.seg) - 1; !lossy && k >= 0 && !w.seg[k].lossy && w.seg[k].eps1 == s.Permittivity {
			w.seg[k].width += s.Width
			continue
		}
		w.seg = append(w.seg, segment{first: i, width: s.Width, eps1: s.Permittivity,
			n: RefractiveIndex(s.Permittivity, s.Loss), lossy: lossy})
	}
	m := len(w.seg)
	if m == 0 {
		return metal
	}
	for c := range m {
		nb := complex(1, 0) // air below
		if c+1 < m {
			nb = w.seg[c+1].n
		}
		na := w.seg[c].n
		w.seg[c].rho = (na - nb) / (na + nb)
		w.seg[c].tau = 2 * na / (na + nb)
	}
	if metal {
		w.seg[m-1].rho, w.seg[m-1].tau = -1, 0
	}
	return metal
}

// passUp is the pass up the stack over every frequency: Γ at the bottom of
// each segment (air below, or −1 on a conductor), the factors that carry
// |A|² down (w.into, w.on), and the closed-form integral of each lossy
// segment (w.in), by the vector kernels where simd, else the Go loops.
// Afterwards w.gr, w.gi hold Γ of the whole stack and w.into |A|² at the
// top of the first segment per unit incident |E|².
func (w *Wave) passUp(metal bool) {
	np := padded(w.band.Points)
	m := len(w.seg)
	gr, gi, into := w.gr[:np], w.gi[:np], w.into[:np]
	rho := w.seg[m-1].rho
	// Into the air below: Γ = 0 there, so |A|² gains |τ|²; onto a
	// conductor nothing passes.
	last := 0.0
	if !metal {
		last = sq(w.seg[m-1].tau)
	}
	for f := range gr {
		gr[f], gi[f], into[f] = real(rho), imag(rho), last
	}
	for c := m - 1; c >= 0; c-- {
		sg := &w.seg[c]
		var up, tau complex128 // ρ and τ of the interface above this segment
		if c > 0 {
			up, tau = w.seg[c-1].rho, w.seg[c-1].tau
		} else {
			n0 := sg.n
			up, tau = (1-n0)/(1+n0), 2/(1+n0)
		}
		k := &kernel{rr: real(up), ri: imag(up), tt: sq(tau)}
		n1, n2 := real(sg.n), -imag(sg.n)
		if sg.lossy {
			k.c1, k.c2 = 1/(2*n2), 1/n1
		}
		// The step factors between consecutive frequencies.
		ph := 2 * w.dk * sg.width
		k.yd, k.ed, k.p = exps(ph, n1, n2)
		if simd {
			w.lanes.constants(k)
		}
		for f0 := 0; f0 < np; f0 += reseed {
			f1 := min(f0+reseed, np)
			k.y, k.e, k.q = exps(2*(w.kLo+float64(f0)*w.dk)*sg.width, n1, n2)
			gr, gi, into := gr[f0:f1], gi[f0:f1], into[f0:f1]
			in, on := w.in[c*np+f0:c*np+f1], w.on[c*np+f0:c*np+f1]
			switch {
			case simd && sg.lossy:
				w.lanes.start(k)
				lossy4(&w.lanes, &gr[0], &gi[0], &into[0], &in[0], &on[0], len(gr))
			case simd:
				w.lanes.start(k)
				lossless4(&w.lanes, &gr[0], &gi[0], &into[0], &in[0], &on[0], len(gr))
			case sg.lossy:
				k.lossy(gr, gi, into, in, on)
			default:
				k.lossless(gr, gi, into, on)
			}
		}
	}
}

// passDown is the pass down the stack after passUp: each lossy segment's
// cell gets the band mean of its integral weighted by |A|² (per unit width
// and incident |E|²), |A|² is carried to the next segment, and what reaches
// the air below is the transmitted share; the reflected share is the band
// mean of |Γ|².
func (w *Wave) passDown(dst []float64, slabs []Slab) WaveShares {
	nf, np := w.band.Points, padded(w.band.Points)
	gr, gi, into := w.gr[:np], w.gi[:np], w.into[:np]
	var refl float64
	aa := w.aa[:nf]
	for f := range aa {
		refl += gr[f]*gr[f] + gi[f]*gi[f]
		aa[f] = into[f]
	}
	for c := range w.seg {
		sg := &w.seg[c]
		in := w.in[c*np : c*np+nf]
		on := w.on[c*np : c*np+nf]
		in, on = in[:len(aa)], on[:len(aa)]
		if sg.lossy {
			sum := 0.0
			for f, a := range aa {
				sum += a * in[f]
				aa[f] = a * on[f]
			}
			dst[sg.first] = sum / (float64(nf) * sg.width)
			continue
		}
		for f := range aa {
			aa[f] *= on[f]
		}
	}
	var trans float64
	for _, a := range aa {
		trans += a
	}
	abs := 0.0
	for _, sg := range w.seg {
		if sg.lossy {
			s := slabs[sg.first]
			abs += s.Width * s.Loss * dst[sg.first]
		}
	}
	inv := 1 / float64(nf)
	return WaveShares{Reflected: refl * inv, Transmitted: trans * inv, Absorbed: abs}
}

// sq returns |x|².
func sq(x complex128) float64 { return real(x)*real(x) + imag(x)*imag(x) }

// exps returns, for a phase a = 2 k0 w (1/m · m) and n = n′ − j n″,
// y = e^{−j a n}, e = |y| = e^{−a n″} and q = 1 − e, each to a few
// rounding units relative: one exponential gives e and q, the one of e and
// q that is the smaller (below 1/2) from math.Exp or math.Expm1 and the
// other by subtraction from 1, which then loses nothing.
func exps(a, n1, n2 float64) (y complex128, e, q float64) {
	s, c := math.Sincos(a * n1)
	if x := a * n2; x < math.Ln2 {
		q = -math.Expm1(-x)
		e = 1 - q
	} else {
		e = math.Exp(-x)
		q = 1 - e
	}
	return complex(e*c, -e*s), e, q
}

// kernel holds one segment's constants for the pass up the stack over a
// run of frequencies: ρ (rr, ri) and |τ|² (tt) of the interface above it,
// the closed form's coefficients c1 = 1/(2n″) and c2 = 1/n′, and y, e, q
// at the run's first frequency with their steps y_Δ, e_Δ and p.
type kernel struct {
	rr, ri, tt float64
	c1, c2     float64
	y, yd      complex128
	e, ed      float64
	q, p       float64
}

// lossy advances Γ (gr, gi) and the |A|² factor (into) from the bottom of
// a lossy segment to the bottom of the segment above, and fills the
// closed-form integral (in) and the factor from its top to the top of the
// segment below (on), over a run of frequencies (see Absorb).
func (k *kernel) lossy(gr, gi, into, in, on []float64) {
	gi, into, in, on = gi[:len(gr)], into[:len(gr)], in[:len(gr)], on[:len(gr)] // no bounds checks below
	rr, ri, tt, c1, c2 := k.rr, k.ri, k.tt, k.c1, k.c2
	yr, yi, ydr, ydi := real(k.y), imag(k.y), real(k.yd), imag(k.yd)
	e, ed, q, p := k.e, k.ed, k.q, k.p
	for f, br := range gr {
		bi := gi[f]
		tr, ti := br*yr-bi*yi, br*yi+bi*yr // Γ_top = Γ_bot y
		in[f] = q*c1*(1+(br*br+bi*bi)*e) - c2*(ti-bi*e)
		on[f] = e * into[f]
		// Γ_bot above = (ρ + Γ_top)/(1 + ρ Γ_top) = (ρ + Γ_top) conj(d)/|d|²:
		// |ρ| < 1 and |Γ_top| ≤ 1 keep d away from zero.
		dr, di := 1+rr*tr-ri*ti, rr*ti+ri*tr
		r := 1 / (dr*dr + di*di)
		nr, ni := rr+tr, ri+ti
		gr[f], gi[f] = (nr*dr+ni*di)*r, (ni*dr-nr*di)*r
		into[f] = tt * r // |τ/(1 + ρ Γ_top)|²
		q += p * (1 - q)
		e *= ed
		yr, yi = yr*ydr-yi*ydi, yr*ydi+yi*ydr
	}
}

// lossless is lossy for a segment without loss: e = 1, no integral.
func (k *kernel) lossless(gr, gi, into, on []float64) {
	gi, into, on = gi[:len(gr)], into[:len(gr)], on[:len(gr)]
	rr, ri, tt := k.rr, k.ri, k.tt
	yr, yi, ydr, ydi := real(k.y), imag(k.y), real(k.yd), imag(k.yd)
	for f, br := range gr {
		bi := gi[f]
		tr, ti := br*yr-bi*yi, br*yi+bi*yr
		on[f] = into[f]
		dr, di := 1+rr*tr-ri*ti, rr*ti+ri*tr
		r := 1 / (dr*dr + di*di)
		nr, ni := rr+tr, ri+ti
		gr[f], gi[f] = (nr*dr+ni*di)*r, (ni*dr-nr*di)*r
		into[f] = tt * r
		yr, yi = yr*ydr-yi*ydi, yr*ydi+yi*ydr
	}
}

// lanes holds a segment's kernel for the vector kernels, each value four
// times (one per lane): the state at four consecutive frequencies
// f, f+1, f+2, f+3 and the steps that carry it four frequencies on. The
// assembly reads it by offset: keep the field order.
type lanes struct {
	yr, yi, e, q       [4]float64 // y, e, q at the lanes' frequencies
	ydr, ydi, ed, p    [4]float64 // y_Δ⁴, e_Δ⁴ and 1 − e_Δ⁴
	rr, ri, tt, c1, c2 [4]float64 // as in kernel
	one                [4]float64
}

// constants sets the lanes' steps and constants from k.
func (l *lanes) constants(k *kernel) {
	y2 := k.yd * k.yd
	y4 := y2 * y2
	e2 := k.ed * k.ed
	p2 := k.p * (2 - k.p) // 1 − e_Δ², without cancellation
	for j := range 4 {
		l.ydr[j], l.ydi[j] = real(y4), imag(y4)
		l.ed[j], l.p[j] = e2*e2, p2*(2-p2)
		l.rr[j], l.ri[j], l.tt[j], l.c1[j], l.c2[j] = k.rr, k.ri, k.tt, k.c1, k.c2
		l.one[j] = 1
	}
}

// start sets the lanes' state at the first four frequencies of a run from
// k's values at the first, by k's steps.
func (l *lanes) start(k *kernel) {
	y, e, q := k.y, k.e, k.q
	for j := range 4 {
		l.yr[j], l.yi[j], l.e[j], l.q[j] = real(y), imag(y), e, q
		y *= k.yd
		e *= k.ed
		q += k.p * (1 - q)
	}
}
