package main

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"flag"
	"fmt"
	"hash/crc32"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"amplink/core/figures"
	"amplink/core/report"
)

// mergeInput is one per-recording results table, as the first pass over
// the tables found it.
type mergeInput struct {
	path   string
	size   int
	sum    uint32   // CRC-32C of the bytes, to see a table change between the passes
	kept   int      // per-recording rows (group rows of earlier merges left out)
	extras []string // the columns after report.Fixed, in header order
}

// cmdMerge is `amplink merge --out FILE [--groups G.csv] [--level L]
// RESULTS.csv...`: it reads the results tables of several `amplink run`s
// (for example one per recording of an array job), checks that they come
// from the same recipe, concatenates their rows and appends the group rows
// of report.GroupRows. FILE appears atomically; on any error there is no
// FILE, not even one from an earlier merge.
//
// It holds one table at a time: a first pass checks the tables and pools
// their correlations (report.Pooler), a second reads each again and writes
// its rows, then the group rows. The bytes are those of concatenating all
// rows and writing them with report.WriteCSV.
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
	pool := report.NewPooler()
	m, err := mergeTables(stderr, files, pool, *figDir != "")
	if err != nil {
		return err
	}
	var groups map[string]string
	if *groupsPath != "" {
		if groups, err = readGroups(stderr, *groupsPath, m.recs); err != nil {
			return err
		}
	}
	grows, err := pool.Rows(groups, *level)
	if err != nil {
		return fmt.Errorf("merge: %w", err)
	}
	// The columns of all rows, as report.Results.Columns gives them: a
	// table's rows each carry every column of its header.
	cols := append([]string(nil), report.Fixed...)
	seen := map[string]bool{}
	for _, c := range cols {
		seen[c] = true
	}
	for _, in := range m.ins {
		if in.kept == 0 {
			continue
		}
		for _, c := range in.extras {
			if !seen[c] {
				seen[c] = true
				cols = append(cols, c)
			}
		}
	}
	for _, c := range (&report.Results{Rows: grows}).Columns() {
		if !seen[c] {
			seen[c] = true
			cols = append(cols, c)
		}
	}
	if *figDir != "" {
		if err := os.MkdirAll(*figDir, 0o755); err != nil {
			return fmt.Errorf("merge: %w", err)
		}
		for _, f := range figures.Group(append(m.figRows, grows...)) {
			if err := os.WriteFile(filepath.Join(*figDir, f.Name+".svg"), []byte(f.SVG), 0o644); err != nil {
				return fmt.Errorf("merge: %w", err)
			}
		}
	}
	err = writeAtomic(*out, func(w io.Writer) error {
		tw, err := report.NewTableWriter(w, cols)
		if err != nil {
			return err
		}
		for _, in := range m.ins {
			if err := writeTable(tw, in); err != nil {
				return err
			}
		}
		for i := range grows {
			if err := tw.Write(&grows[i]); err != nil {
				return err
			}
		}
		return tw.Flush()
	})
	if err != nil {
		return fmt.Errorf("merge: %w", err)
	}
	fmt.Fprintf(stdout, "%d recordings from %d tables: %d rows and %d group rows written to %s\n",
		len(m.recs), len(files), m.rows, len(grows), *out)
	return nil
}

// merged is what the first pass found.
type merged struct {
	ins     []mergeInput
	recs    []string     // recordings, in order of their first row
	rows    int          // per-recording rows of all tables
	figRows []report.Row // with --figures: what figures.Group reads of each groupable row
}

// readTable reads and parses one table.
func readTable(path string) ([]byte, *report.Results, []int, error) {
	b, err := readRegular(path)
	if err != nil {
		return nil, nil, nil, fmt.Errorf("merge: %w", err)
	}
	res, lines, err := report.ReadCSVLines(bytes.NewReader(b), path)
	if err != nil {
		return nil, nil, nil, fmt.Errorf("merge: %w", err)
	}
	return b, res, lines, nil
}

var castagnoli = crc32.MakeTable(crc32.Castagnoli)

// mergeTables is the first pass. It reads the tables one at a time, drops
// group rows of earlier merges, checks that no recording is in two tables
// and that the tables hold the same tests, and adds every per-recording
// row to pool. Errors come in the order of the checks: a table that cannot
// be read, then a recording in two tables, then tables that share no test.
func mergeTables(stderr io.Writer, files []string, pool *report.Pooler, keepFig bool) (*merged, error) {
	m := &merged{}
	// The same recording in two tables would count it twice.
	type where struct {
		path string
		line int
	}
	first := map[string]where{}
	var dupErr error
	tests := newTestSets(len(files))
	for k, path := range files {
		b, res, lines, err := readTable(path)
		if err != nil {
			return nil, err
		}
		in := mergeInput{path: path, size: len(b), sum: crc32.Checksum(b, castagnoli)}
		dropped := 0
		local := map[string]bool{}
		for i := range res.Rows {
			row := &res.Rows[i]
			rec, ok := row.Lookup("recording")
			if !ok {
				return nil, fmt.Errorf("merge: %s:1: no recording column (tables from amplink run have one)", path)
			}
			if rec == "" {
				return nil, fmt.Errorf("merge: %s:%d: empty recording", path, lines[i])
			}
			if row.IsGroupRow() {
				dropped++
				continue
			}
			in.kept++
			if !local[rec] {
				local[rec] = true
				if w, dup := first[rec]; dup {
					if dupErr == nil {
						dupErr = fmt.Errorf("merge: recording %q is in %s (line %d) and in %s (line %d)", rec, w.path, w.line, path, lines[i])
					}
				} else {
					first[rec] = where{path, lines[i]}
					m.recs = append(m.recs, rec)
				}
			}
			if row.Groupable() {
				tests.add(k, row.ID())
				if keepFig {
					m.figRows = append(m.figRows, figureRow(row))
				}
			}
			pool.Add(row)
		}
		if in.kept > 0 {
			in.extras = res.Rows[0].ExtraNames()
		}
		tests.done(k)
		m.rows += in.kept
		if dropped > 0 {
			fmt.Fprintf(stderr, "merge: note: %s: %d group rows of an earlier merge left out; group rows are computed afresh\n", path, dropped)
		}
		if in.kept == 0 {
			fmt.Fprintf(stderr, "merge: warning: %s has no per-recording rows\n", path)
		}
		m.ins = append(m.ins, in)
	}
	if dupErr != nil {
		return nil, dupErr
	}
	if k := tests.disjoint; k > 0 {
		return nil, fmt.Errorf("merge: %s and %s share no test: they come from different recipes", files[0], files[k])
	}
	for _, id := range tests.order {
		var missing []string
		for k, ok := range tests.in[id] {
			if !ok {
				missing = append(missing, files[k])
			}
		}
		if len(missing) > 0 {
			fmt.Fprintf(stderr, "merge: warning: test %s is in %d of %d tables; not in %s\n", id, len(files)-len(missing), len(files), strings.Join(missing, ", "))
		}
	}
	return m, nil
}

// figureRow keeps of a groupable row what figures.Group reads: the test,
// r and the recording.
func figureRow(row *report.Row) report.Row {
	f := report.Row{Analysis: row.Analysis, Type: row.Type, Seed: row.Seed, Target: row.Target, Method: row.Method, N: row.N, R: row.R, P: row.P}
	f.Extra = []report.Field{{Name: "recording", Value: row.Recording()}}
	if c, ok := row.Lookup("condition"); ok {
		f.Extra = append(f.Extra, report.Field{Name: "condition", Value: c})
	}
	return f
}

// testSets records which tables hold each pooled test: tables that share
// none with the first come from different recipes (an error); a test
// missing from some tables is a warning.
type testSets struct {
	order    []report.TestID
	in       map[report.TestID][]bool // test → held by table k
	first    map[report.TestID]bool   // the first table's tests
	cur      int                      // tests of the table being read
	shared   bool                     // the table being read shares a test with the first
	disjoint int                      // the first table after the first that shares none, or 0
	n        int
}

func newTestSets(n int) *testSets {
	return &testSets{in: map[report.TestID][]bool{}, first: map[report.TestID]bool{}, n: n}
}

func (ts *testSets) add(k int, id report.TestID) {
	if ts.in[id] == nil {
		ts.in[id] = make([]bool, ts.n)
		ts.order = append(ts.order, id)
	}
	if !ts.in[id][k] {
		ts.in[id][k] = true
		ts.cur++
	}
	if k == 0 {
		ts.first[id] = true
	} else if ts.first[id] {
		ts.shared = true
	}
}

// done ends table k.
func (ts *testSets) done(k int) {
	if k > 0 && ts.disjoint == 0 && len(ts.first) > 0 && ts.cur > 0 && !ts.shared {
		ts.disjoint = k
	}
	ts.cur, ts.shared = 0, false
}

// writeTable is the second pass over one table: it reads the table again,
// checks that it has not changed since the first pass, and writes its
// per-recording rows.
func writeTable(tw *report.TableWriter, in mergeInput) error {
	b, res, _, err := readTable(in.path)
	if err != nil {
		return err
	}
	if len(b) != in.size || crc32.Checksum(b, castagnoli) != in.sum {
		return fmt.Errorf("%s changed while it was being merged", in.path)
	}
	for i := range res.Rows {
		if res.Rows[i].IsGroupRow() {
			continue
		}
		if err := tw.Write(&res.Rows[i]); err != nil {
			return err
		}
	}
	return nil
}

// readGroups reads the groups file at path (parseGroups) and checks it
// against the recordings recs (checkGroups).
func readGroups(stderr io.Writer, path string, recs []string) (map[string]string, error) {
	b, err := readRegular(path)
	if err != nil {
		return nil, fmt.Errorf("merge: %w", err)
	}
	groups, err := parseGroups(b, path)
	if err != nil {
		return nil, err
	}
	return checkGroups(stderr, path, groups, recs)
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

// checkGroups checks groups against the recordings recs (in order of
// their first row): each needs a group, and there must be exactly two
// groups among them. Listed recordings that are in no table are a warning.
func checkGroups(stderr io.Writer, path string, groups map[string]string, recs []string) (map[string]string, error) {
	present := map[string]bool{}
	labels := map[string]bool{}
	for _, rec := range recs {
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

// writeAtomic writes, through write, a temporary file beside path and
// renames it into place, so that path holds either the whole table or
// nothing new.
func writeAtomic(path string, write func(io.Writer) error) error {
	dir := filepath.Dir(path)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	f, err := os.CreateTemp(dir, ".merge-*.csv")
	if err != nil {
		return err
	}
	tmp := f.Name()
	bw := bufio.NewWriterSize(f, 1<<20)
	werr := write(bw)
	if werr == nil {
		werr = bw.Flush()
	}
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

// rowRecordings lists the recordings of rows in order of their first row.
func rowRecordings(rows []report.Row) []string {
	var recs []string
	seen := map[string]bool{}
	for i := range rows {
		if rec := rows[i].Recording(); !seen[rec] {
			seen[rec] = true
			recs = append(recs, rec)
		}
	}
	return recs
}
