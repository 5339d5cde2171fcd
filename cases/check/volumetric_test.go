package check

import (
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/physics"
	"strings"
	"testing"
)

// TestCheckVolumetric checks the volumetric section of check against the
// published water figures.
func TestCheckVolumetric(t *testing.T) {
	c := testkit.VolumetricCase(t, "permittivity = 78\nloss_factor = 10", "[volumetric]\nfrequency = \"2.45 GHz\"\nfield = \"1 kV/m\"\nattenuation = \"top\"\n")
	out := checkText(t, c)
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
	c = testkit.VolumetricCase(t, "permittivity = 78\nloss_factor = 10",
		"[volumetric]\nfrequency = \"1 GHz\"\nfield = \"1 kV/m\"\n[volumetric.control]\nsensor = \"10 mm\"\nprogram = \"cure\"\nmax_field = \"0.5 kV/m\"\n")
	out = checkText(t, c)
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

// TestStandingWaveCase loads a standing wave over a band under control and
// checks the resolved values and what check prints: the band with its
// default number of points, the plane wave's shares and the wavelength in
// the material.
func TestStandingWaveCase(t *testing.T) {
	c := testkit.VolumetricCase(t, "permittivity = 78\nloss_factor = 10",
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
	out := checkText(t, c)
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

// TestCheckStandingWaveWarnings: a resin layer on an aluminium plate. Under
// an exponential field check warns that 10 mm is more than λ/8 in the resin
// (λ = λ0/n′, n′ = √(ε′/2 (√(1 + (ε″/ε′)²) + 1)) = 2.0025 for ε′ = 4, ε″ = 0.4,
// λ0 = 122.36 mm at 2.45 GHz: λ = 61.1 mm, analytic; λ/8 =
// 7.6 mm) and calls the plate "reflects (metal)", never transparent; under a
// standing wave it does not warn of λ/8 but of a sensor on the metal, at the
// node of the field there (E = 0 on a perfect conductor: analytic).
func TestCheckStandingWaveWarnings(t *testing.T) {
	stack := func(vol string) *cases.Case {
		src := `title = "standing-wave check"
[initial]
temperature = "20 C"
[time]
end = "30 min"
[[layer]]
name = "resin"
material = "r"
thickness = "10 mm"
[[layer]]
name = "plate"
material = "aluminium"
thickness = "2 mm"
[materials.r]
density = "1100 kg/m^3"
specific_heat = "1500 J/kg/K"
conductivity = "0.2 W/m/K"
[materials.r.dielectric]
permittivity = 4
loss_factor = 0.4
[top]
kind = "convection"
h = "5 W/m^2/K"
air = "20 C"
[bottom]
kind = "insulated"
` + vol
		c, err := cases.Parse("sw.toml", []byte(src), "")
		if err != nil {
			t.Fatalf("Parse: %v", err)
		}
		return c
	}
	out := checkText(t, stack("[volumetric]\nfrequency = \"2.45 GHz\"\nfield = \"1 kV/m\"\nattenuation = \"top\"\n"))
	for _, want := range []string{"more than an eighth of the wavelength in it (61.1 mm at 2.45 GHz)", "plate (aluminium): reflects (metal)",
		"For comparison, a plane wave from the same face(s)"} {
		if !strings.Contains(out, want) {
			t.Errorf("exponential: check output lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "transparent") {
		t.Errorf("exponential: the aluminium plate is called transparent:\n%s", out)
	}
	out = checkText(t, stack("[volumetric]\nattenuation = \"standing-wave\"\nincident = \"top\"\nincident_power = \"2 kW/m^2\"\nfrequency = \"2.45 GHz\"\n"+
		"[volumetric.control]\nsensor = \"10 mm\"\nprogram = \"60 C\"\n"))
	if strings.Contains(out, "eighth of the wavelength") || !strings.Contains(out, "the sensor at 10 mm sits near a node of the standing wave") ||
		!strings.Contains(out, "plate (aluminium): reflects (metal)") {
		t.Errorf("standing wave: check output:\n%s", out)
	}
}
