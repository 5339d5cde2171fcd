package cases

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"cureslab/cases/internal/num"
	"cureslab/cases/units"
	"cureslab/physics"
)

// compositeKeys are the keys of a [materials.X] that mixes a fibre and a
// resin; a composite takes everything else from them.
var compositeKeys = []string{"fibre", "resin", "fibre_volume_fraction", "conductivity_model"}

// isComposite reports whether a [materials.X] describes a composite: it
// names a fibre or a resin.
func isComposite(v any) bool {
	m, ok := v.(map[string]any)
	if !ok {
		return false
	}
	_, f := m["fibre"]
	_, r := m["resin"]
	return f || r
}

// composite reads a fibre/resin [materials.X] and mixes it (physics.Mix);
// nil if it has errors. defs holds the case's materials read so far (plain
// ones, and nil for those with errors); isComp marks the composites.
func (l *loader) composite(name, path string, v any, defs map[string]*physics.Material, isComp map[string]bool) *physics.Material {
	before := len(l.errs)
	note := func(k string) string {
		if slices.Contains(materialKeys, k) {
			return fmt.Sprintf("a composite (fibre and resin) takes %s from its constituents: set it on the resin's or the fibre's [materials] section, or describe the ply as a plain material without fibre and resin", k)
		}
		return ""
	}
	t := l.open(path, v, compositeKeys, note)
	if t == nil {
		return nil
	}
	if !l.require(t, "fibre", "resin", "fibre_volume_fraction") {
		return nil
	}
	model := physics.DefaultConductivityModel
	if s, ok := l.str(t, "conductivity_model"); ok {
		m, known := physics.ParseConductivityModel(s)
		if !known {
			msg := fmt.Sprintf("unknown conductivity model %q", s)
			if g := Suggest(s, physics.ConductivityModels()); g != "" {
				msg += fmt.Sprintf("; did you mean %q?", g)
			}
			l.atValue(t.keyPath("conductivity_model"), ErrRange, "%s", msg).Hint =
				`the models are "maxwell" (default), "springer-tsai" and "series"`
		}
		model = m
	}
	vf, ok := l.number(t, "fibre_volume_fraction")
	if ok && !(vf > 0 && vf < model.MaxFibreFraction()) {
		if model == physics.SpringerTsai {
			l.rangeErr(t.keyPath("fibre_volume_fraction"), vf, "fibre_volume_fraction must be in (0, 0.785) for the springer-tsai model (touching fibres in a square array at pi/4)")
		} else {
			l.rangeErr(t.keyPath("fibre_volume_fraction"), vf, "fibre_volume_fraction must be in (0, 1)")
		}
	}
	fibre := l.fibreOf(t, defs, isComp)
	resin := l.resinOf(t, defs, isComp)
	if len(l.errs) > before || fibre == nil || resin == nil {
		return nil
	}
	ply, err := physics.Mix(name, fibre, resin, vf, model)
	if err != nil { // not reached: every input is checked above
		l.atValue(t.keyPath("fibre_volume_fraction"), ErrRange, "%v", err)
		return nil
	}
	ply.Source = fmt.Sprintf("case file %s: %s", l.file, ply.Source)
	return ply
}

// fibreOf resolves the fibre of a composite: a plain material of the case
// that does not cure (its conductivity taken as both axial and transverse),
// a built-in fibre, or a built-in material. nil (with an error recorded,
// unless the named material has errors of its own) if none.
func (l *loader) fibreOf(t *table, defs map[string]*physics.Material, isComp map[string]bool) *physics.Fibre {
	name, ok := l.str(t, "fibre")
	if !ok {
		return nil
	}
	key := t.keyPath("fibre")
	if m, inCase := defs[name]; inCase || isComp[name] {
		switch {
		case isComp[name]:
			l.atValue(key, ErrReference, "fibre %q is itself a composite: a fibre must be a plain material", name)
			return nil
		case m == nil:
			return nil // its own errors are reported
		case m.Cure != nil:
			l.atValue(key, ErrReference, "fibre %q cures: a fibre must not have a [materials.%s.cure] section", name, name)
			return nil
		}
		return fibreFromMaterial(name, m)
	}
	if f, ok := physics.BuiltinFibre(name); ok {
		return f
	}
	if m, ok := physics.Builtin(name); ok {
		return fibreFromMaterial(name, m)
	}
	names := fibreNames(defs, isComp)
	msg := fmt.Sprintf("unknown fibre %q", name)
	if g := Suggest(name, names); g != "" {
		msg += fmt.Sprintf("; did you mean %q?", g)
	}
	l.atValue(key, ErrReference, "%s", msg).Hint = "built-in fibres: " + strings.Join(builtinFibreNames(), ", ") +
		"; or define the fibre as [materials.NAME] with density, specific_heat and conductivity"
	return nil
}

// fibreFromMaterial is a plain material used as a fibre: its one
// conductivity serves along and across the fibre, its uncured values are
// its values (it does not cure).
func fibreFromMaterial(name string, m *physics.Material) *physics.Fibre {
	return &physics.Fibre{
		Name: name, Density: m.Density, SpecificHeat: m.SpecificHeat.Uncured,
		AxialConductivity: m.Conductivity.Uncured, TransverseConductivity: m.Conductivity.Uncured,
		Source: m.Source,
	}
}

// resinOf resolves the resin of a composite: a plain material of the case
// or a built-in material.
func (l *loader) resinOf(t *table, defs map[string]*physics.Material, isComp map[string]bool) *physics.Material {
	name, ok := l.str(t, "resin")
	if !ok {
		return nil
	}
	key := t.keyPath("resin")
	if isComp[name] {
		l.atValue(key, ErrReference, "resin %q is itself a composite: a resin must be a plain material", name)
		return nil
	}
	if m, inCase := defs[name]; inCase {
		return m // nil when it has errors of its own
	}
	if m, ok := physics.Builtin(name); ok {
		return m
	}
	msg := fmt.Sprintf("unknown resin %q", name)
	var names []string
	for n, m := range defs {
		if m != nil {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	if g := Suggest(name, append(names, physics.BuiltinNames()...)); g != "" {
		msg += fmt.Sprintf("; did you mean %q?", g)
	}
	l.atValue(key, ErrReference, "%s", msg).Hint = "define the resin as [materials.NAME] with its [materials.NAME.cure] section, or use a built-in material"
	return nil
}

func builtinFibreNames() []string {
	var out []string
	for _, f := range physics.Fibres() {
		out = append(out, f.Name)
	}
	return out
}

// fibreNames returns the names a composite's fibre may take.
func fibreNames(defs map[string]*physics.Material, isComp map[string]bool) []string {
	var out []string
	for n, m := range defs {
		if m != nil && m.Cure == nil && !isComp[n] {
			out = append(out, n)
		}
	}
	sort.Strings(out)
	out = append(out, builtinFibreNames()...)
	return append(out, physics.BuiltinNames()...)
}

// Sign rules for rateConstant.
const (
	signAny         = iota // any finite value
	signNonNegative        // ≥ 0
	signPositive           // > 0
)

// rateConstant reads the rate constant key of t, checked against the sign
// rule (signAny, signNonNegative, signPositive).
func (l *loader) rateConstant(t *table, key string, sign int) float64 {
	A, ok := l.quantity(t, key, units.RateConstant)
	switch {
	case !ok:
	case sign == signPositive && !(A > 0):
		l.rangeErr(t.keyPath(key), t.m[key], "%s must be positive", key)
	case sign == signNonNegative && !(A >= 0):
		l.rangeErr(t.keyPath(key), t.m[key], "%s must not be negative", key)
	}
	return A
}

// activationEnergy reads the activation energy key of t (≥ 0).
func (l *loader) activationEnergy(t *table, key string) float64 {
	E, ok := l.quantity(t, key, units.EnergyPerMole)
	if ok && !(E >= 0) {
		l.rangeErr(t.keyPath(key), t.m[key], "activation energy %s must not be negative", key)
	}
	return E
}

// leeLoosSpringer reads the keys of model "lee-loos-springer". before is
// the error count when the cure section started.
func (l *loader) leeLoosSpringer(t *table, before int) physics.Kinetics {
	m := physics.LeeLoosSpringer{Switch: physics.DefaultSwitch}
	m.A1, m.E1 = l.rateConstant(t, "A1", signPositive), l.activationEnergy(t, "E1")
	m.A2, m.E2 = l.rateConstant(t, "A2", signAny), l.activationEnergy(t, "E2") // A2 may be negative
	m.A3, m.E3 = l.rateConstant(t, "A3", signNonNegative), l.activationEnergy(t, "E3")
	if s, ok := l.number(t, "switch"); ok {
		if !(s > 0 && s < 1) {
			l.rangeErr(t.keyPath("switch"), s, "switch must be in (0, 1)")
		}
		m.Switch = s
	}
	if b, ok := l.number(t, "B"); ok {
		if !(b > m.Switch) {
			l.rangeErr(t.keyPath("B"), b, "B must exceed switch (%s): at a = B the first regime's rate falls to zero and the cure would stop there", num.G(m.Switch))
		}
		m.B = b
	}
	return m
}

// isoTable reads the table of model "isoconversional": alpha (plain
// numbers, strictly increasing in (0, 1]), E (energies per mole, ≥ 0) and
// Af (rate constants, > 0), of one length ≥ 2; nil if it has errors.
func (l *loader) isoTable(t *table) *physics.Isoconversional {
	before := len(l.errs)
	arr, ok := l.array(t, "alpha")
	var alpha []float64
	if ok {
		for i, v := range arr {
			el := fmt.Sprintf("%s.%d", t.keyPath("alpha"), i)
			a, ok1 := l.numberAt(el, v)
			switch {
			case !ok1:
			case !(a > 0 && a <= 1):
				l.rangeErr(el, v, "alpha must be in (0, 1]")
			case i > 0 && !(a > alpha[i-1]):
				l.rangeErr(el, v, "alpha must increase strictly (after %s)", num.G(alpha[i-1]))
			}
			alpha = append(alpha, a)
		}
	}
	E, okE := l.quantities(t, "E", units.EnergyPerMole)
	Af, okA := l.quantities(t, "Af", units.RateConstant)
	if okE {
		for i, e := range E {
			if !(e >= 0) {
				el := fmt.Sprintf("%s.%d", t.keyPath("E"), i)
				l.rangeErr(el, t.m["E"].([]any)[i], "activation energy must not be negative")
			}
		}
	}
	if okA {
		for i, a := range Af {
			if !(a > 0) {
				el := fmt.Sprintf("%s.%d", t.keyPath("Af"), i)
				l.rangeErr(el, t.m["Af"].([]any)[i], "Af must be positive")
			}
		}
	}
	if !ok || !okE || !okA || len(l.errs) > before {
		return nil
	}
	if len(E) != len(alpha) || len(Af) != len(alpha) {
		l.atValue(t.keyPath("alpha"), ErrRange, "alpha, E and Af need one entry per row: %d, %d and %d given", len(alpha), len(E), len(Af))
		return nil
	}
	if len(alpha) < 2 {
		l.atValue(t.keyPath("alpha"), ErrRange, "the table needs at least two rows, got %d", len(alpha)).Hint =
			"cureslab fit --model isoconversional prints a table from DSC scans"
		return nil
	}
	lnAf := make([]float64, len(Af))
	for i, a := range Af {
		lnAf[i] = math.Log(a)
	}
	m, err := physics.NewIsoconversional(alpha, E, lnAf)
	if err != nil { // not reached: checked above
		l.atValue(t.keyPath("alpha"), ErrRange, "%v", err)
		return nil
	}
	return m
}

// viscosity reads [materials.X.viscosity] (model "castro-macosko"). cures
// says whether the material has a cure section, whose gel point the law
// needs.
func (l *loader) viscosity(mt *table, cures bool) *physics.CastroMacosko {
	t := l.sub(mt, "viscosity", viscosityKeys, nil)
	if t == nil {
		return nil
	}
	before := len(l.errs)
	if !cures {
		l.atKey(mt.keyPath("viscosity"), ErrMissing, "a viscosity law needs a [%s] section: the gel point ends the flow", mt.keyPath("cure"))
	}
	l.require(t, viscosityKeys...)
	if s, ok := l.str(t, "model"); ok && s != "castro-macosko" {
		msg := fmt.Sprintf("unknown viscosity model %q", s)
		if g := Suggest(s, []string{"castro-macosko"}); g != "" {
			msg += fmt.Sprintf("; did you mean %q?", g)
		}
		l.atValue(t.keyPath("model"), ErrRange, "%s", msg).Hint =
			`the model is "castro-macosko": eta = eta0 exp(E/RT) (a_gel/(a_gel - a))^(a + b a)`
	}
	var v physics.CastroMacosko
	var ok bool
	if v.Eta0, ok = l.quantity(t, "eta0", units.Viscosity); ok && !(v.Eta0 > 0) {
		l.rangeErr(t.keyPath("eta0"), t.m["eta0"], "eta0 must be positive")
	}
	if v.E, ok = l.quantity(t, "E", units.EnergyPerMole); ok && !(v.E >= 0) {
		l.rangeErr(t.keyPath("E"), t.m["E"], "E must not be negative (the viscosity falls as the temperature rises)")
	}
	if v.A, ok = l.number(t, "a"); ok && !(v.A >= 0) {
		l.rangeErr(t.keyPath("a"), v.A, "a must not be negative")
	}
	if v.B, ok = l.number(t, "b"); ok && !(v.A+v.B >= 0) {
		l.rangeErr(t.keyPath("b"), v.B, "a + b must not be negative: the exponent a + b*alpha must stay at or above zero (a = %s)", num.G(v.A))
	}
	if len(l.errs) > before {
		return nil
	}
	return &v
}

// quoteKeys formats keys as "A1, E1 and n".
func quoteKeys(keys []string) string {
	switch len(keys) {
	case 0:
		return "none"
	case 1:
		return keys[0]
	}
	return strings.Join(keys[:len(keys)-1], ", ") + " and " + keys[len(keys)-1]
}
