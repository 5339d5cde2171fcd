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
	H          float64  // convection coefficient, W/(m²·K); convection, and optionally flux
	Emissivity float64  // radiation exchange with the air temperature, [0, 1]
	Air        Schedule // air temperature, K: convection, and a flux face with H or Emissivity > 0
	Set        Schedule // fixed: face temperature, K
	Flux       Schedule // flux: imposed heat flux into the part, W/m²
}

// Driver returns the temperature schedule that drives the part through this
// face (the air of a convective face, the set point of a fixed face), and
// false when the face drives no temperature. A flux face drives none even
// when it also exchanges heat with air: its imposed flux, not a
// temperature, heats the part, and its air only takes heat away.
func (f *Face) Driver() (*Schedule, bool) {
	switch f.Kind {
	case Convection:
		return &f.Air, true
	case Fixed:
		return &f.Set, true
	}
	return nil, false
}

// HasAir reports whether the face exchanges heat with its air (a
// convective face, or a flux face with H or Emissivity > 0).
func (f *Face) HasAir() bool {
	switch f.Kind {
	case Convection:
		return true
	case Flux:
		return f.H > 0 || f.Emissivity > 0
	}
	return false
}

// Linear reports whether the face's heat flux is affine in the boundary
// cell's temperature with a constant slope (no radiation). A kind not
// listed here is nonlinear.
func (f *Face) Linear() bool {
	switch f.Kind {
	case Insulated, Fixed:
		return true
	case Convection, Flux:
		return f.Emissivity == 0
	}
	return false
}

// HeatIn returns the heat flux q (W/m², positive into the part) through the
// face at time t, its derivative with respect to the boundary cell's
// temperature Tc, and the face temperature Tf. R is the conduction
// resistance from the face to the cell centre, (w/2)/k, in m²·K/W.
//
// A convective face, and a flux face that also exchanges heat with its air,
// solve for Tf the face balance
//
//	q0 + h·(Ta − Tf) + εσ·(Ta⁴ − Tf⁴) = (Tf − Tc)/R
//
// with q0 the imposed flux (0 on a convective face) and radiation at the
// face temperature (README, Case file reference, [top] and [bottom]).
// Without radiation it is linear:
// q = (q0 + h·(Ta − Tc))/(1 + h·R), dq/dTc = −1/(1/h + R). With radiation,
// Newton's method from the convection-only root: the left side is decreasing
// and concave in Tf and the right side linear, so after the first step the
// iterates fall monotonically onto the root (at most a handful of steps).
// dq/dTc is then exact by implicit differentiation of the balance:
// dTf/dTc = (1/R)/(h + 4εσTf³ + 1/R). Insulated faces report Tf = Tc.
func (f *Face) HeatIn(t, Tc, R float64) (q, dqdTc, Tf float64) {
	q0 := 0.0
	switch f.Kind {
	case Fixed:
		Tf = f.Set.At(t)
		return (Tf - Tc) / R, -1 / R, Tf
	case Flux:
		q0 = f.Flux.At(t)
		if !f.HasAir() {
			return q0, 0, Tc + q0*R
		}
	case Convection:
	default:
		return 0, 0, Tc
	}
	Ta := f.Air.At(t)
	if f.Emissivity == 0 {
		den := 1 + f.H*R
		q = (q0 + f.H*(Ta-Tc)) / den
		return q, -f.H / den, Tc + q*R
	}
	es := f.Emissivity * StefanBoltzmann
	// Start from the convection-only face temperature.
	Tf = Tc + R*(q0+f.H*(Ta-Tc))/(1+f.H*R)
	if f.H == 0 && q0 == 0 {
		Tf = Ta
	}
	var dg float64
	for range 60 {
		g := q0 + f.H*(Ta-Tf) + es*(Ta*Ta*Ta*Ta-Tf*Tf*Tf*Tf) - (Tf-Tc)/R
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
