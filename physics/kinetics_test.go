package physics

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/integrate/quad"
)

// Invented resins for the tests (not any real product).
var (
	testNth  = NthOrder{A: 1e5, E: 60e3, N: 1.5}
	testAuto = Autocatalytic{A1: 2e4, E1: 62e3, A2: 6e5, E2: 58e3, M: 0.45, N: 1.6}
	testDiff = Diffusion{C: 30, Alpha0: -1.1, AlphaT: 0.0052}
)

func relErr(got, want float64) float64 {
	if got == want {
		return 0
	}
	return math.Abs(got-want) / math.Max(math.Abs(want), 1e-300)
}

func TestArrhenius(t *testing.T) {
	// Source: analytic, k = A exp(−E/(R T)) with R = 8.314462618 J/(mol K)
	// (CODATA 2018), evaluated independently in Python (math.exp).
	const wantK, wantDkdT = 0.0014620323483993565, 6.594077763520456e-05
	k, dk := Arrhenius(1e5, 60e3, 400)
	if relErr(k, wantK) > 1e-14 || relErr(dk, wantDkdT) > 1e-14 {
		t.Errorf("Arrhenius(1e5, 60e3, 400) = %v, %v; want %v, %v", k, dk, wantK, wantDkdT)
	}
	// Source: analytic identity k(T2)/k(T1) = exp(E/R (1/T1 − 1/T2)).
	k1, _ := Arrhenius(3e7, 75e3, 350)
	k2, _ := Arrhenius(3e7, 75e3, 420)
	if want := math.Exp(75e3 / GasConstant * (1.0/350 - 1.0/420)); relErr(k2/k1, want) > 1e-12 {
		t.Errorf("k(420)/k(350) = %v, want %v", k2/k1, want)
	}
}

// checkRateDerivs compares the analytic partial derivatives of rate against
// gonum central differences at a grid of (T, α).
func checkRateDerivs(t *testing.T, name string, rate func(T, a float64) (float64, float64, float64)) {
	t.Helper()
	central := &fd.Settings{Formula: fd.Central}
	for _, T := range []float64{300, 360, 420, 480} {
		for _, a := range []float64{0.05, 0.3, 0.6, 0.9, 0.99} {
			_, drdT, drda := rate(T, a)
			central.Step = 1e-3
			numT := fd.Derivative(func(x float64) float64 { r, _, _ := rate(x, a); return r }, T, central)
			central.Step = 1e-6
			numA := fd.Derivative(func(x float64) float64 { r, _, _ := rate(T, x); return r }, a, central)
			// Source: central differences (gonum diff/fd), truncation error
			// O(h²) far below the 1e-6 relative tolerance at these steps.
			if math.Abs(drdT-numT) > 1e-6*math.Abs(numT)+1e-300 {
				t.Errorf("%s: drdT(%g, %g) = %v, finite difference %v", name, T, a, drdT, numT)
			}
			if math.Abs(drda-numA) > 1e-6*math.Abs(numA)+1e-300 {
				t.Errorf("%s: drda(%g, %g) = %v, finite difference %v", name, T, a, drda, numA)
			}
		}
	}
}

func TestRateDerivatives(t *testing.T) {
	checkRateDerivs(t, "nth-order n=1.5", testNth.Rate)
	checkRateDerivs(t, "nth-order n=0.5", NthOrder{A: 1e5, E: 60e3, N: 0.5}.Rate)
	checkRateDerivs(t, "autocatalytic m=0.45 n=1.6", testAuto.Rate)
	checkRateDerivs(t, "autocatalytic m=1.3 n=0.7", Autocatalytic{A1: 50, E1: 55e3, A2: 3e6, E2: 60e3, M: 1.3, N: 0.7}.Rate)
	for _, m := range []Kinetics{testNth, testAuto} {
		c := &Cure{Model: m, Diffusion: &testDiff}
		checkRateDerivs(t, m.Name()+" with diffusion", c.Rate)
	}
	d := testDiff
	central := &fd.Settings{Formula: fd.Central}
	for _, T := range []float64{350, 400, 450} {
		for _, a := range []float64{0.2, 0.7, 0.95} {
			_, fT, fa := d.Factor(T, a)
			central.Step = 1e-3
			numT := fd.Derivative(func(x float64) float64 { f, _, _ := d.Factor(x, a); return f }, T, central)
			central.Step = 1e-5
			numA := fd.Derivative(func(x float64) float64 { f, _, _ := d.Factor(T, x); return f }, a, central)
			// Source: central differences (gonum diff/fd). f ≤ 1, so the
			// differences carry a round-off of about 2ε/h; C²h²/6 < 1e-7 is
			// the relative truncation error.
			if math.Abs(fT-numT) > 1e-6*math.Abs(numT)+4e-16/1e-3 || math.Abs(fa-numA) > 1e-6*math.Abs(numA)+4e-16/1e-5 {
				t.Errorf("Diffusion.Factor(%g, %g) derivatives %v, %v; finite differences %v, %v", T, a, fT, fa, numT, numA)
			}
		}
	}
}

func TestDiffusionFactorValues(t *testing.T) {
	d := Diffusion{C: 30, Alpha0: 0.5, AlphaT: 0}
	// Source: Chern & Poehlein, Polym. Eng. Sci. 27:788 (1987) (from memory):
	// f_d = 1/(1 + exp(C(α − αc))) is exactly 1/2 at α = αc.
	if f, _, _ := d.Factor(400, 0.5); f != 0.5 {
		t.Errorf("Factor at α = αc = %v, want 0.5", f)
	}
	// Source: analytic, 1/(1 + e^{30·0.1}) = 1/(1 + e³).
	if f, _, _ := d.Factor(400, 0.6); relErr(f, 1/(1+math.Exp(3))) > 1e-15 {
		t.Errorf("Factor at α = αc + 0.1 = %v, want %v", f, 1/(1+math.Exp(3)))
	}
	if f, fT, fa := d.Factor(400, 100); f != 0 || fT != 0 || fa != 0 {
		t.Errorf("Factor far past αc = %v, %v, %v; want 0, 0, 0", f, fT, fa)
	}
}

func TestRateZeroAtFullCure(t *testing.T) {
	// Source: README Case file reference, [materials.NAME.cure] — every rate is zero at α = 1, including n = 0.
	models := []Kinetics{
		testNth,
		NthOrder{A: 1e5, E: 60e3, N: 0},
		NthOrder{A: 1e5, E: 60e3, N: 0.5},
		NthOrder{A: 1e5, E: 60e3, N: 1},
		testAuto,
		Autocatalytic{A1: 2e4, E1: 62e3, A2: 6e5, E2: 58e3, M: 0.45, N: 0},
		Autocatalytic{A1: 0, E1: 62e3, A2: 6e5, E2: 58e3, M: 0, N: 0},
	}
	for _, m := range models {
		for _, c := range []*Cure{{Model: m}, {Model: m, Diffusion: &testDiff}} {
			for _, a := range []float64{1, 1.2} {
				if r, rT, ra := c.Rate(400, a); r != 0 || rT != 0 || ra != 0 {
					t.Errorf("%s %+v (diffusion %v): Rate(400, %g) = %v, %v, %v; want zeros", m.Name(), m, c.Diffusion != nil, a, r, rT, ra)
				}
			}
		}
	}
	// n = 0 reacts at full speed just below full cure (zero order).
	k, _ := Arrhenius(1e5, 60e3, 400)
	if r, _, _ := (NthOrder{A: 1e5, E: 60e3, N: 0}).Rate(400, 0.999); relErr(r, k) > 1e-15 {
		t.Errorf("zero order rate at α = 0.999 = %v, want k = %v", r, k)
	}
}

func TestNames(t *testing.T) {
	// Source: README Case file reference, [materials.NAME.cure], the model names.
	if testNth.Name() != "nth-order" || testAuto.Name() != "autocatalytic" {
		t.Errorf("names %q, %q", testNth.Name(), testAuto.Name())
	}
}

func TestDiBenedetto(t *testing.T) {
	// Invented resin: Tg0 = −33.15 °C, Tg∞ = 149.85 °C, λ = 0.42.
	d := DiBenedetto{Tg0: 240, TgFull: 423, Lambda: 0.42}
	// Source: Pascault & Williams, J. Polym. Sci. B 28:85 (1990) (formula from
	// memory): Tg(0) = Tg0 and Tg(1) = Tg∞ for any λ.
	if got := d.Tg(0); got != 240 {
		t.Errorf("Tg(0) = %v, want 240", got)
	}
	if got := d.Tg(1); math.Abs(got-423) > 1e-12 {
		t.Errorf("Tg(1) = %v, want 423", got)
	}
	// Source: Pascault & Williams (1990), formula from memory, evaluated by
	// hand: 240 + 183·(0.42·0.5)/(1 − 0.58·0.5) = 240 + 183·0.21/0.71.
	if got, want := d.Tg(0.5), 294.1267605633803; math.Abs(got-want) > 1e-10 {
		t.Errorf("Tg(0.5) = %v, want %v", got, want)
	}
	// Source: inverse of the DiBenedetto relation in the Pascault–Williams form (Pascault & Williams, J. Polym. Sci. B 28:85, 1990; from memory), α = (Tg − Tg0)/[λ(Tg∞ − Tg) + (Tg − Tg0)].
	for _, a := range []float64{0, 0.1, 0.35, 0.5, 0.8, 0.97, 1} {
		if got := d.CureAt(d.Tg(a)); math.Abs(got-a) > 1e-13 {
			t.Errorf("CureAt(Tg(%g)) = %v", a, got)
		}
	}
	if d.CureAt(200) != 0 || d.CureAt(500) != 1 {
		t.Errorf("CureAt outside [Tg0, Tg∞] = %v, %v; want 0, 1", d.CureAt(200), d.CureAt(500))
	}
	// λ = 1 is the linear rule.
	lin := DiBenedetto{Tg0: 240, TgFull: 423, Lambda: 1}
	if got := lin.Tg(0.25); math.Abs(got-(240+183*0.25)) > 1e-12 {
		t.Errorf("λ = 1: Tg(0.25) = %v, want %v", got, 240+183*0.25)
	}
}

func TestDefaultGelPoint(t *testing.T) {
	// Source: Flory, Principles of Polymer Chemistry (1953) ch. IX; Stockmayer,
	// J. Chem. Phys. 11:45 (1943) (from memory): p_c = 1/√((fA−1)(fB−1)),
	// fA = 2, fB = 4 → 1/√3 = 0.5773502691896258.
	if math.Abs(DefaultGelPoint-0.5773502691896258) > 1e-16 {
		t.Errorf("DefaultGelPoint = %v", DefaultGelPoint)
	}
}

func TestHeatPerMass(t *testing.T) {
	c := Cure{TotalHeat: 420e3, ResinFraction: 0.6}
	// Source: README Case file reference, [materials.NAME.cure], heat per mass of material = resin_fraction · total_heat.
	if got := c.HeatPerMass(); math.Abs(got-252e3) > 1e-9 {
		t.Errorf("HeatPerMass = %v, want 252000", got)
	}
}

// nthTime is the closed-form isothermal time of the n-th order law from a0 to a
// (analytic: separation of variables).
func nthTime(k, n, a0, a float64) float64 {
	if n == 1 {
		return (math.Log(1-a0) - math.Log(1-a)) / k
	}
	return (math.Pow(1-a0, 1-n) - math.Pow(1-a, 1-n)) / ((1 - n) * k)
}

// nthCure is the closed form α(t) of the n-th order law from α0 = 0:
// α = 1 − [1 − (1 − n)kt]^{1/(1−n)}, α = 1 − e^{−kt} for n = 1.
func nthCure(k, n, t float64) float64 {
	if n == 1 {
		return -math.Expm1(-k * t)
	}
	b := 1 - (1-n)*k*t
	if b <= 0 {
		return 1
	}
	return 1 - math.Pow(b, 1/(1-n))
}

func TestIsothermalNthOrder(t *testing.T) {
	const T = 400
	for _, n := range []float64{0, 0.5, 1, 1.5, 2.2} {
		m := NthOrder{A: 1e5, E: 60e3, N: n}
		c := &Cure{Model: m}
		k, _ := Arrhenius(m.A, m.E, T)
		for _, a0 := range []float64{0, 0.2} {
			for _, target := range []float64{0.1, 0.5, 0.9, 0.999, 1 - 1e-9} {
				if target <= a0 {
					continue
				}
				got := c.IsothermalTime(T, a0, target)
				// Source: n-th order closed form (analytic).
				want := nthTime(k, n, a0, target)
				if want > MaxIsothermalTime {
					// Documented: longer than MaxIsothermalTime is never.
					if !math.IsInf(got, 1) {
						t.Errorf("n=%g: IsothermalTime(%g → %g) = %v, want +Inf (closed form %v s)", n, a0, target, got, want)
					}
					continue
				}
				// Documented accuracy: 1e-12, plus the resolution of α near
				// full cure, 1e-16/(1 − target).
				if relErr(got, want) > 1e-12+1e-16/(1-target) {
					t.Errorf("n=%g: IsothermalTime(%g → %g) = %v, want %v (rel err %.2g)", n, a0, target, got, want, relErr(got, want))
				}
			}
		}
		for _, kt := range []float64{0.01, 0.3, 1, 1.9, 5, 30} {
			got := c.IsothermalCure(T, 0, kt/k)
			// Source: n-th order closed form, α = 1 − [1 − (1−n)kt]^{1/(1−n)}; 1 − e^{−kt} for n = 1 (analytic).
			want := nthCure(k, n, kt/k)
			if math.Abs(got-want) > 1e-10 {
				t.Errorf("n=%g: IsothermalCure(kt = %g) = %.15g, want %.15g", n, kt, got, want)
			}
		}
	}
}

func TestIsothermalFullCure(t *testing.T) {
	const T = 400
	tests := []struct {
		n    float64
		want func(k float64) float64
	}{
		// Source: n-th order closed form at α = 1: t = 1/((1 − n) k) for n < 1 (analytic).
		{0, func(k float64) float64 { return 1 / k }},
		{0.5, func(k float64) float64 { return 2 / k }},
		{0.8, func(k float64) float64 { return 5 / k }},
		// Source: analytic, the integral of dα/(1 − α)^n diverges at α = 1 for n ≥ 1.
		{1, func(float64) float64 { return math.Inf(1) }},
		{1.5, func(float64) float64 { return math.Inf(1) }},
	}
	for _, tc := range tests {
		m := NthOrder{A: 1e5, E: 60e3, N: tc.n}
		k, _ := Arrhenius(m.A, m.E, T)
		c := &Cure{Model: m}
		got, want := c.IsothermalTime(T, 0, 1), tc.want(k)
		if math.IsInf(want, 1) != math.IsInf(got, 1) || (!math.IsInf(want, 1) && relErr(got, want) > 1e-12) {
			t.Errorf("n=%g: time to full cure %v, want %v", tc.n, got, want)
		}
		if !math.IsInf(want, 1) {
			if a := c.IsothermalCure(T, 0, 1.01*want); a != 1 {
				t.Errorf("n=%g: cure after the time to full cure = %v, want 1", tc.n, a)
			}
		}
	}
}

func TestIsothermalLogistic(t *testing.T) {
	// Autocatalytic with k1 = 0, m = n = 1: dα/dt = k α (1 − α).
	m := Autocatalytic{A1: 0, E1: 50e3, A2: 2e6, E2: 65e3, M: 1, N: 1}
	c := &Cure{Model: m}
	const T = 420
	k, _ := Arrhenius(m.A2, m.E2, T)
	for _, a0 := range []float64{1e-6, 0.01, 0.3} {
		for _, a := range []float64{0.05, 0.5, 0.9, 0.99999} {
			if a <= a0 {
				continue
			}
			// Source: logistic solution of the Kamal–Sourour law with k1 = 0, m = n = 1,
			// α = α0 e^{kt}/(1 − α0 + α0 e^{kt}), inverted: t = ln[α(1−α0)/(α0(1−α))]/k (analytic).
			want := math.Log(a*(1-a0)/(a0*(1-a))) / k
			if got := c.IsothermalTime(T, a0, a); relErr(got, want) > 1e-12+1e-16/(1-a) {
				t.Errorf("IsothermalTime(%g → %g) = %v, want %v", a0, a, got, want)
			}
		}
		for _, kt := range []float64{0.5, 3, 10, 25} {
			e := math.Exp(kt)
			// Source: logistic solution of the Kamal–Sourour law with k1 = 0, m = n = 1 (analytic).
			want := a0 * e / (1 - a0 + a0*e)
			if got := c.IsothermalCure(T, a0, kt/k); math.Abs(got-want) > 1e-10 {
				t.Errorf("IsothermalCure(a0 = %g, kt = %g) = %.15g, want %.15g", a0, kt, got, want)
			}
		}
	}
	// Source: analytic — α = 0 is a fixed point when k1 = 0.
	if got := c.IsothermalTime(T, 0, 0.5); !math.IsInf(got, 1) {
		t.Errorf("k1 = 0 from α = 0: time %v, want +Inf", got)
	}
	if got := c.IsothermalCure(T, 0, 1e6); got != 0 {
		t.Errorf("k1 = 0 from α = 0: cure %v, want 0", got)
	}
	// Source: analytic — with n = 1 full cure is approached only exponentially.
	if got := c.IsothermalTime(T, 0.01, 1); !math.IsInf(got, 1) {
		t.Errorf("time to full cure with n = 1: %v, want +Inf", got)
	}
}

// legendreTime is an independent reference for ∫ dα/r: gonum's fixed
// Gauss–Legendre rule with many nodes, accurate for a smooth integrand.
func legendreTime(c *Cure, T, a, b float64) float64 {
	f := func(x float64) float64 { r, _, _ := c.Rate(T, x); return 1 / r }
	return quad.Fixed(f, a, b, 4000, quad.Legendre{}, 0)
}

func TestIsothermalAgainstGaussLegendre(t *testing.T) {
	cases := []struct {
		c       *Cure
		T, a, b float64
	}{
		{&Cure{Model: testNth, Diffusion: &testDiff}, 400, 0, 0.95},
		{&Cure{Model: testAuto}, 380, 0.02, 0.9},
		{&Cure{Model: testAuto, Diffusion: &testDiff}, 380, 0.02, 0.9},
		{&Cure{Model: testAuto, Diffusion: &testDiff}, 420, 0.1, 0.99},
	}
	for _, tc := range cases {
		got := tc.c.IsothermalTime(tc.T, tc.a, tc.b)
		// Source: gonum integrate/quad.Fixed, 4000-point Gauss–Legendre rule
		// (reference library) on the same smooth integrand 1/r.
		want := legendreTime(tc.c, tc.T, tc.a, tc.b)
		if relErr(got, want) > 1e-12 {
			t.Errorf("%s diffusion=%v T=%g: time %g → %g = %v, Gauss–Legendre %v", tc.c.Model.Name(), tc.c.Diffusion != nil, tc.T, tc.a, tc.b, got, want)
		}
		// Identity: IsothermalCure inverts IsothermalTime.
		if a := tc.c.IsothermalCure(tc.T, tc.a, got); math.Abs(a-tc.b) > 1e-10 {
			t.Errorf("%s: IsothermalCure after %v s = %v, want %v", tc.c.Model.Name(), got, a, tc.b)
		}
	}
}

func TestIsothermalFullCureAgainstGaussLegendre(t *testing.T) {
	// n < 1 with other factors of r that vary near α = 1 (autocatalytic term,
	// diffusion factor): the time to full cure is finite but has no closed
	// form. With α = 1 − u², dα/r = 2u du/r(1 − u²) is smooth for n = 0.5,
	// so gonum's Gauss–Legendre rule on u in [0, 1] is an independent reference.
	cases := []*Cure{
		{Model: NthOrder{A: 1e5, E: 60e3, N: 0.5}, Diffusion: &Diffusion{C: 20, Alpha0: 0.8}},
		{Model: Autocatalytic{A1: 50, E1: 55e3, A2: 3e6, E2: 60e3, M: 1.3, N: 0.5}},
	}
	const T = 400
	for _, c := range cases {
		f := func(u float64) float64 { r, _, _ := c.Rate(T, 1-u*u); return 2 * u / r }
		// Source: gonum integrate/quad.Fixed, 2000-point Gauss–Legendre rule
		// (reference library), on u in [0, √0.9], i.e. α from 0.1 to 1.
		want := quad.Fixed(f, 0, math.Sqrt(0.9), 2000, quad.Legendre{}, 0)
		got := c.IsothermalTime(T, 0.1, 1)
		// Documented: the closed-form end piece adds a relative error of
		// about 1e-8 × the logarithmic slope (≤ C = 20 here) of the other factors.
		if relErr(got, want) > 2e-7 {
			t.Errorf("%s: time to full cure %v, Gauss–Legendre %v (rel err %.2g)", c.Model.Name(), got, want, relErr(got, want))
		}
	}
}

func TestIsothermalCureMatchesRK4(t *testing.T) {
	// The demo-like autocatalytic resin (k1 > 0) with a diffusion factor has
	// no closed form: compare with classical RK4 (an independent method),
	// started at α0 = 0.05 where the rate is smooth (α^0.45 spoils RK4's
	// order at α = 0). Its own error is bounded by comparing steps h and h/2.
	c := &Cure{Model: testAuto, Diffusion: &testDiff}
	const T, a0 = 400, 0.05
	f := func(a float64) float64 { r, _, _ := c.Rate(T, a); return r }
	rk4 := func(h, tEnd float64) float64 { return rk4Iso(f, a0, h, tEnd) }
	for _, tt := range []float64{200, 1000, 2000, 6000} {
		coarse, fine := rk4(0.5, tt), rk4(0.25, tt)
		if math.Abs(coarse-fine) > 1e-10 {
			t.Fatalf("RK4 reference not converged at %g s: %v vs %v", tt, coarse, fine)
		}
		if got := c.IsothermalCure(T, a0, tt); math.Abs(got-fine) > 1e-9 {
			t.Errorf("IsothermalCure(%g s) = %.12g, RK4 %.12g", tt, got, fine)
		}
	}
}

func TestIsothermalNever(t *testing.T) {
	k, _ := Arrhenius(1e5, 60e3, 400) // about 1.5e-3 1/s
	// Diffusion-limited: αc = 0.5, C = 60 → at α = 0.99 the factor is about
	// e^{−29.4} ≈ 1.7e-13, so the time far exceeds MaxIsothermalTime.
	c := &Cure{Model: NthOrder{A: 1e5, E: 60e3, N: 1}, Diffusion: &Diffusion{C: 60, Alpha0: 0.5}}
	if got := c.IsothermalTime(400, 0, 0.99); !math.IsInf(got, 1) {
		t.Errorf("diffusion-limited time = %v, want +Inf", got)
	}
	// Below αc the same resin reacts: the time must be finite and close to the
	// first-order time (the factor is ≈ 1 far below αc).
	// Source: n = 1 closed form (analytic), factor ≥ 1/(1+e^{−12}).
	if got, want := c.IsothermalTime(400, 0, 0.3), -math.Log(0.7)/k; relErr(got, want) > 1e-5 {
		t.Errorf("time below αc = %v, want about %v", got, want)
	}
	// The cure stalls near αc: after a very long time it is still below 0.8.
	if got := c.IsothermalCure(400, 0, 1e9); !(got > 0.5 && got < 0.8) {
		t.Errorf("cure after 1e9 s with diffusion = %v, want in (0.5, 0.8)", got)
	}
	// A factor that underflows (C(α − αc) > 700) is a rate of exactly zero.
	u := &Cure{Model: NthOrder{A: 1e5, E: 60e3, N: 1}, Diffusion: &Diffusion{C: 5000, Alpha0: 0.5}}
	if got := u.IsothermalTime(400, 0, 0.9); !math.IsInf(got, 1) {
		t.Errorf("underflowing diffusion factor: time %v, want +Inf", got)
	}
	// A temperature so low that the Arrhenius factor underflows.
	if got := c.IsothermalTime(1, 0, 0.1); !math.IsInf(got, 1) {
		t.Errorf("T = 1 K: time %v, want +Inf", got)
	}
}

func TestIsothermalSpecialCases(t *testing.T) {
	c := &Cure{Model: testNth}
	for _, tc := range []struct {
		name      string
		got, want float64
	}{
		{"target below start", c.IsothermalTime(400, 0.5, 0.3), 0},
		{"target equals start", c.IsothermalTime(400, 0.5, 0.5), 0},
		{"target above 1", c.IsothermalTime(400, 0, 1.5), math.Inf(1)},
		{"zero time", c.IsothermalCure(400, 0.3, 0), 0.3},
		{"negative time", c.IsothermalCure(400, 0.3, -5), 0.3},
		{"start at full cure", c.IsothermalCure(400, 1, 100), 1},
		{"negative start clamped", c.IsothermalCure(400, -0.5, 0), 0},
	} {
		if tc.got != tc.want {
			t.Errorf("%s: got %v, want %v", tc.name, tc.got, tc.want)
		}
	}
	for _, v := range []float64{c.IsothermalTime(math.NaN(), 0, 0.5), c.IsothermalTime(400, math.NaN(), 0.5),
		c.IsothermalTime(400, 0, math.NaN()), c.IsothermalCure(400, 0, math.NaN())} {
		if !math.IsNaN(v) {
			t.Errorf("NaN argument gave %v, want NaN", v)
		}
	}
}

func BenchmarkIsothermalTime(b *testing.B) {
	c := &Cure{Model: testAuto, Diffusion: &testDiff}
	for b.Loop() {
		c.IsothermalTime(400, 0, 0.9)
	}
}

func BenchmarkIsothermalCure(b *testing.B) {
	c := &Cure{Model: testAuto, Diffusion: &testDiff}
	for b.Loop() {
		c.IsothermalCure(400, 0, 3000)
	}
}

func TestCureAlongFirstOrder(t *testing.T) {
	// Source: analytic — for dα/dt = A e^{−E/RT(t)} (1 − α),
	// −ln(1 − α(t)) = ∫₀ᵗ A e^{−E/RT(τ)} dτ; the integral here by
	// Gauss–Legendre quadrature (gonum integrate/quad) on each linear piece
	// of the program. CureAlong's midpoint pieces of ≤ 0.25 K carry a
	// relative error of about (E·0.25 K/(R T²))²/24 ≤ 2.4e-5 at these
	// temperatures (E/(R T²) ≤ 0.096/K at 296 K), so the tolerance is 1e-4.
	c := &Cure{Model: NthOrder{A: 3e6, E: 70e3, N: 1}}
	prog, err := FromSegments(296.15, []Segment{{Rate: 2.0 / 60, To: 393.15}, {Hold: 3600}, {Rate: -3.0 / 60, To: 323.15}})
	if err != nil {
		t.Fatal(err)
	}
	bt, _ := prog.Points()
	k := func(tm float64) float64 { return 3e6 * math.Exp(-70e3/(GasConstant*prog.At(tm))) }
	for _, tm := range []float64{1500, bt[1], bt[1] + 1800, bt[2], bt[2] + 700, bt[3] + 1000} {
		integral, from := 0.0, 0.0
		for _, b := range append(append([]float64(nil), bt[1:]...), math.Inf(1)) {
			to := min(b, tm)
			if to > from {
				integral += quad.Fixed(k, from, to, 40, nil, 0)
			}
			from = to
		}
		want := -math.Expm1(-integral)
		got := c.CureAlong(&prog, 0, tm)
		if s := -math.Log1p(-got); math.Abs(s/integral-1) > 1e-4 {
			t.Errorf("t = %g s: α = %.8f, want %.8f (−ln(1−α) %.8g vs %.8g)", tm, got, want, s, integral)
		}
	}
	// A steady program is a single isothermal cure.
	steady := Steady(380)
	if a, b := c.CureAlong(&steady, 0.1, 900), c.IsothermalCure(380, 0.1, 900); a != b {
		t.Errorf("steady program: %v, IsothermalCure %v", a, b)
	}
	if a := c.CureAlong(&prog, 0.2, 0); a != 0.2 {
		t.Errorf("t = 0: %v, want the initial 0.2", a)
	}
}

func TestScheduleHottest(t *testing.T) {
	// Source: analytic — the programs below hold their largest value over
	// the stated interval.
	prog, err := FromSegments(296.15, []Segment{{Rate: 2.0 / 60, To: 393.15}, {Hold: 3600}, {Rate: -3.0 / 60, To: 323.15}})
	if err != nil {
		t.Fatal(err)
	}
	if v, from, to := prog.Hottest(); v != 393.15 || from != 2910 || to != 2910+3600 {
		t.Errorf("ramp-hold-cool: %v from %v to %v", v, from, to)
	}
	up, _ := FromSegments(296.15, []Segment{{Rate: 1.0 / 60, To: 353.15}})
	if v, from, to := up.Hottest(); v != 353.15 || from != 3420 || !math.IsInf(to, 1) {
		t.Errorf("ramp only: %v from %v to %v", v, from, to)
	}
	s := Steady(400)
	if v, from, to := s.Hottest(); v != 400 || !math.IsInf(from, -1) || !math.IsInf(to, 1) {
		t.Errorf("steady: %v from %v to %v", v, from, to)
	}
}
