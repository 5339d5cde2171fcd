package physics

import "sort"

// builtin is one row of the material library: room-temperature density,
// specific heat and conductivity, and where each value comes from.
type builtin struct {
	name   string
	rho    float64 // kg/m³
	cp     float64 // J/(kg·K)
	k      float64 // W/(m·K)
	source string
	metal  bool // reflects microwaves: a shield (Dielectric.Shield)
}

// incropera names the heat-transfer textbook most of the library is taken
// from.
const incropera = "Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer, Appendix A"

// library lists the built-in materials, sorted by name. Values are at room
// temperature (300 K where the source tabulates it); every status is the one
// recorded in the project's reference notes: "confirmed" values were read in
// the publication, "from memory" values were recalled and should be checked
// against the original before they are relied on.
var library = []builtin{
	{"alumina", 3970, 765, 36.0,
		incropera + " (Table A.2, table number from memory), aluminium oxide (polycrystalline) at 300 K: rho, cp, k confirmed", false},
	{"alumina-96", 3720, 880, 24.7,
		"96 % alumina (Al2O3) ceramic, the usual grade of substrates and tiles, at 20 C: rho 3720, cp 880, k 24.7, as tabulated in alumina makers' data sheets for the grade (e.g. CoorsTek, Kyocera; from memory: check your supplier's sheet, k of 96 % grades spans about 20-26)", false},
	{"aluminium", 2702, 903, 237,
		incropera + " (Table A.1, table number from memory), pure aluminium at 300 K: rho, cp, k confirmed", true},
	{"aluminium-2024", 2770, 875, 177,
		incropera + " (Table A.1, table number from memory), aluminium alloy 2024-T6 at 300 K: rho, cp, k confirmed", true},
	{"aluminium-6061", 2700, 896, 167,
		"aluminium alloy 6061-T6, typical handbook values: rho, cp from memory; k from a secondary table (unconfirmed)", true},
	{"borosilicate-glass", 2225, 835, 1.4,
		incropera + " (Table A.3, table number from memory), borosilicate glass at 300 K: rho, cp, k from memory", false},
	{"carbon-steel", 7854, 434, 60.5,
		incropera + " (Table A.1, table number from memory), plain carbon steel at 300 K: rho, cp, k from memory", true},
	{"copper", 8933, 385, 401,
		incropera + " (Table A.1, table number from memory), pure copper at 300 K: rho, cp, k confirmed", true},
	{"epoxy-cured", 1200, 1050, 0.20,
		"cured unfilled epoxy: cp Callister, Materials Science and Engineering: An Introduction, Table 19.1 (confirmed); rho about 1200 and k 0.19-0.20 typical (from memory)", false},
	{"fep-release-film", 2150, 1170, 0.20,
		"FEP (fluorinated ethylene propylene) release film, typical values: rho 2120-2170, cp about 1170, k about 0.2 (from memory)", false},
	{"fr4", 1850, 1150, 0.343,
		"FR-4 glass-epoxy laminate, through-plane: k Sarvar, Poole & Witting, J. Electron. Mater. 19:1345 (1990) (confirmed); rho 1850 (confirmed); cp 1100-1200 typical (from memory)", false},
	{"invar-36", 8050, 515, 10.2,
		"Fe-36Ni (Invar 36) tooling alloy, typical data-sheet values: rho 8050-8130, cp about 515, k about 10 at room temperature (from memory)", true},
	{"nylon-bagging-film", 1140, 1670, 0.24,
		"polyamide (nylon 6,6) vacuum-bag film: cp 1670 and k 0.24 as tabulated for nylon 6,6 in Callister, Materials Science and Engineering: An Introduction, Table 19.1, rho 1140 (from memory)", false},
	{"polyester-breather", 250, 1250, 0.06,
		"non-woven polyester breather compressed under vacuum: rho, cp and k are order-of-magnitude values only (fibre and air; from memory) - measure the consumable in use", false},
	{"ptfe", 2200, 1050, 0.35,
		incropera + " (Table A.3, table number from memory), polytetrafluoroethylene (PTFE) at 300 K: rho, k from memory; cp Callister, Materials Science and Engineering: An Introduction, Table 19.1 (confirmed; Callister gives k 0.25)", false},
	{"silicon", 2330, 712, 148,
		incropera + " (Table A.1, table number from memory), silicon at 300 K: rho, cp, k confirmed", false},
	{"silicone-rubber", 1200, 1300, 0.22,
		"unfilled silicone rubber (caul sheet, pressure pad), typical values: rho 1100-1250, cp 1250-1450, k 0.2-0.25 (from memory; filled grades conduct up to several times more)", false},
	{"soda-lime-glass", 2500, 750, 1.4,
		incropera + " (Table A.3, table number from memory), plate (soda-lime) glass at 300 K: rho, cp, k from memory", false},
	{"stainless-304", 7900, 477, 14.9,
		incropera + " (Table A.1, table number from memory), stainless steel AISI 304 at 300 K: rho, cp, k from memory", true},
}

func (b *builtin) material() *Material {
	m := &Material{
		Name:         b.name,
		Density:      b.rho,
		SpecificHeat: Inert(Constant(b.cp)),
		Conductivity: Inert(Constant(b.k)),
		Source:       b.source,
	}
	if b.metal {
		// A metal reflects microwaves: its skin depth at 2.45 GHz is
		// a few micrometres (about 1.7 µm for aluminium, δ = 1/√(π f μ0 σ);
		// Pozar, Microwave Engineering, §1.7, from memory), so a layer of
		// any practical thickness is a perfect conductor to the field.
		m.Dielectric = &Dielectric{Shield: true}
	}
	return m
}

// Library returns the built-in materials, sorted by name. Each call returns
// fresh copies that the caller may modify. The built-in materials are inert:
// constant room-temperature properties, no cure (Cure nil) and no dielectric
// absorption; the metals are shields (Dielectric{Shield: true}: they reflect
// microwaves), the others have no dielectric section. Source gives the published source of each value
// and whether it was confirmed or recalled from memory.
//
// Cost: one allocation per material.
func Library() []*Material {
	out := make([]*Material, len(library))
	for i := range library {
		out[i] = library[i].material()
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// Builtin returns a fresh copy of the built-in material with the given name
// (exact, case-sensitive match, as written in a case file), and false if
// there is none.
func Builtin(name string) (*Material, bool) {
	for i := range library {
		if library[i].name == name {
			return library[i].material(), true
		}
	}
	return nil, false
}

// BuiltinNames returns the names of the built-in materials, sorted.
func BuiltinNames() []string {
	out := make([]string, len(library))
	for i := range library {
		out[i] = library[i].name
	}
	sort.Strings(out)
	return out
}

// fibre is one row of the fibre library.
type fibre struct {
	name           string
	rho, cp        float64 // kg/m³, J/(kg·K)
	kAxial, kTrans float64 // W/(m·K)
	source         string
}

// fibres lists the built-in reinforcing fibres, sorted by name. The spread
// between grades and between measurements is wide (the transverse
// conductivity of carbon fibre in particular is measured indirectly, from
// composites); a ply's data sheet, where it exists, should replace these.
var fibres = []fibre{
	{"carbon-fibre", 1780, 710, 7.0, 0.84,
		"standard-modulus PAN carbon fibre (AS4/T300 class): rho 1760-1800 and axial k 7-10 from manufacturers' data sheets, cp about 710 at room temperature, transverse k about 0.8-1 as reported in the composites literature (all from memory; the transverse value is the least certain)"},
	{"e-glass-fibre", 2580, 810, 1.3, 1.3,
		"E-glass fibre, isotropic: rho 2540-2600, cp about 800, k 1.0-1.3 (typical handbook values, e.g. ASM Engineered Materials Handbook vol. 1, Composites; from memory)"},
}

func (f *fibre) fibre() *Fibre {
	return &Fibre{
		Name:                   f.name,
		Density:                f.rho,
		SpecificHeat:           Constant(f.cp),
		AxialConductivity:      Constant(f.kAxial),
		TransverseConductivity: Constant(f.kTrans),
		Source:                 f.source,
	}
}

// BuiltinFibre returns a fresh copy of the built-in fibre with the given
// name (exact match, as written in a case file), and false if there is none.
func BuiltinFibre(name string) (*Fibre, bool) {
	for i := range fibres {
		if fibres[i].name == name {
			return fibres[i].fibre(), true
		}
	}
	return nil, false
}

// Fibres returns the built-in fibres, sorted by name; each call returns
// fresh copies.
func Fibres() []*Fibre {
	out := make([]*Fibre, len(fibres))
	for i := range fibres {
		out[i] = fibres[i].fibre()
	}
	return out
}
