package cases

import (
	"cureslab/cases/tomltext"
	"errors"
	"fmt"
	"sort"
	"strings"
	"unicode/utf8"
)

// Sentinel errors that the errors of Load and Parse wrap, for errors.Is.
// Every *Error wraps exactly one of them.
var (
	ErrSyntax     = errors.New("TOML syntax error")
	ErrUnknownKey = errors.New("unknown key")
	ErrType       = errors.New("wrong kind of value")
	ErrUnit       = errors.New("bad quantity or unit")
	ErrRange      = errors.New("value out of range")
	ErrMissing    = errors.New("missing value")
	ErrDuplicate  = errors.New("duplicate name")
	ErrReference  = errors.New("unknown name")
	ErrFile       = errors.New("cannot read file")
)

// Error is one problem in a case file (or in a file it refers to), with its
// position. It follows encoding/csv.ParseError: Error() reads
//
//	file:line:col: key: message
//
// followed by the hint, if any, on indented lines. Line and Col are 1-based
// (Col counts bytes); Line 0 means the problem has no place in the file (a
// missing section), and the position is left out. Key is the key path in the
// case, with 0-based indices for arrays as in sweep keys
// ("layer.1.thickness", "schedules.oven.segments.2.to").
type Error struct {
	File      string
	Line, Col int
	Key       string
	Err       error  // wraps one of the sentinel errors (ErrUnit, ErrRange, ...)
	Hint      string // optional: an example of the right form, or source context
}

// Error implements error.
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Col > 0 {
			fmt.Fprintf(&b, ":%d", e.Col)
		}
	}
	b.WriteString(": ")
	if e.Key != "" {
		b.WriteString(e.Key)
		b.WriteString(": ")
	}
	b.WriteString(e.Err.Error())
	if e.Hint != "" {
		for _, line := range strings.Split(strings.TrimRight(e.Hint, "\n"), "\n") {
			b.WriteString("\n\t")
			b.WriteString(line)
		}
	}
	return b.String()
}

// Unwrap returns the underlying error, which wraps a sentinel.
func (e *Error) Unwrap() error { return e.Err }

// ErrorList is a list of *Error, reported together, in the order of their
// position in the case file (problems in other files and problems without a
// position come last). The zero value is an empty list ready to use.
type ErrorList []*Error

// Error implements error: one error per line (plus its hint lines).
func (l ErrorList) Error() string {
	switch len(l) {
	case 0:
		return "no errors"
	case 1:
		return l[0].Error()
	}
	s := make([]string, len(l))
	for i, e := range l {
		s[i] = e.Error()
	}
	return strings.Join(s, "\n")
}

// Err returns l as an error, or a plain nil when l is empty.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	return l
}

// Unwrap lets errors.Is and errors.As see every error of the list.
func (l ErrorList) Unwrap() []error {
	out := make([]error, len(l))
	for i, e := range l {
		out[i] = e
	}
	return out
}

// sortFor orders the list for the case file named file: its positioned
// errors by line and column, then errors in other files in the order they
// were found, then errors without a position. Exact duplicates are dropped.
func (l ErrorList) sortFor(file string) ErrorList {
	group := func(e *Error) int {
		switch {
		case e.Line == 0:
			return 2
		case e.File != file:
			return 1
		}
		return 0
	}
	sort.SliceStable(l, func(i, j int) bool {
		a, b := l[i], l[j]
		if ga, gb := group(a), group(b); ga != gb {
			return ga < gb
		}
		if group(a) != 0 {
			return false
		}
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		return a.Col < b.Col
	})
	out := l[:0]
	seen := make(map[string]bool)
	for _, e := range l {
		s := e.Error()
		if !seen[s] {
			seen[s] = true
			out = append(out, e)
		}
	}
	return out
}

// Reason returns the Err of an Error: the message msg, wrapping kind (one
// of the sentinel errors, or a sentinel of the caller's own) and, when not
// nil, cause, the error that caused it (a *units.Error, an
// *os.PathError). Its text is msg alone.
func Reason(kind, cause error, msg string) error {
	return &detail{Kind: kind, Cause: cause, Msg: msg}
}

// detail is the error that Reason returns.
type detail struct {
	Kind  error
	Cause error
	Msg   string
}

func (d *detail) Error() string { return d.Msg }

func (d *detail) Unwrap() []error {
	if d.Cause == nil {
		return []error{d.Kind}
	}
	return []error{d.Kind, d.Cause}
}

// Suggest returns the element of valid nearest to got, or "" when none is
// close enough to be a likely typo. Distance is the optimal-string-alignment
// edit distance (insertions, deletions, substitutions and transpositions of
// adjacent characters), ignoring case; a candidate is close when the
// distance is at most max(1, min(3, len(got)/3)), or when one is a prefix of
// the other and got has at least 3 characters. Ties go to the earlier element
// of valid. Cost O(len(valid)·len(got)²).
func Suggest(got string, valid []string) string {
	g := strings.ToLower(got)
	limit := max(1, min(3, utf8.RuneCountInString(g)/3))
	best, bestD := "", limit+1
	for _, v := range valid {
		lv := strings.ToLower(v)
		d := editDistance(g, lv)
		if d > limit && utf8.RuneCountInString(g) >= 3 && (strings.HasPrefix(lv, g) || strings.HasPrefix(g, lv)) {
			d = limit
		}
		if d < bestD {
			best, bestD = v, d
		}
	}
	return best
}

// editDistance is the optimal-string-alignment distance between a and b,
// counted in runes.
func editDistance(a, b string) int {
	x, y := []rune(a), []rune(b)
	// d[i][j] for prefixes x[:i], y[:j]; three rolling rows.
	prev2 := make([]int, len(y)+1)
	prev := make([]int, len(y)+1)
	cur := make([]int, len(y)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(x); i++ {
		cur[0] = i
		for j := 1; j <= len(y); j++ {
			cost := 1
			if x[i-1] == y[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			if i > 1 && j > 1 && x[i-1] == y[j-2] && x[i-2] == y[j-1] {
				cur[j] = min(cur[j], prev2[j-2]+1)
			}
		}
		prev2, prev, cur = prev, cur, prev2
	}
	return prev[len(y)]
}

// FlattenErrors writes the errors of a case on one line: each as
// "file:line:col: key: message", without hints, joined by "; ".
func FlattenErrors(err error) string {
	var list ErrorList
	if !errors.As(err, &list) {
		return err.Error()
	}
	parts := make([]string, len(list))
	for i, e := range list {
		c := *e
		c.Hint = ""
		parts[i] = c.Error()
	}
	return strings.Join(parts, "; ")
}

func OneLine(s string) string {
	return strings.Join(strings.Fields(s), " ")
}

// pos is a position in a case file: 1-based line and byte column; the zero
// pos means "no position" (tomltext.Place, which finds them).
type pos = tomltext.Place
