package cases

import (
	"embed"
	"sort"
)

//go:embed examples/*.toml
var exampleFS embed.FS

// Example is a case file embedded in cureslab, ready to run or to copy as a
// starting point. Every example uses invented data: the resins are made up
// for the examples and must not be used for a real part.
type Example struct {
	Name    string // as given to `cureslab example NAME`
	Summary string // one line
	Text    []byte // the case file (TOML)
}

// exampleSummaries lists the embedded examples, each stored as
// examples/<name>.toml; a test checks that the two agree.
var exampleSummaries = map[string]string{
	"thick-laminate":           "25 mm carbon/epoxy plies of an invented two-regime resin on a steel tool, two-hold cycle: centre overshoot and the flow window",
	"thick-potting-6ghz":       "the microwave potting at 6.25 GHz: a second node of the standing wave under the surface, the sensor at mid-depth",
	"thick-potting-6ghz-swept": "the same part with the frequency swept over 5.85-6.65 GHz: what a band changes (and what it cannot)",
	"thick-potting-microwave":  "the same potting under a 2.45 GHz plane wave in its metal cup: a node on the metal, the sensor where the resin is hottest",
	"thick-potting-oven":       "12 mm of an invented potting epoxy in an aluminium cup cured at 65 C: exotherm overshoot, lagging bottom",
	"tile-on-spreader":         "alumina tile bonded to an aluminium spreader warming in an oven: pure conduction, no cure",
}

// Examples returns the embedded examples sorted by name. Each call returns
// fresh copies of the texts.
func Examples() []Example {
	out := make([]Example, 0, len(exampleSummaries))
	for name, sum := range exampleSummaries {
		text, err := exampleFS.ReadFile("examples/" + name + ".toml")
		if err != nil {
			panic("cases: embedded example " + name + " is missing: " + err.Error()) // a build mistake
		}
		out = append(out, Example{Name: name, Summary: sum, Text: text})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// ExampleByName returns the embedded example with the given name, and false
// if there is none.
func ExampleByName(name string) (Example, bool) {
	sum, ok := exampleSummaries[name]
	if !ok {
		return Example{}, false
	}
	text, err := exampleFS.ReadFile("examples/" + name + ".toml")
	if err != nil {
		panic("cases: embedded example " + name + " is missing: " + err.Error())
	}
	return Example{Name: name, Summary: sum, Text: text}, true
}

// ExampleNames returns the names of the embedded examples, sorted.
func ExampleNames() []string {
	out := make([]string, 0, len(exampleSummaries))
	for name := range exampleSummaries {
		out = append(out, name)
	}
	sort.Strings(out)
	return out
}
