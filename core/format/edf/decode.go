package edf

import (
	"encoding/binary"
	"fmt"
	"sort"
	"strings"

	"amplink/core/data"
	"amplink/core/format"
)

func init() {
	format.Register(format.Format{Name: "edf", Magic: magicEDF, Ext: []string{".edf"}, Decode: decodeData, Open: openData})
	format.Register(format.Format{Name: "bdf", Magic: magicBDF, Ext: []string{".bdf"}, Decode: decodeData, Open: openData})
}

func decodeData(f format.File, _ format.Siblings) (*format.Data, error) {
	r, _, err := Decode(f)
	if err != nil {
		return nil, err
	}
	return &format.Data{Recording: r}, nil
}

// chunkBytes is the target size of the reused read buffer.
const chunkBytes = 256 << 10

// Decode reads an EDF, EDF+, BDF or BDF+ file.
//
// Channels: the recording keeps the signals that share the analysis rate,
// the sampling rate held by the most non-annotation signals (ties go to the
// highest rate); the others are set aside and named in Recording.Notes.
// For each kept signal, Channel.Label is the stored label, trimmed;
// Channel.Name is data.ShortName(label) ("EEG Fz-Ref" → "Fz") when that is
// unique and non-empty among the kept signals, else the trimmed label (a
// label that is still not unique gets ".2", ".3", … in file order, and an
// empty one is called "signal N" after its 1-based position in the file);
// Channel.Unit is the physical dimension; Channel.Type is the first word of a
// label of two or more words when that word is a signal type of EDF+ (EEG,
// ECG, EOG, ERG, EMG, MEG, MCG, EP, Temp, Resp, SaO2, Light, Sound, Event),
// upper-cased, else empty.
//
// Samples are physical values, pmin + (d − dmin)·(pmax − pmin)/(dmax − dmin),
// in the signal's physical dimension, stored as float32.
//
// Annotations (EDF+ and BDF+) become events whose Type is the annotation
// text, with Onset and Duration in seconds; onsets are relative to the first
// sample (the TAL onset minus the first record's time stamp, which is kept in
// Header.StartOffset), so Recording.Start is 0. Events are sorted by onset,
// stably. An EDF+D file is accepted when its records are contiguous (each time
// stamp equals the previous one plus the record duration, within a tenth of
// a sample); a gap is an error wrapping format.ErrUnsupported, and records that
// overlap or go back in time are an error wrapping format.ErrSyntax.
//
// Bytes after the last whole data record are ignored, with a note.
func Decode(f format.File) (*data.Recording, *Header, error) {
	d, err := prepare(f)
	if err != nil {
		return nil, nil, err
	}
	// Allocate the samples: bounded by the file size (≥ 2 bytes per sample)
	// and by data.MaxSampleBytes where that is set.
	h, rec := d.h, d.rec
	total := h.Records * int64(d.spr)
	if err := data.CheckSamples(int64(len(d.kept)) * total); err != nil {
		return nil, nil, d.p.errf(h.HeaderBytes, "data records", data.ErrTooLarge, "%d signals × %d samples: %v", len(d.kept), total, err)
	}
	rec.Samples = make([][]float32, len(d.kept))
	for i := range d.kept {
		rec.Samples[i] = make([]float32, total)
	}
	if err := d.scan(true); err != nil {
		return nil, nil, err
	}
	return rec, h, nil
}

// decoding is a file on its way to a Recording: the header, the signals
// kept and the annotation signals.
type decoding struct {
	p         *parser
	h         *Header
	rec       *data.Recording
	spr       int   // samples per record of the kept signals
	maxSPR    int   // the most samples per record of any signal
	kept, ann []int // signal indices
}

// prepare reads the header and chooses the signals (Decode's rules); the
// recording it starts has no samples yet.
func prepare(f format.File) (*decoding, error) {
	p := &parser{f: f, name: "edf"}
	h, err := p.header()
	if err != nil {
		return nil, err
	}
	// Pick the analysis rate.
	count := map[int]int{}
	maxSPR := 0
	for _, s := range h.Signals {
		if !s.Annotations {
			count[s.SamplesPerRecord]++
		}
		maxSPR = max(maxSPR, s.SamplesPerRecord)
	}
	if len(count) == 0 {
		return nil, p.errf(offSignals, "number of signals", format.ErrUnsupported, "the file holds annotations only, no signals")
	}
	spr, best := 0, 0
	for k, n := range count {
		if n > best || n == best && k > spr {
			spr, best = k, n
		}
	}
	var kept, ann []int
	var aside []string
	for i, s := range h.Signals {
		switch {
		case s.Annotations:
			ann = append(ann, i)
		case s.SamplesPerRecord == spr:
			kept = append(kept, i)
		default:
			aside = append(aside, fmt.Sprintf("%s (%g Hz)", orName(s.Label, i), h.Rate(i)))
		}
	}
	rec := &data.Recording{
		Name:     f.Name,
		Format:   p.name,
		Rate:     rate(spr, h.RecordDuration),
		Channels: channels(h, kept),
	}
	if len(aside) > 0 {
		rec.Notes = append(rec.Notes, fmt.Sprintf("%d signal(s) with another sampling rate set aside: %s; kept %d at %g Hz",
			len(aside), strings.Join(aside, ", "), len(kept), rec.Rate))
	}
	for i, ch := range rec.Channels {
		if ch.Name != data.ShortName(h.Signals[kept[i]].Label) && ch.Name != h.Signals[kept[i]].Label {
			rec.Notes = append(rec.Notes, fmt.Sprintf("signal %d %q is called %q", kept[i]+1, h.Signals[kept[i]].Label, ch.Name))
		}
	}
	return &decoding{p: p, h: h, rec: rec, spr: spr, maxSPR: maxSPR, kept: kept, ann: ann}, nil
}

// scan goes through the data records once: it reads the annotations and
// checks the time stamps, and with samples set it scales every kept
// signal into rec.Samples. Without samples, a file with no annotation
// signal is not read at all.
func (d *decoding) scan(samples bool) error {
	p, h, rec, spr, kept, ann := d.p, d.h, d.rec, d.spr, d.kept, d.ann
	st := &stamps{p: p, h: h, maxRate: rate(d.maxSPR, h.RecordDuration)}
	per := max(1, min(h.Records, chunkBytes/h.RecordBytes))
	read := samples || len(ann) > 0
	var buf []byte
	if read {
		buf = make([]byte, per*h.RecordBytes)
	}
	var t tal
	for r0 := int64(0); r0 < h.Records; r0 += per {
		n := min(per, h.Records-r0)
		off := h.HeaderBytes + r0*h.RecordBytes
		var b []byte
		if read {
			b = buf[:n*h.RecordBytes]
			if err := p.readAt(b, off, fmt.Sprintf("data record %d", r0+1)); err != nil {
				return err
			}
		}
		for k := int64(0); k < n; k++ {
			r := r0 + k
			var rb []byte
			if read {
				rb = b[k*h.RecordBytes : (k+1)*h.RecordBytes]
			}
			for c, si := range kept {
				if !samples {
					break
				}
				s := &h.Signals[si]
				dst := rec.Samples[c][r*int64(spr) : (r+1)*int64(spr)]
				src := rb[s.offset:]
				if h.BDF {
					scale24(dst, src, s)
				} else {
					scale16(dst, src, s)
				}
			}
			for a, si := range ann {
				s := &h.Signals[si]
				bps := int64(2)
				if h.BDF {
					bps = 3
				}
				sc := talScanner{p: p, b: rb[s.offset : s.offset+int64(s.SamplesPerRecord)*bps], base: off + k*h.RecordBytes + s.offset}
				for first := true; ; first = false {
					ok, err := sc.next(&t)
					if err != nil {
						return err
					}
					if !ok {
						break
					}
					texts := t.texts
					if a == 0 && first && h.Plus {
						if len(texts) == 0 || texts[0] != "" || t.hasDur {
							return p.errf(t.off, "annotation", format.ErrSyntax, "the first TAL of data record %d is not a time stamp \"+t\\x14\\x14\"", r+1)
						}
						if err := st.add(r, t.onset, t.off); err != nil {
							return err
						}
						texts = texts[1:]
					}
					for _, x := range texts {
						if x == "" {
							continue
						}
						rec.Events = append(rec.Events, data.Event{Onset: t.onset, Duration: t.dur, Type: x})
					}
				}
			}
			if h.Plus && (len(ann) == 0 || st.n == r) {
				if h.Discontinuous {
					return p.errf(off+k*h.RecordBytes, fmt.Sprintf("data record %d", r+1), format.ErrSyntax, "EDF+D data record has no time stamp")
				}
				st.n++ // EDF+C without stamps: contiguous by definition
			}
		}
	}
	h.StartOffset = st.first
	for i := range rec.Events {
		rec.Events[i].Onset -= st.first
	}
	sort.SliceStable(rec.Events, func(i, j int) bool { return rec.Events[i].Onset < rec.Events[j].Onset })
	if h.Trailing > 0 {
		rec.Notes = append(rec.Notes, fmt.Sprintf("%d byte(s) after the last data record (offset %d) ignored", h.Trailing, h.HeaderBytes+h.Records*h.RecordBytes))
	}
	return nil
}

// stamps checks record time stamps.
type stamps struct {
	p       *parser
	h       *Header
	maxRate float64
	n       int64   // stamps seen
	first   float64 // time stamp of record 1
	prev    float64
}

func (st *stamps) add(r int64, t float64, off int64) error {
	defer func() { st.n++; st.prev = t }()
	if st.n == 0 {
		st.first = t
		return nil
	}
	if !st.h.Discontinuous {
		return nil
	}
	want := st.prev + st.h.RecordDuration
	tol := 0.1 / st.maxRate
	switch {
	case t > want+tol:
		return st.errf(off, format.ErrUnsupported, "data record %d starts at %g s, %g s after record %d ends: EDF+D with gaps is not supported; export as EDF+C", r+1, t, t-want, r)
	case t < want-tol:
		return st.errf(off, format.ErrSyntax, "data record %d starts at %g s, before record %d ends at %g s (records overlap)", r+1, t, r, want)
	}
	return nil
}

func (st *stamps) errf(off int64, sentinel error, msg string, args ...any) error {
	return st.p.errf(off, "annotation", sentinel, msg, args...)
}

func orName(label string, i int) string {
	if label == "" {
		return fmt.Sprintf("signal %d", i+1)
	}
	return label
}

// edfTypes are the signal types of EDF+ label prefixes.
var edfTypes = map[string]string{
	"EEG": "EEG", "ECG": "ECG", "EOG": "EOG", "ERG": "ERG", "EMG": "EMG",
	"MEG": "MEG", "MCG": "MCG", "EP": "EP", "TEMP": "TEMP", "RESP": "RESP",
	"SAO2": "SAO2", "LIGHT": "LIGHT", "SOUND": "SOUND", "EVENT": "EVENT",
}

// channels names the kept signals (rule in Decode's doc comment).
func channels(h *Header, kept []int) []data.Channel {
	short := map[string]int{}
	for _, si := range kept {
		short[data.ShortName(h.Signals[si].Label)]++
	}
	chs := make([]data.Channel, len(kept))
	used := map[string]int{}
	for i, si := range kept {
		s := h.Signals[si]
		name := data.ShortName(s.Label)
		if name == "" || short[name] > 1 {
			name = orName(s.Label, si)
		}
		chs[i] = data.Channel{Label: s.Label, Unit: s.Dimension}
		if w := strings.Fields(s.Label); len(w) >= 2 {
			chs[i].Type = edfTypes[strings.ToUpper(w[0])]
		}
		used[name]++
		chs[i].Name = name
	}
	// Identical labels: number the second and later ones.
	seen := map[string]int{}
	for i := range chs {
		n := chs[i].Name
		if used[n] < 2 {
			continue
		}
		seen[n]++
		if seen[n] > 1 {
			for k := seen[n]; ; k++ {
				cand := fmt.Sprintf("%s.%d", n, k)
				if used[cand] == 0 {
					chs[i].Name = cand
					used[cand] = 1
					break
				}
			}
		}
	}
	return chs
}

// scale16 converts len(dst) 16-bit little-endian samples of s to physical values.
func scale16(dst []float32, src []byte, s *Signal) {
	g, pmin, dmin := s.Gain(), s.PhysMin, s.DigMin
	src = src[:2*len(dst)]
	for k := range dst {
		d := int(int16(binary.LittleEndian.Uint16(src[2*k:])))
		dst[k] = float32(pmin + float64(d-dmin)*g)
	}
}

// scale24 converts len(dst) 24-bit little-endian samples of s to physical values.
func scale24(dst []float32, src []byte, s *Signal) {
	g, pmin, dmin := s.Gain(), s.PhysMin, s.DigMin
	src = src[:3*len(dst)]
	for k := range dst {
		dst[k] = float32(pmin + float64(int24(src[3*k:])-dmin)*g)
	}
}

// int24 decodes a 24-bit little-endian two's-complement value.
func int24(b []byte) int {
	return int(int32(uint32(b[0])|uint32(b[1])<<8|uint32(b[2])<<16) << 8 >> 8)
}
