package cases

import (
	"errors"
	"io/fs"
	"testing"
)

func TestErrorFormat(t *testing.T) {
	tests := []struct {
		e    *Error
		want string
	}{
		{&Error{File: "a.toml", Line: 3, Col: 7, Key: "layer.0.thickness", Err: errors.New("boom")},
			"a.toml:3:7: layer.0.thickness: boom"},
		{&Error{File: "a.toml", Line: 3, Key: "k", Err: errors.New("boom"), Hint: "first\nsecond\n"},
			"a.toml:3: k: boom\n\tfirst\n\tsecond"},
		{&Error{File: "a.toml", Key: "top", Err: errors.New("missing")},
			"a.toml: top: missing"},
		{&Error{File: "a.toml", Line: 1, Col: 1, Err: errors.New("no key")},
			"a.toml:1:1: no key"},
	}
	for _, tt := range tests {
		if got := tt.e.Error(); got != tt.want {
			t.Errorf("Error() = %q, want %q", got, tt.want)
		}
	}
}

func TestErrorListErr(t *testing.T) {
	var empty ErrorList
	if err := empty.Err(); err != nil {
		t.Errorf("empty list: Err() = %#v, want a plain nil", err)
	}
	cause := &fs.PathError{Op: "open", Path: "x", Err: fs.ErrNotExist}
	list := ErrorList{
		{File: "a", Line: 2, Err: &detail{Kind: ErrRange, Msg: "too big"}},
		{File: "a", Line: 1, Err: &detail{Kind: ErrFile, Cause: cause, Msg: "cannot read"}},
	}
	err := list.Err()
	if err == nil {
		t.Fatal("non-empty list: Err() = nil")
	}
	for _, target := range []error{ErrRange, ErrFile, fs.ErrNotExist} {
		if !errors.Is(err, target) {
			t.Errorf("errors.Is(list, %v) = false", target)
		}
	}
	if errors.Is(err, ErrUnit) {
		t.Error("errors.Is(list, ErrUnit) = true for a list without unit errors")
	}
	var pe *fs.PathError
	if !errors.As(err, &pe) || pe != cause {
		t.Error("errors.As does not reach the cause")
	}
	if got, want := err.Error(), "a:2: too big\na:1: cannot read"; got != want {
		t.Errorf("Error() = %q, want %q", got, want)
	}
}

func TestErrorListSort(t *testing.T) {
	mk := func(file string, line, col int, msg string) *Error {
		return &Error{File: file, Line: line, Col: col, Err: &detail{Kind: ErrRange, Msg: msg}}
	}
	list := ErrorList{
		mk("c.toml", 0, 0, "no position"),
		mk("log.csv", 9, 1, "csv first"),
		mk("c.toml", 5, 3, "b"),
		mk("c.toml", 5, 3, "b"), // exact duplicate
		mk("log.csv", 2, 1, "csv second"),
		mk("c.toml", 2, 8, "a"),
	}
	got := list.sortFor("c.toml")
	want := []string{"a", "b", "csv first", "csv second", "no position"}
	if len(got) != len(want) {
		t.Fatalf("sorted list %v, want messages %v", got, want)
	}
	for i, e := range got {
		if e.Err.Error() != want[i] {
			t.Errorf("element %d: %q, want %q", i, e.Err.Error(), want[i])
		}
	}
}

func TestEditDistance(t *testing.T) {
	tests := []struct {
		a, b string
		want int
	}{
		// Source: Levenshtein distance, the classic kitten/sitting example (from memory).
		{"kitten", "sitting", 3},
		// Source: analytic, one adjacent transposition.
		{"materail", "material", 1},
		// Source: optimal string alignment vs true Damerau–Levenshtein: OSA("ca", "abc") = 3
		// because no substring is edited twice (from memory; true DL gives 2).
		{"ca", "abc", 3},
		// Source: analytic, empty strings.
		{"", "abc", 3},
		{"abc", "", 3},
		{"", "", 0},
		// Source: analytic, counted in runes, not bytes.
		{"µm", "um", 1},
	}
	for _, tt := range tests {
		if got := editDistance(tt.a, tt.b); got != tt.want {
			t.Errorf("editDistance(%q, %q) = %d, want %d", tt.a, tt.b, got, tt.want)
		}
		if got := editDistance(tt.b, tt.a); got != tt.want {
			t.Errorf("editDistance(%q, %q) = %d, want %d (symmetry)", tt.b, tt.a, got, tt.want)
		}
	}
}

func TestSuggest(t *testing.T) {
	valid := []string{"name", "material", "thickness", "cells", "contact_resistance"}
	tests := []struct {
		got, want string
	}{
		{"thicknes", "thickness"},
		{"thikness", "thickness"},
		{"Thickness", "thickness"},
		{"materail", "material"},
		{"cell", "cells"},
		{"contact", "contact_resistance"}, // prefix
		{"colour", ""},
		{"x", ""},
		{"nmae", "name"},
	}
	for _, tt := range tests {
		if got := Suggest(tt.got, valid); got != tt.want {
			t.Errorf("Suggest(%q) = %q, want %q", tt.got, got, tt.want)
		}
	}
	if got := Suggest("anything", nil); got != "" {
		t.Errorf("Suggest with no candidates = %q", got)
	}
}
