package calibrate

import (
	"fmt"
	"sort"
	"strings"
)

// offsetOf returns the byte offset of the 1-based line and byte column in
// text, or -1 when there is no such place.
func offsetOf(text string, line, col int) int {
	if line < 1 || col < 1 {
		return -1
	}
	off := 0
	for l := 1; l < line; l++ {
		i := strings.IndexByte(text[off:], '\n')
		if i < 0 {
			return -1
		}
		off += i + 1
	}
	end := strings.IndexByte(text[off:], '\n')
	if end < 0 {
		end = len(text) - off
	}
	if col-1 > end {
		return -1
	}
	return off + col - 1
}

// scalarEnd returns the offset just past the TOML scalar value (a basic or
// literal string on one line, a number, a boolean or a date) that starts at
// off, or -1 when none does (a multi-line string, an array, an inline
// table, or text that ends inside a string).
func scalarEnd(text string, off int) int {
	if off < 0 || off >= len(text) {
		return -1
	}
	switch text[off] {
	case '"':
		if strings.HasPrefix(text[off:], `"""`) {
			return -1
		}
		for i := off + 1; i < len(text); i++ {
			switch text[i] {
			case '\\':
				i++
			case '"':
				return i + 1
			case '\n':
				return -1
			}
		}
		return -1
	case '\'':
		if strings.HasPrefix(text[off:], "'''") {
			return -1
		}
		i := strings.IndexAny(text[off+1:], "'\n")
		if i < 0 || text[off+1+i] != '\'' {
			return -1
		}
		return off + 2 + i
	case '[', '{':
		return -1
	}
	i := off
	for i < len(text) && !strings.ContainsRune(" \t\r\n,]}#", rune(text[i])) {
		i++
	}
	if i == off {
		return -1
	}
	return i
}

// edit is one change of a case text: the value at (Line, Col) replaced by
// Lit, or, with Insert, the line "Key = Lit" added after line Line (a table
// header) because the key is not in the text.
type edit struct {
	Line, Col int
	Insert    bool
	Key, Lit  string
	Comment   string // written after the value: "  # " + Comment
}

// applyEdits returns text with the edits made. Replacements keep
// everything around the value (the key, the spacing, a comment after it);
// the comment of an edit is added after the value only when the line has
// none. It fails when a value is not a single-line scalar at its position.
func applyEdits(text string, edits []edit) (string, error) {
	type span struct {
		from, to int
		s        string
	}
	var spans []span
	for _, e := range edits {
		if e.Insert {
			off := offsetOf(text, e.Line, 1)
			if off < 0 {
				return "", fmt.Errorf("%s: no line %d to add it after", e.Key, e.Line)
			}
			nl := strings.IndexByte(text[off:], '\n')
			at := len(text)
			prefix := ""
			if nl >= 0 {
				at = off + nl + 1
			} else {
				prefix = "\n"
			}
			line := prefix + e.Key + " = " + e.Lit
			if e.Comment != "" {
				line += "  # " + e.Comment
			}
			spans = append(spans, span{at, at, line + "\n"})
			continue
		}
		off := offsetOf(text, e.Line, e.Col)
		end := scalarEnd(text, off)
		if end < 0 {
			return "", fmt.Errorf("%s: the value at line %d, column %d is not a single value on one line", e.Key, e.Line, e.Col)
		}
		s := e.Lit
		lineEnd := strings.IndexByte(text[end:], '\n')
		rest := text[end:]
		if lineEnd >= 0 {
			rest = text[end : end+lineEnd]
		}
		pad := len(rest) - len(strings.TrimLeft(rest, " \t"))
		switch {
		case strings.HasPrefix(strings.TrimLeft(rest, " \t"), "#") && !strings.Contains(rest[:pad], "\t"):
			// Keep a comment after the value where it was, as far as the
			// new value leaves room (at least one space before it).
			keep := max(1, pad-(len(e.Lit)-(end-off)))
			s += strings.Repeat(" ", keep)
			end += pad
		case e.Comment != "" && !strings.Contains(rest, "#"):
			s += "  # " + e.Comment
		}
		spans = append(spans, span{off, end, s})
	}
	// Apply from the end so that earlier offsets stay valid.
	sort.SliceStable(spans, func(i, j int) bool { return spans[i].from > spans[j].from })
	for i := 1; i < len(spans); i++ {
		if spans[i].to > spans[i-1].from {
			return "", fmt.Errorf("two edits overlap at byte %d", spans[i].from)
		}
	}
	for _, sp := range spans {
		text = text[:sp.from] + sp.s + text[sp.to:]
	}
	return text, nil
}
