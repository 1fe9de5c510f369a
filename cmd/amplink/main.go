// Command amplink measures power-based functional connectivity in EEG, MEG
// and LFP recordings.
//
//	amplink run --recipe R.json [--out DIR] [--events E.tsv] FILE...
//	amplink run --recipe R.json [--out DIR] --dataset ROOT [--task T] [--session S] [--run N] [--group-column C]
//	amplink merge --out FILE [--groups G.csv] [--level L] [--figures DIR] RESULTS.csv...
//	amplink demo --out DIR
//	amplink demo --study DIR
//	amplink site --out DIR
//	amplink serve [--addr 127.0.0.1:8080]
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
)

func main() {
	if err := run(os.Stdout, os.Stderr, os.Args[1:]); err != nil {
		if !errors.Is(err, flag.ErrHelp) {
			fmt.Fprintln(os.Stderr, "amplink:", err)
		}
		os.Exit(1)
	}
}

const usage = `amplink measures power-based functional connectivity (research use only).

Usage:
  amplink run --recipe R.json [--out DIR] [--events E.tsv] [--trials T.csv] [--electrodes E.tsv] FILE...
        analyse recordings; writes DIR/results.csv, results.json, recipe.json,
        figures/*.svg and maps/*.csv
  amplink run --recipe R.json [--out DIR] --dataset ROOT [--task T] [--session S]
        [--run N] [--participants L,...] [--group-column C]
        analyse every recording of a BIDS dataset (as run FILE... --groups G.csv)
  amplink demo --out DIR     write the simulated demo recording and its recipe
  amplink demo --study DIR   write a simulated BIDS study of 12 participants in two groups
  amplink merge --out FILE [--groups G.csv] [--level L] [--figures DIR] RESULTS.csv...
        combine per-recording tables and add group rows
  amplink site --out DIR     write the static web site
  amplink serve [--addr A]   build the site and serve it on 127.0.0.1
`

// run is the whole command, so tests can drive it in-process.
func run(stdout, stderr io.Writer, args []string) error {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return errors.New("no command given")
	}
	switch args[0] {
	case "run":
		return cmdRun(stdout, stderr, args[1:])
	case "demo":
		return cmdDemo(stdout, stderr, args[1:])
	case "merge":
		return cmdMerge(stdout, stderr, args[1:])
	case "site":
		return cmdSite(stdout, stderr, args[1:])
	case "serve":
		return cmdServe(stdout, stderr, args[1:])
	case "help", "-h", "--help":
		fmt.Fprint(stdout, usage)
		return nil
	}
	fmt.Fprint(stderr, usage)
	return fmt.Errorf("unknown command %q", args[0])
}
