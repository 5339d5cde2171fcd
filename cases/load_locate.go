package cases

import (
	"strconv"
	"strings"
	"unicode"
)

// pos is a position in a file: 1-based line and byte column. The zero pos
// means "no position".
type pos struct{ Line, Col int }

// locator finds the positions of keys and values in the text of a TOML
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
type locator struct {
	keys  map[string]pos // where the key (or array element) starts
	vals  map[string]pos // where the value starts
	heads map[string]pos // where a table header [..] or [[..]] starts
	all   []entry        // every key and header, in text order
}

type entry struct {
	path string
	at   pos
}

// maxDepth bounds the nesting of arrays and inline tables the locator
// follows, so that no input can exhaust the stack.
const maxDepth = 200

func newLocator(text string) *locator {
	l := &locator{
		keys:  make(map[string]pos),
		vals:  make(map[string]pos),
		heads: make(map[string]pos),
	}
	s := &scanner{src: text, line: 1, loc: l, arrays: make(map[string]int)}
	s.document()
	return l
}

// key returns the position of the key at path, falling back to the table
// that holds it.
func (l *locator) key(path string) pos {
	if p, ok := l.keys[path]; ok {
		return p
	}
	return l.table(path)
}

// value returns the position of the value at path, falling back to its key.
func (l *locator) value(path string) pos {
	if p, ok := l.vals[path]; ok {
		return p
	}
	return l.key(path)
}

// table returns the position of the table at path: its header, its key (an
// inline or dotted table), the first key inside it, or else the position of
// the enclosing table. The zero pos when nothing of the path is in the text.
func (l *locator) table(path string) pos {
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
	return pos{}
}

// scanner is the state of one locator pass.
type scanner struct {
	src       string
	i         int // byte offset
	line      int
	lineStart int // offset of the first byte of the current line
	loc       *locator
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

func (s *scanner) at() pos { return pos{s.line, s.i - s.lineStart + 1} }

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

func (s *scanner) record(m map[string]pos, path string, p pos, all bool) {
	if _, ok := m[path]; !ok {
		m[path] = p
	}
	if all {
		s.loc.all = append(s.loc.all, entry{path, p})
	}
}

func join(a, b string) string {
	b = keyPart(b)
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
func keyPart(k string) string {
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
	arr := join(s.resolve(parts[:len(parts)-1]), parts[len(parts)-1])
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
		path = join(path, k)
		if n, ok := s.arrays[path]; ok && n > 0 {
			path += "." + strconv.Itoa(n-1)
		}
	}
	return path
}

// keyParts reads a possibly dotted key and returns its parts and the
// position of its first character.
func (s *scanner) keyParts() ([]string, pos) {
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
		path = join(path, k)
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
