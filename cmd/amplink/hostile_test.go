package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"amplink/core/data"
	"amplink/core/format/csv"
)

// stalePaths lists what of a run's output is in dir.
func stalePaths(t *testing.T, dir string) []string {
	t.Helper()
	var left []string
	for _, n := range outFiles {
		if _, err := os.Stat(filepath.Join(dir, n)); err == nil {
			left = append(left, n)
		}
	}
	for sub := range outDirs {
		es, _ := os.ReadDir(filepath.Join(dir, sub))
		for _, e := range es {
			left = append(left, sub+"/"+e.Name())
		}
	}
	return left
}

// mapsRecipe is fixtureRecipe plus a tf-map, so that a run writes maps too.
const mapsRecipe = `{
  "spectral": {"low": 3, "high": 30, "steps": 16, "cycles": [3, 6]},
  "analyses": [
    {"id": "s2all", "type": "trial-window",
     "seed":   {"channel": "S", "time": [-0.6, -0.2], "freq": [10, 14]},
     "target": {"channel": "*", "time": [0.3, 0.7], "freq": [3, 5]}},
    {"id": "map", "type": "tf-map",
     "seed":   {"channel": "S", "time": [-0.6, -0.2], "freq": [10, 14]},
     "target": {"channel": "T", "time": [0, 0.8], "freq": [3, 8]}}
  ]
}`

// TestRunFailureLeavesNothingStale runs a good run, then a failing one into
// the same --out, for every kind of failure (usage errors included), and
// checks that nothing of the good run remains, while a file amplink did not
// write stays.
func TestRunFailureLeavesNothingStale(t *testing.T) {
	dir := t.TempDir()
	in := writeFixture(t, dir)
	write := func(name, s string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(s), 0o644)
		return p
	}
	good := write("good.json", mapsRecipe)
	badRecipe := write("bad.json", strings.Replace(mapsRecipe, `"permutations"`, `"permutation"`, 1)+"}")
	out := filepath.Join(dir, "out")
	for _, tc := range []struct {
		name string
		args []string
	}{
		{"bad recipe", []string{"run", "--recipe", badRecipe, "--out", out, in}},
		{"no input file", []string{"run", "--recipe", good, "--out", out}},
		{"unknown flag before --out", []string{"run", "--frobnicate", "--recipe", good, "--out", out, in}},
		{"unknown flag, --out=", []string{"run", "--frobnicate", "--out=" + out, in}},
		{"level 2", []string{"run", "--recipe", good, "--level", "2", "--out", out, in}},
		{"bad max-memory", []string{"run", "--recipe", good, "--max-memory", "lots", "--out", out, in}},
		{"missing input", []string{"run", "--recipe", good, "--out", out, filepath.Join(dir, "nope.csv")}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			if err := run(&stdout, &stderr, []string{"run", "--recipe", good, "--out", out, in}); err != nil {
				t.Fatalf("good run: %v\n%s", err, stderr.String())
			}
			left := stalePaths(t, out)
			if len(left) < 5 {
				t.Fatalf("the good run wrote only %q", left)
			}
			os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644)
			if err := run(&stdout, &stderr, tc.args); err == nil {
				t.Fatal("no error")
			}
			if left := stalePaths(t, out); len(left) > 0 {
				t.Errorf("the failed run left %q of the good run", left)
			}
			if _, err := os.Stat(filepath.Join(out, "notes.txt")); err != nil {
				t.Errorf("a file amplink did not write was removed: %v", err)
			}
			// Asking for help is not a failed run: it removes nothing.
			run(&stdout, &stderr, []string{"run", "--recipe", good, "--out", out, in})
			if err := run(&stdout, &stderr, []string{"run", "--out", out, "--help"}); err != nil {
				t.Fatalf("--help: %v, want the help and no error", err)
			}
			if left := stalePaths(t, out); len(left) < 5 {
				t.Errorf("--help removed the outputs, leaving %q", left)
			}
			removeOutputs(out)
			// No staging directory is left beside --out.
			if m, _ := filepath.Glob(filepath.Join(dir, ".out.staging-*")); len(m) > 0 {
				t.Errorf("staging left: %q", m)
			}
		})
	}
}

// TestRunRefusesNamedPipes: a named pipe as the input or the recipe would
// block the run forever; it is refused before it is opened.
func TestRunRefusesNamedPipes(t *testing.T) {
	dir := t.TempDir()
	in := writeFixture(t, dir)
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(fixtureRecipe), 0o644)
	pipe := filepath.Join(dir, "pipe")
	if err := syscall.Mkfifo(pipe, 0o644); err != nil {
		t.Skipf("mkfifo: %v", err)
	}
	for _, tc := range []struct {
		name string
		args []string
	}{
		{"input", []string{"run", "--recipe", rp, "--out", filepath.Join(dir, "o1"), pipe}},
		{"recipe", []string{"run", "--recipe", pipe, "--out", filepath.Join(dir, "o2"), in}},
		{"events", []string{"run", "--recipe", rp, "--events", pipe, "--out", filepath.Join(dir, "o3"), in}},
		{"trials", []string{"run", "--recipe", rp, "--trials", pipe, "--out", filepath.Join(dir, "o4"), in}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			done := make(chan error, 1)
			go func() {
				var stdout, stderr bytes.Buffer
				done <- run(&stdout, &stderr, tc.args)
			}()
			select {
			case err := <-done:
				if err == nil || !strings.Contains(err.Error(), pipe+" is a named pipe, not a regular file") {
					t.Fatalf("err = %v", err)
				}
			case <-time.After(10 * time.Second):
				// Unblock the reader so the test binary can end.
				if f, err := os.OpenFile(pipe, os.O_WRONLY, 0); err == nil {
					f.Close()
				}
				t.Fatal("run blocked on the named pipe")
			}
		})
	}
}

// TestRunMemoryBudget: run has a sample budget of its own, checked before
// allocating, and a flag raises it.
func TestRunMemoryBudget(t *testing.T) {
	dir := t.TempDir()
	in := writeFixture(t, dir) // 30 trials × 3 channels × 201 samples: 72 360 bytes as float32
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(fixtureRecipe), 0o644)
	before := data.MaxSampleBytes
	for _, tc := range []struct {
		name, size, want string
	}{
		{"below the data", "64KiB", "more than the 64 KiB"},
		{"raised", "1MiB", ""},
		{"default", "", ""},
		{"not a size", "lots", `--max-memory: "lots" is not a size`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			args := []string{"run", "--recipe", rp, "--out", filepath.Join(dir, "o-"+tc.name), in}
			if tc.size != "" {
				args = append(args, "--max-memory", tc.size)
			}
			var stdout, stderr bytes.Buffer
			err := run(&stdout, &stderr, args)
			if tc.want == "" {
				if err != nil {
					t.Fatal(err)
				}
			} else if err == nil || !strings.Contains(strings.ReplaceAll(err.Error(), "65536 bytes", "64 KiB"), tc.want) {
				t.Fatalf("err = %v, want %q", err, tc.want)
			}
			if data.MaxSampleBytes != before {
				t.Errorf("data.MaxSampleBytes left at %d", data.MaxSampleBytes)
			}
		})
	}
	if n, err := parseSize(defaultMaxMemory); err != nil || n != 1<<30 {
		t.Errorf("default budget %d (%v), want 1 GiB", n, err)
	}
}

// TestRunErrorsNameTheRecipe: an error in the recipe alone names the recipe
// file; a conflict between recipe and data names both.
func TestRunErrorsNameTheRecipe(t *testing.T) {
	dir := t.TempDir()
	in := writeFixture(t, dir)
	write := func(name, s string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(s), 0o644)
		return p
	}
	for _, tc := range []struct {
		name, recipe, want string
	}{
		{"seed band off the grid", strings.Replace(fixtureRecipe, `"freq": [10, 14]`, `"freq": [41, 45]`, 1),
			"band.json: analyses[0].seed.freq: no grid frequency lies in [41, 45] Hz (grid 3–30 Hz)"},
		{"window outside the epoch", strings.Replace(fixtureRecipe, `"time": [-0.6, -0.2]`, `"time": [-3, -0.2]`, 1),
			"small.csv with recipe " + filepath.Join(dir, "band.json") + ": analyses[0].seed.time: [-3, -0.2] s lies outside the epoch"},
		{"unexpected end", fixtureRecipe[:40], "band.json: line 2, column 39: the recipe ends early"},
		{"byte order mark", "\uFEFF" + fixtureRecipe, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			rp := write("band.json", tc.recipe)
			var stdout, stderr bytes.Buffer
			err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", filepath.Join(dir, "out"), in})
			if tc.want == "" {
				if err != nil {
					t.Fatal(err)
				}
				return
			}
			if err == nil || !strings.HasPrefix(err.Error(), filepath.Join(dir, "")) || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("err = %v, want %q", err, tc.want)
			}
		})
	}
}

// TestRunOutputNamesUnique: channels whose names sanitise alike (A/B, A_B,
// "A B") get a map file each, and a channel named like a formula reaches
// results.csv neutralised.
func TestRunOutputNamesUnique(t *testing.T) {
	dir := t.TempDir()
	chs := []data.Channel{{Name: "A/B"}, {Name: "A_B"}, {Name: "A B"}, {Name: "=1+2"}}
	e := data.NewEpochs(100, -1, chs, 12, 201)
	for tr := range e.NTrials {
		for c := range chs {
			x := e.Trial(tr, c)
			for k := range x {
				x[k] = float32((k*(c+3)+tr*7)%17) - 8
			}
		}
	}
	var b bytes.Buffer
	if err := csv.WriteEpochs(&b, e); err != nil {
		t.Fatal(err)
	}
	in := filepath.Join(dir, "names.csv")
	os.WriteFile(in, b.Bytes(), 0o644)
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(`{"spectral": {"low": 3, "high": 30, "steps": 8},
  "analyses": [{"id": "m", "type": "tf-map",
     "seed":   {"channel": "A/B", "time": [-0.6, -0.2], "freq": [10, 14]},
     "target": {"channel": "*", "time": [0, 0.8], "freq": [3, 8]}}]}`), 0o644)
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out, in}); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	maps, _ := filepath.Glob(filepath.Join(out, "maps", "*.csv"))
	if len(maps) != 8 {
		t.Errorf("%d maps for 4 channels × (r, p): %q", len(maps), maps)
	}
	res, _ := os.ReadFile(filepath.Join(out, "results.csv"))
	if !strings.Contains(string(res), ",'=1+2,") || strings.Contains(string(res), ",=1+2,") {
		t.Errorf("results.csv does not neutralise the =1+2 channel:\n%s", res)
	}
	// Stable: the same run gives the same names.
	out2 := filepath.Join(dir, "out2")
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out2, in}); err != nil {
		t.Fatal(err)
	}
	maps2, _ := filepath.Glob(filepath.Join(out2, "maps", "*.csv"))
	for i := range maps {
		if filepath.Base(maps[i]) != filepath.Base(maps2[i]) {
			t.Errorf("names differ between runs: %q vs %q", maps, maps2)
		}
	}
}
