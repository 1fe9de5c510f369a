package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"amplink/core/report"
)

// The files amplink run writes into --out. A failed run removes these (and
// only these) so that nothing of an earlier run is mistaken for its output.
var (
	outFiles = []string{"results.csv", "results.json", "recipe.json", "study.json"}
	outDirs  = map[string]string{"maps": ".csv", "figures": ".svg"}
)

// scanOut finds the --out value in args without parsing them, for the
// cleanup after a usage error (which may stop flag parsing before --out).
func scanOut(args []string, def string) string {
	out := def
	for i, a := range args {
		if a == "--" {
			break
		}
		for _, p := range []string{"--out", "-out"} {
			switch {
			case a == p && i+1 < len(args):
				out = args[i+1]
			case strings.HasPrefix(a, p+"="):
				out = a[len(p)+1:]
			}
		}
	}
	return out
}

// removeOutputs removes what an earlier run wrote into dir: results.csv,
// results.json, recipe.json, study.json (a --dataset run), maps/*.csv and figures/*.svg (and maps/ and
// figures/ when that leaves them empty). Other files are left alone.
func removeOutputs(dir string) error {
	st, err := os.Stat(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if !st.IsDir() {
		return nil
	}
	for _, name := range outFiles {
		if err := os.Remove(filepath.Join(dir, name)); err != nil && !errors.Is(err, os.ErrNotExist) {
			return err
		}
	}
	for sub, ext := range outDirs {
		p := filepath.Join(dir, sub)
		entries, err := os.ReadDir(p)
		if errors.Is(err, os.ErrNotExist) {
			continue
		}
		if err != nil {
			return err
		}
		left := 0
		for _, e := range entries {
			if e.Type().IsRegular() && strings.HasSuffix(e.Name(), ext) {
				if err := os.Remove(filepath.Join(p, e.Name())); err != nil {
					return err
				}
				continue
			}
			left++
		}
		if left == 0 {
			os.Remove(p)
		}
	}
	return nil
}

// writeOutputs writes every output into a fresh staging directory beside
// dir and, once all of it is written, replaces the earlier run's outputs in
// dir with it (results.csv last). A failure part-way leaves nothing in dir
// (the caller removes the earlier outputs, see removeOutputs).
func writeOutputs(dir string, res *report.Results, extra ...namedFile) error {
	parent := filepath.Dir(filepath.Clean(dir))
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return err
	}
	stage, err := os.MkdirTemp(parent, "."+filepath.Base(filepath.Clean(dir))+".staging-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(stage)
	// the same files, in the same layout, as the page's archive
	files, err := report.Outputs(res)
	if err != nil {
		return err
	}
	for _, f := range extra {
		files = append(files, report.OutFile{Name: f.name, Data: f.data})
	}
	names := map[string]bool{}
	var top []string
	for _, f := range files {
		if names[f.Name] {
			return fmt.Errorf("run: two outputs would both be named %s", f.Name)
		}
		names[f.Name] = true
		p := filepath.Join(stage, filepath.FromSlash(f.Name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return err
		}
		if err := os.WriteFile(p, f.Data, 0o644); err != nil {
			return err
		}
		if !strings.Contains(f.Name, "/") && f.Name != "results.csv" {
			top = append(top, f.Name)
		}
	}
	// Everything is written: replace the earlier run's outputs.
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	if err := removeOutputs(dir); err != nil {
		return err
	}
	for sub := range outDirs {
		entries, err := os.ReadDir(filepath.Join(stage, sub))
		if errors.Is(err, os.ErrNotExist) {
			continue
		}
		if err != nil {
			return err
		}
		if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
			return err
		}
		for _, e := range entries {
			if err := os.Rename(filepath.Join(stage, sub, e.Name()), filepath.Join(dir, sub, e.Name())); err != nil {
				return err
			}
		}
	}
	for _, name := range append(top, "results.csv") {
		if err := os.Rename(filepath.Join(stage, name), filepath.Join(dir, name)); err != nil {
			return err
		}
	}
	return nil
}

// parseSize reads a byte count such as 1GiB, 512MiB, 2G or 1073741824.
// The units are binary (K = KiB = 1024 bytes).
func parseSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	mult := int64(1)
	lower := strings.ToLower(t)
	for _, u := range []struct {
		suf string
		m   int64
	}{{"kib", 1 << 10}, {"mib", 1 << 20}, {"gib", 1 << 30}, {"tib", 1 << 40}, {"k", 1 << 10}, {"m", 1 << 20}, {"g", 1 << 30}, {"t", 1 << 40}, {"b", 1}} {
		if strings.HasSuffix(lower, u.suf) {
			t, mult = strings.TrimSpace(t[:len(t)-len(u.suf)]), u.m
			break
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || !(v > 0) || v*float64(mult) > 1<<62 {
		return 0, fmt.Errorf("%q is not a size such as 2GiB or 512MiB", s)
	}
	return int64(v * float64(mult)), nil
}
