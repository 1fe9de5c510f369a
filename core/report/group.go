package report

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"amplink/core/stats"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Recording values that mark group rows rather than one recording's rows.
const (
	GroupRecording = "group"  // the recording value of a pooled row
	GroupPrefix    = "group:" // the prefix of per-group and difference rows
)

// zClamp keeps atanh finite: |r| is clamped to 1 − 1e−15 before the
// transform, so r = ±1 gives z ≈ ±17.6 rather than ±Inf.
const zClamp = 1 - 1e-15

// TestID identifies one test across recordings: the analysis, its type,
// the seed and target, the method, and the condition when the analysis
// splits trials by condition (empty otherwise).
type TestID struct {
	Analysis, Type, Seed, Target, Method, Condition string
}

// String gives the test as "a1 trial-window C4→P3 spearman", with
// " [condition]" after it when there is one.
func (id TestID) String() string {
	s := fmt.Sprintf("%s %s %s→%s %s", id.Analysis, id.Type, id.Seed, id.Target, id.Method)
	if id.Condition != "" {
		s += " [" + id.Condition + "]"
	}
	return s
}

// ID returns the test the row belongs to.
func (r *Row) ID() TestID {
	c, _ := r.Lookup("condition")
	return TestID{Analysis: r.Analysis, Type: r.Type, Seed: r.Seed, Target: r.Target, Method: r.Method, Condition: c}
}

// Lookup returns the value of the extra field name and whether the row has it.
func (r *Row) Lookup(name string) (string, bool) {
	for _, f := range r.Extra {
		if f.Name == name {
			return f.Value, true
		}
	}
	return "", false
}

// Recording returns the row's "recording" field, empty when it has none.
func (r *Row) Recording() string {
	v, _ := r.Lookup("recording")
	return v
}

// IsGroupRow reports whether the row was made by GroupRows: its recording
// is "group" or starts with "group:".
func (r *Row) IsGroupRow() bool {
	rec := r.Recording()
	return rec == GroupRecording || strings.HasPrefix(rec, GroupPrefix)
}

// Groupable reports whether GroupRows pools the row across recordings: a
// trial-window or envelope row that holds a correlation of its own. Map
// cluster rows (tf-map), comodulogram peaks (a maximum picked from a map)
// and within-recording condition-difference rows (p_method "fisher-z",
// which carry a z statistic and no r) are not pooled, nor are group rows.
func (r *Row) Groupable() bool {
	if r.Type != "trial-window" && r.Type != "envelope" {
		return false
	}
	if pm, _ := r.Lookup("p_method"); pm == "fisher-z" {
		return false
	}
	return !r.IsGroupRow()
}

// groupTest collects one test's Fisher z values over recordings.
type groupTest struct {
	id    TestID
	recs  []int32   // recordings with a finite r (Pooler.names), in row order
	z     []float64 // atanh r, clamped, aligned with recs
	undef []int32   // recordings whose r is undefined

	// The check for a test given twice in one recording: rows of every
	// recording seen so far, which is only looked up (and only built) when
	// a row's recording is not newer than every recording the test has.
	maxRec int32
	rows   []seenRow
	byRec  map[int32]int
}

type seenRow struct {
	rec int32
	row int // 1-based row number
}

// Pooler collects per-recording rows one at a time, so that a caller can
// pool rows it never holds all at once (amplink merge reads one table at a
// time). Rows then gives the rows GroupRows gives for the same rows in the
// same order. It keeps, per test, the recordings and their z values.
type Pooler struct {
	tests    []*groupTest
	index    map[TestID]int   // test → position in tests
	recIndex map[string]int32 // recording → position in names
	names    []string         // recordings, in order of their first groupable row
	method   map[string]string
	n        int // rows added
	err      error
}

// NewPooler returns an empty Pooler.
func NewPooler() *Pooler {
	return &Pooler{index: map[TestID]int{}, recIndex: map[string]int32{}, method: map[string]string{}}
}

// Add adds the next row. Rows that are not Groupable only count, so that
// error messages number rows as GroupRows does. The first error (a
// groupable row without a recording, the same test twice in one recording,
// an r outside [−1, 1]) is kept, later rows are ignored, and Rows returns it.
func (p *Pooler) Add(row *Row) {
	p.n++
	if p.err != nil || !row.Groupable() {
		return
	}
	id := row.ID()
	rec, ok := row.Lookup("recording")
	if !ok || rec == "" {
		p.err = fmt.Errorf("group: row %d (%s): no recording", p.n, id)
		return
	}
	if _, seen := p.method[row.Analysis]; !seen {
		c, _ := row.Lookup("correction")
		p.method[row.Analysis] = strings.ToLower(c)
	}
	ti, ok := p.index[id]
	if !ok {
		ti = len(p.tests)
		p.index[id] = ti
		p.tests = append(p.tests, &groupTest{id: id, maxRec: -1})
	}
	gt := p.tests[ti]
	ri, ok := p.recIndex[rec]
	if !ok {
		ri = int32(len(p.names))
		p.recIndex[rec] = ri
		p.names = append(p.names, rec)
	}
	if ri <= gt.maxRec {
		if gt.byRec == nil {
			gt.byRec = make(map[int32]int, len(gt.rows))
			for _, s := range gt.rows {
				gt.byRec[s.rec] = s.row
			}
		}
		if prev, dup := gt.byRec[ri]; dup {
			p.err = fmt.Errorf("group: recording %q has test %s twice (rows %d and %d)", rec, id, prev, p.n)
			return
		}
	}
	gt.maxRec = max(gt.maxRec, ri)
	gt.rows = append(gt.rows, seenRow{ri, p.n})
	if gt.byRec != nil {
		gt.byRec[ri] = p.n
	}
	r := row.R
	switch {
	case math.IsNaN(r) || math.IsInf(r, 0):
		gt.undef = append(gt.undef, ri)
	case math.Abs(r) > 1:
		p.err = fmt.Errorf("group: recording %q, test %s: r = %v is outside [-1, 1]", rec, id, r)
	default:
		gt.recs = append(gt.recs, ri)
		gt.z = append(gt.z, math.Atanh(math.Max(-zClamp, math.Min(zClamp, r))))
	}
}

// GroupRows pools per-recording rows into group-level rows. rows come from
// several recordings, each row carrying an extra field "recording"; rows
// that are not Groupable are ignored. For each test (TestID), in the order
// tests first appear in rows, and over the k recordings whose r is finite:
//
//	z_i = atanh(r_i)   (|r_i| clamped to 1 − 1e−15; Fisher 1921)
//	r   = tanh(z̄)
//	t   = z̄ / (s/√k),  df = k − 1,  p = 2·P(T_df ≥ |t|)   (stats.OneSampleT)
//	CI  = [tanh(z̄ − c·s/√k), tanh(z̄ + c·s/√k)],  c = t_{k−1}⁻¹((1 + level)/2)
//
// with s the sample standard deviation of the z_i. The row has recording
// "group", n = k, p_method "group-t", and fields df, t, ci_lo, ci_hi,
// ci_level and note. Recordings with an undefined r are left out and
// counted in the note. p and the interval are empty when k < 2 or all z_i
// are equal.
//
// groups, when not empty, maps each recording to a group label; the
// recordings must carry exactly two labels A < B (in byte order). Each
// test then also gets a row per group (recording "group:A", "group:B",
// the same statistics over that group's recordings) and a difference row
// (recording "group:A-B"): r empty, n = k_A + k_B, diff_z = z̄_A − z̄_B,
// and Welch's (1947) t on the two sets of z values (stats.WelchT), with
// p_method "welch-t" and the Welch–Satterthwaite df.
//
// When the recordings' rows of an analysis name a correction (fdr or
// bonferroni), its group rows get q and correction too, each family
// corrected on its own: the pooled rows, each group's rows, and the
// difference rows (correctGroupRows).
//
// level is the interval's coverage, in (0, 1), for example 0.95. An error
// is returned for a bad level, a groupable row without a recording, the
// same test twice in one recording, an r outside [−1, 1], a recording
// without a group, or a number of group labels other than two.
func GroupRows(rows []Row, groups map[string]string, level float64) ([]Row, error) {
	if !(level > 0 && level < 1) {
		return nil, fmt.Errorf("group: level %v is not in (0, 1)", level)
	}
	p := NewPooler()
	for i := range rows {
		p.Add(&rows[i])
	}
	return p.Rows(groups, level)
}

// Rows returns the group rows of the rows added so far, as GroupRows does,
// or the first error Add met.
func (p *Pooler) Rows(groups map[string]string, level float64) ([]Row, error) {
	if !(level > 0 && level < 1) {
		return nil, fmt.Errorf("group: level %v is not in (0, 1)", level)
	}
	if p.err != nil {
		return nil, p.err
	}
	var labels []string
	var recGroup []int // recording → 0 or 1
	if len(groups) > 0 {
		set := map[string]bool{}
		for _, rec := range p.names {
			l, ok := groups[rec]
			if !ok {
				return nil, fmt.Errorf("group: recording %q has no group", rec)
			}
			set[l] = true
		}
		for l := range set {
			labels = append(labels, l)
		}
		sort.Strings(labels)
		if len(labels) != 2 {
			return nil, fmt.Errorf("group: need exactly two group labels, found %d: %s", len(labels), quoteList(labels))
		}
		recGroup = make([]int, len(p.names))
		for i, rec := range p.names {
			recGroup[i] = labelIndex(labels, groups[rec])
		}
	}
	var out []Row
	for _, gt := range p.tests {
		out = append(out, pooledRow(gt, gt.z, len(gt.undef), GroupRecording, "", level))
		if labels == nil {
			continue
		}
		var zs [2][]float64
		var undef [2]int
		for i, rec := range gt.recs {
			g := recGroup[rec]
			zs[g] = append(zs[g], gt.z[i])
		}
		for _, rec := range gt.undef {
			undef[recGroup[rec]]++
		}
		for g := range 2 {
			out = append(out, pooledRow(gt, zs[g], undef[g], GroupPrefix+labels[g], labels[g], level))
		}
		out = append(out, diffRow(gt, labels, zs, undef))
	}
	correctGroupRows(p.method, out)
	return out, nil
}

func labelIndex(labels []string, l string) int {
	if l == labels[0] {
		return 0
	}
	return 1
}

func quoteList(ss []string) string {
	q := make([]string, len(ss))
	for i, s := range ss {
		q[i] = strconv.Quote(s)
	}
	return strings.Join(q, ", ")
}

func plural(n int, one, many string) string {
	if n == 1 {
		return fmt.Sprintf("%d %s", n, one)
	}
	return fmt.Sprintf("%d %s", n, many)
}

// leftOut is the note on recordings with an undefined r.
func leftOut(undef, k int) string {
	if undef == 0 {
		return ""
	}
	verb := "were"
	if undef == 1 {
		verb = "was"
	}
	return fmt.Sprintf("; %d of %d recordings had an undefined r and %s left out", undef, undef+k, verb)
}

func baseRow(id TestID, rec string) Row {
	row := Row{Analysis: id.Analysis, Type: id.Type, Seed: id.Seed, Target: id.Target, Method: id.Method, R: math.NaN(), P: math.NaN()}
	row.Extra = append(row.Extra, Field{Name: "recording", Value: rec})
	if id.Condition != "" {
		row.Extra = append(row.Extra, Field{Name: "condition", Value: id.Condition})
	}
	return row
}

// pooledRow is the one-sample row over z; label is empty for all recordings.
func pooledRow(gt *groupTest, z []float64, undef int, rec, label string, level float64) Row {
	row := baseRow(gt.id, rec)
	k := len(z)
	row.N = k
	t, df, lo, hi := math.NaN(), math.NaN(), math.NaN(), math.NaN()
	if k > 0 {
		m := stat.Mean(z, nil)
		row.R = math.Tanh(m)
		t, df, row.P = stats.OneSampleT(z)
		if !math.IsNaN(row.P) {
			se := stat.StdDev(z, nil) / math.Sqrt(float64(k))
			c := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: df}.Quantile((1 + level) / 2)
			lo, hi = math.Tanh(m-c*se), math.Tanh(m+c*se)
		}
	}
	note := plural(k, "recording", "recordings")
	if label != "" {
		note += " in group " + label
	}
	note += "; mean Fisher z" + leftOut(undef, k)
	switch {
	case k == 0:
		note += "; undefined: no recording has a defined r"
	case math.IsNaN(row.P):
		note += "; p and interval need at least 2 recordings whose r differ"
	}
	row.Extra = append(row.Extra,
		Field{Name: "df", Value: Num(df)},
		Field{Name: "t", Value: Num(t)},
		Field{Name: "ci_lo", Value: Num(lo)},
		Field{Name: "ci_hi", Value: Num(hi)},
		Field{Name: "ci_level", Value: Num(level)},
		Field{Name: "p_method", Value: "group-t"},
		Field{Name: "note", Value: note},
	)
	return row
}

// diffRow is the Welch row comparing the two groups' z values.
func diffRow(gt *groupTest, labels []string, zs [2][]float64, undef [2]int) Row {
	row := baseRow(gt.id, GroupPrefix+labels[0]+"-"+labels[1])
	row.N = len(zs[0]) + len(zs[1])
	dz := math.NaN()
	if len(zs[0]) > 0 && len(zs[1]) > 0 {
		dz = stat.Mean(zs[0], nil) - stat.Mean(zs[1], nil)
	}
	t, df, p := stats.WelchT(zs[0], zs[1])
	row.P = p
	note := fmt.Sprintf("mean Fisher z of %s (%s) minus %s (%s); Welch t", labels[0], plural(len(zs[0]), "recording", "recordings"), labels[1], plural(len(zs[1]), "recording", "recordings"))
	if u := undef[0] + undef[1]; u > 0 {
		note += leftOut(u, row.N)
	}
	if math.IsNaN(p) {
		note += "; p needs at least 2 recordings per group and some spread"
	}
	row.Extra = append(row.Extra,
		Field{Name: "df", Value: Num(df)},
		Field{Name: "t", Value: Num(t)},
		Field{Name: "diff_z", Value: Num(dz)},
		Field{Name: "p_method", Value: "welch-t"},
		Field{Name: "note", Value: note},
	)
	return row
}
