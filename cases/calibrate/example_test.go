package calibrate

import (
	"bytes"
	"os"
	"testing"

	"cureslab/cases/internal/testkit"
)

// The embedded example log is exactly what makeExampleLog makes (so it is
// made by the tool, from the example case); -update rewrites it.
func TestExampleLogIsMadeByTheTool(t *testing.T) {
	got, err := makeExampleLog()
	if err != nil {
		t.Fatal(err)
	}
	if testkit.Updating() {
		if err := os.WriteFile("examples/"+ExampleLogName, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	if !bytes.Equal(got, ExampleLog()) {
		t.Errorf("examples/%s differs from what makeExampleLog makes; run go test ./cases/calibrate -run ExampleLog -update", ExampleLogName)
	}
}
