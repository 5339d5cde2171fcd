package cases

import (
	"cureslab/physics"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// TestGoodVolumetricControlled checks the resolved [volumetric] and
// [volumetric.control] of a case that sets every key but period.
func TestGoodVolumetricControlled(t *testing.T) {
	c := loadGood(t, "volumetric-controlled.toml")
	p := c.Problem
	v := p.Volumetric
	if v == nil || v.Control == nil {
		t.Fatalf("Volumetric = %+v, want controlled heating", v)
	}
	// Source: SI units, 915 MHz = 9.15e8 Hz.
	checkNear(t, "Frequency", v.Frequency, 915e6)
	// Source: the README's Case file reference, under control E = max_field·√u: the field at full
	// power is max_field (3 kV/m), not field (1.5 kV/m).
	checkNear(t, "Field", v.Field, 3000)
	if v.Attenuation != physics.FromBoth {
		t.Errorf("Attenuation = %v, want both", v.Attenuation)
	}
	ctl := v.Control
	// Source: SI units, 5 mm = 0.005 m; 0.08 1/K; 2 min = 120 s.
	checkNear(t, "Sensor", ctl.Sensor, 0.005)
	checkNear(t, "Gain", ctl.Gain, 0.08)
	checkNear(t, "IntegralTime", ctl.IntegralTime, 120)
	// Source: the README's Case file reference, period defaults to 1 s.
	checkNear(t, "Period", ctl.Period, 1)
	// Source: analytic, 20 C + 30 min × 1 C/min = 50 C on the program's ramp.
	checkNear(t, "program at 30 min", ctl.Program.At(1800), 323.15)
	// Source: the README's Case file reference, time.end defaults to the end of the longest schedule
	// the case uses: the control program, 60 min of ramp + 90 min of hold
	// (the face's "room" schedule ends at 30 min).
	checkNear(t, "End", p.End, 9000)
	// The sensor, at no probe, is recorded as one more probe.
	checkSlice(t, "Probes", p.Probes, []float64{0, 0.006, 0.005})
	want := &VolumetricInfo{Program: "cure", FieldUnused: true, Defaults: []string{"period"}}
	if !reflect.DeepEqual(c.Volumetric, want) {
		t.Errorf("Case.Volumetric = %+v, want %+v", c.Volumetric, want)
	}
	// The glass layer has no dielectric section: it absorbs nothing.
	if p.Materials[1].Dielectric != nil {
		t.Errorf("glass has a dielectric: %+v", p.Materials[1].Dielectric)
	}
}

// volCase is a small case with volumetric heating for check and output
// tests: one layer of material mat under still air, the [volumetric] and
// extra text given.
func volCase(t *testing.T, dielectric, volumetric string) *Case {
	t.Helper()
	src := `title = "volumetric check"
[initial]
temperature = "20 C"
[time]
end = "30 min"
[[layer]]
name = "wet"
material = "wet"
thickness = "10 mm"
[materials.wet]
density = "1000 kg/m^3"
specific_heat = "4180 J/kg/K"
conductivity = "0.6 W/m/K"
[materials.wet.dielectric]
` + dielectric + `
[schedules.cure]
start = "20 C"
segments = [{ ramp = "5 C/min", to = "60 C" }, { hold = "20 min" }]
[top]
kind = "convection"
h = "5 W/m^2/K"
air = "20 C"
[bottom]
kind = "insulated"
` + volumetric
	c, err := Parse("vol.toml", []byte(src), "")
	if err != nil {
		t.Fatalf("Parse: %v", err)
	}
	return c
}

// TestCheckVolumetric checks the volumetric section of check against the
// published water figures.
func TestCheckVolumetric(t *testing.T) {
	c := volCase(t, "permittivity = 78\nloss_factor = 10", "[volumetric]\nfrequency = \"2.45 GHz\"\nfield = \"1 kV/m\"\nattenuation = \"top\"\n")
	out := chkOutput(t, c)
	for _, want := range []string{
		"frequency    2.45 GHz (an ISM band)",
		"field        1 kV/m rms, on from start to end",
		"attenuation  top: the field enters through the top face",
		// Source: derived from P = 2π f ε0 ε″ E² and the power penetration depth
		// (Metaxas & Meredith, Industrial Microwave Heating, 1983, ch. 2): water
		// ε′ 78, ε″ 10 at 2.45 GHz, E = 1 kV/m: P = 1.36 MW/m³, D_p = 1.72 cm.
		"1.36 -> 1.36 MW/m^3",
		"17.2 -> 17.2 mm",
		// Source: analytic, P/(ρ c_p) = 1.3627e6 W/m³ / (1000 kg/m³ × 4180
		// J/kg/K) = 0.326 K/s = 19.6 K/min.
		"19.6 K/min",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("check output lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "not an ISM band") || strings.Contains(out, "Control (PI") {
		t.Errorf("check output notes an ISM problem or a controller that is not there:\n%s", out)
	}

	// Not an ISM frequency (ITU Radio Regulations 5.138, 5.150, 5.280: 13.56, 27.12, 40.68 MHz, 915,
	// 2450, 5800 MHz); control with its defaults; a field that control
	// does not use; a 5 C/min ramp faster than the full field heats.
	c = volCase(t, "permittivity = 78\nloss_factor = 10",
		"[volumetric]\nfrequency = \"1 GHz\"\nfield = \"1 kV/m\"\n[volumetric.control]\nsensor = \"10 mm\"\nprogram = \"cure\"\nmax_field = \"0.5 kV/m\"\n")
	out = chkOutput(t, c)
	for _, want := range []string{
		"1 GHz (not an ISM band)",
		"lies outside the ISM bands",
		"field is not used",
		"sensor         10 mm (wet)",
		`program        "cure", highest 60 C`,
		"period         1 s (default)",
		"gain           0.2 1/K (default)",
		"integral time  60 s (default)",
		// Source: analytic, 2π f ε0 ε″ E² / (ρ c_p) at 1 GHz, 0.5 kV/m:
		// 5.5633e-11 × 1e9 × 10 × 2.5e5 / 4.18e6 = 0.0333 K/s = 2.0 K/min,
		// below the program's 5 C/min.
		"ramps at up to 5 K/min, faster than the full power heats any absorbing layer (2 K/min",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("check output lacks %q:\n%s", want, out)
		}
	}
}

// TestFrequencyNote checks the ISM bands (ITU Radio
// Regulations 5.138, 5.150, 5.280: 13.56, 27.12, 40.68 MHz, 915 MHz,
// 2450 MHz, 5800 MHz, confirmed).
func TestFrequencyNote(t *testing.T) {
	for _, f := range []float64{13.56e6, 27.12e6, 40.68e6, 915e6, 2450e6, 5800e6} {
		if note := frequencyNote(f); note != "" {
			t.Errorf("%g Hz is an ISM centre frequency, got the note %q", f, note)
		}
	}
	for _, f := range []float64{1e6, 100e6, 1e9, 3e9, 10e9} {
		if note := frequencyNote(f); note == "" {
			t.Errorf("%g Hz is not in an ISM band, got no note", f)
		}
	}
}

// TestVolumetricOneError checks problems that have no file of their own in
// testdata/bad: each gives exactly one error at the right key.
func TestVolumetricOneError(t *testing.T) {
	base := string(mustRead(t, filepath.Join(goodDir, "volumetric-controlled.toml")))
	for _, tc := range []struct {
		name, old, new, key string
		kind                error
	}{
		// A field beside max_field is not used, but a bad one is still an error.
		{"bare field beside max_field", `field = "1.5 kV/m"`, `field = 1500`, "volumetric.field", ErrUnit},
		{"control not a table", "[volumetric.control]\nsensor = \"5 mm\"\nprogram = \"cure\"\nmax_field = \"3 kV/m\"\ngain = \"0.08 1/K\"\nintegral_time = \"2 min\"\n",
			"", "volumetric.control", ErrType},
		{"negative sensor", `sensor = "5 mm"`, `sensor = "-1 mm"`, "volumetric.control.sensor", ErrRange},
		{"zero integral time", `integral_time = "2 min"`, `integral_time = "0 s"`, "volumetric.control.integral_time", ErrRange},
		{"period in a wrong unit", `gain = "0.08 1/K"`, "gain = \"0.08 1/K\"\nperiod = \"1 mm\"", "volumetric.control.period", ErrUnit},
		{"too many samples", `gain = "0.08 1/K"`, "gain = \"0.08 1/K\"\nperiod = \"1 ms\"", "volumetric.control.period", ErrRange},
		{"unknown key", `attenuation = "both"`, "attenuation = \"both\"\nfeild = \"1 kV/m\"", "volumetric.feild", ErrUnknownKey},
	} {
		src := strings.Replace(base, tc.old, tc.new, 1)
		if tc.name == "control not a table" {
			src = strings.Replace(src, `attenuation = "both"`, "attenuation = \"both\"\ncontrol = 3", 1)
		}
		if src == base {
			t.Fatalf("%s: the replacement changed nothing", tc.name)
		}
		_, err := Parse("v.toml", []byte(src), goodDir)
		var list ErrorList
		if !errors.As(err, &list) || len(list) != 1 || list[0].Key != tc.key || !errors.Is(err, tc.kind) {
			t.Errorf("%s: want one %v error at %s, got:\n%v", tc.name, tc.kind, tc.key, err)
		}
	}

	// A constant program is accepted (like a face's air) and sets no end:
	// time.end is then the end of the face's "room" schedule, 30 min
	// (README, Case file reference: the longest schedule the case uses).
	src := strings.Replace(base, `program = "cure"`, `program = "60 C"`, 1)
	c, err := Parse("v.toml", []byte(src), goodDir)
	if err != nil {
		t.Fatal(err)
	}
	checkNear(t, "End with a constant program", c.Problem.End, 1800)
	checkNear(t, "constant program", c.Problem.Volumetric.Control.Program.At(1234), 333.15)
	if c.Volumetric.Program != "60 C" {
		t.Errorf("Program as written = %q", c.Volumetric.Program)
	}
}

func mustRead(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestStandingWaveCase loads a standing wave over a band under control and
// checks the resolved values and what check prints: the band with its
// default number of points, the plane wave's shares and the wavelength in
// the material.
func TestStandingWaveCase(t *testing.T) {
	c := volCase(t, "permittivity = 78\nloss_factor = 10",
		"[volumetric]\nattenuation = \"standing-wave\"\nincident = \"both\"\nincident_power = \"3 kW/m^2\"\nband = [\"2.4 GHz\", \"2.5GHz\"]\n"+
			"[volumetric.control]\nsensor = \"5 mm\"\nprogram = \"cure\"\n")
	v := c.Problem.Volumetric
	// Source: units, 3 kW/m² = 3000 W/m²; the band's ends in Hz; the
	// default of 101 points.
	if v.Attenuation != physics.StandingWave || v.Incident != physics.IncidentBoth || v.IncidentPower != 3000 ||
		v.Band != (physics.Band{Lo: 2.4e9, Hi: 2.5e9, Points: physics.DefaultBandPoints}) || v.Field != 0 {
		t.Errorf("Volumetric = %+v", v)
	}
	if !c.Volumetric.BandPointsDefault {
		t.Errorf("band_points default not recorded: %+v", c.Volumetric)
	}
	out := chkOutput(t, c)
	for _, want := range []string{
		"band            2.4 GHz to 2.5 GHz (inside an ISM band), 101 equally spaced frequencies (default)",
		"incident        both: one plane wave from each side",
		"incident power  3 kW/m^2 at full power; the controller scales it by the power fraction",
		// Source: water, ε′ 78, ε″ 10 (Metaxas & Meredith, from memory): at
		// 2.45 GHz n′ = √(ε′/2 (√(1 + (ε″/ε′)²) + 1)) = 8.847 (analytic),
		// λ = c/(f n′) = 13.8 mm.
		"13.8 mm",
		"Plane wave at full power, uncured -> cured: reflected",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("check output lacks %q:\n%s", want, out)
		}
	}
}
