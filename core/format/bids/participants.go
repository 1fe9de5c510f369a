package bids

import (
	"io"
	"strings"

	"amplink/core/format"
)

// Participants is a BIDS participants.tsv table: one row per participant,
// keyed by the participant's label (the part of participant_id after
// "sub-").
type Participants struct {
	// Columns lists the columns after participant_id, in file order.
	Columns []string
	// Labels lists the participants in file order.
	Labels []string
	// Values maps a label to its row: column name → value, with "n/a" and
	// empty cells left out (BIDS's marker of a missing value).
	Values map[string]map[string]string
}

// Value returns the participant's value in column (matched
// case-insensitively) and whether it is present (not missing).
func (p *Participants) Value(label, column string) (string, bool) {
	row := p.Values[label]
	for _, c := range p.Columns {
		if strings.EqualFold(c, column) {
			v, ok := row[c]
			return v, ok
		}
	}
	return "", false
}

// Column returns the column's name as the file spells it, matched
// case-insensitively, and whether the table has it.
func (p *Participants) Column(name string) (string, bool) {
	for _, c := range p.Columns {
		if strings.EqualFold(c, name) {
			return c, true
		}
	}
	return "", false
}

// ReadParticipants reads a BIDS participants.tsv. The BIDS specification
// (Modality agnostic files, "Participants file") requires participant_id as
// the first column, each value "sub-<label>" with an alphanumeric label,
// once per participant; the other columns are free. Column names must be
// distinct and non-empty, and every row must have the header's number of
// fields. Errors name the file, line and column. A header without rows gives
// an empty table and no error.
func ReadParticipants(f format.File) (*Participants, error) {
	t, err := open(f)
	if err != nil {
		return nil, err
	}
	if !strings.EqualFold(t.cols[0], "participant_id") {
		return nil, t.r.Errorf(t.line, 1, format.ErrSyntax, "the first column must be participant_id, found %q", t.cols[0])
	}
	p := &Participants{Columns: append([]string(nil), t.cols[1:]...), Values: map[string]map[string]string{}}
	first := map[string]int{}
	for {
		fs, line, err := t.row()
		if err == io.EOF {
			return p, nil
		}
		if err != nil {
			return nil, err
		}
		id := fs[0]
		label, ok := strings.CutPrefix(id, "sub-")
		if !ok || !IsLabel(label) {
			return nil, t.r.Errorf(line, 1, format.ErrSyntax, "participant_id %q is not sub-<label> with an alphanumeric label", id)
		}
		if at, dup := first[label]; dup {
			return nil, t.r.Errorf(line, 1, format.ErrSyntax, "participant %q is listed twice (first on line %d)", id, at)
		}
		first[label] = line
		row := make(map[string]string, len(fs)-1)
		for i, v := range fs[1:] {
			if v != NA && v != "" {
				row[p.Columns[i]] = strings.Clone(v)
			}
		}
		p.Labels = append(p.Labels, strings.Clone(label))
		p.Values[p.Labels[len(p.Labels)-1]] = row
	}
}

// IsLabel reports whether s is a BIDS label: one or more ASCII letters or
// digits (the specification's "Common principles", "Definitions": a label
// is an alphanumeric value).
func IsLabel(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !('a' <= c && c <= 'z' || 'A' <= c && c <= 'Z' || '0' <= c && c <= '9') {
			return false
		}
	}
	return true
}
