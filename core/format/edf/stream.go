package edf

import (
	"fmt"

	"amplink/core/data"
	"amplink/core/format"
)

// Open reads f as Decode does, except the samples: the recording it
// returns is streamed (data.Recording.Source), and its samples are read
// from f record by record when an analysis asks for them. The header, the
// channels, the annotations and every check of Decode are done here, in one
// pass over the annotation signals, so Open fails where Decode fails, with
// the same message, and a streamed read can only fail on f itself. f must
// stay readable while the recording is used.
func Open(f format.File) (*data.Recording, *Header, error) {
	d, err := prepare(f)
	if err != nil {
		return nil, nil, err
	}
	if err := d.scan(false); err != nil {
		return nil, nil, err
	}
	d.rec.N = int(d.h.Records * int64(d.spr))
	d.rec.Source = &source{p: d.p, h: d.h, spr: d.spr, kept: d.kept}
	return d.rec, d.h, nil
}

func openData(f format.File, _ format.Siblings) (*format.Data, error) {
	r, _, err := Open(f)
	if err != nil {
		return nil, err
	}
	return &format.Data{Recording: r}, nil
}

// source reads the kept signals' samples from the data records.
type source struct {
	p    *parser
	h    *Header
	spr  int
	kept []int
}

// streamBytes is the most record bytes one Read holds at a time.
const streamBytes = 1 << 20

// Read implements data.Source: it reads the records that hold samples
// [lo, lo+len(dst[0])) and scales them as Decode does.
func (s *source) Read(dst [][]float32, chans []int, lo int) error {
	if len(dst) == 0 || len(dst[0]) == 0 {
		return nil
	}
	h, spr := s.h, int64(s.spr)
	first, end := int64(lo), int64(lo+len(dst[0])) // samples
	r0, r1 := first/spr, (end+spr-1)/spr           // records [r0, r1)
	per := max(1, min(r1-r0, streamBytes/h.RecordBytes))
	buf := make([]byte, per*h.RecordBytes)
	tmp := make([]float32, spr)
	for ra := r0; ra < r1; ra += per {
		n := min(per, r1-ra)
		off := h.HeaderBytes + ra*h.RecordBytes
		b := buf[:n*h.RecordBytes]
		if err := s.p.readAt(b, off, fmt.Sprintf("data record %d", ra+1)); err != nil {
			return err
		}
		for k := range n {
			r := ra + k
			rb := b[k*h.RecordBytes : (k+1)*h.RecordBytes]
			// the record's samples [a, e) of the recording that are asked for
			a, e := max(first, r*spr), min(end, (r+1)*spr)
			for i, c := range chans {
				sig := &h.Signals[s.kept[c]]
				out := dst[i][a-first : e-first]
				if a == r*spr && e == (r+1)*spr {
					s.scale(out, rb[sig.offset:], sig)
					continue
				}
				// a partial record: scale it whole, keep the part asked for
				s.scale(tmp, rb[sig.offset:], sig)
				copy(out, tmp[a-r*spr:e-r*spr])
			}
		}
	}
	return nil
}

func (s *source) scale(dst []float32, src []byte, sig *Signal) {
	if s.h.BDF {
		scale24(dst, src, sig)
	} else {
		scale16(dst, src, sig)
	}
}
