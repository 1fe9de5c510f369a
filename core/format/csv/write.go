package csv

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"amplink/core/data"
)

// WriteEpochs writes e as an epoched CSV file: the header
// trial,time,<channel>..., then one row per sample per trial. The trial id
// is TrialInfo[i].Extra["trial"] when every trial has a distinct, non-empty
// one, and i+1 otherwise. Times are Start + k/Rate, printed in the shortest
// form that reads back as the same float64; values are printed in the
// shortest form that reads back as the same float32. Decode therefore gives
// back the same values, Start and channel names, and the same Rate when it
// has at most 6 decimals (otherwise within about 1e-12 relative).
//
// Channel names and ids that contain a comma, a quote, a tab or outer spaces
// are quoted. A channel name with a line break or a tab (which would make the
// header read as TSV), or a non-finite value, is an error, since the file
// could not be read back.
func WriteEpochs(w io.Writer, e *data.Epochs) error {
	if err := e.Validate(); err != nil {
		return fmt.Errorf("csv: %s: %w", e.Name, err)
	}
	ids := trialIDs(e)
	bw := bufio.NewWriterSize(w, 64<<10)
	buf := []byte("trial,time")
	buf, err := appendNames(buf, e.Channels)
	if err != nil {
		return fmt.Errorf("csv: %s: %w", e.Name, err)
	}
	nch := len(e.Channels)
	times := make([][]byte, e.NSamples)
	for k := range times {
		times[k] = strconv.AppendFloat(nil, e.Time(k), 'g', -1, 64)
	}
	for t := 0; t < e.NTrials; t++ {
		id := appendField(nil, ids[t])
		for k := 0; k < e.NSamples; k++ {
			buf = append(buf, id...)
			buf = append(buf, ',')
			buf = append(buf, times[k]...)
			for c := 0; c < nch; c++ {
				v := e.Data[(t*nch+c)*e.NSamples+k]
				if math.IsNaN(float64(v)) || math.IsInf(float64(v), 0) {
					return fmt.Errorf("csv: %s: trial %d, channel %s, sample %d is %v; only finite values can be written", e.Name, t+1, e.Channels[c].Name, k+1, v)
				}
				buf = append(buf, ',')
				buf = strconv.AppendFloat(buf, float64(v), 'g', -1, 32)
			}
			buf = append(buf, '\n')
			if len(buf) >= 32<<10 {
				if _, err := bw.Write(buf); err != nil {
					return err
				}
				buf = buf[:0]
			}
		}
	}
	if _, err := bw.Write(buf); err != nil {
		return err
	}
	return bw.Flush()
}

// WriteRecording writes r as a continuous CSV file: the header
// time,<channel>..., then one row per sample, with times Start + k/Rate.
// Number formats and round-trip guarantees are those of WriteEpochs.
func WriteRecording(w io.Writer, r *data.Recording) error {
	if !(r.Rate > 0) || math.IsInf(r.Rate, 0) {
		return fmt.Errorf("csv: %s: sample rate %v is not positive", r.Name, r.Rate)
	}
	if len(r.Channels) == 0 || len(r.Samples) != len(r.Channels) {
		return fmt.Errorf("csv: %s: %d channels and %d sample rows", r.Name, len(r.Channels), len(r.Samples))
	}
	n := r.Len()
	for c, s := range r.Samples {
		if len(s) != n {
			return fmt.Errorf("csv: %s: channel %s has %d samples, channel %s has %d", r.Name, r.Channels[c].Name, len(s), r.Channels[0].Name, n)
		}
	}
	if n == 0 {
		return fmt.Errorf("csv: %s: recording has no samples", r.Name)
	}
	bw := bufio.NewWriterSize(w, 64<<10)
	buf, err := appendNames([]byte("time"), r.Channels)
	if err != nil {
		return fmt.Errorf("csv: %s: %w", r.Name, err)
	}
	for k := 0; k < n; k++ {
		buf = strconv.AppendFloat(buf, r.Start+float64(k)/r.Rate, 'g', -1, 64)
		for c, s := range r.Samples {
			v := s[k]
			if math.IsNaN(float64(v)) || math.IsInf(float64(v), 0) {
				return fmt.Errorf("csv: %s: channel %s, sample %d is %v; only finite values can be written", r.Name, r.Channels[c].Name, k+1, v)
			}
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, float64(v), 'g', -1, 32)
		}
		buf = append(buf, '\n')
		if len(buf) >= 32<<10 {
			if _, err := bw.Write(buf); err != nil {
				return err
			}
			buf = buf[:0]
		}
	}
	if _, err := bw.Write(buf); err != nil {
		return err
	}
	return bw.Flush()
}

func trialIDs(e *data.Epochs) []string {
	ids := make([]string, e.NTrials)
	seen := make(map[string]bool, e.NTrials)
	ok := e.TrialInfo != nil
	for i := range ids {
		if !ok {
			break
		}
		id := e.TrialInfo[i].Extra["trial"]
		if id == "" || seen[id] || strings.ContainsAny(id, "\r\n") {
			ok = false
			break
		}
		seen[id] = true
		ids[i] = id
	}
	if !ok {
		for i := range ids {
			ids[i] = strconv.Itoa(i + 1)
		}
	}
	return ids
}

func appendNames(buf []byte, chs []data.Channel) ([]byte, error) {
	for _, c := range chs {
		if c.Name == "" || strings.ContainsAny(c.Name, "\r\n\t") {
			return nil, fmt.Errorf("channel name %q cannot be written", c.Name)
		}
		buf = append(buf, ',')
		buf = appendField(buf, c.Name)
	}
	return append(buf, '\n'), nil
}

// appendField appends s, quoted when the reader would otherwise change it,
// with a leading apostrophe when a spreadsheet would run it as a formula
// (QuoteCell; the reader takes it off again).
func appendField(buf []byte, s string) []byte {
	s = QuoteCell(s)
	if !strings.ContainsAny(s, ",\"\t") && strings.Trim(s, " ") == s {
		return append(buf, s...)
	}
	buf = append(buf, '"')
	buf = append(buf, strings.ReplaceAll(s, `"`, `""`)...)
	return append(buf, '"')
}
