package tomltext

import (
	"strconv"
	"strings"
	"unicode"
)

// Place is a position in a file: 1-based line and byte column. The zero Place
// means "no position".
type Place struct{ Line, Col int }

// Locator finds the positions of keys and values in the text of a TOML
// document that has already been parsed successfully, because
// BurntSushi/toml keeps the positions of keys private (and misplaces some
// value errors in repeated [[layer]] tables).
//
// Key paths are the keys joined by "."; an element of an array (including
// a table of an array of tables) is named by its 0-based index:
// "layer.1.thickness", "schedules.oven.segments.2.to",
// "materials.demo-epoxy.cure.E1".
//
// Method: one pass over the text that tracks the current table header
// ([a.b] or [[a.b]], counting the elements of each array of tables, also
// nested ones), dotted keys, arrays and inline tables, and records where
// every key, value and header starts. On text that is not valid TOML it
// never panics, but its positions may be wrong. Cost O(len(text)).
type Locator struct {
	keys  map[string]Place // where the key (or array element) starts
	vals  map[string]Place // where the value starts
	heads map[string]Place // where a table header [..] or [[..]] starts
	all   []entry          // every key and header, in text order
}

type entry struct {
	path string
	at   Place
}

// maxDepth bounds the nesting of arrays and inline tables the Locator
// follows, so that no input can exhaust the stack.
const maxDepth = 200

func Locate(text string) *Locator {
	l := &Locator{
		keys:  make(map[string]Place),
		vals:  make(map[string]Place),
		heads: make(map[string]Place),
	}
	s := &scanner{src: text, line: 1, loc: l, arrays: make(map[string]int)}
	s.document()
	return l
}

// key returns the position of the key at path, falling back to the table
// that holds it.
func (l *Locator) Key(path string) Place {
	if p, ok := l.keys[path]; ok {
		return p
	}
	return l.Table(path)
}

// value returns the position of the value at path, falling back to its key.
func (l *Locator) Value(path string) Place {
	if p, ok := l.vals[path]; ok {
		return p
	}
	return l.Key(path)
}

// table returns the position of the table at path: its header, its key (an
// inline or dotted table), the first key inside it, or else the position of
// the enclosing table. The zero Place when nothing of the path is in the text.
func (l *Locator) Table(path string) Place {
	for path != "" {
		if p, ok := l.heads[path]; ok {
			return p
		}
		if p, ok := l.keys[path]; ok {
			return p
		}
		prefix := path + "."
		for _, e := range l.all {
			if strings.HasPrefix(e.path, prefix) {
				return e.at
			}
		}
		i := strings.LastIndexByte(path, '.')
		if i < 0 {
			break
		}
		path = path[:i]
	}
	return Place{}
}

// KeyNear returns the position of the key at path like Key, and for a key
// the text has no position for (an empty table name, [""]) the first entry
// whose path ends in the same last part, or else the first entry at all;
// the zero Place for a text without entries.
func (l *Locator) KeyNear(path string) Place {
	at := l.Key(path)
	if at.Line != 0 {
		return at
	}
	last := lastPart(path)
	for _, e := range l.all {
		if at.Line == 0 || lastPart(e.path) == last {
			at = e.at
			if lastPart(e.path) == last {
				break
			}
		}
	}
	return at
}

// ValueAt returns where the value at path starts, without falling back.
func (l *Locator) ValueAt(path string) (Place, bool) {
	p, ok := l.vals[path]
	return p, ok
}

// HeaderAt returns where the header [..] or [[..]] of the table at path
// starts, without falling back.
func (l *Locator) HeaderAt(path string) (Place, bool) {
	p, ok := l.heads[path]
	return p, ok
}

func lastPart(path string) string {
	if i := strings.LastIndexByte(path, '.'); i >= 0 {
		return path[i+1:]
	}
	return path
}

// scanner is the state of one Locator pass.
type scanner struct {
	src       string
	i         int // byte offset
	line      int
	lineStart int // offset of the first byte of the current line
	loc       *Locator
	arrays    map[string]int // resolved path of an array of tables -> elements so far
	table     string         // resolved path of the current table ("" at top level)
}

func (s *scanner) eof() bool { return s.i >= len(s.src) }

func (s *scanner) peek(k int) byte {
	if s.i+k < len(s.src) {
		return s.src[s.i+k]
	}
	return 0
}

func (s *scanner) at() Place { return Place{s.line, s.i - s.lineStart + 1} }

// advance moves one byte, keeping the line count.
func (s *scanner) advance() {
	if s.eof() {
		return
	}
	if s.src[s.i] == '\n' {
		s.line++
		s.lineStart = s.i + 1
	}
	s.i++
}

// blanks skips spaces and tabs.
func (s *scanner) blanks() {
	for !s.eof() && (s.src[s.i] == ' ' || s.src[s.i] == '\t') {
		s.i++
	}
}

// gaps skips spaces, tabs, newlines and comments.
func (s *scanner) gaps() {
	for !s.eof() {
		switch s.src[s.i] {
		case ' ', '\t', '\r', '\n':
			s.advance()
		case '#':
			s.toLineEnd()
		default:
			return
		}
	}
}

// toLineEnd moves to the newline that ends the current line (or EOF).
func (s *scanner) toLineEnd() {
	for !s.eof() && s.src[s.i] != '\n' {
		s.i++
	}
}

func (s *scanner) record(m map[string]Place, path string, p Place, all bool) {
	if _, ok := m[path]; !ok {
		m[path] = p
	}
	if all {
		s.loc.all = append(s.loc.all, entry{path, p})
	}
}

// JoinKey returns the key path a.b, with b written as KeyPart writes it.
func JoinKey(a, b string) string {
	b = KeyPart(b)
	if a == "" {
		return b
	}
	return a + "." + b
}

// keyPart writes one part of a key path for messages: as it is, unless it
// is empty or holds a character that does not print (a tab, a carriage
// return...), which is then quoted (`layer.0.""`, `"a\rb"`). Parts with
// dots or spaces stay as written: a quoted "top.h" in [uncertainty] is a
// key path on purpose.
func KeyPart(k string) string {
	if k == "" {
		return `""`
	}
	for _, r := range k {
		if !unicode.IsPrint(r) {
			return strconv.Quote(k)
		}
	}
	return k
}

func (s *scanner) document() {
	for {
		s.gaps()
		if s.eof() {
			return
		}
		start := s.i
		if s.src[s.i] == '[' {
			s.header()
		} else {
			s.keyValue(s.table, 0)
		}
		s.blanks()
		if !s.eof() && s.src[s.i] == '#' {
			s.toLineEnd()
		}
		if s.i == start { // no progress on text that is not TOML
			s.advance()
		}
	}
}

// header reads [a.b] or [[a.b]] and makes it the current table.
func (s *scanner) header() {
	p := s.at()
	s.advance()
	double := s.peek(0) == '['
	if double {
		s.advance()
	}
	s.blanks()
	parts, _ := s.keyParts()
	for !s.eof() && s.src[s.i] != '\n' && s.src[s.i] != '#' {
		s.i++ // the closing brackets
	}
	if len(parts) == 0 {
		return
	}
	if !double {
		s.table = s.resolve(parts)
		s.record(s.loc.heads, s.table, p, true)
		return
	}
	arr := JoinKey(s.resolve(parts[:len(parts)-1]), parts[len(parts)-1])
	n := s.arrays[arr]
	s.arrays[arr] = n + 1
	s.table = arr + "." + strconv.Itoa(n)
	s.record(s.loc.heads, arr, p, false)
	s.record(s.loc.heads, s.table, p, true)
}

// resolve turns the keys of a header into a path, entering the last element
// of every array of tables on the way.
func (s *scanner) resolve(parts []string) string {
	path := ""
	for _, k := range parts {
		path = JoinKey(path, k)
		if n, ok := s.arrays[path]; ok && n > 0 {
			path += "." + strconv.Itoa(n-1)
		}
	}
	return path
}

// keyParts reads a possibly dotted key and returns its parts and the
// position of its first character.
func (s *scanner) keyParts() ([]string, Place) {
	p := s.at()
	var parts []string
	for !s.eof() {
		s.blanks()
		if s.eof() {
			break
		}
		switch c := s.src[s.i]; {
		case c == '"' || c == '\'':
			parts = append(parts, s.quotedKey())
		case IsBare(c):
			j := s.i
			for j < len(s.src) && IsBare(s.src[j]) {
				j++
			}
			parts = append(parts, s.src[s.i:j])
			s.i = j
		default:
			return parts, p
		}
		s.blanks()
		if s.eof() || s.src[s.i] != '.' {
			return parts, p
		}
		s.i++
	}
	return parts, p
}

// IsBare reports whether c may appear in a bare TOML key (A-Z a-z 0-9 _ -;
// TOML v1.0.0, "Keys").
func IsBare(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_' || c == '-'
}

// quotedKey reads "..." or '...' on one line and returns its content.
func (s *scanner) quotedKey() string {
	q := s.src[s.i]
	start := s.i
	s.i++
	for !s.eof() && s.src[s.i] != q && s.src[s.i] != '\n' {
		if q == '"' && s.src[s.i] == '\\' {
			s.i++
		}
		s.i++
	}
	s.i = min(s.i, len(s.src)) // a backslash at the very end skipped past it
	if s.eof() || s.src[s.i] != q {
		return s.src[start+1 : s.i]
	}
	s.i++
	raw := s.src[start:s.i]
	if q == '\'' {
		return raw[1 : len(raw)-1]
	}
	if u, err := strconv.Unquote(raw); err == nil {
		return u
	}
	return raw[1 : len(raw)-1]
}

// keyValue reads key = value inside the table at path.
func (s *scanner) keyValue(table string, depth int) {
	parts, p := s.keyParts()
	if len(parts) == 0 {
		return
	}
	path := table
	for _, k := range parts {
		path = JoinKey(path, k)
	}
	s.record(s.loc.keys, path, p, true)
	s.blanks()
	if s.eof() || s.src[s.i] != '=' {
		return
	}
	s.i++
	s.blanks()
	s.value(path, depth)
}

// value reads one value and records the positions in it.
func (s *scanner) value(path string, depth int) {
	if s.eof() {
		return
	}
	s.record(s.loc.vals, path, s.at(), false)
	switch c := s.src[s.i]; c {
	case '"', '\'':
		s.str()
	case '[':
		s.advance()
		for n := 0; !s.eof(); n++ {
			s.gaps()
			if s.eof() || s.src[s.i] == ']' {
				break
			}
			start := s.i
			el := path + "." + strconv.Itoa(n)
			s.record(s.loc.keys, el, s.at(), true)
			if depth < maxDepth {
				s.value(el, depth+1)
			}
			s.gaps()
			if !s.eof() && s.src[s.i] == ',' {
				s.advance()
			}
			if s.i == start {
				s.advance()
			}
		}
		s.advance() // ]
	case '{':
		s.advance()
		for !s.eof() {
			s.gaps()
			if s.eof() || s.src[s.i] == '}' {
				break
			}
			start := s.i
			if depth < maxDepth {
				s.keyValue(path, depth+1)
			}
			s.gaps()
			if !s.eof() && s.src[s.i] == ',' {
				s.advance()
			}
			if s.i == start {
				s.advance()
			}
		}
		s.advance() // }
	default:
		// A number, boolean or date: up to the next delimiter. (Local
		// date-times may contain one space.)
		for !s.eof() && !strings.ContainsRune(",]}#\n\r", rune(s.src[s.i])) {
			s.i++
		}
	}
}

// str skips a basic, literal or multi-line string.
func (s *scanner) str() {
	q := s.src[s.i]
	if s.peek(1) == q && s.peek(2) == q {
		s.i += 3
		for !s.eof() {
			if q == '"' && s.src[s.i] == '\\' {
				s.advance()
				s.advance()
				continue
			}
			if s.src[s.i] == q && s.peek(1) == q && s.peek(2) == q {
				s.i += 3
				for k := 0; k < 2 && !s.eof() && s.src[s.i] == q; k++ { // """"" ends with quotes
					s.i++
				}
				return
			}
			s.advance()
		}
		return
	}
	s.i++
	for !s.eof() && s.src[s.i] != q && s.src[s.i] != '\n' {
		if q == '"' && s.src[s.i] == '\\' {
			s.i++
		}
		s.i++
	}
	if !s.eof() && s.src[s.i] == q {
		s.i++
	}
}

// LastKeyBefore returns the path, with array indices, of the last key that
// starts at or before line:col, in text that is not valid TOML (the parser's own last key has no indices); "" if none.
func (l *Locator) LastKeyBefore(line, col int) string {
	best, at := "", Place{}
	for _, e := range l.all {
		p := e.at
		if _, isKey := l.keys[e.path]; !isKey || p.Line > line || p.Line == line && p.Col > col {
			continue
		}
		if p.Line > at.Line || p.Line == at.Line && p.Col >= at.Col {
			best, at = e.path, p
		}
	}
	return best
}
