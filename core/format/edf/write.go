package edf

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"amplink/core/data"
)

// WriteOptions controls Write. The zero value writes EDF+C with 1 s records
// and an unknown start date.
type WriteOptions struct {
	// BDF writes BDF+C with 24-bit samples instead of EDF+C with 16-bit ones.
	BDF bool
	// RecordDuration is the duration of a data record in seconds. It must hold
	// a whole number of samples. Zero picks 1 s, or else the shortest whole
	// number of seconds up to 60 that holds a whole number of samples.
	RecordDuration float64
	// Start is written as the start date and time (its clock time, in its own
	// zone). The zero value writes 01.01.85 00.00.00, which EDF+ uses for an
	// unknown date. Years outside 1985–2084 are an error.
	Start time.Time
}

// Write writes r as EDF+C (16-bit) or, with opt.BDF, BDF+C (24-bit), with
// r.Events as annotations in an "EDF Annotations" ("BDF Annotations") signal.
//
// Each channel gets its own physical range: its minimum and maximum widened
// by 1% of the span on each side (±max(|x|, 1) when the channel is constant),
// then rounded outwards to fit the 8-character fields. The digital range is
// the full one, −32768..32767 (EDF) or −8388608..8388607 (BDF), so a sample x
// is stored as d = dmin + round((x − pmin)/step), step = (pmax − pmin)/(dmax − dmin),
// and reads back within step/2.
//
// The label of a channel is Channel.Label, or "Type Name" when Label is empty
// and Type is set (if that fits in 16 characters), or Name. Units "µV" and
// "μV" are written "uV". Labels, units and the other header fields must be
// printable ASCII.
//
// Records hold the samples of RecordDuration seconds. When the channel length
// is not a whole number of records, the last record is padded by repeating each
// channel's final sample. Each event goes into the record that holds its onset
// (events before 0 s into the first, those after the end into the last) as
// "+onset[\x15duration]\x14text\x14\x00"; the duration is written when positive.
// Onsets are seconds from the first sample, which is also the start time.
func Write(w io.Writer, r *data.Recording, opt WriteOptions) error {
	wr, err := newWriter(r, opt)
	if err != nil {
		return err
	}
	return wr.write(w)
}

type writer struct {
	r         *data.Recording
	opt       WriteOptions
	bps       int
	dur       float64
	spr       int // samples per record of the data signals
	n         int // samples per channel
	records   int
	pmin      []float64
	pmax      []float64
	pminS     []string
	pmaxS     []string
	labels    []string
	units     []string
	tals      [][]byte // annotation bytes per record
	annSPR    int
	dmin      int
	dmax      int
	annotName string
}

func newWriter(r *data.Recording, opt WriteOptions) (*writer, error) {
	wr := &writer{r: r, opt: opt, bps: 2, dmin: math.MinInt16, dmax: math.MaxInt16, annotName: "EDF Annotations"}
	if opt.BDF {
		wr.bps, wr.dmin, wr.dmax, wr.annotName = 3, -1<<23, 1<<23-1, "BDF Annotations"
	}
	switch {
	case r == nil:
		return nil, fmt.Errorf("edf: write: no recording")
	case !(r.Rate > 0) || math.IsInf(r.Rate, 0):
		return nil, fmt.Errorf("edf: write %s: sampling rate %v Hz is not positive", r.Name, r.Rate)
	case len(r.Channels) == 0:
		return nil, fmt.Errorf("edf: write %s: no channels", r.Name)
	case len(r.Channels) > maxSignal-1:
		return nil, fmt.Errorf("edf: write %s: %d channels, at most %d fit beside the annotations", r.Name, len(r.Channels), maxSignal-1)
	case len(r.Samples) != len(r.Channels):
		return nil, fmt.Errorf("edf: write %s: %d sample rows for %d channels", r.Name, len(r.Samples), len(r.Channels))
	}
	wr.n = len(r.Samples[0])
	if wr.n == 0 {
		return nil, fmt.Errorf("edf: write %s: no samples", r.Name)
	}
	for c, s := range r.Samples {
		if len(s) != wr.n {
			return nil, fmt.Errorf("edf: write %s: channel %q has %d samples, channel %q has %d", r.Name, r.Channels[c].Name, len(s), r.Channels[0].Name, wr.n)
		}
	}
	if t := opt.Start; !t.IsZero() && (t.Year() < 1985 || t.Year() > 2084) {
		return nil, fmt.Errorf("edf: write %s: start year %d is outside 1985–2084", r.Name, t.Year())
	}
	if err := wr.duration(); err != nil {
		return nil, err
	}
	wr.records = (wr.n + wr.spr - 1) / wr.spr
	if wr.records > 99999999 {
		return nil, fmt.Errorf("edf: write %s: %d records do not fit the 8-character field", r.Name, wr.records)
	}
	if err := wr.ranges(); err != nil {
		return nil, err
	}
	if err := wr.names(); err != nil {
		return nil, err
	}
	if err := wr.annotations(); err != nil {
		return nil, err
	}
	return wr, nil
}

// duration picks the record duration and the samples per record.
func (wr *writer) duration() error {
	whole := func(d float64) (int, bool) {
		x := wr.r.Rate * d
		k := math.Round(x)
		return int(k), k >= 1 && k <= 99999999 && math.Abs(x-k) <= 1e-9*k
	}
	if d := wr.opt.RecordDuration; d != 0 {
		k, ok := whole(d)
		if !ok || !(d > 0) {
			return fmt.Errorf("edf: write %s: a record of %v s holds %v samples at %v Hz, not a whole number", wr.r.Name, d, wr.r.Rate*d, wr.r.Rate)
		}
		if _, err := fmtNum(d, 8, 0); err != nil {
			return fmt.Errorf("edf: write %s: record duration %v s does not fit the 8-character field", wr.r.Name, d)
		}
		wr.dur, wr.spr = d, k
		return nil
	}
	for d := 1; d <= 60; d++ {
		if k, ok := whole(float64(d)); ok {
			wr.dur, wr.spr = float64(d), k
			return nil
		}
	}
	return fmt.Errorf("edf: write %s: no record of 1 to 60 s holds a whole number of samples at %v Hz; set RecordDuration", wr.r.Name, wr.r.Rate)
}

// ranges sets the physical range of every channel.
func (wr *writer) ranges() error {
	nc := len(wr.r.Channels)
	wr.pmin, wr.pmax = make([]float64, nc), make([]float64, nc)
	wr.pminS, wr.pmaxS = make([]string, nc), make([]string, nc)
	for c, s := range wr.r.Samples {
		lo, hi := math.Inf(1), math.Inf(-1)
		for k, v := range s {
			x := float64(v)
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return fmt.Errorf("edf: write %s: channel %q sample %d is %v", wr.r.Name, wr.r.Channels[c].Name, k, v)
			}
			lo, hi = min(lo, x), max(hi, x)
		}
		span := hi - lo
		if span == 0 {
			span = max(math.Abs(hi), 1) * 100 // ±1% of that below
		}
		var err error
		if wr.pminS[c], err = fmtNum(lo-0.01*span, 8, -1); err == nil {
			wr.pmaxS[c], err = fmtNum(hi+0.01*span, 8, +1)
		}
		if err != nil {
			return fmt.Errorf("edf: write %s: channel %q: range %g..%g does not fit the 8-character fields", wr.r.Name, wr.r.Channels[c].Name, lo, hi)
		}
		wr.pmin[c], _ = strconv.ParseFloat(wr.pminS[c], 64)
		wr.pmax[c], _ = strconv.ParseFloat(wr.pmaxS[c], 64)
		if !(wr.pmax[c] > wr.pmin[c]) {
			return fmt.Errorf("edf: write %s: channel %q: range %g..%g is too narrow for the 8-character fields", wr.r.Name, wr.r.Channels[c].Name, lo, hi)
		}
	}
	return nil
}

// fmtNum formats v in at most width characters, rounding down (dir < 0),
// up (dir > 0) or to nearest (dir == 0), with as many decimals as fit.
func fmtNum(v float64, width, dir int) (string, error) {
	for prec := width - 1; prec >= 0; prec-- {
		sc := math.Pow10(prec)
		q := v * sc
		switch {
		case dir < 0:
			q = math.Floor(q)
		case dir > 0:
			q = math.Ceil(q)
		default:
			q = math.Round(q)
		}
		q /= sc
		if q == 0 {
			q = 0 // no "-0"
		}
		s := strconv.FormatFloat(q, 'f', prec, 64)
		if strings.Contains(s, ".") {
			s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
		}
		if s == "-0" {
			s = "0"
		}
		if len(s) <= width {
			return s, nil
		}
	}
	return "", fmt.Errorf("edf: %v does not fit in %d characters", v, width)
}

// ascii checks that s is printable ASCII.
func ascii(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] < 32 || s[i] > 126 {
			return false
		}
	}
	return true
}

// names sets the labels and units.
func (wr *writer) names() error {
	for _, ch := range wr.r.Channels {
		l := ch.Label
		if l == "" {
			l = ch.Name
			if ch.Type != "" && len(ch.Type)+1+len(ch.Name) <= 16 {
				l = ch.Type + " " + ch.Name
			}
		}
		if !ascii(l) || len(l) > 16 || strings.TrimSpace(l) == "" {
			return fmt.Errorf("edf: write %s: label %q is not 1 to 16 printable ASCII characters", wr.r.Name, l)
		}
		if l == "EDF Annotations" || l == "BDF Annotations" {
			return fmt.Errorf("edf: write %s: a data channel cannot be labelled %q", wr.r.Name, l)
		}
		u := strings.NewReplacer("µ", "u", "μ", "u").Replace(ch.Unit)
		if !ascii(u) || len(u) > 8 {
			return fmt.Errorf("edf: write %s: unit %q of channel %q is not at most 8 printable ASCII characters", wr.r.Name, ch.Unit, l)
		}
		wr.labels = append(wr.labels, l)
		wr.units = append(wr.units, u)
	}
	return nil
}

func fmtTime(v float64) string {
	s := strconv.FormatFloat(v, 'f', -1, 64)
	if v >= 0 {
		s = "+" + s
	}
	return s
}

// annotations lays out the TALs of every record.
func (wr *writer) annotations() error {
	wr.tals = make([][]byte, wr.records)
	for k := range wr.tals {
		wr.tals[k] = append([]byte(fmtTime(float64(k)*wr.dur)), 0x14, 0x14, 0)
	}
	for i, ev := range wr.r.Events {
		if math.IsNaN(ev.Onset) || math.IsInf(ev.Onset, 0) || math.IsNaN(ev.Duration) || math.IsInf(ev.Duration, 0) {
			return fmt.Errorf("edf: write %s: event %d (%q) has onset %v s, duration %v s", wr.r.Name, i+1, ev.Type, ev.Onset, ev.Duration)
		}
		if ev.Type == "" || !utf8.ValidString(ev.Type) || strings.ContainsAny(ev.Type, "\x00\x14\x15") {
			return fmt.Errorf("edf: write %s: event %d: text %q is empty, not UTF-8 or holds \\x00, \\x14 or \\x15", wr.r.Name, i+1, ev.Type)
		}
		k := int(math.Floor(ev.Onset / wr.dur))
		k = max(0, min(k, wr.records-1))
		b := append(wr.tals[k], fmtTime(ev.Onset)...)
		if ev.Duration > 0 {
			b = append(append(b, 0x15), strconv.FormatFloat(ev.Duration, 'f', -1, 64)...)
		}
		b = append(append(append(b, 0x14), ev.Type...), 0x14, 0)
		wr.tals[k] = b
	}
	most := 0
	for _, b := range wr.tals {
		most = max(most, len(b))
	}
	wr.annSPR = (most + wr.bps - 1) / wr.bps
	return nil
}

// pad appends s to b, space-padded to width.
func pad(b []byte, s string, width int) []byte {
	if len(s) > width {
		panic("edf: field too long: " + s)
	}
	b = append(b, s...)
	for i := len(s); i < width; i++ {
		b = append(b, ' ')
	}
	return b
}

func (wr *writer) header() []byte {
	ns := len(wr.r.Channels) + 1
	h := make([]byte, 0, fixedLen*(ns+1))
	if wr.opt.BDF {
		h = append(h, magicBDF...)
	} else {
		h = append(h, magicEDF...)
	}
	h = pad(h, "X X X X", 80)
	date, clock := "01.01.85", "00.00.00"
	recID := "Startdate X X X X"
	if t := wr.opt.Start; !t.IsZero() {
		date = fmt.Sprintf("%02d.%02d.%02d", t.Day(), int(t.Month()), t.Year()%100)
		clock = fmt.Sprintf("%02d.%02d.%02d", t.Hour(), t.Minute(), t.Second())
		recID = fmt.Sprintf("Startdate %02d-%s-%04d X X X", t.Day(), strings.ToUpper(t.Month().String()[:3]), t.Year())
	}
	h = pad(h, recID, 80)
	h = pad(h, date, 8)
	h = pad(h, clock, 8)
	h = pad(h, strconv.Itoa(fixedLen*(ns+1)), 8)
	if wr.opt.BDF {
		h = pad(h, "BDF+C", 44)
	} else {
		h = pad(h, "EDF+C", 44)
	}
	h = pad(h, strconv.Itoa(wr.records), 8)
	d, _ := fmtNum(wr.dur, 8, 0)
	h = pad(h, d, 8)
	h = pad(h, strconv.Itoa(ns), 4)
	nc := len(wr.r.Channels)
	each := func(width int, data func(c int) string, ann string) {
		for c := 0; c < nc; c++ {
			h = pad(h, data(c), width)
		}
		h = pad(h, ann, width)
	}
	blank := func(int) string { return "" }
	each(16, func(c int) string { return wr.labels[c] }, wr.annotName)
	each(80, blank, "")
	each(8, func(c int) string { return wr.units[c] }, "")
	each(8, func(c int) string { return wr.pminS[c] }, "-1")
	each(8, func(c int) string { return wr.pmaxS[c] }, "1")
	each(8, func(int) string { return strconv.Itoa(wr.dmin) }, strconv.Itoa(wr.dmin))
	each(8, func(int) string { return strconv.Itoa(wr.dmax) }, strconv.Itoa(wr.dmax))
	each(80, blank, "")
	each(8, func(int) string { return strconv.Itoa(wr.spr) }, strconv.Itoa(wr.annSPR))
	each(32, blank, "")
	return h
}

func (wr *writer) write(w io.Writer) error {
	if _, err := w.Write(wr.header()); err != nil {
		return err
	}
	nc := len(wr.r.Channels)
	rb := (nc*wr.spr + wr.annSPR) * wr.bps
	buf := make([]byte, rb)
	for k := 0; k < wr.records; k++ {
		o := 0
		for c := 0; c < nc; c++ {
			s := wr.r.Samples[c]
			step := (wr.pmax[c] - wr.pmin[c]) / float64(wr.dmax-wr.dmin)
			for j := 0; j < wr.spr; j++ {
				i := min(k*wr.spr+j, wr.n-1)
				d := float64(wr.dmin) + math.Round((float64(s[i])-wr.pmin[c])/step)
				v := int(max(float64(wr.dmin), min(float64(wr.dmax), d)))
				buf[o], buf[o+1] = byte(v), byte(v>>8)
				if wr.bps == 3 {
					buf[o+2] = byte(v >> 16)
				}
				o += wr.bps
			}
		}
		t := buf[o:]
		clear(t)
		copy(t, wr.tals[k])
		if _, err := w.Write(buf); err != nil {
			return err
		}
	}
	return nil
}
