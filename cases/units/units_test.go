package units

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Exact NIST SP 811 (2008) App. B.8 factors (from memory), restated here so
// the tests do not reuse the package's constants.
const (
	nistInch  = 0.0254     // m
	nistPound = 0.45359237 // kg
	nistCalTh = 4.184      // J
)

func TestParseAccepted(t *testing.T) {
	tests := []struct {
		in   string
		dim  Dim
		want float64
		tol  float64 // relative; 0 means 1e-12
	}{
		// Source: SI Brochure 9th ed. Table 7 (SI prefixes), analytic.
		{"12 mm", Length, 0.012, 0},
		{"12mm", Length, 0.012, 0},
		{"  12 mm  ", Length, 0.012, 0},
		{"1.5 cm", Length, 0.015, 0},
		{"2 m", Length, 2, 0},
		{"-3 mm", Length, -0.003, 0},
		{"25.4 um", Length, 25.4e-6, 0},
		{"25.4 µm", Length, 25.4e-6, 0}, // U+00B5 micro sign
		{"25.4 μm", Length, 25.4e-6, 0}, // U+03BC Greek mu
		{"1e-3 m", Length, 1e-3, 0},
		{"1E+2 nm", Length, 1e-7, 0},
		{".5 mm", Length, 5e-4, 0},
		// Source: NIST SP 811 (2008) App. B.8, inch = 2.54 E-02 m exactly (from memory).
		{"1 in", Length, nistInch, 0},
		{"0.5 inch", Length, 0.5 * nistInch, 0},
		// Source: NIST SP 811 (2008) App. B.8, mil = 2.54 E-05 m exactly (from memory).
		{"10 mil", Length, 10 * 2.54e-5, 0},
		// Source: NIST SP 811 (2008) App. B.8, foot = 3.048 E-01 m exactly (from memory).
		{"2 ft", Length, 0.6096, 0},

		// Source: SI Brochure 9th ed. Table 8 (min = 60 s, h = 3600 s).
		{"90 min", Time, 5400, 0},
		{"5 h", Time, 18000, 0},
		{"2 hr", Time, 7200, 0},
		{"60 s", Time, 60, 0},
		{"30 sec", Time, 30, 0},
		{"250 ms", Time, 0.25, 0},

		// Source: NIST SP 811 (2008) §4.2.1.1, T/K = t/°C + 273.15 (from memory).
		{"25 C", Temperature, 298.15, 0},
		{"25 °C", Temperature, 298.15, 0},
		{"25 degC", Temperature, 298.15, 0},
		{"25 ℃", Temperature, 298.15, 0},
		{"25C", Temperature, 298.15, 0},
		{"-35 C", Temperature, 238.15, 0},
		{"−35 C", Temperature, 238.15, 0}, // U+2212 minus sign
		{"-273.15 C", Temperature, 0, 1e-12},
		{"300 K", Temperature, 300, 0},
		{"0 K", Temperature, 0, 0},
		// Source: NIST SP 811 (2008) App. B.9, T/K = (t/°F + 459.67)/1.8 (from memory):
		// 212 °F is the normal boiling point 373.15 K, 32 °F the ice point, −40 °F = −40 °C.
		{"212 F", Temperature, 373.15, 0},
		{"32 °F", Temperature, 273.15, 0},
		{"-40 degF", Temperature, 233.15, 0},
		{"-40 ℉", Temperature, 233.15, 0},
		// Source: NIST SP 811 (2008) App. B.9, absolute zero is −459.67 °F (from memory).
		{"-459.67 F", Temperature, 0, 1e-9},

		// Differences. Source: NIST SP 811 (2008) App. B.9, 1 °C = 1 K, 1 °F = 5/9 K as intervals (from memory).
		{"5 C", TemperatureDifference, 5, 0},
		{"5 K", TemperatureDifference, 5, 0},
		{"9 F", TemperatureDifference, 5, 0},
		{"-2 degC", TemperatureDifference, -2, 0},

		// Source: analytic, from the rules above (temperature in a compound is a difference).
		{"2 C/min", HeatingRate, 2.0 / 60, 0},
		{"2 C / min", HeatingRate, 2.0 / 60, 0},
		{"-3 C/min", HeatingRate, -0.05, 0},
		{"2 K/min", HeatingRate, 2.0 / 60, 0},
		{"6 C/h", HeatingRate, 6.0 / 3600, 0},
		{"3.6 F/min", HeatingRate, 3.6 * 5 / 9 / 60, 0},
		{"0.5 K/s", HeatingRate, 0.5, 0},
		{"2 °C/min", HeatingRate, 2.0 / 60, 0},

		// Source: analytic (SI prefixes).
		{"1150 kg/m^3", Density, 1150, 0},
		{"1.15 g/cm^3", Density, 1150, 0},
		{"1.15 g/cm3", Density, 1150, 0},
		{"1.15 g/cm³", Density, 1150, 0},
		{"1.15 g*cm^-3", Density, 1150, 0},
		// Source: NIST SP 811 (2008) App. B.8, lb/in^3 = 2.767 990 E+04 kg/m^3 (from memory).
		{"1 lb/in^3", Density, 2.767990e4, 1e-6},
		// Source: NIST SP 811 (2008) App. B.8, lb/ft^3 = 1.601 846 E+01 kg/m^3 (from memory).
		{"1 lb/ft^3", Density, 1.601846e1, 1e-6},

		// Source: analytic (SI prefixes; left-associative quotients).
		{"1500 J/kg/K", SpecificHeat, 1500, 0},
		{"1.5 J/g/K", SpecificHeat, 1500, 0},
		{"1.5 J/(g*K)", SpecificHeat, 1500, 0},
		{"1.5 kJ/kg/C", SpecificHeat, 1500, 0},
		{"1.8 J/kg/K", SpecificHeat, 1.8, 0},
		// Source: NIST SP 811 (2008) App. B.8, cal_th/(g·°C) = 4.184 E+03 J/(kg·K) (from memory).
		{"0.36 cal/g/C", SpecificHeat, 0.36 * 4184, 0},
		// Source: analytic, 1 °F interval = 5/9 K, so 1 J/(kg·°F) = 1.8 J/(kg·K).
		{"1 J/kg/F", SpecificHeat, 1.8, 0},

		// Source: analytic.
		{"0.19 W/m/K", Conductivity, 0.19, 0},
		{"0.19 W/(m*K)", Conductivity, 0.19, 0},
		{"0.19 W/(m.K)", Conductivity, 0.19, 0},
		{"0.19 W/(m·K)", Conductivity, 0.19, 0},
		{"0.0019 W/cm/K", Conductivity, 0.19, 0},
		{"0.19 W*m^-1*K^-1", Conductivity, 0.19, 0},

		// Source: analytic.
		{"15 W/m^2/K", HeatTransferCoefficient, 15, 0},
		{"15 W/m2/K", HeatTransferCoefficient, 15, 0},
		{"12W/m^2/K", HeatTransferCoefficient, 12, 0},
		{"15 W/(m^2*K)", HeatTransferCoefficient, 15, 0},
		{"15 W/(m2K)", HeatTransferCoefficient, 15, 0},
		{"15 W/m^2/C", HeatTransferCoefficient, 15, 0},

		// Source: analytic.
		{"2e-4 m^2*K/W", ContactResistance, 2e-4, 0},
		{"2e-4 m2K/W", ContactResistance, 2e-4, 0},
		{"2e-4 m^2.K/W", ContactResistance, 2e-4, 0},
		{"2e-4 (m^2*K)/W", ContactResistance, 2e-4, 0},
		{"2 cm^2*K/W", ContactResistance, 2e-4, 0},

		// Source: analytic.
		{"420 J/g", EnergyPerMass, 420e3, 0},
		{"420 kJ/kg", EnergyPerMass, 420e3, 0},
		{"0.42 MJ/kg", EnergyPerMass, 420e3, 0},
		// Source: NIST SP 811 (2008) App. B.8, cal_th/g = 4.184 E+03 J/kg (from memory).
		{"100 cal/g", EnergyPerMass, 100 * nistCalTh * 1e3, 0},

		// Source: analytic.
		{"65 kJ/mol", EnergyPerMole, 65e3, 0},
		{"65000 J/mol", EnergyPerMole, 65e3, 0},
		// Source: NIST SP 811 (2008) App. B.8, kcal_th = 4184 J (from memory).
		{"15 kcal/mol", EnergyPerMole, 15 * 1e3 * nistCalTh, 0},

		// Source: analytic.
		{"1.2e5 1/s", RateConstant, 1.2e5, 0},
		{"60 1/min", RateConstant, 1, 0},
		{"3600 1/h", RateConstant, 1, 0},
		{"1 s^-1", RateConstant, 1, 0},
		{"1 s^−1", RateConstant, 1, 0}, // U+2212

		// Source: analytic (SI prefixes).
		{"2.45 GHz", Frequency, 2.45e9, 0},
		{"915 MHz", Frequency, 915e6, 0},
		{"27.12 MHz", Frequency, 27.12e6, 0},
		{"100 kHz", Frequency, 1e5, 0},
		{"50 Hz", Frequency, 50, 0},

		// Source: analytic.
		{"1.5 kV/m", ElectricField, 1500, 0},
		{"15 V/cm", ElectricField, 1500, 0},
		{"1500 V/m", ElectricField, 1500, 0},

		// Source: analytic.
		{"1.5 kW/m^2", HeatFlux, 1500, 0},
		{"0.15 W/cm^2", HeatFlux, 1500, 0},
		{"0 W/m^2", HeatFlux, 0, 0},

		// Source: analytic.
		{"100 W", Power, 100, 0},
		{"1.2 kW", Power, 1200, 0},
		{"2 MW", Power, 2e6, 0},
		{"500 mW", Power, 0.5, 0},

		// Source: analytic; 1 °F interval = 5/9 K so 1/°F = 1.8/K.
		{"0.0052 1/K", InverseTemperature, 0.0052, 0},
		{"0.0052 1/C", InverseTemperature, 0.0052, 0},
		{"0.0052 K^-1", InverseTemperature, 0.0052, 0},
		{"1 1/F", InverseTemperature, 1.8, 0},

		// Source: analytic.
		{"50 kW/m^3", PowerDensity, 5e4, 0},
		{"0.05 W/cm^3", PowerDensity, 5e4, 0},
		{"4 kW/m^2", PowerPerArea, 4e3, 0}, // a wave's power per area

		// Source: NIST SP 811 (2008), App. B.8 (from memory): 1 P = 0.1 Pa·s,
		// so 1 cP = 1 mPa·s.
		{"100 Pa*s", Viscosity, 100, 0},
		{"250 mPa*s", Viscosity, 0.25, 0},
		{"250 cP", Viscosity, 0.25, 0},
		{"3 P", Viscosity, 0.3, 0},
		{"2 kPa.s", Viscosity, 2000, 0},
	}
	for _, tt := range tests {
		t.Run(tt.dim.String()+"/"+tt.in, func(t *testing.T) {
			got, err := Parse(tt.in, tt.dim)
			if err != nil {
				t.Fatalf("Parse(%q, %v): unexpected error: %v", tt.in, tt.dim, err)
			}
			tol := tt.tol
			if tol == 0 {
				tol = 1e-12
			}
			if tt.want == 0 && math.Abs(got) > tol || math.Abs(got-tt.want) > tol*math.Abs(tt.want) {
				t.Errorf("Parse(%q, %v) = %.15g, want %.15g", tt.in, tt.dim, got, tt.want)
			}
		})
	}
}

func TestParseRejected(t *testing.T) {
	tests := []struct {
		in     string
		dim    Dim
		reason string // a substring the message must contain
	}{
		{"", Length, `"" is empty: a length needs a number and a unit, such as "12 mm"`},
		{"   ", Time, `needs a number and a unit, such as "90 min"`},
		{"12", Length, `"12" has no unit: a length needs a unit, such as "12 mm"`},
		{"0.19", Conductivity, `a conductivity needs a unit, such as "0.19 W/m/K"`},
		{"420", EnergyPerMass, `an energy per mass needs a unit, such as "420 J/g"`},
		{"12 mm/s", Length, `"12 mm/s" is not a length; write it like "12 mm"`},
		{"15 W/m^2/K", Conductivity, `is a heat transfer coefficient, not a conductivity; write it like "0.19 W/m/K"`},
		{"0.19 W/m/K", HeatTransferCoefficient, `is a conductivity, not a heat transfer coefficient`},
		{"2 C/min", Temperature, `is a heating rate, not a temperature`},
		{"25 C", HeatingRate, `is a temperature or a temperature difference, not a heating rate`},
		{"2.45 GHz", Length, `is a rate constant or a frequency, not a length`},
		{"25 C^2", Temperature, `is not a temperature`},
		{"25 (C)", Temperature, `needs a single temperature unit`},
		{"5 mm/m", Length, `is not a length`},
		{"420 J/mol", EnergyPerMass, `is an energy per mole, not an energy per mass`},
		{"NaN", Length, `"NaN" does not start with a number; write it like "12 mm"`},
		{"NaN mm", Length, `does not start with a number`},
		{"Inf mm", Length, `does not start with a number`},
		{"-Inf C", Temperature, `does not start with a number`},
		{"mm", Length, `does not start with a number`},
		{"1e999 m", Length, `has a number out of range`},
		{"1e308 GHz", Frequency, `has a number out of range`},
		{"12 furlong", Length, `has an unknown unit "furlong"; write it like "12 mm"`},
		{"12 MM", Length, `unknown unit "MM" (did you mean "mm"?)`},
		{"65 kj/mol", EnergyPerMole, `unknown unit "kj" (did you mean "kJ"?)`},
		{"90 mins", Time, `unknown unit "mins" (did you mean "min"?)`},
		{"2 ghz", Frequency, `(did you mean "GHz"?)`},
		{"12 x", Length, `unknown unit "x"; write it like`}, // one letter: no guess
		{"12 mm extra", Length, `has unexpected "extra" after the unit (join units with * or /)`},
		{"12 m m", Length, `has unexpected "m" after the unit`},
		{"12 mm,", Length, `has unexpected ","`},
		{"12 mm # top", Length, `has unexpected "#"`},
		{"1,150 kg/m^3", Density, `has unexpected ","`},
		{"0.19 W/m.K", Conductivity, `ambiguous unit "W/m.K": a product after "/" may divide or multiply; write W/m/K or W/(m.K)`},
		{"0.19 W/m*K", Conductivity, `write W/m/K or W/(m*K)`},
		{"15 W/m2K", HeatTransferCoefficient, `write W/m2/K or W/(m2K)`},
		{"15 W/m^2/K*s", HeatTransferCoefficient, `give every divisor its own "/"`},
		{"5 mm/", Length, `ends where a unit is expected`},
		{"5 /s", RateConstant, `has unexpected "/"`},
		{"12 m^", Length, `needs a whole number after "^"`},
		{"12 m^x", Length, `needs a whole number after "^"`},
		{"12 m^99", Length, `exponent 99 that is too large`},
		{"12 (mm", Length, `has a "(" that is not closed`},
		{"12 mm)", Length, `has unexpected ")"`},
		{"1150 kg/m^3 3", Density, `has unexpected "3"`},
		{"5 2/s", RateConstant, `has unexpected number "2" in the unit`},
		{"-300 C", Temperature, `"-300 C" is below absolute zero (-26.85 K)`},
		{"-1 K", Temperature, `is below absolute zero`},
		{"-500 F", Temperature, `is below absolute zero`},
		{"0x10 mm", Length, `unknown unit "x"`},
		{"12 mm", Dim(0), `invalid dimension Dim(0)`},
		{"12 mm", Dim(99), `invalid dimension Dim(99)`},
	}
	for _, tt := range tests {
		t.Run(tt.dim.String()+"/"+tt.in, func(t *testing.T) {
			got, err := Parse(tt.in, tt.dim)
			if err == nil {
				t.Fatalf("Parse(%q, %v) = %g, want an error containing %q", tt.in, tt.dim, got, tt.reason)
			}
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("Parse(%q, %v): error %T is not *Error", tt.in, tt.dim, err)
			}
			if e.Input != tt.in || e.Dim != tt.dim {
				t.Errorf("Parse(%q, %v): Error{Input: %q, Dim: %v}", tt.in, tt.dim, e.Input, e.Dim)
			}
			msg := err.Error()
			if !strings.Contains(msg, tt.reason) {
				t.Errorf("Parse(%q, %v) error\n got  %s\n want it to contain %s", tt.in, tt.dim, msg, tt.reason)
			}
			if strings.ContainsAny(msg, "\n\r") {
				t.Errorf("Parse(%q, %v) error is not one line: %q", tt.in, tt.dim, msg)
			}
		})
	}
}

// Every Dim: its example parses as itself, and 1 of its SI unit is 1.
func TestDimTable(t *testing.T) {
	seen := map[string]bool{}
	for d := Length; d <= Viscosity; d++ {
		if seen[d.String()] {
			t.Errorf("%v: duplicate word", d)
		}
		seen[d.String()] = true
		if _, err := Parse(d.Example(), d); err != nil {
			t.Errorf("%v: example %q does not parse: %v", d, d.Example(), err)
		}
		// Source: analytic, the SI unit of d has scale 1.
		if got, err := Parse("1 "+d.SIUnit(), d); err != nil || got != 1 {
			t.Errorf("%v: Parse(\"1 %s\") = %g, %v; want 1", d, d.SIUnit(), got, err)
		}
		if _, err := Parse("1 "+d.SIUnit(), d%Viscosity+1); err == nil && dims[d].v != dims[d%Viscosity+1].v {
			t.Errorf("%v: %q accepted as %v", d, d.SIUnit(), d%Viscosity+1)
		}
	}
	// Source: the README's Case file reference, dimension words used in messages.
	words := "length, time, temperature, temperature difference, heating rate, density, specific heat, conductivity, heat transfer coefficient, contact resistance, energy per mass, energy per mole, rate constant, frequency, electric field, heat flux, power, inverse temperature, power density, power per area, viscosity"
	var got []string
	for d := Length; d <= Viscosity; d++ {
		got = append(got, d.String())
	}
	if g := strings.Join(got, ", "); g != words {
		t.Errorf("dimension words\n got  %s\n want %s", g, words)
	}
	for _, d := range []Dim{0, Viscosity + 1} {
		if d.Example() != "" || d.SIUnit() != "" || !strings.HasPrefix(d.String(), "Dim(") {
			t.Errorf("invalid %d: String %q, Example %q, SIUnit %q", int(d), d.String(), d.Example(), d.SIUnit())
		}
	}
}

// Identity check: the absolute and the difference readings of one value
// differ by the offset of the scale (NIST SP 811 §4.2.1.1, App. B.9, from memory).
func TestTemperatureOffsetIdentity(t *testing.T) {
	for _, x := range []string{"-40", "0", "23", "120.5", "1e3"} {
		for _, c := range []struct {
			unit   string
			offset float64 // absolute − difference reading, in K
		}{{"C", 273.15}, {"K", 0}, {"F", 273.15 - 32*5.0/9}} {
			if c.unit == "K" && strings.HasPrefix(x, "-") {
				continue // below absolute zero
			}
			abs, err1 := Parse(x+" "+c.unit, Temperature)
			diff, err2 := Parse(x+" "+c.unit, TemperatureDifference)
			if err1 != nil || err2 != nil {
				t.Fatalf("%s %s: %v, %v", x, c.unit, err1, err2)
			}
			if math.Abs(abs-diff-c.offset) > 1e-9 {
				t.Errorf("%s %s: absolute %g − difference %g = %g, want %g", x, c.unit, abs, diff, abs-diff, c.offset)
			}
		}
	}
}

func TestParseSpread(t *testing.T) {
	tests := []struct {
		in       string
		dim      Dim
		abs, rel float64
	}{
		// Source: analytic.
		{"±20 %", HeatTransferCoefficient, 0, 0.2},
		{"±20%", Length, 0, 0.2},
		{" ± 2.5 % ", EnergyPerMole, 0, 0.025},
		{"±0 %", Length, 0, 0},
		{"±1.5 kJ/mol", EnergyPerMole, 1500, 0},
		{"+/-0.3 mm", Length, 3e-4, 0},
		{"+-0.3 mm", Length, 3e-4, 0},
		// Source: NIST SP 811 (2008) App. B.9, intervals 1 °C = 1 K, 1 °F = 5/9 K (from memory).
		{"± 5 C", Temperature, 5, 0},
		{"±9 F", Temperature, 5, 0},
		{"±2 K", TemperatureDifference, 2, 0},
		{"±0.5 C/min", HeatingRate, 0.5 / 60, 0},
	}
	for _, tt := range tests {
		abs, rel, err := ParseSpread(tt.in, tt.dim)
		if err != nil {
			t.Errorf("ParseSpread(%q, %v): unexpected error: %v", tt.in, tt.dim, err)
			continue
		}
		if math.Abs(abs-tt.abs) > 1e-12*math.Abs(tt.abs) || math.Abs(rel-tt.rel) > 1e-15 {
			t.Errorf("ParseSpread(%q, %v) = %g, %g; want %g, %g", tt.in, tt.dim, abs, rel, tt.abs, tt.rel)
		}
	}

	rejected := []struct {
		in     string
		dim    Dim
		reason string
	}{
		{"20 %", Length, `"20 %" is not a spread; write it like "±12 mm" or "±20 %"`},
		{"0.3 mm", Length, `is not a spread`},
		{"±", Length, `is empty`},
		{"±-20 %", Length, `is negative`},
		{"±-0.3 mm", Length, `is negative`},
		{"±%", Length, `needs a number before "%"`},
		{"±20 %%", Length, `needs a number before "%"`},
		{"±NaN %", Length, `needs a number before "%"`},
		{"±1e999 %", Length, `out of range`},
		{"±20", Length, `"±20" has no unit: a length needs a unit, such as "±12 mm"`},
		{"±5 mm", Time, `"±5 mm" is a length, not a time; write it like "±90 min"`},
		{"±5 %", Temperature, `is a percentage of a temperature`},
		{"±5 C", Dim(0), `invalid dimension`},
	}
	for _, tt := range rejected {
		_, _, err := ParseSpread(tt.in, tt.dim)
		var e *Error
		if !errors.As(err, &e) {
			t.Errorf("ParseSpread(%q, %v): error %v (%T), want *Error", tt.in, tt.dim, err, err)
			continue
		}
		if e.Input != tt.in || !strings.Contains(err.Error(), tt.reason) {
			t.Errorf("ParseSpread(%q, %v) error\n got  %s (Input %q)\n want it to contain %s", tt.in, tt.dim, err, e.Input, tt.reason)
		}
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{"12 mm", "2e-4 m^2*K/W", "W/(m", "1/s", "±20 %", "m2K/W", "-300 C", "1e999 m", "µm²"} {
		f.Add(s, int(Length))
	}
	f.Fuzz(func(t *testing.T, s string, d int) {
		x, err := Parse(s, Dim(d))
		if err == nil && (math.IsNaN(x) || math.IsInf(x, 0)) {
			t.Errorf("Parse(%q, %d) = %g with no error", s, d, x)
		}
		if err != nil {
			if _, ok := err.(*Error); !ok {
				t.Errorf("Parse(%q, %d): error %T is not *Error", s, d, err)
			}
		}
		abs, rel, err := ParseSpread(s, Dim(d))
		if err == nil && (abs < 0 || rel < 0 || math.IsNaN(abs+rel) || math.IsInf(abs+rel, 0)) {
			t.Errorf("ParseSpread(%q, %d) = %g, %g with no error", s, d, abs, rel)
		}
	})
}
