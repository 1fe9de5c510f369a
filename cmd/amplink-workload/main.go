// Command amplink-workload writes the standard performance workloads of
// amplink to a directory. It is a tool for measurements, not part of CI.
//
//	amplink-workload --out DIR [--trials N] [--channels C] [--seed S] [--envelope]
//	amplink-workload --out DIR --long [--minutes M] [--channels C] [--name STEM] [--envelope]
//	amplink-workload --out DIR --tables K --template RESULTS.csv [--seed S]
//
// Always written: DIR/workload.f32 and its sidecar DIR/workload.json
// (32 channels × 200 trials × 2.5 s at 500 Hz, float32), DIR/recipe.json
// (the trial-window recipe, 1024 rows, figures off: the work that
// testdata/bench/compare_numpy.py also does) and DIR/recipe-figures.json
// (the same with the default figures). --channels C makes C channels
// (workload.EpochsN; the recipe then has C × C rows); with --long it sets
// the long recording's channels instead, and the standard epochs keep 32.
//
// --tables K writes, instead, K results tables for measuring amplink merge:
// DIR/sub-0001/results.csv … (workload.Tables: RESULTS.csv with its recording
// and its r and p varied per table) and DIR/groups.csv (recording,group, two
// groups alternating).
//
// --envelope adds DIR/envelope.edf (10 minutes, 32 channels, 500 Hz, EDF+C)
// and DIR/envelope-recipe.json (all-pairs orthogonalised 8–12 Hz envelope
// correlation, envelopes at 10 Hz).
//
// --long adds DIR/long.edf (1 hour, 64 channels, 1 kHz, EDF+C) and
// DIR/long-recipe.json (the same analysis). --minutes and --channels
// change its length and channel count (crops for memory measurements:
// --minutes 10, 30, 600), and --name its file stem.
package main

import (
	"bufio"
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"amplink/cmd/amplink-workload/workload"
	"amplink/core/data"
	"amplink/core/format/edf"
	"amplink/core/format/f32"
	"amplink/core/report"
)

func main() {
	if err := run(os.Stdout, os.Stderr, os.Args[1:]); err != nil {
		if !errors.Is(err, flag.ErrHelp) {
			fmt.Fprintln(os.Stderr, "amplink-workload:", err)
		}
		os.Exit(1)
	}
}

func run(stdout, stderr io.Writer, args []string) error {
	fs := flag.NewFlagSet("amplink-workload", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("out", "", "output directory (required)")
	trials := fs.Int("trials", workload.StdTrials, "trials of the standard epochs")
	channels := fs.Int("channels", 0, "channels of the standard epochs (default 32); with --long, of the long recording (default 64)")
	tables := fs.Int("tables", 0, "write this many results tables made from --template instead")
	template := fs.String("template", "", "with --tables: the results.csv the tables are made from")
	seed := fs.Uint64("seed", 1, "generator seed")
	long := fs.Bool("long", false, "also write the 1-hour 64-channel 1 kHz EDF+ and its recipe")
	env := fs.Bool("envelope", false, "also write the 10-minute 32-channel 500 Hz EDF+ and its recipe")
	minutes := fs.Float64("minutes", 60, "with --long: the recording's length in minutes")
	name := fs.String("name", "long", "with --long: the file stem (STEM.edf, STEM-recipe.json)")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *out == "" {
		return errors.New("--out is required")
	}
	if fs.NArg() > 0 {
		return fmt.Errorf("unexpected argument %q", fs.Arg(0))
	}
	if *tables > 0 || *template != "" {
		return writeTables(stdout, *out, *template, *tables, *seed)
	}
	stdCh, longCh := workload.StdChannels, 64
	given := false
	fs.Visit(func(f *flag.Flag) { given = given || f.Name == "channels" })
	if given {
		if *long {
			longCh = *channels
		} else {
			stdCh = *channels
		}
	}
	if !(*minutes > 0 && *minutes <= 24*60) {
		return fmt.Errorf("--minutes %g: need more than 0 and at most 1440", *minutes)
	}
	if longCh < 2 || longCh > 512 {
		return fmt.Errorf("--channels %d: need 2 to 512 for --long", longCh)
	}
	if *name == "" || filepath.Base(*name) != *name {
		return fmt.Errorf("--name %q: need a plain file stem", *name)
	}
	if *trials < 3 {
		return fmt.Errorf("--trials %d: need at least 3", *trials)
	}
	if stdCh < 4 {
		return fmt.Errorf("--channels %d: need at least 4", stdCh)
	}
	if err := os.MkdirAll(*out, 0o755); err != nil {
		return err
	}
	t0 := time.Now()
	e := workload.EpochsN(stdCh, *trials, *seed)
	if err := writeEpochs(*out, "workload", e); err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(*out, "recipe.json"), []byte(workload.StdRecipe), 0o644); err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(*out, "recipe-figures.json"), []byte(workload.StdRecipeFigures), 0o644); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "workload.f32: %d channels × %d trials × %d samples at %g Hz (%.1fs)\n",
		len(e.Channels), e.NTrials, e.NSamples, e.Rate, time.Since(t0).Seconds())
	if *env {
		if err := writeContinuous(stdout, *out, "envelope", 32, 500, 600, *seed); err != nil {
			return err
		}
	}
	if *long {
		if err := writeContinuous(stdout, *out, *name, longCh, 1000, *minutes*60, *seed); err != nil {
			return err
		}
	}
	return nil
}

// writeTables writes k tables made from the template table (workload.Tables)
// as DIR/<stem>/results.csv, and DIR/groups.csv.
func writeTables(stdout io.Writer, dir, template string, k int, seed uint64) error {
	if k < 1 || template == "" {
		return errors.New("--tables K needs K ≥ 1 and --template RESULTS.csv")
	}
	b, err := os.ReadFile(template)
	if err != nil {
		return err
	}
	tmpl, err := report.ReadCSV(bytes.NewReader(b), template)
	if err != nil {
		return err
	}
	var groups bytes.Buffer
	groups.WriteString("recording,group\n")
	err = workload.Tables(tmpl, k, seed, func(i int, res *report.Results) error {
		name := workload.TableName(i)
		sub := filepath.Join(dir, strings.SplitN(name, "_", 2)[0])
		if err := os.MkdirAll(sub, 0o755); err != nil {
			return err
		}
		var buf bytes.Buffer
		if err := report.WriteCSV(&buf, res); err != nil {
			return err
		}
		fmt.Fprintf(&groups, "%s,%s\n", name, workload.TableGroup(i))
		return os.WriteFile(filepath.Join(sub, "results.csv"), buf.Bytes(), 0o644)
	})
	if err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(dir, "groups.csv"), groups.Bytes(), 0o644); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "%d results tables of %d rows each in %s, and groups.csv\n", k, len(tmpl.Rows), dir)
	return nil
}

func writeEpochs(dir, stem string, e *data.Epochs) error {
	bin, err := os.Create(filepath.Join(dir, stem+".f32"))
	if err != nil {
		return err
	}
	side, err := os.Create(filepath.Join(dir, stem+".json"))
	if err != nil {
		bin.Close()
		return err
	}
	bw := bufio.NewWriterSize(bin, 1<<20)
	werr := f32.Write(bw, side, e)
	return errors.Join(werr, bw.Flush(), bin.Close(), side.Close())
}

// writeContinuous writes stem.edf and stem-recipe.json. edf.Write takes a
// whole Recording, so the samples are held in memory (4 bytes per sample).
func writeContinuous(stdout io.Writer, dir, stem string, nch int, rate, seconds float64, seed uint64) error {
	t0 := time.Now()
	r := workload.Continuous(nch, rate, seconds, seed)
	gen := time.Since(t0)
	path := filepath.Join(dir, stem+".edf")
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	bw := bufio.NewWriterSize(f, 1<<20)
	werr := edf.Write(bw, r, edf.WriteOptions{})
	if err := errors.Join(werr, bw.Flush(), f.Close()); err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(dir, stem+"-recipe.json"), []byte(workload.EnvelopeRecipe), 0o644); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "%s.edf: %d channels × %g s at %g Hz (generate %.1fs, write %.1fs)\n",
		stem, nch, seconds, rate, gen.Seconds(), (time.Since(t0) - gen).Seconds())
	return nil
}
