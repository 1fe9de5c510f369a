package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"runtime/debug"

	"amplink/core/data"
	"amplink/core/dataset"
	"amplink/core/format"
	_ "amplink/core/format/all"
	"amplink/core/format/csv"
	"amplink/core/pipeline"
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

// defaultMaxMemory is run's default sample budget, the page's per worker.
const defaultMaxMemory = "1GiB"

func cmdRun(stdout, stderr io.Writer, args []string) (err error) {
	// Whatever fails, usage errors included, leaves nothing of an earlier
	// run in --out: outputs are written to a staging directory beside it
	// and replace the earlier ones only on success.
	defer func() {
		if err != nil && !errors.Is(err, flag.ErrHelp) {
			if rerr := removeOutputs(scanOut(args, "amplink-out")); rerr != nil {
				err = fmt.Errorf("%w (and removing the earlier outputs failed: %v)", err, rerr)
			}
		}
	}()
	fs := flag.NewFlagSet("run", flag.ContinueOnError)
	fs.SetOutput(stderr)
	recipePath := fs.String("recipe", "", "the analysis recipe (JSON)")
	outDir := fs.String("out", "amplink-out", "output directory")
	eventsPath := fs.String("events", "", "events file (BIDS events.tsv) for continuous input")
	trialsPath := fs.String("trials", "", "per-trial values (CSV trial,<name>...) for covariates and conditions")
	electrodesPath := fs.String("electrodes", "", "electrode positions (BIDS electrodes.tsv), replacing the built-in 10-10 positions")
	workers := fs.Int("workers", 0, "parallel workers (0: one per core)")
	groupsPath := fs.String("groups", "", "with several recordings: a CSV recording,group naming two groups to compare")
	level := fs.Float64("level", 0.95, "confidence level of the group intervals")
	maxMemory := fs.String("max-memory", defaultMaxMemory, "the most float32 samples one recording or its epochs may hold (an EDF or BDF recording stays in its file: its epochs count, and for envelope analyses a chunk and the kept envelopes), e.g. 4GiB")
	var sf studyFlags
	sf.register(fs)
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
	budget, err := parseSize(*maxMemory)
	if err != nil {
		return fmt.Errorf("run: --max-memory: %v", err)
	}
	if err := sf.check(files, *eventsPath, *trialsPath, *groupsPath); err != nil {
		return err
	}
	if len(files) == 0 && sf.root == "" {
		return errors.New("run: no input file given")
	}
	// The sample budget is checked by the readers and the epoching before
	// they allocate (data.CheckSamples).
	defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
	data.MaxSampleBytes = budget
	// A decoded recording (or epochs) is most of the live heap and stays
	// until the end; collecting at 30 % growth instead of 100 % keeps the
	// peak close to the samples themselves on long recordings.
	defer debug.SetGCPercent(debug.SetGCPercent(30))
	rb, err := readRegular(*recipePath)
	if err != nil {
		return err
	}
	rcp, err := recipe.Parse(rb)
	if err != nil {
		return fmt.Errorf("%s: %w", *recipePath, err)
	}
	if err := recipe.CheckBands(rcp); err != nil {
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
	elec, err := openElectrodes(*electrodesPath) // electrodes.go
	if err != nil {
		return err
	}
	defer elec.close()
	// The inputs: the files given, each with the files beside it, or the
	// recordings of a BIDS dataset, each with its inherited companions.
	inputs := make([]input, len(files))
	for i, path := range files {
		inputs[i] = input{path: path, sib: &dirSiblings{dir: filepath.Dir(path)}}
	}
	var st *datasetRun
	if sf.root != "" {
		if st, err = sf.find(stdout); err != nil {
			return err
		}
		inputs = st.inputs()
	}
	ctx := context.Background()
	comb := pipeline.NewCombined(len(inputs))
	var failed []string
	for _, in := range inputs {
		res, err := runOne(ctx, stderr, rcp, *recipePath, in.path, in.sib, events, trials, *trialsPath, elec, *workers)
		if errors.Is(err, data.ErrTooLarge) {
			err = fmt.Errorf("%w; --max-memory %s is the budget, raise it to analyse this", err, *maxMemory)
		}
		in.sib.Close()
		if err != nil && st != nil {
			// In a study, a recording that fails is reported and the others go on.
			msg := fmt.Sprintf("%s: failed: %v", filepath.Base(in.path), err)
			fmt.Fprintln(stderr, "amplink:", msg)
			failed = append(failed, msg)
			continue
		}
		if err != nil {
			return err
		}
		comb.Add(filepath.Base(in.path), res)
	}
	all := comb.Results()
	if all == nil {
		return fmt.Errorf("run: every recording of %s failed", sf.root)
	}
	all.Warnings = append(all.Warnings, failed...)
	analysed := comb.Recordings()
	if len(inputs) > 1 && analysed > 1 {
		// Group rows across the recordings (the same rows amplink merge adds).
		var groups map[string]string
		if *groupsPath != "" {
			if groups, err = readGroups(stderr, *groupsPath, rowRecordings(all.Rows)); err != nil {
				return err
			}
		}
		if st != nil {
			groups = st.study.GroupOf()
		}
		if err := comb.Group(groups, *level, rcp.Figures.Enabled); err != nil {
			return err
		}
	} else if *groupsPath != "" {
		return errors.New("run: --groups compares recordings; give more than one input file")
	}
	for _, w := range all.Warnings {
		fmt.Fprintln(stderr, "note:", w)
	}
	var extra []namedFile
	if st != nil {
		b, err := st.summaryJSON(failed)
		if err != nil {
			return err
		}
		extra = append(extra, namedFile{"study.json", b})
	}
	if err := writeOutputs(*outDir, all, extra...); err != nil {
		return err
	}
	if st != nil {
		st.report(stdout, analysed, failed, all.Rows)
	}
	fmt.Fprintf(stdout, "%d results written to %s\n", len(all.Rows), filepath.Join(*outDir, "results.csv"))
	return nil
}

// input is one recording to analyse and the files that go with it.
type input struct {
	path string
	sib  interface {
		format.Siblings
		Close()
	}
}

func runOne(ctx context.Context, stderr io.Writer, rcp *recipe.Recipe, recipePath, path string, sib format.Siblings, events *format.File, trials *csv.Table, trialsName string, elec *electrodeFiles, workers int) (*report.Results, error) {
	f, osf, err := openFile(path)
	if err != nil {
		return nil, err
	}
	defer osf.Close()
	ds, err := dataset.Open(rcp, f, events, sib)
	if err != nil {
		return nil, err
	}
	if trials != nil {
		if err := ds.AttachTrials(trials, trialsName); err != nil {
			return nil, err
		}
	}
	if err := elec.attach(ds); err != nil {
		return nil, err
	}
	p, err := pipeline.NewPlan(rcp, ds)
	if err != nil {
		// The recipe and the data disagree: name both.
		return nil, fmt.Errorf("%s with recipe %s: %w", path, recipePath, err)
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
	return out, nil
}
