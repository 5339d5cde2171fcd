package cases

import (
	"cureslab/physics"
	"cureslab/solver"
)

// StackWave solves the plane wave of the standing-wave model on the stack of
// pr (one slab per cell, as the solver does: ε′ of the material's dielectric
// section, 1 without one; shields are conductors) with every cell at
// temperature T and every curing cell at cure a, over band, from inc. It
// returns the absorbed power per cell per unit incident power density
// (ε″ K, 1/m, both sources added under IncidentBoth) and the shares of the
// incident power. Cost: one physics.Wave.Absorb, O(cells · band points).
func StackWave(pr *solver.Problem, band physics.Band, inc physics.Incidence, T, a float64) ([]float64, physics.WaveShares) {
	m := pr.Mesh
	n := m.Cells()
	slabs := make([]physics.Slab, n)
	for i := range n {
		mat := pr.Materials[m.Owner[i]]
		slabs[i] = physics.Slab{Width: m.Widths[i], Permittivity: 1}
		if d := mat.Dielectric; d != nil {
			slabs[i].Permittivity, slabs[i].Conductor = d.Permittivity, d.Shield
			if !d.Shield {
				ai := 0.0
				if mat.Cure != nil {
					ai = a
				}
				e2, _, _ := d.Loss(T, ai)
				slabs[i].Loss = max(e2, 0)
			}
		}
	}
	K := make([]float64, n)
	sh := physics.NewWave(n, band).Absorb(K, slabs, inc)
	for i := range K {
		K[i] *= slabs[i].Loss
	}
	return K, sh
}
