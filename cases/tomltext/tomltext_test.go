package tomltext

import (
	"strings"
	"testing"
)

func TestDepth(t *testing.T) {
	for _, tc := range []struct {
		text  string
		depth int
		at    Pos
	}{
		{"a = 1\n", 1, Pos{1, 1}},
		{"[mesh]\nmax_cell = \"0.25 mm\"\n", 2, Pos{2, 1}},
		{"[[layer]]\nname = \"x\"\n", 3, Pos{2, 1}},
		{"[materials.r.cure]\nA1 = 1\n", 4, Pos{2, 1}},
		{"[top]\nflux = [[\"0 min\", \"0 W/m^2\"], [\"10 min\", \"1 kW/m^2\"]]\n", 4, Pos{2, 9}},
		{"a.b.c.d = 1\n", 4, Pos{1, 1}},
		{"a = {b = {c.d = [1]}}\n", 7, Pos{1, 17}},
		{"s = \"[[[{{{\" # [[[\n", 1, Pos{1, 1}},
		{"s = '''\n[[[\n'''\nt = [\n 1,\n [2],\n]\n", 3, Pos{6, 2}},
		{"[a.\"b.c\".d]\r\nx = 1\r\n", 4, Pos{2, 1}},
	} {
		got := Check([]byte(tc.text), 100)
		if got.Depth != tc.depth || got.Deepest != tc.at || got.Unclosed != "" {
			t.Errorf("%q: depth %d at %v, unclosed %q; want %d at %v", tc.text, got.Depth, got.Deepest, got.Unclosed, tc.depth, tc.at)
		}
	}
}

// A hostile file of deep inline tables is stopped where it passes the
// limit, without reading the rest.
func TestDepthStopsAtLimit(t *testing.T) {
	text := "title = \"x\"\nx = " + strings.Repeat("{a = ", 5000) + "1" + strings.Repeat("}", 5000) + "\n"
	got := Check([]byte(text), 32)
	if got.Depth != 33 || got.Deepest.Line != 2 {
		t.Errorf("depth %d at %v, want 33 on line 2", got.Depth, got.Deepest)
	}
	got = Check([]byte(strings.Repeat("a.", 40)+"b = 1\n"), 32)
	if got.Depth != 41 || got.Deepest != (Pos{1, 1}) {
		t.Errorf("a 41-part dotted key: depth %d at %v, want 41 at 1:1", got.Depth, got.Deepest)
	}
}

// A construct left open is reported where it opens, in LF and CRLF text
// alike.
func TestUnclosed(t *testing.T) {
	for _, tc := range []struct {
		text string
		what string
		at   Pos
	}{
		{"title = \"x\"\n[[layer]\nname = \"a\"\n[mesh]\n", "array of tables header", Pos{2, 1}},
		{"title = \"x\"\n\n[mesh\nmax_cell = \"1 mm\"\n", "table header", Pos{3, 1}},
		{"title = \"x\"\nname = \"abc\nb = 2\n", "string", Pos{2, 8}},
		{"a = 1\nname = 'abc\n", "string", Pos{2, 8}},
		{"a = 1\nt = \"\"\"\nabc\n", "multi-line string", Pos{2, 5}},
		{"a = 1\nv = [1,\n 2,\n", "array", Pos{2, 5}},
		{"a = \"é\"\nv = {x = \"ünterminated\n", "string", Pos{2, 10}},
	} {
		for _, eol := range []string{"\n", "\r\n"} {
			text := strings.ReplaceAll(tc.text, "\n", eol)
			got := Check([]byte(text), 100)
			if got.Unclosed != tc.what || got.Open != tc.at {
				t.Errorf("%q: unclosed %q at %v; want %q at %v", text, got.Unclosed, got.Open, tc.what, tc.at)
			}
		}
	}
}
