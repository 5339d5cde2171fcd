package cases

import (
	"fmt"
	"slices"
	"sort"
	"strings"

	"cureslab/cases/units"
	"cureslab/physics"
)

var (
	materialKeys = []string{"density", "specific_heat", "conductivity", "specific_heat_cured", "conductivity_cured", "cure", "dielectric", "viscosity"}
	tableKeys    = []string{"temperature", "value"}

	cureCommonKeys = []string{"model", "total_heat", "resin_fraction", "gel_point", "diffusion", "glass_transition"}
	cureModelKeys  = map[string][]string{
		"nth-order":         {"A1", "E1", "n"},
		"autocatalytic":     {"A1", "E1", "A2", "E2", "m", "n"},
		"lee-loos-springer": {"A1", "E1", "A2", "E2", "A3", "E3", "B", "switch"},
		"isoconversional":   {"alpha", "E", "Af"},
	}
	cureModels = []string{"nth-order", "autocatalytic", "lee-loos-springer", "isoconversional"}
	// cureModelForms describes each model's law for messages.
	cureModelForms = map[string]string{
		"nth-order":         "k1 (1-a)^n",
		"autocatalytic":     "(k1 + k2 a^m)(1-a)^n",
		"lee-loos-springer": "(K1 + K2 a)(1-a)(B-a) up to a = switch, K3 (1-a) above",
		"isoconversional":   "a table of alpha, E and Af: Af(a) exp(-E(a)/RT)",
	}
	diffusionKeys  = []string{"C", "alpha_c0", "alpha_cT"}
	glassKeys      = []string{"Tg0", "Tg_full", "lambda"}
	dielectricKeys = []string{"permittivity", "loss_factor", "loss_factor_cured", "shield"}
	viscosityKeys  = []string{"model", "eta0", "E", "a", "b"}
	allCureKeys    = func() []string {
		out := append([]string{}, cureCommonKeys...)
		for _, m := range cureModels {
			for _, k := range cureModelKeys[m] {
				if !slices.Contains(out, k) {
					out = append(out, k)
				}
			}
		}
		return out
	}()
)

// materials reads every [materials.X] of the case. A material with errors
// maps to nil, so that layers using it do not also report it as unknown.
// Names of built-in materials that the case redefines are returned in
// replaced, sorted.
func (l *loader) materials(root *table) (defs map[string]*physics.Material, replaced []string) {
	defs = make(map[string]*physics.Material)
	if !root.has("materials") {
		return defs, nil
	}
	all, ok := root.m["materials"].(map[string]any)
	if !ok {
		l.atValue("materials", ErrType, "must be a table of materials, got %s", KindOf(root.m["materials"])).Hint =
			"write each material as a section: [materials.NAME]"
		return defs, nil
	}
	// Plain materials first, then the composites made of them.
	var composites []string
	for _, name := range sortedKeys(all) {
		if _, builtin := physics.Builtin(name); builtin {
			replaced = append(replaced, name)
		} else if _, fibre := physics.BuiltinFibre(name); fibre {
			replaced = append(replaced, name)
		}
		if isComposite(all[name]) {
			composites = append(composites, name)
			continue
		}
		defs[name] = l.material(name, "materials."+name, all[name])
	}
	isComp := map[string]bool{}
	for _, name := range composites {
		isComp[name] = true
	}
	for _, name := range composites {
		defs[name] = l.composite(name, "materials."+name, all[name], defs, isComp)
	}
	return defs, replaced
}

// material reads one [materials.X]; nil if it has errors.
func (l *loader) material(name, path string, v any) *physics.Material {
	before := len(l.errs)
	t := l.open(path, v, materialKeys, nil)
	if t == nil {
		return nil
	}
	l.require(t, "density", "specific_heat", "conductivity")
	m := &physics.Material{Name: name, Source: "case file " + l.file}
	if rho, ok := l.quantity(t, "density", units.Density); ok && !(rho > 0) {
		l.rangeErr(t.keyPath("density"), t.m["density"], "density must be positive")
	} else {
		m.Density = rho
	}
	m.SpecificHeat = l.blend(t, "specific_heat", units.SpecificHeat)
	m.Conductivity = l.blend(t, "conductivity", units.Conductivity)
	if t.has("cure") {
		m.Cure = l.cure(t)
	} else {
		for _, k := range []string{"specific_heat_cured", "conductivity_cured"} {
			if t.has(k) {
				l.atKey(t.keyPath(k), ErrUnknownKey, "%q needs a [%s.cure] section: a material that does not cure keeps its uncured value", k, path)
			}
		}
	}
	if t.has("dielectric") {
		m.Dielectric = l.dielectric(t)
	}
	if t.has("viscosity") {
		m.Viscosity = l.viscosity(t, m.Cure != nil || t.has("cure"))
	}
	if len(l.errs) > before {
		return nil
	}
	return m
}

// blend reads the property key and its optional key_cured variant.
func (l *loader) blend(t *table, key string, d units.Dim) physics.Blend {
	var b physics.Blend
	if p, ok := l.property(t, key, d); ok {
		b.Uncured = p
	}
	if t.has(key + "_cured") {
		if p, ok := l.property(t, key+"_cured", d); ok {
			b.Cured, b.HasCured = p, true
		}
	}
	return b
}

// property reads a positive property: a constant with its unit, or a table
// { temperature = [...], value = [...] } with at least two points and
// strictly increasing temperatures (checked here, before physics.NewTable).
func (l *loader) property(t *table, key string, d units.Dim) (physics.Property, bool) {
	if !t.has(key) {
		return physics.Property{}, false
	}
	path := t.keyPath(key)
	v := t.m[key]
	if _, isTable := v.(map[string]any); !isTable {
		x, ok := l.quantityAt(path, v, d)
		if !ok {
			return physics.Property{}, false
		}
		if !(x > 0) {
			l.rangeErr(path, v, "%s must be positive", key)
			return physics.Property{}, false
		}
		return physics.Constant(x), true
	}
	tt := l.open(path, v, tableKeys, nil)
	if tt == nil || !l.require(tt, tableKeys...) {
		return physics.Property{}, false
	}
	temps, ok1 := l.quantities(tt, "temperature", units.Temperature)
	vals, ok2 := l.quantities(tt, "value", d)
	if !ok1 || !ok2 {
		return physics.Property{}, false
	}
	ok := true
	if len(temps) != len(vals) {
		l.atValue(tt.keyPath("value"), ErrRange, "the table has %d temperatures but %d values", len(temps), len(vals))
		ok = false
	} else if len(temps) < 2 {
		l.atValue(tt.keyPath("temperature"), ErrRange, "a table needs at least two points, got %d", len(temps)).Hint =
			fmt.Sprintf("for one value write the constant: %s = %q", key, d.Example())
		ok = false
	}
	for i := 1; i < len(temps); i++ {
		if !(temps[i] > temps[i-1]) {
			el := fmt.Sprintf("%s.%d", tt.keyPath("temperature"), i)
			l.atValue(el, ErrRange, "table temperatures must be strictly increasing: %s does not come after %s", Celsius(temps[i]), Celsius(temps[i-1]))
			ok = false
			break
		}
	}
	for i, x := range vals {
		if !(x > 0) {
			el := fmt.Sprintf("%s.%d", tt.keyPath("value"), i)
			l.rangeErr(el, tt.m["value"].([]any)[i], "%s must be positive", key)
			ok = false
		}
	}
	if !ok {
		return physics.Property{}, false
	}
	p, err := physics.NewTable(temps, vals)
	if err != nil { // not reached: checked above
		l.add(l.loc.Value(path), path, ErrRange, err, err.Error())
		return physics.Property{}, false
	}
	return p, true
}

// quantities reads the array key of t whose elements are values of
// dimension d.
func (l *loader) quantities(t *table, key string, d units.Dim) ([]float64, bool) {
	arr, ok := l.array(t, key)
	if !ok {
		return nil, false
	}
	out := make([]float64, len(arr))
	for i, v := range arr {
		x, ok1 := l.quantityAt(fmt.Sprintf("%s.%d", t.keyPath(key), i), v, d)
		ok = ok && ok1
		out[i] = x
	}
	return out, ok
}

// cure reads [materials.X.cure]; nil if absent or invalid.
func (l *loader) cure(mt *table) *physics.Cure {
	path := mt.keyPath("cure")
	raw, _ := mt.m["cure"].(map[string]any)
	model, _ := raw["model"].(string)
	valid := allCureKeys
	var note func(string) string
	if keys, known := cureModelKeys[model]; known {
		valid = append(append([]string{}, cureCommonKeys...), keys...)
		note = cureKeyNote(model)
	}
	t := l.open(path, mt.m["cure"], valid, note)
	if t == nil {
		return nil
	}
	before := len(l.errs)
	l.require(t, "model")
	if s, ok := l.str(t, "model"); ok && !slices.Contains(cureModels, s) {
		msg := fmt.Sprintf("unknown cure model %q", s)
		if g := Suggest(s, cureModels); g != "" {
			msg += fmt.Sprintf("; did you mean %q?", g)
		}
		var forms []string
		for _, m := range cureModels {
			forms = append(forms, fmt.Sprintf("%q (%s)", m, cureModelForms[m]))
		}
		l.atValue(t.keyPath("model"), ErrRange, "%s", msg).Hint = "the models are " + strings.Join(forms, ", ")
	}
	c := &physics.Cure{ResinFraction: 1, GelPoint: physics.DefaultGelPoint, GelPointDefaulted: true}
	l.require(t, "total_heat")
	switch model {
	case "lee-loos-springer":
		l.require(t, "A1", "E1", "A2", "E2", "A3", "E3", "B")
	case "isoconversional":
		l.require(t, "alpha", "E", "Af")
	default:
		l.require(t, "A1", "E1", "n")
		if model == "autocatalytic" {
			l.require(t, "A2", "E2", "m")
		}
	}
	if h, ok := l.quantity(t, "total_heat", units.EnergyPerMass); ok {
		if !(h >= 0) {
			l.rangeErr(t.keyPath("total_heat"), t.m["total_heat"], "total_heat must not be negative")
		}
		c.TotalHeat = h
	}
	if f, ok := l.number(t, "resin_fraction"); ok {
		if !(f > 0 && f <= 1) {
			l.rangeErr(t.keyPath("resin_fraction"), f, "resin_fraction must be in (0, 1]")
		}
		c.ResinFraction = f
	}
	if g, ok := l.number(t, "gel_point"); ok {
		if !(g > 0 && g < 1) {
			l.rangeErr(t.keyPath("gel_point"), g, "gel_point must be in (0, 1)")
		}
		c.GelPoint, c.GelPointDefaulted = g, false
	}
	c.Model = l.kinetics(t, model, before)
	c.Diffusion = l.diffusion(t)
	c.Glass = l.glassTransition(t)
	if len(l.errs) > before {
		return nil
	}
	return c
}

// cureKeyNote returns the note on a key that belongs to a cure model other
// than model (a known one), with the form and the keys of model.
func cureKeyNote(model string) func(string) string {
	keys := cureModelKeys[model]
	return func(k string) string {
		for _, other := range cureModels {
			if other != model && slices.Contains(cureModelKeys[other], k) {
				return fmt.Sprintf("%s belongs to the %q model; model %q (%s) uses %s", k, other, model, cureModelForms[model], quoteKeys(keys))
			}
		}
		return ""
	}
}

// kinetics reads the rate constants, activation energies and orders (or the
// isoconversional table) of the cure model model from t; nil for an unknown
// model or an isoconversional table that cannot be read. before is the
// number of errors when t was opened.
func (l *loader) kinetics(t *table, model string, before int) physics.Kinetics {
	rate := func(key string, positive bool) float64 {
		if positive {
			return l.rateConstant(t, key, signPositive)
		}
		return l.rateConstant(t, key, signNonNegative)
	}
	energy := func(key string) float64 { return l.activationEnergy(t, key) }
	order := func(key string) float64 {
		x, ok := l.number(t, key)
		if ok && !(x >= 0) {
			l.rangeErr(t.keyPath(key), x, "reaction order %s must not be negative", key)
		}
		return x
	}
	switch model {
	case "nth-order":
		return physics.NthOrder{A: rate("A1", true), E: energy("E1"), N: order("n")}
	case "autocatalytic":
		a := physics.Autocatalytic{A1: rate("A1", false), E1: energy("E1"), A2: rate("A2", false), E2: energy("E2"), M: order("m"), N: order("n")}
		if t.has("A1") && t.has("A2") && a.A1 == 0 && a.A2 == 0 && len(l.errs) == before {
			l.atValue(t.keyPath("A2"), ErrRange, "A1 and A2 are both zero: the resin never reacts")
		}
		return a
	case "lee-loos-springer":
		return l.leeLoosSpringer(t, before)
	case "isoconversional":
		if m := l.isoTable(t); m != nil {
			return m
		}
	}
	return nil
}

// diffusion reads the optional [materials.X.cure.diffusion] of the cure
// table t; nil if absent or its keys are missing.
func (l *loader) diffusion(t *table) *physics.Diffusion {
	d := l.sub(t, "diffusion", diffusionKeys, nil)
	if d == nil || !l.require(d, diffusionKeys...) {
		return nil
	}
	var f physics.Diffusion
	var ok bool
	if f.C, ok = l.number(d, "C"); ok && !(f.C > 0) {
		l.rangeErr(d.keyPath("C"), f.C, "C must be positive")
	}
	f.Alpha0, _ = l.number(d, "alpha_c0")
	f.AlphaT, _ = l.quantity(d, "alpha_cT", units.InverseTemperature)
	return &f
}

// glassTransition reads the optional [materials.X.cure.glass_transition]
// of the cure table t (DiBenedetto: Tg0 < Tg_full, λ in (0, 1]); nil if
// absent or its keys are missing.
func (l *loader) glassTransition(t *table) *physics.DiBenedetto {
	g := l.sub(t, "glass_transition", glassKeys, nil)
	if g == nil || !l.require(g, glassKeys...) {
		return nil
	}
	var dib physics.DiBenedetto
	var ok0, ok1, ok bool
	dib.Tg0, ok0 = l.quantity(g, "Tg0", units.Temperature)
	dib.TgFull, ok1 = l.quantity(g, "Tg_full", units.Temperature)
	if ok0 && ok1 && !(dib.TgFull > dib.Tg0) {
		l.rangeErr(g.keyPath("Tg_full"), g.m["Tg_full"], "Tg_full must be above Tg0 (%s)", Celsius(dib.Tg0))
	}
	if dib.Lambda, ok = l.number(g, "lambda"); ok && !(dib.Lambda > 0 && dib.Lambda <= 1) {
		l.rangeErr(g.keyPath("lambda"), dib.Lambda, "lambda must be in (0, 1]")
	}
	return &dib
}

// dielectric reads [materials.X.dielectric]: relative permittivity ε′ ≥ 1,
// loss factors ε″ ≥ 0 (the cured one defaults to the uncured one), and
// shield. A shield needs nothing else.
func (l *loader) dielectric(mt *table) *physics.Dielectric {
	t := l.open(mt.keyPath("dielectric"), mt.m["dielectric"], dielectricKeys, nil)
	if t == nil {
		return nil
	}
	var d physics.Dielectric
	d.Shield, _ = l.boolean(t, "shield")
	if !d.Shield {
		l.require(t, "permittivity", "loss_factor")
	}
	var ok bool
	if d.Permittivity, ok = l.number(t, "permittivity"); ok && !(d.Permittivity >= 1) {
		l.rangeErr(t.keyPath("permittivity"), d.Permittivity, "relative permittivity must be at least 1")
	}
	d.LossFactor, d.LossTable, _ = l.lossFactor(t, "loss_factor")
	if d.LossFactorCured, d.LossTableCured, ok = l.lossFactor(t, "loss_factor_cured"); !ok {
		d.LossFactorCured, d.LossTableCured = d.LossFactor, d.LossTable
	}
	return &d
}

// lossFactor reads a loss factor ε″: a plain number ≥ 0, or a table
// { temperature = ["20 C", "150 C"], value = [0.6, 0.4] } of plain numbers
// ≥ 0 at strictly increasing temperatures (at least two points). For a table
// it returns its largest value and the table.
func (l *loader) lossFactor(t *table, key string) (float64, *physics.Property, bool) {
	if !t.has(key) {
		return 0, nil, false
	}
	path := t.keyPath(key)
	v := t.m[key]
	if _, isTable := v.(map[string]any); !isTable {
		x, ok := l.number(t, key)
		if ok && !(x >= 0) {
			l.rangeErr(path, x, "%s must not be negative", key)
			return 0, nil, false
		}
		return x, nil, ok
	}
	tt := l.open(path, v, tableKeys, nil)
	if tt == nil || !l.require(tt, tableKeys...) {
		return 0, nil, false
	}
	temps, ok := l.quantities(tt, "temperature", units.Temperature)
	arr, ok2 := l.array(tt, "value")
	if !ok || !ok2 {
		return 0, nil, false
	}
	vals := make([]float64, len(arr))
	for i, x := range arr {
		el := fmt.Sprintf("%s.%d", tt.keyPath("value"), i)
		f, ok1 := l.numberAt(el, x)
		if ok1 && !(f >= 0) {
			l.rangeErr(el, x, "%s must not be negative", key)
			ok1 = false
		}
		ok = ok && ok1
		vals[i] = f
	}
	switch {
	case !ok:
		return 0, nil, false
	case len(temps) != len(vals):
		l.atValue(tt.keyPath("value"), ErrRange, "the table has %d temperatures but %d values", len(temps), len(vals))
		return 0, nil, false
	case len(temps) < 2:
		l.atValue(tt.keyPath("temperature"), ErrRange, "a table needs at least two points, got %d", len(temps)).Hint =
			fmt.Sprintf("for one value write the number: %s = 0.4", key)
		return 0, nil, false
	}
	for i := 1; i < len(temps); i++ {
		if !(temps[i] > temps[i-1]) {
			el := fmt.Sprintf("%s.%d", tt.keyPath("temperature"), i)
			l.atValue(el, ErrRange, "table temperatures must be strictly increasing: %s does not come after %s", Celsius(temps[i]), Celsius(temps[i-1]))
			return 0, nil, false
		}
	}
	p, err := physics.NewTable(temps, vals)
	if err != nil { // not reached: checked above
		l.add(l.loc.Value(path), path, ErrRange, err, err.Error())
		return 0, nil, false
	}
	return slices.Max(vals), &p, true
}

// materialNames returns the names a layer may use: the case's own and the
// built-in ones.
func materialNames(defs map[string]*physics.Material) []string {
	var names []string
	for n := range defs {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range physics.BuiltinNames() {
		if _, ok := defs[n]; !ok {
			names = append(names, n)
		}
	}
	return names
}

// quoteList formats names as "a", "b" and "c".
func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		q[i] = fmt.Sprintf("%q", n)
	}
	switch len(q) {
	case 0:
		return "none"
	case 1:
		return q[0]
	}
	return strings.Join(q[:len(q)-1], ", ") + " and " + q[len(q)-1]
}
