package wav

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"

	"amplink/core/data"
)

// Encoding selects the sample format Write stores.
type Encoding int

const (
	// Float32 stores IEEE float32 (format tag 3) and keeps values unchanged.
	Float32 Encoding = iota
	// PCM16 stores 16-bit integers: round(v·32768), with v = 1 stored as
	// 32767. Values outside [−1, 1] are an error, not clipped.
	PCM16
)

// Options control Write. The zero value writes float32.
type Options struct {
	Encoding Encoding
}

// Write writes r as a WAV file. The layout is the one SoX writes: a 16-byte
// fmt chunk for PCM16 with one or two channels; an 18-byte fmt chunk and a
// fact chunk for float32; WAVE_FORMAT_EXTENSIBLE (channel mask 0) with a
// fact chunk for more than two channels. The rate must be a whole number of
// Hz. Nothing is written when a check fails.
func Write(w io.Writer, r *data.Recording, opt Options) error {
	nc := len(r.Samples)
	if nc == 0 || nc > MaxChannels {
		return fmt.Errorf("wav: %s: %d channels; WAV holds 1 to %d", r.Name, nc, MaxChannels)
	}
	if r.Channels != nil && len(r.Channels) != nc {
		return fmt.Errorf("wav: %s: %d channel descriptions for %d channels of samples", r.Name, len(r.Channels), nc)
	}
	if r.Rate != math.Trunc(r.Rate) || r.Rate < 1 || r.Rate > math.MaxUint32 {
		return fmt.Errorf("wav: %s: sample rate %v Hz is not a whole number from 1 to %d", r.Name, r.Rate, uint32(math.MaxUint32))
	}
	n := len(r.Samples[0])
	if n == 0 {
		return fmt.Errorf("wav: %s: no samples", r.Name)
	}
	bits := 32
	tag := uint16(TagFloat)
	switch opt.Encoding {
	case Float32:
	case PCM16:
		bits, tag = 16, TagPCM
	default:
		panic(fmt.Sprintf("wav: unknown encoding %d", opt.Encoding))
	}
	for c, s := range r.Samples {
		if len(s) != n {
			return fmt.Errorf("wav: %s: channel %d has %d samples, channel 1 has %d", r.Name, c+1, len(s), n)
		}
		for k, v := range s {
			if math.IsNaN(float64(v)) || math.IsInf(float64(v), 0) {
				return fmt.Errorf("wav: %s: sample %d of channel %d is %v", r.Name, k+1, c+1, v)
			}
			if opt.Encoding == PCM16 && (v < -1 || v > 1) {
				return fmt.Errorf("wav: %s: sample %d of channel %d is %v; PCM16 holds [-1, 1]: scale the data or write Float32", r.Name, k+1, c+1, v)
			}
		}
	}
	block := nc * bits / 8
	dataSize := int64(n) * int64(block)
	fmtSize := 16
	ext := nc > 2
	fact := ext || tag == TagFloat
	switch {
	case ext:
		fmtSize = 40
	case tag == TagFloat:
		fmtSize = 18
	}
	head := make([]byte, 0, 80)
	le := binary.LittleEndian
	riff := 4 + 8 + int64(fmtSize) + 8 + dataSize // block is even, so no pad byte
	if fact {
		riff += 12
	}
	if riff > math.MaxUint32 {
		return fmt.Errorf("wav: %s: %d data bytes do not fit in a WAV file (4 GiB)", r.Name, dataSize)
	}
	head = append(head, "RIFF"...)
	head = le.AppendUint32(head, uint32(riff))
	head = append(head, "WAVEfmt "...)
	head = le.AppendUint32(head, uint32(fmtSize))
	if ext {
		head = le.AppendUint16(head, TagExtensible)
	} else {
		head = le.AppendUint16(head, tag)
	}
	head = le.AppendUint16(head, uint16(nc))
	head = le.AppendUint32(head, uint32(r.Rate))
	head = le.AppendUint32(head, uint32(r.Rate)*uint32(block))
	head = le.AppendUint16(head, uint16(block))
	head = le.AppendUint16(head, uint16(bits))
	switch {
	case ext:
		head = le.AppendUint16(head, 22)
		head = le.AppendUint16(head, uint16(bits))
		head = le.AppendUint32(head, 0)
		head = le.AppendUint16(head, tag)
		head = append(head, guidTail...)
	case fmtSize == 18:
		head = le.AppendUint16(head, 0)
	}
	if fact {
		head = append(head, "fact"...)
		head = le.AppendUint32(head, 4)
		head = le.AppendUint32(head, uint32(n))
	}
	head = append(head, "data"...)
	head = le.AppendUint32(head, uint32(dataSize))
	if _, err := w.Write(head); err != nil {
		return fmt.Errorf("wav: %s: %w", r.Name, err)
	}
	buf := make([]byte, 0, chunkBytes)
	for k := range n {
		for c := range nc {
			v := r.Samples[c][k]
			if opt.Encoding == PCM16 {
				buf = le.AppendUint16(buf, uint16(int16(min(math.Round(float64(v)*32768), 32767))))
			} else {
				buf = le.AppendUint32(buf, math.Float32bits(v))
			}
		}
		if len(buf)+block > cap(buf) || k == n-1 {
			if _, err := w.Write(buf); err != nil {
				return fmt.Errorf("wav: %s: %w", r.Name, err)
			}
			buf = buf[:0]
		}
	}
	return nil
}
