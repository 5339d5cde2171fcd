package cases

import (
	"bytes"
	"errors"
	"strings"
	"testing"
)

func TestCheckGolden(t *testing.T) {
	outGolden(t, "check_hand_built.golden", []byte(chkOutput(t, outTestCase(t))))
}

type failWriter struct{ n int }

func (w *failWriter) Write(b []byte) (int, error) {
	if w.n <= 0 {
		return 0, errors.New("disk full")
	}
	w.n--
	return len(b), nil
}

func TestCheckWriteError(t *testing.T) {
	for _, n := range []int{0, 3, 10} {
		if err := Check(&failWriter{n}, outTestCase(t)); err == nil || err.Error() != "disk full" {
			t.Errorf("writer failing after %d writes: err = %v, want disk full", n, err)
		}
	}
}

func TestCheckExamplesGolden(t *testing.T) {
	for _, ex := range Examples() {
		t.Run(ex.Name, func(t *testing.T) {
			c, err := Parse(ex.Name+".toml", ex.Text, "")
			if err != nil {
				t.Fatal(err)
			}
			var b bytes.Buffer
			if err := Check(&b, c); err != nil {
				t.Fatal(err)
			}
			for _, l := range c.Layers {
				if !strings.Contains(b.String(), l.Name) {
					t.Errorf("check output does not name layer %s", l.Name)
				}
			}
			outGolden(t, "check_"+ex.Name+".golden", b.Bytes())
		})
	}
}
