package cases

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// A loss factor may be a table in temperature; the table's values
// are plain numbers, its temperatures carry units.
const lossTableCase = `
[initial]
temperature = "23 C"
[time]
end = "10 min"
[[layer]]
name = "coat"
material = "lossy"
thickness = "2 mm"
[materials.lossy]
density = "1100 kg/m^3"
specific_heat = "1400 J/kg/K"
conductivity = "0.2 W/m/K"
[materials.lossy.dielectric]
permittivity = 4.0
loss_factor = { temperature = ["20 C", "120 C"], value = [0.4, 0.8] }
[volumetric]
frequency = "2.45 GHz"
field = "1 kV/m"
[top]
kind = "insulated"
[bottom]
kind = "insulated"
`

func TestLossFactorTable(t *testing.T) {
	c, err := Parse("loss.toml", []byte(lossTableCase), "")
	if err != nil {
		t.Fatal(err)
	}
	d := c.Materials["lossy"].Dielectric
	if d.LossTable == nil || d.LossTableCured != d.LossTable {
		t.Fatalf("loss table %v, cured %v: want the table for both (no loss_factor_cured given)", d.LossTable, d.LossTableCured)
	}
	// Source: linear interpolation between the two points (analytic):
	// at 70 C, halfway, ε″ = 0.6; the largest value 0.8 is kept for estimates.
	if e, dT, _ := d.Loss(343.15, 0); math.Abs(e-0.6) > 1e-12 || math.Abs(dT-0.004) > 1e-12 || d.LossFactor != 0.8 {
		t.Errorf("ε″(70 C) = %g, dε″/dT = %g, LossFactor %g; want 0.6, 0.004, 0.8", e, dT, d.LossFactor)
	}

	bad := strings.Replace(lossTableCase, "value = [0.4, 0.8]", "value = [0.4, -0.8]", 1)
	_, err = Parse("loss.toml", []byte(bad), "")
	if err == nil || !errors.Is(err, ErrRange) || !strings.Contains(err.Error(), "loss.toml:16:64:") ||
		!strings.Contains(err.Error(), "materials.lossy.dielectric.loss_factor.value.1") {
		t.Errorf("negative table value: got %v; want a range error at 16:64 naming the element", err)
	}
}
