package main

import (
	"bytes"
	"encoding/json"
	"hash/crc32"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"amplink/core/figures"
	"amplink/core/report"
)

// mergeDir holds the merge fixtures: out/<task>/results.csv (written by
// testdata/group/merge/gen.py), groups files and broken copies.
var mergeDir = filepath.Join("..", "..", "testdata", "group", "merge")

// mergeGolden compares got with the golden file in mergeDir; a mismatch
// writes <name>.got beside it.
func mergeGolden(t *testing.T, dir, name string, got []byte) {
	t.Helper()
	p := filepath.Join(dir, name)
	want, err := os.ReadFile(p)
	if err != nil || !bytes.Equal(got, want) {
		if werr := os.WriteFile(p+".got", got, 0o644); werr != nil {
			t.Log(werr)
		}
		t.Fatalf("%s differs from the golden file (%v); wrote %s.got", name, err, p)
	}
}

const mergeWarnP4 = "merge: warning: test a1 trial-window C4→P4 spearman is in 3 of 4 tables; not in out/4/results.csv\n"

func TestMerge(t *testing.T) {
	abs, err := filepath.Abs(mergeDir)
	if err != nil {
		t.Fatal(err)
	}
	t.Chdir(abs) // error messages then carry the short paths
	tables := []string{"out/1/results.csv", "out/2/results.csv", "out/3/results.csv", "out/4/results.csv"}
	tests := []struct {
		name       string
		args       []string // before the tables
		tables     []string
		wantErr    string
		wantStderr string
		golden     string
	}{
		{name: "four recordings", tables: tables, wantStderr: mergeWarnP4, golden: "merged.csv"},
		{name: "two groups", args: []string{"--groups", "groups.csv"}, tables: tables, wantStderr: mergeWarnP4, golden: "merged-groups.csv"},
		{name: "level 0.9", args: []string{"--level", "0.9"}, tables: tables, wantStderr: mergeWarnP4, golden: "merged-90.csv"},
		{name: "missing file", tables: []string{"out/1/results.csv", "out/9/results.csv"},
			wantErr: "merge: open out/9/results.csv: no such file or directory"},
		{name: "bad CSV line", tables: []string{"out/1/results.csv", "invalid-line.csv"},
			wantErr: "merge: invalid-line.csv:3:73: 18 cells, the header has 17"},
		{name: "groups with three labels", args: []string{"--groups", "groups-3.csv"}, tables: tables,
			wantErr: `merge: groups-3.csv: needs exactly two groups among the recordings, found 3: "control", "patient", "sibling"`},
		{name: "ragged groups file", args: []string{"--groups", "invalid-groups-ragged.csv"}, tables: tables,
			wantErr: "merge: invalid-groups-ragged.csv:3:1: wrong number of fields"},
		{name: "recording without a group", args: []string{"--groups", "groups-missing.csv"}, tables: tables,
			wantErr: `merge: groups-missing.csv: recording "sub-04_task-tone_eeg.edf" has no group`},
		{name: "duplicate recording", tables: []string{"out/1/results.csv", "out/2/results.csv", "out-dup/results.csv"},
			wantErr: `merge: recording "sub-02_task-tone_eeg.edf" is in out/2/results.csv (line 2) and in out-dup/results.csv (line 2)`},
		{name: "no tables", wantErr: "merge: no results table given"},
		{name: "bad level", args: []string{"--level", "95"}, tables: tables, wantErr: "merge: --level 95 is not in (0, 1)"},
		{name: "out is an input", args: []string{"--out", "out/1/results.csv"}, tables: tables, wantErr: "merge: --out out/1/results.csv is also an input"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "group.csv")
			// A stale table from an earlier merge must not survive a failure.
			if err := os.WriteFile(out, []byte("stale\n"), 0o644); err != nil {
				t.Fatal(err)
			}
			args := append([]string{"--out", out}, tc.args...)
			args = append(args, tc.tables...)
			var stdout, stderr bytes.Buffer
			err := cmdMerge(&stdout, &stderr, args)
			if tc.wantErr != "" {
				if err == nil || err.Error() != tc.wantErr {
					t.Fatalf("error %v, want %q", err, tc.wantErr)
				}
				if _, serr := os.Stat(out); tc.name != "out is an input" && !os.IsNotExist(serr) {
					t.Errorf("%s exists after a failed merge", out)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if stderr.String() != tc.wantStderr {
				t.Errorf("stderr %q, want %q", stderr.String(), tc.wantStderr)
			}
			got, err := os.ReadFile(out)
			if err != nil {
				t.Fatal(err)
			}
			mergeGolden(t, abs, tc.golden, got)
			if !strings.HasSuffix(stdout.String(), "written to "+out+"\n") || !strings.HasPrefix(stdout.String(), "4 recordings from 4 tables: 15 rows and ") {
				t.Errorf("stdout %q", stdout.String())
			}
			// Same inputs, same bytes; and merging the merged table again
			// recomputes the same group rows.
			for _, again := range [][]string{tc.tables, {out}} {
				out2 := filepath.Join(t.TempDir(), "again.csv")
				args := append(append([]string{"--out", out2}, tc.args...), again...)
				if err := cmdMerge(&stdout, &bytes.Buffer{}, args); err != nil {
					t.Fatal(err)
				}
				got2, err := os.ReadFile(out2)
				if err != nil {
					t.Fatal(err)
				}
				if !bytes.Equal(got, got2) {
					t.Errorf("merging %v again gives different bytes", again)
				}
			}
			if entries, _ := os.ReadDir(filepath.Dir(out)); len(entries) != 1 {
				t.Errorf("%d files beside the output, want only it (no temporary left)", len(entries))
			}
		})
	}
}

// TestMergeScipy checks the group rows of a1 C4→P3 in the merged table
// with groups against scipy: testdata/group/make_ref.py, case "merge
// fixture a1 C4-P3" (ttest_1samp on arctanh r, t.ppf interval,
// ttest_ind(equal_var=False)).
func TestMergeScipy(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "group", "ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Name    string                        `json:"name"`
			Group   map[string]float64            `json:"group"`
			ByGroup []map[string]any              `json:"by_group"`
			Diff    map[string]any                `json:"diff"`
			Extra   map[string]map[string]float64 `json:"-"`
		} `json:"cases"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	want := map[string]map[string]float64{}
	for _, c := range ref.Cases {
		if c.Name != "merge fixture a1 C4-P3" {
			continue
		}
		want["group"] = c.Group
		for _, g := range c.ByGroup {
			m := map[string]float64{}
			for k, v := range g {
				if f, ok := v.(float64); ok {
					m[k] = f
				}
			}
			want["group:"+g["label"].(string)] = m
		}
		m := map[string]float64{}
		for k, v := range c.Diff {
			if f, ok := v.(float64); ok {
				m[k] = f
			}
		}
		want["group:control-patient"] = m
	}
	if len(want) != 4 {
		t.Fatalf("ref.json: merge fixture case not found (%d entries)", len(want))
	}
	out := filepath.Join(t.TempDir(), "g.csv")
	args := []string{"--out", out, "--groups", filepath.Join(mergeDir, "groups.csv")}
	for i := 1; i <= 4; i++ {
		args = append(args, filepath.Join(mergeDir, "out", strconv.Itoa(i), "results.csv"))
	}
	if err := cmdMerge(&bytes.Buffer{}, &bytes.Buffer{}, args); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(out)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	res, err := report.ReadCSV(f, out)
	if err != nil {
		t.Fatal(err)
	}
	seen := 0
	for _, row := range res.Rows {
		w, ok := want[row.Recording()]
		if !ok || row.Target != "P3" || row.Analysis != "a1" {
			continue
		}
		seen++
		got := map[string]float64{"r": row.R, "p": row.P, "n": float64(row.N)}
		for _, name := range []string{"t", "df", "ci_lo", "ci_hi", "diff_z"} {
			if v, _ := row.Lookup(name); v != "" {
				got[name], _ = strconv.ParseFloat(v, 64)
			}
		}
		for k, wv := range w {
			if gv, ok := got[k]; !ok || math.Abs(gv-wv) > 1e-10 {
				t.Errorf("%s %s = %v, want %v (scipy)", row.Recording(), k, gv, wv)
			}
		}
	}
	if seen != 4 {
		t.Errorf("found %d of 4 group rows for a1 C4→P3", seen)
	}
}

// FuzzParseGroups checks that the groups reader never panics, names the
// file in its errors and returns only non-empty recordings and labels.
// Seeds: the groups files in testdata/group/merge.
func FuzzParseGroups(f *testing.F) {
	paths, _ := filepath.Glob(filepath.Join(mergeDir, "*groups*.csv"))
	for _, p := range paths {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, in []byte) {
		g, err := parseGroups(in, "fuzz.csv")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "merge: fuzz.csv:") {
				t.Fatalf("error without the name: %v", err)
			}
			return
		}
		for rec, l := range g {
			if rec == "" || l == "" || strings.TrimSpace(rec) != rec || strings.TrimSpace(l) != l {
				t.Fatalf("recording %q group %q", rec, l)
			}
		}
	})
}

// TestMergeRunOutputs is the array-job pattern end to end: the 30 trials of
// testdata/cli/small.csv split into three recordings, one `amplink run
// --out out/<task>` each, then `amplink merge out/*/results.csv`. The group
// r must be tanh of the mean atanh of the three per-recording r values
// (Fisher 1921), and every per-recording row must come through unchanged.
func TestMergeRunOutputs(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "..", "testdata", "cli", "small.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(src)), "\n")
	dir := t.TempDir()
	recipePath := filepath.Join(dir, "r.json")
	recipe := `{"spectral": {"low": 3, "high": 30, "steps": 16, "cycles": [3, 6]},
 "analyses": [{"id": "w", "type": "trial-window",
   "seed": {"channel": "S", "time": [-0.6, -0.2], "freq": [10, 14]},
   "target": {"channel": "*", "time": [0.3, 0.7], "freq": [3, 5]}}]}`
	if err := os.WriteFile(recipePath, []byte(recipe), 0o644); err != nil {
		t.Fatal(err)
	}
	var tables []string
	for task := 1; task <= 3; task++ {
		var b strings.Builder
		b.WriteString(lines[0] + "\n")
		for _, l := range lines[1:] {
			tr, err := strconv.Atoi(l[:strings.IndexByte(l, ',')])
			if err != nil {
				t.Fatal(err)
			}
			if (tr-1)/10 == task-1 {
				b.WriteString(l + "\n")
			}
		}
		in := filepath.Join(dir, "rec-"+strconv.Itoa(task)+".csv")
		if err := os.WriteFile(in, []byte(b.String()), 0o644); err != nil {
			t.Fatal(err)
		}
		out := filepath.Join(dir, "out", strconv.Itoa(task))
		var stderr bytes.Buffer
		if err := cmdRun(&bytes.Buffer{}, &stderr, []string{"--recipe", recipePath, "--out", out, "--workers", "1", in}); err != nil {
			t.Fatalf("run %d: %v\n%s", task, err, stderr.String())
		}
		tables = append(tables, filepath.Join(out, "results.csv"))
	}
	merged := filepath.Join(dir, "group.csv")
	var stderr bytes.Buffer
	if err := cmdMerge(&bytes.Buffer{}, &stderr, append([]string{"--out", merged}, tables...)); err != nil {
		t.Fatal(err)
	}
	if stderr.Len() != 0 {
		t.Errorf("stderr %q", stderr.String())
	}
	b, err := os.ReadFile(merged)
	if err != nil {
		t.Fatal(err)
	}
	res, err := report.ReadCSV(bytes.NewReader(b), merged)
	if err != nil {
		t.Fatal(err)
	}
	zs := map[string][]float64{}
	groups := 0
	for _, row := range res.Rows {
		if row.Recording() == "group" {
			groups++
			z := zs[row.Target]
			if len(z) != 3 || row.N != 3 {
				t.Fatalf("target %s: %d recordings, n = %d, want 3", row.Target, len(z), row.N)
			}
			want := math.Tanh((z[0] + z[1] + z[2]) / 3)
			if math.Abs(row.R-want) > 1e-15 {
				t.Errorf("target %s: group r = %v, want %v", row.Target, row.R, want)
			}
			continue
		}
		if !strings.HasPrefix(row.Recording(), "rec-") {
			t.Errorf("recording %q", row.Recording())
		}
		zs[row.Target] = append(zs[row.Target], math.Atanh(row.R))
	}
	if groups != 3 || len(res.Rows) != 12 {
		t.Errorf("%d rows with %d group rows, want 12 and 3 (targets S, T, U)", len(res.Rows), groups)
	}
	// The per-recording rows come first, in table order, with their cells
	// unchanged.
	k := 0
	for _, p := range tables {
		orig, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		o, err := report.ReadCSV(bytes.NewReader(orig), p)
		if err != nil {
			t.Fatal(err)
		}
		cols := o.Columns()
		for i := range o.Rows {
			if g, w := strings.Join(res.Rows[k].Cells(cols), ","), strings.Join(o.Rows[i].Cells(cols), ","); g != w {
				t.Errorf("merged row %d\n%s\nwant (%s)\n%s", k+1, g, p, w)
			}
			k++
		}
	}
}

// TestMergeStreamed: merge reads one table at a time, yet writes the bytes
// of concatenating every table's per-recording rows and writing them with
// their group rows at once (report.WriteCSV, report.GroupRows,
// figures.Group), for tables whose columns differ in set and order, a
// table of two recordings, a table holding only group rows (whose columns
// must then not appear) and rows with an undefined r.
func TestMergeStreamed(t *testing.T) {
	dir := t.TempDir()
	row := func(target, rec string, r float64, extra ...report.Field) report.Row {
		return report.Row{Analysis: "a1", Type: "trial-window", Seed: "C4", Target: target, Method: "spearman", N: 30, R: r, P: 0.01,
			Extra: append([]report.Field{{Name: "recording", Value: rec}}, extra...)}
	}
	nan := math.NaN()
	tables := [][]report.Row{
		{row("P3", "s1.edf", 0.3, report.Field{Name: "note", Value: "x, y"}), row("P4", "s1.edf", -0.2, report.Field{Name: "note", Value: ""}),
			row("P3", "s2.edf", 0.5, report.Field{Name: "note", Value: "=1"}), row("P4", "s2.edf", nan, report.Field{Name: "note", Value: "undefined"})},
		{row("P4", "s3.edf", 0.1, report.Field{Name: "extra_col", Value: "7"}, report.Field{Name: "note", Value: ""}),
			row("P3", "s3.edf", 0.45, report.Field{Name: "extra_col", Value: "8"}, report.Field{Name: "note", Value: ""})},
		{row("P3", "group", 0.4, report.Field{Name: "only_here", Value: "1"})},
		{row("P3", "s4.edf", 0.35), row("P4", "s4.edf", 0.05)},
	}
	var files []string
	var all []report.Row
	for i, rows := range tables {
		var b bytes.Buffer
		// Every row of a table carries every column, as run writes them.
		if err := report.WriteCSV(&b, &report.Results{Rows: rows}); err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, strconv.Itoa(i), "results.csv")
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		files = append(files, p)
		res, err := report.ReadCSV(bytes.NewReader(b.Bytes()), p)
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range res.Rows {
			if !r.IsGroupRow() {
				all = append(all, r)
			}
		}
	}
	gp := filepath.Join(dir, "groups.csv")
	os.WriteFile(gp, []byte("recording,group\ns1.edf,a\ns2.edf,b\ns3.edf,a\ns4.edf,b\n"), 0o644)
	groups := map[string]string{"s1.edf": "a", "s2.edf": "b", "s3.edf": "a", "s4.edf": "b"}
	grows, err := report.GroupRows(all, groups, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	whole := &report.Results{Rows: append(all, grows...)}
	var want bytes.Buffer
	if err := report.WriteCSV(&want, whole); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "merged.csv")
	figDir := filepath.Join(dir, "figs")
	var stdout, stderr bytes.Buffer
	if err := cmdMerge(&stdout, &stderr, append([]string{"--out", out, "--groups", gp, "--figures", figDir}, files...)); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	got, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want.Bytes()) {
		t.Errorf("streamed merge differs:\n%s\nwant\n%s", got, want.Bytes())
	}
	if bytes.Contains(got, []byte("only_here")) || !bytes.Contains(got, []byte("extra_col")) {
		t.Errorf("columns: %s", bytes.SplitN(got, []byte("\n"), 2)[0])
	}
	if !strings.Contains(stdout.String(), "4 recordings from 4 tables: 8 rows and 8 group rows") {
		t.Errorf("stdout %q", stdout.String())
	}
	figs := figures.Group(whole.Rows)
	if len(figs) != 2 {
		t.Fatalf("%d group figures, want 2", len(figs))
	}
	for _, f := range figs {
		b, err := os.ReadFile(filepath.Join(figDir, f.Name+".svg"))
		if err != nil || string(b) != f.SVG {
			t.Errorf("figure %s differs from figures.Group's (%v)", f.Name, err)
		}
	}
}

// A table that changes between merge's two passes is refused.
func TestMergeTableChanged(t *testing.T) {
	p := filepath.Join(mergeDir, "out", "1", "results.csv")
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	tw, err := report.NewTableWriter(&bytes.Buffer{}, report.Fixed)
	if err != nil {
		t.Fatal(err)
	}
	in := mergeInput{path: p, size: len(b), sum: crc32.Checksum(b, castagnoli)}
	if err := writeTable(tw, in); err != nil {
		t.Fatalf("unchanged table: %v", err)
	}
	in.sum++
	if err := writeTable(tw, in); err == nil || !strings.Contains(err.Error(), "changed while it was being merged") {
		t.Errorf("changed table: error %v", err)
	}
}
