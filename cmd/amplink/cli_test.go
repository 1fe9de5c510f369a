package main

import (
	"bytes"
	stdcsv "encoding/csv"
	"flag"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format/csv"
)

var update = flag.Bool("update", false, "rewrite golden files")

// writeFixture writes a small epoched CSV: 3 channels, 30 trials, 100 Hz,
// with the amplitude of a 12 Hz burst on S before 0 s driving a 4 Hz burst
// on T after it, and U independent.
func writeFixture(t *testing.T, dir string) string {
	t.Helper()
	rng := rand.New(rand.NewPCG(11, 12))
	e := data.NewEpochs(100, -1, []data.Channel{{Name: "S"}, {Name: "T"}, {Name: "U"}}, 30, 201)
	for tr := range e.NTrials {
		z := rng.NormFloat64()
		a := math.Exp(0.5 * z)
		b := math.Exp(0.5 * (0.8*z + 0.6*rng.NormFloat64()))
		c := math.Exp(0.5 * rng.NormFloat64())
		for ch, spec := range []struct{ f, t0, t1, amp float64 }{{12, -0.8, 0, 3 * a}, {4, 0.1, 0.9, 3 * b}, {4, 0.1, 0.9, 3 * c}} {
			x := e.Trial(tr, ch)
			for k := range x {
				tt := e.Time(k)
				v := rng.NormFloat64()
				if tt >= spec.t0 && tt <= spec.t1 {
					v += spec.amp * math.Sin(2*math.Pi*spec.f*tt)
				}
				x[k] = float32(v)
			}
		}
	}
	p := filepath.Join(dir, "small.csv")
	if !*update {
		// The committed copy is what testdata/cli/make_ref.py analysed.
		b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "cli", "small.csv"))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	var b bytes.Buffer
	if err := csv.WriteEpochs(&b, e); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	golden(t, "small.csv", b.Bytes())
	return p
}

const fixtureRecipe = `{
  "spectral": {"low": 3, "high": 30, "steps": 16, "cycles": [3, 6]},
  "analyses": [
    {"id": "s2all", "type": "trial-window",
     "seed":   {"channel": "S", "time": [-0.6, -0.2], "freq": [10, 14]},
     "target": {"channel": "*", "time": [0.3, 0.7], "freq": [3, 5]},
     "permutations": 200, "randomSeed": 5, "correction": "fdr"}
  ]
}`

func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	p := filepath.Join("..", "..", "testdata", "cli", name)
	if *update {
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(p)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		os.WriteFile(p+".got", got, 0o644)
		t.Errorf("%s differs from the golden file; wrote %s.got", name, p)
	}
}

func TestRunFixture(t *testing.T) {
	dir := t.TempDir()
	in := writeFixture(t, dir)
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(fixtureRecipe), 0o644)
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out, in}); err != nil {
		t.Fatalf("run: %v\n%s", err, stderr.String())
	}
	got, err := os.ReadFile(filepath.Join(out, "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(got)), "\n")
	if !strings.HasPrefix(lines[0], "analysis,type,seed,target,method,n,r,p,") {
		t.Errorf("header %q lacks the contract columns", lines[0])
	}
	if len(lines) != 4 {
		t.Errorf("%d lines, want a header and 3 rows", len(lines))
	}
	golden(t, "small_results.csv", got)
	for _, f := range []string{"results.json", "recipe.json"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Error(err)
		}
	}
	// Same recipe and data: byte-identical results (determinism).
	out2 := filepath.Join(dir, "out2")
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out2, "--workers", "1", in}); err != nil {
		t.Fatal(err)
	}
	again, _ := os.ReadFile(filepath.Join(out2, "results.csv"))
	if !bytes.Equal(got, again) {
		t.Error("a second run gave different bytes")
	}
}

func TestRunErrors(t *testing.T) {
	dir := t.TempDir()
	in := writeFixture(t, dir)
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("trial,time,A\n1,0,1\n1,0.01,x\n"), 0o644)
	write := func(name, s string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(s), 0o644)
		return p
	}
	good := write("good.json", fixtureRecipe)
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"no recipe flag", []string{"run", in}, "--recipe is required"},
		{"no input", []string{"run", "--recipe", good}, "no input file"},
		{"missing input", []string{"run", "--recipe", good, filepath.Join(dir, "nope.csv")}, "nope.csv"},
		{"recipe typo", []string{"run", "--recipe", write("typo.json", strings.Replace(fixtureRecipe, `"permutations"`, `"permutation"`, 1)), in}, `typo.json: analyses[0]: unknown key "permutation"`},
		{"recipe syntax", []string{"run", "--recipe", write("syn.json", "{\n\"analyses\": [}"), in}, "syn.json: line 2, column 14"},
		{"unknown channel", []string{"run", "--recipe", write("ch.json", strings.Replace(fixtureRecipe, `"channel": "S"`, `"channel": "Cz"`, 1)), in}, `small.csv with recipe ` + filepath.Join(dir, "ch.json") + `: analyses[0].seed.channel: no channel "Cz"; channels are: S, T, U`},
		{"bad data", []string{"run", "--recipe", good, bad}, `bad.csv:3:3: "x" is not a number`},
		{"unknown command", []string{"frobnicate"}, "unknown command"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(dir, "out-"+strings.ReplaceAll(tc.name, " ", "-"))
			args := append([]string{tc.args[0]}, append([]string{"--out", out}, tc.args[1:]...)...)
			if tc.args[0] != "run" {
				args = tc.args
			}
			var stdout, stderr bytes.Buffer
			err := run(&stdout, &stderr, args)
			if err == nil {
				t.Fatalf("no error, want %q", tc.want)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q, want it to contain %q", err, tc.want)
			}
			if _, err := os.Stat(filepath.Join(out, "results.csv")); err == nil {
				t.Error("a failed run left results.csv")
			}
		})
	}
}

// Several recordings in one run: per-recording rows plus group rows that
// pool Fisher z (r of identical recordings pools to the same r).
func TestRunSeveralRecordings(t *testing.T) {
	dir := t.TempDir()
	in := writeFixture(t, dir)
	b, _ := os.ReadFile(in)
	in2 := filepath.Join(dir, "small2.csv")
	os.WriteFile(in2, b, 0o644)
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(fixtureRecipe), 0o644)
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out, in, in2}); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	f, err := os.Open(filepath.Join(out, "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := stdcsv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	if len(recs) != 1+3+3+3 {
		t.Fatalf("%d lines, want header + 3 + 3 per-recording rows + 3 group rows", len(recs))
	}
	for _, name := range []string{"group_s2all_S_S", "group_s2all_S_T", "group_s2all_S_U"} {
		b, err := os.ReadFile(filepath.Join(out, "figures", name+".svg"))
		if err != nil || !strings.Contains(string(b), "small2.csv") || !strings.Contains(string(b), "<svg") {
			t.Errorf("group figure %s missing or without the recordings: %v", name, err)
		}
	}
	for i := 1; i <= 3; i++ {
		per, grp := recs[i], recs[6+i]
		if grp[col["recording"]] != "group" || grp[col["n"]] != "2" {
			t.Errorf("row %v is not a group row over 2 recordings", grp)
		}
		if !approxEqual(per[col["r"]], grp[col["r"]]) {
			t.Errorf("group r %s, want the recordings' common r %s", grp[col["r"]], per[col["r"]])
		}
	}
}

func approxEqual(a, b string) bool {
	x, err1 := strconv.ParseFloat(a, 64)
	y, err2 := strconv.ParseFloat(b, 64)
	return err1 == nil && err2 == nil && math.Abs(x-y) < 1e-12
}

// --groups on run: per-group rows and a Welch difference row, as merge gives.
func TestRunGroups(t *testing.T) {
	dir := t.TempDir()
	in := writeFixture(t, dir)
	b, _ := os.ReadFile(in)
	var ins []string
	for _, n := range []string{"a1.csv", "a2.csv", "b1.csv", "b2.csv"} {
		p := filepath.Join(dir, n)
		os.WriteFile(p, b, 0o644)
		ins = append(ins, p)
	}
	gp := filepath.Join(dir, "groups.csv")
	os.WriteFile(gp, []byte("recording,group\na1.csv,A\na2.csv,A\nb1.csv,B\nb2.csv,B\n"), 0o644)
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(fixtureRecipe), 0o644)
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, append([]string{"run", "--recipe", rp, "--out", out, "--groups", gp}, ins...)); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	got, _ := os.ReadFile(filepath.Join(out, "results.csv"))
	for _, want := range []string{",group:A", ",group:B", ",group:A-B"} {
		if !strings.Contains(string(got), want) {
			t.Errorf("results lack a %q row", want)
		}
	}
	err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out, "--groups", gp, ins[0]})
	if err == nil || !strings.Contains(err.Error(), "give more than one input file") {
		t.Errorf("--groups with one file: %v", err)
	}
}
