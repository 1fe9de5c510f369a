package main

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"amplink/core/format"
	"amplink/core/report"
	"amplink/core/study"
)

// studyFlags are run's flags for a BIDS dataset.
type studyFlags struct {
	root, task, session, run, participants, groupColumn string
}

func (sf *studyFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&sf.root, "dataset", "", "a BIDS dataset's root folder: analyse every recording found in it")
	fs.StringVar(&sf.task, "task", "", "with --dataset: only recordings of this task")
	fs.StringVar(&sf.session, "session", "", "with --dataset: only recordings of this session")
	fs.StringVar(&sf.run, "run", "", "with --dataset: only recordings of this run (1 matches run-01)")
	fs.StringVar(&sf.participants, "participants", "", "with --dataset: only these participants (comma-separated labels)")
	fs.StringVar(&sf.groupColumn, "group-column", "", "with --dataset: the participants.tsv column whose two values are the groups to compare")
}

// check refuses flag combinations that do not fit together.
func (sf *studyFlags) check(files []string, events, trials, groups string) error {
	if sf.root == "" {
		for name, v := range map[string]string{"--task": sf.task, "--session": sf.session, "--run": sf.run, "--participants": sf.participants, "--group-column": sf.groupColumn} {
			if v != "" {
				return fmt.Errorf("run: %s selects from a dataset; give --dataset ROOT", name)
			}
		}
		return nil
	}
	switch {
	case len(files) > 0:
		return fmt.Errorf("run: give either --dataset or input files, not both (%s)", files[0])
	case events != "" || trials != "":
		return errors.New("run: --events and --trials are for input files; a dataset's recordings take their companions from the dataset")
	case groups != "":
		return errors.New("run: with --dataset, --group-column names the participants.tsv column that gives the groups")
	}
	return nil
}

// datasetRun is a BIDS dataset found on disk, ready to run.
type datasetRun struct {
	root  string
	study *study.Study
}

// find lists the dataset's files, finds its recordings and prints what it
// found.
func (sf *studyFlags) find(stdout io.Writer) (*datasetRun, error) {
	info, err := os.Stat(sf.root)
	if err != nil {
		return nil, fmt.Errorf("run: --dataset: %w", err)
	}
	if !info.IsDir() {
		return nil, fmt.Errorf("run: --dataset %s is not a folder", sf.root)
	}
	var paths []string
	err = filepath.WalkDir(sf.root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && p != sf.root && strings.HasPrefix(d.Name(), ".") {
			return filepath.SkipDir // .git and other hidden folders
		}
		if d.Type().IsRegular() {
			rel, err := filepath.Rel(sf.root, p)
			if err != nil {
				return err
			}
			paths = append(paths, filepath.ToSlash(rel))
		}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("run: --dataset: %w", err)
	}
	var parts []string
	for _, p := range strings.Split(sf.participants, ",") {
		if p = strings.TrimSpace(p); p != "" {
			parts = append(parts, p)
		}
	}
	open := &dirSiblings{dir: sf.root, nested: true}
	st, err := study.Find(paths, open, study.Filter{Task: sf.task, Session: sf.session, Run: sf.run, Participants: parts, GroupColumn: sf.groupColumn})
	open.Close()
	if err != nil {
		return nil, fmt.Errorf("run: %s: %w", sf.root, err)
	}
	describeStudy(stdout, sf.root, st)
	if len(st.Recordings) == 0 {
		return nil, fmt.Errorf("run: no recording found in %s (see what was skipped above)", sf.root)
	}
	return &datasetRun{root: sf.root, study: st}, nil
}

// inputs lists the recordings with their inherited companions.
func (d *datasetRun) inputs() []input {
	var in []input
	for i := range d.study.Recordings {
		r := &d.study.Recordings[i]
		sib := &dirSiblings{dir: d.root, nested: true}
		in = append(in, input{path: filepath.Join(d.root, filepath.FromSlash(r.Path)), sib: &studySiblings{Siblings: r.Siblings(sib), open: sib}})
	}
	return in
}

// describeStudy prints what was found: participants, sessions, tasks and
// runs, the groups, what was skipped and why, and the notes.
func describeStudy(w io.Writer, root string, st *study.Study) {
	name := ""
	if st.Name != "" {
		name = fmt.Sprintf(" %q", st.Name)
		if st.BIDSVersion != "" {
			name += " (BIDS " + st.BIDSVersion + ")"
		}
	}
	fmt.Fprintf(w, "dataset %s%s: %d recordings\n", root, name, len(st.Recordings))
	list := func(label string, vs []string) {
		if len(vs) == 0 {
			vs = []string{"none"}
		}
		fmt.Fprintf(w, "  %s: %s\n", label, strings.Join(vs, ", "))
	}
	list(fmt.Sprintf("participants (%d)", len(st.Participants())), st.Participants())
	list("sessions", st.Sessions())
	list("tasks", st.Tasks())
	list("runs", st.Runs())
	if st.GroupColumn != "" {
		count := map[string]int{}
		for _, r := range st.Recordings {
			count[r.Group]++
		}
		var gs []string
		for _, g := range st.Groups {
			gs = append(gs, fmt.Sprintf("%s (%d recordings)", g, count[g]))
		}
		fmt.Fprintf(w, "  groups from participants.tsv column %s: %s\n", st.GroupColumn, strings.Join(gs, ", "))
	}
	fmt.Fprintf(w, "  skipped: %d\n", len(st.Skipped))
	for _, s := range st.Skipped {
		fmt.Fprintf(w, "    %s: %s\n", s.Path, s.Reason)
	}
	for _, n := range st.Notes {
		fmt.Fprintf(w, "  note: %s\n", n)
	}
}

// report prints how many recordings were analysed, which failed and why,
// and how many recordings the group rows pool.
func (d *datasetRun) report(w io.Writer, analysed int, failed []string, rows []report.Row) {
	fmt.Fprintf(w, "analysed %d of %d recordings", analysed, len(d.study.Recordings))
	if len(failed) > 0 {
		fmt.Fprintf(w, "; %d failed and were left out:\n", len(failed))
		for _, f := range failed {
			fmt.Fprintf(w, "  %s\n", f)
		}
	} else {
		fmt.Fprintln(w)
	}
	pooled := map[string]int{}
	var order []string
	for i := range rows {
		r := &rows[i]
		if pm, _ := r.Lookup("p_method"); !r.IsGroupRow() || pm == "welch-t" {
			continue // the difference rows pool both groups
		}
		rec := r.Recording()
		if _, ok := pooled[rec]; !ok {
			order = append(order, rec)
		}
		pooled[rec] = max(pooled[rec], r.N)
	}
	if len(order) == 0 {
		fmt.Fprintln(w, "no group rows: they need at least two recordings")
		return
	}
	sort.Strings(order)
	var parts []string
	for _, rec := range order {
		parts = append(parts, fmt.Sprintf("%s %d", rec, pooled[rec]))
	}
	fmt.Fprintf(w, "group rows pool up to: %s recordings (n in each group row counts those with a defined r)\n", strings.Join(parts, ", "))
}

// summaryJSON is study.json: what was found, skipped and failed.
func (d *datasetRun) summaryJSON(failed []string) ([]byte, error) {
	v := struct {
		*study.Study
		Participants []string `json:"participants"`
		Sessions     []string `json:"sessions"`
		Tasks        []string `json:"tasks"`
		Runs         []string `json:"runs"`
		Failed       []string `json:"failed"`
	}{d.study, d.study.Participants(), d.study.Sessions(), d.study.Tasks(), d.study.Runs(), failed}
	b, err := json.MarshalIndent(v, "", "  ")
	return append(b, '\n'), err
}

// studySiblings is a recording's companions, closed after its run.
type studySiblings struct {
	format.Siblings
	open *dirSiblings
}

func (s *studySiblings) Close() { s.open.Close() }
