package reference

import (
	"fmt"
	"math"
	"testing"
)

func TestPlaneWallEigenTable(t *testing.T) {
	// Source: ζ1 confirmed in Watts, Essentials of Applied Mathematics (2007),
	// Table A.1; C1 from memory (Incropera et al., Table 5.1); both verified
	// by recomputation. Four decimals, so the tolerance is
	// half a unit in the last place.
	for _, tc := range []struct {
		Bi, zeta1, c1 float64
	}{
		{0.01, 0.0998, 1.0017},
		{0.1, 0.3111, 1.0161},
		{0.5, 0.6533, 1.0701},
		{1, 0.8603, 1.1191},
		{2, 1.0769, 1.1785},
		{5, 1.3138, 1.2402},
		{10, 1.4289, 1.2620},
		{20, 1.4961, 1.2699},
	} {
		z := PlaneWallEigen(tc.Bi, 1)[0]
		c := PlaneWallCoefficient(z)
		if math.Abs(z-tc.zeta1) > 0.5e-4 {
			t.Errorf("Bi = %g: ζ1 = %.6f, want %.4f", tc.Bi, z, tc.zeta1)
		}
		if math.Abs(c-tc.c1) > 0.5e-4 {
			t.Errorf("Bi = %g: C1 = %.6f, want %.4f", tc.Bi, c, tc.c1)
		}
	}
	// Source: exact limit Bi → ∞ (fixed face temperature): ζ1 = π/2, C1 = 4/π.
	z := PlaneWallEigen(math.Inf(1), 3)
	for i, want := range []float64{math.Pi / 2, 3 * math.Pi / 2, 5 * math.Pi / 2} {
		if z[i] != want {
			t.Errorf("Bi = ∞: ζ%d = %v, want %v", i+1, z[i], want)
		}
	}
	if c := PlaneWallCoefficient(z[0]); math.Abs(c-4/math.Pi) > 1e-15 {
		t.Errorf("Bi = ∞: C1 = %v, want 4/π = %v", c, 4/math.Pi)
	}
}

// TestPlaneWallEigenRoots checks every root against its defining equation
// and its interval, for Biot numbers from 1e-12 to 1e12.
func TestPlaneWallEigenRoots(t *testing.T) {
	const eps = 0x1p-52
	for _, Bi := range []float64{0, 1e-12, 1e-6, 0.01, 0.1, 1, 3.7, 10, 100, 1e4, 1e8, 1e12} {
		z := PlaneWallEigen(Bi, 200)
		for i, zn := range z {
			lo := float64(i) * math.Pi
			if !(zn >= lo && zn <= lo+math.Pi/2) {
				t.Fatalf("Bi = %g: ζ%d = %v outside [%v, %v]", Bi, i+1, zn, lo, lo+math.Pi/2)
			}
			// Residual of f(ζ) = ζ sin ζ − Bi cos ζ: a root correct to a few
			// ulp of ζ leaves |f| ≲ 4ε·ζ·|f'(ζ)| plus the round-off of f.
			s, c := math.Sincos(zn)
			res := math.Abs(zn*s - Bi*c)
			tol := 4*eps*zn*math.Abs(s+zn*c+Bi*s) + 4*eps*(zn+Bi)
			if res > tol {
				t.Errorf("Bi = %g: ζ%d = %v leaves residual %.3g > %.3g", Bi, i+1, zn, res, tol)
			}
		}
	}
	// Source: analytic; C1 = 1 + ζ1²/6 + O(ζ1⁴): the series branch below
	// ζ = 1e-4 must join the closed form.
	for _, z := range []float64{0.99e-4, 1.01e-4, 1e-3} {
		want := 1 + z*z/6 - z*z*z*z/360 // next term from the Taylor series of 4 sin ζ/(2ζ + sin 2ζ)
		if got := PlaneWallCoefficient(z); math.Abs(got-want) > 1e-12 {
			t.Errorf("PlaneWallCoefficient(%g) = %.16f, want %.16f", z, got, want)
		}
	}
	// Source: analytic; as Bi → 0, ζ1² = Bi − Bi²/3 + O(Bi³).
	z := PlaneWallEigen(1e-8, 1)[0]
	if want := math.Sqrt(1e-8 - 1e-16/3); math.Abs(z-want) > 1e-15*want {
		t.Errorf("Bi = 1e-8: ζ1 = %v, want %v", z, want)
	}
}

func TestPlaneWallCentre(t *testing.T) {
	for _, tc := range []struct {
		Bi, Fo, want float64
	}{
		// Source: Carslaw & Jaeger 1959, §3.11, derived full-series centre value
		// (regression value computed from the published formula).
		{1, 0.5, 0.772526},
		// Source: as above.
		{10, 0.5, 0.454641},
	} {
		got := PlaneWall(tc.Bi, tc.Fo, 0)
		t.Logf("Bi = %g, Fo = %g: θ*(0) = %.9f", tc.Bi, tc.Fo, got)
		if math.Abs(got-tc.want) > 0.5e-6 {
			t.Errorf("PlaneWall(%g, %g, 0) = %.8f, want %.6f", tc.Bi, tc.Fo, got, tc.want)
		}
	}
}

// TestPlaneWallOneTerm compares the series with the one-term approximation
// θ* ≈ C1 exp(−ζ1² Fo) cos(ζ1 x*) of Incropera et al. eq. 5.40, for
// Fo ≥ 0.5: the difference must stay below the size of
// the neglected terms.
func TestPlaneWallOneTerm(t *testing.T) {
	for _, Bi := range []float64{0.1, 1, 10} {
		for _, Fo := range []float64{0.5, 1, 2} {
			z1 := PlaneWallEigen(Bi, 2)
			c1 := PlaneWallCoefficient(z1[0])
			// Bound of the neglected terms: |C2| exp(−ζ2² Fo) times a
			// factor 2 for the rest of the tail (ζn ≥ (n−1)π).
			bound := 2 * math.Abs(PlaneWallCoefficient(z1[1])) * math.Exp(-z1[1]*z1[1]*Fo)
			for _, x := range []float64{0, 0.5, 1} {
				one := c1 * math.Exp(-z1[0]*z1[0]*Fo) * math.Cos(z1[0]*x)
				if d := math.Abs(PlaneWall(Bi, Fo, x) - one); d > bound {
					t.Errorf("Bi = %g, Fo = %g, x* = %g: series − one term = %.3g > bound %.3g", Bi, Fo, x, d, bound)
				}
			}
		}
	}
}

// TestPlaneWallIdentities checks that the series satisfies the problem it
// claims to solve: the heat equation ∂θ/∂Fo = ∂²θ/∂x*², the convective face
// −∂θ/∂x* = Bi θ at x* = 1, the initial condition, and the energy balance
// dθ̄/dFo = −Bi θ(1). Derivatives by differences with steps scaled to the
// length (√Fo) and time (Fo) scales of the solution, dx = 1e-3√Fo and
// dFo = 1e-3·Fo: relative truncation ~ 1e-6, round-off ~ ε/1e-6 ≈ 1e-10.
func TestPlaneWallIdentities(t *testing.T) {
	for _, Bi := range []float64{0.1, 1, 10, math.Inf(1)} {
		for _, Fo := range []float64{0.01, 0.05, 0.2, 1} {
			d, dt := 1e-3*math.Sqrt(Fo), 1e-3*Fo
			for _, x := range []float64{0, 0.3, 0.7, 0.95} {
				dFo := (PlaneWall(Bi, Fo+dt, x) - PlaneWall(Bi, Fo-dt, x)) / (2 * dt)
				dxx := (PlaneWall(Bi, Fo, x+d) - 2*PlaneWall(Bi, Fo, x) + PlaneWall(Bi, Fo, x-d)) / (d * d)
				if math.Abs(dFo-dxx) > 1e-5*max(1, math.Abs(dFo)) {
					t.Errorf("Bi = %g, Fo = %g, x* = %g: ∂θ/∂Fo = %.8g but ∂²θ/∂x*² = %.8g", Bi, Fo, x, dFo, dxx)
				}
			}
			if math.IsInf(Bi, 1) {
				if th := PlaneWall(Bi, Fo, 1); math.Abs(th) > 1e-12 {
					t.Errorf("Bi = ∞, Fo = %g: θ(1) = %g, want 0", Fo, th)
				}
				continue
			}
			// One-sided second-order difference at the face.
			dx := (3*PlaneWall(Bi, Fo, 1) - 4*PlaneWall(Bi, Fo, 1-d) + PlaneWall(Bi, Fo, 1-2*d)) / (2 * d)
			if want := -Bi * PlaneWall(Bi, Fo, 1); math.Abs(dx-want) > 1e-6*max(1, math.Abs(want)) {
				t.Errorf("Bi = %g, Fo = %g: ∂θ/∂x*(1) = %.8g, want −Bi θ(1) = %.8g", Bi, Fo, dx, want)
			}
			dm := (PlaneWallMean(Bi, Fo+dt) - PlaneWallMean(Bi, Fo-dt)) / (2 * dt)
			if want := -Bi * PlaneWall(Bi, Fo, 1); math.Abs(dm-want) > 1e-6*max(1, math.Abs(want)) {
				t.Errorf("Bi = %g, Fo = %g: dθ̄/dFo = %.8g, want −Bi θ(1) = %.8g", Bi, Fo, dm, want)
			}
			// The mean is the integral of the profile (Simpson, 200 panels,
			// error ~ h⁴·max|θ''''| ≪ 1e-9).
			const n = 200
			s := PlaneWall(Bi, Fo, 0) + PlaneWall(Bi, Fo, 1)
			for i := 1; i < n; i++ {
				w := 2.0
				if i%2 == 1 {
					w = 4
				}
				s += w * PlaneWall(Bi, Fo, float64(i)/n)
			}
			if got, want := s/(3*n), PlaneWallMean(Bi, Fo); math.Abs(got-want) > 1e-9 {
				t.Errorf("Bi = %g, Fo = %g: ∫θ dx* = %.12f, PlaneWallMean = %.12f", Bi, Fo, got, want)
			}
		}
	}
	// Initial condition: at small Fo the interior is still at θ = 1.
	if th := PlaneWall(10, 1e-4, 0.5); math.Abs(th-1) > 1e-12 {
		t.Errorf("PlaneWall(10, 1e-4, 0.5) = %.15f, want 1", th)
	}
	if PlaneWall(3, 0, 0.2) != 1 || PlaneWall(0, 5, 1) != 1 {
		t.Errorf("Fo = 0 or Bi = 0 must give θ* = 1")
	}
}

// TestPlaneWallEarlyIsSemiInfinite: at small Fo the face region of the wall
// behaves as a semi-infinite solid, so two independent closed forms must
// agree (the far face is 2 − (1−x*) ≥ 1.9 L away, beyond 60 √Fo).
func TestPlaneWallEarlyIsSemiInfinite(t *testing.T) {
	const Fo = 1e-3 // with L = k = α = 1: t = Fo, h = Bi
	for _, Bi := range []float64{0.5, 5, 50, math.Inf(1)} {
		for _, x := range []float64{1, 0.99, 0.95, 0.9} {
			wall := PlaneWall(Bi, Fo, x)
			semi := 1 - SemiInfiniteConvection(1-x, Fo, 1, Bi, 1)
			if math.Abs(wall-semi) > 1e-11 {
				t.Errorf("Bi = %g, x* = %g: plane wall %.14f, semi-infinite %.14f", Bi, x, wall, semi)
			}
		}
	}
}

func TestSemiInfiniteStepErf(t *testing.T) {
	// Source: Holman, Heat Transfer, Table A-1 (confirmed).
	// Tolerance: one unit in the last printed place, because the table
	// truncates rather than rounds (erf 1.5 = 0.9661051 is printed 0.96610).
	for _, tc := range []struct {
		eta, want, tol float64
	}{
		{0.5, 0.52050, 1e-5},
		{1.0, 0.84270, 1e-5},
		{1.5, 0.96610, 1e-5},
		{2.0, 0.995322, 1e-6},
	} {
		// x = 2η√(αt) with α = 1e-6 m²/s, t = 100 s.
		alpha, tt := 1e-6, 100.0
		x := 2 * tc.eta * math.Sqrt(alpha*tt)
		if got := SemiInfiniteStep(x, tt, alpha); math.Abs(got-tc.want) > tc.tol {
			t.Errorf("η = %g: θ = %.7f, want erf = %v", tc.eta, got, tc.want)
		}
	}
	if SemiInfiniteStep(0, 10, 1) != 0 || SemiInfiniteStep(1, 0, 1) != 1 {
		t.Errorf("surface must be at θ = 0 and t = 0 at θ = 1")
	}
}

func TestSemiInfiniteConvection(t *testing.T) {
	// Source: Nellis & Klein, Heat Transfer (2009), Table 3-2 worked example
	// (confirmed): T = 389.5 K; closed form 389.543 K.
	const Ti, Tinf = 393.0, 355.0
	th := SemiInfiniteConvection(3e-3, 100, 4.029e-6, 50, 10)
	T := Ti + th*(Tinf-Ti)
	t.Logf("Nellis & Klein example: T = %.4f K", T)
	if math.Abs(T-389.5) > 0.05 {
		t.Errorf("T = %.4f K, want 389.5 K (published)", T)
	}
	if math.Abs(T-389.543) > 0.5e-3 {
		t.Errorf("T = %.4f K, want 389.543 K (closed form)", T)
	}

	// Source: analytic limit h → ∞ is the fixed-surface (erf) solution.
	for _, x := range []float64{0, 1e-3, 5e-3} {
		got := SemiInfiniteConvection(x, 50, 1e-6, 1e12, 1)
		want := 1 - SemiInfiniteStep(x, 50, 1e-6)
		if math.Abs(got-want) > 1e-9 {
			t.Errorf("h → ∞, x = %g: %.12f, want erfc = %.12f", x, got, want)
		}
	}
	if got := SemiInfiniteConvection(0, 50, 1e-6, math.Inf(1), 1); got != 1 {
		t.Errorf("h = ∞ at the surface: %v, want 1", got)
	}

	// Large arguments, where exp(hx/k + h²αt/k²) overflows: the result must
	// stay finite, in [0, 1], and decrease with depth.
	prev := 2.0
	for _, x := range []float64{0, 0.01, 0.1, 1, 10} {
		got := SemiInfiniteConvection(x, 1e6, 1e-4, 1e4, 1)
		if !(got >= 0 && got <= 1) || got > prev {
			t.Errorf("large arguments, x = %g: θ = %v (previous depth %v)", x, got, prev)
		}
		prev = got
	}

	// Surface energy balance, an identity: the heat taken in up to t,
	// ρc(T∞ − Ti)·∫θ dx, equals ∫ h(T∞ − T_s) dt. Simpson in x to
	// 0.3 m = 15√(αt) (20 000 panels) and in s = √t (2000 panels; the face
	// temperature goes as √t near t = 0, smooth in s).
	const alpha, h, k, tEnd = 1e-6, 200.0, 1.0, 400.0
	const nx, L = 20000, 0.3
	in := 0.0
	for i := 0; i <= nx; i++ {
		w := 2.0
		switch {
		case i == 0 || i == nx:
			w = 1
		case i%2 == 1:
			w = 4
		}
		in += w * SemiInfiniteConvection(L*float64(i)/nx, tEnd, alpha, h, k)
	}
	in *= L / nx / 3 / alpha * k // ρc = k/α
	const ns = 2000
	sEnd := math.Sqrt(tEnd)
	out := 0.0
	for i := 0; i <= ns; i++ {
		w := 2.0
		switch {
		case i == 0 || i == ns:
			w = 1
		case i%2 == 1:
			w = 4
		}
		s := sEnd * float64(i) / ns
		out += w * 2 * s * h * (1 - SemiInfiniteConvection(0, s*s, alpha, h, k))
	}
	out *= sEnd / ns / 3
	if math.Abs(in-out) > 1e-8*out {
		t.Errorf("energy stored %.9g J/m² per K of ΔT, through the face %.9g", in, out)
	}
}

func TestErfcx(t *testing.T) {
	// Both branches agree where both are valid (the direct product keeps
	// about z²·ε relative accuracy).
	for _, z := range []float64{20, 22, 24, 25.9, 26, 26.5} {
		direct := math.Exp(z*z) * math.Erfc(z)
		asym := erfcxAsymptotic(z)
		if math.Abs(direct-asym) > 2e-13*asym {
			t.Errorf("z = %g: direct %.16g, asymptotic %.16g", z, direct, asym)
		}
	}
	// Source: analytic, erfcx(z) → 1/(z√π) as z → ∞.
	if got, want := erfcx(1e8), 1/(1e8*math.SqrtPi); math.Abs(got-want) > 1e-15*want {
		t.Errorf("erfcx(1e8) = %v, want %v", got, want)
	}
}

func TestNthOrderCure(t *testing.T) {
	const k = 2e-3
	for _, tc := range []struct {
		n    float64
		want func(t float64) float64
	}{
		// Source: analytic, n = 0: α = kt until full cure.
		{0, func(t float64) float64 { return min(1, k*t) }},
		// Source: analytic, n = 1: α = 1 − e^{−kt}.
		{1, func(t float64) float64 { return 1 - math.Exp(-k*t) }},
		// Source: analytic, n = 2: α = kt/(1 + kt).
		{2, func(t float64) float64 { return k * t / (1 + k*t) }},
		// Source: analytic, n = ½: α = 1 − (1 − kt/2)², complete at t = 2/k.
		{0.5, func(t float64) float64 { return 1 - math.Pow(max(0, 1-k*t/2), 2) }},
	} {
		for _, tt := range []float64{0, 10, 300, 999, 1000, 1500} {
			if got, want := NthOrderCure(k, tc.n, tt), tc.want(tt); math.Abs(got-want) > 1e-14 {
				t.Errorf("n = %g, t = %g: α = %.16f, want %.16f", tc.n, tt, got, want)
			}
		}
	}
	// The ODE dα/dt = k(1−α)^n, by central differences, for general n, and
	// continuity at n = 1.
	for _, n := range []float64{0.3, 1.5, 2.7} {
		for _, tt := range []float64{50, 200, 600} {
			d := 1e-2
			rate := (NthOrderCure(k, n, tt+d) - NthOrderCure(k, n, tt-d)) / (2 * d)
			want := k * math.Pow(1-NthOrderCure(k, n, tt), n)
			if math.Abs(rate-want) > 1e-8*want {
				t.Errorf("n = %g, t = %g: dα/dt = %.10g, want k(1−α)^n = %.10g", n, tt, rate, want)
			}
		}
	}
	if a, b := NthOrderCure(k, 1+1e-9, 400), NthOrderCure(k, 1, 400); math.Abs(a-b) > 1e-9 {
		t.Errorf("n → 1: %.15f vs %.15f", a, b)
	}
}

func TestLogisticCure(t *testing.T) {
	// Source: analytic; from α0 = ½ the logistic reaches ¾ at kt = ln 3.
	if got := LogisticCure(0.01, 0.5, math.Log(3)/0.01); math.Abs(got-0.75) > 1e-15 {
		t.Errorf("α(ln 3/k) = %v, want 0.75", got)
	}
	const k = 0.01
	for _, a0 := range []float64{1e-6, 0.01, 0.3} {
		for _, tt := range []float64{0, 100, 1000, 3000} {
			d := 1e-2
			a := LogisticCure(k, a0, tt)
			if tt == 0 && a != a0 {
				t.Errorf("α(0) = %v, want %v", a, a0)
			}
			if tt == 0 {
				continue
			}
			rate := (LogisticCure(k, a0, tt+d) - LogisticCure(k, a0, tt-d)) / (2 * d)
			want := k * a * (1 - a)
			// Round-off of the difference: ε/(2d) ≈ 1e-14.
			if math.Abs(rate-want) > 1e-8*want+1e-14 {
				t.Errorf("α0 = %g, t = %g: dα/dt = %.10g, want kα(1−α) = %.10g", a0, tt, rate, want)
			}
		}
	}
	if LogisticCure(1, 0, 100) != 0 || LogisticCure(1, 0.5, 1e6) != 1 {
		t.Errorf("α0 = 0 must stay 0; long times must reach 1")
	}
}

func TestFrankKamenetskii(t *testing.T) {
	dc, thc := FrankKamenetskiiSlabCritical()
	t.Logf("δc = %.9f, θm,c = %.9f", dc, thc)
	// Source: Frank-Kamenetskii (1969); 0.88 confirmed in Boddington, Gray &
	// Wake, Proc. R. Soc. A (1977), abstract; 0.8785 to four decimals,
	// exact 0.8784577 (verified).
	if math.Abs(dc-0.8785) > 0.5e-4 || math.Abs(dc-0.8784577) > 0.5e-7 {
		t.Errorf("δc = %.9f, want 0.8785 (exact 0.8784577)", dc)
	}
	// Source: Frank-Kamenetskii, Diffusion and Heat Exchange in Chemical Kinetics, 1969; θm,c = 1.1868 (slab).
	if math.Abs(thc-1.1868) > 0.5e-4 {
		t.Errorf("θm,c = %.9f, want 1.1868", thc)
	}
	for _, tc := range []struct{ delta, want float64 }{
		// Source: lower-branch centre values derived from
		// the exact solution.
		{0.1, 0.052224},
		{0.5, 0.328952},
		{0.8, 0.746459},
	} {
		got, ok := FrankKamenetskiiSlab(tc.delta)
		if !ok || math.Abs(got-tc.want) > 0.5e-6 {
			t.Errorf("δ = %g: θ(0) = %.8f (ok %v), want %.6f", tc.delta, got, ok, tc.want)
		}
	}
	// Identity: the returned centre value solves δ = 2τ²/cosh²τ with
	// θm = 2 ln cosh τ, for δ down to 1e-12 (where θm ≈ δ/2).
	for _, delta := range []float64{1e-12, 1e-6, 0.01, 0.3, 0.87, dc * (1 - 1e-9)} {
		th, ok := FrankKamenetskiiSlab(delta)
		// cosh τ = e^{θ/2}, i.e. 2 sinh²(τ/2) = e^{θ/2} − 1.
		tau := 2 * math.Asinh(math.Sqrt(math.Expm1(th/2)/2))
		back := 2 * tau * tau * math.Exp(-th)
		if !ok || math.Abs(back-delta) > 1e-9*delta {
			t.Errorf("δ = %g: θ(0) = %g gives back δ = %g", delta, th, back)
		}
	}
	if _, ok := FrankKamenetskiiSlab(0.879); ok {
		t.Errorf("δ = 0.879 > δc must have no steady state")
	}
}

func TestPanics(t *testing.T) {
	for i, f := range []func(){
		func() { PlaneWallEigen(-1, 3) },
		func() { PlaneWallEigen(1, -1) },
		func() { PlaneWall(1, -0.1, 0) },
		func() { PlaneWall(1, 0.1, 1.5) },
		func() { PlaneWall(math.NaN(), 0.1, 0) },
		func() { SemiInfiniteStep(-1, 1, 1) },
		func() { SemiInfiniteConvection(0, 1, 0, 1, 1) },
		func() { NthOrderCure(1, -1, 1) },
		func() { LogisticCure(1, 1.5, 1) },
		func() { FrankKamenetskiiSlab(-1) },
	} {
		t.Run(fmt.Sprint(i), func(t *testing.T) {
			defer func() {
				if recover() == nil {
					t.Errorf("no panic")
				}
			}()
			f()
		})
	}
}
