package mesh

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Layer describes one layer of the stack, listed top to bottom.
type Layer struct {
	Name      string
	Thickness float64 // m, > 0
	// Cells fixes the number of cells; 0 means "from Options".
	Cells int
	// ContactResistance is the thermal contact resistance at the face
	// shared with the layer above, m²·K/W, ≥ 0. Must be 0 on the first layer.
	ContactResistance float64
}

// Options control the automatic cell count. The zero value means defaults.
type Options struct {
	// MaxCell is the largest cell size where a layer gives no Cells, in m.
	// Default 0.25 mm.
	MaxCell float64
	// Growth, when > 1, grades cells geometrically so that neighbouring
	// cells differ in size by at most this ratio, across layer faces too.
	// 0 or 1 means no grading (uniform cells within each layer).
	Growth float64
}

// DefaultMaxCell is the default largest cell size (README Case file reference, [mesh]).
const DefaultMaxCell = 0.25e-3

// Mesh is the grid. All slices are indexed top to bottom.
type Mesh struct {
	Layers  []Layer
	Faces   []float64 // depth of each face, len n+1; Faces[0] = 0
	Centers []float64 // depth of each cell centre, len n
	Widths  []float64 // cell widths, len n
	Owner   []int     // layer index of each cell, len n
	First   []int     // first cell of each layer, len len(Layers)+1; First[len(Layers)] = n
}

// ErrLayer is returned (wrapped) for an invalid layer description.
var ErrLayer = errors.New("invalid layer")

// ErrOptions is returned (wrapped) for invalid Options.
var ErrOptions = errors.New("invalid mesh options")

// ErrTooLarge is returned (wrapped) when the mesh would need more than
// MaxTotalCells cells.
var ErrTooLarge = errors.New("mesh too large")

// MaxTotalCells is the largest number of cells Build accepts. A 1-D stack
// that needs more is almost certainly an input mistake (a unit slip in a
// thickness or in max_cell, or a growth ratio too close to 1).
const MaxTotalCells = 200_000

// LayerError reports which layer is invalid.
type LayerError struct {
	Index int // 0-based
	Err   error
}

func (e *LayerError) Error() string { return fmt.Sprintf("layer %d: %v", e.Index, e.Err) }
func (e *LayerError) Unwrap() error { return e.Err }

// Cells returns the number of cells.
func (m *Mesh) Cells() int { return len(m.Widths) }

// Thickness returns the total thickness.
func (m *Mesh) Thickness() float64 { return m.Faces[len(m.Faces)-1] }

// DefaultCells returns the cell count of a layer of the given thickness with
// no Cells of its own (README Case file reference, [mesh]): max(4, ceil(thickness/maxCell − 1e-9)).
//
// A maxCell ≤ 0 means DefaultMaxCell. A count beyond 2^53, or a NaN
// thickness (absurd input), saturates at math.MaxInt instead of overflowing,
// so a count limit downstream rejects it.
func DefaultCells(thickness, maxCell float64) int {
	if maxCell <= 0 {
		maxCell = DefaultMaxCell
	}
	f := math.Ceil(thickness/maxCell - 1e-9)
	if !(f <= 1<<53) { // also NaN
		return math.MaxInt
	}
	return max(4, int(f))
}

// Locate returns the cell that contains depth z.
//
// Cell i spans Faces[i] < z ≤ Faces[i+1]: a depth on a face belongs to the
// cell above it (cell 0 for z = 0), which makes a depth exactly on a layer
// face read the upper layer's side (README Case file reference, [output]). A depth within 1e-9 of the
// smaller adjacent cell width of a face counts as on that face, so a depth
// typed by a user and a face position summed from layer thicknesses agree
// despite round-off.
//
// Locate returns -1 for a depth outside [0, Thickness] (beyond that
// tolerance) or NaN. Cost: O(log n).
func (m *Mesh) Locate(z float64) int {
	n := len(m.Widths)
	if n == 0 || math.IsNaN(z) {
		return -1
	}
	// i is the first face at or below z.
	i := sort.SearchFloat64s(m.Faces, z)
	// Snap to the face above z (i-1) or the face at/below z (i) when within
	// the tolerance; snapping to a face f means the cell above it, f-1.
	for _, f := range []int{i - 1, i} {
		if f < 0 || f > n {
			continue
		}
		w := math.Inf(1)
		if f > 0 {
			w = m.Widths[f-1]
		}
		if f < n {
			w = min(w, m.Widths[f])
		}
		if math.Abs(z-m.Faces[f]) <= 1e-9*w {
			return max(f-1, 0)
		}
	}
	if i == 0 || i > n {
		return -1
	}
	return i - 1
}

// LayerOf returns the index of the layer that contains depth z, with the
// conventions of Locate: a depth exactly on a layer face belongs to the upper
// layer (README Case file reference, [output]), and -1 means z is outside the stack or NaN.
// Cost: O(log n).
func (m *Mesh) LayerOf(z float64) int {
	i := m.Locate(z)
	if i < 0 {
		return -1
	}
	return m.Owner[i]
}

// MaxRatio returns the largest size ratio of neighbouring cells,
//
//	max over i of max(w[i]/w[i+1], w[i+1]/w[i]),
//
// across layer faces too; 1 for a mesh of one cell. Build with Growth > 1
// keeps it ≤ Growth unless a layer's fixed Cells prevents it, so a caller
// can warn when MaxRatio exceeds the requested Growth. Cost: O(n).
func (m *Mesh) MaxRatio() float64 {
	r := 1.0
	for i := 1; i < len(m.Widths); i++ {
		a, b := m.Widths[i-1], m.Widths[i]
		r = max(r, a/b, b/a)
	}
	return r
}
