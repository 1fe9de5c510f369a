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

// Rows is how RowsHTML writes a slice of the table.
type Rows struct {
	Header []string
	Cols   []int
	// Group puts a heading row before each analysis's rows (the table in
	// its own order); Prev is the analysis of the row before the slice.
	Group bool
	Prev  string
	// Heads are the analyses' headings (their questions in words) and
	// Notes the line under each (which p the rows report).
	Heads, Notes map[string]string
}

// RowsHTML writes rows as <tr> elements of the escaped cells in columns
// cols, the text the page appends to the results table's body. Numbers are
// shown at a readable precision (Cell), with the full value in the cell's
// title; rows significant at the recipe's level are marked (Significant).
func RowsHTML(rows [][]string, o Rows) string {
	var b strings.Builder
	prev := o.Prev
	ac := index(o.Header, "analysis")
	for _, r := range rows {
		if o.Group && ac >= 0 && ac < len(r) && r[ac] != prev {
			prev = r[ac]
			b.WriteString(`<tr class="group"><th scope="colgroup" colspan="` + strconv.Itoa(len(o.Cols)) + `"><span class="gname">` + html.EscapeString(prev) + `</span> `)
			b.WriteString(html.EscapeString(o.Heads[prev]))
			if n := o.Notes[prev]; n != "" {
				b.WriteString(`<small>` + html.EscapeString(n) + `</small>`)
			}
			b.WriteString("</th></tr>")
		}
		sig, sigCol := Significant(o.Header, r)
		if sig {
			b.WriteString(`<tr class="sig">`)
		} else {
			b.WriteString("<tr>")
		}
		for _, c := range o.Cols {
			raw := ""
			if c < len(r) {
				raw = r[c]
			}
			name := ""
			if c < len(o.Header) {
				name = o.Header[c]
			}
			shown := Cell(name, raw)
			if shown != raw || idCols[name] && len(raw) > 10 {
				// a rounded number, or a name the narrow sticky column may cut
				b.WriteString(`<td title="` + html.EscapeString(raw) + `">`)
			} else {
				b.WriteString("<td>")
			}
			b.WriteString(html.EscapeString(shown))
			if sig && c == sigCol {
				b.WriteString(` <abbr class="mark" title="significant">✱</abbr>`)
			}
			b.WriteString("</td>")
		}
		b.WriteString("</tr>")
	}
	return b.String()
}

func index(h []string, name string) int {
	for i, c := range h {
		if c == name {
			return i
		}
	}
	return -1
}

// idCols are the identifying columns, which stay in view (narrow) when
// the table scrolls sideways.
var idCols = map[string]bool{"analysis": true, "type": true, "seed": true, "target": true}

// threeDecimals are the columns shown to 3 decimals: correlations and
// their intervals and differences.
var threeDecimals = map[string]bool{"r": true, "ci_lo": true, "ci_hi": true, "r_diff": true, "z_diff": true, "diff_z": true, "r_perm_mean": true}

// Cell is a results cell as the page shows it: r and its kin to 3
// decimals; p and q values to 3 significant digits, "< 0.0001" below
// that; other non-integer numbers (times, grid frequencies, t, masses) to
// at most 4 significant digits; text and integers as they are.
func Cell(col, s string) string {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return s
	}
	switch {
	case isPColumn(col):
		return PText(v)
	case threeDecimals[col]:
		t := strconv.FormatFloat(v, 'f', 3, 64)
		if t == "-0.000" {
			t = "0.000"
		}
		return t
	case v == math.Trunc(v) && math.Abs(v) < 1e15:
		return s
	}
	return strconv.FormatFloat(v, 'g', 4, 64)
}

func isPColumn(col string) bool {
	return col == "p" || col == "q" || strings.HasPrefix(col, "p_") && col != "p_method"
}

// PText shows a p value to 3 significant digits, "< 0.0001" below 0.0001.
func PText(v float64) string {
	if v < 0.0001 {
		return "< 0.0001"
	}
	// round to 3 significant digits first, so 0.99999 is 1.00, not 1.000
	v, _ = strconv.ParseFloat(strconv.FormatFloat(v, 'e', 2, 64), 64)
	d := 2 - int(math.Floor(math.Log10(v)))
	if d < 0 {
		d = 0
	}
	return strconv.FormatFloat(v, 'f', d, 64)
}

// Significant reports whether a row's test is significant and which column
// holds the value that says so: q when the analysis corrected for multiple
// tests, else the permutation, surrogate or cluster p, else p; below 1 −
// ci_level when the row has one (the level the recipe used), else 0.05
// (common practice).
func Significant(h []string, r []string) (bool, int) {
	alpha := 0.05
	if c := index(h, "ci_level"); c >= 0 && c < len(r) {
		if l, err := strconv.ParseFloat(r[c], 64); err == nil && l > 0 && l < 1 {
			alpha = 1 - l
		}
	}
	for _, name := range []string{"q", "p_cluster", "p_perm", "p_surr", "p"} {
		c := index(h, name)
		if c < 0 || c >= len(r) || r[c] == "" {
			continue
		}
		v, err := strconv.ParseFloat(r[c], 64)
		if err != nil {
			return false, -1
		}
		return v < alpha, c
	}
	return false, -1
}

// pWords says what each p_method means.
var pWords = map[string]string{
	"t":           "t approximation with n − 2 df (minus one per covariate)",
	"exact":       "exact permutation p for small n (p_exact)",
	"effective-n": "t on the effective sample size n_eff: n counts envelope samples, which are autocorrelated, so n_eff drives p",
	"trials-t":    "t-test of the per-trial Fisher z across trials",
	"fisher-z":    "Fisher z test of two independent correlations",
	"cluster":     "cluster-mass permutation p over the map",
}

// PNotes is the line under each analysis's heading: which p its rows
// report and why, and where the other p values are.
func (t Table) PNotes() map[string]string {
	ac, pm := t.Col("analysis"), t.Col("p_method")
	out := map[string]string{}
	seen := map[string]map[string]bool{}
	var order []string
	for _, r := range t.Rows {
		if ac < 0 || ac >= len(r) {
			continue
		}
		a := r[ac]
		if seen[a] == nil {
			seen[a] = map[string]bool{}
			order = append(order, a)
		}
		if pm >= 0 && pm < len(r) && r[pm] != "" {
			seen[a]["m:"+r[pm]] = true
		}
		for _, c := range []string{"p_perm", "p_surr", "p_exact", "q"} {
			if i := t.Col(c); i >= 0 && i < len(r) && r[i] != "" {
				seen[a][c] = true
			}
		}
	}
	for _, a := range order {
		var parts []string
		var methods []string
		for k := range seen[a] {
			if m, ok := strings.CutPrefix(k, "m:"); ok {
				methods = append(methods, m)
			}
		}
		sort.Strings(methods)
		for _, m := range methods {
			w := pWords[m]
			if w == "" {
				w = m
			}
			parts = append(parts, "p: "+w)
		}
		if seen[a]["p_perm"] {
			parts = append(parts, "p_perm: permutation p (trials re-paired)")
		}
		if seen[a]["p_surr"] {
			parts = append(parts, "p_surr: surrogate p (envelopes shifted in time or trials re-paired)")
		}
		if seen[a]["q"] {
			parts = append(parts, "q: corrected for the analysis's tests; ✱ marks q below the level")
		} else {
			parts = append(parts, "✱ marks p below the level")
		}
		out[a] = strings.Join(parts, " · ")
	}
	return out
}
