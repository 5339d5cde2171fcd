package mesh

import (
	"fmt"
	"math"
)

// Bounds on a layer thickness, m. Outside them the input is taken to be a
// mistake (a unit slip) rather than a part.
const (
	minThickness = 1e-9
	maxThickness = 1e3
)

// Build returns the mesh of the given layers, listed top to bottom.
//
// Cell count of layer j (README Case file reference, [mesh]):
//
//	n_j = Cells                                   if the layer gives Cells,
//	n_j ≥ max(4, ceil(t_j/max_cell − 1e-9))      otherwise (DefaultCells),
//
// with max_cell = opt.MaxCell, default DefaultMaxCell (0.25 mm).
//
// Without grading (opt.Growth 0 or 1) every layer has n_j equal cells, n_j
// being exactly the default count where Cells is not given.
//
// With grading (opt.Growth = g > 1) each layer is a uniform core of cells of
// size c flanked by a geometric zone at each of its two faces:
//
//	c·q^−m_top, …, c·q^−1,  c, …, c,  c·q^−1, …, c·q^−m_bot
//	c = t_j / (k + Σ_{i=1..m_top} q^−i + Σ_{i=1..m_bot} q^−i)
//
// where k is the number of core cells and q = 1 + (g−1)(1 − 1e-9) is a
// hair below g, so the ratio inside a layer stays ≤ g after round-off. The
// widths then add up to t_j by construction, whatever k, m_top and m_bot
// are. Method: start with no zones; sweep over the layer faces and, while
// the cells on the two sides of a face differ by more than g, add one zone
// cell on the coarse side (which shrinks that side's face cell by at least
// the factor q); repeat the sweeps until no face changes. A thick layer next
// to a thin one so starts with small cells and grows geometrically, ratio
// ≤ g, toward its interior.
//
//   - A layer without Cells keeps k = its default count and gains the zone
//     cells on top: growth adds cells, never removes them, and no cell
//     exceeds max_cell (c ≤ t_j/k).
//   - A layer with Cells keeps exactly that count: zone cells are taken from
//     its core (at least one core cell stays). If that cannot bring a face
//     within g, the layer is left uniform (the user's choice wins) and
//     MaxRatio reports the ratio that remains.
//   - The outer faces (top of the first layer, bottom of the last) are not
//     refined: near a face of the part the cells are the layer's core size,
//     which is at most max_cell already. Grading is toward thin layers, i.e.
//     toward fine cells across a layer face.
//
// Faces at layer boundaries are set to the running sum of the thicknesses
// (not accumulated from widths), so Faces[First[j+1]] equals t_0 + … + t_j
// exactly as that sum rounds; inside a layer faces accumulate the widths,
// Centers are face midpoints, and Widths hold the designed sizes (which
// differ from face differences by round-off only).
//
// Errors (never panics): no layers, a thickness outside [1 nm, 1 km] or not
// finite, negative Cells, a negative or infinite contact resistance or one on
// the first layer (wrapped ErrLayer inside a *LayerError); MaxCell negative
// or not finite, Growth negative, in (0, 1), NaN or infinite (ErrOptions);
// more than MaxTotalCells cells in all (ErrTooLarge, inside a *LayerError
// when one layer alone is too large).
//
// Cost: O(n) memory; time O(n + r·L) for n cells, L layers and r zone cells
// added by grading (r ≤ n). Built once per run.
func Build(layers []Layer, opt Options) (*Mesh, error) {
	if err := validate(layers, opt); err != nil {
		return nil, err
	}
	maxCell := opt.MaxCell
	if maxCell == 0 {
		maxCell = DefaultMaxCell
	}
	plans := make([]plan, len(layers))
	total := 0
	for j, l := range layers {
		n, auto := l.Cells, false
		if n == 0 {
			n, auto = DefaultCells(l.Thickness, maxCell), true
		}
		if n > MaxTotalCells {
			if auto {
				return nil, &LayerError{j, fmt.Errorf("%w: %g m at max_cell %g m needs about %.3g cells; at most %d are allowed", ErrTooLarge, l.Thickness, maxCell, math.Ceil(l.Thickness/maxCell), MaxTotalCells)}
			}
			return nil, &LayerError{j, fmt.Errorf("%w: %d cells asked; at most %d are allowed", ErrTooLarge, n, MaxTotalCells)}
		}
		total += n
		if total > MaxTotalCells {
			return nil, fmt.Errorf("%w: the layers need %d cells or more in all; at most %d are allowed (check max_cell and the thicknesses)", ErrTooLarge, total, MaxTotalCells)
		}
		plans[j] = plan{t: l.Thickness, n: n, auto: auto}
	}
	lad := newLadder(opt.Growth)
	if opt.Growth > 1 {
		if err := grade(plans, opt.Growth, lad, total); err != nil {
			return nil, err
		}
	}
	return assemble(layers, plans, lad), nil
}

func validate(layers []Layer, opt Options) error {
	if math.IsNaN(opt.MaxCell) || math.IsInf(opt.MaxCell, 0) || opt.MaxCell < 0 {
		return fmt.Errorf("%w: max_cell must be a positive length, or 0 for the default %g m; got %g m", ErrOptions, DefaultMaxCell, opt.MaxCell)
	}
	if !(opt.Growth == 0 || opt.Growth >= 1) || math.IsInf(opt.Growth, 0) {
		return fmt.Errorf("%w: growth must be 0 or 1 (no grading) or a finite ratio above 1, got %g", ErrOptions, opt.Growth)
	}
	if len(layers) == 0 {
		return fmt.Errorf("%w: the stack has no layers", ErrLayer)
	}
	for i, l := range layers {
		var err error
		switch {
		case !(l.Thickness >= minThickness && l.Thickness <= maxThickness):
			err = fmt.Errorf("%w: thickness must be between %g m and %g m, got %g m", ErrLayer, minThickness, maxThickness, l.Thickness)
		case l.Cells < 0:
			err = fmt.Errorf("%w: cells must be positive (or absent), got %d", ErrLayer, l.Cells)
		case !(l.ContactResistance >= 0) || math.IsInf(l.ContactResistance, 0):
			err = fmt.Errorf("%w: contact resistance must be finite and not negative, got %g m²K/W", ErrLayer, l.ContactResistance)
		case i == 0 && l.ContactResistance != 0:
			err = fmt.Errorf("%w: the first layer has no layer above it for a contact resistance", ErrLayer)
		}
		if err != nil {
			return &LayerError{i, err}
		}
	}
	return nil
}

// ladder holds the powers q^−i and their partial sums, grown on demand.
type ladder struct {
	q   float64
	pow []float64 // pow[i] = q^−i, pow[0] = 1
	sum []float64 // sum[m] = Σ_{i=1..m} q^−i, sum[0] = 0
}

func newLadder(g float64) *ladder {
	q := 1.0
	if g > 1 {
		q = 1 + (g-1)*(1-1e-9)
	}
	return &ladder{q: q, pow: []float64{1}, sum: []float64{0}}
}

func (l *ladder) grow(m int) {
	for len(l.pow) <= m {
		p := l.pow[len(l.pow)-1] / l.q
		l.pow = append(l.pow, p)
		l.sum = append(l.sum, l.sum[len(l.sum)-1]+p)
	}
}

// plan is the cell layout of one layer: mt top zone cells, a core, mb bottom
// zone cells.
type plan struct {
	t      float64 // thickness, m
	n      int     // automatic layer: core cells; fixed layer: all cells
	auto   bool    // count from Options, not from Layer.Cells
	frozen bool    // fixed layer that could not be graded: kept uniform
	mt, mb int
}

func (p *plan) core() int {
	if p.auto {
		return p.n
	}
	return p.n - p.mt - p.mb
}

// size is the core cell size c.
func (p *plan) size(l *ladder) float64 {
	return p.t / (float64(p.core()) + l.sum[p.mt] + l.sum[p.mb])
}

// top and bottom are the sizes of the cells at the layer's two faces.
func (p *plan) top(l *ladder) float64    { return p.size(l) * l.pow[p.mt] }
func (p *plan) bottom(l *ladder) float64 { return p.size(l) * l.pow[p.mb] }

// refine adds a zone cell at the top or bottom face and reports whether that
// made the face cell smaller. A fixed layer moves a core cell into the zone,
// keeping one core cell; it refuses when that would not shrink the face cell.
func (p *plan) refine(atTop bool, l *ladder) bool {
	if p.frozen || (!p.auto && p.core() <= 1) {
		return false
	}
	face, m := p.bottom, &p.mb
	if atTop {
		face, m = p.top, &p.mt
	}
	old := face(l)
	*m++
	l.grow(*m)
	if !p.auto && !(face(l) < old) {
		*m--
		return false
	}
	return true
}

// grade adds zone cells until neighbouring cells across every layer face
// differ by at most g, or a fixed layer makes that impossible (it is then
// made uniform again and frozen). total is the current cell count.
//
// Termination: every refinement either adds a cell to an automatic layer
// (bounded by MaxTotalCells) or moves one of the finitely many core cells of
// a fixed layer, and a layer is frozen at most once.
func grade(plans []plan, g float64, l *ladder, total int) error {
	for {
		for changed := true; changed; {
			changed = false
			for j := 0; j+1 < len(plans); j++ {
				up, lo := &plans[j], &plans[j+1]
				for {
					a, b := up.bottom(l), lo.top(l)
					p, atTop := up, false
					switch {
					case a/b > g:
					case b/a > g:
						p, atTop = lo, true
					default:
						p = nil
					}
					if p == nil || !p.refine(atTop, l) {
						break
					}
					changed = true
					if p.auto {
						total++
						if total > MaxTotalCells {
							return fmt.Errorf("%w: grading to a growth ratio of %g needs more than %d cells (raise growth, or check the layer thicknesses)", ErrTooLarge, g, MaxTotalCells)
						}
					}
				}
			}
		}
		// A face still out of ratio has a fixed layer on its coarse side that
		// could not be refined further: keep that layer uniform and regrade.
		again := false
		for j := 0; j+1 < len(plans); j++ {
			up, lo := &plans[j], &plans[j+1]
			a, b := up.bottom(l), lo.top(l)
			var p *plan
			switch {
			case a/b > g:
				p = up
			case b/a > g:
				p = lo
			}
			if p != nil && !p.auto && !p.frozen {
				p.frozen, p.mt, p.mb = true, 0, 0
				again = true
			}
		}
		if !again {
			return nil
		}
	}
}

func assemble(layers []Layer, plans []plan, l *ladder) *Mesh {
	n := 0
	for i := range plans {
		n += plans[i].core() + plans[i].mt + plans[i].mb
	}
	m := &Mesh{
		Layers:  append([]Layer(nil), layers...),
		Faces:   make([]float64, 1, n+1),
		Centers: make([]float64, n),
		Widths:  make([]float64, 0, n),
		Owner:   make([]int, 0, n),
		First:   make([]int, 0, len(layers)+1),
	}
	add := func(j int, w float64) {
		m.Widths = append(m.Widths, w)
		m.Owner = append(m.Owner, j)
		m.Faces = append(m.Faces, m.Faces[len(m.Faces)-1]+w)
	}
	z := 0.0
	for j := range plans {
		p := &plans[j]
		m.First = append(m.First, len(m.Widths))
		c := p.size(l)
		for i := p.mt; i >= 1; i-- {
			add(j, c*l.pow[i])
		}
		for range p.core() {
			add(j, c)
		}
		for i := 1; i <= p.mb; i++ {
			add(j, c*l.pow[i])
		}
		z += p.t
		m.Faces[len(m.Faces)-1] = z
	}
	m.First = append(m.First, n)
	for i := range m.Centers {
		m.Centers[i] = 0.5 * (m.Faces[i] + m.Faces[i+1])
	}
	return m
}
