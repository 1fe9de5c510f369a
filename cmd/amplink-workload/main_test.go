package main

import (
	"bytes"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"amplink/cmd/amplink-workload/workload"
	"amplink/core/format"
	"amplink/core/format/f32"
	"amplink/core/recipe"
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
