package edf

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"amplink/core/data"
	"amplink/core/format"
)

// Header is the parsed header of an EDF, EDF+ or BDF file.
type Header struct {
	BDF           bool   // 24-bit samples: the file starts with 0xFF "BIOSEMI"
	Plus          bool   // EDF+ or BDF+: the reserved field starts "EDF+" or "BDF+"
	Discontinuous bool   // EDF+D or BDF+D
	Patient       string // local patient identification, trimmed
	RecordingID   string // local recording identification, trimmed
	// Start is the start date and time of the header (dd.mm.yy hh.mm.ss),
	// as a clock time labelled UTC: the file does not store a zone. Years
	// 85–99 mean 19xx, 00–84 mean 20xx.
	Start time.Time
	// StartOffset is the time stamp of the first data record in seconds after
	// Start (EDF+ and BDF+ only; 0 otherwise). Decode sets it; ReadHeader
	// leaves it 0.
	StartOffset    float64
	HeaderBytes    int64   // 256·(number of signals + 1)
	Reserved       string  // reserved field, trimmed ("EDF+C", "24BIT", ...)
	Records        int64   // number of data records (derived from the size when the header says −1)
	RecordsUnknown bool    // the header said −1
	RecordDuration float64 // seconds
	RecordBytes    int64   // bytes per data record
	Trailing       int64   // bytes after the last whole data record (ignored)
	Signals        []Signal
}

// Signal is the header of one signal.
type Signal struct {
	Label            string // trimmed
	Transducer       string // trimmed
	Dimension        string // physical dimension (unit), trimmed
	PhysMin, PhysMax float64
	DigMin, DigMax   int
	Prefilter        string // trimmed
	SamplesPerRecord int
	Reserved         string // trimmed
	Annotations      bool   // labelled "EDF Annotations" or "BDF Annotations"
	offset           int64  // byte offset of the signal's samples in a data record
}

// Rate returns the sampling rate of signal i in Hz:
// SamplesPerRecord / RecordDuration.
func (h *Header) Rate(i int) float64 {
	return rate(h.Signals[i].SamplesPerRecord, h.RecordDuration)
}

func rate(spr int, dur float64) float64 {
	r := float64(spr) / dur
	if rr := math.Round(r); math.Abs(r-rr) <= 1e-9*r {
		r = rr
	}
	return r
}

// Gain returns (pmax − pmin)/(dmax − dmin), the physical units per digital step.
func (s *Signal) Gain() float64 {
	return (s.PhysMax - s.PhysMin) / float64(s.DigMax-s.DigMin)
}

// Physical converts a digital value d of this signal to physical units:
// pmin + (d − dmin)·(pmax − pmin)/(dmax − dmin).
func (s *Signal) Physical(d int) float64 {
	return s.PhysMin + float64(d-s.DigMin)*s.Gain()
}

const (
	fixedLen  = 256
	maxSignal = 4096
	magicEDF  = "0       "
	magicBDF  = "\xffBIOSEMI"
)

// Offsets of the fixed header fields.
const (
	offVersion     = 0
	offPatient     = 8
	offRecording   = 88
	offStartDate   = 168
	offStartTime   = 176
	offHeaderBytes = 184
	offReserved    = 192
	offRecords     = 236
	offDuration    = 244
	offSignals     = 252
)

// Signal header fields, in file order.
var sigFields = [...]struct {
	width int
	name  string
}{
	{16, "label"},
	{80, "transducer type"},
	{8, "physical dimension"},
	{8, "physical minimum"},
	{8, "physical maximum"},
	{8, "digital minimum"},
	{8, "digital maximum"},
	{80, "prefiltering"},
	{8, "number of samples in each data record"},
	{32, "reserved"},
}

const (
	fLabel = iota
	fTransducer
	fDimension
	fPhysMin
	fPhysMax
	fDigMin
	fDigMax
	fPrefilter
	fSamples
	fReserved
)

// sigErr is an error message that unwraps to a sentinel.
type sigErr struct {
	msg      string
	sentinel error
}

func (e *sigErr) Error() string { return e.msg }
func (e *sigErr) Unwrap() error { return e.sentinel }

// parser carries the file identity for error messages.
type parser struct {
	f    format.File
	name string // "edf" or "bdf"
}

func (p *parser) errf(off int64, field string, sentinel error, msg string, args ...any) error {
	return &format.Error{
		Format: p.name, File: p.f.Name, Offset: off, Field: field,
		Err: &sigErr{msg: fmt.Sprintf(msg, args...), sentinel: sentinel},
	}
}

// readAt reads len(b) bytes at off; a short file gives ErrTruncated.
func (p *parser) readAt(b []byte, off int64, field string) error {
	n, err := p.f.R.ReadAt(b, off)
	if n == len(b) {
		return nil
	}
	if err == nil || errors.Is(err, io.EOF) {
		return p.errf(off+int64(n), field, format.ErrTruncated, "file is truncated: %d of %d bytes could be read", n, len(b))
	}
	return &format.Error{Format: p.name, File: p.f.Name, Offset: off, Field: field, Err: err}
}

// ReadHeader reads and checks the header of f. It checks every claim of the
// header against f.Size before allocating anything in proportion to it.
func ReadHeader(f format.File) (*Header, error) {
	p := &parser{f: f, name: "edf"}
	return p.header()
}

func (p *parser) header() (*Header, error) {
	f := p.f
	var fix [fixedLen]byte
	if f.Size > 0 {
		n := min(f.Size, 1)
		if err := p.readAt(fix[:n], 0, "version"); err != nil {
			return nil, err
		}
		if fix[0] == 0xFF {
			p.name = "bdf"
		}
	}
	if f.Size < fixedLen {
		return nil, p.errf(f.Size, "header", format.ErrTruncated, "file is truncated: %d bytes, the fixed header needs %d", f.Size, fixedLen)
	}
	if err := p.readAt(fix[:], 0, "header"); err != nil {
		return nil, err
	}
	h := &Header{}
	switch v := string(fix[:8]); v {
	case magicEDF:
	case magicBDF:
		h.BDF = true
	default:
		return nil, p.errf(offVersion, "version", format.ErrSyntax, "%q is neither %q (EDF) nor %q (BDF)", v, magicEDF, magicBDF)
	}
	field := func(off, n int) string { return string(fix[off : off+n]) }
	h.Patient = trim(field(offPatient, 80))
	h.RecordingID = trim(field(offRecording, 80))

	start, err := p.startTime(field(offStartDate, 8), field(offStartTime, 8))
	if err != nil {
		return nil, err
	}
	h.Start = start

	ns, err := p.integer(field(offSignals, 4), offSignals, "number of signals")
	if err != nil {
		return nil, err
	}
	if ns < 1 || ns > maxSignal {
		return nil, p.errf(offSignals, "number of signals", format.ErrSyntax, "%d is not in 1..%d", ns, maxSignal)
	}
	hb, err := p.integer(field(offHeaderBytes, 8), offHeaderBytes, "number of header bytes")
	if err != nil {
		return nil, err
	}
	if want := int64(fixedLen * (ns + 1)); hb != want {
		return nil, p.errf(offHeaderBytes, "number of header bytes", format.ErrSyntax, "%d, but %d signals need 256·(%d+1) = %d", hb, ns, ns, want)
	}
	h.HeaderBytes = hb

	h.Reserved = trim(field(offReserved, 44))
	if r := h.Reserved; strings.HasPrefix(r, "EDF+") || strings.HasPrefix(r, "BDF+") {
		h.Plus = true
		switch {
		case strings.HasPrefix(r[4:], "C"):
		case strings.HasPrefix(r[4:], "D"):
			h.Discontinuous = true
		default:
			return nil, p.errf(offReserved, "reserved", format.ErrSyntax, "%q is neither %s+C nor %s+D", r, r[:3], r[:3])
		}
	}

	records, err := p.integer(field(offRecords, 8), offRecords, "number of data records")
	if err != nil {
		return nil, err
	}
	if records != -1 && records < 1 {
		return nil, p.errf(offRecords, "number of data records", format.ErrSyntax, "%d is neither −1 (unknown) nor a positive count", records)
	}
	dur, err := p.float(field(offDuration, 8), offDuration, "duration of a data record")
	if err != nil {
		return nil, err
	}
	switch {
	case dur < 0:
		return nil, p.errf(offDuration, "duration of a data record", format.ErrSyntax, "%v s is negative", dur)
	case dur == 0:
		return nil, p.errf(offDuration, "duration of a data record", format.ErrUnsupported, "0 s (a file of annotations only) is not supported")
	}
	h.RecordDuration = dur

	if f.Size < hb {
		return nil, p.errf(f.Size, "signal headers", format.ErrTruncated, "file is truncated: %d bytes, the header of %d signals needs %d", f.Size, ns, hb)
	}
	sh := make([]byte, hb-fixedLen)
	if err := p.readAt(sh, fixedLen, "signal headers"); err != nil {
		return nil, err
	}
	if err := p.signals(h, sh, int(ns)); err != nil {
		return nil, err
	}
	for i := range h.Signals {
		if h.Signals[i].Annotations {
			continue
		}
		if err := data.CheckRate(h.Rate(i)); err != nil {
			return nil, p.errf(offDuration, "duration of a data record", data.ErrRate, "%v s with %d samples of signal %d per record: %v", dur, h.Signals[i].SamplesPerRecord, i+1, err)
		}
	}
	if err := p.size(h, records); err != nil {
		return nil, err
	}
	return h, nil
}

// signals parses the signal headers in sh (the bytes after the fixed header).
func (p *parser) signals(h *Header, sh []byte, ns int) error {
	h.Signals = make([]Signal, ns)
	var offs [len(sigFields)]int64 // offset of each field block, relative to the file
	o := int64(fixedLen)
	for i, fd := range sigFields {
		offs[i] = o
		o += int64(fd.width * ns)
	}
	get := func(fi, s int) (string, int64) {
		w := sigFields[fi].width
		at := offs[fi] + int64(s*w)
		rel := at - fixedLen
		return string(sh[rel : rel+int64(w)]), at
	}
	bps := 2
	dlo, dhi := math.MinInt16, math.MaxInt16
	if h.BDF {
		bps = 3
		dlo, dhi = -1<<23, 1<<23-1
	}
	var recBytes int64
	for s := range h.Signals {
		sg := &h.Signals[s]
		v, _ := get(fLabel, s)
		sg.Label = trim(v)
		sg.Annotations = sg.Label == "EDF Annotations" || sg.Label == "BDF Annotations"
		name := func(fi int) string {
			return fmt.Sprintf("%s of signal %d %q", sigFields[fi].name, s+1, sg.Label)
		}
		v, _ = get(fTransducer, s)
		sg.Transducer = trim(v)
		v, _ = get(fDimension, s)
		sg.Dimension = trim(v)
		v, _ = get(fPrefilter, s)
		sg.Prefilter = trim(v)
		v, _ = get(fReserved, s)
		sg.Reserved = trim(v)

		var err error
		v, at := get(fPhysMin, s)
		if sg.PhysMin, err = p.float(v, at, name(fPhysMin)); err != nil {
			return err
		}
		v, at = get(fPhysMax, s)
		if sg.PhysMax, err = p.float(v, at, name(fPhysMax)); err != nil {
			return err
		}
		pmaxAt := at
		v, at = get(fDigMin, s)
		dmin, err := p.integer(v, at, name(fDigMin))
		if err != nil {
			return err
		}
		dminAt := at
		v, at = get(fDigMax, s)
		dmax, err := p.integer(v, at, name(fDigMax))
		if err != nil {
			return err
		}
		dmaxAt := at
		v, at = get(fSamples, s)
		spr, err := p.integer(v, at, name(fSamples))
		if err != nil {
			return err
		}
		if spr < 1 {
			return p.errf(at, name(fSamples), format.ErrSyntax, "%d is not positive", spr)
		}
		sg.SamplesPerRecord = int(spr)
		if !sg.Annotations {
			switch {
			case dmin < int64(dlo) || dmin > int64(dhi):
				return p.errf(dminAt, name(fDigMin), format.ErrSyntax, "%d is outside %d..%d", dmin, dlo, dhi)
			case dmax < int64(dlo) || dmax > int64(dhi):
				return p.errf(dmaxAt, name(fDigMax), format.ErrSyntax, "%d is outside %d..%d", dmax, dlo, dhi)
			case dmax == dmin:
				return p.errf(dmaxAt, name(fDigMax), format.ErrSyntax, "%d equals the digital minimum", dmax)
			case dmax < dmin:
				return p.errf(dmaxAt, name(fDigMax), format.ErrSyntax, "%d is less than the digital minimum %d", dmax, dmin)
			case sg.PhysMax == sg.PhysMin:
				return p.errf(pmaxAt, name(fPhysMax), format.ErrSyntax, "%v equals the physical minimum", sg.PhysMax)
			}
		}
		sg.DigMin, sg.DigMax = int(dmin), int(dmax)
		if !sg.Annotations {
			// Every stored value, dlo..dhi, must scale to a finite float32.
			g := sg.Gain()
			lo, hi := sg.Physical(dlo), sg.Physical(dhi)
			if math.IsInf(g, 0) || math.IsNaN(g) || !(math.Abs(lo) <= math.MaxFloat32) || !(math.Abs(hi) <= math.MaxFloat32) {
				return p.errf(pmaxAt, name(fPhysMax), format.ErrUnsupported,
					"physical range %v..%v over digital %d..%d gives gain %v and samples up to %.3g, beyond the float32 range (±3.4e38) samples are held in", sg.PhysMin, sg.PhysMax, dmin, dmax, g, math.Max(math.Abs(lo), math.Abs(hi)))
			}
		}
		sg.offset = recBytes
		recBytes += spr * int64(bps)
	}
	h.RecordBytes = recBytes
	return nil
}

// size checks the record count against the file size.
func (p *parser) size(h *Header, records int64) error {
	avail := p.f.Size - h.HeaderBytes
	rb := h.RecordBytes
	if records == -1 {
		h.RecordsUnknown = true
		if avail < rb {
			return p.errf(h.HeaderBytes+avail, "data record 1", format.ErrTruncated, "file is truncated: the number of data records is −1 (unknown) and the first record has %d of %d bytes", avail, rb)
		}
		if avail%rb != 0 {
			n := avail / rb
			return p.errf(h.HeaderBytes+n*rb, fmt.Sprintf("data record %d", n+1), format.ErrTruncated, "file is truncated: the number of data records is −1 (unknown) and the last record has %d of %d bytes", avail%rb, rb)
		}
		h.Records = avail / rb
		return nil
	}
	h.Records = records
	if have := avail / rb; have < records {
		if have == records-1 {
			return p.errf(h.HeaderBytes+have*rb, fmt.Sprintf("data record %d", records), format.ErrTruncated, "file is truncated: the last record has %d of %d bytes", avail%rb, rb)
		}
		return p.errf(offRecords, "number of data records", format.ErrTruncated, "file is truncated: %d records of %d bytes need %d bytes after the header, the file has %d", records, rb, mulSat(records, rb), avail)
	}
	h.Trailing = avail - records*rb
	return nil
}

// mulSat returns a·b, saturated at MaxInt64 (for messages only).
func mulSat(a, b int64) int64 {
	if a != 0 && b > math.MaxInt64/a {
		return math.MaxInt64
	}
	return a * b
}

func trim(s string) string { return strings.Trim(s, " ") }

// integer parses a space-padded decimal integer field: [+-]digits.
func (p *parser) integer(raw string, off int64, field string) (int64, error) {
	s := trim(raw)
	d := s
	if d != "" && (d[0] == '+' || d[0] == '-') {
		d = d[1:]
	}
	ok := d != ""
	for i := 0; i < len(d); i++ {
		if d[i] < '0' || d[i] > '9' {
			ok = false
		}
	}
	if ok {
		if v, err := strconv.ParseInt(s, 10, 64); err == nil {
			return v, nil
		}
	}
	return 0, p.errf(off, field, format.ErrSyntax, "%q is not an integer", s)
}

// isDecimal reports whether s is [+-]digits[.digits] or [+-].digits, with an
// optional exponent [eE][+-]digits.
func isDecimal(s string) bool {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		e := 0
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			e++
		}
		if e == 0 {
			return false
		}
	}
	return i == len(s)
}

// float parses a space-padded decimal number field.
func (p *parser) float(raw string, off int64, field string) (float64, error) {
	s := trim(raw)
	if isDecimal(s) {
		if v, err := strconv.ParseFloat(s, 64); err == nil && !math.IsInf(v, 0) {
			return v, nil
		}
	}
	return 0, p.errf(off, field, format.ErrSyntax, "%q is not a number", s)
}

// twoDigits parses "dd.dd.dd" into three numbers.
func twoDigits(s string) ([3]int, bool) {
	var v [3]int
	if len(s) != 8 || s[2] != '.' || s[5] != '.' {
		return v, false
	}
	for k := 0; k < 3; k++ {
		a, b := s[3*k], s[3*k+1]
		if a < '0' || a > '9' || b < '0' || b > '9' {
			return v, false
		}
		v[k] = int(a-'0')*10 + int(b-'0')
	}
	return v, true
}

// startTime parses the start date (dd.mm.yy) and time (hh.mm.ss).
func (p *parser) startTime(date, clock string) (time.Time, error) {
	d, ok := twoDigits(date)
	if !ok {
		return time.Time{}, p.errf(offStartDate, "start date", format.ErrSyntax, "%q is not dd.mm.yy", date)
	}
	year := 2000 + d[2]
	if d[2] >= 85 {
		year = 1900 + d[2]
	}
	if d[1] < 1 || d[1] > 12 || d[0] < 1 || d[0] > daysIn(year, d[1]) {
		return time.Time{}, p.errf(offStartDate, "start date", format.ErrSyntax, "%q is not a date", date)
	}
	c, ok := twoDigits(clock)
	if !ok || c[0] > 23 || c[1] > 59 || c[2] > 59 {
		return time.Time{}, p.errf(offStartTime, "start time", format.ErrSyntax, "%q is not hh.mm.ss", clock)
	}
	return time.Date(year, time.Month(d[1]), d[0], c[0], c[1], c[2], 0, time.UTC), nil
}

func daysIn(year, month int) int {
	return time.Date(year, time.Month(month)+1, 0, 0, 0, 0, 0, time.UTC).Day()
}
