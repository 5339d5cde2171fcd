package mesh

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

const (
	um = 1e-6
	mm = 1e-3
)

func TestDefaultCells(t *testing.T) {
	for _, tc := range []struct {
		name               string
		thickness, maxCell float64
		want               int
	}{
		// Source: README Case file reference, [mesh], max(4, ceil(t/max_cell − 1e-9)): 1 mm / 0.25 mm = 4 exactly.
		{"exact 4", 1 * mm, 0.25 * mm, 4},
		// Source: README Case file reference, [mesh]: 10 mm / 0.25 mm = 40.
		{"10 mm", 10 * mm, 0, 40},
		// Source: README Case file reference, [mesh]: a thin layer still gets 4 cells.
		{"thin", 20 * um, 0, 4},
		// Source: README Case file reference, [mesh]: 1.0001 mm / 0.25 mm = 4.0004 rounds up.
		{"just over", 1.0001 * mm, 0.25 * mm, 5},
		// Source: README Case file reference, [mesh], the 1e-9 term: 1.5e-3/0.3e-3 evaluates to
		// 5.000000000000001 in float64 and must give 5, not 6 (analytic).
		{"round-off above 5", 1.5 * mm, 0.3 * mm, 5},
		// Source: README Case file reference, [mesh]: 3e-3/0.3e-3 evaluates to 10.000000000000002 (analytic: 10).
		{"round-off above 10", 3 * mm, 0.3 * mm, 10},
		// Source: README Case file reference, [mesh]: 1.2e-3/0.1e-3 evaluates to 11.999999999999998 (analytic: 12).
		{"round-off below 12", 1.2 * mm, 0.1 * mm, 12},
		// Source: analytic; a count beyond 2^53 saturates instead of overflowing.
		{"absurd", 1, 5e-324, math.MaxInt},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := DefaultCells(tc.thickness, tc.maxCell); got != tc.want {
				t.Errorf("DefaultCells(%g, %g) = %d, want %d", tc.thickness, tc.maxCell, got, tc.want)
			}
		})
	}
}

// checkMesh checks the geometric identities every mesh must satisfy
// (package doc invariants, README Case file reference, [mesh]): lengths, ownership, per-layer and total
// thickness, faces at layer ends equal to the running sum of thicknesses.
func checkMesh(t *testing.T, m *Mesh, layers []Layer) {
	t.Helper()
	n := m.Cells()
	if len(m.Faces) != n+1 || len(m.Centers) != n || len(m.Owner) != n || len(m.First) != len(layers)+1 {
		t.Fatalf("lengths: faces %d centers %d owner %d first %d for %d cells, %d layers",
			len(m.Faces), len(m.Centers), len(m.Owner), len(m.First), n, len(layers))
	}
	if m.Faces[0] != 0 || m.First[0] != 0 || m.First[len(layers)] != n {
		t.Fatalf("Faces[0] = %g, First = %v, n = %d", m.Faces[0], m.First, n)
	}
	z := 0.0
	for j, l := range layers {
		lo, hi := m.First[j], m.First[j+1]
		if hi <= lo {
			t.Fatalf("layer %d owns no cells: First = %v", j, m.First)
		}
		sum := 0.0
		for i := lo; i < hi; i++ {
			if m.Owner[i] != j {
				t.Errorf("Owner[%d] = %d, want %d", i, m.Owner[i], j)
			}
			if !(m.Widths[i] > 0) {
				t.Errorf("Widths[%d] = %g", i, m.Widths[i])
			}
			sum += m.Widths[i]
		}
		// Source: analytic; the widths of a layer add up to its thickness (round-off).
		if math.Abs(sum-l.Thickness) > 1e-12*l.Thickness {
			t.Errorf("layer %d: widths add to %.17g, want %.17g", j, sum, l.Thickness)
		}
		z += l.Thickness
		// Source: analytic; layer-end faces are set to the running sum, not accumulated.
		if m.Faces[hi] != z {
			t.Errorf("face at end of layer %d = %.17g, want %.17g exactly", j, m.Faces[hi], z)
		}
	}
	if m.Thickness() != z {
		t.Errorf("Thickness() = %.17g, want %.17g", m.Thickness(), z)
	}
	for i := range n {
		if !(m.Faces[i] < m.Faces[i+1]) {
			t.Errorf("faces not increasing at %d: %g, %g", i, m.Faces[i], m.Faces[i+1])
		}
		if d := m.Faces[i+1] - m.Faces[i]; math.Abs(d-m.Widths[i]) > 1e-12*z {
			t.Errorf("cell %d: face gap %g, width %g", i, d, m.Widths[i])
		}
		if !(m.Centers[i] > m.Faces[i] && m.Centers[i] < m.Faces[i+1]) {
			t.Errorf("centre %d at %g outside [%g, %g]", i, m.Centers[i], m.Faces[i], m.Faces[i+1])
		}
	}
}

func cellsOf(m *Mesh) []int {
	c := make([]int, len(m.Layers))
	for j := range c {
		c[j] = m.First[j+1] - m.First[j]
	}
	return c
}

func TestBuildUniform(t *testing.T) {
	for _, tc := range []struct {
		name   string
		layers []Layer
		opt    Options
		want   []int
	}{
		// Source: README Case file reference, [mesh], default count: 10 mm / 0.25 mm = 40; 1 mm -> 4; 20 um -> 4.
		{"defaults", []Layer{{Thickness: 10 * mm}, {Thickness: 1 * mm}, {Thickness: 20 * um}}, Options{}, []int{40, 4, 4}},
		// Source: README Case file reference, [mesh]: a layer's cells wins over the default.
		{"cells wins", []Layer{{Thickness: 10 * mm, Cells: 7}, {Thickness: 1 * mm, Cells: 1}}, Options{}, []int{7, 1}},
		// Source: README Case file reference, [mesh], with max_cell = 0.1 mm: 1.2 mm -> 12, 0.25 mm -> 4 (max with 4).
		{"max cell", []Layer{{Thickness: 1.2 * mm}, {Thickness: 0.25 * mm}}, Options{MaxCell: 0.1 * mm}, []int{12, 4}},
		// Source: README Case file reference, [mesh]: growth 1 means no grading; 2 mm -> 8, 20 um -> 4.
		{"growth 1", []Layer{{Thickness: 2 * mm}, {Thickness: 20 * um}}, Options{Growth: 1}, []int{8, 4}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m, err := Build(tc.layers, tc.opt)
			if err != nil {
				t.Fatal(err)
			}
			checkMesh(t, m, tc.layers)
			got := cellsOf(m)
			for j := range got {
				if got[j] != tc.want[j] {
					t.Fatalf("cells per layer = %v, want %v", got, tc.want)
				}
				// Source: analytic; without grading every cell of layer j is t_j/n_j.
				w := tc.layers[j].Thickness / float64(tc.want[j])
				for i := m.First[j]; i < m.First[j+1]; i++ {
					if math.Abs(m.Widths[i]-w) > 1e-12*w {
						t.Errorf("layer %d cell %d width %g, want %g", j, i, m.Widths[i], w)
					}
				}
			}
		})
	}
}

func TestBuildGrading(t *testing.T) {
	for _, tc := range []struct {
		name   string
		layers []Layer
		growth float64
	}{
		// Source: README Case file reference, [mesh]: a 20 um coating on a 5 mm substrate needs no hand meshing.
		{"20 um on 5 mm", []Layer{{Thickness: 20 * um}, {Thickness: 5 * mm}}, 1.2},
		{"5 mm under 20 um", []Layer{{Thickness: 5 * mm}, {Thickness: 20 * um}}, 1.2},
		{"1 um next to 50 mm", []Layer{{Thickness: 1 * um}, {Thickness: 50 * mm}}, 1.2},
		{"1 um next to 50 mm, growth 2", []Layer{{Thickness: 50 * mm}, {Thickness: 1 * um}}, 2},
		{"1 um next to 50 mm, growth 1.05", []Layer{{Thickness: 1 * um}, {Thickness: 50 * mm}}, 1.05},
		{"thin between thick", []Layer{{Thickness: 5 * mm}, {Thickness: 20 * um}, {Thickness: 3 * mm}}, 1.3},
		{"chain of thin layers", []Layer{{Thickness: 5 * mm}, {Thickness: 1 * um}, {Thickness: 100 * um}, {Thickness: 5 * mm}}, 1.2},
		{"fixed substrate, enough cells", []Layer{{Thickness: 20 * um}, {Thickness: 5 * mm, Cells: 60}}, 1.2},
		{"fixed coating", []Layer{{Thickness: 20 * um, Cells: 2}, {Thickness: 5 * mm}}, 1.2},
		{"nearly equal layers", []Layer{{Thickness: 1 * mm}, {Thickness: 1.002 * mm}}, 1.2},
	} {
		t.Run(tc.name, func(t *testing.T) {
			opt := Options{Growth: tc.growth}
			m, err := Build(tc.layers, opt)
			if err != nil {
				t.Fatal(err)
			}
			checkMesh(t, m, tc.layers)
			// Source: README Case file reference, [mesh] growth: neighbouring cells differ in size by at most
			// this ratio, across layer faces too (analytic bound).
			for i := 1; i < m.Cells(); i++ {
				a, b := m.Widths[i-1], m.Widths[i]
				if r := max(a/b, b/a); r > tc.growth {
					t.Errorf("cells %d, %d (layers %d, %d): widths %g, %g, ratio %.6g > %g",
						i-1, i, m.Owner[i-1], m.Owner[i], a, b, r, tc.growth)
				}
			}
			if r := m.MaxRatio(); r > tc.growth {
				t.Errorf("MaxRatio = %g > growth %g", r, tc.growth)
			}
			// Source: README Case file reference, [mesh]: growth may add cells, never remove them; a layer's
			// cells wins; automatic cells never exceed max_cell (to the 1e-9 of the formula).
			plain, err := Build(tc.layers, Options{})
			if err != nil {
				t.Fatal(err)
			}
			got, base := cellsOf(m), cellsOf(plain)
			for j, l := range tc.layers {
				if l.Cells > 0 && got[j] != l.Cells {
					t.Errorf("layer %d: %d cells, want its own %d", j, got[j], l.Cells)
				}
				if got[j] < base[j] {
					t.Errorf("layer %d: growth removed cells: %d < %d", j, got[j], base[j])
				}
				if l.Cells == 0 {
					if got[j] < DefaultCells(l.Thickness, 0) {
						t.Errorf("layer %d: %d cells < default %d", j, got[j], DefaultCells(l.Thickness, 0))
					}
					for i := m.First[j]; i < m.First[j+1]; i++ {
						if m.Widths[i] > DefaultMaxCell*(1+1e-9) {
							t.Errorf("layer %d cell %d: width %g > max_cell", j, i, m.Widths[i])
						}
					}
				}
			}
		})
	}
}

func TestBuildGradingAddsOnlyWhereNeeded(t *testing.T) {
	// Source: analytic; 1 mm and 0.98 mm both get 4 cells (README Case file reference, [mesh]), 0.25 mm
	// and 0.245 mm, ratio 1.02 < growth: grading must leave them uniform.
	layers := []Layer{{Thickness: 1 * mm}, {Thickness: 0.98 * mm}}
	m, err := Build(layers, Options{Growth: 1.2})
	if err != nil {
		t.Fatal(err)
	}
	if got := cellsOf(m); got[0] != 4 || got[1] != 4 {
		t.Errorf("cells per layer = %v, want [4 4]", got)
	}
	// Source: analytic; 0.25 mm / 0.245 mm.
	if r := m.MaxRatio(); math.Abs(r-0.25/0.245) > 1e-12 {
		t.Errorf("MaxRatio = %.17g, want %.17g", r, 0.25/0.245)
	}
}

func TestBuildFixedCellsTooFew(t *testing.T) {
	// A substrate with cells = 4 cannot be graded down to a 5 um coating cell
	// within ratio 1.2: its count wins, it stays uniform, and MaxRatio says so.
	layers := []Layer{{Thickness: 20 * um}, {Thickness: 5 * mm, Cells: 4}}
	m, err := Build(layers, Options{Growth: 1.2})
	if err != nil {
		t.Fatal(err)
	}
	checkMesh(t, m, layers)
	if got := cellsOf(m); got[0] != 4 || got[1] != 4 {
		t.Fatalf("cells per layer = %v, want [4 4]", got)
	}
	for i := m.First[1]; i < m.First[2]; i++ {
		// Source: analytic; uniform 5 mm / 4.
		if math.Abs(m.Widths[i]-1.25*mm) > 1e-15 {
			t.Errorf("substrate cell %d = %g, want uniform 1.25 mm", i, m.Widths[i])
		}
	}
	// Source: analytic; 1.25 mm / (20 um / 4) = 250.
	if r := m.MaxRatio(); math.Abs(r-250) > 1e-9 {
		t.Errorf("MaxRatio = %g, want 250", r)
	}
}

func TestMaxRatio(t *testing.T) {
	for _, tc := range []struct {
		name   string
		layers []Layer
		want   float64
	}{
		// Source: analytic; one uniform layer.
		{"one layer", []Layer{{Thickness: 3 * mm}}, 1},
		// Source: analytic; one cell.
		{"one cell", []Layer{{Thickness: 3 * mm, Cells: 1}}, 1},
		// Source: analytic; 0.25 mm cells against 5 um cells: ratio 50.
		{"1 mm on 20 um", []Layer{{Thickness: 1 * mm}, {Thickness: 20 * um}}, 50},
		// Source: analytic; 2 mm in 4 cells (0.5 mm) against 1 mm in 4 cells (0.25 mm).
		{"2 mm on 1 mm", []Layer{{Thickness: 2 * mm, Cells: 4}, {Thickness: 1 * mm}}, 2},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m, err := Build(tc.layers, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if got := m.MaxRatio(); math.Abs(got-tc.want) > 1e-12*tc.want {
				t.Errorf("MaxRatio = %.17g, want %g", got, tc.want)
			}
		})
	}
}

func TestBuildErrors(t *testing.T) {
	ok := Layer{Thickness: 1 * mm}
	for _, tc := range []struct {
		name   string
		layers []Layer
		opt    Options
		want   error
		layer  int // index in a *LayerError, -1 for none
	}{
		{"no layers", nil, Options{}, ErrLayer, -1},
		{"zero thickness", []Layer{ok, {Thickness: 0}}, Options{}, ErrLayer, 1},
		{"negative thickness", []Layer{{Thickness: -1 * mm}}, Options{}, ErrLayer, 0},
		{"NaN thickness", []Layer{ok, ok, {Thickness: math.NaN()}}, Options{}, ErrLayer, 2},
		{"infinite thickness", []Layer{{Thickness: math.Inf(1)}}, Options{}, ErrLayer, 0},
		{"sub-nanometre thickness", []Layer{{Thickness: 1e-12}}, Options{}, ErrLayer, 0},
		{"negative cells", []Layer{ok, {Thickness: 1 * mm, Cells: -3}}, Options{}, ErrLayer, 1},
		// Source: README Case file reference, [[layer]]: contact_resistance on the first layer is an error.
		{"contact resistance on first layer", []Layer{{Thickness: 1 * mm, ContactResistance: 1e-4}, ok}, Options{}, ErrLayer, 0},
		{"negative contact resistance", []Layer{ok, {Thickness: 1 * mm, ContactResistance: -1e-4}}, Options{}, ErrLayer, 1},
		{"NaN contact resistance", []Layer{ok, {Thickness: 1 * mm, ContactResistance: math.NaN()}}, Options{}, ErrLayer, 1},
		{"growth below 1", []Layer{ok}, Options{Growth: 0.5}, ErrOptions, -1},
		{"negative growth", []Layer{ok}, Options{Growth: -1.2}, ErrOptions, -1},
		{"NaN growth", []Layer{ok}, Options{Growth: math.NaN()}, ErrOptions, -1},
		{"infinite growth", []Layer{ok}, Options{Growth: math.Inf(1)}, ErrOptions, -1},
		{"negative max cell", []Layer{ok}, Options{MaxCell: -0.25 * mm}, ErrOptions, -1},
		{"NaN max cell", []Layer{ok}, Options{MaxCell: math.NaN()}, ErrOptions, -1},
		{"too many cells asked", []Layer{ok, {Thickness: 1 * mm, Cells: 1_000_000}}, Options{}, ErrTooLarge, 1},
		{"max cell far too small", []Layer{{Thickness: 1}}, Options{MaxCell: 1e-9}, ErrTooLarge, 0},
		{"max cell denormal", []Layer{{Thickness: 1}}, Options{MaxCell: 5e-324}, ErrTooLarge, 0},
		{"too many in all", []Layer{{Thickness: 30 * mm}, {Thickness: 30 * mm}}, Options{MaxCell: 0.2 * um}, ErrTooLarge, -1},
		{"growth too close to 1", []Layer{{Thickness: 1 * um}, {Thickness: 50 * mm}}, Options{Growth: 1 + 1e-7}, ErrTooLarge, -1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m, err := Build(tc.layers, tc.opt)
			if err == nil {
				t.Fatalf("Build(%+v, %+v) = %d cells, want an error", tc.layers, tc.opt, m.Cells())
			}
			if !errors.Is(err, tc.want) {
				t.Errorf("error %q does not wrap %q", err, tc.want)
			}
			var le *LayerError
			switch {
			case tc.layer < 0 && errors.As(err, &le):
				t.Errorf("error %q names layer %d, want none", err, le.Index)
			case tc.layer >= 0 && !errors.As(err, &le):
				t.Errorf("error %q is not a *LayerError", err)
			case tc.layer >= 0 && le.Index != tc.layer:
				t.Errorf("error %q names layer %d, want %d", err, le.Index, tc.layer)
			}
		})
	}
}

func TestLocate(t *testing.T) {
	layers := []Layer{{Thickness: 0.2 * mm}, {Thickness: 1 * mm}, {Thickness: 0.3 * mm}}
	m, err := Build(layers, Options{})
	if err != nil {
		t.Fatal(err)
	}
	// Cells: 4 × 50 um, 4 × 250 um, 4 × 75 um (README Case file reference, [mesh]).
	for _, tc := range []struct {
		name        string
		z           float64
		cell, layer int
	}{
		{"top face", 0, 0, 0},
		{"first centre", 25 * um, 0, 0},
		// Source: analytic; a face between cells belongs to the cell above.
		{"face inside layer", 50 * um, 0, 0},
		{"just below that face", 50.001 * um, 1, 0},
		// Source: README Case file reference, [output]: a probe exactly on a layer face reads the upper layer's side.
		{"layer face 0.2 mm", 0.2 * mm, 3, 0},
		{"just below 0.2 mm", 0.2001 * mm, 4, 1},
		// 1.2e-3 typed by a user; the face is 0.2e-3 + 1e-3 in float64 (round-off).
		{"layer face 1.2 mm", 1.2 * mm, 7, 1},
		{"bottom face", 1.5 * mm, 11, 2},
		{"above the part", -1 * um, -1, -1},
		{"below the part", 1.6 * mm, -1, -1},
		{"NaN", math.NaN(), -1, -1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := m.Locate(tc.z); got != tc.cell {
				t.Errorf("Locate(%g) = %d, want %d", tc.z, got, tc.cell)
			}
			if got := m.LayerOf(tc.z); got != tc.layer {
				t.Errorf("LayerOf(%g) = %d, want %d", tc.z, got, tc.layer)
			}
		})
	}
	t.Run("every centre and face", func(t *testing.T) {
		g, err := Build([]Layer{{Thickness: 20 * um}, {Thickness: 5 * mm}, {Thickness: 1 * um}}, Options{Growth: 1.2})
		if err != nil {
			t.Fatal(err)
		}
		for i := range g.Cells() {
			// Source: analytic; a centre lies in its own cell, the face below a cell belongs to it.
			if got := g.Locate(g.Centers[i]); got != i {
				t.Errorf("Locate(centre %d) = %d", i, got)
			}
			if got := g.Locate(g.Faces[i+1]); got != i {
				t.Errorf("Locate(face %d) = %d, want %d", i+1, got, i)
			}
		}
		for j := range g.Layers {
			if got := g.LayerOf(g.Faces[g.First[j+1]]); got != j {
				t.Errorf("LayerOf(bottom face of layer %d) = %d", j, got)
			}
		}
	})
}

func TestBuildGradingRandomStacks(t *testing.T) {
	// Random stacks of automatic layers, 1 um to 50 mm, fixed seed. The
	// identities and the [mesh] growth bound (README Case file reference) must hold for all.
	rng := rand.New(rand.NewPCG(1, 2))
	for k := range 300 {
		layers := make([]Layer, 1+rng.IntN(6))
		for j := range layers {
			layers[j].Thickness = um * math.Pow(5e4, rng.Float64())
		}
		g := 1.05 + 2*rng.Float64()
		m, err := Build(layers, Options{Growth: g})
		if err != nil {
			t.Fatalf("stack %d %+v growth %g: %v", k, layers, g, err)
		}
		checkMesh(t, m, layers)
		// Source: README Case file reference, [mesh] growth (analytic bound).
		if r := m.MaxRatio(); r > g {
			t.Errorf("stack %d %+v growth %g: MaxRatio %g", k, layers, g, r)
		}
		for j, n := range cellsOf(m) {
			// Source: README Case file reference, [mesh]: growth never removes cells.
			if d := DefaultCells(layers[j].Thickness, 0); n < d {
				t.Errorf("stack %d layer %d: %d cells < default %d", k, j, n, d)
			}
		}
	}
}

func TestBuildManyAlternatingLayers(t *testing.T) {
	// 40 layers alternating 1 um and 50 mm with growth 1.05: the grading
	// must settle quickly and keep the bound (README Case file reference, [mesh], analytic).
	var layers []Layer
	for j := range 40 {
		th := 1 * um
		if j%2 == 1 {
			th = 50 * mm
		}
		layers = append(layers, Layer{Thickness: th})
	}
	m, err := Build(layers, Options{Growth: 1.05})
	if err != nil {
		t.Fatal(err)
	}
	checkMesh(t, m, layers)
	if r := m.MaxRatio(); r > 1.05 {
		t.Errorf("MaxRatio = %g > 1.05", r)
	}
	t.Logf("%d cells", m.Cells())
}

func TestBuildGradingRandomFixedLayers(t *testing.T) {
	// Random stacks where some layers fix their cells. A fixed count always
	// wins (README Case file reference, [mesh]); a neighbour ratio above growth is allowed only where the
	// coarse side is a fixed layer left uniform (Build's documented rule).
	rng := rand.New(rand.NewPCG(3, 4))
	for k := range 300 {
		layers := make([]Layer, 2+rng.IntN(5))
		for j := range layers {
			layers[j].Thickness = um * math.Pow(5e4, rng.Float64())
			if rng.IntN(3) == 0 {
				layers[j].Cells = 1 + rng.IntN(60)
			}
		}
		g := 1.1 + rng.Float64()
		m, err := Build(layers, Options{Growth: g})
		if err != nil {
			t.Fatalf("stack %d %+v growth %g: %v", k, layers, g, err)
		}
		checkMesh(t, m, layers)
		got := cellsOf(m)
		for j, l := range layers {
			if l.Cells > 0 && got[j] != l.Cells {
				t.Errorf("stack %d layer %d: %d cells, want its own %d", k, j, got[j], l.Cells)
			}
		}
		for i := 1; i < m.Cells(); i++ {
			a, b := m.Widths[i-1], m.Widths[i]
			if max(a/b, b/a) <= g {
				continue
			}
			c := i - 1
			if b > a {
				c = i
			}
			j := m.Owner[c]
			if layers[j].Cells == 0 || m.Owner[i-1] == m.Owner[i] {
				t.Errorf("stack %d %+v growth %g: ratio %g at cells %d, %d not explained by a fixed layer", k, layers, g, max(a/b, b/a), i-1, i)
				continue
			}
			for q := m.First[j]; q < m.First[j+1]; q++ {
				if math.Abs(m.Widths[q]-m.Widths[m.First[j]]) > 1e-12*m.Widths[q] {
					t.Errorf("stack %d: fixed layer %d out of ratio but not uniform", k, j)
					break
				}
			}
		}
	}
}
