package tomltext

import (
	"testing"

	"github.com/BurntSushi/toml"
)

// TestLocator checks positions found in the text for keys in nested
// arrays of tables, dotted keys, multi-line inline tables and arrays,
// strings that contain brackets, and quoted keys.
func TestLocator(t *testing.T) {
	src := `# [not.a.header]
a = "x # y [z]" # comment [q]
b.c = 1
s = """
[fake]
key = 2
"""
[[layer]]
name = "one"
[[layer]]
name = 'two'
  thickness = "1 mm"
[layer.extra]
k = 1
[[layer.sub]]
x = 1
[[layer.sub]]
x = 2
[t]
"quoted.key" = 3
segs = [
  { ramp = "1 C/min", to = "2 C" }, # c
  { hold = "3 min",
    to = "x" },
]
pts = [["0 min", "1 C"], ["2 min", "3 C"]]
`
	var doc map[string]any
	if _, err := toml.Decode(src, &doc); err != nil {
		t.Fatalf("test input is not valid TOML: %v", err)
	}
	l := Locate(src)
	tests := []struct {
		path string
		key  Place
		val  Place
	}{
		{"a", Place{2, 1}, Place{2, 5}},
		{"b.c", Place{3, 1}, Place{3, 7}},
		{"s", Place{4, 1}, Place{4, 5}},
		{"layer.0.name", Place{9, 1}, Place{9, 8}},
		{"layer.1.name", Place{11, 1}, Place{11, 8}},
		{"layer.1.thickness", Place{12, 3}, Place{12, 15}},
		{"layer.1.extra.k", Place{14, 1}, Place{14, 5}},
		{"layer.1.sub.0.x", Place{16, 1}, Place{16, 5}},
		{"layer.1.sub.1.x", Place{18, 1}, Place{18, 5}},
		{"t.quoted.key", Place{20, 1}, Place{20, 16}},
		{"t.segs.0", Place{22, 3}, Place{22, 3}},
		{"t.segs.0.to", Place{22, 23}, Place{22, 28}},
		{"t.segs.1.hold", Place{23, 5}, Place{23, 12}},
		{"t.segs.1.to", Place{24, 5}, Place{24, 10}},
		{"t.pts.1.0", Place{26, 27}, Place{26, 27}},
	}
	for _, tt := range tests {
		if got := l.Key(tt.path); got != tt.key {
			t.Errorf("key(%q) = %v, want %v", tt.path, got, tt.key)
		}
		if got := l.Value(tt.path); got != tt.val {
			t.Errorf("value(%q) = %v, want %v", tt.path, got, tt.val)
		}
	}
	tables := []struct {
		path string
		want Place
	}{
		{"layer.0", Place{8, 1}},
		{"layer.1", Place{10, 1}},
		{"layer.1.extra", Place{13, 1}},
		{"layer.1.sub.1", Place{17, 1}},
		{"b", Place{3, 1}},                  // a dotted table: its first key
		{"t.missing", Place{19, 1}},         // absent: the enclosing table
		{"fake", Place{}},                   // inside a string: not a table
		{"layer.1.nothing.x", Place{10, 1}}, // falls back through absent levels
	}
	for _, tt := range tables {
		if got := l.Table(tt.path); got != tt.want {
			t.Errorf("table(%q) = %v, want %v", tt.path, got, tt.want)
		}
	}
}
