package report

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
)

// ErrFormat is wrapped by every error ReadCSV returns for a malformed table.
var ErrFormat = errors.New("malformed results table")

// ReadError is a problem at one place in a results table. It prints as
// "name:line:col: msg"; line and column are 1-based, the column counted in
// bytes as encoding/csv does.
type ReadError struct {
	Name         string
	Line, Column int
	Msg          string
}

func (e *ReadError) Error() string {
	return fmt.Sprintf("%s:%d:%d: %s", e.Name, e.Line, e.Column, e.Msg)
}

// Unwrap returns ErrFormat.
func (e *ReadError) Unwrap() error { return ErrFormat }

// ReadCSV reads a results table as WriteCSV writes it: a header line, then
// one line per row. The Fixed columns may stand in any order and fill the
// Row fields; every other column becomes an Extra field, in header order,
// on every row (empty cells included), so that WriteCSV writes the table
// back byte for byte. An empty r or p cell reads as NaN. name is used only
// in error messages. A leading UTF-8 byte-order mark is skipped.
//
// Errors (*ReadError, wrapping ErrFormat) name the line and column: an
// empty table, a missing or repeated column, a line whose number of cells
// differs from the header's, an n that is not an integer, an r or p that is
// not a finite number, and a CSV quoting error.
func ReadCSV(r io.Reader, name string) (*Results, error) {
	res, _, err := ReadCSVLines(r, name)
	return res, err
}

// ReadCSVLines is ReadCSV that also returns, for each row, the line on
// which it starts (1-based; the header is line 1), for later messages
// about a row.
func ReadCSVLines(r io.Reader, name string) (*Results, []int, error) {
	b, err := io.ReadAll(r)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", name, err)
	}
	b = bytes.TrimPrefix(b, []byte("\xef\xbb\xbf"))
	cr := csv.NewReader(bytes.NewReader(b))
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = false
	fail := func(line, col int, format string, a ...any) error {
		return &ReadError{Name: name, Line: line, Column: col, Msg: fmt.Sprintf(format, a...)}
	}
	parseErr := func(err error) error {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return fail(pe.Line, pe.Column, "%v", pe.Err)
		}
		return fmt.Errorf("%s: %w", name, err)
	}
	header, err := cr.Read()
	if err == io.EOF {
		return nil, nil, fail(1, 1, "empty table: no header line")
	}
	if err != nil {
		return nil, nil, parseErr(err)
	}
	unquoteCells(header)
	hline, _ := cr.FieldPos(0)
	pos := make(map[string]int, len(header))
	for i, h := range header {
		if j, dup := pos[h]; dup {
			_, col := cr.FieldPos(i)
			return nil, nil, fail(hline, col, "column %q repeats column %d", h, j+1)
		}
		pos[h] = i
	}
	fixed := make([]int, len(Fixed))
	isFixed := make([]bool, len(header))
	for k, c := range Fixed {
		i, ok := pos[c]
		if !ok {
			return nil, nil, fail(hline, 1, "missing column %q", c)
		}
		fixed[k] = i
		isFixed[i] = true
	}
	res := &Results{}
	var lines []int
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, nil, parseErr(err)
		}
		unquoteCells(rec)
		line, _ := cr.FieldPos(0)
		if len(rec) != len(header) {
			_, col := cr.FieldPos(max(len(rec), 1) - 1)
			return nil, nil, fail(line, col, "%d cells, the header has %d", len(rec), len(header))
		}
		row := Row{
			Analysis: rec[fixed[0]], Type: rec[fixed[1]], Seed: rec[fixed[2]],
			Target: rec[fixed[3]], Method: rec[fixed[4]],
		}
		i := fixed[5]
		if row.N, err = strconv.Atoi(rec[i]); err != nil {
			_, col := cr.FieldPos(i)
			return nil, nil, fail(line, col, "n: %q is not an integer", rec[i])
		}
		for _, c := range []struct {
			idx  int
			name string
			dst  *float64
		}{{fixed[6], "r", &row.R}, {fixed[7], "p", &row.P}} {
			v := rec[c.idx]
			if v == "" {
				*c.dst = math.NaN()
				continue
			}
			f, err := strconv.ParseFloat(v, 64)
			if err != nil || math.IsInf(f, 0) || math.IsNaN(f) {
				_, col := cr.FieldPos(c.idx)
				return nil, nil, fail(line, col, "%s: %q is not a finite number", c.name, v)
			}
			*c.dst = f
		}
		row.Extra = make([]Field, 0, len(header)-len(Fixed))
		for j, h := range header {
			if !isFixed[j] {
				row.Extra = append(row.Extra, Field{Name: h, Value: rec[j]})
			}
		}
		res.Rows = append(res.Rows, row)
		lines = append(lines, line)
	}
	return res, lines, nil
}
