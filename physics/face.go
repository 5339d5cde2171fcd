package physics

import "math"

// StefanBoltzmann is σ in W/(m²·K⁴) (CODATA 2018).
const StefanBoltzmann = 5.670374419e-8

// FaceKind is the kind of condition on an outer face of the stack.
type FaceKind int

// The face kinds of a case file's [top] and [bottom] (README Case file reference).
const (
	Insulated FaceKind = iota
	Convection
	Fixed
	Flux
)

var faceKindNames = [...]string{"insulated", "convection", "fixed", "flux"}

func (k FaceKind) String() string {
	if k < 0 || int(k) >= len(faceKindNames) {
		return "FaceKind(?)"
	}
	return faceKindNames[k]
}

// Face is the condition on the top or bottom face.
type Face struct {
	Kind       FaceKind
	H          float64  // convection coefficient, W/(m²·K)
	Emissivity float64  // radiation exchange with the air temperature, [0, 1]
	Air        Schedule // convection: air temperature, K
	Set        Schedule // fixed: face temperature, K
	Flux       Schedule // flux: heat flux into the part, W/m²
}

// Driver returns the temperature schedule that drives the part through this
// face (the air of a convective face, the set point of a fixed face), and
// false when the face drives no temperature.
func (f *Face) Driver() (*Schedule, bool) {
	switch f.Kind {
	case Convection:
		return &f.Air, true
	case Fixed:
		return &f.Set, true
	}
	return nil, false
}

// HeatIn returns the heat flux q (W/m², positive into the part) through the
// face at time t, its derivative with respect to the boundary cell's
// temperature Tc, and the face temperature Tf. R is the conduction
// resistance from the face to the cell centre, (w/2)/k, in m²·K/W.
//
// Convection with radiation solves, for Tf,
//
//	h·(Ta − Tf) + εσ·(Ta⁴ − Tf⁴) = (Tf − Tc)/R
//
// (radiation at the face temperature; README Case file reference, [top] and [bottom]) by Newton's method, which
// converges monotonically because the left side decreases and the right side
// increases in Tf. Insulated faces report Tf = Tc.
func (f *Face) HeatIn(t, Tc, R float64) (q, dqdTc, Tf float64) {
	switch f.Kind {
	case Fixed:
		Tf = f.Set.At(t)
		return (Tf - Tc) / R, -1 / R, Tf
	case Flux:
		q = f.Flux.At(t)
		return q, 0, Tc + q*R
	case Convection:
		Ta := f.Air.At(t)
		if f.Emissivity == 0 {
			g := 1 / (1/f.H + R)
			q = g * (Ta - Tc)
			return q, -g, Tc + q*R
		}
		es := f.Emissivity * StefanBoltzmann
		// Start from the convection-only face temperature.
		Tf = Tc + R*(Ta-Tc)/(1/f.H+R)
		if f.H == 0 {
			Tf = Ta
		}
		var dg float64
		for range 50 {
			g := f.H*(Ta-Tf) + es*(Ta*Ta*Ta*Ta-Tf*Tf*Tf*Tf) - (Tf-Tc)/R
			dg = -f.H - 4*es*Tf*Tf*Tf - 1/R
			step := g / dg
			Tf -= step
			if math.Abs(step) <= 1e-12*max(1, math.Abs(Tf)) {
				break
			}
		}
		dg = -f.H - 4*es*Tf*Tf*Tf - 1/R
		q = (Tf - Tc) / R
		dTf := (1 / R) / -dg // dTf/dTc
		return q, (dTf - 1) / R, Tf
	}
	return 0, 0, Tc
}
