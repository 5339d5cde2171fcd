package physics

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Fibre is the reinforcement of a composite ply: its density, specific heat
// and conductivity along and across the fibre axis. A stack is 1-D through
// the thickness with the fibres in the plane of the ply, so only the
// transverse conductivity enters the mixture; the axial one is kept for the
// record (and for `check`).
type Fibre struct {
	Name                   string
	Density                float64  // kg/m³
	SpecificHeat           Property // J/(kg·K)
	AxialConductivity      Property // W/(m·K), along the fibre
	TransverseConductivity Property // W/(m·K), across the fibre
	Source                 string
}

// ConductivityModel is a micromechanics model of the conductivity of a
// unidirectional ply across its fibres (through the thickness of a stack of
// plies).
type ConductivityModel int

// The conductivity models. Each gives k of the ply from the fibre's
// transverse conductivity kf, the resin's km and the fibre volume fraction
// v (TransverseConductivity has the formulas).
const (
	// Maxwell is the Rayleigh / Maxwell–Garnett form for cylinders, the
	// Hashin–Shtrikman lower bound for transversely isotropic media.
	Maxwell ConductivityModel = iota
	// SpringerTsai is Springer & Tsai's square-array model.
	SpringerTsai
	// Series is resin and fibre in layers across the heat flow (the
	// Wiener lower bound).
	Series
)

// DefaultConductivityModel is the model a composite uses when none is
// named: Maxwell. It is the rigorous lower bound (Hashin–Shtrikman) for any
// arrangement of parallel fibres in a continuous resin that conducts alike
// in every transverse direction, exact for Hashin's composite-cylinder
// assemblage, defined at every fibre fraction, and within about 1.5 % of
// Rayleigh's square-array series at v = 0.6 for carbon/epoxy ratios
// (checked in the tests); Springer–Tsai treats the square array with
// adiabatic strips, which is a lower bound of that same array and reads
// about 3 % below Maxwell at v = 0.6.
const DefaultConductivityModel = Maxwell

var conductivityModelNames = [...]string{"maxwell", "springer-tsai", "series"}

func (m ConductivityModel) String() string {
	if m < 0 || int(m) >= len(conductivityModelNames) {
		return "ConductivityModel(?)"
	}
	return conductivityModelNames[m]
}

// ConductivityModels returns the names of the models as written in a case
// file.
func ConductivityModels() []string { return append([]string(nil), conductivityModelNames[:]...) }

// ParseConductivityModel returns the model named as in a case file.
func ParseConductivityModel(name string) (ConductivityModel, bool) {
	for i, n := range conductivityModelNames {
		if n == name {
			return ConductivityModel(i), true
		}
	}
	return 0, false
}

// MaxFibreFraction returns the largest fibre volume fraction the model is
// defined for: π/4 ≈ 0.785 for Springer–Tsai (touching fibres in a square
// array), just below 1 for the others.
func (m ConductivityModel) MaxFibreFraction() float64 {
	if m == SpringerTsai {
		return math.Pi / 4
	}
	return 1
}

// TransverseConductivity returns the conductivity of a unidirectional ply
// across its fibres from the fibre's transverse conductivity kf, the
// resin's km (both W/(m·K), > 0) and the fibre volume fraction v in [0, 1):
//
// Maxwell (Rayleigh, Phil. Mag. 34:481, 1892, the leading term of his
// square-array solution; Hashin–Shtrikman lower bound for kf > km, Hashin,
// J. Composite Materials 2:284, 1968; from memory):
//
//	k = km · (kf + km + v·(kf − km)) / (kf + km − v·(kf − km))
//
// Springer–Tsai (Springer & Tsai, J. Composite Materials 1:166, 1967,
// square array of round fibres, heat carried along strips across the cell
// with no heat exchanged between strips; formula from memory, checked in
// the tests against a quadrature of that unit cell):
//
//	k/km = (1 − 2q) + (1/β)·[π − 4/√(1 − β²q²) · arctan(√(1 − β²q²)/(1 + βq))],
//	q = √(v/π),  β = 2(km/kf − 1),
//
// continued analytically (arctan → artanh) for β²q² > 1 (fibres much
// poorer conductors than the resin) and by its Taylor series in β,
// 1 − vβ/2 + 4q³β²/3 − 3πq⁴β³/8 + 16q⁵β⁴/15, for |β| < 1e-3; it needs
// v ≤ π/4.
//
// Series (Wiener bound, exact for layers across the heat flow):
//
//	1/k = v/kf + (1 − v)/km
//
// Preconditions are checked by Mix; here a v outside the model's range
// gives NaN. Cost: a few operations (Springer–Tsai: one arctan and one
// square root).
func TransverseConductivity(model ConductivityModel, kf, km, v float64) float64 {
	if !(v >= 0 && v <= model.MaxFibreFraction()) || !(kf > 0 && km > 0) {
		return math.NaN()
	}
	switch model {
	case Series:
		return 1 / (v/kf + (1-v)/km)
	case SpringerTsai:
		return km * springerTsai(kf, km, v)
	default:
		d := v * (kf - km)
		return km * (kf + km + d) / (kf + km - d)
	}
}

// springerTsai returns k/km of the Springer–Tsai square-array model.
func springerTsai(kf, km, v float64) float64 {
	q := math.Sqrt(v / math.Pi)
	b := 2 * (km/kf - 1)
	if math.Abs(b) < 1e-3 {
		q2 := q * q
		return 1 - v*b/2 + 4*q2*q*b*b/3 - 3*math.Pi*q2*q2*b*b*b/8 + 16*q2*q2*q*b*b*b*b/15
	}
	c := 1 + b*q
	x := 1 - b*b*q*q
	var g float64 // 4/√x · arctan(√x/c), continued for x ≤ 0
	switch {
	case c <= 0:
		// β = −1/q: touching fibres (v = π/4) that conduct infinitely well.
		return math.Inf(1)
	case math.Abs(x) < 1e-12:
		g = 4 / c
	case x > 0:
		s := math.Sqrt(x)
		g = 4 / s * math.Atan(s/c)
	default:
		s := math.Sqrt(-x)
		g = 4 / s * math.Atanh(s/c)
	}
	return (1 - 2*q) + (math.Pi-g)/b
}

// ErrMix is returned (wrapped) by Mix for an invalid mixture.
var ErrMix = errors.New("invalid composite")

// Mix returns the material of a unidirectional ply of fibre f in resin at
// fibre volume fraction v, seen through its thickness (heat flowing across
// the fibres). Voids are not modelled.
//
//	ρ = v·ρf + (1 − v)·ρr                        (by volume)
//	wf = v·ρf/ρ,  wr = 1 − wf                    (mass fractions)
//	cp = wf·cpf + wr·cpr                         (by mass)
//	k  = model(kf transverse, kr, v)             (TransverseConductivity)
//
// The resin's cure section applies with its mass fraction: the ply's
// ResinFraction is wr times the resin's, so its heat of reaction per kg of
// ply is wr × the resin's (kinetics, gel point and glass transition are the
// resin's). Its viscosity law is the resin's (the resin is what flows). Its
// dielectric section applies with the resin's volume fraction, the fibre
// taken as lossless: the loss factors (constants and tables) are scaled by
// 1 − v, which is the power a uniform field deposits per m³ of ply;
// permittivity is the resin's. That is a first estimate for glass fibre and
// wrong for carbon fibre, which conducts: give measured ply data then.
//
// Properties that depend on temperature (tables) are combined at the union
// of the fibre's and the resin's table temperatures, exactly there and
// linearly between. Where the resin's conductivity depends on cure, the
// ply's is linear in cure between the ply with uncured and with cured resin
// (exact at α = 0 and 1; the models are not linear in km, but over the
// change of a resin's k with cure the difference is far below the data's
// uncertainty: 0.23 % at α = 0.5 for glass at v = 0.5 in a resin whose k
// rises by a quarter with cure, measured in the tests).
//
// Errors (ErrMix): a nil resin, v outside (0, model.MaxFibreFraction()),
// non-positive densities, specific heats or conductivities. The returned
// material shares no slices with its inputs that it could modify; its Cure,
// Dielectric and Viscosity are copies. Cost: O(table points).
func Mix(name string, f *Fibre, resin *Material, v float64, model ConductivityModel) (*Material, error) {
	switch {
	case f == nil || resin == nil:
		return nil, fmt.Errorf("%w: a fibre and a resin are needed", ErrMix)
	case !(v > 0 && v < model.MaxFibreFraction()):
		return nil, fmt.Errorf("%w: fibre volume fraction %g outside (0, %.4g) for the %s model", ErrMix, v, model.MaxFibreFraction(), model)
	case !(f.Density > 0) || !(f.SpecificHeat.Min() > 0) || !(f.TransverseConductivity.Min() > 0):
		return nil, fmt.Errorf("%w: fibre %q needs a positive density, specific heat and transverse conductivity", ErrMix, f.Name)
	case !(resin.Density > 0) || !(resin.SpecificHeat.Min() > 0) || !(resin.Conductivity.Min() > 0):
		return nil, fmt.Errorf("%w: resin %q needs a positive density, specific heat and conductivity", ErrMix, resin.Name)
	}
	rho := v*f.Density + (1-v)*resin.Density
	wf := v * f.Density / rho
	wr := 1 - wf
	cpMix := func(cr Property) Property {
		return combine(f.SpecificHeat, cr, func(a, b float64) float64 { return wf*a + wr*b })
	}
	kMix := func(kr Property) Property {
		return combine(f.TransverseConductivity, kr, func(a, b float64) float64 { return TransverseConductivity(model, a, b, v) })
	}
	m := &Material{
		Name:    name,
		Density: rho,
		SpecificHeat: Blend{
			Uncured: cpMix(resin.SpecificHeat.Uncured), HasCured: resin.SpecificHeat.HasCured,
		},
		Conductivity: Blend{
			Uncured: kMix(resin.Conductivity.Uncured), HasCured: resin.Conductivity.HasCured,
		},
		Source: fmt.Sprintf("mixture of %s (fibre volume fraction %g) in %s, conductivity by the %s model", f.Name, v, resin.Name, model),
		Composition: &Composition{
			Fibre: f.Name, Resin: resin.Name, FibreVolumeFraction: v, FibreMassFraction: wf,
			Model: model, FibreSource: f.Source,
		},
	}
	if m.SpecificHeat.HasCured {
		m.SpecificHeat.Cured = cpMix(resin.SpecificHeat.Cured)
	}
	if m.Conductivity.HasCured {
		m.Conductivity.Cured = kMix(resin.Conductivity.Cured)
	}
	if resin.Cure != nil {
		c := *resin.Cure
		c.ResinFraction *= wr
		m.Cure = &c
	}
	if resin.Viscosity != nil {
		vis := *resin.Viscosity
		m.Viscosity = &vis
	}
	if d := resin.Dielectric; d != nil {
		s := 1 - v
		nd := *d
		nd.LossFactor *= s
		nd.LossFactorCured *= s
		if d.LossTable != nil {
			t := d.LossTable.affine(0, s)
			nd.LossTable = &t
		}
		if d.LossTableCured != nil {
			t := d.LossTableCured.affine(0, s)
			nd.LossTableCured = &t
		}
		m.Dielectric = &nd
	}
	return m, nil
}

// MassFractions returns the fibre and resin mass fractions of a ply of
// fibre density rhoF and resin density rhoR at fibre volume fraction v.
func MassFractions(rhoF, rhoR, v float64) (wf, wr float64) {
	wf = v * rhoF / (v*rhoF + (1-v)*rhoR)
	return wf, 1 - wf
}

// affine returns the property a + b·p.
func (p Property) affine(a, b float64) Property {
	q := Property{t: append([]float64(nil), p.t...), v: make([]float64, len(p.v))}
	for i, x := range p.v {
		q.v[i] = a + b*x
	}
	return q
}

// combine returns the property g(p(T), q(T)), a constant when both are
// constant and otherwise a table at the union of their temperatures.
func combine(p, q Property, g func(a, b float64) float64) Property {
	if p.IsConstant() && q.IsConstant() {
		a, _ := p.At(0)
		b, _ := q.At(0)
		return Constant(g(a, b))
	}
	var ts []float64
	if !p.IsConstant() {
		ts = append(ts, p.t...)
	}
	if !q.IsConstant() {
		ts = append(ts, q.t...)
	}
	sort.Float64s(ts)
	out := Property{}
	for i, T := range ts {
		if i > 0 && T == ts[i-1] {
			continue
		}
		a, _ := p.At(T)
		b, _ := q.At(T)
		out.t = append(out.t, T)
		out.v = append(out.v, g(a, b))
	}
	return out
}
