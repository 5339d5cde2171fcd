package report

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"

	"cureslab/cases"
	"cureslab/cases/limits"
	"cureslab/cases/results"
)

// maxCompareCSV is the most compare.csv RedrawCompareReport reads: one row
// per case, a few hundred bytes each.
const maxCompareCSV = 16 << 20

// IsComparison reports whether dir holds the outputs of a comparison
// (compare.csv) rather than those of a run (summary.json).
func IsComparison(dir string) bool {
	_, errC := os.Lstat(filepath.Join(dir, results.CompareFile))
	_, errS := os.Lstat(filepath.Join(dir, results.SummaryFile))
	return errC == nil && errS != nil
}

// RedrawCompareReport draws the comparison page of dir, the directory of
// 'cureslab compare' or a comparison folder of 'cureslab demo', from its
// compare.csv and the files of its cases, and writes dir/report.html: the
// page compare draws at the end, with the values of the files as they are.
//
// Method: compare.csv gives the cases in order (case, title, status); a
// case with values ran, and its files are read as RedrawReport reads them
// from the folder dir/NAME or, for a demo's comparison, the folder NAME
// beside dir; the first of the two whose summary.json gives the row's
// values, every one of them as compare.csv writes it
// (results.CompareRowOf), is taken, so a folder of another run is never
// drawn under its name. A case without values (not-run, or failed before it
// started) is listed as not run.
//
// Errors: compare.csv missing, unreadable or malformed, or a case that ran
// without a folder holding its outputs: a *cases.Error naming the file,
// nothing written. When ctx is done the error wraps ctx.Err() and nothing
// is written. Cost: as RedrawReport per case that ran.
func RedrawCompareReport(ctx context.Context, dir string) error {
	path := filepath.Join(dir, results.CompareFile)
	rows, err := readCompareCSV(path)
	if err != nil {
		return err
	}
	names := make([]string, len(rows))
	ds := make([]*runData, len(rows))
	for i, r := range rows {
		names[i] = r.name
		if !r.ran {
			continue
		}
		var tried []string
		beside := filepath.Join(filepath.Dir(absOr(dir)), r.name) // "." has a parent too
		for _, folder := range []string{filepath.Join(dir, r.name), beside} {
			if slices.Contains(tried, folder) {
				continue
			}
			tried = append(tried, folder)
			if _, err := os.Stat(filepath.Join(folder, results.SummaryFile)); err != nil {
				continue
			}
			d, err := readRunData(ctx, folder)
			if err != nil {
				return fmt.Errorf("report of %s: %w", r.name, err)
			}
			if slices.Equal(results.CompareRowOf(r.name, d.Summary), r.rec) {
				// The case's page as the comparison names it: relative to
				// the comparison's folder ("." inside it, ".." beside it).
				if rel, err := filepath.Rel(absOr(dir), filepath.Dir(absOr(folder))); err == nil {
					d.Page = casePage(rel, r.name, folder)
				}
				ds[i] = d
				break
			}
		}
		if ds[i] == nil {
			return &cases.Error{File: path, Line: r.line, Err: cases.Reason(ErrOutputFile, nil,
				fmt.Sprintf("case %s ran (status %s), but no folder holds its outputs: none of %v has a summary.json with the values of this row", r.name, r.status, tried)),
				Hint: "run the comparison again (cureslab compare, or cureslab demo for its comparisons)"}
		}
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("drawing %s: %w", CompareReportFile, err)
	}
	return writePage(ctx, dir, CompareReportFile, func(w io.Writer) error { return renderCompareReport(ctx, w, names, ds, reportClock()) })
}

// compareCSVRow is what RedrawCompareReport needs of a row of compare.csv.
type compareCSVRow struct {
	name, title, status string
	rec                 []string // the whole row
	ran                 bool     // it has values
	line                int
}

// readCompareCSV reads the cases of compare.csv at path (results.CompareHeader).
func readCompareCSV(path string) ([]compareCSVRow, error) {
	f, err := limits.Open(path, maxCompareCSV)
	if err != nil {
		msg := fmt.Sprintf("cannot read it: %v", err)
		if errors.Is(err, os.ErrNotExist) {
			msg = "missing: the directory does not hold the outputs of a comparison"
		}
		return nil, &cases.Error{File: path, Err: cases.Reason(cases.ErrFile, err, msg)}
	}
	defer f.Close()
	cr := csv.NewReader(f)
	recs, err := cr.ReadAll()
	bad := func(line int, msg string) error {
		return &cases.Error{File: path, Line: line, Err: cases.Reason(ErrOutputFile, nil, msg),
			Hint: "it is not a compare.csv that cureslab wrote: run the comparison again with 'cureslab compare'"}
	}
	if err != nil {
		line := 0
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			line = pe.Line
		}
		return nil, bad(line, err.Error())
	}
	if len(recs) < 2 || !slices.Equal(recs[0], results.CompareHeader) {
		return nil, bad(1, fmt.Sprintf("expected the header %v and a row per case", results.CompareHeader))
	}
	var out []compareCSVRow
	for i, rec := range recs[1:] {
		if len(rec) != len(results.CompareHeader) || rec[0] == "" || filepath.Base(rec[0]) != rec[0] || rec[0] == "." || rec[0] == ".." {
			return nil, bad(i+2, fmt.Sprintf("expected %d cells starting with the case's folder name", len(results.CompareHeader)))
		}
		r := compareCSVRow{name: rec[0], title: rec[1], status: rec[2], rec: rec, line: i + 2}
		for _, v := range rec[3:] {
			r.ran = r.ran || v != ""
		}
		out = append(out, r)
	}
	return out, nil
}

// absOr returns the absolute form of path, or path itself when it has none.
func absOr(path string) string {
	if a, err := filepath.Abs(path); err == nil {
		return a
	}
	return path
}
