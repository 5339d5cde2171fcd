package physics

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

func TestFaceConvection(t *testing.T) {
	air, err := NewSchedule([]float64{0, 600}, []float64{296.15, 356.15})
	if err != nil {
		t.Fatal(err)
	}
	f := Face{Kind: Convection, H: 20, Air: air}
	// R = (w/2)/k for a 1 mm cell of k = 0.2 W/(m K): 0.0025 m² K/W.
	const R = 0.0005 / 0.2
	for _, tc := range []struct{ t, Tc float64 }{{0, 296.15}, {300, 300}, {900, 400}} {
		q, dq, Tf := f.HeatIn(tc.t, tc.Tc, R)
		Ta := air.At(tc.t)
		// Source: analytic — convection and half-cell conduction in series,
		// q = (Ta − Tc)/(1/h + R) (Incropera, thermal resistance network, ch. 3).
		want := (Ta - tc.Tc) / (1/f.H + R)
		if math.Abs(q-want) > 1e-12*max(1, math.Abs(want)) || math.Abs(dq+1/(1/f.H+R)) > 1e-15 {
			t.Errorf("t=%g Tc=%g: q, dq = %v, %v; want %v, %v", tc.t, tc.Tc, q, dq, want, -1/(1/f.H+R))
		}
		// The face temperature carries the same flux through both resistances.
		if math.Abs((Tf-tc.Tc)/R-q) > 1e-9 || math.Abs(f.H*(Ta-Tf)-q) > 1e-9 {
			t.Errorf("t=%g: face temperature %v does not carry q = %v", tc.t, Tf, q)
		}
	}
	// Source: analytic — no exchange when the air and the cell are at one temperature.
	if q, _, Tf := f.HeatIn(0, 296.15, R); q != 0 || Tf != 296.15 {
		t.Errorf("equilibrium: q = %v, Tf = %v", q, Tf)
	}
}

func TestFaceRadiation(t *testing.T) {
	const R = 0.0005 / 0.2
	for _, tc := range []struct {
		name      string
		h, eps    float64
		Ta, Tc, r float64
	}{
		{"hot oven", 15, 0.9, 453.15, 300, R},
		{"cooling", 8, 0.95, 296.15, 420, R},
		{"pure radiation", 0, 0.9, 800, 300, R},
		{"thin metal cell", 20, 0.1, 450, 300, 0.0005 / 200},
		{"thick insulating cell", 5, 0.9, 600, 300, 0.005 / 0.05},
	} {
		f := Face{Kind: Convection, H: tc.h, Emissivity: tc.eps, Air: Steady(tc.Ta)}
		q, dq, Tf := f.HeatIn(0, tc.Tc, tc.r)
		es := tc.eps * StefanBoltzmann
		// Source: the face balance of the README Case file reference, [top] and [bottom], radiation at the face temperature:
		// h(Ta − Tf) + εσ(Ta⁴ − Tf⁴) = (Tf − Tc)/R = q.
		conv := tc.h * (tc.Ta - Tf)
		rad := es * (math.Pow(tc.Ta, 4) - math.Pow(Tf, 4))
		if res := conv + rad - (Tf-tc.Tc)/tc.r; math.Abs(res) > 1e-9*max(1, math.Abs(q)) {
			t.Errorf("%s: face balance residual %v W/m² (q = %v, Tf = %v)", tc.name, res, q, Tf)
		}
		if math.Abs(q-(Tf-tc.Tc)/tc.r) > 1e-12*max(1, math.Abs(q)) {
			t.Errorf("%s: q = %v, (Tf − Tc)/R = %v", tc.name, q, (Tf-tc.Tc)/tc.r)
		}
		// Tf lies between the cell and the air.
		if (Tf-tc.Tc)*(tc.Ta-Tf) < 0 {
			t.Errorf("%s: Tf = %v outside [%v, %v]", tc.name, Tf, tc.Tc, tc.Ta)
		}
		// dq/dTc against central differences (gonum diff/fd).
		num := fd.Derivative(func(x float64) float64 { q, _, _ := f.HeatIn(0, x, tc.r); return q }, tc.Tc,
			&fd.Settings{Formula: fd.Central, Step: 1e-3})
		if math.Abs(dq-num) > 1e-6*math.Abs(num) {
			t.Errorf("%s: dq/dTc = %v, finite difference %v", tc.name, dq, num)
		}
	}
}

func TestFaceRadiationAgainstBisection(t *testing.T) {
	// Independent method: bisection on the face balance (README Case file reference, [top] and [bottom])
	// g(Tf) = h(Ta − Tf) + εσ(Ta⁴ − Tf⁴) − (Tf − Tc)/R, decreasing in Tf,
	// with the root between Tc and Ta.
	for _, tc := range []struct{ h, eps, Ta, Tc, R float64 }{
		{10, 0.8, 500, 400, 1e-8},
		{25, 0.9, 453.15, 293.15, 0.0025},
		{0, 1, 1200, 300, 0.1},
	} {
		es := tc.eps * StefanBoltzmann
		g := func(Tf float64) float64 {
			return tc.h*(tc.Ta-Tf) + es*(tc.Ta*tc.Ta*tc.Ta*tc.Ta-Tf*Tf*Tf*Tf) - (Tf-tc.Tc)/tc.R
		}
		lo, hi := min(tc.Ta, tc.Tc), max(tc.Ta, tc.Tc)
		for range 200 {
			m := 0.5 * (lo + hi)
			if g(m) > 0 {
				lo = m
			} else {
				hi = m
			}
		}
		f := Face{Kind: Convection, H: tc.h, Emissivity: tc.eps, Air: Steady(tc.Ta)}
		_, _, Tf := f.HeatIn(0, tc.Tc, tc.R)
		if math.Abs(Tf-lo) > 1e-9 {
			t.Errorf("%+v: Tf = %.12g, bisection %.12g", tc, Tf, lo)
		}
	}
}

func TestFaceFixedFluxInsulated(t *testing.T) {
	const R = 0.001
	set, _ := NewSchedule([]float64{0, 100}, []float64{300, 400})
	fixed := Face{Kind: Fixed, Set: set}
	q, dq, Tf := fixed.HeatIn(50, 320, R)
	// Source: analytic — the face is held at the set point: q = (Tset − Tc)/R, Tset(50 s) = 350 K.
	if math.Abs(q-30/R) > 1e-9 || dq != -1/R || Tf != 350 {
		t.Errorf("fixed: q, dq, Tf = %v, %v, %v; want %v, %v, 350", q, dq, Tf, 30/R, -1/R)
	}
	flux := Face{Kind: Flux, Flux: Steady(1500)}
	q, dq, Tf = flux.HeatIn(0, 320, R)
	// Source: README Case file reference, [top] and [bottom] — flux is positive into the part; Tf = Tc + qR.
	if q != 1500 || dq != 0 || math.Abs(Tf-(320+1500*R)) > 1e-12 {
		t.Errorf("flux: q, dq, Tf = %v, %v, %v; want 1500, 0, %v", q, dq, Tf, 320+1500*R)
	}
	ins := Face{Kind: Insulated}
	if q, dq, Tf := ins.HeatIn(0, 320, R); q != 0 || dq != 0 || Tf != 320 {
		t.Errorf("insulated: q, dq, Tf = %v, %v, %v; want 0, 0, 320", q, dq, Tf)
	}
}

func TestFaceDriver(t *testing.T) {
	f := Face{Kind: Convection, Air: Steady(400)}
	if s, ok := f.Driver(); !ok || s.At(0) != 400 {
		t.Errorf("convection driver: %v, %v", s, ok)
	}
	g := Face{Kind: Fixed, Set: Steady(350)}
	if s, ok := g.Driver(); !ok || s.At(0) != 350 {
		t.Errorf("fixed driver: %v, %v", s, ok)
	}
	for _, k := range []FaceKind{Flux, Insulated} {
		h := Face{Kind: k}
		if _, ok := h.Driver(); ok {
			t.Errorf("%v face reports a driver", k)
		}
	}
}

func TestFaceKindString(t *testing.T) {
	// Source: README Case file reference, [top] and [bottom], the kind names of a case file.
	want := map[FaceKind]string{Insulated: "insulated", Convection: "convection", Fixed: "fixed", Flux: "flux", FaceKind(9): "FaceKind(?)"}
	for k, w := range want {
		if k.String() != w {
			t.Errorf("%d.String() = %q, want %q", int(k), k.String(), w)
		}
	}
}

func TestFaceFluxWithAir(t *testing.T) {
	const R = 0.0005 / 0.2
	for _, tc := range []struct {
		name          string
		q0, h, eps    float64
		Ta, Tc, cellR float64
	}{
		{"lamp over a part in still air", 1500, 10, 0, 296.15, 350, R},
		{"lamp, convection and radiation", 1500, 10, 0.9, 296.15, 350, R},
		{"lamp, radiation only", 3000, 0, 0.9, 296.15, 450, R},
		{"lamp off, part cooling", 0, 12, 0.8, 296.15, 420, R},
		{"negative flux (a chill plate)", -500, 5, 0.3, 296.15, 320, 0.0005 / 200},
	} {
		f := Face{Kind: Flux, Flux: Steady(tc.q0), H: tc.h, Emissivity: tc.eps, Air: Steady(tc.Ta)}
		q, dq, Tf := f.HeatIn(0, tc.Tc, tc.cellR)
		es := tc.eps * StefanBoltzmann
		// Source: face balance, imposed flux plus convection plus radiation at
		// the face temperature: q0 + h(Ta − Tf) + εσ(Ta⁴ − Tf⁴) = (Tf − Tc)/R = q.
		bal := tc.q0 + tc.h*(tc.Ta-Tf) + es*(math.Pow(tc.Ta, 4)-math.Pow(Tf, 4))
		if res := bal - (Tf-tc.Tc)/tc.cellR; math.Abs(res) > 1e-9*max(1, math.Abs(q)) {
			t.Errorf("%s: face balance residual %v W/m² (q = %v, Tf = %v)", tc.name, res, q, Tf)
		}
		if math.Abs(q-(Tf-tc.Tc)/tc.cellR) > 1e-9*max(1, math.Abs(q)) {
			t.Errorf("%s: q = %v, (Tf − Tc)/R = %v", tc.name, q, (Tf-tc.Tc)/tc.cellR)
		}
		if tc.eps == 0 {
			// Source: analytic — without radiation the balance is linear:
			// q = (q0 + h(Ta − Tc))/(1 + hR).
			want := (tc.q0 + tc.h*(tc.Ta-tc.Tc)) / (1 + tc.h*tc.cellR)
			if math.Abs(q-want) > 1e-12*max(1, math.Abs(want)) {
				t.Errorf("%s: q = %v, want %v", tc.name, q, want)
			}
		}
		// dq/dTc against central differences (gonum diff/fd).
		num := fd.Derivative(func(x float64) float64 { q, _, _ := f.HeatIn(0, x, tc.cellR); return q }, tc.Tc,
			&fd.Settings{Formula: fd.Central, Step: 1e-3})
		if math.Abs(dq-num) > 1e-6*max(math.Abs(num), 1e-3) {
			t.Errorf("%s: dq/dTc = %v, finite difference %v", tc.name, dq, num)
		}
		if !f.HasAir() || f.Linear() != (tc.eps == 0) {
			t.Errorf("%s: HasAir %v, Linear %v", tc.name, f.HasAir(), f.Linear())
		}
		if _, ok := f.Driver(); ok {
			t.Errorf("%s: a flux face drives no temperature", tc.name)
		}
	}
	// Without h and emissivity a flux face is the imposed flux alone, whatever its air.
	f := Face{Kind: Flux, Flux: Steady(800)}
	if q, dq, Tf := f.HeatIn(0, 300, R); q != 800 || dq != 0 || Tf != 300+800*R || f.HasAir() {
		t.Errorf("plain flux: q %v, dq %v, Tf %v, HasAir %v", q, dq, Tf, f.HasAir())
	}
}
