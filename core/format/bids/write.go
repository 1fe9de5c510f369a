package bids

import (
	"bufio"
	"fmt"
	"io"
	"sort"
	"strconv"
	"strings"

	"amplink/core/data"
	"amplink/core/format/csv"
)

// WriteEvents writes events as a BIDS events.tsv: onset, duration and
// trial_type, then every extra column in sorted order ("n/a" where an event
// lacks it). Onsets and durations are in seconds.
func WriteEvents(w io.Writer, evs []data.Event) error {
	extra := map[string]bool{}
	for _, e := range evs {
		for k := range e.Extra {
			extra[k] = true
		}
	}
	var cols []string
	for k := range extra {
		if k != "onset" && k != "duration" && k != "trial_type" {
			cols = append(cols, k)
		}
	}
	sort.Strings(cols)
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "onset\tduration\ttrial_type%s\n", prefixed(cols))
	for _, e := range evs {
		if strings.ContainsAny(e.Type, "\t\n\r") {
			return fmt.Errorf("bids: event type %q contains a tab or line break", e.Type)
		}
		typ := e.Type
		if typ == "" {
			typ = NA
		}
		fmt.Fprintf(bw, "%s\t%s\t%s", strconv.FormatFloat(e.Onset, 'f', -1, 64), strconv.FormatFloat(e.Duration, 'f', -1, 64), csv.QuoteCell(typ))
		for _, c := range cols {
			v, ok := e.Extra[c]
			if !ok || v == "" {
				v = NA
			}
			if strings.ContainsAny(v, "\t\n\r") {
				return fmt.Errorf("bids: value %q of column %s contains a tab or line break", v, c)
			}
			bw.WriteString("\t" + csv.QuoteCell(v))
		}
		bw.WriteByte('\n')
	}
	return bw.Flush()
}

func prefixed(cols []string) string {
	if len(cols) == 0 {
		return ""
	}
	q := make([]string, len(cols))
	for i, c := range cols {
		q[i] = csv.QuoteCell(c)
	}
	return "\t" + strings.Join(q, "\t")
}

// WriteChannels writes a BIDS channels.tsv with name, type, units and status.
// Like WriteEvents, it gives a cell a spreadsheet would run as a formula a
// leading apostrophe (csv.QuoteCell), which the readers take off again.
func WriteChannels(w io.Writer, chs []data.Channel, bad map[string]bool) error {
	bw := bufio.NewWriter(w)
	bw.WriteString("name\ttype\tunits\tstatus\n")
	for _, c := range chs {
		typ, unit := c.Type, c.Unit
		if typ == "" {
			typ = "MISC"
		}
		if unit == "" {
			unit = NA
		}
		status := "good"
		if bad[c.Name] {
			status = "bad"
		}
		for _, s := range []string{c.Name, typ, unit} {
			if strings.ContainsAny(s, "\t\n\r") {
				return fmt.Errorf("bids: %q contains a tab or line break", s)
			}
		}
		fmt.Fprintf(bw, "%s\t%s\t%s\t%s\n", csv.QuoteCell(c.Name), csv.QuoteCell(typ), csv.QuoteCell(unit), status)
	}
	return bw.Flush()
}
