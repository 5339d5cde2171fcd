package cases

import (
	"fmt"
	"math"
	"strings"

	"cureslab/cases/internal/num"
	"cureslab/cases/units"
	"cureslab/physics"
)

var (
	volumetricKeys   = []string{"frequency", "field", "attenuation", "control", "incident", "incident_power", "band", "band_points"}
	controlKeys      = []string{"sensor", "program", "max_field", "period", "gain", "integral_time"}
	attenuationNames = []string{"none", "top", "bottom", "both", "standing-wave"}
	attenuationModes = map[string]physics.Attenuation{
		"none": physics.Uniform, "top": physics.FromTop, "bottom": physics.FromBottom, "both": physics.FromBoth,
		"standing-wave": physics.StandingWave,
	}
	incidenceNames = []string{"top", "bottom", "both"}
	incidenceModes = map[string]physics.Incidence{
		"top": physics.IncidentTop, "bottom": physics.IncidentBottom, "both": physics.IncidentBoth,
	}
	// standingKeys go with attenuation = "standing-wave" only.
	standingKeys = []string{"incident", "incident_power", "band", "band_points"}
)

// maxBandPoints bounds band_points: each point costs a field solution per
// cell at every step whose loss factors moved.
const maxBandPoints = 10001

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
	// BandPointsDefault reports a band whose band_points was not given
	// (physics.DefaultBandPoints).
	BandPointsDefault bool
}

// volDef is a resolved [volumetric].
type volDef struct {
	vol  *physics.Volumetric
	info *VolumetricInfo
	end  float64 // end of the control program, s (0 without one)
}

// volumetric reads [volumetric] and [volumetric.control]. attenuation
// (default "none") decides the rest. For none|top|bottom|both: frequency
// (required, positive) and the field, positive: field without control,
// under control max_field, or field when max_field is not given (a field
// given beside max_field is checked but not used, and check says so). For
// "standing-wave": incident (top|bottom|both, required), incident_power
// (W/m², positive, required), and either frequency or band = [lo, hi]
// (0 < lo < hi) with band_points (2 to maxBandPoints, default
// physics.DefaultBandPoints); field and max_field are errors there, and
// the standing-wave keys are errors in the other modes. The controller:
// sensor and program (required), period, gain and integral_time (defaults
// physics.DefaultControlPeriod, DefaultControlGain, DefaultIntegralTime);
// the program is a schedule name or a constant, as a face's air. layers are
// the resolved layers (judged only when layersOK): at least one must absorb,
// and the field may not pass a shield to reach one (checkAbsorbers); the
// sensor must lie in the stack. It returns nil when the section is absent;
// ok is false when it has errors.
func (l *loader) volumetric(root *table, scheds map[string]*physics.Schedule, layers []layerDef, layersOK bool) (*volDef, bool) {
	t := l.sub(root, "volumetric", volumetricKeys, nil)
	if t == nil {
		return nil, !root.has("volumetric")
	}
	before := len(l.errs)
	v := &physics.Volumetric{}
	d := &volDef{vol: v, info: &VolumetricInfo{}}
	ct := l.sub(t, "control", controlKeys, nil)

	attOK := true
	if s, ok := l.str(t, "attenuation"); ok {
		if a, known := attenuationModes[s]; known {
			v.Attenuation = a
		} else {
			attOK = false
			msg := fmt.Sprintf("unknown attenuation %q", s)
			if g := Suggest(s, attenuationNames); g != "" {
				msg += fmt.Sprintf("; did you mean %q?", g)
			}
			l.atValue(t.keyPath("attenuation"), ErrRange, "%s", msg).Hint =
				`"none": a uniform field; "top", "bottom": the field enters through that face and decays with the penetration depth; "both": the mean of the two; ` +
					`"standing-wave": a plane wave enters from incident and is reflected at every face (metal layers reflect it all)`
		}
	} else if t.has("attenuation") {
		attOK = false
	}
	frequency := func() {
		if f, ok := l.quantity(t, "frequency", units.Frequency); ok {
			if !(f > 0) {
				l.rangeErr(t.keyPath("frequency"), t.m["frequency"], "frequency must be positive")
			}
			v.Frequency = f
		}
	}
	switch {
	case !attOK:
	case v.Attenuation == physics.StandingWave:
		l.standingWave(t, ct, d)
	default:
		for _, k := range standingKeys {
			if t.has(k) {
				l.atKey(t.keyPath(k), ErrRange, "%s goes with attenuation = \"standing-wave\" only (attenuation is %q)", k, v.Attenuation.String()).Hint =
					"for a plane wave reflected at every face, write attenuation = \"standing-wave\" with incident, incident_power and frequency (or band); otherwise remove " + k
			}
		}
		l.require(t, "frequency")
		frequency()
		l.fieldKeys(t, ct, d)
	}
	total := 0.0
	for _, ld := range layers {
		total += ld.geom.Thickness
	}
	if ct != nil {
		v.Control = l.control(ct, scheds, d, total, layersOK)
	}
	if layersOK && attOK {
		l.checkAbsorbers(layers, v)
	}
	if len(l.errs) > before {
		return nil, false
	}
	return d, true
}

// fieldKeys reads the rms field of the exponential and uniform modes:
// field, or under control max_field (see volumetric).
func (l *loader) fieldKeys(t, ct *table, d *volDef) {
	v := d.vol
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
		l.add(l.loc.Table(ct.path), ct.keyPath("max_field"), ErrMissing, nil,
			"missing: [volumetric.control] needs \"max_field\", the field at full power").Hint =
			"add, for example: max_field = \"3 kV/m\" (the controller sets the field to max_field * sqrt(power fraction)), or give field in [volumetric]"
	case ct != nil:
		v.Field = field(t, "field") // the field at full power
	default:
		l.require(t, "field")
		v.Field = field(t, "field")
	}
}

// standingWave reads the keys of attenuation = "standing-wave" (see
// volumetric).
func (l *loader) standingWave(t, ct *table, d *volDef) {
	v := d.vol
	if t.has("field") {
		l.atKey(t.keyPath("field"), ErrRange, "field is not used with attenuation = \"standing-wave\": the wave is set by incident_power, the power per area it brings from the air").Hint =
			"replace it, for example: incident_power = \"4 kW/m^2\""
	}
	if ct != nil && ct.has("max_field") {
		l.atKey(ct.keyPath("max_field"), ErrRange, "max_field is not used with attenuation = \"standing-wave\": the controller scales incident_power by the power fraction").Hint =
			"remove max_field; incident_power in [volumetric] is the power at full output"
	}
	l.require(t, "incident", "incident_power")
	if s, ok := l.str(t, "incident"); ok {
		if inc, known := incidenceModes[s]; known {
			v.Incident = inc
		} else {
			msg := fmt.Sprintf("unknown incident face %q", s)
			if g := Suggest(s, incidenceNames); g != "" {
				msg += fmt.Sprintf("; did you mean %q?", g)
			}
			l.atValue(t.keyPath("incident"), ErrRange, "%s", msg).Hint =
				`"top" or "bottom": the face the wave enters by from the air; "both": one wave from each side, each with the full incident_power`
		}
	}
	if S, ok := l.quantity(t, "incident_power", units.PowerPerArea); ok {
		if !(S > 0) {
			l.rangeErr(t.keyPath("incident_power"), t.m["incident_power"], "incident_power must be positive")
		}
		v.IncidentPower = S
	}
	switch {
	case t.has("frequency") && t.has("band"):
		l.atKey(t.keyPath("band"), ErrRange, "give frequency or band, not both").Hint =
			"one frequency: frequency = \"2.45 GHz\"; a swept band: band = [\"2.40 GHz\", \"2.50 GHz\"] (with band_points, default 101)"
	case t.has("band"):
		l.band(t, d)
	default:
		if !t.has("frequency") {
			l.add(l.loc.Table(t.path), t.keyPath("frequency"), ErrMissing, nil,
				"missing: [volumetric] needs \"frequency\" or \"band\"").Hint =
				"for example: frequency = \"2.45 GHz\", or band = [\"5.85 GHz\", \"6.65 GHz\"] for a swept source"
		}
		if f, ok := l.quantity(t, "frequency", units.Frequency); ok {
			if !(f > 0) {
				l.rangeErr(t.keyPath("frequency"), t.m["frequency"], "frequency must be positive")
			}
			v.Frequency = f
		}
		if t.has("band_points") {
			l.atKey(t.keyPath("band_points"), ErrRange, "band_points goes with band only").Hint =
				"for a swept source give band = [\"LO GHz\", \"HI GHz\"] instead of frequency"
		}
	}
}

// band reads band = [lo, hi] and band_points.
func (l *loader) band(t *table, d *volDef) {
	v := d.vol
	path := t.keyPath("band")
	hint := "for example: band = [\"5.85 GHz\", \"6.65 GHz\"] (the lowest and highest frequency of the sweep)"
	arr, ok := l.array(t, "band")
	if !ok {
		return
	}
	if len(arr) != 2 {
		l.atValue(path, ErrRange, "band needs two frequencies, the lowest and the highest, got %d values", len(arr)).Hint = hint
		return
	}
	lo, okLo := l.quantityAt(path+".0", arr[0], units.Frequency)
	hi, okHi := l.quantityAt(path+".1", arr[1], units.Frequency)
	if !okLo || !okHi {
		return
	}
	if !(lo > 0) || !(hi > lo) {
		l.atValue(path, ErrRange, "band must run from a positive lowest frequency to a higher one, got %s to %s",
			FormatFrequency(lo), FormatFrequency(hi)).Hint = hint + "; for one frequency write frequency = \"2.45 GHz\""
		return
	}
	n := int64(physics.DefaultBandPoints)
	if !t.has("band_points") {
		d.info.BandPointsDefault = true
	} else if k, ok := l.integer(t, "band_points"); ok {
		if k < 2 || k > maxBandPoints {
			l.rangeErr(t.keyPath("band_points"), t.m["band_points"], "band_points must be between 2 and %d (both ends of the band are included)", maxBandPoints)
		}
		n = k
	}
	v.Band = physics.Band{Lo: lo, Hi: hi, Points: int(n)}
	v.Frequency = 0.5 * (lo + hi) // the centre, for estimates
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

// checkAbsorbers reports a [volumetric] that heats nothing — no layer
// whose material has a dielectric section with a loss factor (a shield
// absorbs nothing) — and a field that would have to pass a shield (a
// metal reflects it) to reach an absorbing layer: for each face the field
// enters by (attenuation top, bottom or both, or the standing wave's
// incident face), the first shield met from that face must have no
// absorbing layer beyond it. A uniform field ("none") enters by no face.
func (l *loader) checkAbsorbers(layers []layerDef, v *physics.Volumetric) {
	absorbs := func(m *physics.Material) bool {
		d := m.Dielectric
		return d != nil && !d.Shield && (d.LossFactor > 0 || d.LossFactorCured > 0)
	}
	shield := func(m *physics.Material) bool { return m.Dielectric != nil && m.Dielectric.Shield }
	some := false
	var names []string
	for _, ld := range layers {
		if ld.mat == nil {
			return // the material has errors of its own
		}
		some = some || absorbs(ld.mat)
		names = append(names, fmt.Sprintf("%s (%s)", ld.info.Name, ld.info.Material))
	}
	if !some {
		l.add(l.loc.Table("volumetric"), "volumetric", ErrRange, nil,
			fmt.Sprintf("no layer absorbs: none of the materials of %s has a [materials.NAME.dielectric] section with a loss factor", strings.Join(names, ", "))).Hint =
			"add to the absorbing material, for example:\n[materials.NAME.dielectric]\npermittivity = 4.0\nloss_factor = 0.4\nloss_factor_cured = 0.05"
		return
	}
	var fromTop, fromBottom bool
	key := "volumetric.attenuation"
	switch v.Attenuation {
	case physics.FromTop:
		fromTop = true
	case physics.FromBottom:
		fromBottom = true
	case physics.FromBoth:
		fromTop, fromBottom = true, true
	case physics.StandingWave:
		key = "volumetric.incident"
		fromTop = v.Incident == physics.IncidentTop || v.Incident == physics.IncidentBoth
		fromBottom = v.Incident == physics.IncidentBottom || v.Incident == physics.IncidentBoth
	}
	// blocked walks the layers from one face and returns the first shield
	// and the first absorbing layer beyond it, or −1s.
	blocked := func(order []int) (int, int) {
		sh := -1
		for _, i := range order {
			switch m := layers[i].mat; {
			case sh < 0 && shield(m):
				sh = i
			case sh >= 0 && absorbs(m):
				return sh, i
			}
		}
		return -1, -1
	}
	down, up := make([]int, len(layers)), make([]int, len(layers))
	for i := range layers {
		down[i], up[i] = i, len(layers)-1-i
	}
	for _, c := range []struct {
		on    bool
		face  string
		order []int
		other string
	}{{fromTop, "top", down, "bottom"}, {fromBottom, "bottom", up, "top"}} {
		if !c.on {
			continue
		}
		if sh, ab := blocked(c.order); sh >= 0 {
			s, a := layers[sh].info, layers[ab].info
			l.atValue(key, ErrRange, "the field entering by the %s face would have to pass the shield %q (%s) to reach the absorbing layer %q (%s); a metal reflects microwaves",
				c.face, s.Name, s.Material, a.Name, a.Material).Hint =
				fmt.Sprintf("let the field enter by the %s face only; a layer that is no metal needs a dielectric section without shield = true", c.other)
		}
	}
}

// FrequencyNote returns a note for check when f is outside every ISM band
// allotted to industrial heating, "" when it is inside one.
func FrequencyNote(f float64) string {
	for _, b := range ismBands {
		if f >= b.lo && f <= b.hi {
			return ""
		}
	}
	return fmt.Sprintf("the frequency %s lies outside the ISM bands allotted to industrial heating (13.56, 27.12, 40.68 MHz; 915 MHz in the Americas; 2450, 5800 MHz): "+
		"check the frequency, and that the loss factors were measured at it.",
		FormatFrequency(f))
}

// ismBands are the industrial, scientific and medical bands used for
// dielectric heating, Hz (ITU Radio Regulations 5.138, 5.150, 5.280,
// for the centre frequencies; the band edges are from memory).
var ismBands = []struct{ lo, hi float64 }{
	{13.553e6, 13.567e6},
	{26.957e6, 27.283e6},
	{40.66e6, 40.70e6},
	{902e6, 928e6},
	{2.4e9, 2.5e9},
	{5.725e9, 5.875e9},
}

// FormatFrequency writes f (Hz) in kHz, MHz or GHz with up to 6 digits.
func FormatFrequency(f float64) string {
	switch a := math.Abs(f); {
	case a >= 1e9:
		return num.G(f/1e9) + " GHz"
	case a >= 1e6:
		return num.G(f/1e6) + " MHz"
	case a >= 1e3:
		return num.G(f/1e3) + " kHz"
	}
	return num.G(f) + " Hz"
}

// SensorProbe returns the index of the probe at the sensor depth z, or −1.
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
