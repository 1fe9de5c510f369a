package wav

import (
	"strconv"

	"amplink/core/data"
	"amplink/core/format"
)

// Open reads f's header as Read does and leaves the samples in the file:
// the recording it returns is streamed (data.Recording.Source) and reads
// its frames on demand. Float data are checked once here, so Open fails
// where Read fails on a NaN or infinite sample, with the same message. The
// size limit of Read does not apply (nothing is held); f must stay
// readable while the recording is used.
func Open(f format.File) (*data.Recording, error) {
	h, err := ReadHeader(f)
	if err != nil {
		return nil, err
	}
	nc := h.Channels
	rec := &data.Recording{Name: f.Name, Rate: float64(h.Rate), Channels: make([]data.Channel, nc), N: int(h.Frames)}
	for c := range nc {
		rec.Channels[c] = data.Channel{Name: "ch" + strconv.Itoa(c+1), Type: "AUDIO", Unit: "a.u."}
	}
	rec.Notes = append([]string{GainNote}, h.Notes...)
	s := &source{f: f, h: h}
	if h.Tag == TagFloat && h.Frames > 0 {
		// the check of Read, a chunk at a time
		per := max(chunkBytes/h.BlockAlign, 1)
		for k := int64(0); k < h.Frames; k += int64(per) {
			n := min(int64(per), h.Frames-k)
			if err := s.frames(nil, nil, k, n); err != nil {
				return nil, err
			}
		}
	}
	rec.Source = s
	return rec, nil
}

func openData(f format.File, _ format.Siblings) (*format.Data, error) {
	rec, err := Open(f)
	if err != nil {
		return nil, err
	}
	return &format.Data{Recording: rec}, nil
}

// source reads frames from the data chunk.
type source struct {
	f format.File
	h *Header
}

// Read implements data.Source.
func (s *source) Read(dst [][]float32, chans []int, lo int) error {
	if len(dst) == 0 || len(dst[0]) == 0 {
		return nil
	}
	per := int64(max(chunkBytes/s.h.BlockAlign, 1))
	n := int64(len(dst[0]))
	for k := int64(0); k < n; k += per {
		m := min(per, n-k)
		out := make([][]float32, len(dst))
		for i := range dst {
			out[i] = dst[i][k : k+m]
		}
		if err := s.frames(out, chans, int64(lo)+k, m); err != nil {
			return err
		}
	}
	return nil
}

// frames converts frames [k, k+n) as Read does, into out[i] for channel
// chans[i] (out nil: only the float check).
func (s *source) frames(out [][]float32, chans []int, k, n int64) error {
	h, f := s.h, s.f
	p := make([]byte, n*int64(h.BlockAlign))
	off := h.DataOffset + k*int64(h.BlockAlign)
	if err := readAt(f, p, off, "data chunk"); err != nil {
		return err
	}
	all := make([][]float32, h.Channels)
	for c := range all {
		all[c] = make([]float32, n)
	}
	if bad := convert(all, 0, p, h); bad >= 0 {
		return badSample(f, p, h, off, k, bad)
	}
	for i, c := range chans {
		copy(out[i], all[c])
	}
	return nil
}
