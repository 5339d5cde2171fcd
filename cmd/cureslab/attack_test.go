package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/BurntSushi/toml"
)

// The attack table: testdata/attack/NAME/attack.toml describes one attack
// on the command line (bad files, output-directory hazards, signals,
// damaged journals, huge and hostile inputs) as a list of steps; the files
// of the directory are its inputs, and inputs too large or too odd to
// commit (a 17 MB case file, a FIFO, 5,000 nested tables, a million-row DSC
// scan) are generated at test time. Each step runs cureslab in a child
// process in a copy of the directory (over a copy of testdata/attack/_shared,
// the case files most attacks start from) and checks the exit status, words of
// its stdout and stderr, and what must and must not be on disk afterwards.
// See testdata/attack/README.md for the format.

// attackChild makes the test binary act as cureslab when it is started by
// a step (the environment variable is set only for the child).
const attackChild = "CURESLAB_ATTACK_CHILD"

func TestMain(m *testing.M) {
	if os.Getenv(attackChild) == "1" {
		os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
	}
	os.Exit(m.Run())
}

type attackSpec struct {
	About    string
	Pending  string // why the case is not yet expected to pass ("" = it must)
	Requires string // "unix" or a path that must exist ("/dev/zero")
	Generate []attackGen
	Step     []attackStep
}

// attackGen makes an input file at test time.
type attackGen struct {
	File string // where, relative to the case directory
	Kind string // see generate
	N    int
	Size int64
	From string // a file of the case directory the generated one starts from
	EOL  string // "crlf" to write CR LF line ends
}

type attackStep struct {
	Args []string // the cureslab command line; empty for a step that only signals or edits
	Exit *int     // expected exit status (required when Args are given)

	Stdout    []string `toml:"stdout"` // words that must appear
	Stderr    []string `toml:"stderr"`
	NotStdout []string `toml:"not_stdout"` // words that must not
	NotStderr []string `toml:"not_stderr"`
	Present   []string `toml:"present"` // paths (globs) that must exist afterwards
	Absent    []string `toml:"absent"`  // and must not
	Contains  []attackWords

	// Background starts the command and goes on to the next step once
	// Until exists (or at once); a later step with Signal and no Args
	// stops it and checks its exit.
	Background bool
	// Signal ("INT" or "TERM") is sent to the command once Until exists,
	// or After has passed; the command must then exit within StopWithin
	// (default 10 s: a bound far above the promise of a second, so that a
	// loaded machine cannot fail it, and far below the work left).
	Signal     string
	Until      string
	After      string
	StopWithin string `toml:"stop_within"`

	Edit *attackEdit // a change to a file before the step runs
}

type attackWords struct {
	File  string
	Words []string
	Not   []string
}

// attackEdit replaces the first Old by New on line Line of File (the whole
// line when Old is empty), or cuts the file to Cut bytes from its end.
type attackEdit struct {
	File     string
	Line     int
	Old, New string
	Cut      int
}

func TestAttacks(t *testing.T) {
	dirs, err := filepath.Glob(filepath.Join("testdata", "attack", "*", "attack.toml"))
	if err != nil || len(dirs) == 0 {
		t.Fatalf("no attack cases found: %v", err)
	}
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	for _, specPath := range dirs {
		src := filepath.Dir(specPath)
		name := filepath.Base(src)
		t.Run(name, func(t *testing.T) {
			var spec attackSpec
			md, err := toml.DecodeFile(specPath, &spec)
			if err != nil {
				t.Fatal(err)
			}
			if u := md.Undecoded(); len(u) > 0 {
				t.Fatalf("%s: unknown keys %v", specPath, u)
			}
			if spec.Pending != "" {
				t.Skipf("pending: %s", spec.Pending)
			}
			switch {
			case spec.Requires == "unix" && runtime.GOOS == "windows":
				t.Skip("needs a unix system")
			case strings.HasPrefix(spec.Requires, "/"):
				if _, err := os.Stat(spec.Requires); err != nil {
					t.Skipf("needs %s", spec.Requires)
				}
			}
			dir := t.TempDir()
			if err := os.CopyFS(dir, os.DirFS(filepath.Join("testdata", "attack", "_shared"))); err != nil {
				t.Fatal(err)
			}
			if err := copyInto(dir, src); err != nil {
				t.Fatal(err)
			}
			for _, g := range spec.Generate {
				if err := generate(dir, g); err != nil {
					t.Fatalf("generating %s: %v", g.File, err)
				}
			}
			var bg *attackProc
			defer func() {
				if bg != nil {
					bg.cmd.Process.Kill()
					bg.cmd.Wait()
				}
			}()
			for i, st := range spec.Step {
				label := fmt.Sprintf("step %d (cureslab %s)", i+1, strings.Join(st.Args, " "))
				if st.Edit != nil {
					if err := edit(dir, st.Edit); err != nil {
						t.Fatalf("step %d: edit: %v", i+1, err)
					}
				}
				var res attackResult
				switch {
				case len(st.Args) == 0 && st.Signal != "":
					if bg == nil {
						t.Fatalf("step %d signals, but no command runs in the background", i+1)
					}
					res = bg.stop(t, dir, st)
					bg = nil
				case len(st.Args) == 0:
					continue
				case st.Background:
					bg = start(t, exe, dir, st.Args)
					waitFor(t, dir, st.Until, 60*time.Second)
					continue
				default:
					p := start(t, exe, dir, st.Args)
					if st.Signal != "" {
						res = p.stop(t, dir, st)
					} else {
						res = p.wait(t, st.Args)
					}
				}
				check(t, label, dir, st, res)
			}
		})
	}
}

type attackProc struct {
	cmd         *exec.Cmd
	stdout, err bytes.Buffer
	done        chan error
}

type attackResult struct {
	code           int
	stdout, stderr string
}

func start(t *testing.T, exe, dir string, args []string) *attackProc {
	t.Helper()
	p := &attackProc{done: make(chan error, 1)}
	p.cmd = exec.Command(exe, args...)
	p.cmd.Dir = dir
	p.cmd.Env = append(os.Environ(), attackChild+"=1")
	p.cmd.Stdout, p.cmd.Stderr = &p.stdout, &p.err
	if err := p.cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { p.done <- p.cmd.Wait() }()
	return p
}

// stepLimit bounds a step that is not signalled: a command hanging on a
// hostile input is killed and the step fails instead of the whole test.
const stepLimit = 90 * time.Second

func (p *attackProc) wait(t *testing.T, args []string) attackResult {
	t.Helper()
	select {
	case err := <-p.done:
		return p.result(err)
	case <-time.After(stepLimit):
		p.cmd.Process.Kill()
		r := p.result(<-p.done)
		t.Fatalf("cureslab %s did not end within %v (killed)\nstderr: %s", strings.Join(args, " "), stepLimit, clip(r.stderr))
		return r
	}
}

func (p *attackProc) result(err error) attackResult {
	code := 0
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		code = ee.ExitCode() // -1 when killed by a signal
	} else if err != nil {
		code = -2
	}
	return attackResult{code: code, stdout: p.stdout.String(), stderr: p.err.String()}
}

// stop sends st.Signal once st.Until exists or st.After has passed, and
// waits for the exit within st.StopWithin.
func (p *attackProc) stop(t *testing.T, dir string, st attackStep) attackResult {
	t.Helper()
	if st.Until != "" {
		select {
		case err := <-p.done:
			r := p.result(err)
			t.Fatalf("cureslab %s ended (exit %d) before %s appeared: the attack needs more work to interrupt\nstderr: %s",
				strings.Join(st.Args, " "), r.code, st.Until, r.stderr)
		default:
		}
		waitFor(t, dir, st.Until, 60*time.Second)
	}
	if st.After != "" {
		d, err := time.ParseDuration(st.After)
		if err != nil {
			t.Fatal(err)
		}
		select {
		case err := <-p.done:
			r := p.result(err)
			t.Fatalf("cureslab %s ended (exit %d) before the signal: the attack needs more work to interrupt\nstderr: %s",
				strings.Join(st.Args, " "), r.code, r.stderr)
		case <-time.After(d):
		}
	}
	sig := map[string]os.Signal{"INT": os.Interrupt, "TERM": syscall.SIGTERM}[st.Signal]
	if sig == nil {
		t.Fatalf("unknown signal %q", st.Signal)
	}
	if err := p.cmd.Process.Signal(sig); err != nil {
		t.Fatalf("signal: %v", err)
	}
	within := 10 * time.Second
	if st.StopWithin != "" {
		within, _ = time.ParseDuration(st.StopWithin)
	}
	select {
	case err := <-p.done:
		return p.result(err)
	case <-time.After(within):
		p.cmd.Process.Kill()
		<-p.done
		t.Fatalf("cureslab %s did not stop within %v of SIG%s", strings.Join(st.Args, " "), within, st.Signal)
	}
	return attackResult{}
}

// waitFor waits until the glob pattern (relative to dir) matches a path.
func waitFor(t *testing.T, dir, pattern string, limit time.Duration) {
	t.Helper()
	if pattern == "" {
		return
	}
	end := time.Now().Add(limit)
	for time.Now().Before(end) {
		if m, _ := filepath.Glob(filepath.Join(dir, pattern)); len(m) > 0 {
			return
		}
		time.Sleep(20 * time.Millisecond)
	}
	t.Fatalf("%s did not appear within %v", pattern, limit)
}

func check(t *testing.T, label, dir string, st attackStep, r attackResult) {
	t.Helper()
	if st.Exit == nil {
		t.Fatalf("%s: the step gives no expected exit", label)
	}
	show := func() string { return fmt.Sprintf("\nstdout:\n%s\nstderr:\n%s", clip(r.stdout), clip(r.stderr)) }
	if r.code != *st.Exit {
		t.Errorf("%s: exit %d, want %d%s", label, r.code, *st.Exit, show())
	}
	for _, w := range st.Stdout {
		if !strings.Contains(r.stdout, w) {
			t.Errorf("%s: stdout lacks %q%s", label, w, show())
		}
	}
	for _, w := range st.Stderr {
		if !strings.Contains(r.stderr, w) {
			t.Errorf("%s: stderr lacks %q%s", label, w, show())
		}
	}
	for _, w := range st.NotStdout {
		if strings.Contains(r.stdout, w) {
			t.Errorf("%s: stdout holds %q%s", label, w, show())
		}
	}
	for _, w := range st.NotStderr {
		if strings.Contains(r.stderr, w) {
			t.Errorf("%s: stderr holds %q%s", label, w, show())
		}
	}
	for _, p := range st.Present {
		if m, _ := filepath.Glob(filepath.Join(dir, p)); len(m) == 0 {
			t.Errorf("%s: %s is missing afterwards%s", label, p, show())
		}
	}
	for _, p := range st.Absent {
		if m, _ := filepath.Glob(filepath.Join(dir, p)); len(m) > 0 {
			t.Errorf("%s: %s is there afterwards (%v)%s", label, p, m, show())
		}
	}
	for _, c := range st.Contains {
		b, err := os.ReadFile(filepath.Join(dir, c.File))
		if err != nil {
			t.Errorf("%s: %v", label, err)
			continue
		}
		for _, w := range c.Words {
			if !bytes.Contains(b, []byte(w)) {
				t.Errorf("%s: %s lacks %q:\n%s", label, c.File, w, clip(string(b)))
			}
		}
		for _, w := range c.Not {
			if bytes.Contains(b, []byte(w)) {
				t.Errorf("%s: %s holds %q:\n%s", label, c.File, w, clip(string(b)))
			}
		}
	}
}

func clip(s string) string {
	if len(s) > 3000 {
		return s[:3000] + "…"
	}
	return s
}

// copyInto copies the files of src into dir, replacing any of the same
// name.
func copyInto(dir, src string) error {
	ents, err := os.ReadDir(src)
	if err != nil {
		return err
	}
	for _, e := range ents {
		if e.IsDir() {
			return fmt.Errorf("%s: an attack case holds files only", filepath.Join(src, e.Name()))
		}
		b, err := os.ReadFile(filepath.Join(src, e.Name()))
		if err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(dir, e.Name()), b, 0o644); err != nil {
			return err
		}
	}
	return nil
}

func edit(dir string, e *attackEdit) error {
	path := filepath.Join(dir, e.File)
	b, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	if e.Cut > 0 {
		return os.WriteFile(path, b[:len(b)-e.Cut], 0o644)
	}
	lines := strings.SplitAfter(string(b), "\n")
	if e.Line < 1 || e.Line > len(lines) {
		return fmt.Errorf("%s has no line %d", e.File, e.Line)
	}
	l := lines[e.Line-1]
	switch {
	case e.Old == "":
		lines[e.Line-1] = e.New + "\n"
	case strings.Contains(l, e.Old):
		lines[e.Line-1] = strings.Replace(l, e.Old, e.New, 1)
	default:
		return fmt.Errorf("line %d of %s does not hold %q: %q", e.Line, e.File, e.Old, l)
	}
	return os.WriteFile(path, []byte(strings.Join(lines, "")), 0o644)
}

// generate makes the input g in dir. Kinds:
//
//	sparse       a file of g.Size bytes that holds no data (a hole)
//	fifo         a named pipe
//	deep-tables  g.From, then "deep = " and g.N inline tables inside each other
//	deep-keys    g.From, then a key of g.N dotted parts
//	probes       g.From with its "probes = " line listing g.N depths 0.01 mm apart
//	scan         a dynamic DSC scan of g.N rows at g.Size K/min (default 10)
//	copy         g.From as it is (with g.EOL)
//	symlink      a symbolic link to g.From
func generate(dir string, g attackGen) error {
	path := filepath.Join(dir, g.File)
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	from := ""
	if g.From != "" && g.Kind != "symlink" {
		b, err := os.ReadFile(filepath.Join(dir, g.From))
		if err != nil {
			return err
		}
		from = string(b)
	}
	var text string
	switch g.Kind {
	case "sparse":
		f, err := os.Create(path)
		if err != nil {
			return err
		}
		if err := f.Truncate(g.Size); err != nil {
			f.Close()
			return err
		}
		return f.Close()
	case "fifo":
		return mkfifo(path)
	case "symlink":
		return os.Symlink(g.From, path)
	case "deep-tables":
		text = from + "deep = " + strings.Repeat("{a = ", g.N) + "1" + strings.Repeat("}", g.N) + "\n"
	case "deep-keys":
		text = from + strings.Repeat("k.", g.N-1) + "k = 1\n"
	case "probes":
		var b strings.Builder
		b.WriteString("probes = [")
		for i := range g.N {
			if i > 0 {
				b.WriteString(", ")
			}
			fmt.Fprintf(&b, "\"%s mm\"", strconv.FormatFloat(float64(i)*0.01, 'f', -1, 64))
		}
		b.WriteString("]")
		lines := strings.Split(from, "\n")
		found := false
		for i, l := range lines {
			if strings.HasPrefix(l, "probes =") {
				lines[i], found = b.String(), true
			}
		}
		if !found {
			return fmt.Errorf("%s has no probes line", g.From)
		}
		text = strings.Join(lines, "\n")
	case "scan":
		return writeScan(path, g.N, float64(max(g.Size, 10)))
	case "copy":
		text = from
	default:
		return fmt.Errorf("unknown generator %q", g.Kind)
	}
	if g.EOL == "crlf" {
		text = strings.ReplaceAll(text, "\n", "\r\n")
	}
	return os.WriteFile(path, []byte(text), 0o644)
}

// writeScan writes a dynamic DSC scan of n rows at rate K/min from 20 C to
// 300 C: a sloped baseline and one Gaussian exotherm (an invented shape for
// size tests, not a kinetic model).
func writeScan(path string, n int, rate float64) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := io.Writer(f)
	var b []byte
	b = append(b, "time_s,temperature_C,heat_flow_W_per_g\n"...)
	dur := 280 / (rate / 60)
	for i := range n {
		t := dur * float64(i) / float64(n-1)
		T := 20 + rate/60*t
		q := -0.08 + 0.0004*(T-20) + 0.5*math.Exp(-0.5*math.Pow((T-160)/15, 2)) + 0.005*math.Sin(float64(i)*1.7)
		b = strconv.AppendFloat(b, t, 'f', 4, 64)
		b = append(b, ',')
		b = strconv.AppendFloat(b, T, 'f', 5, 64)
		b = append(b, ',')
		b = strconv.AppendFloat(b, q, 'f', 6, 64)
		b = append(b, '\n')
		if len(b) > 1<<20 {
			if _, err := w.Write(b); err != nil {
				f.Close()
				return err
			}
			b = b[:0]
		}
	}
	if _, err := w.Write(b); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
