package mesh

import (
	"errors"
	"fmt"
	"math"
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

// DefaultMaxCell is the default largest cell size (SPEC §10).
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
// no Cells of its own (SPEC §10): max(4, ceil(thickness/maxCell − 1e-9)).
func DefaultCells(thickness, maxCell float64) int {
	if maxCell <= 0 {
		maxCell = DefaultMaxCell
	}
	return max(4, int(math.Ceil(thickness/maxCell-1e-9)))
}
