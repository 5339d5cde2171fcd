package results

import "cureslab/cases/outdir"

// The kinds of output directory (package outdir): each directory holds one
// complete set of one kind, and a command refuses a directory of another
// kind. Names are every file the tool writes there (report.html and
// uncertainty.csv are written by packages report and uncertain).
var (
	// RunKind is a run's directory (run, demo, each case of compare).
	RunKind = outdir.Register(outdir.Kind{Name: "run", Marks: []string{SummaryFile},
		Names: []string{FieldsFile, ProbesFile, SummaryFile, "report.html", "uncertainty.csv", "runs"}})
	// SweepKind is a sweep's or a merge's directory. Its journal, definition
	// and log are kept by the sweep itself (resumable); the set is the
	// summary and the page.
	SweepKind = outdir.Register(outdir.Kind{Name: "sweep", Marks: []string{SweepDefinitionFile},
		Names: []string{SweepSummaryFile, "report.html"}})
	// CompareKind is a comparison's directory (its cases' runs go into
	// folders of their own inside it).
	CompareKind = outdir.Register(outdir.Kind{Name: "comparison", Marks: []string{CompareFile},
		Names: []string{CompareFile, "report.html"}})
)
