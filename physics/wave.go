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
	// of |E|² per unit |A|² (lossy segments), |A|² into the segment over
	// |A|² at the top of the segment above (from the air for the first),
	// and the factor that carries |A|² from the top of the segment to the
	// top of the next (or into the air below, for the last).
	in, into, on []float64
	run          []complex128 // per frequency: Γ, carried up the stack
	aa           []float64    // per frequency: |A|², carried down
	rev          []Slab       // the stack reversed, for incidence from the bottom
	second       []float64    // the bottom source's absorption under IncidentBoth
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

// NewWave returns the workspace for stacks of up to cells slabs over band.
// It panics on an invalid band (Lo ≤ 0, Hi < Lo, Points < 1, or
// Points = 1 with Hi ≠ Lo): package cases validates user input first.
// Cost: about 24·cells·Points bytes.
func NewWave(cells int, band Band) *Wave {
	if !band.valid() || cells < 1 {
		panic(fmt.Sprintf("physics: NewWave with %d cells, band %+v", cells, band))
	}
	nf := band.Points
	w := &Wave{
		band:   band,
		kLo:    2 * math.Pi * band.Lo / SpeedOfLight,
		cells:  cells,
		seg:    make([]segment, 0, cells),
		in:     make([]float64, cells*nf),
		into:   make([]float64, cells*nf),
		on:     make([]float64, cells*nf),
		run:    make([]complex128, nf),
		aa:     make([]float64, nf),
		rev:    make([]Slab, cells),
		second: make([]float64, cells),
	}
	if nf > 1 {
		w.dk = 2 * math.Pi * (band.Hi - band.Lo) / SpeedOfLight / float64(nf-1)
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
//	Γ_top = Γ_bot z²,  z = e^{−jkw},  Γ_bot(above) = (ρ + Γ_top)/(1 + ρ Γ_top),  ρ = (n_a − n_b)/(n_a + n_b),
//
// and one pass down carries |A|², since A_b = A_a z_a (1 + ρ)/(1 + ρ Γ_top,b)
// gives |A_b|² = |A_a|² |z_a|² |1 + ρ|²/|1 + ρ Γ_top,b|², which never divides
// by a field node. The integral of |E|² over a slab is taken in closed form;
// with Γ_bot = Γ_top/z² and q = 1 − e^{−2αw} = 1 − |z|²,
//
//	k0 ∫₀ʷ |E|² dζ = |A|² [ q/(2n″) (1 + |Γ_bot|² (1 − q)) − (2/n′) Re(Γ_bot z) Im(z) ]
//
// (k0/(2α) = 1/(2n″), k0/β = 1/n′), which holds no growing exponential, so
// Σ w_i ε″_i K_i = 1 − |Γ|² − |T|² (Poynting's theorem) holds to round-off.
// Over a band, each slab's phase factor z and q follow exact recurrences
// in frequency (the frequencies are equally spaced), so the inner loops
// over frequencies are multiplications only; their relative error grows by
// about one rounding unit per frequency. Consecutive lossless slabs of equal
// permittivity are crossed as one. Reference: Orfanidis, Electromagnetic
// Waves and Antennas, multilayer structures chapter (the recursion); Born &
// Wolf, Principles of Optics, §1.6 (stratified media).
//
// Preconditions: len(dst) = len(slabs) ≤ the workspace's cells, every
// width > 0, ε′ > 0, ε″ ≥ 0 (panics on a length mismatch).
//
// Cost: O(len(slabs) · Points): per slab and frequency about five complex
// multiplications, one real division and some twenty real operations going
// up, two multiplications coming down (twice that for IncidentBoth), plus
// per slab a complex square root and a few exponentials; no allocation.
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

// oneSided is Absorb for a wave from the air above slabs[0].
func (w *Wave) oneSided(dst []float64, slabs []Slab) WaveShares {
	clear(dst)
	nf := w.band.Points
	// Segments down to the first conductor.
	w.seg = w.seg[:0]
	metal := false
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
		// A conductor at the face: total reflection.
		return WaveShares{Reflected: 1}
	}
	// Interfaces: ρ and τ = 1 + ρ at each segment's lower face.
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
	run := w.run[:nf]
	// One pass up the stack: Γ at the bottom of each segment (air below, or
	// −1 on a conductor), the factors that carry |A|² down, and the
	// closed-form integral of each lossy segment, which needs Γ and the
	// phase factor z = e^{−jkw} of the segment alone.
	for f := range run {
		run[f] = w.seg[m-1].rho
	}
	for c := m - 1; c >= 0; c-- {
		sg := &w.seg[c]
		z, zd := w.phase(sg)
		in := w.in[c*nf : (c+1)*nf : (c+1)*nf]
		into := w.into[c*nf : (c+1)*nf : (c+1)*nf]
		on := w.on[c*nf : (c+1)*nf : (c+1)*nf]
		in, into, on = in[:len(run)], into[:len(run)], on[:len(run)] // no bounds checks below
		next := into                                                 // |A|² factor into the segment below (unused for the last)
		if c+1 < m {
			next = w.into[(c+1)*nf : (c+2)*nf]
			next = next[:len(run)]
		}
		var rho, tau complex128 // of the interface above this segment
		if c > 0 {
			rho, tau = w.seg[c-1].rho, w.seg[c-1].tau
		} else {
			n0 := sg.n
			rho, tau = (1-n0)/(1+n0), 2/(1+n0)
		}
		tt := real(tau)*real(tau) + imag(tau)*imag(tau)
		// Into the air below: Γ = 0 there, so |A|² gains |τ|²; onto a
		// conductor nothing passes.
		last := 0.0
		if c == m-1 && !metal {
			last = real(sg.tau)*real(sg.tau) + imag(sg.tau)*imag(sg.tau)
		}
		// The lossy segment's closed form (see Absorb): q = 1 − |z|² by its
		// own recurrence in frequency, q_{f+1} = q_f + p (1 − q_f), which
		// has no cancellation for thin slabs.
		n1, n2 := real(sg.n), -imag(sg.n)
		var q, p, c1, c2 float64
		if sg.lossy {
			q = -math.Expm1(-2 * w.kLo * n2 * sg.width)
			p = -math.Expm1(-2 * w.dk * n2 * sg.width)
			c1, c2 = 1/(2*n2), 2/n1
		}
		for f := range run {
			gb := run[f] // Γ at the bottom of this segment
			zz := real(z)*real(z) + imag(z)*imag(z)
			if sg.lossy {
				gg := real(gb)*real(gb) + imag(gb)*imag(gb)
				gz := real(gb)*real(z) - imag(gb)*imag(z) // Re(Γ_bot z)
				in[f] = q*c1*(1+gg*(1-q)) - c2*gz*imag(z)
				q += p * (1 - q)
			}
			if c+1 < m {
				on[f] = zz * next[f]
			} else {
				on[f] = zz * last
			}
			g := gb * (z * z) // Γ at the top of this segment
			// 1/(1 + ρ g) without the library's scaled complex division:
			// |ρ| < 1 and |g| ≤ 1 keep the denominator away from zero.
			d := 1 + rho*g
			r := 1 / (real(d)*real(d) + imag(d)*imag(d))
			run[f] = (rho + g) * complex(real(d)*r, -imag(d)*r) // Γ at the bottom of the segment above (or of the stack)
			into[f] = tt * r                                    // |τ/(1 + ρ g)|²
			z *= zd
		}
	}
	// run holds Γ of the whole stack. Down the stack: |A|² at the top of
	// each segment per unit incident |E|², the cells' integrals weighted by
	// it, and what reaches the air below.
	var refl float64
	aa := w.aa[:nf]
	for f := range run {
		g := run[f]
		refl += real(g)*real(g) + imag(g)*imag(g)
		aa[f] = w.into[f]
	}
	for c := range m {
		sg := &w.seg[c]
		in := w.in[c*nf : (c+1)*nf]
		on := w.on[c*nf : (c+1)*nf]
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

// phase returns e^{−jkw} of the segment at the band's first frequency and
// its ratio between consecutive frequencies.
func (w *Wave) phase(sg *segment) (z, zd complex128) {
	e := func(k float64) complex128 {
		a := k * sg.width
		s, c := math.Sincos(a * real(sg.n))
		r := math.Exp(a * imag(sg.n)) // imag(n) = −n″ ≤ 0
		return complex(r*c, -r*s)
	}
	return e(w.kLo), e(w.dk)
}
