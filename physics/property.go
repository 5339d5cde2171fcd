package physics

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Property is a material property as a function of temperature: a constant,
// or a table piecewise linear in temperature and held constant beyond its
// ends (README Case file reference, property tables). The zero value is the constant 0.
type Property struct {
	t, v []float64 // len(t) == len(v); len 1 means constant
}

// Constant returns the property that is v at every temperature.
func Constant(v float64) Property { return Property{t: []float64{0}, v: []float64{v}} }

// ErrTable is returned (wrapped) by NewTable for an invalid table.
var ErrTable = errors.New("invalid property table")

// NewTable returns the property interpolated linearly between the points
// (temps[i], values[i]). temps must be strictly increasing, with at least two
// points and matching lengths, and every number finite; the slices are copied.
func NewTable(temps, values []float64) (Property, error) {
	if len(temps) != len(values) {
		return Property{}, fmt.Errorf("%w: %d temperatures but %d values", ErrTable, len(temps), len(values))
	}
	if len(temps) < 2 {
		return Property{}, fmt.Errorf("%w: need at least two points, have %d", ErrTable, len(temps))
	}
	for i := range temps {
		if math.IsNaN(temps[i]) || math.IsInf(temps[i], 0) || math.IsNaN(values[i]) || math.IsInf(values[i], 0) {
			return Property{}, fmt.Errorf("%w: point %d is not finite", ErrTable, i+1)
		}
	}
	for i := 1; i < len(temps); i++ {
		if !(temps[i] > temps[i-1]) {
			return Property{}, fmt.Errorf("%w: temperatures must be strictly increasing (point %d is not above point %d)", ErrTable, i+1, i)
		}
	}
	return Property{t: append([]float64(nil), temps...), v: append([]float64(nil), values...)}, nil
}

// IsConstant reports whether p does not depend on temperature.
func (p Property) IsConstant() bool { return len(p.t) <= 1 }

// Points returns the table's temperatures and values (one point for a constant).
// The caller must not modify them.
func (p Property) Points() (temps, values []float64) { return p.t, p.v }

// At returns the value at temperature T and its derivative with respect to T.
// Beyond the table ends the value is held and the derivative is zero.
func (p Property) At(T float64) (v, dvdT float64) {
	n := len(p.t)
	switch {
	case n == 0:
		return 0, 0
	case n == 1 || T <= p.t[0]:
		return p.v[0], 0
	case T >= p.t[n-1]:
		return p.v[n-1], 0
	}
	i := sort.SearchFloat64s(p.t, T) // p.t[i-1] < T <= p.t[i]
	if i == 0 {
		i = 1
	}
	s := (p.v[i] - p.v[i-1]) / (p.t[i] - p.t[i-1])
	return p.v[i-1] + s*(T-p.t[i-1]), s
}

// Min returns the smallest value the property takes.
func (p Property) Min() float64 {
	if len(p.v) == 0 {
		return 0
	}
	m := p.v[0]
	for _, x := range p.v[1:] {
		m = min(m, x)
	}
	return m
}

// Blend is a property that is linear in degree of cure between an uncured
// and a cured value (README Case file reference, [materials.NAME]):
//
//	p(T, α) = (1 − α)·Uncured(T) + α·Cured(T)
//
// When HasCured is false the property does not depend on α.
type Blend struct {
	Uncured  Property
	Cured    Property
	HasCured bool
}

// Inert returns a Blend that does not depend on cure.
func Inert(p Property) Blend { return Blend{Uncured: p} }

// At returns p(T, α) and its partial derivatives with respect to T and α.
func (b *Blend) At(T, a float64) (v, dvdT, dvda float64) {
	u, du := b.Uncured.At(T)
	if !b.HasCured {
		return u, du, 0
	}
	c, dc := b.Cured.At(T)
	return u + a*(c-u), du + a*(dc-du), c - u
}

// Linear reports whether the blend does not depend on temperature, and then
// returns it as p(α) = v0 + α·slope (slope 0 without a cured value). The
// solver uses it to skip the table lookups of At for such materials.
func (b *Blend) Linear() (v0, slope float64, ok bool) {
	if !b.Uncured.IsConstant() || len(b.Uncured.v) == 0 {
		return 0, 0, false
	}
	v0 = b.Uncured.v[0]
	if !b.HasCured {
		return v0, 0, true
	}
	if !b.Cured.IsConstant() || len(b.Cured.v) == 0 {
		return 0, 0, false
	}
	return v0, b.Cured.v[0] - v0, true
}

// Min returns the smallest value the blend takes over all T and α.
func (b *Blend) Min() float64 {
	if !b.HasCured {
		return b.Uncured.Min()
	}
	return min(b.Uncured.Min(), b.Cured.Min())
}
