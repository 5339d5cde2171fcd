// Package journal reads and writes the append-only record of the finished
// runs of a sweep: a CSV file whose first line is the header and whose
// every other record is one run's row followed by a checksum.
//
// # Format
//
// The header names the row's columns and then "crc32". Each record is the
// row's fields and the CRC-32 (IEEE) of those fields joined by U+001F,
// written as 8 lower-case hex digits. The first field of a row is the run
// index, a decimal integer in [0, runs). Records are appended whole and
// synced; a crash while appending leaves at most one record cut short at
// the end.
//
// # Damage
//
// Read checks every record on its own: a record whose fields do not parse,
// whose field count or run index is wrong, or whose checksum does not
// match costs that record only. Reading goes on at the next line, and
// every later record that checks is kept. What was skipped is listed
// (Damage: which record, which line, which run when it can still be read),
// so the caller can say which runs are done again. A header that is not
// the expected one is a *HeaderError that says how to recover.
package journal

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"hash/crc32"
	"slices"
	"strconv"
	"strings"
)

// Damage is one damaged stretch of a journal, skipped by Read.
type Damage struct {
	Record int    // 1-based number of the record (the header not counted)
	Line   int    // 1-based line in the file where it starts
	Run    int    // the run it was for, -1 when its index cannot be read
	Reason string // what is wrong with it
	// Tail is true for a last record cut short without its line end (a
	// crash while appending), the one kind of damage a sound journal can
	// show.
	Tail bool
}

// String describes d for a message: "record 37 (line 38, run 36):
// checksum does not match".
func (d Damage) String() string {
	run := ""
	if d.Run >= 0 {
		run = fmt.Sprintf(", run %d", d.Run)
	}
	return fmt.Sprintf("record %d (line %d%s): %s", d.Record, d.Line, run, d.Reason)
}

// Contents is what Read found.
type Contents struct {
	// Rows holds each run's row (without the checksum), the first good
	// record of a run winning.
	Rows    map[int][]string
	Records int // records read, good and damaged
	Damaged []Damage
}

// Runs returns the runs whose damaged records were not made good by a
// later record of the same run, in order: the runs to be done again
// because of the damage.
func (c *Contents) Runs() []int {
	var out []int
	for _, d := range c.Damaged {
		if _, ok := c.Rows[d.Run]; d.Run >= 0 && !ok && !slices.Contains(out, d.Run) {
			out = append(out, d.Run)
		}
	}
	slices.Sort(out)
	return out
}

// HeaderError reports a first line that is not the expected header.
type HeaderError struct {
	Path string
	Want []string // the expected header, "crc32" included
	Got  string   // the first line as found (shortened)
	Good int      // records after it that check against the expected columns
}

func (e *HeaderError) Error() string {
	want := csvLine(e.Want)
	if e.Good > 0 {
		return fmt.Sprintf("%s: the first line is damaged (%q), but %d records after it are sound: to keep them, "+
			"replace the first line with the header of this sweep,\n  %s\nand run the same command again; "+
			"or remove %s to do every run again", e.Path, e.Got, e.Good, want, e.Path)
	}
	return fmt.Sprintf("%s: the first line is not the header of this sweep (%q; damaged, or written by another version): "+
		"the header should be\n  %s\nput it back if only that line was damaged, or remove %s to do every run again", e.Path, e.Got, want, e.Path)
}

// csvLine returns the CSV line (without its newline) of the fields.
func csvLine(fields []string) string {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write(fields)
	w.Flush()
	return strings.TrimSuffix(b.String(), "\n")
}

// headerFor returns the journal's header for the row columns.
func headerFor(columns []string) []string { return append(slices.Clip(columns), "crc32") }

// Record returns the journal record of a row: its fields and checksum.
func Record(row []string) []string { return append(slices.Clip(row), Sum(row)) }

// Sum returns the checksum of a row (see Format).
func Sum(row []string) string {
	return fmt.Sprintf("%08x", crc32.ChecksumIEEE([]byte(strings.Join(row, "\x1f"))))
}

// Read reads the journal held in data (named path in messages) for rows
// of the given columns and runs. A journal without any byte is an error
// like a wrong header. Cost: linear in len(data).
func Read(path string, data []byte, columns []string, runs int) (*Contents, error) {
	header := headerFor(columns)
	first, n, ok := parseRecord(data)
	if !ok || !slices.Equal(first, header) {
		got := string(data[:min(len(data), n, 120)])
		if i := strings.IndexAny(got, "\r\n"); i >= 0 {
			got = got[:i]
		}
		e := &HeaderError{Path: path, Want: header, Got: got}
		// Count the sound records after it: they tell a damaged header
		// from another sweep's journal.
		rest, _ := readRecords(data[lineEnd(data, 0):], 1, header, runs)
		e.Good = len(rest.Rows)
		return nil, e
	}
	return readRecords(data[n:], 2, header, runs)
}

// ReadEarlier reads a journal written by an earlier version whose rows
// lacked the columns added (a subset of columns, kept in their order): its
// first line must be the header of columns without added. Each good
// record's row is returned in the layout of columns, with an empty field
// in each added column; damaged records are listed as by Read. ok is false
// when the header is not that earlier one. Whether an empty field is the
// right value is the caller's to know. Cost: linear in len(data).
func ReadEarlier(path string, data []byte, columns, added []string, runs int) (c *Contents, ok bool) {
	var old []string
	for _, col := range columns {
		if !slices.Contains(added, col) {
			old = append(old, col)
		}
	}
	if len(old) == len(columns) {
		return nil, false
	}
	c, err := Read(path, data, old, runs)
	if err != nil {
		return nil, false
	}
	for run, row := range c.Rows {
		full := make([]string, 0, len(columns))
		k := 0
		for _, col := range columns {
			if slices.Contains(added, col) {
				full = append(full, "")
				continue
			}
			full = append(full, row[k])
			k++
		}
		c.Rows[run] = full
	}
	return c, true
}

// readRecords reads the records in data, the first on line line.
func readRecords(data []byte, line int, header []string, runs int) (*Contents, error) {
	c := &Contents{Rows: map[int][]string{}}
	nf := len(header)
	for p := 0; p < len(data); {
		c.Records++
		rec, n, ok := parseRecord(data[p:])
		reason := ""
		run := -1
		switch {
		case !ok:
			reason = "not a complete CSV record"
		case len(rec) != nf:
			reason = fmt.Sprintf("%d fields instead of %d", len(rec), nf)
		default:
			r, err := strconv.Atoi(rec[0])
			if err != nil || r < 0 || r >= runs || strconv.Itoa(r) != rec[0] {
				reason = fmt.Sprintf("run index %q is not one of 0 to %d", rec[0], runs-1)
				break
			}
			run = r
			if rec[nf-1] != Sum(rec[:nf-1]) {
				reason = "checksum does not match"
			}
		}
		if reason == "" {
			if _, dup := c.Rows[run]; !dup {
				c.Rows[run] = rec[:nf-1]
			}
			line += bytes.Count(data[p:p+n], []byte{'\n'})
			p += n
			continue
		}
		if run < 0 && len(rec) > 0 {
			if r, err := strconv.Atoi(rec[0]); err == nil && r >= 0 && r < runs {
				run = r
			}
		}
		// Skip to the next line: a damaged record costs that line only.
		end := lineEnd(data, p)
		d := Damage{Record: c.Records, Line: line, Run: run, Reason: reason}
		if end == len(data) && (len(data) == 0 || data[len(data)-1] != '\n') {
			d.Tail = true
			d.Reason = "cut short (the last record, written when the sweep was stopped)"
		}
		c.Damaged = append(c.Damaged, d)
		line++
		p = end
	}
	return c, nil
}

// lineEnd returns the offset just past the end of the line starting at p.
func lineEnd(data []byte, p int) int {
	if i := bytes.IndexByte(data[p:], '\n'); i >= 0 {
		return p + i + 1
	}
	return len(data)
}

// parseRecord parses one CSV record (RFC 4180, as encoding/csv writes it)
// at the start of data and returns its fields and the bytes it takes, its
// line end included; ok is false when the record does not parse or is not
// ended by a line end.
func parseRecord(data []byte) (fields []string, n int, ok bool) {
	var f []byte
	i := 0
	for {
		f = f[:0]
		if i < len(data) && data[i] == '"' {
			i++
			for {
				j := bytes.IndexByte(data[i:], '"')
				if j < 0 {
					return fields, len(data), false
				}
				f = append(f, data[i:i+j]...)
				i += j + 1
				if i < len(data) && data[i] == '"' {
					f = append(f, '"')
					i++
					continue
				}
				break
			}
			fields = append(fields, strings.ReplaceAll(string(f), "\r\n", "\n"))
		} else {
			j := i
			for j < len(data) && data[j] != ',' && data[j] != '\n' {
				if data[j] == '"' {
					return fields, lineEnd(data, i), false
				}
				j++
			}
			fields = append(fields, strings.TrimSuffix(string(data[i:j]), "\r"))
			i = j
		}
		switch {
		case i >= len(data):
			return fields, i, true // the last record, without its line end
		case data[i] == ',':
			i++
		case data[i] == '\n':
			return fields, i + 1, true
		case data[i] == '\r' && i+1 < len(data) && data[i+1] == '\n':
			return fields, i + 2, true
		default:
			return fields, lineEnd(data, i), false
		}
	}
}
