package physics

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

func TestPropertyTable(t *testing.T) {
	p, err := NewTable([]float64{300, 400, 500}, []float64{1, 3, 2})
	if err != nil {
		t.Fatal(err)
	}
	// Source: analytic — linear interpolation between (300, 1), (400, 3),
	// (500, 2), held constant beyond the ends (README Case file reference, property tables).
	tests := []struct {
		T, v, dvdT float64
	}{
		{300, 1, 0},
		{350, 2, 0.02},
		{375, 2.5, 0.02},
		{400, 3, 0.02}, // a node: the value is continuous, the slope is the lower segment's
		{450, 2.5, -0.01},
		{499, 2.01, -0.01},
		{500, 2, 0},
		{200, 1, 0},  // below the table: first value, zero slope
		{1e4, 2, 0},  // above: last value
		{-1e9, 1, 0}, // far below
	}
	for _, tc := range tests {
		v, d := p.At(tc.T)
		if math.Abs(v-tc.v) > 1e-12 || math.Abs(d-tc.dvdT) > 1e-15 {
			t.Errorf("At(%g) = %v, %v; want %v, %v", tc.T, v, d, tc.v, tc.dvdT)
		}
	}
	// The derivative inside each segment matches central differences (gonum diff/fd).
	for _, T := range []float64{320, 360, 420, 480} {
		_, d := p.At(T)
		num := fd.Derivative(func(x float64) float64 { v, _ := p.At(x); return v }, T, &fd.Settings{Formula: fd.Central, Step: 1e-3})
		if math.Abs(d-num) > 1e-9 {
			t.Errorf("dvdT(%g) = %v, finite difference %v", T, d, num)
		}
	}
	if p.IsConstant() {
		t.Error("table reported constant")
	}
	// Source: the table's smallest value.
	if p.Min() != 1 {
		t.Errorf("Min = %v, want 1", p.Min())
	}
	temps, values := p.Points()
	if len(temps) != 3 || temps[2] != 500 || values[1] != 3 {
		t.Errorf("Points = %v, %v", temps, values)
	}
}

func TestPropertyTableCopiesInput(t *testing.T) {
	temps, values := []float64{300, 400}, []float64{10, 20}
	p, err := NewTable(temps, values)
	if err != nil {
		t.Fatal(err)
	}
	temps[1], values[1] = 1000, -5
	if v, _ := p.At(400); v != 20 {
		t.Errorf("table changed with its input slices: At(400) = %v, want 20", v)
	}
}

func TestPropertyConstant(t *testing.T) {
	p := Constant(0.19)
	for _, T := range []float64{-100, 0, 293.15, 1e6} {
		if v, d := p.At(T); v != 0.19 || d != 0 {
			t.Errorf("Constant(0.19).At(%g) = %v, %v", T, v, d)
		}
	}
	if !p.IsConstant() || p.Min() != 0.19 {
		t.Errorf("IsConstant = %v, Min = %v", p.IsConstant(), p.Min())
	}
	var zero Property
	if v, d := zero.At(300); v != 0 || d != 0 || zero.Min() != 0 {
		t.Errorf("zero Property: At = %v, %v; Min = %v; want zeros", v, d, zero.Min())
	}
}

func TestNewTableErrors(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name          string
		temps, values []float64
	}{
		{"equal temperatures", []float64{300, 300, 400}, []float64{1, 2, 3}},
		{"decreasing temperatures", []float64{300, 400, 350}, []float64{1, 2, 3}},
		{"one point", []float64{300}, []float64{1}},
		{"no points", nil, nil},
		{"length mismatch", []float64{300, 400, 500}, []float64{1, 2}},
		{"NaN temperature", []float64{300, nan}, []float64{1, 2}},
		{"NaN first temperature", []float64{nan, 300}, []float64{1, 2}},
		{"NaN value", []float64{300, 400}, []float64{nan, 2}},
		{"infinite value", []float64{300, 400}, []float64{1, math.Inf(1)}},
	}
	for _, tc := range tests {
		_, err := NewTable(tc.temps, tc.values)
		if !errors.Is(err, ErrTable) {
			t.Errorf("%s: err = %v, want ErrTable", tc.name, err)
		}
	}
}

func TestBlend(t *testing.T) {
	unc, _ := NewTable([]float64{300, 500}, []float64{1500, 1900})
	b := Blend{Uncured: unc, Cured: Constant(1300), HasCured: true}
	// Source: README Case file reference, [materials.NAME], p(T, α) = (1 − α)·uncured(T) + α·cured(T), evaluated
	// by hand at T = 400 (uncured 1700, slope 2) and α = 0.25:
	// 0.75·1700 + 0.25·1300 = 1600, ∂/∂T = 0.75·2 = 1.5, ∂/∂α = 1300 − 1700 = −400.
	v, dT, da := b.At(400, 0.25)
	if math.Abs(v-1600) > 1e-9 || math.Abs(dT-1.5) > 1e-12 || math.Abs(da+400) > 1e-9 {
		t.Errorf("Blend.At(400, 0.25) = %v, %v, %v; want 1600, 1.5, -400", v, dT, da)
	}
	// Partial derivatives against central differences (gonum diff/fd).
	central := &fd.Settings{Formula: fd.Central, Step: 1e-4}
	for _, T := range []float64{350, 450} {
		for _, a := range []float64{0.1, 0.8} {
			_, dT, da := b.At(T, a)
			nT := fd.Derivative(func(x float64) float64 { v, _, _ := b.At(x, a); return v }, T, central)
			na := fd.Derivative(func(x float64) float64 { v, _, _ := b.At(T, x); return v }, a, central)
			if math.Abs(dT-nT) > 1e-7 || math.Abs(da-na) > 1e-7 {
				t.Errorf("Blend derivatives at (%g, %g) = %v, %v; finite differences %v, %v", T, a, dT, da, nT, na)
			}
		}
	}
	if got := b.Min(); got != 1300 {
		t.Errorf("Blend.Min = %v, want 1300", got)
	}
	in := Inert(unc)
	if v, _, da := in.At(400, 0.9); v != 1700 || da != 0 {
		t.Errorf("Inert.At(400, 0.9) = %v (∂α %v), want 1700 and 0", v, da)
	}
	if in.Min() != 1500 {
		t.Errorf("Inert.Min = %v, want 1500", in.Min())
	}
}
