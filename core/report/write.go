package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"io"
	"math"
	"sort"
	"strconv"
)

// Fixed lists the columns every results table starts with, in order.
var Fixed = []string{"analysis", "type", "seed", "target", "method", "n", "r", "p"}

// Columns returns the table's columns: Fixed, then every extra field name in
// order of first appearance.
func (res *Results) Columns() []string {
	cols := append([]string(nil), Fixed...)
	seen := map[string]bool{}
	for _, c := range cols {
		seen[c] = true
	}
	for _, r := range res.Rows {
		for _, f := range r.Extra {
			if !seen[f.Name] {
				seen[f.Name] = true
				cols = append(cols, f.Name)
			}
		}
	}
	return cols
}

// Num formats a number for a table cell: empty for NaN or ±Inf, otherwise
// the shortest form that reads back to the same float64.
func Num(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// Cells returns row's values in the order of cols.
func (r *Row) Cells(cols []string) []string {
	out := make([]string, len(cols))
	for i, c := range cols {
		switch c {
		case "analysis":
			out[i] = r.Analysis
		case "type":
			out[i] = r.Type
		case "seed":
			out[i] = r.Seed
		case "target":
			out[i] = r.Target
		case "method":
			out[i] = r.Method
		case "n":
			out[i] = strconv.Itoa(r.N)
		case "r":
			out[i] = Num(r.R)
		case "p":
			out[i] = Num(r.P)
		default:
			for _, f := range r.Extra {
				if f.Name == c {
					out[i] = f.Value
					break
				}
			}
		}
	}
	return out
}

// Table returns the header and the cells of every row.
func (res *Results) Table() (header []string, rows [][]string) {
	header = res.Columns()
	for i := range res.Rows {
		rows = append(rows, res.Rows[i].Cells(header))
	}
	return header, rows
}

// WriteCSV writes the results table: one header line, one line per row.
// A cell a spreadsheet would run as a formula gets a leading apostrophe
// (QuoteCell); numbers are written as they are.
func WriteCSV(w io.Writer, res *Results) error {
	tw, err := NewTableWriter(w, res.Columns())
	if err != nil {
		return err
	}
	for i := range res.Rows {
		if err := tw.Write(&res.Rows[i]); err != nil {
			return err
		}
	}
	return tw.Flush()
}

// TableWriter writes a results table a row at a time, for tables too large
// to hold: the header is given first (Results.Columns of every row to
// come), and the bytes are those WriteCSV writes for the same rows.
type TableWriter struct {
	cw    *csv.Writer
	cols  []string
	cells []string
	// The positions in cols of the last row's extra fields (−1: not a
	// column, or a repeated name), reused while rows share their field
	// names, as the rows of one table read back do.
	names []string
	pos   []int
	extra map[string]int // extra column → position in cols
}

// NewTableWriter writes the header cols to w and returns the writer of
// the rows.
func NewTableWriter(w io.Writer, cols []string) (*TableWriter, error) {
	tw := &TableWriter{cw: csv.NewWriter(w), cols: cols, cells: make([]string, len(cols)), extra: map[string]int{}}
	for i, c := range cols {
		switch c {
		case "analysis", "type", "seed", "target", "method", "n", "r", "p":
		default:
			if _, dup := tw.extra[c]; !dup {
				tw.extra[c] = i
			}
		}
	}
	if err := tw.cw.Write(quoteCells(cols)); err != nil {
		return nil, err
	}
	return tw, nil
}

// Write writes one row's cells (Row.Cells of the header's columns).
func (tw *TableWriter) Write(r *Row) error {
	if !tw.sameNames(r.Extra) {
		tw.names = tw.names[:0]
		tw.pos = tw.pos[:0]
		taken := map[int]bool{}
		for _, f := range r.Extra {
			i, ok := tw.extra[f.Name]
			if !ok || taken[i] {
				i = -1 // not a column, or a later field of the same name
			} else {
				taken[i] = true
			}
			tw.names = append(tw.names, f.Name)
			tw.pos = append(tw.pos, i)
		}
	}
	for i := range tw.cells {
		tw.cells[i] = ""
	}
	for i, c := range tw.cols {
		switch c {
		case "analysis":
			tw.cells[i] = r.Analysis
		case "type":
			tw.cells[i] = r.Type
		case "seed":
			tw.cells[i] = r.Seed
		case "target":
			tw.cells[i] = r.Target
		case "method":
			tw.cells[i] = r.Method
		case "n":
			tw.cells[i] = strconv.Itoa(r.N)
		case "r":
			tw.cells[i] = Num(r.R)
		case "p":
			tw.cells[i] = Num(r.P)
		}
	}
	for k, f := range r.Extra {
		if i := tw.pos[k]; i >= 0 {
			tw.cells[i] = f.Value
		}
	}
	return tw.cw.Write(quoteCells(tw.cells))
}

func (tw *TableWriter) sameNames(extra []Field) bool {
	if len(extra) != len(tw.names) || tw.pos == nil {
		return false
	}
	for k, f := range extra {
		if f.Name != tw.names[k] {
			return false
		}
	}
	return true
}

// Flush writes what is buffered and returns the first error of any write.
func (tw *TableWriter) Flush() error {
	tw.cw.Flush()
	return tw.cw.Error()
}

// WriteMapCSV writes one map: a header of column labels after the row-axis
// name, then one line per row.
func WriteMapCSV(w io.Writer, m *Map) error {
	cw := csv.NewWriter(w)
	head := append([]string{m.RowName + `\` + m.ColName}, m.ColLabels...)
	if err := cw.Write(quoteCells(head)); err != nil {
		return err
	}
	for i, vals := range m.Values {
		rec := make([]string, 0, len(vals)+1)
		label := ""
		if i < len(m.RowLabels) {
			label = m.RowLabels[i]
		}
		rec = append(rec, QuoteCell(label))
		for _, v := range vals {
			rec = append(rec, Num(v))
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

type jsonOut struct {
	Columns  []string            `json:"columns"`
	Rows     []json.RawMessage   `json:"rows"`
	Maps     []string            `json:"maps"`
	Figures  []map[string]string `json:"figures"`
	Warnings []string            `json:"warnings"`
	Recipe   json.RawMessage     `json:"recipe,omitempty"`
}

// WriteJSON writes the results as one JSON object: columns, rows (numbers
// as numbers, empty cells as null), the names of maps and figures, the
// warnings and the resolved recipe.
func WriteJSON(w io.Writer, res *Results) error {
	header, cells := res.Table()
	out := jsonOut{Columns: header, Rows: []json.RawMessage{}, Maps: []string{}, Figures: []map[string]string{}, Warnings: res.Warnings}
	if out.Warnings == nil {
		out.Warnings = []string{}
	}
	for _, m := range res.Maps {
		out.Maps = append(out.Maps, m.Name)
	}
	for _, f := range res.Figures {
		out.Figures = append(out.Figures, map[string]string{"name": f.Name, "title": f.Title})
	}
	if len(res.Recipe) > 0 && json.Valid(res.Recipe) {
		out.Recipe = json.RawMessage(res.Recipe)
	}
	var doc bytes.Buffer
	enc := json.NewEncoder(&doc)
	enc.SetIndent("", "  ")
	if err := enc.Encode(out); err != nil {
		return err
	}
	// The rows are written here, indented as the encoder would indent
	// them, into the place of the empty list: re-scanning every row's bytes
	// twice (compacting, then indenting) was most of the time this took.
	// JSON text never holds a raw newline inside a string, so the first
	// "\n  \"rows\": []" is the field.
	text := doc.Bytes()
	at := bytes.Index(text, []byte("\n  \"rows\": []"))
	if len(cells) == 0 || at < 0 {
		_, err := w.Write(text)
		return err
	}
	at += len("\n  \"rows\": [")
	if _, err := w.Write(text[:at]); err != nil {
		return err
	}
	// Each row is an object whose keys come in name order (as encoding/json
	// writes a map), written directly rather than through a map per row.
	last := map[string]int{}
	for i, c := range header {
		last[c] = i
	}
	keys := make([]string, 0, len(last))
	for c := range last {
		keys = append(keys, c)
	}
	sort.Strings(keys)
	prefix := make([][]byte, len(keys)) // ",\n      \"key\": " (no comma for the first)
	col := make([]int, len(keys))
	text2 := make([]bool, len(keys)) // always a string
	for k, c := range keys {
		q, _ := json.Marshal(c)
		if k > 0 {
			prefix[k] = append(prefix[k], ',')
		}
		prefix[k] = append(append(append(prefix[k], "\n      "...), q...), ": "...)
		col[k] = last[c]
		text2[k] = c == "seed" || c == "target" || c == "analysis" || c == "recording"
	}
	b := make([]byte, 0, 64<<10)
	for i, row := range cells {
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, "\n    {"...)
		for k := range keys {
			b = append(b, prefix[k]...)
			v := row[col[k]]
			switch {
			case v == "":
				b = append(b, "null"...)
			case !text2[k] && isJSONNumber(v):
				b = append(b, v...)
			default:
				b = appendJSONString(b, v)
			}
		}
		b = append(b, "\n    }"...)
		if len(b) >= 32<<10 {
			if _, err := w.Write(b); err != nil {
				return err
			}
			b = b[:0]
		}
	}
	b = append(b, "\n  "...)
	if _, err := w.Write(b); err != nil {
		return err
	}
	_, err := w.Write(text[at:])
	return err
}

// appendJSONString appends s quoted as json.Marshal quotes it: printable
// ASCII other than the quote, the backslash and the three characters
// json.Marshal escapes for HTML (<, >, &) goes as it is; anything else goes
// through json.Marshal.
func appendJSONString(b []byte, s string) []byte {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c > 0x7e || c == '"' || c == '\\' || c == '<' || c == '>' || c == '&' {
			q, _ := json.Marshal(s)
			return append(b, q...)
		}
	}
	b = append(b, '"')
	b = append(b, s...)
	return append(b, '"')
}
