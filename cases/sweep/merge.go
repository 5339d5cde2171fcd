package sweep

import (
	"bytes"
	"context"
	"crypto/sha256"
	"cureslab/cases"
	"cureslab/cases/internal/textout"
	"cureslab/cases/limits"
	"cureslab/cases/results"
	"encoding/csv"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
)

// sweepPageFile is the page of a sweep directory (package report draws it).
const sweepPageFile = "report.html"

// MergeReport is the outcome of Merge.
type MergeReport struct {
	Runs    int   // runs of the sweep
	Rows    int   // runs found in the directories
	Missing []int // runs found in none, in order
	// Statuses of the rows found: they add up to Rows.
	StatusCounts
	// Conflicts counts runs committed in several directories with rows
	// that differ (the first directory given wins). Runs of one sweep are
	// deterministic on one machine; a conflict means the shards ran on
	// machines or versions that compute differently.
	Conflicts int
}

// Merge joins the directories of the shards of one sweep into out:
// out gets the sweep.json they share, a journal.csv holding every row, and
// the summary.csv that the whole sweep run in one directory writes, byte
// for byte (README, Case file reference); a line goes to out/sweep.log.
//
// Every directory must hold the same sweep.json (else an error wrapping
// ErrMismatch, naming the directory and what differs), and so must out
// if it already is a sweep directory. Rows are read from each journal as
// Sweep.Run does (a torn tail is ignored; the inputs are not changed). A run
// found in no directory is missing: then nothing is written and the error
// wraps ErrIncomplete, unless allowMissing, which writes the rows
// found (out can then be finished by running the sweep into it). out may
// be one of dirs. A page (report.html) of an earlier merge into out is
// removed: it shows another summary.
//
// Interruption: ctx is checked before each directory, while each journal
// is read (between chunks of 256 kB), and once more before the first file
// is written: once it is done Merge returns ctx.Err() and has written
// nothing. The writing itself, a few milliseconds per megabyte, is not
// cut, so out never holds a merge half-written.
//
// Cost: memory and time linear in the rows.
func Merge(ctx context.Context, out string, dirs []string, allowMissing bool) (MergeReport, error) {
	var rep MergeReport
	if len(dirs) == 0 {
		return rep, &sweepError{msg: "no directories to merge"}
	}
	sh, err := readShards(ctx, dirs)
	if err != nil {
		return rep, err
	}
	rep.Runs, rep.Rows, rep.Conflicts = sh.runs, len(sh.rows), sh.conflicts
	if lost := sh.lost(); len(lost) > 0 && !allowMissing {
		return rep, &sweepError{kind: ErrIncomplete, msg: fmt.Sprintf(
			"the journal of a shard is damaged: %s; run that shard again with the same sweep command into the same directory (it does the damaged runs again), then merge; nothing was written",
			strings.Join(lost, "; "))}
	}
	statusCol := results.SweepStatusCol(sh.header)
	for r := range rep.Runs {
		rec, ok := sh.rows[r]
		if !ok {
			rep.Missing = append(rep.Missing, r)
			continue
		}
		rep.add(rec[statusCol])
	}
	if len(rep.Missing) > 0 && !allowMissing {
		return rep, &sweepError{kind: ErrIncomplete, msg: fmt.Sprintf(
			"%d of %d runs are missing (%s); nothing was written", len(rep.Missing), rep.Runs, FormatRuns(rep.Missing, 10))}
	}
	if err := sh.write(ctx, out); err != nil {
		return rep, err
	}
	log := openSweepLog(out)
	defer log.close()
	host, _ := os.Hostname()
	log.printf("merge host=%s dirs=%q rows=%d/%d missing=%d conflicts=%d", host, dirs, rep.Rows, rep.Runs, len(rep.Missing), rep.Conflicts)
	return rep, nil
}

// shards is what the directories of a merge hold together: the sweep
// definition they share, the rows of their journals (the first directory
// given wins a run), and the damage found.
type shards struct {
	def        []byte // sweep.json, byte for byte
	runs       int
	header     []string
	rows       map[int][]string
	conflicts  int      // runs committed in several directories with rows that differ
	damaged    []string // each damaged record, with its journal
	damagedIn  []string // the shard of each
	damagedRun []int    // the run of each (−1 when unreadable)
}

// readShards reads sweep.json and the journal of each directory in dirs
// (Merge): every sweep.json must equal the first; a journal's damaged
// records are listed, its good ones kept. ctx is checked before each
// directory and while each journal is read.
func readShards(ctx context.Context, dirs []string) (*shards, error) {
	sh := &shards{rows: make(map[int][]string)}
	for i, dir := range dirs {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		b, err := limits.ReadFile(ctx, filepath.Join(dir, results.SweepDefinitionFile), limits.MaxFileSize)
		switch {
		case errors.Is(err, fs.ErrNotExist):
			return nil, &sweepError{msg: fmt.Sprintf("%s is not a sweep directory: it has no %s", dir, results.SweepDefinitionFile)}
		case err != nil && ctx.Err() != nil:
			return nil, ctx.Err()
		case err != nil:
			return nil, fmt.Errorf("%s: %w", filepath.Join(dir, results.SweepDefinitionFile), err)
		}
		if i == 0 {
			if err := sh.define(dir, b); err != nil {
				return nil, err
			}
		} else if !bytes.Equal(b, sh.def) {
			return nil, &sweepError{kind: ErrMismatch, msg: fmt.Sprintf(
				"%s and %s hold different sweeps: %s", dirs[0], dir, results.DefDiff(sh.def, b))}
		}
		jc, err := readJournal(ctx, filepath.Join(dir, results.SweepJournalFile), sh.header, sh.runs)
		if errors.Is(err, fs.ErrNotExist) {
			continue // the shard has not committed anything yet
		}
		if err != nil {
			return nil, err
		}
		for _, dm := range jc.Damaged {
			sh.damaged = append(sh.damaged, fmt.Sprintf("%s: %s", filepath.Join(dir, results.SweepJournalFile), dm))
			sh.damagedIn = append(sh.damagedIn, dir)
			sh.damagedRun = append(sh.damagedRun, dm.Run)
		}
		for r, rec := range jc.Rows {
			if prev, ok := sh.rows[r]; !ok {
				sh.rows[r] = rec
			} else if !slices.Equal(prev, rec) {
				sh.conflicts++
			}
		}
	}
	return sh, nil
}

// define takes the sweep definition b, read from dir, as the one every
// directory must share: its runs and the journal's header.
func (sh *shards) define(dir string, b []byte) error {
	var d results.SweepDef
	if err := json.Unmarshal(b, &d); err != nil || d.Format != results.SweepFormat || d.Runs < 1 {
		return &sweepError{kind: ErrMismatch, msg: fmt.Sprintf("%s: %s is not a sweep definition of this version", dir, results.SweepDefinitionFile)}
	}
	keys := make([]string, len(d.Vary))
	for k, v := range d.Vary {
		keys[k] = v.Key
	}
	sh.def, sh.runs, sh.header = b, d.Runs, results.SweepHeader(keys)
	return nil
}

// lost lists the damaged records whose run no directory holds a good row
// of, each with its shard.
func (sh *shards) lost() []string {
	var lost []string
	for i, r := range sh.damagedRun {
		if _, ok := sh.rows[r]; !ok || r < 0 {
			lost = append(lost, sh.damaged[i]+" (in the shard "+sh.damagedIn[i]+")")
		}
	}
	return lost
}

// write puts the merge into out: sweep.json, journal.csv with every row in
// run order, and summary.csv, each written whole (temporary file and
// rename); a page of an earlier merge into out is removed. out must not
// hold another sweep. ctx is checked once before the first file: the
// writing itself is not cut.
func (sh *shards) write(ctx context.Context, out string) error {
	if fi, err := os.Stat(out); err == nil && !fi.IsDir() {
		return &sweepError{msg: fmt.Sprintf("%s exists and is not a directory", out)}
	}
	if old, err := limits.ReadFile(ctx, filepath.Join(out, results.SweepDefinitionFile), limits.MaxFileSize); err == nil && !bytes.Equal(old, sh.def) {
		return &sweepError{kind: ErrMismatch, msg: fmt.Sprintf(
			"%s holds another sweep: %s; give another output directory (-o)", out, results.DefDiff(old, sh.def))}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if err := os.MkdirAll(out, 0o755); err != nil {
		return err
	}
	runs := make([]int, 0, len(sh.rows))
	for r := range sh.rows {
		runs = append(runs, r)
	}
	slices.Sort(runs)
	if err := textout.WriteFileAtomic(out, results.SweepDefinitionFile, func(w io.Writer) error { _, err := w.Write(sh.def); return err }); err != nil {
		return err
	}
	err := textout.WriteFileAtomic(out, results.SweepJournalFile, func(w io.Writer) error {
		cw := csv.NewWriter(w)
		cw.Write(append(slices.Clip(sh.header), "crc32"))
		for _, r := range runs {
			cw.Write(append(slices.Clip(sh.rows[r]), recordCRC(sh.rows[r])))
		}
		cw.Flush()
		return cw.Error()
	})
	if err != nil {
		return err
	}
	if err := writeSweepSummary(out, sh.header, sh.rows); err != nil {
		return err
	}
	// The page of an earlier merge into out shows another summary: it goes
	// (the command draws the new one, unless --no-report or Ctrl-C).
	if err := os.Remove(filepath.Join(out, sweepPageFile)); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return err
	}
	syncDir(out)
	return nil
}

// FormatRuns writes run indices compactly for a message, with ranges:
// "3, 6-8, 12", at most limit items followed by "…" (limit ≤ 0: all).
func FormatRuns(runs []int, limit int) string {
	var parts []string
	for i := 0; i < len(runs); {
		j := i
		for j+1 < len(runs) && runs[j+1] == runs[j]+1 {
			j++
		}
		if limit > 0 && len(parts) == limit {
			parts = append(parts, "…")
			break
		}
		if j > i {
			parts = append(parts, strconv.Itoa(runs[i])+"-"+strconv.Itoa(runs[j]))
		} else {
			parts = append(parts, strconv.Itoa(runs[i]))
		}
		i = j + 1
	}
	return strings.Join(parts, ", ")
}

// CaseOf returns the case file at casePath for the report of the sweep
// directory dir (WriteSweepReport: its criteria and cautions), after checking
// that it is the sweep's case: its SHA-256 must be the case_sha256 of
// dir/sweep.json (else an error wrapping ErrMismatch). Errors of the
// case file itself are returned as Parse gives them. Cost: one read and
// one validation of the case.
func CaseOf(dir, casePath string) (*cases.Case, error) {
	b, err := limits.ReadFile(context.Background(), filepath.Join(dir, results.SweepDefinitionFile), limits.MaxFileSize)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, &sweepError{msg: fmt.Sprintf("%s is not a sweep directory: it has no %s", dir, results.SweepDefinitionFile)}
	}
	if err != nil {
		return nil, err
	}
	var d results.SweepDef
	if err := json.Unmarshal(b, &d); err != nil || d.Format != results.SweepFormat {
		return nil, &sweepError{kind: ErrMismatch, msg: fmt.Sprintf("%s: %s is not a sweep definition of this version", dir, results.SweepDefinitionFile)}
	}
	data, err := limits.ReadFile(context.Background(), casePath, limits.MaxFileSize)
	if err != nil {
		return nil, err
	}
	if sum := sha256.Sum256(data); hex.EncodeToString(sum[:]) != d.CaseSHA256 {
		return nil, &sweepError{kind: ErrMismatch, msg: fmt.Sprintf(
			"%s is not the case of the sweep in %s: its SHA-256 differs from the case_sha256 in %s (edited since?)",
			casePath, dir, results.SweepDefinitionFile)}
	}
	c, err := cases.Parse(casePath, data, filepath.Dir(casePath))
	if err != nil {
		return nil, err
	}
	return c, nil
}
