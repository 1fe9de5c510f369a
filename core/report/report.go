// Package report holds analysis results and writes them as CSV and JSON.
package report

// Field is one extra column of a result row.
type Field struct {
	Name  string
	Value string
}

// Row is one test. R and P are NaN when undefined; they are then written
// as empty cells and Note says why.
type Row struct {
	Analysis string
	Type     string
	Seed     string
	Target   string
	Method   string
	N        int
	R        float64
	P        float64
	Extra    []Field // further columns in a stable order
}

// Field returns the value of the extra column name, or "" when the row has
// none.
func (r Row) Field(name string) string {
	for _, f := range r.Extra {
		if f.Name == name {
			return f.Value
		}
	}
	return ""
}

// Map is a labelled matrix written to maps/<Name>.csv.
type Map struct {
	Name      string
	RowName   string // what the rows are, e.g. "frequency_hz"
	ColName   string // what the columns are, e.g. "time_s"
	RowLabels []string
	ColLabels []string
	Values    [][]float64 // [row][col]; NaN is written empty
}

// Figure is an SVG written to figures/<Name>.svg.
type Figure struct {
	Name  string
	Title string
	SVG   string
}

// Results is everything one run produces.
type Results struct {
	Rows     []Row
	Maps     []Map
	Figures  []Figure
	Warnings []string
	Recipe   []byte // the resolved recipe as JSON
}

// ExtraNames returns the names of the row's extra fields, in order.
func (r *Row) ExtraNames() []string {
	names := make([]string, len(r.Extra))
	for i, f := range r.Extra {
		names[i] = f.Name
	}
	return names
}
