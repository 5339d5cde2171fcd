package calibrate

import (
	"testing"
)

func TestApplyEdits(t *testing.T) {
	text := `title = "x"   # a title

[top]
kind = "convection"
h = "15 W/m^2/K"                  # free surface
air = 'oven'

[[layer]]
name = "a"
n = 1.5
m=0.6
`
	got, err := applyEdits(text, []edit{
		{Line: 5, Col: 5, Key: "top.h", Lit: `"11.2 W/m^2/K"`, Comment: "fitted"},
		{Line: 6, Col: 7, Key: "top.air", Lit: `"90 C"`, Comment: "fitted"},
		{Line: 10, Col: 5, Key: "layer.0.n", Lit: "1.62"},
		{Line: 11, Col: 3, Key: "layer.0.m", Lit: "0.58", Comment: "fitted"},
		{Line: 8, Insert: true, Key: "contact_resistance", Lit: `"1e-4 m^2*K/W"`, Comment: "fitted"},
	})
	if err != nil {
		t.Fatal(err)
	}
	want := `title = "x"   # a title

[top]
kind = "convection"
h = "11.2 W/m^2/K"                # free surface
air = "90 C"  # fitted

[[layer]]
contact_resistance = "1e-4 m^2*K/W"  # fitted
name = "a"
n = 1.62
m=0.58  # fitted
`
	if got != want {
		t.Errorf("got\n%s\nwant\n%s", got, want)
	}
	for _, c := range []struct {
		name string
		e    edit
	}{
		{"array", edit{Line: 1, Col: 5, Key: "k", Lit: "1"}},
		{"multi-line string", edit{Line: 1, Col: 5, Key: "k", Lit: "1"}},
		{"no such line", edit{Line: 9, Col: 1, Key: "k", Lit: "1"}},
	} {
		src := map[string]string{"array": "k = [1, 2]\n", "multi-line string": "k = \"\"\"a\nb\"\"\"\n", "no such line": "k = 1\n"}[c.name]
		if _, err := applyEdits(src, []edit{c.e}); err == nil {
			t.Errorf("%s: no error", c.name)
		}
	}
}
