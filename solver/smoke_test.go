package solver

import (
	"context"
	"math"
	"testing"

	"cureslab/mesh"
	"cureslab/physics"
)

func slab(t testing.TB, L float64, cells int) *mesh.Mesh { return mustSlab(t, L, cells) }

func mustSlab(t testing.TB, L float64, cells int) *mesh.Mesh {
	m, err := mesh.Build([]mesh.Layer{{Name: "wall", Thickness: L, Cells: cells}}, mesh.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func inert(rho, cp, k float64) *physics.Material {
	return &physics.Material{Name: "m", Density: rho, SpecificHeat: physics.Inert(physics.Constant(cp)), Conductivity: physics.Inert(physics.Constant(k))}
}

func TestSmokeConduction(t *testing.T) {
	p := &Problem{
		Mesh:               slab(t, 0.02, 100),
		Materials:          []*physics.Material{inert(2000, 1000, 1)},
		Top:                physics.Face{Kind: physics.Convection, H: 50, Air: physics.Steady(400)},
		Bottom:             physics.Face{Kind: physics.Convection, H: 50, Air: physics.Steady(400)},
		InitialTemperature: 300,
		End:                3600,
		Probes:             []float64{0, 0.01, 0.02},
	}
	r, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	last := r.Snapshots[len(r.Snapshots)-1]
	t.Logf("status %v steps %d rejected %d newton %d (max %d) balance %.3g probes %v",
		r.Status, r.Summary.Steps, r.Summary.RejectedSteps, r.Summary.NewtonIterations, r.Summary.MaxNewtonIterations,
		r.Summary.EnergyBalanceError, last.ProbeT)
	// Bi = hL/k = 50*0.01/1 = 0.5 ; alpha = 5e-7 ; Fo = alpha t / L^2 = 5e-7*3600/1e-4 = 18
	_ = math.Pi
}

func TestSmokeAdiabaticCure(t *testing.T) {
	cure := &physics.Cure{
		Model:     physics.Autocatalytic{A1: 2e4, E1: 62e3, A2: 6e5, E2: 58e3, M: 0.45, N: 1.6},
		TotalHeat: 420e3, ResinFraction: 1, GelPoint: 0.58,
	}
	mat := inert(1150, 1500, 0.2)
	mat.Cure = cure
	p := &Problem{
		Mesh:               slab(t, 0.01, 20),
		Materials:          []*physics.Material{mat},
		Top:                physics.Face{Kind: physics.Insulated},
		Bottom:             physics.Face{Kind: physics.Insulated},
		InitialTemperature: 330,
		End:                4 * 3600,
	}
	r, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	last := r.Snapshots[len(r.Snapshots)-1]
	dT := last.T[0] - 330
	da := last.Cure[0]
	t.Logf("status %v err %v steps %d rejected %d newton %d balance %.3g  dT %.6f want %.6f  alpha %.6f peak %.2f",
		r.Status, r.Err, r.Summary.Steps, r.Summary.RejectedSteps, r.Summary.NewtonIterations,
		r.Summary.EnergyBalanceError, dT, 420e3*da/1500, da, r.Summary.PeakTemperature)
}
