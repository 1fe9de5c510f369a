package bids

import (
	"io"
	"math"
	"strconv"
	"strings"

	"amplink/core/data"
	"amplink/core/format"
	"amplink/core/format/csv"
)

// NA is the BIDS marker of a missing value.
const NA = "n/a"

// maxColumns guards against absurd headers.
const maxColumns = 4096

// table holds the header of a tab-separated file and reads its rows.
type table struct {
	r    *csv.Reader
	f    format.File
	cols []string
	line int // line of the header
}

func open(f format.File) (*table, error) {
	r := csv.NewReader(f)
	r.Comma, r.Format = '\t', "bids"
	hdr, line, err := r.Header()
	if err != nil {
		return nil, err
	}
	if len(hdr) > maxColumns {
		return nil, r.Errorf(line, 0, format.ErrUnsupported, "header has %d columns; at most %d are supported", len(hdr), maxColumns)
	}
	t := &table{r: r, f: f, line: line, cols: make([]string, len(hdr))}
	seen := map[string]int{}
	for i, c := range hdr {
		if c == "" {
			return nil, r.Errorf(line, i+1, format.ErrSyntax, "column name is empty")
		}
		k := strings.ToLower(c)
		if at, ok := seen[k]; ok {
			return nil, r.Errorf(line, i+1, format.ErrSyntax, "duplicate column %q (also column %d)", c, at)
		}
		seen[k] = i + 1
		t.cols[i] = strings.Clone(c)
	}
	return t, nil
}

// col returns the index of the named column (case-insensitive), or -1.
func (t *table) col(name string) int {
	for i, c := range t.cols {
		if strings.EqualFold(c, name) {
			return i
		}
	}
	return -1
}

// need returns the index of a required column or a positioned error.
func (t *table) need(what, name string) (int, error) {
	if i := t.col(name); i >= 0 {
		return i, nil
	}
	hint := ""
	if len(t.cols) == 1 && strings.ContainsAny(t.cols[0], ",;") {
		hint = " (the file must be tab-separated)"
	}
	return -1, t.r.Errorf(t.line, 0, format.ErrSyntax, "%s file has no %s column; columns are: %s%s", what, name, strings.Join(t.cols, ", "), hint)
}

// row returns the next row, checking its field count; io.EOF at the end.
func (t *table) row() ([]string, int, error) {
	fs, line, err := t.r.Read()
	if err != nil {
		return nil, line, err
	}
	if len(fs) != len(t.cols) {
		col := len(t.cols) + 1
		if len(fs) < len(t.cols) {
			col = len(fs)
		}
		return nil, line, t.r.Errorf(line, col, format.ErrSyntax, "row has %d fields; the header has %d", len(fs), len(t.cols))
	}
	return fs, line, nil
}

// seconds parses a time in seconds.
func (t *table) seconds(name, s string, line, col int) (float64, error) {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, t.r.Errorf(line, col, format.ErrSyntax, "%s %q is not a number of seconds", name, s)
	}
	return v, nil
}

// ReadEvents reads a BIDS events.tsv file. The header must have an onset
// column (seconds); duration (seconds, "n/a" or empty → 0) is required by
// BIDS but taken as 0 when the column is absent; trial_type, when present,
// becomes Event.Type. Column names are matched case-insensitively. Every
// other column goes into Event.Extra under its header name, with "n/a" kept
// as is (callers treat it as missing); Extra is nil when there are no other
// columns. A header without rows gives no events and no error.
func ReadEvents(f format.File) ([]data.Event, error) {
	t, err := open(f)
	if err != nil {
		return nil, err
	}
	on, err := t.need("events", "onset")
	if err != nil {
		return nil, err
	}
	dur, typ := t.col("duration"), t.col("trial_type")
	var extra []int
	for i := range t.cols {
		if i != on && i != dur && i != typ {
			extra = append(extra, i)
		}
	}
	evs := []data.Event{}
	for {
		fs, line, err := t.row()
		if err == io.EOF {
			return evs, nil
		}
		if err != nil {
			return nil, err
		}
		var ev data.Event
		if ev.Onset, err = t.seconds("onset", fs[on], line, on+1); err != nil {
			return nil, err
		}
		if dur >= 0 && fs[dur] != NA && fs[dur] != "" {
			if ev.Duration, err = t.seconds("duration", fs[dur], line, dur+1); err != nil {
				return nil, err
			}
			if ev.Duration < 0 {
				return nil, t.r.Errorf(line, dur+1, format.ErrSyntax, "duration %q is negative", fs[dur])
			}
		}
		if typ >= 0 {
			ev.Type = fs[typ]
		}
		if len(extra) > 0 {
			ev.Extra = make(map[string]string, len(extra))
			for _, i := range extra {
				ev.Extra[t.cols[i]] = fs[i]
			}
		}
		evs = append(evs, ev)
	}
}

// ChannelInfo is one row of a BIDS channels.tsv file.
type ChannelInfo struct {
	Name              string
	Type              string // e.g. "EEG", "EOG", "MEGMAG"
	Units             string // e.g. "uV", "µV", "fT"
	Status            string // "good", "bad", or "" when missing or "n/a"
	StatusDescription string
	Extra             map[string]string // further columns (low_cutoff, …); nil if none
}

// ReadChannels reads a BIDS channels.tsv file. The columns name, type and
// units are required; status ("good", "bad" or "n/a", any case) and
// status_description are optional. Names must be non-empty and distinct.
// Other columns go into Extra. A header without rows gives no channels and
// no error.
func ReadChannels(f format.File) ([]ChannelInfo, error) {
	t, err := open(f)
	if err != nil {
		return nil, err
	}
	var idx [3]int
	for i, name := range []string{"name", "type", "units"} {
		if idx[i], err = t.need("channels", name); err != nil {
			return nil, err
		}
	}
	st, sd := t.col("status"), t.col("status_description")
	var extra []int
	for i := range t.cols {
		if i != idx[0] && i != idx[1] && i != idx[2] && i != st && i != sd {
			extra = append(extra, i)
		}
	}
	out := []ChannelInfo{}
	seen := map[string]int{}
	for {
		fs, line, err := t.row()
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return nil, err
		}
		c := ChannelInfo{Name: fs[idx[0]], Type: fs[idx[1]], Units: fs[idx[2]]}
		if c.Name == "" || c.Name == NA {
			return nil, t.r.Errorf(line, idx[0]+1, format.ErrSyntax, "channel name is missing")
		}
		if at, ok := seen[c.Name]; ok {
			return nil, t.r.Errorf(line, idx[0]+1, format.ErrSyntax, "channel %q is listed again (first at line %d)", c.Name, at)
		}
		seen[c.Name] = line
		if st >= 0 {
			switch s := strings.ToLower(fs[st]); s {
			case "good", "bad":
				c.Status = s
			case NA, "":
			default:
				return nil, t.r.Errorf(line, st+1, format.ErrSyntax, "status %q is not good, bad or n/a", fs[st])
			}
		}
		if sd >= 0 && fs[sd] != NA {
			c.StatusDescription = fs[sd]
		}
		if len(extra) > 0 {
			c.Extra = make(map[string]string, len(extra))
			for _, i := range extra {
				c.Extra[t.cols[i]] = fs[i]
			}
		}
		out = append(out, c)
	}
}

// Bad returns the names of the channels whose status is "bad", in order.
func Bad(infos []ChannelInfo) []string {
	var out []string
	for _, c := range infos {
		if c.Status == "bad" {
			out = append(out, c.Name)
		}
	}
	return out
}
