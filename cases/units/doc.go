// Package units reads the dimensional values of a case file: a number
// followed by its unit, such as "12 mm", "25 C", "2 C/min", "15 W/m^2/K",
// "420 J/g" or "1.2e5 1/s", and converts them to SI (README, Case file reference).
//
// The caller states the dimension it expects (a Dim); Parse checks the unit
// against it by dimensional analysis and returns the value in the SI unit of
// that dimension (Dim.SIUnit). Spreads for uncertain inputs ("±20 %",
// "±1.5 kJ/mol", "+/-0.3 mm") are read by ParseSpread.
//
// # Unit grammar
//
//	value    = number [spaces] unit
//	number   = [+-]digits[.digits][(e|E)[+-]digits]   (a leading "−" U+2212 is a minus)
//	unit     = term { ("*" | "." | "·" | "/") term }
//	term     = (symbol | "1" | "(" unit ")") [exponent]
//	exponent = "^" [+-]digits | digits right after a symbol ("m2", "m^3", "s^-1", "m²")
//
// Quotients are left-associative: J/kg/K = J/(kg·K). A product written after
// a "/" ("W/m.K", "W/m2K") is refused as ambiguous; write "W/m/K" or
// "W/(m*K)". Two units may be joined without an operator only right after an
// exponent ("m2K/W"). Spaces are allowed between the number and the unit and
// around operators, nowhere else. Symbols are case-sensitive ("mm", not
// "MM"); an unknown symbol gets a "did you mean" hint when one spelling is
// close. Prefixes are not general: every accepted symbol is listed in the
// table in units.go.
//
// # Temperatures
//
// For the dimension Temperature the unit must be one bare temperature symbol
// and the value is an absolute temperature:
//
//	T/K = t/°C + 273.15
//	T/K = (t/°F − 32)·5/9 + 273.15
//
// (NIST SP 811 (2008), §4.2.1.1 and App. B.9, from memory). A result below
// 0 K is an error. Everywhere else — the dimension TemperatureDifference and
// every compound unit (C/min, W/m^2/K, J/kg/K, m^2*K/W, 1/K) — a temperature
// unit is a difference: 1 C = 1 K, 1 F = 5/9 K.
//
// # Invariants
//
//   - Results are SI: m, s, K, kg, J, W, Hz, V/m, mol; temperatures in kelvin.
//   - The calorie is the thermochemical calorie, 1 cal = 4.184 J exactly
//     (NIST SP 811 (2008), App. B.8, from memory), the one used in the
//     chemistry and DSC literature; kcal = 4184 J.
//   - Inch, mil and pound are the international ones: 1 in = 0.0254 m,
//     1 mil = 0.001 in, 1 lb = 0.45359237 kg, all exact.
//   - Every error is a *Error whose message is one line, quotes the input
//     and, where it helps, shows a correct example.
//   - Parse never panics, whatever the input string.
//   - Parse checks dimensions, not ranges: a negative length is returned as
//     it is (the case loader judges ranges); only an absolute temperature
//     below 0 K is refused here.
package units
