package units

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Dim is the physical dimension a case-file key expects.
type Dim int

// The dimensions of case-file values. The zero Dim is invalid.
const (
	Length                  Dim = iota + 1 // m
	Time                                   // s
	Temperature                            // K, absolute
	TemperatureDifference                  // K
	HeatingRate                            // K/s
	Density                                // kg/m^3
	SpecificHeat                           // J/kg/K
	Conductivity                           // W/m/K
	HeatTransferCoefficient                // W/m^2/K
	ContactResistance                      // m^2*K/W
	EnergyPerMass                          // J/kg
	EnergyPerMole                          // J/mol
	RateConstant                           // 1/s
	Frequency                              // Hz
	ElectricField                          // V/m
	HeatFlux                               // W/m^2
	Power                                  // W
	InverseTemperature                     // 1/K
	PowerDensity                           // W/m^3
	PowerPerArea                           // W/m^2, carried by a wave
	Viscosity                              // Pa*s
)

// vec holds the exponents of the SI base units m, kg, s, K, mol, A.
type vec [6]int

var (
	metre     = vec{1, 0, 0, 0, 0, 0}
	kilogram  = vec{0, 1, 0, 0, 0, 0}
	second    = vec{0, 0, 1, 0, 0, 0}
	kelvin    = vec{0, 0, 0, 1, 0, 0}
	mole      = vec{0, 0, 0, 0, 1, 0}
	hertz     = vec{0, 0, -1, 0, 0, 0}
	joule     = vec{2, 1, -2, 0, 0, 0}
	watt      = vec{2, 1, -3, 0, 0, 0}
	volt      = vec{2, 1, -3, 0, 0, -1} // W/A
	pascal    = vec{-1, 1, -2, 0, 0, 0}
	viscosity = vec{-1, 1, -1, 0, 0, 0} // Pa*s
)

func (a vec) add(b vec, sign int) vec {
	for i := range a {
		a[i] += sign * b[i]
	}
	return a
}

type dimInfo struct {
	word, example, si string
	v                 vec
}

var dims = [...]dimInfo{
	Length:                  {"length", "12 mm", "m", metre},
	Time:                    {"time", "90 min", "s", second},
	Temperature:             {"temperature", "25 C", "K", kelvin},
	TemperatureDifference:   {"temperature difference", "5 K", "K", kelvin},
	HeatingRate:             {"heating rate", "2 C/min", "K/s", vec{0, 0, -1, 1, 0, 0}},
	Density:                 {"density", "1150 kg/m^3", "kg/m^3", vec{-3, 1, 0, 0, 0, 0}},
	SpecificHeat:            {"specific heat", "1500 J/kg/K", "J/kg/K", vec{2, 0, -2, -1, 0, 0}},
	Conductivity:            {"conductivity", "0.19 W/m/K", "W/m/K", vec{1, 1, -3, -1, 0, 0}},
	HeatTransferCoefficient: {"heat transfer coefficient", "15 W/m^2/K", "W/m^2/K", vec{0, 1, -3, -1, 0, 0}},
	ContactResistance:       {"contact resistance", "2e-4 m^2*K/W", "m^2*K/W", vec{0, -1, 3, 1, 0, 0}},
	EnergyPerMass:           {"energy per mass", "420 J/g", "J/kg", vec{2, 0, -2, 0, 0, 0}},
	EnergyPerMole:           {"energy per mole", "65 kJ/mol", "J/mol", vec{2, 1, -2, 0, -1, 0}},
	RateConstant:            {"rate constant", "1.2e5 1/s", "1/s", hertz},
	Frequency:               {"frequency", "2.45 GHz", "Hz", hertz},
	ElectricField:           {"electric field", "1.5 kV/m", "V/m", vec{1, 1, -3, 0, 0, -1}},
	HeatFlux:                {"heat flux", "1.5 kW/m^2", "W/m^2", vec{0, 1, -3, 0, 0, 0}},
	Power:                   {"power", "100 W", "W", watt},
	InverseTemperature:      {"inverse temperature", "0.0052 1/K", "1/K", vec{0, 0, 0, -1, 0, 0}},
	PowerDensity:            {"power density", "50 kW/m^3", "W/m^3", vec{-1, 1, -3, 0, 0, 0}},
	PowerPerArea:            {"power per area", "4 kW/m^2", "W/m^2", vec{0, 1, -3, 0, 0, 0}},
	Viscosity:               {"viscosity", "100 Pa*s", "Pa*s", vec{-1, 1, -1, 0, 0, 0}},
}

func (d Dim) valid() bool { return d >= Length && d <= Viscosity }

// String returns the dimension word used in messages ("length", "heat
// transfer coefficient", ...), or "Dim(N)" for an invalid Dim.
func (d Dim) String() string {
	if !d.valid() {
		return fmt.Sprintf("Dim(%d)", int(d))
	}
	return dims[d].word
}

// Example returns a typical value with its unit, for messages: "12 mm" for
// Length, "2 C/min" for HeatingRate. It is "" for an invalid Dim.
func (d Dim) Example() string {
	if !d.valid() {
		return ""
	}
	return dims[d].example
}

// SIUnit returns the unit of the values Parse returns for d ("m", "K/s",
// "W/m^2/K", ...). It is "" for an invalid Dim.
func (d Dim) SIUnit() string {
	if !d.valid() {
		return ""
	}
	return dims[d].si
}

// WithArticle returns the dimension's word with "a" or "an", for messages:
// "a length", "an energy per mass".
func (d Dim) WithArticle() string {
	w := d.String()
	if strings.ContainsRune("aeiou", rune(w[0])) {
		return "an " + w
	}
	return "a " + w
}

// Conversion factors to SI.
const (
	// Source: NIST SP 811 (2008), App. B.8: 1 in = 2.54 cm exactly (from memory).
	inch = 0.0254
	// Source: NIST SP 811 (2008), App. B.8: 1 ft = 0.3048 m exactly (from memory).
	foot = 0.3048
	// Source: NIST SP 811 (2008), App. B.8: 1 lb (avoirdupois) = 0.45359237 kg exactly (from memory).
	pound = 0.45359237
	// Source: NIST SP 811 (2008), App. B.8: 1 cal_th = 4.184 J exactly (from memory).
	// The thermochemical calorie is the one of the chemistry and DSC literature.
	calorie = 4.184
	// Source: NIST SP 811 (2008), App. B.8: 1 P (poise) = 0.1 Pa·s exactly (from memory).
	poise = 0.1
	// Source: NIST SP 811 (2008), §4.2.1.1: t/°C = T/K − 273.15 (from memory).
	celsiusZero = 273.15
	// Source: NIST SP 811 (2008), App. B.9: 1 °F = 5/9 K as an interval;
	// T/K = (t/°F + 459.67)/1.8 (from memory).
	fahrenheitDegree = 5.0 / 9.0
	fahrenheitZero   = 459.67 // absolute zero is −459.67 °F
)

type tempScale int8

const (
	notTemp tempScale = iota
	kelvinScale
	celsiusScale
	fahrenheitScale
)

// unitDef is one accepted symbol: value in SI = scale × value in the unit.
// For temperature symbols the scale is the one of a difference.
type unitDef struct {
	scale float64
	v     vec
	temp  tempScale
}

var symbols = map[string]unitDef{
	// length
	"m": {1, metre, 0}, "cm": {1e-2, metre, 0}, "mm": {1e-3, metre, 0},
	"um": {1e-6, metre, 0}, "µm": {1e-6, metre, 0}, "μm": {1e-6, metre, 0}, "nm": {1e-9, metre, 0},
	"in": {inch, metre, 0}, "inch": {inch, metre, 0}, "mil": {1e-3 * inch, metre, 0}, "ft": {foot, metre, 0},
	// time
	"s": {1, second, 0}, "sec": {1, second, 0}, "ms": {1e-3, second, 0},
	"min": {60, second, 0}, "h": {3600, second, 0}, "hr": {3600, second, 0},
	// temperature (as a difference; absolute conversion is in parse)
	"K": {1, kelvin, kelvinScale}, "C": {1, kelvin, celsiusScale},
	"°C": {1, kelvin, celsiusScale}, "℃": {1, kelvin, celsiusScale}, "degC": {1, kelvin, celsiusScale},
	"F": {fahrenheitDegree, kelvin, fahrenheitScale}, "°F": {fahrenheitDegree, kelvin, fahrenheitScale},
	"℉": {fahrenheitDegree, kelvin, fahrenheitScale}, "degF": {fahrenheitDegree, kelvin, fahrenheitScale},
	// mass and amount
	"kg": {1, kilogram, 0}, "g": {1e-3, kilogram, 0}, "mg": {1e-6, kilogram, 0}, "lb": {pound, kilogram, 0},
	"mol": {1, mole, 0},
	// energy
	"J": {1, joule, 0}, "kJ": {1e3, joule, 0}, "MJ": {1e6, joule, 0},
	"cal": {calorie, joule, 0}, "kcal": {1e3 * calorie, joule, 0},
	// power
	"W": {1, watt, 0}, "mW": {1e-3, watt, 0}, "kW": {1e3, watt, 0}, "MW": {1e6, watt, 0},
	// frequency
	"Hz": {1, hertz, 0}, "kHz": {1e3, hertz, 0}, "MHz": {1e6, hertz, 0}, "GHz": {1e9, hertz, 0},
	// electric potential
	"V": {1, volt, 0}, "mV": {1e-3, volt, 0}, "kV": {1e3, volt, 0},
	// pressure, for viscosities (Pa*s, mPa*s) and the poise (1 P = 0.1 Pa*s)
	"Pa": {1, pascal, 0}, "mPa": {1e-3, pascal, 0}, "kPa": {1e3, pascal, 0}, "MPa": {1e6, pascal, 0},
	"P": {poise, viscosity, 0}, "cP": {1e-2 * poise, viscosity, 0},
}

// Error is a value that cannot be read as the expected dimension.
type Error struct {
	Input string // the text as the user wrote it
	Dim   Dim    // the dimension that was expected
	Msg   string // what is wrong, starting with a verb ("is not a length; ...")
}

// Error returns one line: the quoted input followed by Msg, such as
//
//	"12 mm/s" is not a length; write it like "12 mm"
func (e *Error) Error() string { return fmt.Sprintf("%q %s", e.Input, e.Msg) }

// Parse reads s, a number followed by a unit, as a value of dimension d and
// returns it in the SI unit d.SIUnit():
//
//	value_SI = number × scale(unit)                (all dimensions but Temperature)
//	T = t + 273.15 (C), (t + 459.67)·5/9 (F)         (Temperature)
//
// The unit is parsed by recursive descent (grammar in the package doc) into
// a scale factor and an exponent vector over (m, kg, s, K, mol, A), and the
// vector must equal that of d. Conversion factors: NIST SP 811 (2008),
// App. B. Any failure — empty input, no unit, NaN or Inf, a number out of
// range, an unknown or ambiguous unit, the wrong dimension, text after the
// unit, a temperature below 0 K — returns a *Error. Cost: linear in len(s).
func Parse(s string, d Dim) (float64, error) {
	x, err := parse(s, s, d, d.Example())
	if err != nil {
		return 0, err
	}
	return x, nil
}

// ParseSpread reads a symmetric spread of an uncertain input: "±20 %" (also
// "+/-" or "+-" for "±"). A percentage returns rel as a fraction (0.2) and
// abs = 0; a value with a unit returns abs in SI and rel = 0. The spread is
// a difference, so for d = Temperature it is read as a TemperatureDifference
// ("±5 C" is 5 K); a percentage of an absolute temperature is refused (it
// would depend on the temperature scale). A spread must not be negative.
// Errors are *Error. Cost: linear in len(s).
func ParseSpread(s string, d Dim) (abs, rel float64, err error) {
	absolute := d == Temperature
	if absolute {
		d = TemperatureDifference
	}
	ex := "±" + d.Example()
	fail := func(msg string) (float64, float64, error) {
		return 0, 0, &Error{Input: s, Dim: d, Msg: msg}
	}
	if !d.valid() {
		return fail(fmt.Sprintf("cannot be read: invalid dimension %v", d))
	}
	text := strings.TrimFunc(s, unicode.IsSpace)
	rest, ok := "", false
	for _, pm := range []string{"±", "+/-", "+-"} {
		if r, found := strings.CutPrefix(text, pm); found {
			rest, ok = strings.TrimFunc(r, unicode.IsSpace), true
			break
		}
	}
	if !ok {
		if absolute {
			return fail(fmt.Sprintf("is not a spread; write it like %q", ex))
		}
		return fail(fmt.Sprintf("is not a spread; write it like %q or \"±20 %%\"", ex))
	}
	if num, found := strings.CutSuffix(rest, "%"); found {
		if absolute {
			return fail(fmt.Sprintf("is a percentage of a temperature, which depends on the scale; write it like %q", ex))
		}
		num = strings.TrimFunc(num, unicode.IsSpace)
		if n := scanNumber(num); n == 0 || n != len(num) {
			return fail(`needs a number before "%"; write it like "±20 %"`)
		}
		x, perr := strconv.ParseFloat(num, 64)
		if perr != nil || math.IsInf(x, 0) {
			return fail("has a number out of range")
		}
		if x < 0 {
			return fail(`is negative; a spread is a size, write it like "±20 %"`)
		}
		return 0, x / 100, nil
	}
	x, perr := parse(s, rest, d, ex)
	if perr != nil {
		return 0, 0, perr
	}
	if x < 0 {
		return fail(fmt.Sprintf("is negative; a spread is a size, write it like %q", ex))
	}
	return x, 0, nil
}

// parse reads text (input with any spread sign removed) as dimension d;
// input and ex are used in messages only.
func parse(input, text string, d Dim, ex string) (float64, error) {
	if !d.valid() {
		return 0, &Error{Input: input, Dim: d, Msg: fmt.Sprintf("cannot be read: invalid dimension %v", d)}
	}
	p := &parser{input: input, dim: d, ex: ex}
	text = strings.TrimFunc(text, unicode.IsSpace)
	if text == "" {
		return 0, p.errorf("is empty: %s needs a number and a unit, such as %q", d.WithArticle(), ex)
	}
	if r, ok := strings.CutPrefix(text, "−"); ok { // U+2212 minus sign
		text = "-" + r
	}
	n := scanNumber(text)
	if n == 0 {
		return 0, p.fail("does not start with a number")
	}
	x, err := strconv.ParseFloat(text[:n], 64)
	if err != nil || math.IsInf(x, 0) {
		return 0, p.fail("has a number out of range")
	}
	p.unit = strings.TrimLeftFunc(text[n:], unicode.IsSpace)
	if p.unit == "" {
		return 0, p.errorf("has no unit: %s needs a unit, such as %q", d.WithArticle(), ex)
	}
	p.toks = tokenize(p.unit)
	q, perr := p.parseUnit(0)
	if perr != nil {
		return 0, perr
	}
	if q.v != dims[d].v {
		return 0, p.mismatch(q.v)
	}
	if d == Temperature {
		if q.single == nil {
			return 0, p.fail("needs a single temperature unit (C, F or K)")
		}
		var t float64
		switch q.single.temp {
		case celsiusScale:
			t = x + celsiusZero
		case fahrenheitScale:
			t = (x + fahrenheitZero) * fahrenheitDegree
		default:
			t = x
		}
		if t < 0 {
			return 0, p.errorf("is below absolute zero (%.4g K)", t)
		}
		return t, nil
	}
	y := x * q.scale
	if math.IsInf(y, 0) {
		return 0, p.fail("has a number out of range")
	}
	return y, nil
}

// scanNumber returns the length of the decimal floating-point number at the
// start of s, or 0 if there is none. Words such as "NaN" and "Inf" are not
// numbers here.
func scanNumber(s string) int {
	isDigit := func(i int) bool { return i < len(s) && s[i] >= '0' && s[i] <= '9' }
	i, digits := 0, 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	for ; isDigit(i); i++ {
		digits++
	}
	if i < len(s) && s[i] == '.' {
		j := i + 1
		for ; isDigit(j); j++ {
			digits++
		}
		i = j
	}
	if digits == 0 {
		return 0
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		if isDigit(j) {
			for ; isDigit(j); j++ {
			}
			i = j
		}
	}
	return i
}

// token kinds: 'a' symbol, '0' digits, '^' '*' '/' '(' ')' '+' '-',
// '?' anything else, 0 end of input.
type token struct {
	kind  byte
	text  string
	space bool // whitespace came before it
}

func isSymbolRune(r rune) bool { return unicode.IsLetter(r) || r == '°' || r == '℃' || r == '℉' }

func tokenize(s string) []token {
	var toks []token
	space := false
	for i := 0; i < len(s); {
		r, size := utf8.DecodeRuneInString(s[i:])
		start := i
		i += size
		t := token{kind: '?', text: string(r), space: space}
		switch {
		case unicode.IsSpace(r):
			space = true
			continue
		case isSymbolRune(r):
			for i < len(s) {
				r, size := utf8.DecodeRuneInString(s[i:])
				if !isSymbolRune(r) {
					break
				}
				i += size
			}
			t.kind, t.text = 'a', s[start:i]
		case r >= '0' && r <= '9':
			for i < len(s) && s[i] >= '0' && s[i] <= '9' {
				i++
			}
			t.kind, t.text = '0', s[start:i]
		case r == '²' || r == '³':
			t.kind, t.text = '0', map[rune]string{'²': "2", '³': "3"}[r]
		case strings.ContainsRune("^*/()+-", r):
			t.kind = byte(r)
		case r == '−':
			t.kind = '-'
		case r == '.' || r == '·' || r == '⋅':
			t.kind = '*'
		}
		toks = append(toks, t)
		space = false
	}
	return toks
}

type parser struct {
	input string // the whole user input, for messages
	dim   Dim
	ex    string // a correct example, for messages
	unit  string // the unit part of the input
	toks  []token
	pos   int
}

// quantity is a parsed unit expression: value in SI = scale × value.
type quantity struct {
	scale  float64
	v      vec
	single *unitDef // the unit is this one symbol, with no exponent
	expEnd bool     // the last term carries an exponent ("m2K" may follow)
}

func (p *parser) peek() token {
	if p.pos < len(p.toks) {
		return p.toks[p.pos]
	}
	return token{}
}

func (p *parser) next() token {
	t := p.peek()
	if p.pos < len(p.toks) {
		p.pos++
	}
	return t
}

func (p *parser) errorf(format string, a ...any) *Error {
	return &Error{Input: p.input, Dim: p.dim, Msg: fmt.Sprintf(format, a...)}
}

// fail returns an error ending in a correct example.
func (p *parser) fail(msg string) *Error {
	return p.errorf("%s; write it like %q", msg, p.ex)
}

// parseUnit parses: unit = term { op term }. depth counts open brackets.
func (p *parser) parseUnit(depth int) (quantity, *Error) {
	q, err := p.parseTerm(depth)
	if err != nil {
		return q, err
	}
	divided := false
	for {
		t := p.peek()
		div := false
		switch {
		case t.kind == 0 || (t.kind == ')' && depth > 0):
			return q, nil
		case t.kind == '/':
			div = true
			p.pos++
		case t.kind == '*':
			p.pos++
		case (t.kind == 'a' || t.kind == '(') && q.expEnd && !t.space:
			// implicit product right after an exponent: "m2K"
		case t.kind == 'a':
			return q, p.fail(fmt.Sprintf("has unexpected %q after the unit (join units with * or /)", t.text))
		default:
			return q, p.fail(fmt.Sprintf("has unexpected %q", t.text))
		}
		if divided && !div {
			return q, p.ambiguous()
		}
		r, err := p.parseTerm(depth)
		if err != nil {
			return q, err
		}
		sign := 1
		if div {
			sign, r.scale = -1, 1/r.scale
		}
		q = quantity{scale: q.scale * r.scale, v: q.v.add(r.v, sign), expEnd: r.expEnd}
		divided = divided || div
	}
}

// parseTerm parses: term = (symbol | "1" | "(" unit ")") [exponent].
func (p *parser) parseTerm(depth int) (quantity, *Error) {
	t := p.next()
	var q quantity
	switch t.kind {
	case 'a':
		def, ok := symbols[t.text]
		if !ok {
			return q, p.unknown(t.text)
		}
		q = quantity{scale: def.scale, v: def.v, single: &def}
	case '0':
		if t.text != "1" {
			return q, p.fail(fmt.Sprintf("has unexpected number %q in the unit", t.text))
		}
		q = quantity{scale: 1}
	case '(':
		inner, err := p.parseUnit(depth + 1)
		if err != nil {
			return q, err
		}
		if p.next().kind != ')' {
			return q, p.fail(`has a "(" that is not closed`)
		}
		q = quantity{scale: inner.scale, v: inner.v}
	case 0:
		return q, p.fail("ends where a unit is expected")
	default:
		return q, p.fail(fmt.Sprintf("has unexpected %q", t.text))
	}
	n, ok, err := p.exponent(t.kind == 'a')
	if err != nil || !ok {
		return q, err
	}
	scale := 1.0
	for range n {
		scale *= q.scale
	}
	for range -n {
		scale /= q.scale
	}
	return quantity{scale: scale, v: vec{}.add(q.v, n), expEnd: true}, nil
}

// exponent parses "^[+-]digits", or bare digits right after a symbol.
func (p *parser) exponent(afterSymbol bool) (n int, ok bool, err *Error) {
	t := p.peek()
	if t.space {
		return 0, false, nil
	}
	sign, digits := 1, ""
	switch {
	case t.kind == '^':
		p.pos++
		if s := p.peek(); !s.space && (s.kind == '-' || s.kind == '+') {
			if s.kind == '-' {
				sign = -1
			}
			p.pos++
		}
		d := p.next()
		if d.kind != '0' || d.space {
			return 0, false, p.fail(`needs a whole number after "^"`)
		}
		digits = d.text
	case t.kind == '0' && afterSymbol:
		p.pos++
		digits = t.text
	default:
		return 0, false, nil
	}
	n, aerr := strconv.Atoi(digits)
	if aerr != nil || n > 9 {
		return 0, false, p.fail(fmt.Sprintf("has an exponent %s that is too large", digits))
	}
	return sign * n, true, nil
}

// ambiguous reports a product after a "/", suggesting two exact rewrites
// when the unit is simple enough.
func (p *parser) ambiguous() *Error {
	unit := strings.Join(strings.Fields(p.unit), "")
	msg := fmt.Sprintf(`has an ambiguous unit %q: a product after "/" may divide or multiply`, unit)
	left, right, _ := strings.Cut(unit, "/")
	if strings.ContainsAny(unit, "()") || strings.Contains(right, "/") {
		return p.errorf(`%s; give every divisor its own "/"`, msg)
	}
	var b strings.Builder
	prev := rune(0)
	for _, r := range right {
		switch {
		case r == '*' || r == '.' || r == '·' || r == '⋅':
			r = '/'
		case isSymbolRune(r) && (prev >= '0' && prev <= '9' || prev == '²' || prev == '³'):
			b.WriteRune('/')
		}
		b.WriteRune(r)
		prev = r
	}
	return p.errorf(`%s; write %s/%s or %s/(%s)`, msg, left, b.String(), left, right)
}

// unknown reports an unknown symbol, with the nearest accepted spelling
// when exactly one is close: the same letters in another case, or an edit
// distance of 1 (symbols of up to 3 letters) or 2 (longer ones).
func (p *parser) unknown(sym string) *Error {
	msg := fmt.Sprintf("has an unknown unit %q", sym)
	names := make([]string, 0, len(symbols))
	for name := range symbols {
		names = append(names, name)
	}
	sort.Strings(names)
	var fold []string
	best, bestD, ties := "", math.MaxInt, 0
	for _, name := range names {
		if strings.EqualFold(name, sym) {
			fold = append(fold, name)
		}
		switch d := editDistance(sym, name); {
		case d < bestD:
			best, bestD, ties = name, d, 1
		case d == bestD:
			ties++
		}
	}
	limit := 1
	if utf8.RuneCountInString(sym) > 3 {
		limit = 2
	}
	switch {
	case len(fold) == 1:
		msg += fmt.Sprintf(" (did you mean %q?)", fold[0])
	case len(fold) == 0 && ties == 1 && bestD <= limit && utf8.RuneCountInString(sym) > 1:
		msg += fmt.Sprintf(" (did you mean %q?)", best)
	}
	return p.fail(msg)
}

// editDistance is the Levenshtein distance between a and b, in runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	row := make([]int, len(rb)+1)
	for j := range row {
		row[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		diag := row[0]
		row[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			diag, row[j] = row[j], min(row[j]+1, row[j-1]+1, diag+cost)
		}
	}
	return row[len(rb)]
}

// mismatch reports a unit of another dimension, naming it when it is one
// of ours: "is a heat transfer coefficient, not a conductivity".
func (p *parser) mismatch(v vec) *Error {
	var names []string
	for d := Length; d <= PowerPerArea; d++ {
		if dims[d].v == v {
			names = append(names, d.WithArticle())
		}
	}
	if len(names) == 0 {
		return p.fail("is not " + p.dim.WithArticle())
	}
	return p.fail(fmt.Sprintf("is %s, not %s", strings.Join(names, " or "), p.dim.WithArticle()))
}
