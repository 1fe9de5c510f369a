// Command amplink-workload writes the standard performance workloads of
// amplink to a directory. It is a tool for measurements, not part of CI.
//
//	amplink-workload --out DIR [--trials N] [--seed S] [--long [--minutes M] [--channels N] [--name STEM]] [--envelope]
//
// Always written: DIR/workload.f32 and its sidecar DIR/workload.json
// (32 channels × 200 trials × 2.5 s at 500 Hz, float32), DIR/recipe.json
// (the trial-window recipe, 1024 rows, figures off: the work that
// testdata/bench/compare_numpy.py also does) and DIR/recipe-figures.json
// (the same with the default figures).
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
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"amplink/cmd/amplink-workload/workload"
	"amplink/core/data"
	"amplink/core/format/edf"
	"amplink/core/format/f32"
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
	seed := fs.Uint64("seed", 1, "generator seed")
	long := fs.Bool("long", false, "also write the 1-hour 64-channel 1 kHz EDF+ and its recipe")
	env := fs.Bool("envelope", false, "also write the 10-minute 32-channel 500 Hz EDF+ and its recipe")
	minutes := fs.Float64("minutes", 60, "with --long: the recording's length in minutes")
	nch := fs.Int("channels", 64, "with --long: the number of channels")
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
	if !(*minutes > 0 && *minutes <= 24*60) {
		return fmt.Errorf("--minutes %g: need more than 0 and at most 1440", *minutes)
	}
	if *nch < 2 || *nch > 512 {
		return fmt.Errorf("--channels %d: need 2 to 512", *nch)
	}
	if *name == "" || filepath.Base(*name) != *name {
		return fmt.Errorf("--name %q: need a plain file stem", *name)
	}
	if *trials < 3 {
		return fmt.Errorf("--trials %d: need at least 3", *trials)
	}
	if err := os.MkdirAll(*out, 0o755); err != nil {
		return err
	}
	t0 := time.Now()
	e := workload.Epochs(*trials, *seed)
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
		if err := writeContinuous(stdout, *out, *name, *nch, 1000, *minutes*60, *seed); err != nil {
			return err
		}
	}
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
