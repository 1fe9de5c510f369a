package main

import (
	"bytes"
	stdcsv "encoding/csv"
	"encoding/json"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"amplink/core/demo"
)

// readRows reads a results.csv into maps, one per row.
func readRows(t *testing.T, p string) []map[string]string {
	t.Helper()
	f, err := os.Open(p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := stdcsv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var rows []map[string]string
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, c := range recs[0] {
			m[c] = r[i]
		}
		rows = append(rows, m)
	}
	return rows
}

// treeFiles maps every file below dir (slash path) to its contents.
func treeFiles(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		b, err := os.ReadFile(p)
		out[filepath.ToSlash(rel)] = b
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// The demo study through --dataset gives the same per-recording rows, group
// rows, maps and figures as amplink run on the same files listed by hand
// with --groups; the planted group difference is found and no unplanted
// one is, at the recipe's correction (FDR).
func TestStudyDemoDataset(t *testing.T) {
	dir := t.TempDir()
	root := filepath.Join(dir, "study")
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"demo", "--study", root}); err != nil {
		t.Fatalf("demo --study: %v\n%s", err, stderr.String())
	}
	if !strings.Contains(stdout.String(), "Planted group difference: C4 pre-tone beta") {
		t.Errorf("demo --study output does not say what was planted:\n%s", stdout.String())
	}
	for _, f := range []string{"dataset_description.json", "participants.tsv", "README", "code/recipe.json",
		"sub-01/eeg/sub-01_task-tones_eeg.edf", "sub-01/eeg/sub-01_task-tones_events.tsv",
		"sub-01/eeg/sub-01_task-tones_channels.tsv", "sub-12/eeg/sub-12_task-tones_trials.tsv"} {
		if _, err := os.Stat(filepath.Join(root, f)); err != nil {
			t.Error(err)
		}
	}
	rp := filepath.Join(root, "code", "recipe.json")

	// Through the dataset.
	outD := filepath.Join(dir, "by-dataset")
	stdout.Reset()
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", outD, "--dataset", root, "--group-column", "group"}); err != nil {
		t.Fatalf("run --dataset: %v\n%s", err, stderr.String())
	}
	summary := stdout.String()
	for _, want := range []string{"12 recordings", "participants (12): 01, 02", "tasks: tones", "groups from participants.tsv column group: rested (6 recordings), sleepy (6 recordings)",
		"code/: holds no raw recordings", "analysed 12 of 12 recordings", "group 12, group:rested 6, group:sleepy 6 recordings"} {
		if !strings.Contains(summary, want) {
			t.Errorf("summary lacks %q:\n%s", want, summary)
		}
	}

	// By hand: the same files and a groups table from participants.tsv.
	var files []string
	var groups strings.Builder
	groups.WriteString("recording,group\n")
	for _, p := range demo.Participants() {
		name := demo.StudyStem(p) + "_eeg.edf"
		files = append(files, filepath.Join(root, "sub-"+p.Label, "eeg", name))
		groups.WriteString(name + "," + p.Group + "\n")
	}
	gp := filepath.Join(dir, "groups.csv")
	os.WriteFile(gp, []byte(groups.String()), 0o644)
	outH := filepath.Join(dir, "by-hand")
	if err := run(&stdout, &stderr, append([]string{"run", "--recipe", rp, "--out", outH, "--groups", gp}, files...)); err != nil {
		t.Fatalf("run FILE...: %v\n%s", err, stderr.String())
	}
	d, h := treeFiles(t, outD), treeFiles(t, outH)
	if _, ok := d["study.json"]; !ok {
		t.Error("--dataset wrote no study.json")
	}
	delete(d, "study.json")
	var names []string
	for n := range h {
		names = append(names, n)
	}
	sort.Strings(names)
	if len(d) != len(h) {
		t.Errorf("%d output files through the dataset, %d by hand", len(d), len(h))
	}
	for _, n := range names {
		if !bytes.Equal(d[n], h[n]) {
			t.Errorf("%s differs between --dataset and the files listed by hand", n)
		}
	}

	// The planted truth (core/demo's study): the rested-sleepy difference of
	// C4 beta → Pz delta, and nothing else, at the recipe's FDR across each
	// analysis's difference rows; the O1–O2 envelope coupling, planted in
	// both groups, pooled over all 12.
	rows := readRows(t, filepath.Join(outD, "results.csv"))
	type key struct{ analysis, seed, target, rec string }
	byKey := map[key]map[string]string{}
	diffs := map[string][]map[string]string{}
	pooled := map[string][]map[string]string{}
	for _, r := range rows {
		byKey[key{r["analysis"], r["seed"], r["target"], r["recording"]}] = r
		switch {
		case r["recording"] == "group:rested-sleepy":
			diffs[r["analysis"]] = append(diffs[r["analysis"]], r)
		case r["recording"] == "group":
			pooled[r["analysis"]] = append(pooled[r["analysis"]], r)
		}
	}
	if len(diffs["beta-to-delta"]) != len(demo.StudyChannels) || len(diffs["posterior-alpha"]) != 1 {
		t.Fatalf("difference rows: %d beta-to-delta, %d posterior-alpha", len(diffs["beta-to-delta"]), len(diffs["posterior-alpha"]))
	}
	pf := func(r map[string]string) float64 {
		v, err := strconv.ParseFloat(r["p"], 64)
		if err != nil {
			t.Fatalf("row %v: p %q", r, r["p"])
		}
		return v
	}
	// check compares the rows' q (the recipe's FDR over the family of
	// group rows: Benjamini & Hochberg 1995) with the truth: want gives 1
	// for a planted effect (q < 0.05), 0 for an unplanted one (q ≥ 0.05),
	// and -1 where either may come out.
	check := func(what string, rs []map[string]string, want func(map[string]string) int) {
		for _, r := range rs {
			q, err := strconv.ParseFloat(r["q"], 64)
			if err != nil || r["correction"] != "fdr" {
				t.Fatalf("group row %v has no FDR q", r)
			}
			t.Logf("%s %s %s→%s n=%s p=%.3g q=%.3g", what, r["analysis"], r["seed"], r["target"], r["n"], pf(r), q)
			switch w := want(r); {
			case w == 1 && !(q < 0.05):
				t.Errorf("%s: planted %s %s→%s not found: q = %.3g", what, r["analysis"], r["seed"], r["target"], q)
			case w == 0 && q < 0.05:
				t.Errorf("%s: unplanted %s %s→%s found: q = %.3g", what, r["analysis"], r["seed"], r["target"], q)
			}
		}
	}
	planted := func(ok bool) int {
		if ok {
			return 1
		}
		return 0
	}
	for a, rs := range diffs {
		check("difference", rs, func(r map[string]string) int { return planted(a == "beta-to-delta" && r["target"] == "Pz") })
	}
	// Pooled over both groups: the posterior alpha coupling is planted in
	// everyone; C4 beta → Pz delta in half of them (either outcome is
	// right), and no other beta-to-delta coupling in anyone.
	check("pooled", pooled["posterior-alpha"], func(map[string]string) int { return 1 })
	check("pooled", pooled["beta-to-delta"], func(r map[string]string) int {
		if r["target"] == "Pz" {
			return -1
		}
		return 0
	})
	if r := byKey[key{"beta-to-delta", "C4", "Pz", "group:rested-sleepy"}]; r["n"] != "12" || !strings.Contains(r["note"], "rested (6 recordings) minus sleepy (6 recordings)") {
		t.Errorf("difference row %v does not say it pools 6 + 6 recordings", r)
	}
	if r := byKey[key{"posterior-alpha", "O1", "O2", "group"}]; r["n"] != "12" || !strings.HasPrefix(r["note"], "12 recordings") {
		t.Errorf("group row %v does not say it pools 12 recordings", r)
	}

	var sj struct {
		Recordings []struct{ Path, Group string }
		Failed     []string
	}
	if err := json.Unmarshal(readFile(t, filepath.Join(outD, "study.json")), &sj); err != nil || len(sj.Recordings) != 12 || sj.Recordings[0].Group != "rested" || len(sj.Failed) != 0 {
		t.Errorf("study.json: %v, %+v", err, sj)
	}
}

func readFile(t *testing.T, p string) []byte {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// A recording that fails is reported with its reason and the others go
// on; the group rows pool the recordings that worked.
func TestStudyFailedRecording(t *testing.T) {
	dir := t.TempDir()
	fix := writeFixture(t, dir)
	good, err := os.ReadFile(fix)
	if err != nil {
		t.Fatal(err)
	}
	root := filepath.Join(dir, "ds")
	put := func(p string, b []byte) {
		p = filepath.Join(root, filepath.FromSlash(p))
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	put("dataset_description.json", []byte(`{"Name": "fixture", "BIDSVersion": "1.9.0"}`))
	put("participants.tsv", []byte("participant_id\tgroup\nsub-1\tA\nsub-2\tA\nsub-3\tB\nsub-4\tB\nsub-5\tB\n"))
	for _, s := range []string{"1", "2", "3", "4"} {
		put("sub-"+s+"/eeg/sub-"+s+"_task-x_eeg.csv", good)
	}
	put("sub-5/eeg/sub-5_task-x_eeg.csv", []byte("trial,time,S,T,U\n1,0,1,2,x\n"))
	put("sub-4/eeg/sub-4_task-y_eeg.csv", good)
	put("notes.txt", []byte("an unrelated file"))
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(fixtureRecipe), 0o644)
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out, "--dataset", root, "--task", "x", "--group-column", "group"}); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	s := stdout.String()
	for _, want := range []string{
		"dataset " + root + ` "fixture" (BIDS 1.9.0): 5 recordings`,
		`sub-4/eeg/sub-4_task-y_eeg.csv: left out by the filter: task "y", not "x"`,
		"notes.txt: not part of a BIDS dataset's layout",
		"analysed 4 of 5 recordings; 1 failed and were left out:",
		`sub-5_task-x_eeg.csv: failed: csv: ` + filepath.Join(root, "sub-5", "eeg", "sub-5_task-x_eeg.csv") + `:2:5: "x" is not a number`,
		"group 4, group:A 2, group:B 2 recordings",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("output lacks %q:\n%s", want, s)
		}
	}
	rows := readRows(t, filepath.Join(out, "results.csv"))
	recs := map[string]bool{}
	for _, r := range rows {
		recs[r["recording"]] = true
		if r["recording"] == "group" && r["n"] != "4" {
			t.Errorf("group row pools %s recordings, want 4", r["n"])
		}
	}
	if recs["sub-5_task-x_eeg.csv"] || !recs["sub-4_task-x_eeg.csv"] || !recs["group:A-B"] {
		t.Errorf("recordings in the table: %v", recs)
	}
	b, _ := os.ReadFile(filepath.Join(out, "results.json"))
	if !strings.Contains(string(b), "sub-5_task-x_eeg.csv: failed") {
		t.Error("results.json does not record the failed recording")
	}
}

func TestStudyErrors(t *testing.T) {
	dir := t.TempDir()
	fix := writeFixture(t, dir)
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(fixtureRecipe), 0o644)
	root := filepath.Join(dir, "ds")
	os.MkdirAll(filepath.Join(root, "sub-1", "eeg"), 0o755)
	b, _ := os.ReadFile(fix)
	os.WriteFile(filepath.Join(root, "sub-1", "eeg", "sub-1_task-x_eeg.csv"), b, 0o644)
	empty := filepath.Join(dir, "empty")
	os.MkdirAll(empty, 0o755)
	broken := filepath.Join(dir, "broken")
	os.MkdirAll(filepath.Join(broken, "sub-1", "eeg"), 0o755)
	os.WriteFile(filepath.Join(broken, "sub-1", "eeg", "sub-1_task-x_eeg.csv"), []byte("trial,time,S\n1,0,x\n"), 0o644)
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"--task", "x", fix}, "--task selects from a dataset; give --dataset ROOT"},
		{[]string{"--dataset", root, fix}, "give either --dataset or input files"},
		{[]string{"--dataset", root, "--groups", fix}, "--group-column names the participants.tsv column"},
		{[]string{"--dataset", root, "--events", fix}, "--events and --trials are for input files"},
		{[]string{"--dataset", root, "--group-column", "group"}, "group column \"group\": the dataset has no participants.tsv"},
		{[]string{"--dataset", empty}, "no recording found in " + empty},
		{[]string{"--dataset", fix}, "is not a folder"},
		{[]string{"--dataset", root, "--task", "y"}, "no recording found"},
		{[]string{"--dataset", broken}, "every recording of " + broken + " failed"},
	}
	for _, tc := range cases {
		t.Run(strings.Join(tc.args, " "), func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			err := run(&stdout, &stderr, append([]string{"run", "--recipe", rp, "--out", filepath.Join(dir, "out")}, tc.args...))
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want %q", err, tc.want)
			}
			if _, err := os.Stat(filepath.Join(dir, "out", "results.csv")); err == nil {
				t.Error("a failed run left results.csv")
			}
		})
	}
}
