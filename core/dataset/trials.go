package dataset

import (
	"fmt"
	"sort"
	"strconv"
	"strings"

	"amplink/core/data"
	"amplink/core/format/csv"
)

// TrialID returns the id of trial t: the epoched file's own id when it has
// one (the trial column of an epoched CSV), else the 1-based trial number.
func TrialID(e *data.Epochs, t int) string {
	if e.TrialInfo != nil {
		if id := e.TrialInfo[t].Extra["trial"]; id != "" {
			return id
		}
	}
	return strconv.Itoa(t + 1)
}

// AttachTrials adds the columns of a trials table (trial,<name>...) to the
// epochs' per-trial records, matching rows by TrialID. Trials the table does
// not list get no value (they are left out of analyses that use the column).
func (ds *Dataset) AttachTrials(t *csv.Table, name string) error {
	e := ds.Epochs
	if e == nil {
		return fmt.Errorf("%s: a trials table needs epochs: add an \"epochs\" block to the recipe", name)
	}
	if e.TrialInfo == nil {
		e.TrialInfo = make([]data.Event, e.NTrials)
	}
	byID := map[string][]string{}
	for _, r := range t.Rows {
		byID[r[0]] = r
	}
	matched := 0
	for i := range e.NTrials {
		row := byID[TrialID(e, i)]
		if row == nil {
			continue
		}
		matched++
		ev := &e.TrialInfo[i]
		extra := make(map[string]string, len(ev.Extra)+len(t.Columns))
		for k, v := range ev.Extra {
			extra[k] = v
		}
		for j, c := range t.Columns[1:] {
			extra[c] = row[j+1]
		}
		ev.Extra = extra
	}
	if matched == 0 {
		return fmt.Errorf("%s: no row matches a trial id of %s (ids are %s, …)", name, ds.Name, TrialID(e, 0))
	}
	ds.Notes = append(ds.Notes, fmt.Sprintf("%s: values for %d of %d trials", name, matched, e.NTrials))
	return nil
}

// TrialColumns lists the per-trial columns available, for messages.
func TrialColumns(e *data.Epochs) []string {
	set := map[string]bool{"trial": true}
	if e.TrialInfo != nil {
		set["trial_type"] = true
		for _, ev := range e.TrialInfo {
			for k := range ev.Extra {
				set[k] = true
			}
		}
	}
	var out []string
	for k := range set {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// TrialValue returns trial t's value of a column: "trial" is the 1-based
// trial number (for slow drifts over the session), "trial_type" the event
// type, anything else an extra events.tsv or trials-table column.
func TrialValue(e *data.Epochs, t int, col string) (string, bool) {
	switch col {
	case "trial":
		return strconv.Itoa(t + 1), true
	case "trial_type":
		if e.TrialInfo == nil {
			return "", false
		}
		return e.TrialInfo[t].Type, true
	}
	if e.TrialInfo == nil {
		return "", false
	}
	v, ok := e.TrialInfo[t].Extra[col]
	return v, ok
}

// HasColumn reports whether any trial of e has a value in column col.
func HasColumn(e *data.Epochs, col string) bool {
	for t := range e.NTrials {
		if _, ok := TrialValue(e, t, col); ok {
			return true
		}
	}
	return false
}

// Missing reports a value that leaves a trial out.
func Missing(v string) bool {
	v = strings.TrimSpace(v)
	return v == "" || strings.EqualFold(v, "n/a") || strings.EqualFold(v, "nan") || strings.EqualFold(v, "na")
}
