package physics

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// uniformStack cuts a slab of width d into cells equal slabs.
func uniformStack(d float64, cells int, eps1, eps2 float64) []Slab {
	s := make([]Slab, cells)
	for i := range s {
		s[i] = Slab{Width: d / float64(cells), Permittivity: eps1, Loss: eps2}
	}
	return s
}

func single(f float64) Band { return Band{Lo: f, Hi: f, Points: 1} }

func absorb(t *testing.T, slabs []Slab, b Band, inc Incidence) ([]float64, WaveShares) {
	t.Helper()
	k := make([]float64, len(slabs))
	sh := NewWave(len(slabs), b).Absorb(k, slabs, inc)
	if s := sh.Reflected + sh.Transmitted + sh.Absorbed; math.Abs(s-1) > 1e-12 {
		t.Errorf("shares add up to 1 %+.3g", s-1)
	}
	return k, sh
}

// slabAiry returns the reflectance and transmittance of a single uniform
// slab of index n and thickness d in air at wave number k0:
//
//	Γ = ρ (1 − z²)/(1 − ρ² z²),  T = (1 − ρ²) z/(1 − ρ² z²),  ρ = (1 − n)/(1 + n),  z = e^{−j k0 n d}.
//
// Source: Orfanidis, Electromagnetic Waves and Antennas, multilayer
// structures chapter, single dielectric slab (from memory); Born & Wolf,
// Principles of Optics, §1.6.4 (from memory). Written out here on its own,
// without the recursion under test.
func slabAiry(n complex128, d, k0 float64) (R, T float64) {
	rho := (1 - n) / (1 + n)
	z := cmplx.Exp(complex(0, -k0*d) * n)
	den := 1 - rho*rho*z*z
	g := rho * (1 - z*z) / den
	tr := (1 - rho*rho) * z / den
	return real(g * cmplx.Conj(g)), real(tr * cmplx.Conj(tr))
}

func TestWaveHalfSpaceFresnel(t *testing.T) {
	// Normal-incidence Fresnel reflection from air onto a half-space of
	// index n: R = |(1 − n)/(1 + n)|². Born & Wolf, Principles of Optics,
	// §1.5.2 (from memory); Orfanidis, ch. on reflection and transmission
	// (from memory). The half-space is a lossy slab 40 penetration depths
	// thick: what returns from its far face is e^{−40} smaller.
	const f = 2.45e9
	for _, c := range []struct{ eps1, eps2 float64 }{{4, 0.4}, {78, 10}, {2.5, 0.05}} {
		dp := PenetrationDepth(f, c.eps1, c.eps2)
		_, sh := absorb(t, uniformStack(40*dp, 400, c.eps1, c.eps2), single(f), IncidentTop)
		n := RefractiveIndex(c.eps1, c.eps2)
		r := (1 - n) / (1 + n)
		want := real(r * cmplx.Conj(r))
		if math.Abs(sh.Reflected-want) > 1e-12 {
			t.Errorf("ε = %g − j%g: R = %.15g, want %.15g", c.eps1, c.eps2, sh.Reflected, want)
		}
		// |T|² = |τ_in τ_out|² e^{−40} with |τ_in τ_out| = |4n/(1 + n)²| ≤ 1.
		if sh.Transmitted > math.Exp(-40) {
			t.Errorf("ε = %g − j%g: T = %.3g through 40 D_p", c.eps1, c.eps2, sh.Transmitted)
		}
	}
}

func TestWaveLosslessSlab(t *testing.T) {
	// A lossless slab of index n in air. Quarter-wave thickness (n d = λ0/4):
	// R = ((n² − 1)/(n² + 1))²; half-wave (n d = λ0/2): R = 0 (the slab is
	// absent); in general R = (n² − 1)² sin²δ / (4n² + (n² − 1)² sin²δ),
	// δ = k0 n d. Orfanidis, Electromagnetic Waves and Antennas, multilayer
	// chapter, quarter- and half-wave slabs (from memory); Born & Wolf,
	// Principles of Optics, §1.6.4 (from memory).
	const f, eps1 = 2.45e9, 4.0
	n := math.Sqrt(eps1)
	lambda0 := SpeedOfLight / f
	k0 := 2 * math.Pi / lambda0
	general := func(d float64) float64 {
		s2 := math.Pow(math.Sin(k0*n*d), 2)
		a := (n*n - 1) * (n*n - 1) * s2
		return a / (4*n*n + a)
	}
	cases := []struct {
		name string
		d    float64
		want float64
	}{
		{"quarter wave", lambda0 / (4 * n), math.Pow((n*n-1)/(n*n+1), 2)},
		{"half wave", lambda0 / (2 * n), 0},
		{"three quarter wave", 3 * lambda0 / (4 * n), math.Pow((n*n-1)/(n*n+1), 2)},
		{"0.3 wave", 0.3 * lambda0 / n, general(0.3 * lambda0 / n)},
	}
	for _, c := range cases {
		// One slab; the same cut into 7 cells (crossed as one, being
		// lossless); and 7 cells with a loss of 1e-13, each its own medium,
		// which must agree to within that loss.
		for _, st := range []struct {
			cells int
			eps2  float64
			tol   float64
		}{{1, 0, 1e-13}, {7, 0, 1e-13}, {7, 1e-13, 1e-11}} {
			_, sh := absorb(t, uniformStack(c.d, st.cells, eps1, st.eps2), single(f), IncidentTop)
			if math.Abs(sh.Reflected-c.want) > st.tol || math.Abs(sh.Transmitted-(1-c.want)) > st.tol {
				t.Errorf("%s, %d cells, ε″ = %g: R = %.15g, T = %.15g; want R = %.15g", c.name, st.cells, st.eps2, sh.Reflected, sh.Transmitted, c.want)
			}
		}
	}
}

func TestWaveMetalBackedNodes(t *testing.T) {
	// A lossless slab (ε′ = 4) of thickness d on a perfect conductor: the
	// field is a pure standing wave E = E_s sin(k(d − z)), zero on the
	// metal and at every multiple of λ/2 from it (λ = λ0/n), with
	// |E_s|² = 4 |E_inc|² / (sin² kd + n² cos² kd) from matching E and H at
	// the top face (analytic; Orfanidis, Electromagnetic Waves and Antennas,
	// standing waves over a conductor, from memory). A loss of 1e-9 makes
	// the field visible in K without changing it beyond 1e-8.
	const f, eps1, eps2 = 2.45e9, 4.0, 1e-9
	n := math.Sqrt(eps1)
	lambda := SpeedOfLight / f / n
	k := 2 * math.Pi / lambda
	d := 1.3 * lambda
	const cells = 520 // λ/400 each: the nodes at λ/2, λ from the metal are cell faces
	stack := append(uniformStack(d, cells, eps1, eps2), Slab{Width: 0.002, Conductor: true},
		Slab{Width: 0.01, Permittivity: 4, Loss: 1})
	K, sh := absorb(t, stack, single(f), IncidentTop)
	if math.Abs(sh.Reflected-1) > 1e-6 || sh.Transmitted != 0 {
		t.Errorf("R = %.9g, T = %g; want total reflection", sh.Reflected, sh.Transmitted)
	}
	if K[cells+1] != 0 {
		t.Errorf("the layer beyond the conductor absorbs: K = %g", K[cells+1])
	}
	es2 := 4 / (math.Pow(math.Sin(k*d), 2) + n*n*math.Pow(math.Cos(k*d), 2))
	k0 := 2 * math.Pi * f / SpeedOfLight
	w := d / cells
	peak := 0.0
	for i := range cells {
		// Cell mean of k0 |E_s|² sin²(k(d − z)) (analytic).
		u0, u1 := k*(d-float64(i)*w), k*(d-float64(i+1)*w)
		mean := 0.5 - (math.Sin(2*u0)-math.Sin(2*u1))/(4*(u0-u1))
		want := k0 * es2 * mean
		peak = max(peak, want)
		if math.Abs(K[i]-want) > 1e-7*k0*es2 {
			t.Fatalf("cell %d: K = %.12g, want %.12g", i, K[i], want)
		}
	}
	// The cells on either side of a node at λ/2 and λ from the metal hold
	// the least field of their neighbourhood.
	for _, m := range []int{1, 2} {
		j := cells - m*200 // the node is the face between cells j−1 and j
		if !(K[j] < K[j+1] && K[j-1] < K[j-2] && K[j] < 1e-4*peak && K[j-1] < 1e-4*peak) {
			t.Errorf("node %d λ/2 from the metal: K around it %.3g %.3g | %.3g %.3g (peak %.3g)",
				m, K[j-2], K[j-1], K[j], K[j+1], peak)
		}
	}
}

func TestWaveThickLossyTendsToExponential(t *testing.T) {
	// A lossy slab thick against its penetration depth: inside it the field
	// is the transmitted wave alone, E = E_t e^{−jkz}, E_t = 2E_inc/(1 + n)
	// (Fresnel transmission, Born & Wolf §1.5.2, from memory), so the power
	// follows the exponential model P(z) = 2π f ε0 ε″ |E_t|² e^{−z/D_p}
	// (Metaxas & Meredith, Industrial Microwave Heating, 1983, ch. 2, from
	// memory), cell by cell as the exact mean over the cell.
	const f, eps1, eps2 = 2.45e9, 4.0, 1.2
	dp := PenetrationDepth(f, eps1, eps2)
	const cells = 600
	d := 30 * dp
	K, _ := absorb(t, uniformStack(d, cells, eps1, eps2), single(f), IncidentTop)
	n := RefractiveIndex(eps1, eps2)
	et := cmplx.Abs(2/(1+n)) * math.Sqrt(FreeSpaceImpedance) // per unit S
	p0 := PowerDensity(f, eps2, et)
	w := d / cells
	for i := range cells / 6 { // the top 5 D_p; the far face's echo is below e^{−25}
		z0, z1 := float64(i)*w, float64(i+1)*w
		want := p0 * dp * (math.Exp(-z0/dp) - math.Exp(-z1/dp)) / w
		if got := eps2 * K[i]; math.Abs(got-want) > 1e-10*p0 {
			t.Fatalf("cell %d (%.3g D_p): P/S = %.12g 1/m, exponential model %.12g", i, z0/dp, got, want)
		}
	}
}

func TestWaveWaterPenetrationDepth(t *testing.T) {
	// Water at 2.45 GHz, ε′ ≈ 78, ε″ ≈ 10 (Metaxas & Meredith, Industrial
	// Microwave Heating, 1983, from memory): power penetration depth
	// 1.72 cm (derived from their formula). Read here from the decay of the
	// standing-wave solution's cell powers in a 20 cm layer on a metal
	// plate, between 2 and 6 cm deep, where the echo of the plate is below
	// e^{−8} and the decay is a clean exponential.
	const f = 2.45e9
	const cells = 2000
	d := 0.2
	stack := append(uniformStack(d, cells, 78, 10), Slab{Width: 0.002, Conductor: true})
	K, _ := absorb(t, stack, single(f), IncidentTop)
	w := d / cells
	i1, i2 := int(0.02/w), int(0.06/w)
	dp := float64(i2-i1) * w / math.Log(K[i1]/K[i2])
	if math.Abs(dp-0.0172) > 0.00005 {
		t.Errorf("D_p = %.5g m, want 0.0172 m", dp)
	}
}

// randomStack returns 1 to 60 slabs of random width (10 µm to 10 mm) and
// permittivity ε′ (1 to 81); a slab is lossy (ε″ log-uniform from 1e-4 to
// 10) when a uniform draw falls below lossy, a conductor when it falls
// between lossy and metal, lossless otherwise.
func randomStack(rng *rand.Rand, lossy, metal float64) []Slab {
	st := make([]Slab, 1+rng.IntN(60))
	for i := range st {
		st[i] = Slab{Width: 1e-5 + 0.01*rng.Float64(), Permittivity: 1 + 80*rng.Float64()}
		switch r := rng.Float64(); {
		case r < lossy:
			st[i].Loss = math.Pow(10, -4+5*rng.Float64())
		case r < metal:
			st[i].Conductor = true
		}
	}
	return st
}

func TestWaveEnergyBalance(t *testing.T) {
	// Poynting's theorem (Born & Wolf §1.1.4, from memory): for each source
	// the absorbed power equals S (1 − |Γ|² − |T|²). Random stacks with
	// lossy, lossless and metal layers, every incidence, one frequency and
	// a band. Absorbed is Σ w ε″ K, computed from the cell integrals
	// independently of Γ and T. Fixed seed.
	rng := rand.New(rand.NewPCG(7, 17))
	for trial := range 40 {
		st := randomStack(rng, 0.6, 0.63)
		n := len(st)
		for _, b := range []Band{single(2.45e9), {Lo: 5.85e9, Hi: 6.65e9, Points: 101}, {Lo: 0.9e9, Hi: 0.93e9, Points: 7}} {
			for _, inc := range []Incidence{IncidentTop, IncidentBottom, IncidentBoth} {
				K := make([]float64, n)
				sh := NewWave(n, b).Absorb(K, st, inc)
				sum := sh.Reflected + sh.Transmitted + sh.Absorbed
				abs := 0.0
				for i, s := range st {
					abs += s.Width * s.Loss * K[i]
					if K[i] < 0 || math.IsNaN(K[i]) || (s.Loss == 0 && K[i] != 0) {
						t.Fatalf("trial %d, slab %d: K = %g with ε″ = %g", trial, i, K[i], s.Loss)
					}
				}
				if inc == IncidentBoth {
					abs /= 2
				}
				if math.Abs(sum-1) > 1e-12 || math.Abs(abs-sh.Absorbed) > 1e-12 {
					t.Errorf("trial %d (%d slabs), %v, %d points: R + T + A − 1 = %.3g, Σ w ε″ K − A = %.3g",
						trial, n, inc, b.Points, sum-1, abs-sh.Absorbed)
				}
			}
		}
	}
}

func TestWaveCellsPartitionSlab(t *testing.T) {
	// Cutting a uniform lossy slab into cells changes nothing physical
	// (identity): R and T are those of the single slab (closed form,
	// slabAiry) and the cells' absorption adds up to the slab's.
	const f, eps1, eps2, d = 2.45e9, 4.0, 0.4, 0.012
	k0 := 2 * math.Pi * f / SpeedOfLight
	R, T := slabAiry(RefractiveIndex(eps1, eps2), d, k0)
	var whole float64
	for _, cells := range []int{1, 3, 48} {
		K, sh := absorb(t, uniformStack(d, cells, eps1, eps2), single(f), IncidentTop)
		if math.Abs(sh.Reflected-R) > 1e-14 || math.Abs(sh.Transmitted-T) > 1e-14 {
			t.Errorf("%d cells: R = %.15g, T = %.15g; closed form %.15g, %.15g", cells, sh.Reflected, sh.Transmitted, R, T)
		}
		sum := 0.0
		for _, k := range K {
			sum += d / float64(cells) * eps2 * k
		}
		if cells == 1 {
			whole = sum
		} else if math.Abs(sum-whole) > 1e-14 {
			t.Errorf("%d cells absorb %.15g, one slab %.15g", cells, sum, whole)
		}
	}
}

func TestWaveBandMean(t *testing.T) {
	// A lossy slab over the 5.85–6.65 GHz band. (1) The band recurrences
	// against single-frequency solutions (each with its own exponentials) at
	// every band point. (2) The band mean of the absorbed share against a
	// Gauss–Legendre quadrature of the closed form A(f) = 1 − R − T
	// (slabAiry): the mean of N equally spaced points is (N−1)/N times the
	// trapezoid rule plus the two ends over 2N, so it must equal
	// ((N−1) Q + (A(lo) + A(hi))/2)/N to within (N−1)/N times the
	// trapezoid error, bounded by (hi − lo) h² max|A″|/12 (Davis &
	// Rabinowitz, Methods of Numerical Integration, trapezoid error term;
	// standard).
	const eps1, eps2, d = 4.0, 0.4, 0.05
	b := Band{Lo: 5.85e9, Hi: 6.65e9, Points: 101}
	const cells = 20
	st := uniformStack(d, cells, eps1, eps2)
	K, sh := absorb(t, st, b, IncidentTop)
	mean := make([]float64, cells)
	for k := range b.Points {
		Kf, _ := absorb(t, st, single(b.Frequency(k)), IncidentTop)
		for i := range mean {
			mean[i] += Kf[i] / float64(b.Points)
		}
	}
	for i := range K {
		if math.Abs(K[i]-mean[i]) > 1e-12*mean[i] {
			t.Errorf("cell %d: band K = %.15g, mean of single frequencies %.15g", i, K[i], mean[i])
		}
	}
	n := RefractiveIndex(eps1, eps2)
	A := func(f float64) float64 {
		R, T := slabAiry(n, d, 2*math.Pi*f/SpeedOfLight)
		return 1 - R - T
	}
	span := b.Hi - b.Lo
	Q := quad.Fixed(A, b.Lo, b.Hi, 200, nil, 0) / span
	N := float64(b.Points)
	want := ((N-1)*Q + 0.5*(A(b.Lo)+A(b.Hi))) / N
	h := span / (N - 1)
	a2 := 0.0 // max |A″| by central differences on a fine grid
	for k := 1; k < 4000; k++ {
		f, df := b.Lo+span*float64(k)/4000, span/4000
		a2 = max(a2, math.Abs(A(f+df)-2*A(f)+A(f-df))/(df*df))
	}
	tol := (N - 1) / N * h * h * a2 / 12
	if math.Abs(sh.Absorbed-want) > tol {
		t.Errorf("band-mean absorbed share %.12g, quadrature %.12g (continuous mean %.12g), tolerance %.3g", sh.Absorbed, want, Q, tol)
	}
	t.Logf("absorbed share: band mean %.9f, quadrature %.9f, trapezoid bound %.2g", sh.Absorbed, want, tol)
}

func TestWaveConductorAtFace(t *testing.T) {
	// A perfect conductor facing the wave reflects everything (analytic).
	st := []Slab{{Width: 0.002, Conductor: true}, {Width: 0.01, Permittivity: 4, Loss: 0.4}}
	K, sh := absorb(t, st, single(2.45e9), IncidentTop)
	if sh.Reflected != 1 || K[1] != 0 {
		t.Errorf("R = %g, K behind the metal %g", sh.Reflected, K[1])
	}
	// From below, the resin takes the wave and the metal sends it back.
	_, sh = absorb(t, st, single(2.45e9), IncidentBottom)
	if sh.Transmitted != 0 || !(sh.Absorbed > 0) {
		t.Errorf("from below: %+v", sh)
	}
}

func TestWaveAbsorbAllocatesNothing(t *testing.T) {
	// Deterministic allocation count (not a timing).
	st := uniformStack(0.012, 150, 4, 0.4)
	w := NewWave(len(st), Band{Lo: 2.4e9, Hi: 2.5e9, Points: 101})
	K := make([]float64, len(st))
	if a := testing.AllocsPerRun(20, func() { w.Absorb(K, st, IncidentBoth) }); a != 0 {
		t.Errorf("%g allocations per Absorb", a)
	}
}

func BenchmarkWaveAbsorb150Cells101Points(b *testing.B) {
	st := uniformStack(0.012, 150, 4, 0.4)
	for i := range st {
		st[i].Loss = 0.4 - 0.002*float64(i) // every cell its own medium
	}
	w := NewWave(len(st), Band{Lo: 2.4e9, Hi: 2.5e9, Points: 101})
	K := make([]float64, len(st))
	b.ReportAllocs()
	for b.Loop() {
		w.Absorb(K, st, IncidentTop)
	}
}

func TestWaveVeryThickCell(t *testing.T) {
	// One cell 2000 penetration depths thick (e^{2αw} would overflow): the
	// closed form holds no growing exponential, so the result is finite and
	// the reflectance is Fresnel's (Born & Wolf §1.5.2, from memory).
	const f, eps1, eps2 = 2.45e9, 78.0, 10.0
	K, sh := absorb(t, []Slab{{Width: 2000 * PenetrationDepth(f, eps1, eps2), Permittivity: eps1, Loss: eps2}}, single(f), IncidentTop)
	n := RefractiveIndex(eps1, eps2)
	r := (1 - n) / (1 + n)
	if want := real(r * cmplx.Conj(r)); math.Abs(sh.Reflected-want) > 1e-12 || math.IsNaN(K[0]) || math.IsInf(K[0], 0) {
		t.Errorf("R = %.15g (want %.15g), K = %g", sh.Reflected, want, K[0])
	}
}

// refWave is a straightforward evaluation of the stack's response to a
// wave from the top, kept here to check Wave.Absorb against: every
// frequency on its own with its own exponentials (cmplx.Exp), every slab
// its own medium, the reflection coefficients by the impedance recursion
// Γ_bot = (ρ + Γ_top)/(1 + ρ Γ_top) with complex division, the amplitudes
// by continuity of the total field E at each face,
// A_next (1 + Γ_top,next) = A z (1 + Γ_bot), from A_0 (1 + Γ_top,0) = 1 + Γ in
// the air, and the integral of |E|² = |A|² |e^{−jkζ} + Γ_top e^{jkζ}|² term
// by term,
//
//	∫₀ʷ |E|² dζ = |A|² [ (1 − e^{−2αw})/(2α) + |Γ_top|² (e^{2αw} − 1)/(2α) + 2 Re(Γ_top (e^{2jβw} − 1)/(2jβ)) ],
//
// growing exponential included (fine for the moderate slabs used here).
// Orfanidis, Electromagnetic Waves and Antennas, multilayer structures
// chapter (the recursion and the field in a layer, from memory); Born &
// Wolf, Principles of Optics, §1.6 (from memory).
func refWave(slabs []Slab, b Band) (K []float64, R, T float64) {
	K = make([]float64, len(slabs))
	m, metal := len(slabs), false
	for i, s := range slabs {
		if s.Conductor {
			m, metal = i, true
			break
		}
	}
	np := float64(b.Points)
	n := make([]complex128, m)
	z := make([]complex128, m)
	gb := make([]complex128, m)
	gt := make([]complex128, m)
	for kf := range b.Points {
		k0 := 2 * math.Pi * b.Frequency(kf) / SpeedOfLight
		if m == 0 {
			R += 1 / np
			continue
		}
		for i := range m {
			n[i] = cmplx.Sqrt(complex(slabs[i].Permittivity, -slabs[i].Loss))
			z[i] = cmplx.Exp(complex(0, -k0*slabs[i].Width) * n[i])
		}
		gb[m-1] = (n[m-1] - 1) / (n[m-1] + 1)
		if metal {
			gb[m-1] = -1
		}
		for i := m - 1; i >= 0; i-- {
			gt[i] = gb[i] * z[i] * z[i]
			if i > 0 {
				rho := (n[i-1] - n[i]) / (n[i-1] + n[i])
				gb[i-1] = (rho + gt[i]) / (1 + rho*gt[i])
			}
		}
		rho0 := (1 - n[0]) / (1 + n[0])
		g := (rho0 + gt[0]) / (1 + rho0*gt[0])
		R += real(g*cmplx.Conj(g)) / np
		A := (1 + g) / (1 + gt[0])
		for i := range m {
			w := slabs[i].Width
			if slabs[i].Loss > 0 {
				al, be := -k0*imag(n[i]), k0*real(n[i])
				v := -math.Expm1(-2*al*w)/(2*al) + real(gt[i]*cmplx.Conj(gt[i]))*math.Expm1(2*al*w)/(2*al) +
					2*real(gt[i]*(cmplx.Exp(complex(0, 2*be*w))-1)/complex(0, 2*be))
				K[i] += k0 * real(A*cmplx.Conj(A)) * v / w / np
			}
			eb := A * z[i] * (1 + gb[i]) // E at the slab's bottom face
			if i+1 < m {
				A = eb / (1 + gt[i+1])
			} else if !metal {
				T += real(eb*cmplx.Conj(eb)) / np
			}
		}
	}
	return K, R, T
}

func TestWaveAgainstReference(t *testing.T) {
	// Absorb (segments, recurrences in frequency restarted every few
	// hundred points, the rearranged closed form, vector kernels where the
	// processor has them) against refWave (each frequency and slab on its
	// own) on random stacks of lossy, lossless and metal layers, from the
	// top and from the bottom, over bands of 2 to 101 points and a few of
	// 10001 (the largest band_points). Both kernels, where there are two.
	// Fixed seed. Measured worst, relative per cell: 2.6e-12 (both
	// kernels) up to 101 points, 3e-14 over 10001 points; the previous
	// implementation, without vector kernels or restarts, stood at 2.3e-12
	// and 5e-12 from the same reference (the reference rounds too: a
	// resonant stack amplifies the rounding of its phases).
	kernels := []bool{false}
	if simd {
		kernels = append(kernels, true)
	}
	defer func(s bool) { simd = s }(simd)
	rng := rand.New(rand.NewPCG(11, 13))
	for trial := range 160 {
		st := randomStack(rng, 0.7, 0.72)
		n := len(st)
		lo := 1e8 + 1e10*rng.Float64()
		b := Band{Lo: lo, Hi: lo * (1 + 0.3*rng.Float64()), Points: 2 + rng.IntN(100)}
		if trial%40 == 0 {
			b.Points = 10001
		}
		const tol = 5e-12
		for _, bottom := range []bool{false, true} {
			inc, ref := IncidentTop, st
			if bottom {
				inc, ref = IncidentBottom, slices.Clone(st)
				slices.Reverse(ref)
			}
			Kr, R, T := refWave(ref, b)
			if bottom {
				slices.Reverse(Kr)
			}
			peak := 0.0
			for _, k := range Kr {
				peak = max(peak, k)
			}
			for _, s := range kernels {
				simd = s
				K := make([]float64, n)
				sh := NewWave(n, b).Absorb(K, st, inc)
				if math.Abs(sh.Reflected-R) > tol || math.Abs(sh.Transmitted-T) > tol {
					t.Errorf("trial %d, %v, %d points, vector kernel %v: R = %.15g, T = %.15g; reference %.15g, %.15g",
						trial, inc, b.Points, s, sh.Reflected, sh.Transmitted, R, T)
				}
				for i := range K {
					// Relative to the cell's own value; cells that hold less
					// than 1e-3 of the peak against the peak's 1e-3.
					if math.Abs(K[i]-Kr[i]) > tol*max(Kr[i], 1e-3*peak) {
						t.Errorf("trial %d, %v, %d points, vector kernel %v, slab %d of %d: K = %.15g, reference %.15g (relative %.3g)",
							trial, inc, b.Points, s, i, n, K[i], Kr[i], (K[i]-Kr[i])/Kr[i])
					}
				}
			}
		}
	}
}
