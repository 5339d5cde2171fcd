package physics

import (
	"errors"
	"fmt"
	"math"
)

// Isoconversional is a model-free cure law: a table of the degree of cure
// α_j against the activation energy E_j and the intercept ln[A·f(α)]_j, as
// Friedman's isoconversional analysis gives them, and the rate
//
//	dα/dt = exp(ln[A·f(α)] − E(α)/(R·T)),
//
// with E and ln[A·f] linear in α between the rows (Friedman, J. Polym.
// Sci. C 6:183, 1964; prediction from E_α and ln[A·f(α)] as recommended by
// the ICTAC Kinetics Committee, Vyazovkin et al., Thermochim. Acta 520:1,
// 2011 and 590:1, 2014).
//
// Outside the table:
//   - below the first row (α < α_1) E and ln[A·f] are held at the first
//     row's values, so a resin starts to react from α = 0 at the rate of
//     the first tabulated level (the rate is then independent of α there,
//     ∂r/∂α = 0). A table from DSC scans starts at a small α (fit's
//     starts at 0.01) where the rate is small, so this reads the start of
//     the cure as zero order; no extrapolation of a fitted shape is
//     implied.
//   - above the last row (α > α_n) the rate is zero: the table ends where
//     the measured cure ends. The rate jumps there from its last tabulated
//     value to zero; End returns α_n so that a time stepper can hold a
//     cell at α_n the way it holds one at full cure. At α = α_n itself the
//     rate is the last row's (the limit from below).
//
// Derivatives: ∂r/∂T = r·E/(R·T²); ∂r/∂α = r·(s_lnAf − s_E/(R·T)) with
// the slopes s of the row interval that holds α (the one-sided slope from
// above at a row, the left interval's at α_n). At α ≥ 1 everything is zero.
//
// Construct it with NewIsoconversional, which checks the table.
type Isoconversional struct {
	alpha, e, lnAf []float64
}

// ErrIsoTable is returned (wrapped) by NewIsoconversional for an invalid
// table.
var ErrIsoTable = errors.New("invalid isoconversional table")

// NewIsoconversional returns the law of the table (alpha[j], E[j],
// lnAf[j]): alpha strictly increasing in (0, 1], at least two rows, every
// number finite, E in J/mol, lnAf the natural logarithm of a rate in 1/s.
// The slices are copied. Cost: O(rows).
func NewIsoconversional(alpha, E, lnAf []float64) (*Isoconversional, error) {
	n := len(alpha)
	if len(E) != n || len(lnAf) != n {
		return nil, fmt.Errorf("%w: %d values of alpha, %d of E and %d of lnAf; the three lists need the same length", ErrIsoTable, n, len(E), len(lnAf))
	}
	if n < 2 {
		return nil, fmt.Errorf("%w: need at least two rows, have %d", ErrIsoTable, n)
	}
	for j := range n {
		if !finiteF(alpha[j]) || !finiteF(E[j]) || !finiteF(lnAf[j]) {
			return nil, fmt.Errorf("%w: row %d is not finite", ErrIsoTable, j+1)
		}
		if !(alpha[j] > 0 && alpha[j] <= 1) {
			return nil, fmt.Errorf("%w: alpha %g in row %d is outside (0, 1]", ErrIsoTable, alpha[j], j+1)
		}
		if j > 0 && !(alpha[j] > alpha[j-1]) {
			return nil, fmt.Errorf("%w: alpha must increase strictly (row %d is not above row %d)", ErrIsoTable, j+1, j)
		}
	}
	return &Isoconversional{
		alpha: append([]float64(nil), alpha...),
		e:     append([]float64(nil), E...),
		lnAf:  append([]float64(nil), lnAf...),
	}, nil
}

func finiteF(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// Name implements Kinetics.
func (*Isoconversional) Name() string { return "isoconversional" }

// Table returns the rows: degrees of cure, activation energies (J/mol) and
// ln[A·f(α)] (ln 1/s). The caller must not modify them.
func (m *Isoconversional) Table() (alpha, E, lnAf []float64) { return m.alpha, m.e, m.lnAf }

// End returns the last tabulated degree of cure, past which the rate is
// zero.
func (m *Isoconversional) End() float64 { return m.alpha[len(m.alpha)-1] }

// Rate implements Kinetics.
//
// Cost: a search over the rows (linear from the start; tables have tens of
// rows) and one exponential.
func (m *Isoconversional) Rate(T, a float64) (r, drdT, drda float64) {
	n := len(m.alpha)
	if a >= 1 || a > m.alpha[n-1] {
		return 0, 0, 0
	}
	inv := 1 / (GasConstant * T)
	if a < m.alpha[0] {
		r = fexp(m.lnAf[0] - m.e[0]*inv)
		return r, r * m.e[0] * inv / T, 0
	}
	// α_{j−1} < α ≤ α_j, except that at a row α_j < α_n the interval
	// above it is used (α_j ≤ α < α_{j+1}).
	j := 1
	for j < n-1 && m.alpha[j] <= a {
		j++
	}
	da := m.alpha[j] - m.alpha[j-1]
	f := (a - m.alpha[j-1]) / da
	sE := (m.e[j] - m.e[j-1]) / da
	sL := (m.lnAf[j] - m.lnAf[j-1]) / da
	E := m.e[j-1] + f*(m.e[j]-m.e[j-1])
	L := m.lnAf[j-1] + f*(m.lnAf[j]-m.lnAf[j-1])
	r = fexp(L - E*inv)
	return r, r * E * inv / T, r * (sL - sE*inv)
}
