package report

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// groupRef mirrors testdata/group/ref.json, written by
// testdata/group/make_ref.py (scipy 1.10.1, numpy 1.24.2).
type groupRef struct {
	Scipy string `json:"scipy"`
	Cases []struct {
		Name       string            `json:"name"`
		Level      float64           `json:"level"`
		Recordings []string          `json:"recordings"`
		R          []*float64        `json:"r"`
		Groups     map[string]string `json:"groups"`
		Group      refStats          `json:"group"`
		ByGroup    []refStats        `json:"by_group"`
		Diff       *struct {
			N      int      `json:"n"`
			DiffZ  float64  `json:"diff_z"`
			T      float64  `json:"t"`
			DF     float64  `json:"df"`
			P      float64  `json:"p"`
			Labels []string `json:"labels"`
		} `json:"diff"`
	} `json:"cases"`
}

type refStats struct {
	Label string  `json:"label"`
	N     int     `json:"n"`
	R     float64 `json:"r"`
	T     float64 `json:"t"`
	DF    float64 `json:"df"`
	P     float64 `json:"p"`
	CILo  float64 `json:"ci_lo"`
	CIHi  float64 `json:"ci_hi"`
}

func loadGroupRef(t *testing.T) groupRef {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "group", "ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref groupRef
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) == 0 {
		t.Fatal("ref.json has no cases")
	}
	return ref
}

func recRow(analysis, typ, seed, target, rec string, r float64, extra ...Field) Row {
	row := Row{Analysis: analysis, Type: typ, Seed: seed, Target: target, Method: "spearman", N: 40, R: r, P: 0.5}
	row.Extra = append(append([]Field(nil), extra...), Field{Name: "recording", Value: rec})
	return row
}

func fieldNum(t *testing.T, row Row, name string) float64 {
	t.Helper()
	v, ok := row.Lookup(name)
	if !ok {
		t.Fatalf("row %s (%s) has no field %q", row.ID(), row.Recording(), name)
	}
	if v == "" {
		return math.NaN()
	}
	f, err := strconv.ParseFloat(v, 64)
	if err != nil {
		t.Fatalf("field %s = %q: %v", name, v, err)
	}
	return f
}

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > tol {
		t.Errorf("%s = %.15g, want %.15g (±%g)", what, got, want, tol)
	}
}

func checkPooled(t *testing.T, row Row, want refStats, sign float64) {
	t.Helper()
	const tol = 1e-10
	if row.N != want.N {
		t.Errorf("%s n = %d, want %d", row.Recording(), row.N, want.N)
	}
	near(t, row.Recording()+" r", row.R, sign*want.R, tol)
	near(t, row.Recording()+" p", row.P, want.P, tol)
	near(t, row.Recording()+" t", fieldNum(t, row, "t"), sign*want.T, tol)
	near(t, row.Recording()+" df", fieldNum(t, row, "df"), want.DF, tol)
	lo, hi := want.CILo, want.CIHi
	if sign < 0 {
		lo, hi = -hi, -lo
	}
	near(t, row.Recording()+" ci_lo", fieldNum(t, row, "ci_lo"), lo, tol)
	near(t, row.Recording()+" ci_hi", fieldNum(t, row, "ci_hi"), hi, tol)
	if pm, _ := row.Lookup("p_method"); pm != "group-t" {
		t.Errorf("%s p_method = %q, want group-t", row.Recording(), pm)
	}
}

// TestGroupRowsScipy checks pooled r, the one-sample t on Fisher z, its
// t interval and the Welch comparison against scipy
// (testdata/group/make_ref.py: ttest_1samp, t.ppf, ttest_ind(equal_var=False)).
// A second test with every r negated checks the sign symmetry of the same
// references (r, t and the interval flip, p stays).
func TestGroupRowsScipy(t *testing.T) {
	ref := loadGroupRef(t)
	for _, c := range ref.Cases {
		t.Run(c.Name, func(t *testing.T) {
			var rows []Row
			for i, rec := range c.Recordings {
				r := math.NaN()
				if c.R[i] != nil {
					r = *c.R[i]
				}
				rows = append(rows,
					recRow("a1", "trial-window", "C4", "P3", rec, r),
					// Not pooled: a comodulogram peak and a tf-map cluster row.
					recRow("a3", "comodulogram", "C3", "C4", rec, 0.9),
					recRow("a4", "tf-map", "C4", "cluster 1", rec, 0.8),
					recRow("a2", "envelope", "O1", "O2", rec, -r),
				)
			}
			out, err := GroupRows(rows, c.Groups, c.Level)
			if err != nil {
				t.Fatal(err)
			}
			per := 1
			if c.Groups != nil {
				per = 4
			}
			if len(out) != 2*per {
				t.Fatalf("got %d group rows, want %d", len(out), 2*per)
			}
			for k, want := range []struct {
				id   TestID
				sign float64
			}{
				{TestID{"a1", "trial-window", "C4", "P3", "spearman", ""}, 1},
				{TestID{"a2", "envelope", "O1", "O2", "spearman", ""}, -1},
			} {
				rs := out[k*per : (k+1)*per]
				for _, row := range rs {
					if row.ID() != want.id {
						t.Fatalf("row %s, want test %s", row.ID(), want.id)
					}
				}
				if rs[0].Recording() != "group" {
					t.Errorf("first row recording %q, want group", rs[0].Recording())
				}
				checkPooled(t, rs[0], c.Group, want.sign)
				if c.Groups == nil {
					continue
				}
				for g := range 2 {
					bg := c.ByGroup[g]
					if rec := rs[1+g].Recording(); rec != "group:"+bg.Label {
						t.Errorf("row %d recording %q, want group:%s", 1+g, rec, bg.Label)
					}
					checkPooled(t, rs[1+g], bg, want.sign)
				}
				d := rs[3]
				if rec, w := d.Recording(), "group:"+c.Diff.Labels[0]+"-"+c.Diff.Labels[1]; rec != w {
					t.Errorf("diff recording %q, want %q", rec, w)
				}
				if d.N != c.Diff.N || !math.IsNaN(d.R) {
					t.Errorf("diff n = %d r = %v, want %d and NaN", d.N, d.R, c.Diff.N)
				}
				near(t, "diff p", d.P, c.Diff.P, 1e-10)
				near(t, "diff_z", fieldNum(t, d, "diff_z"), want.sign*c.Diff.DiffZ, 1e-10)
				near(t, "diff t", fieldNum(t, d, "t"), want.sign*c.Diff.T, 1e-10)
				near(t, "diff df", fieldNum(t, d, "df"), c.Diff.DF, 1e-10)
				if pm, _ := d.Lookup("p_method"); pm != "welch-t" {
					t.Errorf("diff p_method = %q, want welch-t", pm)
				}
			}
		})
	}
}

// TestGroupRowsNotes checks the bookkeeping that the scipy cases do not:
// notes, left-out recordings, conditions, and the undefined cases.
func TestGroupRowsNotes(t *testing.T) {
	nan := math.NaN()
	cond := func(c string) Field { return Field{Name: "condition", Value: c} }
	tests := []struct {
		name   string
		rows   []Row
		groups map[string]string
		want   []string // recording|condition|n|r empty?|p empty?|note per output row
	}{
		{
			name: "one undefined left out",
			rows: []Row{recRow("a", "envelope", "X", "Y", "1.edf", 0.2), recRow("a", "envelope", "X", "Y", "2.edf", nan), recRow("a", "envelope", "X", "Y", "3.edf", 0.4)},
			want: []string{"group||2|r|p|2 recordings; mean Fisher z; 1 of 3 recordings had an undefined r and was left out"},
		},
		{
			name: "a single recording has no p",
			rows: []Row{recRow("a", "envelope", "X", "Y", "1.edf", 0.2)},
			want: []string{"group||1|r||1 recording; mean Fisher z; p and interval need at least 2 recordings whose r differ"},
		},
		{
			name: "all undefined",
			rows: []Row{recRow("a", "envelope", "X", "Y", "1.edf", nan), recRow("a", "envelope", "X", "Y", "2.edf", nan)},
			want: []string{"group||0|||0 recordings; mean Fisher z; 2 of 2 recordings had an undefined r and were left out; undefined: no recording has a defined r"},
		},
		{
			name: "conditions are separate tests; condition differences are skipped",
			rows: []Row{
				recRow("c", "trial-window", "S", "T", "1.edf", 0.1, cond("go")), recRow("c", "trial-window", "S", "T", "1.edf", 0.3, cond("stop")),
				recRow("c", "trial-window", "S", "T", "1.edf", nan, cond("go-stop"), Field{Name: "p_method", Value: "fisher-z"}),
				recRow("c", "trial-window", "S", "T", "2.edf", 0.2, cond("go")), recRow("c", "trial-window", "S", "T", "2.edf", 0.5, cond("stop")),
				recRow("c", "trial-window", "S", "T", "2.edf", nan, cond("go-stop"), Field{Name: "p_method", Value: "fisher-z"}),
			},
			want: []string{"group|go|2|r|p|2 recordings; mean Fisher z", "group|stop|2|r|p|2 recordings; mean Fisher z"},
		},
		{
			name:   "groups with one recording each",
			rows:   []Row{recRow("a", "envelope", "X", "Y", "1.edf", 0.2), recRow("a", "envelope", "X", "Y", "2.edf", 0.4), recRow("a", "envelope", "X", "Y", "3.edf", 0.5)},
			groups: map[string]string{"1.edf": "old", "2.edf": "young", "3.edf": "young", "9.edf": "old"},
			want: []string{
				"group||3|r|p|3 recordings; mean Fisher z",
				"group:old||1|r||1 recording in group old; mean Fisher z; p and interval need at least 2 recordings whose r differ",
				"group:young||2|r|p|2 recordings in group young; mean Fisher z",
				"group:old-young||3||| mean Fisher z of old (1 recording) minus young (2 recordings); Welch t; p needs at least 2 recordings per group and some spread",
			},
		},
		{
			name: "earlier group rows are ignored",
			rows: []Row{recRow("a", "envelope", "X", "Y", "1.edf", 0.2), recRow("a", "envelope", "X", "Y", "group", 0.9), recRow("a", "envelope", "X", "Y", "group:x", 0.9), recRow("a", "envelope", "X", "Y", "2.edf", 0.3)},
			want: []string{"group||2|r|p|2 recordings; mean Fisher z"},
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out, err := GroupRows(tc.rows, tc.groups, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			var got []string
			for _, row := range out {
				c, _ := row.Lookup("condition")
				note, _ := row.Lookup("note")
				re, pe := "", ""
				if !math.IsNaN(row.R) {
					re = "r"
				}
				if !math.IsNaN(row.P) {
					pe = "p"
				}
				sep := "|"
				if strings.HasPrefix(note, "mean Fisher z of") {
					sep = "| "
				}
				got = append(got, row.Recording()+"|"+c+"|"+strconv.Itoa(row.N)+"|"+re+"|"+pe+sep+note)
			}
			if strings.Join(got, "\n") != strings.Join(tc.want, "\n") {
				t.Errorf("got\n%s\nwant\n%s", strings.Join(got, "\n"), strings.Join(tc.want, "\n"))
			}
		})
	}
}

func TestGroupRowsErrors(t *testing.T) {
	ok := []Row{recRow("a", "envelope", "X", "Y", "1.edf", 0.2), recRow("a", "envelope", "X", "Y", "2.edf", 0.3), recRow("a", "envelope", "X", "Y", "3.edf", 0.4)}
	tests := []struct {
		name   string
		rows   []Row
		groups map[string]string
		level  float64
		want   string
	}{
		{"level 0", ok, nil, 0, "group: level 0 is not in (0, 1)"},
		{"level 1", ok, nil, 1, "group: level 1 is not in (0, 1)"},
		{"level NaN", ok, nil, math.NaN(), "group: level NaN is not in (0, 1)"},
		{"no recording", []Row{{Analysis: "a", Type: "envelope", Seed: "X", Target: "Y", Method: "pearson", R: 0.1}}, nil, 0.95,
			"group: row 1 (a envelope X→Y pearson): no recording"},
		{"twice", append(append([]Row(nil), ok...), recRow("a", "envelope", "X", "Y", "2.edf", 0.5)), nil, 0.95,
			`group: recording "2.edf" has test a envelope X→Y spearman twice (rows 2 and 4)`},
		{"twice, recordings out of order", []Row{recRow("a", "envelope", "X", "B", "2.edf", 0.1), recRow("a", "envelope", "X", "A", "1.edf", 0.2),
			recRow("a", "envelope", "X", "A", "2.edf", 0.3), recRow("a", "envelope", "X", "B", "1.edf", 0.4), recRow("a", "envelope", "X", "B", "2.edf", 0.5)}, nil, 0.95,
			`group: recording "2.edf" has test a envelope X→B spearman twice (rows 1 and 5)`},
		{"r out of range", []Row{recRow("a", "envelope", "X", "Y", "1.edf", 1.5)}, nil, 0.95,
			`group: recording "1.edf", test a envelope X→Y spearman: r = 1.5 is outside [-1, 1]`},
		{"no group", ok, map[string]string{"1.edf": "a", "2.edf": "b"}, 0.95, `group: recording "3.edf" has no group`},
		{"three labels", ok, map[string]string{"1.edf": "a", "2.edf": "b", "3.edf": "c"}, 0.95,
			`group: need exactly two group labels, found 3: "a", "b", "c"`},
		{"one label", ok, map[string]string{"1.edf": "a", "2.edf": "a", "3.edf": "a", "x": "b"}, 0.95,
			`group: need exactly two group labels, found 1: "a"`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := GroupRows(tc.rows, tc.groups, tc.level)
			if err == nil || err.Error() != tc.want {
				t.Errorf("error %v, want %q", err, tc.want)
			}
		})
	}
}

// TestGroupRowsInterleaved gives the rows test by test, so that each test
// meets recordings that are not new overall: no test is taken for given
// twice, and each pools all of its recordings.
func TestGroupRowsInterleaved(t *testing.T) {
	var rows []Row
	for k, tgt := range []string{"A", "B", "C"} {
		for i := range 5 {
			rec := strconv.Itoa((i*3+k)%5) + ".edf"
			rows = append(rows, recRow("a", "envelope", "X", tgt, rec, 0.1*float64(i)))
		}
	}
	out, err := GroupRows(rows, nil, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if len(out) != 3 {
		t.Fatalf("%d group rows, want 3", len(out))
	}
	for _, r := range out {
		if r.N != 5 {
			t.Errorf("%s pools %d recordings, want 5", r.ID(), r.N)
		}
	}
}

// TestGroupRowsDeterministic writes the group rows of the same input twice
// (the groups map is iterated in a different order each time) and
// compares the bytes.
func TestGroupRowsDeterministic(t *testing.T) {
	var rows []Row
	groups := map[string]string{}
	for i := range 12 {
		rec := "sub-" + strconv.Itoa(i) + ".edf"
		groups[rec] = []string{"b", "a"}[i%2]
		for j, tgt := range []string{"P3", "P4", "O1"} {
			rows = append(rows, recRow("w", "trial-window", "C4", tgt, rec, math.Sin(float64(i*3+j))))
		}
	}
	var first []byte
	for k := range 5 {
		out, err := GroupRows(rows, groups, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		if err := WriteCSV(&b, &Results{Rows: out}); err != nil {
			t.Fatal(err)
		}
		if k == 0 {
			first = b.Bytes()
			if n := bytes.Count(first, []byte("\n")); n != 1+3*4 {
				t.Fatalf("%d lines, want 13:\n%s", n, first)
			}
			continue
		}
		if !bytes.Equal(first, b.Bytes()) {
			t.Fatalf("run %d differs:\n%s\nvs\n%s", k, first, b.Bytes())
		}
	}
}
