package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime/debug"

	"amplink/core/format"
	_ "amplink/core/format/all"
	"amplink/core/format/csv"
	"amplink/core/recipe"
	"amplink/core/report"
)

// parseInterleaved parses flags that may appear before or after the
// positional arguments.
func parseInterleaved(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

func cmdRun(stdout, stderr io.Writer, args []string) error {
	fs := flag.NewFlagSet("run", flag.ContinueOnError)
	fs.SetOutput(stderr)
	recipePath := fs.String("recipe", "", "the analysis recipe (JSON)")
	outDir := fs.String("out", "amplink-out", "output directory")
	eventsPath := fs.String("events", "", "events file (BIDS events.tsv) for continuous input")
	trialsPath := fs.String("trials", "", "per-trial values (CSV trial,<name>...) for covariates and conditions")
	workers := fs.Int("workers", 0, "parallel workers (0: one per core)")
	groupsPath := fs.String("groups", "", "with several recordings: a CSV recording,group naming two groups to compare")
	level := fs.Float64("level", 0.95, "confidence level of the group intervals")
	files, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if *recipePath == "" {
		return errors.New("run: --recipe is required")
	}
	if !(*level > 0 && *level < 1) {
		return fmt.Errorf("run: --level %g must lie between 0 and 1", *level)
	}
	if len(files) == 0 {
		return errors.New("run: no input file given")
	}
	// The decoded recording is most of the live heap and stays until the
	// end; collecting at 30 % growth instead of 100 % keeps the peak close to
	// the samples themselves on long recordings.
	defer debug.SetGCPercent(debug.SetGCPercent(30))
	// A failed run leaves no results.csv, not even one from an earlier run.
	if err := os.Remove(filepath.Join(*outDir, "results.csv")); err != nil && !errors.Is(err, os.ErrNotExist) {
		return err
	}
	rb, err := os.ReadFile(*recipePath)
	if err != nil {
		return err
	}
	rcp, err := recipe.Parse(rb)
	if err != nil {
		return fmt.Errorf("%s: %w", *recipePath, err)
	}
	var events *format.File
	if *eventsPath != "" {
		ef, f, err := openFile(*eventsPath)
		if err != nil {
			return err
		}
		defer f.Close()
		events = &ef
	}
	var trials *csv.Table
	if *trialsPath != "" {
		tf, f, err := openFile(*trialsPath)
		if err != nil {
			return err
		}
		trials, err = csv.DecodeTrials(tf)
		f.Close()
		if err != nil {
			return err
		}
	}
	ctx := context.Background()
	var all *report.Results
	for _, path := range files {
		res, err := runOne(ctx, stderr, rcp, path, events, trials, *trialsPath, *workers, len(files) > 1)
		if err != nil {
			return err
		}
		for i := range res.Rows {
			res.Rows[i].Extra = append(res.Rows[i].Extra, report.Field{Name: "recording", Value: filepath.Base(path)})
		}
		if all == nil {
			all = res
			continue
		}
		all.Rows = append(all.Rows, res.Rows...)
		all.Maps = append(all.Maps, res.Maps...)
		all.Figures = append(all.Figures, res.Figures...)
		all.Warnings = append(all.Warnings, res.Warnings...)
	}
	if len(files) > 1 {
		// Group rows across the recordings (the same rows amplink merge adds).
		var groups map[string]string
		if *groupsPath != "" {
			if groups, err = readGroups(stderr, *groupsPath, all.Rows); err != nil {
				return err
			}
		}
		g, err := report.GroupRows(all.Rows, groups, *level)
		if err != nil {
			return err
		}
		all.Rows = append(all.Rows, g...)
		if rcp.Figures.Enabled {
			all.Figures = append(all.Figures, report.GroupFigures(all.Rows)...)
		}
	} else if *groupsPath != "" {
		return errors.New("run: --groups compares recordings; give more than one input file")
	}
	for _, w := range all.Warnings {
		fmt.Fprintln(stderr, "note:", w)
	}
	if err := writeOutputs(*outDir, all); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "%d results written to %s\n", len(all.Rows), filepath.Join(*outDir, "results.csv"))
	return nil
}

func runOne(ctx context.Context, stderr io.Writer, rcp *recipe.Recipe, path string, events *format.File, trials *csv.Table, trialsName string, workers int, prefix bool) (*report.Results, error) {
	f, osf, err := openFile(path)
	if err != nil {
		return nil, err
	}
	defer osf.Close()
	sib := &dirSiblings{dir: filepath.Dir(path)}
	defer sib.Close()
	ds, err := recipe.Open(rcp, f, events, sib)
	if err != nil {
		return nil, err
	}
	if trials != nil {
		if err := ds.AttachTrials(trials, trialsName); err != nil {
			return nil, err
		}
	}
	p, err := recipe.NewPlan(rcp, ds)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if workers <= 0 {
		workers = defaultWorkers()
	}
	bar := newProgress(stderr, filepath.Base(path))
	res, err := p.ComputeAll(ctx, workers, bar.update)
	bar.done()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	out, err := p.Finish(ctx, res)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if prefix {
		stem := recipe.Stem(path)
		for i := range out.Maps {
			out.Maps[i].Name = stem + "_" + out.Maps[i].Name
		}
		for i := range out.Figures {
			out.Figures[i].Name = stem + "_" + out.Figures[i].Name
		}
		for i, w := range out.Warnings {
			out.Warnings[i] = filepath.Base(path) + ": " + w
		}
	}
	return out, nil
}

// writeOutputs writes every output into a staging directory beside dir and
// moves it into place, results.csv last, so that a failure part-way leaves
// no results.csv.
func writeOutputs(dir string, res *report.Results) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	stage, err := os.MkdirTemp(dir, ".staging-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(stage)
	// the same files, in the same layout, as the page's archive
	files, err := report.Outputs(res)
	if err != nil {
		return err
	}
	for _, f := range files {
		p := filepath.Join(stage, filepath.FromSlash(f.Name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return err
		}
		if err := os.WriteFile(p, f.Data, 0o644); err != nil {
			return err
		}
	}
	// Move into place: everything but results.csv first.
	for _, sub := range []string{"maps", "figures"} {
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
	for _, name := range []string{"results.json", "recipe.json", "results.csv"} {
		if err := os.Rename(filepath.Join(stage, name), filepath.Join(dir, name)); err != nil {
			return err
		}
	}
	return nil
}
