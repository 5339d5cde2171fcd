package cases

import (
	"fmt"
	"math"
	"strings"

	"cureslab/cases/units"
	"cureslab/physics"
)

var (
	volumetricKeys   = []string{"frequency", "field", "attenuation", "control"}
	controlKeys      = []string{"sensor", "program", "max_field", "period", "gain", "integral_time"}
	attenuationNames = []string{"none", "top", "bottom", "both"}
	attenuationModes = map[string]physics.Attenuation{
		"none": physics.Uniform, "top": physics.FromTop, "bottom": physics.FromBottom, "both": physics.FromBoth,
	}
)

// maxControlSamples bounds the controller samples of one run (End/period):
// the solver lands a step on every one of them.
const maxControlSamples = 1000000

// VolumetricInfo is what check reports about [volumetric] beyond the
// resolved physics.Volumetric of Problem.
type VolumetricInfo struct {
	// Program is the control program as written (a schedule name or a
	// constant such as "65 C"); "" without [volumetric.control].
	Program string
	// FieldUnused reports a field given together with control.max_field:
	// under control the field is max_field·√u and field is not used.
	FieldUnused bool
	// Defaults lists the controller settings left at their defaults, in
	// the order period, gain, integral_time.
	Defaults []string
}

// volDef is a resolved [volumetric].
type volDef struct {
	vol  *physics.Volumetric
	info *VolumetricInfo
	end  float64 // end of the control program, s (0 without one)
}

// volumetric reads [volumetric] and [volumetric.control] (SPEC §4, §10):
// frequency (required, positive); the field, positive: field without
// control, under control max_field, or field when max_field is not given
// (a field given beside max_field is checked but not used, and check says
// so); attenuation (default "none"); and the controller: sensor and program
// (required), period, gain and integral_time (defaults
// physics.DefaultControlPeriod, DefaultControlGain, DefaultIntegralTime).
// The program is a schedule name or a constant, as a face's air. layers are
// the resolved layers (judged only when layersOK): at least one must absorb
// and be reached by the field (checkAbsorbers), and the sensor must lie in
// the stack. It returns nil when the section is absent; ok is false when it
// has errors.
func (l *loader) volumetric(root *table, scheds map[string]*physics.Schedule, layers []layerDef, layersOK bool) (*volDef, bool) {
	t := l.sub(root, "volumetric", volumetricKeys, nil)
	if t == nil {
		return nil, !root.has("volumetric")
	}
	before := len(l.errs)
	v := &physics.Volumetric{}
	d := &volDef{vol: v, info: &VolumetricInfo{}}
	ct := l.sub(t, "control", controlKeys, nil)

	l.require(t, "frequency")
	if f, ok := l.quantity(t, "frequency", units.Frequency); ok {
		if !(f > 0) {
			l.rangeErr(t.keyPath("frequency"), t.m["frequency"], "frequency must be positive")
		}
		v.Frequency = f
	}
	field := func(tt *table, key string) float64 {
		E, ok := l.quantity(tt, key, units.ElectricField)
		if ok && !(E > 0) {
			l.rangeErr(tt.keyPath(key), tt.m[key], "%s must be positive", key)
		}
		return E
	}
	switch {
	case t.has("control") && ct == nil: // control is not a table: reported by sub
	case ct != nil && ct.has("max_field"):
		v.Field = field(ct, "max_field")
		if t.has("field") {
			field(t, "field") // checked, though max_field sets the field
			d.info.FieldUnused = true
		}
	case ct != nil && !t.has("field"):
		l.add(l.loc.table(ct.path), ct.keyPath("max_field"), ErrMissing, nil,
			"missing: [volumetric.control] needs \"max_field\", the field at full power").Hint =
			"add, for example: max_field = \"3 kV/m\" (the controller sets the field to max_field * sqrt(power fraction)), or give field in [volumetric]"
	case ct != nil:
		v.Field = field(t, "field") // the field at full power
	default:
		l.require(t, "field")
		v.Field = field(t, "field")
	}
	if s, ok := l.str(t, "attenuation"); ok {
		if a, known := attenuationModes[s]; known {
			v.Attenuation = a
		} else {
			msg := fmt.Sprintf("unknown attenuation %q", s)
			if g := Suggest(s, attenuationNames); g != "" {
				msg += fmt.Sprintf("; did you mean %q?", g)
			}
			l.atValue(t.keyPath("attenuation"), ErrRange, "%s", msg).Hint =
				`"none": a uniform field; "top", "bottom": the field enters through that face and decays with the penetration depth; "both": the mean of the two`
		}
	}
	total := 0.0
	for _, ld := range layers {
		total += ld.geom.Thickness
	}
	if ct != nil {
		v.Control = l.control(ct, scheds, d, total, layersOK)
	}
	if layersOK {
		l.checkAbsorbers(layers, v.Attenuation)
	}
	if len(l.errs) > before {
		return nil, false
	}
	return d, true
}

// control reads [volumetric.control]; nil when it has errors.
func (l *loader) control(t *table, scheds map[string]*physics.Schedule, d *volDef, total float64, layersOK bool) *physics.Control {
	before := len(l.errs)
	c := &physics.Control{Period: physics.DefaultControlPeriod, Gain: physics.DefaultControlGain, IntegralTime: physics.DefaultIntegralTime}
	l.require(t, "sensor", "program")
	if z, ok := l.quantity(t, "sensor", units.Length); ok {
		switch {
		case z < 0:
			l.rangeErr(t.keyPath("sensor"), t.m["sensor"], "the sensor depth must not be negative (depth 0 is the top face)")
		case layersOK && z > total*(1+1e-12):
			l.rangeErr(t.keyPath("sensor"), t.m["sensor"], "the sensor lies below the stack, which is %g mm thick", total*1e3).Hint =
				"give the depth of the controlled temperature inside the stack, from the top face"
		}
		c.Sensor = min(z, total)
		if !layersOK {
			c.Sensor = z
		}
	}
	if t.has("program") {
		if s, name, end, ok := l.driver(t, "program", scheds); ok {
			c.Program, d.info.Program, d.end = s, name, end
		}
	}
	positive := func(key string, dim units.Dim, into *float64) {
		if !t.has(key) {
			d.info.Defaults = append(d.info.Defaults, key)
			return
		}
		if x, ok := l.quantity(t, key, dim); ok {
			if !(x > 0) {
				l.rangeErr(t.keyPath(key), t.m[key], "%s must be positive", key)
			}
			*into = x
		}
	}
	positive("period", units.Time, &c.Period)
	positive("gain", units.InverseTemperature, &c.Gain)
	positive("integral_time", units.Time, &c.IntegralTime)
	if len(l.errs) > before {
		return nil
	}
	return c
}

// checkControlSamples reports a controller period too short for the run:
// more than maxControlSamples samples.
func (l *loader) checkControlSamples(c *physics.Control, end float64) {
	if c == nil || !(end > 0) || end/c.Period <= maxControlSamples {
		return
	}
	key := "volumetric.control.period"
	l.atValue(key, ErrRange, "the controller would take %.3g samples over %g s; at most %d", end/c.Period, end, maxControlSamples).Hint =
		"give a longer period (1 s suits a part that takes minutes to heat)"
}

// checkAbsorbers reports a [volumetric] that heats nothing: no layer whose
// material has a dielectric section with a loss factor (a shield absorbs
// nothing), or, for an attenuated field, none that the field reaches
// without first passing a shield.
func (l *loader) checkAbsorbers(layers []layerDef, a physics.Attenuation) {
	absorbs := func(m *physics.Material) bool {
		d := m.Dielectric
		return d != nil && !d.Shield && (d.LossFactor > 0 || d.LossFactorCured > 0)
	}
	shield := func(m *physics.Material) bool { return m.Dielectric != nil && m.Dielectric.Shield }
	some, fromTop, fromBottom := false, false, false
	blocked := false
	for _, ld := range layers {
		if ld.mat == nil {
			return // the material has errors of its own
		}
		if shield(ld.mat) {
			blocked = true
		}
		if absorbs(ld.mat) {
			some = true
			fromTop = fromTop || !blocked
		}
	}
	blocked = false
	for i := len(layers) - 1; i >= 0; i-- {
		if shield(layers[i].mat) {
			blocked = true
		}
		if absorbs(layers[i].mat) {
			fromBottom = fromBottom || !blocked
		}
	}
	var names []string
	for _, ld := range layers {
		names = append(names, fmt.Sprintf("%s (%s)", ld.info.Name, ld.info.Material))
	}
	switch {
	case !some:
		l.add(l.loc.table("volumetric"), "volumetric", ErrRange, nil,
			fmt.Sprintf("no layer absorbs: none of the materials of %s has a [materials.NAME.dielectric] section with a loss factor", strings.Join(names, ", "))).Hint =
			"add to the absorbing material, for example:\n[materials.NAME.dielectric]\npermittivity = 4.0\nloss_factor = 0.4\nloss_factor_cured = 0.05"
	case a == physics.FromTop && !fromTop, a == physics.FromBottom && !fromBottom, a == physics.FromBoth && !fromTop && !fromBottom:
		l.atValue("volumetric.attenuation", ErrRange, "the field never reaches an absorbing layer: a shield lies between every absorbing layer and the face the field enters by (attenuation %q)", a).Hint =
			"choose the face the field enters by, or remove shield = true from the layer in the way"
	}
}

// frequencyNote returns a note for check when f is outside every ISM band
// allotted to industrial heating, "" when it is inside one.
func frequencyNote(f float64) string {
	for _, b := range ismBands {
		if f >= b.lo && f <= b.hi {
			return ""
		}
	}
	return fmt.Sprintf("the frequency %s lies outside the ISM bands allotted to industrial heating (13.56, 27.12, 40.68 MHz; 915 MHz in the Americas; 2450, 5800 MHz): "+
		"check the frequency, and that the loss factors were measured at it.",
		formatFrequency(f))
}

// ismBands are the industrial, scientific and medical bands used for
// dielectric heating, Hz (ITU Radio Regulations 5.138, 5.150, 5.280;
// REFERENCES §8 confirms the centre frequencies; the band edges are from
// memory).
var ismBands = []struct{ lo, hi float64 }{
	{13.553e6, 13.567e6},
	{26.957e6, 27.283e6},
	{40.66e6, 40.70e6},
	{902e6, 928e6},
	{2.4e9, 2.5e9},
	{5.725e9, 5.875e9},
}

// formatFrequency writes f (Hz) in kHz, MHz or GHz with up to 6 digits.
func formatFrequency(f float64) string {
	switch a := math.Abs(f); {
	case a >= 1e9:
		return chkG(f/1e9) + " GHz"
	case a >= 1e6:
		return chkG(f/1e6) + " MHz"
	case a >= 1e3:
		return chkG(f/1e3) + " kHz"
	}
	return chkG(f) + " Hz"
}

// sensorProbe returns the index of the probe at the sensor depth z, or −1.
// The loader adds the sensor to the probes when no probe is there, so that
// probes.csv records the controlled temperature.
func SensorProbe(probes []float64, z float64) int {
	for i, d := range probes {
		if math.Abs(d-z) <= 1e-12*max(1e-3, math.Abs(z)) {
			return i
		}
	}
	return -1
}
