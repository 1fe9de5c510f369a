package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
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
	names := map[string]bool{}
	write := func(name string, fill func(w io.Writer) error) error {
		if names[name] {
			return fmt.Errorf("run: two outputs would both be named %s", name)
		}
		names[name] = true
		var b bytes.Buffer
		if err := fill(&b); err != nil {
			return err
		}
		p := filepath.Join(stage, name)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return err
		}
		return os.WriteFile(p, b.Bytes(), 0o644)
	}
	if err := write("results.json", func(w io.Writer) error { return report.WriteJSON(w, res) }); err != nil {
		return err
	}
	if err := write("recipe.json", func(w io.Writer) error { _, err := w.Write(res.Recipe); return err }); err != nil {
		return err
	}
	names0 := []string{"results.json", "recipe.json"}
	for _, f := range extra {
		if err := write(f.name, func(w io.Writer) error { _, err := w.Write(f.data); return err }); err != nil {
			return err
		}
		names0 = append(names0, f.name)
	}
	// Distinct channels may sanitise alike (A/B, A_B): unique, stable names.
	var mn, fn []string
	for i := range res.Maps {
		mn = append(mn, res.Maps[i].Name)
	}
	for i := range res.Figures {
		fn = append(fn, res.Figures[i].Name)
	}
	mapNames, figNames := report.UniqueNames(mn, '_'), report.UniqueNames(fn, '_')
	for i := range res.Maps {
		m := &res.Maps[i]
		if err := write(filepath.Join("maps", mapNames[i]+".csv"), func(w io.Writer) error { return report.WriteMapCSV(w, m) }); err != nil {
			return err
		}
	}
	for i, f := range res.Figures {
		if err := write(filepath.Join("figures", figNames[i]+".svg"), func(w io.Writer) error { _, err := io.WriteString(w, f.SVG); return err }); err != nil {
			return err
		}
	}
	if err := write("results.csv", func(w io.Writer) error { return report.WriteCSV(w, res) }); err != nil {
		return err
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
	for _, name := range append(names0, "results.csv") {
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
