package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"amplink/cmd/amplink-workload/workload"
	"amplink/core/format"
	"amplink/core/format/f32"
	"amplink/core/recipe"
	"amplink/core/report"
)

type dirSib string

func (d dirSib) Open(name string) (format.File, error) {
	b, err := os.ReadFile(filepath.Join(string(d), filepath.Base(name)))
	if err != nil {
		return format.File{}, format.ErrNoSibling
	}
	return format.Bytes(name, b), nil
}

func TestRunWritesWorkload(t *testing.T) {
	dir := t.TempDir()
	var out, errb bytes.Buffer
	if err := run(&out, &errb, []string{"--out", dir, "--trials", "4", "--seed", "3"}); err != nil {
		t.Fatalf("%v\n%s", err, errb.String())
	}
	bin, err := os.ReadFile(filepath.Join(dir, "workload.f32"))
	if err != nil {
		t.Fatal(err)
	}
	d, err := f32.Decode(format.Bytes("workload.f32", bin), dirSib(dir))
	if err != nil {
		t.Fatal(err)
	}
	want := workload.Epochs(4, 3)
	rb, err := os.ReadFile(filepath.Join(dir, "recipe.json"))
	if err != nil {
		t.Fatal(err)
	}
	fb, err := os.ReadFile(filepath.Join(dir, "recipe-figures.json"))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		ok   bool
	}{
		{"samples round-trip", slices.Equal(d.Epochs.Data, want.Data)},
		{"shape", d.Epochs.NTrials == 4 && d.Epochs.NSamples == workload.StdSamples && len(d.Epochs.Channels) == workload.StdChannels},
		{"start", d.Epochs.Start == workload.StdStart},
		{"recipe", string(rb) == workload.StdRecipe},
		{"recipe with figures", string(fb) == workload.StdRecipeFigures},
		{"report", strings.Contains(out.String(), "32 channels × 4 trials × 1250 samples")},
	} {
		t.Run(c.name, func(t *testing.T) {
			if !c.ok {
				t.Errorf("failed; stdout %q", out.String())
			}
		})
	}
	for _, b := range [][]byte{rb, fb} {
		r, err := recipe.Parse(b)
		if err != nil {
			t.Fatalf("%s: %v", b, err)
		}
		if r.Figures.Enabled != (&b[0] == &fb[0]) {
			t.Errorf("figures enabled = %v in\n%s", r.Figures.Enabled, b)
		}
	}
}

func TestRunErrors(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"no out", nil, "--out is required"},
		{"few trials", []string{"--out", "x", "--trials", "2"}, "--trials 2"},
		{"extra argument", []string{"--out", "x", "y"}, `unexpected argument "y"`},
		{"unknown flag", []string{"--nope"}, "flag provided but not defined"},
		{"few channels", []string{"--out", "x", "--channels", "3"}, "--channels 3"},
		{"tables without template", []string{"--out", "x", "--tables", "2"}, "--template"},
	} {
		t.Run(c.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			err := run(&out, &errb, c.args)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}

// --tables writes one results table per simulated recording, made from the
// template, that reads back with the template's rows and the new recording,
// and a groups file naming every one.
func TestRunWritesTables(t *testing.T) {
	dir := t.TempDir()
	tmpl := filepath.Join(dir, "template.csv")
	var b bytes.Buffer
	res := &report.Results{Rows: []report.Row{{Analysis: "a", Type: "trial-window", Seed: "E01", Target: "E02", Method: "spearman", N: 40, R: 0.3, P: 0.06,
		Extra: []report.Field{{Name: "recording", Value: "one.f32"}}}}}
	if err := report.WriteCSV(&b, res); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(tmpl, b.Bytes(), 0o644)
	out := filepath.Join(dir, "tables")
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"--out", out, "--tables", "3", "--template", tmpl}); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	for i := range 3 {
		p := filepath.Join(out, fmt.Sprintf("sub-%04d", i+1), "results.csv")
		f, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		got, err := report.ReadCSV(bytes.NewReader(f), p)
		if err != nil {
			t.Fatal(err)
		}
		if len(got.Rows) != 1 || got.Rows[0].Field("recording") != workload.TableName(i) || got.Rows[0].Target != "E02" {
			t.Errorf("%s: %+v", p, got.Rows)
		}
	}
	g, err := os.ReadFile(filepath.Join(out, "groups.csv"))
	if err != nil {
		t.Fatal(err)
	}
	want := "recording,group\nsub-0001_task-work_eeg.f32,a\nsub-0002_task-work_eeg.f32,b\nsub-0003_task-work_eeg.f32,a\n"
	if string(g) != want {
		t.Errorf("groups.csv %q, want %q", g, want)
	}
}
