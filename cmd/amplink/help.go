package main

import (
	"bytes"
	"fmt"
	"io"
	"runtime/debug"
	"strings"
)

// command describes one subcommand for the help texts. Its flags are not
// listed here: they are read from the command's own flag set (see
// flagHelp), so the help stays true when a flag is added.
type command struct {
	name  string
	args  string // the synopsis after the command name
	about string // what it does, a paragraph
	do    func(stdout, stderr io.Writer, args []string) error
}

var commands = []command{
	{"run", "--recipe R.json [flags] FILE... | --recipe R.json [flags] --dataset ROOT",
		"Analyse one or more recordings with a recipe. Writes DIR/results.csv, results.json, recipe.json (the recipe with every default filled in), figures/*.svg and maps/*.csv; a failed run leaves nothing of an earlier run in DIR. Companions beside each FILE (<stem>_events.tsv, <stem>_channels.tsv, <stem>_trials.csv, <stem>_electrodes.tsv) are found by name. With several FILEs, group rows are added. With --dataset, every recording of a BIDS dataset is analysed (filtered by --task, --session, --run, --participants) with its companions found by the BIDS inheritance principle, a recording that fails is reported while the others go on, and --group-column names the participants.tsv column of two groups to compare; DIR/study.json says what was found and skipped.",
		cmdRun},
	{"demo", "[--out DIR] [--study DIR]",
		"Write the simulated demo session (EDF+, continuous CSV with events.tsv, float32 epochs, epoched CSV, WAV, trials tables) and its recipe; with --study, a simulated BIDS study of 12 participants in two groups, with its recipe as code/recipe.json.",
		cmdDemo},
	{"merge", "--out FILE [flags] RESULTS.csv...",
		"Combine the results.csv tables of several runs (one per recording) and append the group rows: Fisher-z pooled r with a one-sample t-test, and with --groups a two-group comparison.",
		cmdMerge},
	{"site", "--out DIR [--src MODULE_DIR]",
		"Write the complete static web site (the page and its analysis workers, built to WebAssembly) for any plain file server.",
		cmdSite},
	{"serve", "[--addr 127.0.0.1:8080] [--src MODULE_DIR]",
		"Build the site and serve it on a local address until interrupted.",
		cmdServe},
}

func findCommand(name string) *command {
	for i := range commands {
		if commands[i].name == name {
			return &commands[i]
		}
	}
	return nil
}

// flagHelp is the flag listing of a command, as its own flag set prints it
// when asked for -h.
func flagHelp(c *command) string {
	var buf bytes.Buffer
	c.do(io.Discard, &buf, []string{"-h"})
	s := buf.String()
	if i := strings.IndexByte(s, '\n'); i >= 0 && strings.HasPrefix(s, "Usage of ") {
		s = s[i+1:]
	}
	return s
}

// wantsHelp reports whether args ask for help.
func wantsHelp(args []string) bool {
	for _, a := range args {
		switch a {
		case "-h", "-help", "--help":
			return true
		case "--":
			return false
		}
	}
	return false
}

// commandHelp writes `amplink <command> -h`.
func commandHelp(w io.Writer, c *command) {
	fmt.Fprintf(w, "Usage: amplink %s %s\n\n", c.name, c.args)
	fmt.Fprintf(w, "%s\n\n", wrap(c.about, 76, ""))
	if fl := flagHelp(c); strings.TrimSpace(fl) != "" {
		fmt.Fprintf(w, "Flags:\n%s", fl)
	}
}

// topHelp writes `amplink -h`: every command, and every flag of run.
func topHelp(w io.Writer) {
	fmt.Fprintf(w, "amplink %s measures power-based functional connectivity (research use only).\n\nUsage:\n", version())
	for i := range commands {
		c := &commands[i]
		fmt.Fprintf(w, "  amplink %s %s\n%s\n", c.name, c.args, wrap(c.about, 72, "        "))
	}
	fmt.Fprintf(w, "\nFlags of run:\n%s", flagHelp(findCommand("run")))
	fmt.Fprint(w, "\n  amplink <command> -h   describes a command and its flags\n  amplink --version      prints the version\n")
}

// wrap breaks s into lines of at most width characters, each indented.
func wrap(s string, width int, indent string) string {
	var lines []string
	line := indent
	for _, w := range strings.Fields(s) {
		if len(line) > len(indent) && len(line)+1+len(w) > width {
			lines = append(lines, line)
			line = indent
		}
		if len(line) > len(indent) {
			line += " "
		}
		line += w
	}
	return strings.Join(append(lines, line), "\n")
}

// version is the module version the binary was built from, or the VCS
// revision when built inside the source tree.
func version() string {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return "(unknown version)"
	}
	v := bi.Main.Version
	var rev, dirty string
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			if s.Value == "true" {
				dirty = "+modified"
			}
		}
	}
	if (v == "" || v == "(devel)") && rev != "" {
		if len(rev) > 12 {
			rev = rev[:12]
		}
		return "devel " + rev + dirty
	}
	if v == "" {
		v = "(devel)"
	}
	return v
}
