package units_test

import (
	"fmt"

	"cureslab/cases/units"
)

func ExampleParse() {
	for _, c := range []struct {
		in  string
		dim units.Dim
	}{
		{"12 mm", units.Length},
		{"25 C", units.Temperature},
		{"5 C", units.TemperatureDifference},
		{"2 C/min", units.HeatingRate},
		{"12W/m^2/K", units.HeatTransferCoefficient},
		{"420 J/g", units.EnergyPerMass},
		{"15 kcal/mol", units.EnergyPerMole},
		{"2e-4 m2K/W", units.ContactResistance},
	} {
		v, err := units.Parse(c.in, c.dim)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%-12s = %.6g %s\n", c.in, v, c.dim.SIUnit())
	}
	for _, bad := range []string{"12", "12 mm/s"} {
		_, err := units.Parse(bad, units.Length)
		fmt.Println(err)
	}
	// Output:
	// 12 mm        = 0.012 m
	// 25 C         = 298.15 K
	// 5 C          = 5 K
	// 2 C/min      = 0.0333333 K/s
	// 12W/m^2/K    = 12 W/m^2/K
	// 420 J/g      = 420000 J/kg
	// 15 kcal/mol  = 62760 J/mol
	// 2e-4 m2K/W   = 0.0002 m^2*K/W
	// "12" has no unit: a length needs a unit, such as "12 mm"
	// "12 mm/s" is not a length; write it like "12 mm"
}

func ExampleParseSpread() {
	for _, s := range []string{"±20 %", "+/-0.3 mm"} {
		abs, rel, err := units.ParseSpread(s, units.Length)
		fmt.Println(s, abs, rel, err)
	}
	abs, _, _ := units.ParseSpread("±9 F", units.Temperature) // a spread is a difference
	fmt.Printf("±9 F = ±%g K\n", abs)
	// Output:
	// ±20 % 0 0.2 <nil>
	// +/-0.3 mm 0.0003 0 <nil>
	// ±9 F = ±5 K
}
