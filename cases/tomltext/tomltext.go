// Package tomltext scans TOML text before the TOML library parses it: how
// deep tables, arrays and dotted keys nest (the library's cost grows faster
// than the depth, so a hostile file is refused before it gets there), and
// where a construct left unclosed opens (a table header, a string, an
// array), so that a syntax error can point at the line where the problem
// starts rather than where the parser noticed it. After a successful parse,
// Locate finds where every key, value and table header starts (the TOML
// library keeps those positions private), so that a value's error points
// at the value.
//
// The scan is a light lexer, linear in the text: it knows comments, the
// four kinds of strings, table headers, keys and brackets, and stops
// quietly at anything it does not understand (the parser reports that).
// Lines end in LF or CRLF alike.
package tomltext

import "unicode/utf8"

// Pos is a position in the text: 1-based line and column (in characters).
type Pos struct{ Line, Col int }

// Scan is what Check found.
type Scan struct {
	// Depth is the deepest nesting found, and Deepest where it was first
	// reached; when Depth > the limit given to Check, the scan stopped
	// there.
	Depth   int
	Deepest Pos
	// Unclosed is the first construct left open ("" if none): "table
	// header", "array of tables header", "string", "multi-line string",
	// "array", "inline table"; Open is where it opens.
	Unclosed string
	Open     Pos
}

// Check scans text, stopping as soon as the nesting passes limit.
//
// Nesting counts one level per part of a table header ([a.b] is 2;
// [[a.b]] is 3, the array one more), per part of a dotted key, and per open
// array or inline table: the depth of a value is the sum along its path.
// Cost O(len(text)).
func Check(text []byte, limit int) Scan {
	l := lexer{text: text, line: 1}
	l.run(limit)
	return l.scan
}

type frame struct {
	table bool // '{' (else '[')
	key   int  // parts of the key being assigned inside an inline table
	open  Pos
}

type lexer struct {
	text      []byte
	i         int
	line, bol int // current line, byte offset of its start
	scan      Scan
	base      int // parts of the current table header
	key       int // parts of the current top-level key
	stack     []frame
	limit     int
}

func (l *lexer) pos(at int) Pos {
	return Pos{Line: l.line, Col: utf8.RuneCount(l.text[l.bol:at]) + 1}
}

// depth is the current nesting.
func (l *lexer) depth() int {
	d := l.base + l.key
	for _, f := range l.stack {
		d += 1 + f.key
	}
	return d
}

// note records the current depth at byte at; false when it passed the
// limit (the scan stops).
func (l *lexer) note(at int) bool {
	if d := l.depth(); d > l.scan.Depth {
		l.scan.Depth, l.scan.Deepest = d, l.pos(at)
	}
	return l.scan.Depth <= l.limit
}

func (l *lexer) unclosed(what string, at Pos) {
	if l.scan.Unclosed == "" {
		l.scan.Unclosed, l.scan.Open = what, at
	}
}

func (l *lexer) newline() {
	l.line++
	l.bol = l.i
}

func (l *lexer) run(limit int) {
	l.limit = limit
	t := l.text
	for l.i < len(t) {
		// Start of a line at the top level.
		l.skipSpace()
		if l.i >= len(t) {
			return
		}
		switch c := t[l.i]; {
		case c == '\n':
			l.i++
			l.newline()
			continue
		case c == '\r':
			l.i++
			continue
		case c == '#':
			l.skipComment()
			continue
		case c == '[':
			if !l.header() {
				return
			}
			continue
		}
		// key = value
		l.key = 0
		at := l.i
		if !l.readKey(func(parts int) { l.key = parts }) {
			return
		}
		if !l.note(at) {
			return
		}
		if !l.value() {
			return
		}
		l.key = 0
	}
	for _, f := range l.stack {
		what := "array"
		if f.table {
			what = "inline table"
		}
		l.unclosed(what, f.open)
		break
	}
}

func (l *lexer) skipSpace() {
	for l.i < len(l.text) && (l.text[l.i] == ' ' || l.text[l.i] == '\t') {
		l.i++
	}
}

func (l *lexer) skipComment() {
	for l.i < len(l.text) && l.text[l.i] != '\n' {
		l.i++
	}
}

// header reads [a.b] or [[a.b]]; false to stop.
func (l *lexer) header() bool {
	t := l.text
	start := l.pos(l.i)
	l.i++
	what, extra := "table header", 0
	if l.i < len(t) && t[l.i] == '[' {
		l.i++
		what, extra = "array of tables header", 1
	}
	parts := 1
	for l.i < len(t) {
		switch c := t[l.i]; c {
		case '\n', '\r':
			l.unclosed(what, start)
			return false
		case '"', '\'':
			if !l.str() {
				return false
			}
			continue
		case '.':
			parts++
		case ']':
			l.i++
			if extra == 1 {
				if l.i >= len(t) || t[l.i] != ']' {
					l.unclosed(what, start)
					return false
				}
				l.i++
			}
			l.base = parts + extra
			l.key = 0
			return l.note(l.i - 1)
		}
		l.i++
	}
	l.unclosed(what, start)
	return false
}

// readKey reads a (dotted) key up to and including '=', calling set with
// its number of parts; false to stop.
func (l *lexer) readKey(set func(int)) bool {
	t := l.text
	parts := 1
	for l.i < len(t) {
		switch c := t[l.i]; c {
		case '"', '\'':
			if !l.str() {
				return false
			}
			continue
		case '.':
			parts++
		case '=':
			l.i++
			set(parts)
			return true
		case '\n', '#', '}', ']', '[', '{':
			return false // not a key: the parser says why
		}
		l.i++
	}
	return false
}

// value reads one value, with any arrays and inline tables in it, up to
// the end of its line; false to stop.
func (l *lexer) value() bool {
	t := l.text
	for l.i < len(t) {
		switch c := t[l.i]; c {
		case '"', '\'':
			if !l.str() {
				return false
			}
			continue
		case '#':
			l.skipComment()
			continue
		case '\n':
			l.i++
			l.newline()
			if len(l.stack) == 0 {
				return true
			}
			continue
		case '[', '{':
			l.stack = append(l.stack, frame{table: c == '{', open: l.pos(l.i)})
			if !l.note(l.i) {
				return false
			}
			l.i++
			if c == '{' {
				if !l.inlineKey() {
					return false
				}
			}
			continue
		case ']', '}':
			if len(l.stack) == 0 {
				return false
			}
			l.stack = l.stack[:len(l.stack)-1]
			l.i++
			continue
		case ',':
			l.i++
			if n := len(l.stack); n > 0 && l.stack[n-1].table {
				if !l.inlineKey() {
					return false
				}
			}
			continue
		}
		l.i++
	}
	return true
}

// inlineKey reads the key of an inline table's next entry (or its closing
// brace, left for value to read); false to stop.
func (l *lexer) inlineKey() bool {
	t := l.text
	for l.i < len(t) && (t[l.i] == ' ' || t[l.i] == '\t') {
		l.i++
	}
	if l.i < len(t) && t[l.i] == '}' {
		return true
	}
	f := &l.stack[len(l.stack)-1]
	at := l.i
	if !l.readKey(func(parts int) { f.key = parts }) {
		return false
	}
	return l.note(at)
}

// str skips a string starting at l.i; false (with Unclosed set) when it is
// not closed.
func (l *lexer) str() bool {
	t := l.text
	q := t[l.i]
	start := l.pos(l.i)
	if l.i+2 < len(t) && t[l.i+1] == q && t[l.i+2] == q {
		l.i += 3
		for l.i < len(t) {
			c := t[l.i]
			switch {
			case c == '\\' && q == '"':
				if l.i+1 < len(t) && (t[l.i+1] == '\n' || t[l.i+1] == '\r') {
					l.i++ // a line-ending backslash: the newline is counted below
				} else {
					l.i += 2
				}
				continue
			case c == '\n':
				l.i++
				l.newline()
				continue
			case c == q && l.i+2 < len(t) && t[l.i+1] == q && t[l.i+2] == q:
				l.i += 3
				for l.i < len(t) && t[l.i] == q { // up to two quotes may end the content
					l.i++
				}
				return true
			}
			l.i++
		}
		l.unclosed("multi-line string", start)
		return false
	}
	l.i++
	for l.i < len(t) {
		c := t[l.i]
		switch {
		case c == '\\' && q == '"':
			l.i += 2
			continue
		case c == q:
			l.i++
			return true
		case c == '\n' || c == '\r' && l.i+1 < len(t) && t[l.i+1] == '\n':
			l.unclosed("string", start)
			return false
		}
		l.i++
	}
	l.unclosed("string", start)
	return false
}
