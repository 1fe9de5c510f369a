package main

import (
	"bytes"
	"encoding/csv"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"amplink/core/figures"
	"amplink/core/report"
)

// mergeInput is one per-recording results table.
type mergeInput struct {
	path  string
	rows  []report.Row
	lines []int // line of each row in the file
}

// cmdMerge is `amplink merge --out FILE [--groups G.csv] [--level L]
// RESULTS.csv...`: it reads the results tables of several `amplink run`s
// (for example one per recording of an array job), checks that they come
// from the same recipe, concatenates their rows and appends the group rows
// of report.GroupRows. FILE appears atomically; on any error there is no
// FILE, not even one from an earlier merge.
func cmdMerge(stdout, stderr io.Writer, args []string) (err error) {
	fs := flag.NewFlagSet("merge", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("out", "", "the merged table to write (CSV)")
	groupsPath := fs.String("groups", "", "CSV with header recording,group: two groups to compare")
	level := fs.Float64("level", 0.95, "coverage of the group intervals, in (0, 1)")
	figDir := fs.String("figures", "", "also write the group figures (SVG) into this directory")
	files, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if *out == "" {
		return errors.New("merge: --out is required")
	}
	outAbs, err := filepath.Abs(*out)
	if err != nil {
		return fmt.Errorf("merge: %w", err)
	}
	for _, f := range append([]string{*groupsPath}, files...) {
		if a, aerr := filepath.Abs(f); f != "" && aerr == nil && a == outAbs {
			return fmt.Errorf("merge: --out %s is also an input", *out)
		}
	}
	// From here on, a failure leaves no FILE.
	defer func() {
		if err != nil {
			if rerr := os.Remove(*out); rerr != nil && !errors.Is(rerr, os.ErrNotExist) {
				fmt.Fprintln(stderr, "merge:", rerr)
			}
		}
	}()
	if len(files) == 0 {
		return errors.New("merge: no results table given")
	}
	if !(*level > 0 && *level < 1) {
		return fmt.Errorf("merge: --level %v is not in (0, 1)", *level)
	}
	merged, nrec, err := mergeTables(stderr, files)
	if err != nil {
		return err
	}
	var groups map[string]string
	if *groupsPath != "" {
		if groups, err = readGroups(stderr, *groupsPath, merged); err != nil {
			return err
		}
	}
	grows, err := report.GroupRows(merged, groups, *level)
	if err != nil {
		return fmt.Errorf("merge: %w", err)
	}
	all := &report.Results{Rows: append(merged, grows...)}
	var b bytes.Buffer
	if err := report.WriteCSV(&b, all); err != nil {
		return fmt.Errorf("merge: %w", err)
	}
	if *figDir != "" {
		if err := os.MkdirAll(*figDir, 0o755); err != nil {
			return fmt.Errorf("merge: %w", err)
		}
		for _, f := range figures.Group(all.Rows) {
			if err := os.WriteFile(filepath.Join(*figDir, f.Name+".svg"), []byte(f.SVG), 0o644); err != nil {
				return fmt.Errorf("merge: %w", err)
			}
		}
	}
	if err := writeAtomic(*out, b.Bytes()); err != nil {
		return fmt.Errorf("merge: %w", err)
	}
	fmt.Fprintf(stdout, "%d recordings from %d tables: %d rows and %d group rows written to %s\n",
		nrec, len(files), len(merged), len(grows), *out)
	return nil
}

// mergeTables reads the tables, drops group rows of earlier merges, checks
// that no recording is in two tables and that the tables hold the same
// tests, and returns the concatenated rows and the number of recordings.
func mergeTables(stderr io.Writer, files []string) ([]report.Row, int, error) {
	var ins []mergeInput
	for _, path := range files {
		b, err := readRegular(path)
		if err != nil {
			return nil, 0, fmt.Errorf("merge: %w", err)
		}
		res, lines, err := report.ReadCSVLines(bytes.NewReader(b), path)
		if err != nil {
			return nil, 0, fmt.Errorf("merge: %w", err)
		}
		in := mergeInput{path: path}
		dropped := 0
		for i, row := range res.Rows {
			rec, ok := row.Lookup("recording")
			if !ok {
				return nil, 0, fmt.Errorf("merge: %s:1: no recording column (tables from amplink run have one)", path)
			}
			if rec == "" {
				return nil, 0, fmt.Errorf("merge: %s:%d: empty recording", path, lines[i])
			}
			if row.IsGroupRow() {
				dropped++
				continue
			}
			in.rows = append(in.rows, row)
			in.lines = append(in.lines, lines[i])
		}
		if dropped > 0 {
			fmt.Fprintf(stderr, "merge: note: %s: %d group rows of an earlier merge left out; group rows are computed afresh\n", path, dropped)
		}
		if len(in.rows) == 0 {
			fmt.Fprintf(stderr, "merge: warning: %s has no per-recording rows\n", path)
		}
		ins = append(ins, in)
	}
	// The same recording in two tables would count it twice.
	type where struct {
		path string
		line int
	}
	first := map[string]where{}
	nrec := 0
	for _, in := range ins {
		local := map[string]bool{}
		for i, row := range in.rows {
			rec := row.Recording()
			if local[rec] {
				continue
			}
			local[rec] = true
			if w, dup := first[rec]; dup {
				return nil, 0, fmt.Errorf("merge: recording %q is in %s (line %d) and in %s (line %d)", rec, w.path, w.line, in.path, in.lines[i])
			}
			first[rec] = where{in.path, in.lines[i]}
			nrec++
		}
	}
	if err := checkSameTests(stderr, ins); err != nil {
		return nil, 0, err
	}
	var rows []report.Row
	for _, in := range ins {
		rows = append(rows, in.rows...)
	}
	return rows, nrec, nil
}

// checkSameTests compares the pooled tests of the tables: tables that share
// none come from different recipes (an error); a test missing from some
// tables is a warning.
func checkSameTests(stderr io.Writer, ins []mergeInput) error {
	var order []report.TestID
	in := map[report.TestID][]bool{}
	sets := make([]map[report.TestID]bool, len(ins))
	for k, t := range ins {
		sets[k] = map[report.TestID]bool{}
		for i := range t.rows {
			if !t.rows[i].Groupable() {
				continue
			}
			id := t.rows[i].ID()
			sets[k][id] = true
			if in[id] == nil {
				in[id] = make([]bool, len(ins))
				order = append(order, id)
			}
			in[id][k] = true
		}
	}
	for k := 1; k < len(ins); k++ {
		if len(sets[0]) == 0 || len(sets[k]) == 0 {
			continue
		}
		shared := false
		for id := range sets[k] {
			if sets[0][id] {
				shared = true
				break
			}
		}
		if !shared {
			return fmt.Errorf("merge: %s and %s share no test: they come from different recipes", ins[0].path, ins[k].path)
		}
	}
	for _, id := range order {
		var missing []string
		for k, ok := range in[id] {
			if !ok {
				missing = append(missing, ins[k].path)
			}
		}
		if len(missing) > 0 {
			fmt.Fprintf(stderr, "merge: warning: test %s is in %d of %d tables; not in %s\n", id, len(ins)-len(missing), len(ins), strings.Join(missing, ", "))
		}
	}
	return nil
}

// readGroups reads the groups file at path (parseGroups) and checks it
// against the recordings in rows (checkGroups).
func readGroups(stderr io.Writer, path string, rows []report.Row) (map[string]string, error) {
	b, err := readRegular(path)
	if err != nil {
		return nil, fmt.Errorf("merge: %w", err)
	}
	groups, err := parseGroups(b, path)
	if err != nil {
		return nil, err
	}
	return checkGroups(stderr, path, groups, rows)
}

// parseGroups reads a groups table: a header with the columns recording
// and group (others ignored, a UTF-8 byte-order mark skipped), then one
// recording per line. Errors name path, line and column.
func parseGroups(b []byte, path string) (map[string]string, error) {
	b = bytes.TrimPrefix(b, []byte("\xef\xbb\xbf"))
	cr := csv.NewReader(bytes.NewReader(b))
	fail := func(line, col int, format string, a ...any) error {
		return fmt.Errorf("merge: %s:%d:%d: %s", path, line, col, fmt.Sprintf(format, a...))
	}
	csvErr := func(err error) error {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return fail(pe.Line, pe.Column, "%v", pe.Err)
		}
		return fmt.Errorf("merge: %s: %w", path, err)
	}
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fail(1, 1, "empty groups file; the header is recording,group")
	}
	if err != nil {
		return nil, csvErr(err)
	}
	ri, gi := -1, -1
	for i, h := range header {
		switch strings.TrimSpace(h) {
		case "recording":
			ri = i
		case "group":
			gi = i
		}
	}
	if ri < 0 || gi < 0 {
		return nil, fail(1, 1, "the header needs the columns recording and group, found %s", strings.Join(header, ","))
	}
	groups := map[string]string{}
	firstLine := map[string]int{}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(err)
		}
		line, rcol := cr.FieldPos(ri)
		_, gcol := cr.FieldPos(gi)
		name, label := strings.TrimSpace(rec[ri]), strings.TrimSpace(rec[gi])
		if name == "" {
			return nil, fail(line, rcol, "empty recording")
		}
		if label == "" {
			return nil, fail(line, gcol, "recording %q has an empty group", name)
		}
		if l, dup := firstLine[name]; dup {
			return nil, fail(line, rcol, "recording %q is listed twice (first on line %d)", name, l)
		}
		firstLine[name] = line
		groups[name] = label
	}
	return groups, nil
}

// checkGroups checks groups against the recordings in rows: each needs a
// group, and there must be exactly two groups among them. Listed
// recordings that are in no table are a warning.
func checkGroups(stderr io.Writer, path string, groups map[string]string, rows []report.Row) (map[string]string, error) {
	present := map[string]bool{}
	labels := map[string]bool{}
	for i := range rows {
		rec := rows[i].Recording()
		if present[rec] {
			continue
		}
		present[rec] = true
		l, ok := groups[rec]
		if !ok {
			return nil, fmt.Errorf("merge: %s: recording %q has no group", path, rec)
		}
		labels[l] = true
	}
	if len(labels) != 2 {
		var ls []string
		for l := range labels {
			ls = append(ls, strconv.Quote(l))
		}
		sort.Strings(ls)
		return nil, fmt.Errorf("merge: %s: needs exactly two groups among the recordings, found %d: %s", path, len(ls), strings.Join(ls, ", "))
	}
	var unused []string
	for name := range groups {
		if !present[name] {
			unused = append(unused, name)
		}
	}
	if len(unused) > 0 {
		sort.Strings(unused)
		fmt.Fprintf(stderr, "merge: warning: %s lists %d recordings that are in no table: %s\n", path, len(unused), strings.Join(unused, ", "))
	}
	return groups, nil
}

// writeAtomic writes b to a temporary file beside path and renames it into
// place, so that path holds either the whole table or nothing new.
func writeAtomic(path string, b []byte) error {
	dir := filepath.Dir(path)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	f, err := os.CreateTemp(dir, ".merge-*.csv")
	if err != nil {
		return err
	}
	tmp := f.Name()
	_, werr := f.Write(b)
	if err := f.Close(); werr == nil {
		werr = err
	}
	if werr == nil {
		werr = os.Chmod(tmp, 0o644)
	}
	if werr == nil {
		werr = os.Rename(tmp, path)
	}
	if werr != nil {
		os.Remove(tmp)
	}
	return werr
}
