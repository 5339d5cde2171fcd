package cases

import (
	"bytes"
	"fmt"
	"path"
	"slices"
	"strings"
	"testing"
)

func TestExamplesEmbedded(t *testing.T) {
	entries, err := exampleFS.ReadDir("examples")
	if err != nil {
		t.Fatal(err)
	}
	var files []string
	for _, e := range entries {
		files = append(files, strings.TrimSuffix(e.Name(), path.Ext(e.Name())))
	}
	slices.Sort(files)
	if names := ExampleNames(); !slices.Equal(files, names) {
		t.Errorf("embedded files %v, listed examples %v: they must agree", files, names)
	}
	list := Examples()
	if len(list) < 2 {
		t.Fatalf("got %d examples, want at least 2", len(list))
	}
	for i, ex := range list {
		if i > 0 && list[i-1].Name >= ex.Name {
			t.Errorf("examples not sorted: %q before %q", list[i-1].Name, ex.Name)
		}
		got, ok := ExampleByName(ex.Name)
		if !ok || !bytes.Equal(got.Text, ex.Text) || got.Summary == "" {
			t.Errorf("ExampleByName(%q) = %q, %v", ex.Name, got.Summary, ok)
		}
		// Each example says its data are invented.
		if !strings.Contains(string(ex.Text), "Invented") && !strings.Contains(string(ex.Text), "invented") {
			t.Errorf("example %s does not say its data are invented", ex.Name)
		}
	}
	if _, ok := ExampleByName("no-such-example"); ok {
		t.Error("ExampleByName found a missing example")
	}
	// Copies: changing one does not change the next.
	list[0].Text[0] = 'X'
	if Examples()[0].Text[0] == 'X' {
		t.Error("Examples returns shared texts")
	}
}

func ExampleExampleByName() {
	ex, ok := ExampleByName("tile-on-spreader")
	fmt.Println(ok, strings.Contains(string(ex.Text), `material = "alumina-96"`))
	// Output:
	// true true
}
