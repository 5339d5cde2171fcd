package mesh_test

import (
	"fmt"

	"cureslab/mesh"
)

// A 20 µm coating on a 5 mm substrate, graded with growth 1.2: the substrate
// starts next to the coating with cells close to the coating's 5 µm and
// grows geometrically toward its interior.
func ExampleBuild() {
	m, err := mesh.Build([]mesh.Layer{
		{Name: "coating", Thickness: 20e-6},
		{Name: "substrate", Thickness: 5e-3},
	}, mesh.Options{Growth: 1.2})
	if err != nil {
		fmt.Println(err)
		return
	}
	for j, l := range m.Layers {
		first, last := m.First[j], m.First[j+1]-1
		fmt.Printf("%-9s %2d cells, %6.2f µm at the top, largest %6.2f µm\n",
			l.Name, last-first+1, m.Widths[first]*1e6, maxOf(m.Widths[first:last+1])*1e6)
	}
	fmt.Printf("total %.3f mm in %d cells, largest neighbour ratio %.3f\n", m.Thickness()*1e3, m.Cells(), m.MaxRatio())
	fmt.Println("layer at 0.02 mm:", m.Layers[m.LayerOf(20e-6)].Name)
	// Output:
	// coating    4 cells,   5.00 µm at the top, largest   5.00 µm
	// substrate 40 cells,   5.24 µm at the top, largest 201.05 µm
	// total 5.020 mm in 44 cells, largest neighbour ratio 1.200
	// layer at 0.02 mm: coating
}

func maxOf(x []float64) float64 {
	m := x[0]
	for _, v := range x {
		m = max(m, v)
	}
	return m
}
