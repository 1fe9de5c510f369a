package analysis

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"amplink/core/data"
	"amplink/core/dataset"
)

// covariateMatrix resolves the covariates of an analysis: covs[k][t] for
// trials t with every value present and numeric; keep lists those trials.
func covariateMatrix(path string, e *data.Epochs, names []string) (covs [][]float64, keep []int, err error) {
	for k, name := range names {
		if !dataset.HasColumn(e, name) {
			return nil, nil, ferr(fmt.Sprintf("%s.covariates[%d]", path, k), "no per-trial column %q; columns are: %s (pass a trials table with --trials, or use events.tsv columns)", name, strings.Join(dataset.TrialColumns(e), ", "))
		}
	}
	covs = make([][]float64, len(names))
	for t := range e.NTrials {
		vals := make([]float64, len(names))
		ok := true
		for k, name := range names {
			s, present := dataset.TrialValue(e, t, name)
			if !present || dataset.Missing(s) {
				ok = false
				break
			}
			v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, nil, ferr(fmt.Sprintf("%s.covariates[%d]", path, k), "trial %s has %q in column %s, not a number", dataset.TrialID(e, t), s, name)
			}
			vals[k] = v
		}
		if !ok {
			continue
		}
		keep = append(keep, t)
		for k := range names {
			covs[k] = append(covs[k], vals[k])
		}
	}
	return covs, keep, nil
}

// conditionTrials splits trials by the levels of a column.
func conditionTrials(path string, e *data.Epochs, c *Conditions) ([2][]int, error) {
	var out [2][]int
	if !dataset.HasColumn(e, c.Column) {
		return out, ferr(path+".conditions.column", "no per-trial column %q; columns are: %s", c.Column, strings.Join(dataset.TrialColumns(e), ", "))
	}
	levels := map[string]int{}
	for t := range e.NTrials {
		v, _ := dataset.TrialValue(e, t, c.Column)
		levels[v]++
		for i, l := range c.Compare {
			if v == l {
				out[i] = append(out[i], t)
			}
		}
	}
	for i, l := range c.Compare {
		if len(out[i]) == 0 {
			var have []string
			for k, n := range levels {
				have = append(have, fmt.Sprintf("%q (%d)", k, n))
			}
			sort.Strings(have)
			return out, ferr(fmt.Sprintf("%s.conditions.compare[%d]", path, i), "no trial has %s = %q; values are: %s", c.Column, l, strings.Join(have, ", "))
		}
	}
	return out, nil
}
