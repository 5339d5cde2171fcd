package mesh

import "fmt"

// Build returns the mesh of the given layers (top to bottom).
//
// A layer's Cells wins; otherwise it gets DefaultCells(thickness, MaxCell)
// cells. With Growth > 1, cells are graded geometrically toward faces where a
// neighbouring cell is smaller, adding cells where needed (never removing).
func Build(layers []Layer, opt Options) (*Mesh, error) {
	if len(layers) == 0 {
		return nil, fmt.Errorf("%w: the stack has no layers", ErrLayer)
	}
	for i, l := range layers {
		switch {
		case !(l.Thickness > 0) || l.Thickness > 1e3:
			return nil, &LayerError{i, fmt.Errorf("%w: thickness must be positive and finite, got %g m", ErrLayer, l.Thickness)}
		case l.Cells < 0:
			return nil, &LayerError{i, fmt.Errorf("%w: cells must be positive, got %d", ErrLayer, l.Cells)}
		case !(l.ContactResistance >= 0):
			return nil, &LayerError{i, fmt.Errorf("%w: contact resistance must not be negative, got %g m²K/W", ErrLayer, l.ContactResistance)}
		case i == 0 && l.ContactResistance != 0:
			return nil, &LayerError{i, fmt.Errorf("%w: the first layer has no layer above it for a contact resistance", ErrLayer)}
		}
	}
	m := &Mesh{Layers: append([]Layer(nil), layers...), Faces: []float64{0}}
	z := 0.0
	for j, l := range layers {
		n := l.Cells
		if n == 0 {
			n = DefaultCells(l.Thickness, opt.MaxCell)
		}
		m.First = append(m.First, len(m.Widths))
		w := l.Thickness / float64(n)
		for i := range n {
			m.Widths = append(m.Widths, w)
			m.Centers = append(m.Centers, z+(float64(i)+0.5)*w)
			m.Owner = append(m.Owner, j)
			m.Faces = append(m.Faces, z+float64(i+1)*w)
		}
		z += l.Thickness
		m.Faces[len(m.Faces)-1] = z
	}
	m.First = append(m.First, len(m.Widths))
	return m, nil
}
