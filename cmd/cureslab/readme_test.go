package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"cureslab/cases"
	casecheck "cureslab/cases/check"
	"cureslab/cases/results"
)

// The README's sample outputs are generated from the tool, so that they
// cannot drift from what it prints: each sits between
//
//	<!-- README: NAME -->
//	...
//	<!-- /README -->
//
// and TestReadmeOutputs regenerates it with readmeBlocks[NAME]; go test
// -update rewrites the README's blocks.

// readmeFile is the README, relative to this package's directory.
const readmeFile = "../../README.md"

var readmeBlock = regexp.MustCompile(`(?s)<!-- README: ([a-z0-9-]+) -->\n(.*?)<!-- /README -->`)

// readmeBlocks make the blocks, each in a fresh working directory.
var readmeBlocks = map[string]func(t *testing.T) string{
	// The cautions, as check and the report pages word them.
	"cautions": func(t *testing.T) string {
		var b strings.Builder
		for _, s := range casecheck.AllCautions() {
			fmt.Fprintf(&b, "- %s\n", s)
		}
		return b.String()
	},
	// Every number of summary.json with its label, unit and meaning.
	"summary-fields": func(t *testing.T) string {
		var b strings.Builder
		b.WriteString("| key in summary.json and the CSV files | label on the terminal and in reports | unit | what it is |\n|---|---|---|---|\n")
		for _, q := range append(results.Vocabulary, results.GelFrontSpread) {
			u := q.Unit
			if u == "" {
				u = "–"
			}
			fmt.Fprintf(&b, "| `%s` | %s | %s | %s |\n", q.Key, q.Label, u, q.Means)
		}
		return b.String()
	},
	// The demo's oven case run as a user would, from the example.
	"run-oven": func(t *testing.T) string {
		writeExample(t, "thick-potting-oven", "potting.toml")
		return readmeShell(t, []string{"run", "potting.toml"}, 0, nil)
	},
	// The same potting in the oven and under controlled microwave heating.
	"compare": func(t *testing.T) string {
		writeExample(t, "thick-potting-oven", "oven.toml")
		writeExample(t, "thick-potting-microwave", "microwave.toml")
		return readmeShell(t, []string{"compare", "oven.toml", "microwave.toml", "-o", "compare-out"}, 0, nil)
	},
	// The kinetic fit of the synthetic scans: the activation energies and
	// the block to paste.
	"fit": func(t *testing.T) string {
		scans, err := filepath.Glob(filepath.Join(readmeRepo(t), "testdata", "dsc", "*.csv"))
		if err != nil || len(scans) == 0 {
			t.Fatalf("no scans: %v", err)
		}
		dst := make([]string, len(scans))
		os.MkdirAll(filepath.Join("testdata", "dsc"), 0o755)
		for i, s := range scans {
			b, err := os.ReadFile(s)
			if err != nil {
				t.Fatal(err)
			}
			dst[i] = filepath.Join("testdata", "dsc", filepath.Base(s))
			if err := os.WriteFile(dst[i], b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		args := append([]string{"fit"}, dst...)
		args = append(args, "--diffusion", "--baseline", "sigmoidal", "--name", "dsc-demo-resin", "-o", "dsc-demo-resin.toml")
		shown := "cureslab fit testdata/dsc/*.csv --diffusion --baseline sigmoidal --name dsc-demo-resin -o dsc-demo-resin.toml"
		return readmeShellAs(t, args, shown, 0, func(out string) string {
			// The activation energies, then the block to paste.
			lines := strings.Split(strings.TrimRight(out, "\n"), "\n")
			var head, block []string
			for i, l := range lines {
				if l == "" && head == nil {
					head = lines[:i]
				}
				if strings.HasPrefix(l, "[materials.") && strings.HasSuffix(l, ".cure]") && block == nil {
					block = lines[i:]
				}
			}
			for j, l := range block {
				if l == "" {
					block = block[:j]
					break
				}
			}
			return strings.Join(head, "\n") + "\n...\n" + strings.Join(block, "\n") + "\n"
		})
	},
	// The shortest program for the oven potting.
	"tune": func(t *testing.T) string {
		writeExample(t, "thick-potting-oven", "potting.toml")
		return readmeShell(t, []string{"tune", "potting.toml", "--program", "oven", "-o", "potting-tune"}, 0, nil)
	},
	// The oven potting's own program over 100 samples of its [uncertainty].
	"uncertain": func(t *testing.T) string {
		writeExample(t, "thick-potting-oven", "potting.toml")
		return readmeShell(t, []string{"run", "potting.toml", "--uncertain", "100", "--no-report"}, 1, func(out string) string {
			_, after, ok := strings.Cut(out, "\nuncertainty: ")
			if !ok {
				t.Fatalf("no uncertainty table in:\n%s", out)
			}
			return "...\nuncertainty: " + after
		})
	},
}

// readmeRoot is the repository's root, set by TestReadmeOutputs before it
// changes directory.
var readmeRoot string

// readmeRepo returns the repository's root.
func readmeRepo(t *testing.T) string {
	t.Helper()
	if readmeRoot == "" {
		t.Fatal("the repository's root is not known")
	}
	return readmeRoot
}

// readmeShell runs cureslab with args, checks the exit status, and returns
// the session as a shell shows it: the command after "$ ", then its
// standard output (through keep when not nil), in a fenced block.
func readmeShell(t *testing.T, args []string, code int, keep func(string) string) string {
	return readmeShellAs(t, args, "cureslab "+strings.Join(args, " "), code, keep)
}

func readmeShellAs(t *testing.T, args []string, shown string, code int, keep func(string) string) string {
	t.Helper()
	got, out, errs := cl(t, args...)
	if got != code {
		t.Fatalf("cureslab %s: exit %d, want %d\n%s%s", shown, got, code, out, errs)
	}
	if keep != nil {
		out = keep(out)
	}
	return "```\n$ " + shown + "\n" + out + "```\n"
}

// TestReadmeOutputs regenerates every sample output of the README.
func TestReadmeOutputs(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the README's commands")
	}
	path, err := filepath.Abs(readmeFile)
	if err != nil {
		t.Fatal(err)
	}
	readmeRoot = filepath.Dir(path)
	text, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	var failed bool
	out := readmeBlock.ReplaceAllFunc(text, func(m []byte) []byte {
		sub := readmeBlock.FindSubmatch(m)
		name, old := string(sub[1]), string(sub[2])
		gen, ok := readmeBlocks[name]
		if !ok {
			t.Errorf("README block %q has no generator", name)
			return m
		}
		seen[name] = true
		var got string
		t.Run(name, func(t *testing.T) {
			chdir(t)
			got = gen(t)
			if got != old && !*update {
				failed = true
				t.Errorf("README block %s differs from what the tool prints (go test -update rewrites it):\n--- README\n%s--- tool\n%s", name, old, got)
			}
		})
		if got == "" {
			return m
		}
		return []byte("<!-- README: " + name + " -->\n" + got + "<!-- /README -->")
	})
	for name := range readmeBlocks {
		if !seen[name] {
			t.Errorf("README has no block %q", name)
		}
	}
	if *update && !failed && !bytes.Equal(out, text) {
		if err := os.WriteFile(path, out, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// TestReadmeWalkthrough: every setting the README's walk through a case
// file shows is in the example it prints, as written.
func TestReadmeWalkthrough(t *testing.T) {
	text, err := os.ReadFile(readmeFile)
	if err != nil {
		t.Fatal(err)
	}
	_, rest, ok := strings.Cut(string(text), "## A case file, walked through")
	if !ok {
		t.Fatal("README has no walk through a case file")
	}
	_, rest, _ = strings.Cut(rest, "```toml\n")
	block, _, _ := strings.Cut(rest, "```")
	ex, _ := cases.ExampleByName("thick-potting-oven")
	norm := func(l string) string {
		l, _, _ = strings.Cut(l, "#")
		return strings.Join(strings.Fields(l), " ")
	}
	have := map[string]bool{}
	for _, l := range strings.Split(string(ex.Text), "\n") {
		have[norm(l)] = true
	}
	n := 0
	for _, l := range strings.Split(block, "\n") {
		l = norm(l)
		if l == "" {
			continue
		}
		n++
		if !have[l] {
			t.Errorf("the README shows %q, which the example does not have", l)
		}
	}
	if n < 20 {
		t.Errorf("only %d lines checked in the walk-through", n)
	}
}
