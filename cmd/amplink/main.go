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
//
// `amplink -h` lists every command and run's flags; `amplink <command> -h`
// describes one command.
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

// run is the whole command, so tests can drive it in-process.
func run(stdout, stderr io.Writer, args []string) error {
	if len(args) == 0 {
		topHelp(stderr)
		return errors.New("no command given")
	}
	switch args[0] {
	case "help", "-h", "-help", "--help":
		if len(args) > 1 {
			if c := findCommand(args[1]); c != nil {
				commandHelp(stdout, c)
				return nil
			}
		}
		topHelp(stdout)
		return nil
	case "version", "-version", "--version":
		fmt.Fprintln(stdout, "amplink", version())
		return nil
	}
	c := findCommand(args[0])
	if c == nil {
		topHelp(stderr)
		return fmt.Errorf("unknown command %q", args[0])
	}
	if wantsHelp(args[1:]) {
		commandHelp(stdout, c)
		return nil
	}
	return c.do(stdout, stderr, args[1:])
}
