package csv

import (
	"io"
	"strings"

	"amplink/core/format"
)

// Table is a trials table: per-trial covariates keyed by trial id.
// Columns[0] is "trial"; Rows[i][0] is the id of row i and Rows[i][j] the
// value of column j, as text (trimmed, unquoted).
type Table struct {
	Columns []string
	Rows    [][]string
}

// Column returns the index of the named column, or -1.
func (t *Table) Column(name string) int {
	for i, c := range t.Columns {
		if c == name {
			return i
		}
	}
	return -1
}

// Row returns the row of the given trial id, or nil.
func (t *Table) Row(trial string) []string {
	for _, r := range t.Rows {
		if r[0] == trial {
			return r
		}
	}
	return nil
}

// DecodeTrials reads a trials table, CSV or TSV with the header
// trial,<name>... and one row per trial. Trial ids must be non-empty and
// distinct; column names non-empty and distinct; every row must have as many
// fields as the header. Errors are *format.Error values with line and column.
func DecodeTrials(f format.File) (*Table, error) {
	r := NewReader(f)
	hdr, line, err := r.Header()
	if err != nil {
		return nil, err
	}
	if !strings.EqualFold(hdr[0], "trial") {
		return nil, r.Errorf(line, 1, format.ErrSyntax, "first header column is %s; a trials table starts trial,<name>...", quote(hdr[0]))
	}
	if len(hdr) < 2 {
		return nil, r.Errorf(line, 0, format.ErrSyntax, "header has no columns after trial")
	}
	if len(hdr) > MaxChannels+1 {
		return nil, r.Errorf(line, 0, format.ErrUnsupported, "header has %d columns; at most %d are supported", len(hdr), MaxChannels+1)
	}
	t := &Table{Columns: make([]string, len(hdr))}
	t.Columns[0] = "trial"
	seen := map[string]int{"trial": 1}
	for i, name := range hdr[1:] {
		col := i + 2
		if name == "" {
			return nil, r.Errorf(line, col, format.ErrSyntax, "column name is empty")
		}
		if c, ok := seen[name]; ok {
			return nil, r.Errorf(line, col, format.ErrSyntax, "duplicate column name %s (also column %d)", quote(name), c)
		}
		seen[name] = col
		t.Columns[i+1] = strings.Clone(name)
	}
	ids := map[string]int{}
	for {
		fs, line, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if len(fs) != len(hdr) {
			col := len(hdr) + 1
			if len(fs) < len(hdr) {
				col = len(fs)
			}
			return nil, r.Errorf(line, col, format.ErrSyntax, "row has %d fields; the header has %d", len(fs), len(hdr))
		}
		if fs[0] == "" {
			return nil, r.Errorf(line, 1, format.ErrSyntax, "trial id is empty")
		}
		if at, ok := ids[fs[0]]; ok {
			return nil, r.Errorf(line, 1, format.ErrSyntax, "trial %s is listed again (first at line %d)", quote(fs[0]), at)
		}
		ids[fs[0]] = line
		t.Rows = append(t.Rows, append([]string(nil), fs...))
	}
	if len(t.Rows) == 0 {
		return nil, r.Errorf(line, 0, ErrNoData, "header only; no trial rows follow")
	}
	return t, nil
}
