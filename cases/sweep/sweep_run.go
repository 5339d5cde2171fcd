package sweep

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/textout"
	jrn "cureslab/cases/journal"
	"cureslab/cases/limits"
	"cureslab/cases/outdir"
	"cureslab/cases/results"
	"cureslab/solver"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"time"
)

// Options say how to run a sweep. The zero value runs every run on
// all cores, without per-run outputs and without progress.
type Options struct {
	// Jobs is the number of runs at a time; 0 means runtime.NumCPU().
	Jobs int
	// Shard and Shards select the runs whose index is ≡ Shard mod Shards
	// (0 ≤ Shard < Shards); Shards 0 means 1 (every run).
	Shard, Shards int
	// KeepFields writes each run's output files (as `run` does) into
	// DIR/runs/NNNNN/.
	KeepFields bool
	// Progress, when not nil, gets one line updated in place (\r): runs
	// done of total, failures, rate and time left. Pass a terminal only.
	Progress io.Writer

	// afterCommit, when not nil, is called after each commit with the
	// number of runs done (tests use it to interrupt a sweep part-way).
	afterCommit func(done int)
	// commitEvery replaces sweepCommitEvery when not 0 (tests that
	// interrupt after a number of commits use a nanosecond).
	commitEvery time.Duration
}

// The collector commits finished runs at most sweepCommitEvery apart (the
// first at once), or as soon as sweepCommitMax are waiting.
const (
	sweepCommitEvery = 200 * time.Millisecond
	sweepCommitMax   = 1024
)

// maxJournalSize is the largest journal readJournal reads (4 GB, some ten
// million runs).
const maxJournalSize = 4 << 30

// StatusCounts counts runs by status (README, Case file reference).
type StatusCounts struct {
	OK, CriteriaFailed, Runaway, Failed int
}

// add counts one run of the given status; anything unforeseen is a failure.
func (c *StatusCounts) add(status string) {
	switch status {
	case results.StatusOK:
		c.OK++
	case results.StatusCriteriaFailed:
		c.CriteriaFailed++
	case results.StatusRunaway:
		c.Runaway++
	default:
		c.Failed++
	}
}

// Report is the outcome of Sweep.Run over the runs of its shard.
type Report struct {
	Runs    int // runs of the shard
	Done    int // of them, committed in the directory (including Resumed)
	Resumed int // of Done, committed by an earlier run of the same sweep
	// Statuses of the committed runs (README, Case file reference): they add up to Done.
	StatusCounts
	// Repaired reports that the journal ended in a record cut short (a
	// crash while committing) or damaged: it was cut off and its runs are
	// done again.
	Repaired bool
	// Upgraded is the number of runs taken over from a journal written by
	// an earlier version without the columns results.SweepColumnsAdded
	// (kept with those columns empty; see openJournal).
	Upgraded int
	// Damaged lists the damaged records left out of the journal, and
	// Redone the runs they cost (done again in this sweep).
	Damaged []jrn.Damage
	Redone  []int
	// Interrupted reports that ctx was cancelled before every run was done.
	Interrupted bool
	// Noted lists the committed runs whose row has a note (a probe left
	// out), in run order; Note is the first run's note.
	Noted []int
	Note  string
}

// Run runs the sweep, or the runs of one shard of it, into dir, skipping
// the runs that dir already holds, and writes dir/summary.csv.
//
// Layout of dir: sweep.json (the definition; an existing one must match,
// else an error wrapping ErrMismatch and nothing is touched),
// journal.csv (the committed rows), summary.csv (every committed row in run
// order, rewritten at the end), sweep.log (start, each run with its wall
// time, end, host), and with KeepFields runs/NNNNN/ (the files of `run`).
//
// Method: opt.Jobs workers take the runs in index order; each builds its own
// copy of the case with the run's values (Sweep.Case), validates it, runs
// solver.Run, and writes its outputs when asked; one collector appends the
// run's row to the journal and syncs it before counting the run as done. A
// run whose case is invalid, or which fails numerically or runs away, is a
// row with that status and its error; the sweep goes on. A torn record at
// the end of the journal (a crash while appending) is dropped and its run
// done again, so the journal never holds half a row.
//
// Cancelling ctx stops handing out runs; the runs in progress are dropped
// (not committed), summary.csv is written from what was committed, and the
// report says Interrupted: running the same sweep into dir again finishes
// it, and summary.csv is then byte-identical to that of an uninterrupted
// sweep. Commits are grouped: the runs that finish within 0.2 s of the
// last sync are written in one call and synced once (sweepCommitEvery), so
// a crash costs at most the runs of that window, run again on resume. The
// error is for problems with dir (cannot write, another sweep) and bad
// options; a failed run is not an error.
func (s *Sweep) Run(ctx context.Context, dir string, opt Options) (Report, error) {
	var rep Report
	shards := opt.Shards
	if shards == 0 {
		shards = 1
	}
	if shards < 1 || opt.Shard < 0 || opt.Shard >= shards {
		return rep, &sweepError{msg: fmt.Sprintf("shard %d/%d: want 0 <= I < N", opt.Shard, opt.Shards)}
	}
	jobs := opt.Jobs
	if jobs == 0 {
		jobs = runtime.NumCPU()
	}
	if jobs < 1 {
		return rep, &sweepError{msg: fmt.Sprintf("-j %d: want at least 1 job", opt.Jobs)}
	}
	// One sweep at a time in dir (a lock file), and never into another
	// kind of output: refused before anything is written.
	set, err := outdir.Open(dir, results.SweepKind)
	if err != nil {
		return rep, err
	}
	committed := false
	defer func() {
		if !committed {
			set.Abort()
		}
	}()
	if err := claimSweepDir(dir, s.def); err != nil {
		return rep, err
	}
	header := results.SweepHeader(s.Keys)
	j, err := openJournal(dir, header, s.Runs, s.earlierJournalOK)
	if err != nil {
		return rep, err
	}
	defer j.close()
	rep.Upgraded = j.upgraded
	rep.Repaired = j.repaired
	rep.Damaged, rep.Redone = j.damaged, j.redone

	statusCol := results.SweepStatusCol(header)
	count := func(rec []string) { rep.add(rec[statusCol]) }
	var todo []int
	for r := opt.Shard; r < s.Runs; r += shards {
		rep.Runs++
		if rec, ok := j.rows[r]; ok {
			rep.Done++
			rep.Resumed++
			count(rec)
		} else {
			todo = append(todo, r)
		}
	}
	width := max(5, len(strconv.Itoa(s.Runs-1)))
	log := openSweepLog(dir)
	defer log.close()
	host, _ := os.Hostname()
	log.printf("start case=%s sha256=%x host=%s pid=%d shard=%d/%d jobs=%d runs=%d done=%d todo=%d repaired=%v",
		s.Name, s.hash[:6], host, os.Getpid(), opt.Shard, shards, jobs, rep.Runs, rep.Done, len(todo), j.repaired)

	prog := &sweepProgress{w: opt.Progress, start: time.Now(), total: rep.Runs, done: rep.Done,
		bad: rep.Failed + rep.Runaway, crit: rep.CriteriaFailed}
	ictx, cancel := context.WithCancel(ctx)
	defer cancel()
	every := opt.commitEvery
	if every == 0 {
		every = sweepCommitEvery
	}
	c := &collector{j: j, rep: &rep, prog: prog, log: log, cancel: cancel, statusCol: statusCol, width: width, afterCommit: opt.afterCommit}
	c.collect(s.startWorkers(ictx, todo, jobs, dir, opt.KeepFields, width), every)
	firstErr := c.err
	prog.finish()
	rep.Interrupted = ctx.Err() != nil && rep.Done < rep.Runs
	if firstErr != nil {
		log.printf("stop error=%q done=%d/%d", firstErr.Error(), rep.Done, rep.Runs)
		return rep, firstErr
	}
	for r := opt.Shard; r < s.Runs; r += shards {
		if rec, ok := j.rows[r]; ok && rec[statusCol+2] != "" {
			rep.Noted = append(rep.Noted, r)
			if rep.Note == "" {
				rep.Note = rec[statusCol+2]
			}
		}
	}
	if err := writeSweepSummary(dir, header, j.rows); err != nil {
		return rep, fmt.Errorf("writing %s: %w", filepath.Join(dir, results.SweepSummaryFile), err)
	}
	set.Keep(results.SweepSummaryFile)
	committed = true
	if err := set.Commit(); err != nil {
		return rep, err
	}
	log.printf("stop done=%d/%d ok=%d criteria-failed=%d runaway=%d failed=%d interrupted=%v",
		rep.Done, rep.Runs, rep.OK, rep.CriteriaFailed, rep.Runaway, rep.Failed, rep.Interrupted)
	return rep, nil
}

// startWorkers runs the runs todo on jobs workers, each with its own solver
// workspace, and sends every finished run to the returned channel, which is
// closed when the workers are done. A run cut short by ctx is not sent: it
// runs again on resume.
func (s *Sweep) startWorkers(ctx context.Context, todo []int, jobs int, dir string, keep bool, width int) <-chan sweepResult {
	work := make(chan int)
	done := make(chan sweepResult, jobs)
	go func() {
		defer close(work)
		for _, r := range todo {
			select {
			case work <- r:
			case <-ctx.Done():
				return
			}
		}
	}()
	var wg sync.WaitGroup
	for range min(jobs, len(todo)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var ws solver.Workspace // the worker's solver buffers, reused run after run
			for r := range work {
				if ctx.Err() != nil {
					continue
				}
				res := s.runOne(ctx, &ws, r, dir, keep, width)
				if ctx.Err() != nil && res.err == nil {
					continue // cut short: not committed, run again on resume
				}
				done <- res
			}
		}()
	}
	go func() {
		wg.Wait()
		close(done)
	}()
	return done
}

// collector commits finished runs to the journal in groups, counts them in
// the report and the progress line, and logs them. The first error (a run
// that could not write its outputs, or the journal) stops the sweep.
type collector struct {
	j           *journal
	rep         *Report
	prog        *sweepProgress
	log         *sweepLog
	cancel      context.CancelFunc
	statusCol   int // column of the status in a journal record
	width       int // digits of a run number in the log
	afterCommit func(done int)
	batch       []sweepResult
	err         error
}

// collect receives the finished runs until done is closed. Group commit: a
// finished run waits at most every for the next sync, so that a sweep of
// millisecond runs syncs a few times a second, not once per run (a sync
// stalls the workers' processor time too).
func (c *collector) collect(done <-chan sweepResult, every time.Duration) {
	var last time.Time
	var due <-chan time.Time
	for done != nil {
		select {
		case r, ok := <-done:
			if !ok {
				done = nil
				break
			}
			c.batch = append(c.batch, r)
			if wait := every - time.Since(last); wait <= 0 || len(c.batch) >= sweepCommitMax {
				c.commit()
				last, due = time.Now(), nil
			} else if due == nil {
				due = time.After(wait)
			}
		case <-due:
			c.commit()
			last, due = time.Now(), nil
		}
	}
	c.commit()
}

// commit writes the batch in one call and syncs once.
func (c *collector) commit() {
	if len(c.batch) == 0 || c.err != nil {
		c.batch = c.batch[:0]
		return
	}
	recs := make([][]string, 0, len(c.batch))
	for _, r := range c.batch {
		if r.err != nil {
			c.err = r.err
			break
		}
		recs = append(recs, r.rec)
	}
	if c.err == nil {
		c.err = c.j.append(recs)
	}
	if c.err != nil {
		c.cancel()
		c.batch = c.batch[:0]
		return
	}
	for _, r := range c.batch {
		c.rep.Done++
		c.rep.add(r.rec[c.statusCol])
		c.prog.record(r.rec[c.statusCol])
		if note := r.rec[c.statusCol+2]; note != "" {
			c.log.printf("run %0*d %s %.3fs note=%q", c.width, r.run, r.rec[c.statusCol], r.wall.Seconds(), note)
		} else {
			c.log.printf("run %0*d %s %.3fs", c.width, r.run, r.rec[c.statusCol], r.wall.Seconds())
		}
	}
	c.batch = c.batch[:0]
	if c.afterCommit != nil {
		c.afterCommit(c.rep.Done)
	}
}

// sweepResult is one finished run on its way to the collector.
type sweepResult struct {
	run  int
	rec  []string // the row of summary.csv
	wall time.Duration
	err  error // writing its outputs failed: stops the sweep
}

// runOne runs run r and returns its row.
func (s *Sweep) runOne(ctx context.Context, ws *solver.Workspace, r int, dir string, keep bool, width int) sweepResult {
	start := time.Now()
	shown, vals := s.point(r)
	rec := make([]string, 0, 1+len(shown)+len(results.SweepColumns)+len(results.SweepCriteria)+3)
	rec = append(rec, strconv.Itoa(r))
	rec = append(rec, shown...)
	failed := func(msg string) sweepResult {
		for range len(results.SweepColumns) + len(results.SweepCriteria) {
			rec = append(rec, "")
		}
		rec = append(rec, results.StatusFailed, cases.OneLine(msg), "")
		return sweepResult{run: r, rec: rec, wall: time.Since(start)}
	}
	c, err := s.caseOf(vals)
	if err != nil {
		return failed(cases.FlattenErrors(err))
	}
	var res *solver.Result
	var sum results.Summary
	if keep {
		// Its files are written as the run goes (results.StreamRun).
		out := filepath.Join(dir, results.SweepRunsDir, fmt.Sprintf("%0*d", width, r))
		set, err := outdir.Open(out, results.RunKind)
		if err == nil {
			run := func(sink solver.Sink) (*solver.Result, error) { return ws.RunStream(ctx, c.Problem, sink) }
			if res, sum, err = results.StreamRun(set, c, run, nil); res == nil {
				set.Abort()
				return failed(err.Error())
			}
			if err == nil {
				err = results.StageSummary(set, sum)
			}
			if err != nil {
				set.Abort()
			} else {
				err = set.Commit()
			}
		}
		if err != nil {
			return sweepResult{run: r, err: fmt.Errorf("run %d: writing its outputs to %s: %w", r, out, err)}
		}
	} else {
		// Without kept fields the row needs only the summary.
		c.Problem.NoFields = true
		var err error
		if res, err = ws.Run(ctx, c.Problem); err != nil {
			return failed(err.Error())
		}
		sum = results.Summarize(c, res)
	}
	for _, col := range results.SweepColumns {
		rec = append(rec, col.Get(&sum))
	}
	for _, name := range results.SweepCriteria {
		pass := ""
		for _, v := range sum.Criteria {
			if v.Name == name {
				pass = strconv.FormatBool(v.Pass)
			}
		}
		rec = append(rec, pass)
	}
	msg := ""
	if res.Status != solver.OK {
		msg = "the run stopped early"
		if res.Err != nil {
			msg = res.Err.Error()
		}
	}
	rec = append(rec, sum.Status, cases.OneLine(msg), cases.OneLine(strings.Join(c.Notes, "; ")))
	return sweepResult{run: r, rec: rec, wall: time.Since(start)}
}

// claimSweepDir creates dir if needed and checks or writes its sweep.json.
func claimSweepDir(dir string, def []byte) error {
	if fi, err := os.Stat(dir); err == nil && !fi.IsDir() {
		return &sweepError{msg: fmt.Sprintf("%s exists and is not a directory", dir)}
	}
	old, err := os.ReadFile(filepath.Join(dir, results.SweepDefinitionFile))
	switch {
	case err == nil:
		if !bytes.Equal(old, def) {
			return &sweepError{kind: ErrMismatch, msg: fmt.Sprintf(
				"%s holds another sweep: %s; give another output directory (-o), or remove %s to start over",
				dir, results.DefDiff(old, def), dir)}
		}
		return nil
	case !errors.Is(err, fs.ErrNotExist):
		return err
	}
	if _, err := os.Stat(filepath.Join(dir, results.SweepJournalFile)); err == nil {
		return &sweepError{kind: ErrMismatch, msg: fmt.Sprintf(
			"%s has a %s but no %s: it is not a sweep directory this version can resume", dir, results.SweepJournalFile, results.SweepDefinitionFile)}
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	if err := textout.WriteFileAtomic(dir, results.SweepDefinitionFile, func(w io.Writer) error { _, err := w.Write(def); return err }); err != nil {
		return err
	}
	syncDir(dir)
	return nil
}

// earlierJournalOK reports whether the columns results.SweepColumnsAdded
// are empty in every run of s by construction: in no run's case does a
// material have a viscosity law or the criteria set min_flow_window (a run
// whose case is invalid has them empty too). Only then may a journal of an
// earlier version, without those columns, be taken over. Cost: one case
// build per run; asked only when the journal's header is not the present
// one.
func (s *Sweep) earlierJournalOK() bool {
	for r := range s.Runs {
		c, err := s.Case(r)
		if err == nil && (cases.Viscous(c.Problem) || c.Criteria.MinFlowWindow != 0) {
			return false
		}
	}
	return true
}

// syncDir flushes the directory entry of a new or renamed file to disk,
// where the system supports it.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

// journal is the append-only file of committed rows: a header record, then
// one CSV record per finished run — its row of summary.csv plus the CRC-32
// (IEEE) of the row's fields joined by U+001F, as 8 hex digits.
type journal struct {
	f        *os.File
	rows     map[int][]string
	repaired bool // damaged records were left out
	damaged  []jrn.Damage
	redone   []int // runs whose only records were damaged
	upgraded int   // runs taken over from a journal of an earlier version
	buf      bytes.Buffer
}

// readJournal reads the journal at path record by record
// (journal.Read): a damaged record costs that record only, and the later
// records that check are kept; the damage is listed in the contents. A
// first line that is not the header of this sweep is an error wrapping
// ErrMismatch that says how to recover. The file is read in chunks
// with ctx checked between them (limits.ReadFile): once ctx is done the
// error is ctx.Err().
func readJournal(ctx context.Context, path string, header []string, runs int) (*jrn.Contents, error) {
	data, err := limits.ReadFile(ctx, path, maxJournalSize)
	switch {
	case err == nil:
	case ctx.Err() != nil && errors.Is(err, ctx.Err()):
		return nil, ctx.Err()
	case errors.Is(err, limits.ErrNotRegular) || errors.Is(err, limits.ErrTooLarge):
		return nil, fmt.Errorf("%s: %w", path, err)
	default:
		return nil, err // a *PathError names the file
	}
	c, err := jrn.Read(path, data, header, runs)
	if err != nil {
		return nil, &sweepError{kind: ErrMismatch, msg: err.Error()}
	}
	return c, nil
}

func recordCRC(fields []string) string { return jrn.Sum(fields) }

// openJournal opens dir's journal for appending, creating it with its
// header. A journal with damaged records (or a last record cut short) is
// first rewritten, atomically, with its sound records only, so that the
// runs of the damaged ones are done again and appended.
//
// earlier (asked only then) allows a journal written by an earlier version, without the
// columns results.SweepColumnsAdded, to be taken over: its runs are kept
// with those columns empty and the journal is rewritten in the present
// layout (journal.upgraded). Only for a case where those columns are empty
// by construction (Sweep.earlierJournalOK).
func openJournal(dir string, header []string, runs int, earlier func() bool) (*journal, error) {
	path := filepath.Join(dir, results.SweepJournalFile)
	if _, err := os.Stat(path); errors.Is(err, fs.ErrNotExist) {
		err := textout.WriteFileAtomic(dir, results.SweepJournalFile, func(w io.Writer) error {
			cw := csv.NewWriter(w)
			cw.Write(append(slices.Clip(header), "crc32"))
			cw.Flush()
			return cw.Error()
		})
		if err != nil {
			return nil, err
		}
		syncDir(dir)
	}
	// Read whole even after Ctrl-C: the sweep stops at its next run.
	c, err := readJournal(context.Background(), path, header, runs)
	upgraded := false
	if err != nil && earlier != nil && earlier() {
		if data, rerr := os.ReadFile(path); rerr == nil {
			if ce, ok := jrn.ReadEarlier(path, data, header, results.SweepColumnsAdded, runs); ok {
				c, err, upgraded = ce, nil, true
			}
		}
	}
	if err != nil {
		return nil, err
	}
	if len(c.Damaged) > 0 || upgraded {
		runsKept := make([]int, 0, len(c.Rows))
		for r := range c.Rows {
			runsKept = append(runsKept, r)
		}
		slices.Sort(runsKept)
		err := textout.WriteFileAtomic(dir, results.SweepJournalFile, func(w io.Writer) error {
			cw := csv.NewWriter(w)
			cw.Write(append(slices.Clip(header), "crc32"))
			for _, r := range runsKept {
				cw.Write(jrn.Record(c.Rows[r]))
			}
			cw.Flush()
			return cw.Error()
		})
		if err != nil {
			return nil, err
		}
		syncDir(dir)
	}
	f, err := os.OpenFile(path, os.O_RDWR|os.O_APPEND, 0)
	if err != nil {
		return nil, err
	}
	// A last record without its newline (cut just before it) is whole:
	// end its line before appending.
	if fi, err := f.Stat(); err == nil && fi.Size() > 0 {
		last := make([]byte, 1)
		if _, err := f.ReadAt(last, fi.Size()-1); err == nil && last[0] != '\n' {
			if _, err := f.Write([]byte("\n")); err != nil {
				f.Close()
				return nil, err
			}
		}
	}
	j := &journal{f: f, rows: c.Rows, repaired: len(c.Damaged) > 0, damaged: c.Damaged, redone: c.Runs()}
	if upgraded {
		j.upgraded = len(c.Rows)
	}
	return j, nil
}

// append commits rows: written in one call and synced; they count as
// committed only when the sync has returned.
func (j *journal) append(recs [][]string) error {
	j.buf.Reset()
	cw := csv.NewWriter(&j.buf)
	for _, rec := range recs {
		cw.Write(append(slices.Clip(rec), recordCRC(rec)))
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	if _, err := j.f.Write(j.buf.Bytes()); err != nil {
		return fmt.Errorf("committing runs to %s: %w", j.f.Name(), err)
	}
	if err := j.f.Sync(); err != nil {
		return fmt.Errorf("committing runs to %s: %w", j.f.Name(), err)
	}
	for _, rec := range recs {
		n, _ := strconv.Atoi(rec[0])
		j.rows[n] = rec
	}
	return nil
}

func (j *journal) close() { j.f.Close() }

// writeSweepSummary writes dir/summary.csv: the header and the rows in run
// order.
func writeSweepSummary(dir string, header []string, rows map[int][]string) error {
	runs := make([]int, 0, len(rows))
	for r := range rows {
		runs = append(runs, r)
	}
	slices.Sort(runs)
	return textout.WriteFileAtomic(dir, results.SweepSummaryFile, func(w io.Writer) error {
		cw := csv.NewWriter(w)
		cw.Write(header)
		for _, r := range runs {
			cw.Write(rows[r])
		}
		cw.Flush()
		return cw.Error()
	})
}

// sweepLog appends lines to dir/sweep.log; a log that cannot be opened is
// skipped (it is informative only).
type sweepLog struct{ f *os.File }

func openSweepLog(dir string) *sweepLog {
	f, err := os.OpenFile(filepath.Join(dir, results.SweepLogFile), os.O_WRONLY|os.O_APPEND|os.O_CREATE, 0o644)
	if err != nil {
		return &sweepLog{}
	}
	return &sweepLog{f: f}
}

func (l *sweepLog) printf(format string, a ...any) {
	if l.f == nil {
		return
	}
	fmt.Fprintf(l.f, "%s %s\n", time.Now().UTC().Format(time.RFC3339), fmt.Sprintf(format, a...))
}

func (l *sweepLog) close() {
	if l.f != nil {
		l.f.Close()
	}
}

// sweepProgress draws the progress line.
type sweepProgress struct {
	w               io.Writer
	start, last     time.Time
	total, done     int
	bad, crit       int
	session, length int
}

func (p *sweepProgress) record(status string) {
	p.done++
	p.session++
	switch status {
	case results.StatusOK:
	case results.StatusCriteriaFailed:
		p.crit++
	default:
		p.bad++
	}
	if now := time.Now(); now.Sub(p.last) >= 100*time.Millisecond || p.done == p.total {
		p.last = now
		p.draw()
	}
}

func (p *sweepProgress) draw() {
	if p.w == nil {
		return
	}
	line := fmt.Sprintf("%d/%d runs, %d failed, %d criteria-failed", p.done, p.total, p.bad, p.crit)
	if el := time.Since(p.start).Seconds(); p.session > 0 && el > 0 {
		rate := float64(p.session) / el
		left := time.Duration(float64(p.total-p.done) / rate * float64(time.Second)).Round(time.Second)
		line += fmt.Sprintf(", %.3g runs/s, %v left", rate, left)
	}
	pad := max(0, p.length-len(line))
	p.length = len(line)
	fmt.Fprintf(p.w, "\r%s%s", line, strings.Repeat(" ", pad))
}

func (p *sweepProgress) finish() {
	if p.w == nil {
		return
	}
	p.draw()
	fmt.Fprintln(p.w)
}
