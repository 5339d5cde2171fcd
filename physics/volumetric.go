package physics

import "math"

// VacuumPermittivity is ε0 in F/m (CODATA 2018).
const VacuumPermittivity = 8.8541878128e-12

// SpeedOfLight is c in m/s (exact).
const SpeedOfLight = 299792458.0

// Loss returns the loss factor ε″ at temperature T (K) and cure α, linear
// in cure between the uncured and cured values (each a constant or a table
// in temperature), and its partial derivatives with respect to T and α.
func (d *Dielectric) Loss(T, a float64) (eps2, deps2dT, deps2da float64) {
	u, du := d.LossFactor, 0.0
	if d.LossTable != nil {
		u, du = d.LossTable.At(T)
	}
	c, dc := d.LossFactorCured, 0.0
	if d.LossTableCured != nil {
		c, dc = d.LossTableCured.At(T)
	}
	return u + a*(c-u), du + a*(dc-du), c - u
}

// PowerDensity returns the power absorbed per unit volume, in W/m³, by a
// dielectric of loss factor eps2 in a uniform rms electric field E (V/m) at
// frequency f (Hz):
//
//	P = 2π f ε0 ε″ E²,
//
// Metaxas & Meredith, Industrial Microwave Heating (1983), ch. 2.
func PowerDensity(f, eps2, E float64) float64 {
	return 2 * math.Pi * f * VacuumPermittivity * eps2 * E * E
}

// PenetrationDepth returns the power penetration depth D_p in m, the depth at
// which the absorbed power has fallen to 1/e of its value at the surface:
//
//	D_p = λ0 / (2π √(2ε′) [√(1 + (ε″/ε′)²) − 1]^{1/2}),  λ0 = c/f,
//
// Metaxas & Meredith, Industrial Microwave Heating (1983) ch. 2 (from
// memory; the 1/e power definition confirmed). For ε″ ≪ ε′ it tends to
// λ0 √ε′ / (2π ε″). It is +Inf for a lossless material (ε″ = 0). The
// bracket is evaluated as x²/(√(1+x²)+1), x = ε″/ε′, to keep its accuracy
// when ε″ ≪ ε′.
func PenetrationDepth(f, eps1, eps2 float64) float64 {
	if eps2 <= 0 {
		return math.Inf(1)
	}
	x := eps2 / eps1
	br := x * x / (math.Sqrt(1+x*x) + 1) // = √(1 + x²) − 1
	lambda0 := SpeedOfLight / f
	return lambda0 / (2 * math.Pi * math.Sqrt(2*eps1) * math.Sqrt(br))
}

// Attenuation says from which faces the field enters the stack.
type Attenuation int

// Attenuation modes of [volumetric] attenuation (README Case file reference).
const (
	Uniform    Attenuation = iota // "none": the same field everywhere
	FromTop                       // "top": decays from the top face
	FromBottom                    // "bottom": decays from the bottom face
	FromBoth                      // "both": the mean of the two
	// StandingWave: a plane wave at normal incidence on the layered stack,
	// reflected and transmitted at every face (see Wave).
	StandingWave
)

var attenuationNames = [...]string{"none", "top", "bottom", "both", "standing-wave"}

func (a Attenuation) String() string {
	if a < 0 || int(a) >= len(attenuationNames) {
		return "Attenuation(?)"
	}
	return attenuationNames[a]
}

// Volumetric is dielectric heating of the absorbing layers of the stack.
type Volumetric struct {
	Frequency   float64 // Hz
	Field       float64 // rms field, V/m: the constant field, or max_field under control (not used by StandingWave)
	Attenuation Attenuation
	Control     *Control // nil: the field is on at Field (IncidentPower) all the time

	// StandingWave only: the incident power density S of the plane wave
	// in air, W/m², of each source at full power; the faces it enters by;
	// and the frequencies, Band when Band.Points > 0 (the absorbed power
	// is the mean over them), otherwise Frequency alone.
	IncidentPower float64
	Incident      Incidence
	Band          Band
}

// Frequencies returns the frequencies of the heating: Band when it has
// points, otherwise the single Frequency.
func (v *Volumetric) Frequencies() Band {
	if v.Band.Points > 0 {
		return v.Band
	}
	return Band{Lo: v.Frequency, Hi: v.Frequency, Points: 1}
}

// Control is a sampled proportional–integral controller that sets the power
// fraction u ∈ [0, 1] so that the temperature at Sensor follows Program;
// the field is Field·√u, or, for a standing wave, the incident power is
// IncidentPower·u: either way the absorbed power is proportional to u
// (README Case file reference, [volumetric.control]).
//
//	e_k = Program(t_k) − T_sensor(t_k)
//	I_k = I_{k−1} + e_k·Period   unless u_{k−1} is saturated in the direction of e_k
//	u_k = clamp(Gain·(e_k + I_k/IntegralTime), 0, 1), held until t_{k+1} = t_k + Period
type Control struct {
	Sensor       float64  // depth of the controlled temperature, m
	Program      Schedule // K
	Period       float64  // s
	Gain         float64  // power fraction per kelvin, 1/K
	IntegralTime float64  // s
}

// Defaults of the controller (README Case file reference, [volumetric.control]).
const (
	DefaultControlGain   = 0.2 // 1/K
	DefaultIntegralTime  = 60  // s
	DefaultControlPeriod = 1   // s
)

// Update advances the controller by one sample at error e (K), given its
// integral state I (K·s) and the previous output u; it returns the new
// integral and output. Anti-windup: the integral is frozen while u is
// saturated in the direction the error pushes it.
func (c *Control) Update(e, I, u float64) (float64, float64) {
	if !(u >= 1 && e > 0) && !(u <= 0 && e < 0) {
		I += e * c.Period
	}
	v := c.Gain * (e + I/c.IntegralTime)
	return I, min(max(v, 0), 1)
}
