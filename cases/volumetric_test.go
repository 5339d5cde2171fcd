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

// TestFrequencyNote checks the ISM bands (ITU Radio
// Regulations 5.138, 5.150, 5.280: 13.56, 27.12, 40.68 MHz, 915 MHz,
// 2450 MHz, 5800 MHz, confirmed).
func TestFrequencyNote(t *testing.T) {
	for _, f := range []float64{13.56e6, 27.12e6, 40.68e6, 915e6, 2450e6, 5800e6} {
		if note := FrequencyNote(f); note != "" {
			t.Errorf("%g Hz is an ISM centre frequency, got the note %q", f, note)
		}
	}
	for _, f := range []float64{1e6, 100e6, 1e9, 3e9, 10e9} {
		if note := FrequencyNote(f); note == "" {
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
