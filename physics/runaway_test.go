package physics

import (
	"fmt"
	"math"
	"testing"
)

// shootFK is an independent check of the critical Frank-Kamenetskii
// parameter: it integrates θ″ = −δ e^θ on [0, 1] numerically (classical
// fourth-order Runge–Kutta, 400 steps) from face 0 and never uses the
// closed-form family of solutions.
//
// Face 0 has θ′(0) = bi0·θ(0) (θ(0) = 0 when bi0 = +Inf); the shooting
// parameter p is θ(0) (or θ′(0) for a held face). The miss at face 1 is
// r(p) = θ′(1) + bi1·θ(1) (θ(1) for a held face), positive between the two
// steady states and negative outside them, so a steady state exists at δ
// exactly when max_p r(p) ≥ 0. The maximum comes from a scan of p and a
// golden-section refinement; δ_c, the largest δ with a steady state (the
// turning point), comes from bisection on δ.
func shootFK(bi0, bi1 float64) float64 {
	const steps = 400
	miss := func(delta, p float64) float64 {
		th, d := p, bi0*p
		if math.IsInf(bi0, 1) {
			th, d = 0, p
		}
		h := 1.0 / steps
		f := func(th float64) float64 { return -delta * math.Exp(th) }
		for range steps {
			k1t, k1d := d, f(th)
			k2t, k2d := d+0.5*h*k1d, f(th+0.5*h*k1t)
			k3t, k3d := d+0.5*h*k2d, f(th+0.5*h*k2t)
			k4t, k4d := d+h*k3d, f(th+h*k3t)
			th += h / 6 * (k1t + 2*k2t + 2*k3t + k4t)
			d += h / 6 * (k1d + 2*k2d + 2*k3d + k4d)
		}
		if math.IsInf(bi1, 1) {
			return th
		}
		return d + bi1*th
	}
	pmax := 8.0
	if math.IsInf(bi0, 1) {
		pmax = 30
	}
	best := func(delta float64) float64 {
		const n = 40
		bp, bv := 0.0, math.Inf(-1)
		for k := range n + 1 {
			p := pmax * float64(k) / n
			if v := miss(delta, p); v > bv {
				bp, bv = p, v
			}
		}
		lo, hi := max(bp-pmax/n, 0), min(bp+pmax/n, pmax)
		const g = 0.6180339887498949
		x1, x2 := hi-g*(hi-lo), lo+g*(hi-lo)
		f1, f2 := miss(delta, x1), miss(delta, x2)
		for range 60 {
			if f1 < f2 {
				lo, x1, f1 = x1, x2, f2
				x2 = lo + g*(hi-lo)
				f2 = miss(delta, x2)
			} else {
				hi, x2, f2 = x2, x1, f1
				x1 = hi - g*(hi-lo)
				f1 = miss(delta, x1)
			}
		}
		return max(bv, f1, f2)
	}
	lo, hi := 0.0, 4.0
	for range 45 {
		mid := 0.5 * (lo + hi)
		if best(mid) >= 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

func TestCriticalFKFixedFaces(t *testing.T) {
	// Source: Frank-Kamenetskii, Diffusion and Heat Exchange in Chemical
	// Kinetics (1955/1969): slab with walls held at T0, δ_c = 0.8785 (value
	// confirmed in Boddington, Gray & Wake, Proc. R. Soc. A, 1977), exactly
	// 2τ²/cosh²τ at τ tanh τ = 1 = 0.8784576797 (verified), centre excess
	// θm,c = 1.1868 (from memory; verified from the same solution).
	c := CriticalFKSymmetric(math.Inf(1))
	if math.Abs(c.Delta-0.8784576797) > 1e-9 || math.Abs(c.Theta-1.1868) > 5e-5 {
		t.Errorf("held faces: δ_c = %.10g, θm = %.6g; want 0.8784576797, 1.1868", c.Delta, c.Theta)
	}
	// The same slab on its full thickness: δ_c·4 (length scale doubled),
	// hottest point mid-way (symmetry).
	f := CriticalFK(math.Inf(1), math.Inf(1))
	if math.Abs(f.Delta-4*0.8784576797) > 4e-9 || math.Abs(f.Hottest-0.5) > 1e-9 {
		t.Errorf("held faces, full thickness: δ_c = %.10g at %.6g; want %.10g at 0.5", f.Delta, f.Hottest, 4*0.8784576797)
	}
	// One face held, the other insulated = half of the symmetric slab.
	for _, c := range []FKCritical{CriticalFK(0, math.Inf(1)), CriticalFK(math.Inf(1), 0)} {
		if math.Abs(c.Delta-0.8784576797) > 1e-9 {
			t.Errorf("one face held, one insulated: δ_c = %.10g; want 0.8784576797", c.Delta)
		}
	}
}

func TestCriticalFKSemenovLimit(t *testing.T) {
	// Source: Semenov's lumped theory (N. N. Semenov, Z. Phys. 48 (1928)
	// 571; from memory), the Bi → 0 limit of the slab: δ_c → Bi/e, with
	// the next term of relative order Bi (derived from the closed form:
	// θm,c → 1).
	for _, bi := range []float64{1e-3, 1e-5, 1e-8} {
		c := CriticalFKSymmetric(bi)
		want := bi / math.E
		if rel := math.Abs(c.Delta/want - 1); rel > 2*bi {
			t.Errorf("Bi = %g: δ_c = %.10g, Bi/e = %.10g (relative %.2g)", bi, c.Delta, want, rel)
		}
		// Full-thickness form with both faces at Bi_L = 2 Bi: δ_c,L = 4 δ_c.
		if f := CriticalFK(2*bi, 2*bi); math.Abs(f.Delta/(4*c.Delta)-1) > 1e-9 {
			t.Errorf("Bi = %g: full-thickness δ_c/4 = %.10g, symmetric %.10g", bi, f.Delta/4, c.Delta)
		}
	}
	if c := CriticalFK(0, 0); c.Delta != 0 {
		t.Errorf("insulated faces: δ_c = %g, want 0 (no heat leaves)", c.Delta)
	}
}

func TestCriticalFKAgainstShooting(t *testing.T) {
	// Source: the independent shooting solution of the steady
	// Frank-Kamenetskii problem above (numerical ODE integration, no closed
	// form); δ_c falls with the Biot number between the held-face 0.8785 and
	// Semenov's Bi/e (Frank-Kamenetskii 1969; Bowes, Self-Heating, 1984;
	// from memory as to where they tabulate it).
	for _, tc := range []struct{ bi0, bi1 float64 }{
		{0, 1}, // one face at Bi = hL/k = 1, the other insulated (= symmetric Bi = 1)
		{0, 0.1},
		{0, 10},
		{math.Inf(1), 1}, // a held platen and an air-cooled face
		{1, math.Inf(1)},
		{0.5, 4},
		{2, 2},
	} {
		t.Run(fmt.Sprintf("Bi %g,%g", tc.bi0, tc.bi1), func(t *testing.T) {
			got := CriticalFK(tc.bi0, tc.bi1).Delta
			want := shootFK(tc.bi0, tc.bi1)
			if math.Abs(got/want-1) > 1e-7 {
				t.Errorf("δ_c = %.10g, shooting %.10g", got, want)
			}
		})
	}
	// The symmetric form agrees with the one-insulated-face slab.
	for _, bi := range []float64{0.1, 1, 10} {
		if a, b := CriticalFKSymmetric(bi).Delta, CriticalFK(0, bi).Delta; math.Abs(a/b-1) > 1e-12 {
			t.Errorf("Bi = %g: symmetric %.14g, one face insulated %.14g", bi, a, b)
		}
	}
}

func TestCriticalFKMonotone(t *testing.T) {
	// Source: analytic — more heat loss through a face never lowers δ_c.
	prev := 0.0
	for _, bi := range []float64{1e-6, 1e-3, 0.01, 0.1, 0.3, 1, 3, 10, 100, 1e4, math.Inf(1)} {
		c := CriticalFKSymmetric(bi).Delta
		if !(c > prev) || c > 0.8784576798 {
			t.Errorf("Bi = %g: δ_c = %.10g after %.10g", bi, c, prev)
		}
		prev = c
	}
}
