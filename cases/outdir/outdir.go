// Package outdir keeps an output directory to one complete set of files
// from one command: a run's, a sweep's, a comparison's. A directory never
// mixes two runs.
//
// # How
//
// A writer opens the directory for a kind of output (Open), writes every
// file under a staging name beside its final name (Stage, StageDir), and
// puts them all in place at the end (Commit). Commit first moves the files
// of the previous set aside, then renames the staged files into place, the
// manifest last, then deletes what was set aside: the files the tool wrote
// there before and does not write now go with them (a report after
// --no-report, an uncertainty table, a runs/ folder). A writer that fails
// or is stopped before Commit calls Abort, which removes what it staged;
// the previous set stays as it was.
//
// The manifest (manifestFile, a small JSON file) names the kind and the
// files of the set. Its presence in place marks a commit as done. Open
// finishes a commit that was cut short (the process killed between two
// renames): if the new manifest is in place the new set is kept and the
// old files set aside are deleted; otherwise the files set aside are put
// back and the new ones removed, leaving the previous set. Either way the
// directory holds one complete set or, when there was none, nothing.
//
// A directory holding another kind of output (a sweep's summary.csv and
// sweep.json where a run's files would go, or the reverse) is refused with
// a *KindError that names what is there. Directories written before the
// manifest existed are recognised by their files (see Register).
//
// One writer at a time: Open takes a lock file (lockFile) holding the
// process id and refuses (*BusyError) while another live process holds it;
// a lock left by a process that no longer runs is taken over.
//
// # Invariants
//
//   - Only names the manifest lists, names a kind declares, names its writer
//     says the previous set holds (Previous), and the staging, set-aside
//     and lock names of this package are ever removed; other files in the
//     directory are left alone.
//   - Staging and set-aside files live in the directory itself, so every
//     rename stays on one file system.
package outdir

import (
	"bufio"
	"cureslab/cases/internal/textout"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
)

// File names this package uses inside an output directory.
const (
	manifestFile = ".cureslab-set.json"
	lockFile     = ".cureslab.lock"
	stagingExt   = ".staging"
	asideExt     = ".previous"
)

// Kind describes one kind of output set: its name as shown in messages,
// the files that identify a directory of that kind written without a
// manifest, and every name the tool may write for it (files or folders),
// which Commit may remove when a new set does not write them again.
type Kind struct {
	Name  string   // "run", "sweep", "comparison"…
	Marks []string // files whose presence identifies the kind (all must be there)
	Names []string // every name the tool writes for this kind
}

// registered holds the kinds of output set the tool writes; Open recognises an
// older directory without a manifest by the first kind whose Marks are all
// present.
var registered []Kind

// Register adds k to registered (at package initialisation of the writers) and
// returns it.
func Register(k Kind) Kind {
	registered = append(registered, k)
	return k
}

// KindError refuses a directory that holds another kind of output.
type KindError struct {
	Dir   string
	Want  string   // the kind the command writes
	Found string   // the kind found there
	Files []string // what identifies it
}

func (e *KindError) Error() string {
	return fmt.Sprintf("the output directory %s holds a %s's output (%s), not a %s's: give another directory (-o), or remove those files first",
		e.Dir, e.Found, strings.Join(e.Files, ", "), e.Want)
}

// BusyError refuses a directory that another process is writing.
type BusyError struct {
	Dir string
	PID int
}

func (e *BusyError) Error() string {
	return fmt.Sprintf("the output directory %s is being written by another cureslab (process %d, lock file %s): wait for it to finish, or give another directory",
		e.Dir, e.PID, lockFile)
}

// manifest is the content of manifestFile.
type manifest struct {
	Kind  string   `json:"kind"`
	Files []string `json:"files"`
}

// Set is an output directory open for writing one set of files.
type Set struct {
	Dir    string
	kind   Kind
	old    []string // the files of the previous set (manifest or kind names present)
	staged []string // final names staged so far, in order
	kept   []string // names kept in place as part of the new set
	locked bool
	done   bool
}

// Open prepares dir (created if missing, with its parents) to receive a set
// of kind k: it takes the lock, finishes a commit that was cut short, and
// refuses a directory holding another kind of output.
//
// Errors: *BusyError, *KindError, and file-system errors. On error nothing
// in dir has changed except the recovery of a cut-short commit.
func Open(dir string, k Kind) (*Set, error) {
	if dir == "" {
		return nil, errors.New("the output directory name is empty")
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	s := &Set{Dir: dir, kind: k}
	if err := s.lock(); err != nil {
		return nil, err
	}
	if err := s.prepare(); err != nil {
		s.unlock()
		return nil, err
	}
	return s, nil
}

func (s *Set) prepare() error {
	if err := recoverCommit(s.Dir); err != nil {
		return err
	}
	old, err := previousSet(s.Dir, s.kind)
	s.old = old
	return err
}

// Check returns the *KindError that Open would return for dir and kind k,
// without creating, locking or changing anything: for a command that
// computes long before it writes, so that a directory of another kind is
// refused before the work rather than after it. A directory that does not
// exist passes. Other errors are those of reading the manifest.
func Check(dir string, k Kind) error {
	if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
		return nil
	}
	_, err := previousSet(dir, k)
	return err
}

// previousSet returns the files of the set in dir that a new set of kind k
// replaces, or a *KindError when dir holds another kind of output.
func previousSet(dir string, k Kind) ([]string, error) {
	m, err := readManifest(dir)
	if err != nil {
		return nil, err
	}
	if m != nil {
		if m.Kind != k.Name {
			names := m.Files
			for _, o := range registered {
				if o.Name == m.Kind {
					names = union(o.Marks, m.Files)
				}
			}
			return nil, &KindError{Dir: dir, Want: k.Name, Found: m.Kind, Files: present(dir, names)}
		}
		return m.Files, nil
	}
	// No manifest: an older directory, recognised by its files.
	for _, o := range registered {
		if o.Name == k.Name || len(o.Marks) == 0 {
			continue
		}
		if p := present(dir, o.Marks); len(p) == len(o.Marks) && !slices.Equal(o.Marks, commonMarks(o, k)) {
			return nil, &KindError{Dir: dir, Want: k.Name, Found: o.Name, Files: p}
		}
	}
	return present(dir, k.Names), nil
}

// commonMarks returns the marks of a that b declares as its own names too
// (a file both kinds write does not tell them apart).
func commonMarks(a, b Kind) []string {
	var out []string
	for _, m := range a.Marks {
		if slices.Contains(b.Names, m) {
			out = append(out, m)
		}
	}
	return out
}

// present returns the names that exist in dir.
func present(dir string, names []string) []string {
	var out []string
	for _, n := range names {
		if _, err := os.Lstat(filepath.Join(dir, n)); err == nil {
			out = append(out, n)
		}
	}
	return out
}

func readManifest(dir string) (*manifest, error) {
	b, err := os.ReadFile(filepath.Join(dir, manifestFile))
	if errors.Is(err, os.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	var m manifest
	if err := json.Unmarshal(b, &m); err != nil || m.Kind == "" {
		return nil, fmt.Errorf("%s: the record of the files in this directory is damaged: remove it and the files it named, or give another directory", filepath.Join(dir, manifestFile))
	}
	for _, f := range m.Files {
		if !localName(f) {
			return nil, fmt.Errorf("%s names %q, which is not a file of this directory: remove the record, or give another directory", filepath.Join(dir, manifestFile), f)
		}
	}
	return &m, nil
}

// localName reports whether name is one plain name inside the directory.
func localName(name string) bool {
	return name != "" && name != "." && name != ".." && !strings.ContainsAny(name, `/\`) && filepath.Base(name) == name
}

// Stage writes the file name of the set under its staging name through
// write (buffered, synced and closed before Stage returns); the file goes
// in place at Commit. On error the staging file is removed.
func (s *Set) Stage(name string, write func(io.Writer) error) (err error) {
	if s.done {
		panic("outdir: Stage after Commit or Abort")
	}
	if !localName(name) || !slices.Contains(s.kind.Names, name) {
		panic("outdir: " + name + " is not a name the kind " + s.kind.Name + " declares")
	}
	path := filepath.Join(s.Dir, name+stagingExt)
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_TRUNC, 0o644)
	if err != nil {
		return err
	}
	if err := textout.WriteSynced(f, write); err != nil {
		os.Remove(path)
		return err
	}
	s.add(name)
	return nil
}

// File is a file of a set being written piece by piece (Create): a
// buffered writer on its staging file. Close puts it among the staged
// files, flushed and synced; Commit then puts it in place with the others.
type File struct {
	set  *Set
	name string
	f    *os.File
	bw   *bufio.Writer
	err  error // the first write error
}

// Create opens the file name of the set under its staging name for a
// writer that produces it piece by piece (a run's rows as they are
// computed), where Stage needs the whole content in one call. The file is
// staged at once, so that Abort removes it however far it got; the caller
// must Close it before Commit. Errors: file-system errors, nothing staged.
func (s *Set) Create(name string) (*File, error) {
	if s.done {
		panic("outdir: Create after Commit or Abort")
	}
	if !localName(name) || !slices.Contains(s.kind.Names, name) {
		panic("outdir: " + name + " is not a name the kind " + s.kind.Name + " declares")
	}
	f, err := os.OpenFile(filepath.Join(s.Dir, name+stagingExt), os.O_WRONLY|os.O_CREATE|os.O_TRUNC, 0o644)
	if err != nil {
		return nil, err
	}
	s.add(name)
	return &File{set: s, name: name, f: f, bw: bufio.NewWriterSize(f, 64<<10)}, nil
}

// Write implements io.Writer (buffered); after an error it writes nothing
// more and returns that error.
func (f *File) Write(p []byte) (int, error) {
	if f.err != nil {
		return 0, f.err
	}
	n, err := f.bw.Write(p)
	f.err = err
	return n, err
}

// Close flushes the file, syncs it to disk, gives it mode 0644 and closes
// it; it returns the first error of any write or of these steps.
func (f *File) Close() error {
	if f.f == nil {
		return f.err
	}
	err := f.err
	if err == nil {
		err = f.bw.Flush()
	}
	if err == nil {
		err = f.f.Sync()
	}
	if err == nil {
		err = f.f.Chmod(0o644)
	}
	if cerr := f.f.Close(); err == nil {
		err = cerr
	}
	f.f, f.err = nil, err
	return err
}

// StageDir creates the folder name of the set under its staging name and
// returns the staging path to write into; the folder goes in place at
// Commit.
func (s *Set) StageDir(name string) (string, error) {
	if s.done {
		panic("outdir: StageDir after Commit or Abort")
	}
	if !localName(name) || !slices.Contains(s.kind.Names, name) {
		panic("outdir: " + name + " is not a name the kind " + s.kind.Name + " declares")
	}
	path := filepath.Join(s.Dir, name+stagingExt)
	if err := os.RemoveAll(path); err != nil {
		return "", err
	}
	if err := os.Mkdir(path, 0o755); err != nil {
		return "", err
	}
	s.add(name)
	return path, nil
}

func (s *Set) add(name string) {
	if !slices.Contains(s.staged, name) {
		s.staged = append(s.staged, name)
	}
}

// Unstage takes name out of the set being written: what was staged under
// it is deleted, and Commit treats name as not written now (the previous
// set's file of that name, if any, is removed with the other files the new
// set does not write). For a writer that staged a folder and then found
// nothing to put in it (a case whose outputs could not be written).
func (s *Set) Unstage(name string) {
	if s.done || !slices.Contains(s.staged, name) {
		return
	}
	os.RemoveAll(filepath.Join(s.Dir, name+stagingExt))
	s.staged = slices.DeleteFunc(s.staged, func(n string) bool { return n == name })
}

// Keep makes the named files, as they are now in the directory, part of
// the new set: Commit neither moves nor removes them and the manifest
// lists them (for a writer that appends to a file in place, such as a
// sweep's summary). Names that do not exist are ignored.
func (s *Set) Keep(names ...string) {
	for _, n := range names {
		if _, err := os.Lstat(filepath.Join(s.Dir, n)); err == nil && localName(n) && !slices.Contains(s.kept, n) {
			s.kept = append(s.kept, n)
		}
	}
}

// Previous adds names to the files of the previous set, for a writer that
// knows from its own earlier files of names the manifest does not list (the
// case folders of a comparison written before the manifest named them):
// Commit removes them unless the new set stages or keeps them. Names that
// are not one plain name in the directory, or do not exist, are ignored.
func (s *Set) Previous(names ...string) {
	for _, n := range names {
		if _, err := os.Lstat(filepath.Join(s.Dir, n)); err == nil && localName(n) && n != manifestFile && n != lockFile {
			s.old = union(s.old, []string{n})
		}
	}
}

// Staged returns the names staged so far.
func (s *Set) Staged() []string { return slices.Clone(s.staged) }

// Abort removes everything staged and releases the directory; the previous
// set stays as it was. Abort after Commit does nothing.
func (s *Set) Abort() {
	if s.done {
		return
	}
	s.done = true
	for _, n := range s.staged {
		os.RemoveAll(filepath.Join(s.Dir, n+stagingExt))
	}
	os.Remove(filepath.Join(s.Dir, manifestFile+stagingExt))
	s.unlock()
}

// rename is os.Rename; tests replace it to fail or stop part-way.
var rename = os.Rename

// Commit puts the staged files in place as the directory's one set: the
// previous set's files (and any name of the kind not written now) are moved
// aside, the staged ones renamed into place with the manifest last, and
// the files set aside deleted. If a rename fails, the files put in place are
// removed and the previous ones put back, and the error returned; the
// directory then holds the previous set. The lock is released either way.
func (s *Set) Commit() error {
	if s.done {
		panic("outdir: Commit after Commit or Abort")
	}
	defer s.unlock()
	s.done = true
	m := manifest{Kind: s.kind.Name, Files: union(s.staged, s.kept)}
	b, _ := json.MarshalIndent(m, "", "  ")
	if err := writeSynced(filepath.Join(s.Dir, manifestFile+stagingExt), append(b, '\n')); err != nil {
		s.removeStaged()
		return err
	}
	// Everything of the previous set, of this kind, and the manifest goes
	// aside.
	var aside []string
	for _, n := range union(s.old, s.kind.Names, s.staged, []string{manifestFile}) {
		if slices.Contains(s.kept, n) && !slices.Contains(s.staged, n) {
			continue
		}
		p := filepath.Join(s.Dir, n)
		if _, err := os.Lstat(p); err != nil {
			continue
		}
		os.RemoveAll(p + asideExt)
		if err := rename(p, p+asideExt); err != nil {
			s.rollback(aside, nil)
			return fmt.Errorf("putting the previous %s aside: %w", n, err)
		}
		aside = append(aside, n)
	}
	var placed []string
	for _, n := range append(slices.Clone(s.staged), manifestFile) {
		p := filepath.Join(s.Dir, n)
		if err := rename(p+stagingExt, p); err != nil {
			s.rollback(aside, placed)
			return fmt.Errorf("putting %s in place: %w", n, err)
		}
		placed = append(placed, n)
	}
	for _, n := range aside {
		os.RemoveAll(filepath.Join(s.Dir, n+asideExt))
	}
	syncDir(s.Dir)
	return nil
}

// rollback removes the placed files and the staged ones, and puts the
// files set aside back.
func (s *Set) rollback(aside, placed []string) {
	for _, n := range placed {
		os.RemoveAll(filepath.Join(s.Dir, n))
	}
	s.removeStaged()
	for _, n := range aside {
		p := filepath.Join(s.Dir, n)
		os.Rename(p+asideExt, p)
	}
}

func (s *Set) removeStaged() {
	for _, n := range s.staged {
		os.RemoveAll(filepath.Join(s.Dir, n+stagingExt))
	}
	os.Remove(filepath.Join(s.Dir, manifestFile+stagingExt))
}

// recoverCommit finishes a commit that was cut short in dir (see the
// package doc).
func recoverCommit(dir string) error {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return err
	}
	// Only names this tool writes are considered: a user's own file that
	// happens to end in .staging or .previous is left alone.
	ours := []string{manifestFile}
	for _, k := range registered {
		ours = append(ours, k.Names...)
	}
	for _, f := range []string{manifestFile, manifestFile + stagingExt} {
		if b, err := os.ReadFile(filepath.Join(dir, f)); err == nil {
			var m manifest
			if json.Unmarshal(b, &m) == nil {
				ours = append(ours, m.Files...)
			}
		}
	}
	var aside, staged []string
	for _, e := range ents {
		n := e.Name()
		switch {
		case strings.HasSuffix(n, asideExt) && slices.Contains(ours, strings.TrimSuffix(n, asideExt)):
			aside = append(aside, strings.TrimSuffix(n, asideExt))
		case strings.HasSuffix(n, stagingExt) && slices.Contains(ours, strings.TrimSuffix(n, stagingExt)):
			staged = append(staged, strings.TrimSuffix(n, stagingExt))
		}
	}
	if len(aside) == 0 && len(staged) == 0 {
		return nil
	}
	// The commit was done when the new manifest is in place: it is renamed
	// last, and its staging file exists until then.
	_, errM := os.Stat(filepath.Join(dir, manifestFile))
	done := errM == nil && !slices.Contains(staged, manifestFile)
	if !done {
		// Roll back: the new files already in place are those named by
		// the staged manifest without a staging file left.
		if b, err := os.ReadFile(filepath.Join(dir, manifestFile+stagingExt)); err == nil {
			var m manifest
			if json.Unmarshal(b, &m) == nil {
				for _, n := range m.Files {
					if localName(n) && !slices.Contains(staged, n) {
						os.RemoveAll(filepath.Join(dir, n))
					}
				}
			}
		}
		for _, n := range aside {
			p := filepath.Join(dir, n)
			if err := os.Rename(p+asideExt, p); err != nil {
				return fmt.Errorf("restoring %s after an interrupted write: %w", p, err)
			}
		}
	} else {
		for _, n := range aside {
			os.RemoveAll(filepath.Join(dir, n+asideExt))
		}
	}
	for _, n := range staged {
		os.RemoveAll(filepath.Join(dir, n+stagingExt))
	}
	return nil
}

func union(lists ...[]string) []string {
	var out []string
	for _, l := range lists {
		for _, n := range l {
			if !slices.Contains(out, n) {
				out = append(out, n)
			}
		}
	}
	return out
}

func writeSynced(path string, b []byte) error {
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_TRUNC, 0o644)
	if err != nil {
		return err
	}
	if _, err := f.Write(b); err != nil {
		f.Close()
		return err
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// syncDir makes the renames in dir durable where the system allows it.
func syncDir(dir string) {
	if f, err := os.Open(dir); err == nil {
		f.Sync()
		f.Close()
	}
}

// lock takes dir's lock file: created exclusively with this process's id;
// a lock whose process no longer runs is replaced.
func (s *Set) lock() error {
	path := filepath.Join(s.Dir, lockFile)
	for range 3 {
		f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
		if err == nil {
			_, err = fmt.Fprintf(f, "%d\n", os.Getpid())
			f.Close()
			if err != nil {
				os.Remove(path)
				return err
			}
			s.locked = true
			return nil
		}
		if !errors.Is(err, os.ErrExist) {
			return err
		}
		b, _ := os.ReadFile(path)
		pid, perr := strconv.Atoi(strings.TrimSpace(string(b)))
		if perr == nil && pid > 0 && pid != os.Getpid() && alive(pid) {
			return &BusyError{Dir: s.Dir, PID: pid}
		}
		if perr == nil && pid == os.Getpid() {
			return &BusyError{Dir: s.Dir, PID: pid}
		}
		// Stale (its process is gone) or unreadable: take it over.
		os.Remove(path)
	}
	return fmt.Errorf("cannot take the lock %s", path)
}

func (s *Set) unlock() {
	if s.locked {
		os.Remove(filepath.Join(s.Dir, lockFile))
		s.locked = false
	}
}

// alive reports whether a process with this id runs.
func alive(pid int) bool {
	p, err := os.FindProcess(pid)
	if err != nil {
		return false
	}
	err = p.Signal(syscall.Signal(0))
	return err == nil || errors.Is(err, syscall.EPERM)
}
