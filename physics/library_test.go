package physics

import (
	"slices"
	"strings"
	"testing"
)

// libraryNames are the built-in names other packages and the examples use.
var libraryNames = []string{
	"alumina", "alumina-96", "aluminium", "aluminium-2024", "aluminium-6061", "borosilicate-glass",
	"carbon-steel", "copper", "epoxy-cured", "fr4", "ptfe", "silicon",
	"soda-lime-glass", "stainless-304",
	"invar-36", "nylon-bagging-film", "fep-release-film", "polyester-breather", "silicone-rubber",
}

func TestLibraryComplete(t *testing.T) {
	lib := Library()
	if len(lib) < 13 {
		t.Fatalf("library has %d materials, want at least 13", len(lib))
	}
	names := BuiltinNames()
	if !slices.IsSorted(names) {
		t.Errorf("BuiltinNames not sorted: %v", names)
	}
	for _, want := range libraryNames {
		if _, ok := slices.BinarySearch(names, want); !ok {
			t.Errorf("built-in %q missing", want)
		}
	}
	for i, m := range lib {
		if i > 0 && !(lib[i-1].Name < m.Name) {
			t.Errorf("Library not sorted by name: %q before %q", lib[i-1].Name, m.Name)
		}
		if m.Name != names[i] {
			t.Errorf("Library()[%d] = %q, BuiltinNames()[%d] = %q", i, m.Name, i, names[i])
		}
		cp, _, _ := m.SpecificHeat.At(300, 0)
		k, _, _ := m.Conductivity.At(300, 0)
		if !(m.Density > 0 && cp > 0 && k > 0) {
			t.Errorf("%s: rho %v, cp %v, k %v; want all positive", m.Name, m.Density, cp, k)
		}
		// Metals reflect microwaves (a perfect conductor at these
		// frequencies: common practice); nothing built in cures or absorbs.
		metal := slices.Contains([]string{"aluminium", "aluminium-2024", "aluminium-6061", "carbon-steel", "copper", "invar-36", "stainless-304"}, m.Name)
		if d := m.Dielectric; m.Cure != nil || (d != nil && !d.Shield) || metal != (d != nil && d.Shield) {
			t.Errorf("%s: built-ins neither cure nor absorb, and exactly the metals are shields (dielectric %+v)", m.Name, d)
		}
		if m.SpecificHeat.HasCured || m.Conductivity.HasCured || !m.SpecificHeat.Uncured.IsConstant() || !m.Conductivity.Uncured.IsConstant() {
			t.Errorf("%s: built-ins are constant and inert", m.Name)
		}
		// Every source names its status, and sits on one line.
		if m.Source == "" || strings.ContainsAny(m.Source, "\n\t") ||
			!(strings.Contains(m.Source, "confirmed") || strings.Contains(m.Source, "from memory")) {
			t.Errorf("%s: Source %q must be one line naming a source and its status", m.Name, m.Source)
		}
	}
}

func TestLibraryValues(t *testing.T) {
	tests := []struct {
		name       string
		rho, cp, k float64
		source     string // a word the Source must contain
	}{
		// Source: Incropera, Fundamentals of Heat and Mass Transfer, App. A Table A.1, pure aluminium, 300 K (confirmed)
		{"aluminium", 2702, 903, 237, "Table A.1"},
		// Source: Incropera App. A Table A.1, pure copper, 300 K (confirmed)
		{"copper", 8933, 385, 401, "Table A.1"},
		// Source: Incropera App. A Table A.1, 2024-T6, 300 K (confirmed)
		{"aluminium-2024", 2770, 875, 177, "2024-T6"},
		// Source: Incropera App. A, silicon, 300 K (confirmed)
		{"silicon", 2330, 712, 148, "confirmed"},
		// Source: Incropera App. A Table A.2, polycrystalline aluminium oxide, 300 K (confirmed)
		{"alumina", 3970, 765, 36.0, "polycrystalline"},
		// Source: 96 % alumina ceramic, makers' data sheets for the grade (from memory)
		{"alumina-96", 3720, 880, 24.7, "from memory"},
		// Source: Incropera App. A, plain carbon steel (from memory)
		{"carbon-steel", 7854, 434, 60.5, "from memory"},
		// Source: Incropera App. A, AISI 304 (from memory)
		{"stainless-304", 7900, 477, 14.9, "304"},
		// Source: Incropera App. A, borosilicate glass (from memory)
		{"borosilicate-glass", 2225, 835, 1.4, "from memory"},
		// Source: Incropera App. A, plate glass (from memory)
		{"soda-lime-glass", 2500, 750, 1.4, "from memory"},
		// Source: PTFE 2200/1050/0.35, cp confirmed in Callister
		{"ptfe", 2200, 1050, 0.35, "Callister"},
		// Source: 6061 aluminium, from memory, k from a secondary table
		{"aluminium-6061", 2700, 896, 167, "secondary table"},
		// Source: FR-4 through-plane k, Sarvar, Poole & Witting, J. Electron.
		// Mater. 19:1345 (1990) (confirmed); rho 1850 (confirmed); cp 1150 in
		// the 1100–1200 range (from memory)
		{"fr4", 1850, 1150, 0.343, "Sarvar"},
		// Source: cured unfilled epoxy, cp Callister (confirmed), rho and k from memory
		{"epoxy-cured", 1200, 1050, 0.20, "from memory"},
	}
	for _, tc := range tests {
		m, ok := Builtin(tc.name)
		if !ok {
			t.Errorf("Builtin(%q) not found", tc.name)
			continue
		}
		cp, _, _ := m.SpecificHeat.At(293.15, 0.5)
		k, _, _ := m.Conductivity.At(293.15, 0.5)
		if m.Name != tc.name || m.Density != tc.rho || cp != tc.cp || k != tc.k {
			t.Errorf("%s: name %q rho %v cp %v k %v; want rho %v cp %v k %v", tc.name, m.Name, m.Density, cp, k, tc.rho, tc.cp, tc.k)
		}
		if !strings.Contains(m.Source, tc.source) {
			t.Errorf("%s: Source %q does not mention %q", tc.name, m.Source, tc.source)
		}
	}
}

func TestBuiltinFreshCopies(t *testing.T) {
	a, _ := Builtin("copper")
	a.Density = 1
	a.Name = "changed"
	b, ok := Builtin("copper")
	if !ok || b.Density != 8933 || b.Name != "copper" {
		t.Errorf("Builtin returned shared state: %+v", b)
	}
	lib := Library()
	lib[0].Density = -1
	if Library()[0].Density == -1 {
		t.Error("Library returned shared state")
	}
	if _, ok := Builtin("unobtainium"); ok {
		t.Error("Builtin found an unknown name")
	}
	if _, ok := Builtin("Copper"); ok {
		t.Error("Builtin matched a name case-insensitively")
	}
}

// TestLibraryGenericNames keeps registered trade names out of the library:
// a material and its source are named by what they are (PTFE, borosilicate
// glass), as handbooks and standards do, even where a textbook table heads
// the row with a brand.
func TestLibraryGenericNames(t *testing.T) {
	// Brands that handbook tables commonly use for generic materials (common practice).
	brands := []string{"teflon", "pyrex", "duran", "borofloat", "kapton", "mylar", "delrin", "vespel", "ultem", "macor", "plexiglas", "lexan"}
	for _, m := range Library() {
		text := strings.ToLower(m.Name + " " + m.Source)
		for _, b := range brands {
			if strings.Contains(text, b) {
				t.Errorf("%s: name or source %q carries the trade name %q; use the generic name", m.Name, m.Source, b)
			}
		}
	}
}
