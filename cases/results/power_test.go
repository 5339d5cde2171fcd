package results

import (
	"context"
	"math"
	"math/cmplx"
	"path/filepath"
	"strconv"
	"testing"

	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/physics"
	"cureslab/solver"
)

// TestFieldsPowerColumn runs a lossy, non-curing layer over an aluminium
// plate heated by a plane wave from the top and reads fields.csv back: the
// power column is there for every cell, zero in the metal, and the cells'
// power adds up to what the layer absorbs, S (1 − |Γ|²) with
// Γ = (Z − 1)/(Z + 1), Z = j tan(k0 n d)/n, the input impedance of a slab on
// a perfect conductor relative to free space (Orfanidis, Electromagnetic
// Waves and Antennas, multilayer chapter, transmission-line analogy; from
// memory). No wave passes the metal, so nothing is transmitted.
func TestFieldsPowerColumn(t *testing.T) {
	src := `title = "power column"
[initial]
temperature = "20 C"
[time]
end = "2 min"
output_every = "1 min"
[[layer]]
name = "wet"
material = "wet"
thickness = "10 mm"
cells = 40
[[layer]]
name = "plate"
material = "aluminium"
thickness = "2 mm"
cells = 4
[materials.wet]
density = "1000 kg/m^3"
specific_heat = "4180 J/kg/K"
conductivity = "0.6 W/m/K"
[materials.wet.dielectric]
permittivity = 4
loss_factor = 0.4
[top]
kind = "insulated"
[bottom]
kind = "insulated"
[volumetric]
attenuation = "standing-wave"
incident = "top"
incident_power = "2 kW/m^2"
frequency = "2.45 GHz"
`
	c, err := cases.Parse("power.toml", []byte(src), "")
	if err != nil {
		t.Fatal(err)
	}
	r, err := solver.Run(context.Background(), c.Problem)
	if err != nil || r.Status != solver.OK {
		t.Fatalf("run: %v %v", err, r)
	}
	dir := t.TempDir()
	if err := WriteRun(dir, c, r, Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	rows := testkit.ReadCSV(t, filepath.Join(dir, FieldsFile))
	if h := rows[0]; h[len(h)-1] != PowerColumn || len(h) != len(FieldsHeader)+1 {
		t.Fatalf("header %v: want %s last", h, PowerColumn)
	}
	m := c.Problem.Mesh
	n := m.Cells()
	sum := 0.0
	for i, row := range rows[1 : n+1] { // t = 0
		P, err := strconv.ParseFloat(row[len(row)-1], 64)
		if err != nil {
			t.Fatalf("row %v: %v", row, err)
		}
		if row[2] == "plate" && P != 0 {
			t.Errorf("the plate absorbs %g W/m³", P)
		}
		sum += P * m.Widths[i]
	}
	nr := cmplx.Sqrt(complex(4, -0.4))
	k0 := 2 * math.Pi * 2.45e9 / physics.SpeedOfLight
	Z := complex(0, 1) * cmplx.Tan(complex(k0*0.01, 0)*nr) / nr
	g := (Z - 1) / (Z + 1)
	want := 2000 * (1 - real(g*cmplx.Conj(g)))
	if math.Abs(sum-want) > 1e-7*want {
		t.Errorf("Σ P w = %.9g W/m², want S (1 − |Γ|²) = %.9g", sum, want)
	}
}
