package app

import (
	"encoding/csv"
	"fmt"
	"html"
	"math"
	"sort"
	"strconv"
	"strings"

	"amplink/core/report"
)

// Table is the results table as results.csv has it: the header row and the
// data rows, as text.
type Table struct {
	Header []string
	Rows   [][]string
}

// ParseTable reads results.csv text.
func ParseTable(csvText string) (Table, error) {
	r := csv.NewReader(strings.NewReader(csvText))
	recs, err := r.ReadAll()
	if err != nil {
		return Table{}, fmt.Errorf("results.csv: %w", err)
	}
	if len(recs) == 0 {
		return Table{}, fmt.Errorf("results.csv: no header row")
	}
	for _, rec := range recs {
		for i, c := range rec {
			rec[i] = report.UnquoteCell(c) // the table shows the names, not the spreadsheet guard
		}
	}
	return Table{Header: recs[0], Rows: recs[1:]}, nil
}

// Col returns the index of the named column, or −1.
func (t Table) Col(name string) int {
	for i, h := range t.Header {
		if h == name {
			return i
		}
	}
	return -1
}

// Sorted returns the rows ordered by column col: numerically when both
// cells are numbers (empty cells, which mean undefined, go last), otherwise
// as text; ties keep the original order. desc reverses the order of
// non-empty cells.
func (t Table) Sorted(col int, desc bool) [][]string {
	out := make([][]string, len(t.Rows))
	copy(out, t.Rows)
	if col < 0 || col >= len(t.Header) {
		return out
	}
	cell := func(r []string) string {
		if col < len(r) {
			return r[col]
		}
		return ""
	}
	sort.SliceStable(out, func(i, j int) bool {
		a, b := cell(out[i]), cell(out[j])
		if a == "" || b == "" {
			return a != "" && b == ""
		}
		fa, ea := strconv.ParseFloat(a, 64)
		fb, eb := strconv.ParseFloat(b, 64)
		if ea == nil && eb == nil && !math.IsNaN(fa) && !math.IsNaN(fb) {
			if fa == fb {
				return false
			}
			return (fa < fb) != desc
		}
		if a == b {
			return false
		}
		return (a < b) != desc
	})
	return out
}

// resultsBody is the id of the results table's body.
const resultsBody = "results-body"

// detailCols are the results columns the page leaves out unless asked for
// every column: settings repeated on every row of an analysis (its windows
// and bands, which the form shows) and bookkeeping. results.csv always has
// them all.
var detailCols = map[string]bool{
	"seed_from_s": true, "seed_to_s": true, "seed_low_hz": true, "seed_high_hz": true,
	"target_from_s": true, "target_to_s": true, "target_low_hz": true, "target_high_hz": true,
	"band_low_hz": true, "band_high_hz": true, "target_band_low_hz": true, "target_band_high_hz": true,
	"df": true, "p_method": true, "permutations": true, "correction": true, "ci_level": true,
	"cluster_forming_t": true, "leakage_correction": true, "over": true, "envelope_rate": true,
	"edge_discard_s": true, "surrogates": true,
}

// Visible lists the columns the page shows, in table order: every column
// when all is set, otherwise the fixed first eight and every other column
// that is not a detail column and has a value in some row.
func (t Table) Visible(all bool) []int {
	var out []int
	for i, h := range t.Header {
		if all || i < fixedCols {
			out = append(out, i)
			continue
		}
		if detailCols[h] {
			continue
		}
		for _, r := range t.Rows {
			if i < len(r) && r[i] != "" {
				out = append(out, i)
				break
			}
		}
	}
	return out
}

// fixedCols is how many columns every results table starts with (analysis,
// type, seed, target, method, n, r, p).
const fixedCols = 8

// RowsHTML writes rows as <tr> elements of the escaped cells in columns
// cols, the text the page appends to the results table's body.
func RowsHTML(rows [][]string, cols []int) string {
	var b strings.Builder
	for _, r := range rows {
		b.WriteString("<tr>")
		for _, c := range cols {
			b.WriteString("<td>")
			if c < len(r) {
				b.WriteString(html.EscapeString(r[c]))
			}
			b.WriteString("</td>")
		}
		b.WriteString("</tr>")
	}
	return b.String()
}
