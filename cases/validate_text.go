package cases

import (
	"cureslab/cases/tomltext"
	"sort"
	"strconv"

	"cureslab/cases/limits"
)

// maxProbes is the most probes a case may list in [output] probes: each
// adds two columns to probes.csv and a curve to the report.
const maxProbes = 1000

// checkTexts refuses, anywhere in the document v at key path path, a
// string value, or the name of a material or a schedule (the keys the user
// chooses), holding a control character or a bidirectional control
// (limits.CheckText): names and titles reach CSV files, HTML pages and
// terminals, where such characters would hide or reorder what is shown.
// Each is reported at its position, with the character and where it stands
// in the text. Other keys are fixed words: an odd one is an unknown key.
func (l *loader) checkTexts(path string, v any) {
	switch v := v.(type) {
	case string:
		if b, bad := limits.CheckText(v); bad {
			l.atValue(path, ErrRange, "%s: names, titles and other text may not hold control or bidirectional-override characters", b).Hint =
				"retype the text; quoted TOML strings may spell such characters as escapes (\\u001b), which is where they usually come from"
		}
	case map[string]any:
		keys := make([]string, 0, len(v))
		for k := range v {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			p := tomltext.JoinKey(path, k)
			if b, bad := limits.CheckText(k); bad && (path == "materials" || path == "schedules") {
				l.atKey(p, ErrRange, "the key %q has %s: names may not hold control or bidirectional-override characters", k, b)
				continue
			}
			l.checkTexts(p, v[k])
		}
	case []map[string]any:
		for i, m := range v {
			l.checkTexts(tomltext.JoinKey(path, strconv.Itoa(i)), m)
		}
	case []any:
		for i, e := range v {
			l.checkTexts(tomltext.JoinKey(path, strconv.Itoa(i)), e)
		}
	}
}

// checkProbeColumns refuses two probes whose depths, written in the column
// names of probes.csv (T_<depth>mm_C), are the same text: their columns
// could not be told apart. paths are the key paths of the probes.
func (l *loader) checkProbeColumns(depths []float64, paths []string, format func(float64) string) {
	seen := map[string]int{}
	for i, z := range depths {
		col := "T_" + format(z) + "mm_C"
		if j, dup := seen[col]; dup {
			l.atValue(paths[i], ErrDuplicate, "this probe and %s make the same column %s in probes.csv: give each probe its own depth", paths[j], col)
			continue
		}
		seen[col] = i
	}
}
