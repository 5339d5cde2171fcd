package solver

import (
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
