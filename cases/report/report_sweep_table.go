package report

// The table of a sweep's runs and its order: the smallest margin to a
// criterion limit first (see WriteSweepReport).

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/results"
	"fmt"
	"html/template"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
)

func sweepOrderText(crit *cases.Criteria) string {
	if sweepLimits(crit) == nil {
		return "Sorted by status (failed, runaway, criteria-failed, ok), then by " + results.Label(colCure) + "."
	}
	return "Sorted by the smallest margin to a criterion limit, as a fraction of the limit (temperatures in kelvin); negative margins fail."
}

// sweepLimits returns the limits that crit sets, by criterion, in the units
// of summary.csv (°C for max_temperature); nil when none.
func sweepLimits(crit *cases.Criteria) map[string]float64 {
	if crit == nil {
		return nil
	}
	m := map[string]float64{}
	if !math.IsNaN(crit.MinCure) {
		m[results.CriterionMinCure] = crit.MinCure
	}
	if !math.IsNaN(crit.MaxTemperature) {
		m[results.CriterionMaxTemperature] = num.Celsius(crit.MaxTemperature)
	}
	if !math.IsNaN(crit.MaxSpread) {
		m[results.CriterionMaxSpread] = crit.MaxSpread
	}
	if crit.MinFlowWindow > 0 {
		m[results.CriterionMinFlowWindow] = crit.MinFlowWindow
	}
	if len(m) == 0 {
		return nil
	}
	return m
}

// sweepMargin returns the smallest relative margin of r over lim (see
// WriteSweepReport); NaN when a limited quantity has no value in a run that
// did not finish, +Inf when no criterion applies.
func sweepMargin(r *sweepRow, lim map[string]float64) float64 {
	m := math.Inf(1)
	for c, L := range lim {
		var v, x float64
		switch c {
		case results.CriterionMinCure:
			v = r.num(colCure)
			x = (v - L) / L
		case results.CriterionMaxTemperature:
			v = r.num(colPeak)
			x = (L - v) / (L + 273.15)
		case results.CriterionMaxSpread:
			v = r.num("max_spread_K")
			x = (L - v) / L
		case results.CriterionMinFlowWindow:
			v = r.num(colFlow)
			x = (v - L) / L
		}
		if math.IsNaN(v) {
			if r.Status == results.StatusFailed || r.Status == results.StatusRunaway {
				return math.NaN()
			}
			continue // the quantity does not exist: holds vacuously
		}
		m = min(m, x)
	}
	return m
}

var statusRank = map[string]int{results.StatusFailed: 0, results.StatusRunaway: 1, results.StatusCriteriaFailed: 2, results.StatusOK: 3}

// sweepOrder returns the row indices, the worst first (see WriteSweepReport).
func sweepOrder(sd *sweepData, crit *cases.Criteria) []int {
	idx := make([]int, len(sd.Rows))
	for i := range idx {
		idx[i] = i
	}
	lim := sweepLimits(crit)
	// key: NaN sorts first, then ascending; ties by run index.
	less := func(a, b float64) (bool, bool) {
		na, nb := math.IsNaN(a), math.IsNaN(b)
		switch {
		case na && nb:
			return false, false
		case na:
			return true, true
		case nb:
			return false, true
		case a != b:
			return a < b, true
		}
		return false, false
	}
	sort.SliceStable(idx, func(i, j int) bool {
		ri, rj := &sd.Rows[idx[i]], &sd.Rows[idx[j]]
		if lim != nil {
			if l, ok := less(sweepMargin(ri, lim), sweepMargin(rj, lim)); ok {
				return l
			}
		} else {
			si, ok1 := statusRank[ri.Status]
			sj, ok2 := statusRank[rj.Status]
			if !ok1 {
				si = -1
			}
			if !ok2 {
				sj = -1
			}
			if si != sj {
				return si < sj
			}
			// Without a value (no curing layer) last.
			if l, ok := less(-ri.num(colCure), -rj.num(colCure)); ok {
				return !l
			}
		}
		return ri.Run < rj.Run
	})
	return idx
}

// sweepTable lists the rows idx in that order; a run that did not pass is
// marked failed.
func sweepTable(sd *sweepData, idx []int, crit *cases.Criteria) template.HTML {
	lim := sweepLimits(crit)
	head := append([]string{"run"}, sd.Keys...)
	head = append(head, "status", results.Heading(colCure), results.Heading(colPeak), results.Heading("max_spread_K"))
	flow := slices.Contains(sweepColumns(sd), colFlow)
	if flow {
		head = append(head, results.Heading(colFlow))
	}
	if lim != nil {
		head = append(head, "smallest margin")
	}
	head = append(head, "failed criteria, error, note")
	num := map[int]bool{}
	var rows [][]string
	for _, i := range idx {
		r := &sd.Rows[i]
		run := strconv.Itoa(r.Run)
		if !r.passed() {
			run = "!" + run
		}
		row := append([]string{run}, r.Vals...)
		row = append(row, r.Status, fmtCure(r.num(colCure)), fmtNum(r.num(colPeak), 1), fmtNum(r.num("max_spread_K"), 1))
		if flow {
			row = append(row, fmtNum(r.num(colFlow), 0))
		}
		if lim != nil {
			m := sweepMargin(r, lim)
			s := "n/a"
			if !math.IsNaN(m) && !math.IsInf(m, 0) {
				s = fmt.Sprintf("%+.1f %%", 100*m)
			}
			row = append(row, s)
		}
		var why []string
		for _, c := range results.SweepCriteria {
			if r.Pass[c] == "false" {
				why = append(why, c)
			}
		}
		if r.Error != "" {
			why = append(why, r.Error)
		}
		if r.Note != "" {
			why = append(why, "note: "+r.Note)
		}
		row = append(row, strings.Join(why, "; "))
		rows = append(rows, row)
	}
	for k := len(sd.Keys) + 2; k < len(head)-1; k++ {
		num[k] = true
	}
	return tableHTML(head, rows, num)
}

func fmtNum(v float64, dec int) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}
