package check_test

import (
	"bytes"
	"cureslab/cases"
	"cureslab/cases/check"
	"cureslab/cases/internal/testkit"
	"cureslab/physics"
	"errors"
	"math"
	"strings"
	"testing"
)

func TestCheckGolden(t *testing.T) {
	testkit.Golden(t, "check_hand_built.golden", checkOutput(t, testkit.HandBuiltCase(t)))
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
		if err := check.Check(&failWriter{n}, testkit.HandBuiltCase(t)); err == nil || err.Error() != "disk full" {
			t.Errorf("writer failing after %d writes: err = %v, want disk full", n, err)
		}
	}
}

func TestCheckExamplesGolden(t *testing.T) {
	for _, ex := range cases.Examples() {
		t.Run(ex.Name, func(t *testing.T) {
			c, err := cases.Parse(ex.Name+".toml", ex.Text, "")
			if err != nil {
				t.Fatal(err)
			}
			var b bytes.Buffer
			if err := check.Check(&b, c); err != nil {
				t.Fatal(err)
			}
			for _, l := range c.Layers {
				if !strings.Contains(b.String(), l.Name) {
					t.Errorf("check output does not name layer %s", l.Name)
				}
			}
			testkit.Golden(t, "check_"+ex.Name+".golden", b.Bytes())
		})
	}
}

// checkOutput returns what Check writes for c.
func checkOutput(t *testing.T, c *cases.Case) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := check.Check(&b, c); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func TestEstimates(t *testing.T) {
	c := testkit.HandBuiltCase(t)
	est := check.Estimates(c)
	if len(est) != 1 {
		t.Fatalf("got %d estimates, want 1 (one curing layer)", len(est))
	}
	e := est[0]
	// The hottest driving temperature is the 70 C hold of the oven.
	if e.T != 343.15 {
		t.Errorf("reference temperature %g K, want 343.15", e.T)
	}
	// Source: first order α = 1 − exp(−k t), so the
	// half-life is ln 2 / k (analytic), k = A exp(−E/RT).
	k := 1e5 * math.Exp(-60e3/(physics.GasConstant*343.15))
	if want := math.Ln2 / k; math.Abs(e.HalfLife-want) > 1e-9*want {
		t.Errorf("half-life %.12g s, want ln2/k = %.12g s", e.HalfLife, want)
	}
	// Conduction time L²ρc_p/k with the uncured c_p (analytic): heat leaves
	// through the top face only (the board below is insulated), so the
	// length is the whole layer.
	if want := 6.35e-3 * 6.35e-3 * 1100 * 1500 / 0.2; math.Abs(e.ConductionTime-want) > 1e-12*want {
		t.Errorf("conduction time %.12g s, want %.12g s", e.ConductionTime, want)
	}
	// Runaway screen (Frank-Kamenetskii, physics.CriticalFK). The hold at
	// 70 C begins after the 2 K/min ramp from 23 C (1410 s); the cure then
	// is 1 − exp(−∫k dt) for first order (analytic), the integral here by
	// composite Simpson on 2000 intervals. The fastest rate from that cure
	// on is k (1 − α_h) at α_h; δ = E/(R T²) · ρ w H r · L²/k_th with L the
	// layer (one face sheds heat), Bi_top = h L/k_th = 15 × 6.35e-3/0.2,
	// Bi_bottom = 0 (insulated), δ_c = CriticalFKSymmetric(Bi_top).
	rs := e.Runaway
	ramp := (343.15 - 296.15) / (2.0 / 60)
	n := 2000
	kt := func(tm float64) float64 { return 1e5 * math.Exp(-60e3/(physics.GasConstant*(296.15+2.0/60*tm))) }
	sum := kt(0) + kt(ramp)
	for i := 1; i < n; i++ {
		sum += float64(2+2*(i%2)) * kt(ramp*float64(i)/float64(n))
	}
	ah := -math.Expm1(-sum * ramp / float64(n) / 3)
	// CureAlong is good to a relative 1e-4 in ∫k dt (physics tests).
	if rs.HoldFrom != ramp || math.Abs(rs.Cure-ah) > 1e-4*ah {
		t.Errorf("hold from %g s at cure %.8g; want %g s, %.8g", rs.HoldFrom, rs.Cure, ramp, ah)
	}
	wantDelta := 60e3 / (physics.GasConstant * 343.15 * 343.15) * 1100 * 400e3 * k * (1 - rs.Cure) * 6.35e-3 * 6.35e-3 / 0.2
	bi := 15 * 6.35e-3 / 0.2
	if rs.Half || rs.Length != 6.35e-3 || math.Abs(rs.BiTop-bi) > 1e-12*bi || rs.BiBottom != 0 {
		t.Errorf("screen faces: half %v, length %g, Bi %g/%g; want one face at Bi %g", rs.Half, rs.Length, rs.BiTop, rs.BiBottom, bi)
	}
	if math.Abs(rs.Delta-wantDelta) > 1e-9*wantDelta || rs.RateCure != rs.Cure {
		t.Errorf("δ = %.12g at cure %g, want %.12g at the hold's starting cure", rs.Delta, rs.RateCure, wantDelta)
	}
	if want := physics.CriticalFKSymmetric(bi).Delta; math.Abs(rs.Critical-want) > 1e-12*want {
		t.Errorf("δ_c = %.12g, want %.12g", rs.Critical, want)
	}
	// Isothermal time to min_cure 0.9 at 70 C, first order: ln 10 / k.
	if want := math.Ln10 / k; math.Abs(e.TimeToMinCure-want) > 1e-9*want {
		t.Errorf("time to min_cure %.12g s, want %.12g s", e.TimeToMinCure, want)
	}
	if want := check.AdiabaticRise(400e3, 1500, 1300, 0); e.AdiabaticRise != want {
		t.Errorf("adiabatic rise %g K, want %g K", e.AdiabaticRise, want)
	}
	if e.Layer != "resin" || e.Material != "resin-X" || e.Thickness != 6.35e-3 {
		t.Errorf("estimate names %q (%q), thickness %g", e.Layer, e.Material, e.Thickness)
	}
}

func TestCheckCautions(t *testing.T) {
	c := testkit.HandBuiltCase(t)
	out := string(checkOutput(t, c))
	for _, s := range check.Cautions(check.ScopeOf(c)) {
		if !strings.Contains(out, s) {
			t.Errorf("check output lacks the caution %q", s)
		}
	}
	// The subjects every caution list must cover (common practice for
	// exotherm, fire and microwave exposure); our wording must cover each.
	all := strings.ToLower(strings.Join(check.AllCautions(), " "))
	for _, w := range []string{"trial", "data sheets", "fire", "leakage", "interlock", "local codes", "licensed practice"} {
		if !strings.Contains(all, w) {
			t.Errorf("the cautions do not mention %q", w)
		}
	}
}

// TestCheckCautionsApply: check shows the cautions that apply to its case
// and no others: the leakage and interlock caution only with volumetric
// heating, the self-heating caution only with a curing layer.
func TestCheckCautionsApply(t *testing.T) {
	leak := "leakage limits and interlock rules"
	fire := "smokes or catches fire"
	for _, tc := range []struct {
		example            string
		wantLeak, wantFire bool
	}{
		{"thick-potting-oven", false, true},
		{"thick-potting-microwave", true, true},
		{"tile-on-spreader", false, false},
	} {
		ex, ok := cases.ExampleByName(tc.example)
		if !ok {
			t.Fatalf("no example %s", tc.example)
		}
		c, err := cases.Parse(tc.example+".toml", ex.Text, "")
		if err != nil {
			t.Fatal(err)
		}
		out := string(checkOutput(t, c))
		if got := strings.Contains(out, leak); got != tc.wantLeak {
			t.Errorf("%s: leakage caution shown %v, want %v", tc.example, got, tc.wantLeak)
		}
		if got := strings.Contains(out, fire); got != tc.wantFire {
			t.Errorf("%s: self-heating caution shown %v, want %v", tc.example, got, tc.wantFire)
		}
		for _, always := range []string{"qualified trial", "Local codes"} {
			if !strings.Contains(out, always) {
				t.Errorf("%s: the caution on %q is missing", tc.example, always)
			}
		}
	}
}
