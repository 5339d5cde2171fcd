package cases

import (
	"context"
	"math"
	"testing"

	"cureslab/physics"
	"cureslab/solver"
)

// TestGoodLampInAir: a flux face with h, air and emissivity loads into one
// face that takes the lamp's flux in and gives heat back to the room, and
// the coating on its insulated panel settles where the face balance
//
//	q0 = h (T − Ta) + εσ (T⁴ − Ta⁴)
//
// holds, with q0 the lamp's flux plus the reaction heat still released per
// unit area at the end (Σ ρ w_r H r w over the cells, from the last
// snapshot's rates): at quasi-steady state all of it leaves through the lit
// face (the root found here by bisection; analytic). The time constant
// ρ c_p L/(h + 4εσT³) is about 3 min against a cure that slows over hours,
// so the lag behind that balance is far below the 0.01 K allowed.
func TestGoodLampInAir(t *testing.T) {
	c := loadGood(t, "lamp-in-air.toml")
	top := c.Problem.Top
	if top.Kind != physics.Flux || top.H != 10 || top.Emissivity != 0.9 || top.Air.At(0) != 298.15 || c.TopAir != "25 C" {
		t.Fatalf("top face %+v, air %q", top, c.TopAir)
	}
	r, err := solver.Run(context.Background(), c.Problem)
	if err != nil || r.Status != solver.OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	last := r.Snapshots[len(r.Snapshots)-1]
	react := 0.0
	m := c.Problem.Mesh
	for j, mat := range c.Problem.Materials {
		for i := m.First[j]; i < m.First[j+1] && mat.Cure != nil; i++ {
			react += mat.Density * mat.Cure.HeatPerMass() * last.Rate[i] * m.Widths[i]
		}
	}
	es := 0.9 * physics.StefanBoltzmann
	bal := func(T float64) float64 { return 1500 + react - 10*(T-298.15) - es*(T*T*T*T-math.Pow(298.15, 4)) }
	lo, hi := 298.15, 298.15+1500/10.0
	for range 200 {
		if mid := 0.5 * (lo + hi); bal(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	want := 0.5 * (lo + hi)
	for i, T := range last.T {
		if math.Abs(T-want) > 0.01 {
			t.Errorf("cell %d at the end: %.4f K, want the face balance's %.4f K", i, T, want)
		}
	}
	if e := r.Summary.ConservationResidual; !(e < 1e-9) {
		t.Errorf("conservation residual %g", e)
	}
	// The lamp's face is no driver: the overshoot and lags are undefined.
	if s := r.Summary; !math.IsNaN(s.Overshoot) || !math.IsNaN(s.HeatingLag) || len(solver.Drivers(c.Problem)) != 0 {
		t.Errorf("overshoot %v, heating lag %v; want NaN, nothing drives the case", s.Overshoot, s.HeatingLag)
	}
	t.Logf("balance %.3f K (%.2f C) with %.3g W/m² of reaction heat left, peak %.3f K", want, want-273.15, react, r.Summary.PeakTemperature)
}
