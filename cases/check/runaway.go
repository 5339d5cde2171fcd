package check

import (
	"math"

	"cureslab/cases"
	"cureslab/physics"
	"cureslab/solver"
)

// Runaway is the Frank-Kamenetskii screen of one curing layer at the
// hottest hold of the case's program: does the layer have a steady state
// when its reaction runs at its fastest rate from the cure it has when the
// hold begins, with the heat leaving through its actual faces?
//
// The steady excess θ = E (T − T0)/(R T0²) over the hold temperature T0
// obeys θ″ + δ e^θ = 0 in the layer, with
//
//	δ = E/(R T0²) · ρ w_r H r · ℓ²/k,
//
// r the fastest isothermal rate at T0 from the cure at the hold's start, E
// the apparent activation energy R T0² ∂ln r/∂T there, and each face of the
// layer losing heat to surroundings at T0 through the layers beyond it
// (their thickness over conductivity, as at steady state), the contact
// resistances, and the face condition: a fixed face adds nothing, a
// convective face (or a flux face with air) 1/(h + 4εσT0³), an insulated
// or plain flux face blocks the path. Bi = (ℓ/k)/R_path per face, and the
// critical δ_c follows from both (physics.CriticalFK). ℓ is half the layer
// when heat leaves through both of its faces, the whole layer when through
// one.
type Runaway struct {
	T        float64 // hold temperature T0, K
	HoldFrom float64 // when the hottest hold begins, s; −Inf when the program starts at it
	// Cure is the estimated cure when the hold begins: the initial cure
	// followed along the hottest driving program with isothermal kinetics
	// (physics.Cure.CureAlong: no lag, no exotherm); the initial cure when
	// the hold begins at the start.
	Cure float64
	// Rate is the fastest isothermal rate at T0 over cure from Cure to 1
	// (1/s), at RateCure; ApparentE is R T0² ∂ln r/∂T there (J/mol).
	Rate, RateCure, ApparentE float64
	Length                    float64 // ℓ, m
	Half                      bool    // ℓ is half the layer (heat leaves through both faces)
	BiTop, BiBottom           float64 // Biot numbers of the layer's faces on ℓ; +Inf held, 0 blocked
	Delta, Critical           float64 // δ and δ_c on ℓ; Delta NaN when the rate is zero
	ConductionTime            float64 // ℓ²/a with a = k/(ρ c_p) at T0 and Cure, s
}

// runawayCaution is the fraction of δ_c from which check warns.
const runawayCaution = 0.8

// hottestProgram returns the driving program that reaches the highest
// temperature (a convective face's air, a fixed face's set temperature, the
// control program), nil when nothing drives the case.
func hottestProgram(pr *solver.Problem) *physics.Schedule {
	var best *physics.Schedule
	consider := func(s *physics.Schedule) {
		if best == nil || s.Max() > best.Max() {
			best = s
		}
	}
	for _, f := range []*physics.Face{&pr.Top, &pr.Bottom} {
		if s, ok := f.Driver(); ok {
			consider(s)
		}
	}
	if cases.Controlled(pr) {
		consider(&pr.Volumetric.Control.Program)
	}
	return best
}

// pathResistance returns the thermal resistance (m²·K/W) from the outer
// face of the stack to its surroundings at temperature T: 0 for a held
// face, 1/(h + 4εσT³) for a face exchanging heat with air (radiation
// linearised at T), +Inf for a face through which no heat leaves.
func pathResistance(f *physics.Face, T float64) float64 {
	switch {
	case f.Kind == physics.Fixed:
		return 0
	case f.HasAir():
		if h := f.H + 4*f.Emissivity*physics.StefanBoltzmann*T*T*T; h > 0 {
			return 1 / h
		}
	}
	return math.Inf(1)
}

// screenRunaway returns the runaway screen of layer j of c at temperature
// T0 (the hottest hold) of program prog (nil: the initial state is the
// hold). Preconditions: layer j cures.
func screenRunaway(c *cases.Case, j int, T0 float64, prog *physics.Schedule) Runaway {
	pr := c.Problem
	m := pr.Mesh
	mat := pr.Materials[j]
	cu := mat.Cure
	a0 := pr.InitialCure
	s := Runaway{T: T0, HoldFrom: math.Inf(-1), Cure: a0, Delta: math.NaN()}
	if prog != nil {
		if _, from, _ := prog.Hottest(); from > 0 {
			s.HoldFrom = from
			s.Cure = cu.CureAlong(prog, a0, from)
		}
	}
	// The fastest rate from the cure at the hold's start, on a grid of 400.
	for i := range 400 {
		a := s.Cure + (1-s.Cure)*float64(i)/400
		if r, _, _ := cu.Rate(T0, a); r > s.Rate {
			s.Rate, s.RateCure = r, a
		}
	}
	k, _, _ := mat.Conductivity.At(T0, s.Cure)
	cp, _, _ := mat.SpecificHeat.At(T0, s.Cure)
	L := m.Layers[j].Thickness

	// Resistances from the layer's faces to the surroundings.
	layerR := func(i int) float64 {
		a := 0.0
		if pr.Materials[i].Cure != nil {
			a = s.Cure
		}
		ki, _, _ := pr.Materials[i].Conductivity.At(T0, a)
		return m.Layers[i].Thickness / ki
	}
	rTop := pathResistance(&pr.Top, T0) + m.Layers[j].ContactResistance
	for i := range j {
		rTop += layerR(i) + m.Layers[i].ContactResistance
	}
	rBot := pathResistance(&pr.Bottom, T0)
	for i := j + 1; i < len(m.Layers); i++ {
		rBot += layerR(i) + m.Layers[i].ContactResistance
	}
	bi := func(r float64) float64 {
		if r == 0 {
			return math.Inf(1)
		}
		return L / k / r // 0 when r = +Inf
	}
	biTop, biBot := bi(rTop), bi(rBot)
	crit := physics.CriticalFK(biTop, biBot) // on L
	scale := 1.0                             // (ℓ/L)²
	s.Length = L
	if biTop > 0 && biBot > 0 {
		s.Half, s.Length, scale = true, L/2, 0.25
	}
	s.BiTop, s.BiBottom = biTop*s.Length/L, biBot*s.Length/L
	s.Critical = crit.Delta * scale
	s.ConductionTime = s.Length * s.Length * mat.Density * cp / k
	if s.Rate > 0 {
		r, rT, _ := cu.Rate(T0, s.RateCure)
		s.ApparentE = physics.GasConstant * T0 * T0 * rT / r
		qdot := mat.Density * cu.HeatPerMass() * r
		s.Delta = s.ApparentE / (physics.GasConstant * T0 * T0) * qdot * s.Length * s.Length / k
	}
	return s
}
