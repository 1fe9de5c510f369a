package wav

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strconv"

	"amplink/core/data"
	"amplink/core/format"
)

func init() {
	format.Register(format.Format{
		Name:   "wav",
		Magic:  "RIFF????WAVE",
		Ext:    []string{".wav"},
		Decode: Decode,
		Open:   openData,
	})
}

// Format tags of the fmt chunk.
const (
	TagPCM        = 0x0001
	TagFloat      = 0x0003
	TagExtensible = 0xFFFE
)

// MaxChannels is the largest channel count accepted.
const MaxChannels = 256

// DefaultMaxBytes is the largest decoded size (4 bytes per sample) Reader
// accepts when MaxBytes is 0: 1 GiB, the memory budget of one browser worker.
const DefaultMaxBytes = 1 << 30

// GainNote is added to Recording.Notes of every decoded file.
const GainNote = "audio gain unknown, units arbitrary"

// chunkBytes is about how much data is read per ReadAt call.
const chunkBytes = 1 << 16

// guidTail is bytes 2..15 of KSDATAFORMAT_SUBTYPE_PCM and _IEEE_FLOAT; bytes
// 0..1 hold the format tag (from memory; the same bytes as in the
// extensible files SoX writes, testdata/wav/pcm24-ext.wav).
var guidTail = []byte{0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71}

// Header is what the fmt and data chunks say.
type Header struct {
	Tag        uint16 // TagPCM or TagFloat; for an extensible file, the subformat
	Extensible bool
	Channels   int
	Rate       int // Hz
	BlockAlign int // bytes per sample frame (all channels)
	Bits       int // bits per stored sample (container size)
	ValidBits  int // extensible files only; else equal to Bits
	DataOffset int64
	DataSize   int64 // as declared in the data chunk header
	Frames     int64 // whole sample frames present in the file
	Notes      []string
}

// Reader decodes WAV files. The zero value is ready to use.
type Reader struct {
	// MaxBytes refuses files whose samples would take more than this many
	// bytes as float32, before allocating; 0 means data.MaxSampleBytes when that is set,
	// else DefaultMaxBytes.
	MaxBytes int64
}

// Decode decodes f with a zero Reader. It is the registered decoder; sib is
// not used.
func Decode(f format.File, sib format.Siblings) (*format.Data, error) {
	var r Reader
	rec, err := r.Read(f)
	if err != nil {
		return nil, err
	}
	return &format.Data{Recording: rec}, nil
}

func errAt(f format.File, off int64, field string, err error) error {
	return &format.Error{Format: "wav", File: f.Name, Offset: off, Field: field, Err: err}
}

func errf(f format.File, off int64, field, msg string, args ...any) error {
	return errAt(f, off, field, fmt.Errorf(msg, args...))
}

// readAt fills p from offset off, or returns format.ErrTruncated at the first
// missing byte.
func readAt(f format.File, p []byte, off int64, field string) error {
	n, err := f.R.ReadAt(p, off)
	if n == len(p) {
		return nil
	}
	if err == nil || err == io.EOF {
		err = format.ErrTruncated
	}
	return errAt(f, off+int64(n), field, err)
}

var tagNames = map[uint16]string{
	0x0001: "PCM", 0x0002: "Microsoft ADPCM", 0x0003: "IEEE float", 0x0006: "A-law",
	0x0007: "µ-law", 0x0011: "IMA ADPCM", 0x0031: "GSM 6.10", 0x0050: "MPEG",
	0x0055: "MPEG Layer III", 0xFFFE: "extensible",
}

func tagName(tag uint16) string {
	s := fmt.Sprintf("0x%04X", tag)
	if n, ok := tagNames[tag]; ok {
		s += " (" + n + ")"
	}
	return s
}

// ReadHeader walks the chunks of f and checks the fmt and data chunks
// without reading the samples.
func ReadHeader(f format.File) (*Header, error) {
	var head [12]byte
	if err := readAt(f, head[:], 0, "RIFF header"); err != nil {
		return nil, err
	}
	if string(head[0:4]) != "RIFF" || string(head[8:12]) != "WAVE" {
		return nil, errf(f, 0, "RIFF header", "not a RIFF/WAVE file (starts %q)", head[:])
	}
	h := &Header{DataOffset: -1}
	fmtOff := int64(-1)
	var fmtBuf []byte
	off := int64(12)
	for off+8 <= f.Size {
		var ch [8]byte
		if err := readAt(f, ch[:], off, "chunk header"); err != nil {
			return nil, err
		}
		id := string(ch[:4])
		size := int64(binary.LittleEndian.Uint32(ch[4:]))
		body := off + 8
		switch {
		case id == "fmt " && fmtOff < 0:
			if size < 16 {
				return nil, errf(f, off+4, "fmt chunk size", "fmt chunk has %d bytes, needs at least 16", size)
			}
			fmtOff = body
			fmtBuf = make([]byte, min(size, 40))
			if err := readAt(f, fmtBuf, body, "fmt chunk"); err != nil {
				return nil, err
			}
		case id == "data" && h.DataOffset < 0:
			h.DataOffset, h.DataSize = body, size
		}
		if body+size > f.Size {
			if id == "data" {
				break // checked below
			}
			if fmtOff < 0 || h.DataOffset < 0 {
				return nil, errAt(f, f.Size, string(bytes.TrimSpace(ch[:4]))+" chunk",
					fmt.Errorf("chunk at offset %d declares %d bytes, the file ends first: %w", off, size, format.ErrTruncated))
			}
			h.Notes = append(h.Notes, fmt.Sprintf("chunk %q at offset %d runs past the end of the file; ignored", id, off))
			break
		}
		if fmtOff >= 0 && h.DataOffset >= 0 {
			break
		}
		off = body + size + size&1
	}
	if fmtOff < 0 {
		return nil, errf(f, min(off, f.Size), "fmt chunk", "no fmt chunk before the end of the file")
	}
	if h.DataOffset < 0 {
		return nil, errf(f, min(off, f.Size), "data chunk", "no data chunk before the end of the file")
	}
	if err := h.parseFmt(f, fmtBuf, fmtOff); err != nil {
		return nil, err
	}
	avail := f.Size - h.DataOffset
	if h.DataSize > avail {
		h.Notes = append(h.Notes, fmt.Sprintf(
			"data chunk declares %d bytes, the file holds %d after offset %d; read what is there (writers that stream cannot fix the size)",
			h.DataSize, avail, h.DataOffset))
	} else {
		avail = h.DataSize
	}
	h.Frames = avail / int64(h.BlockAlign)
	if rest := avail % int64(h.BlockAlign); rest != 0 && h.Frames > 0 {
		h.Notes = append(h.Notes, fmt.Sprintf("dropped %d trailing data bytes that make no whole sample frame", rest))
	}
	if h.Frames == 0 {
		if h.DataSize > avail {
			return nil, errAt(f, f.Size, "data chunk",
				fmt.Errorf("%d data bytes present, one sample frame needs %d: %w", avail, h.BlockAlign, format.ErrTruncated))
		}
		return nil, errf(f, h.DataOffset-4, "data chunk size", "data chunk holds no whole sample frame (%d bytes, %d per frame)", avail, h.BlockAlign)
	}
	return h, nil
}

func (h *Header) parseFmt(f format.File, b []byte, off int64) error {
	le := binary.LittleEndian
	tag := le.Uint16(b[0:])
	h.Channels = int(le.Uint16(b[2:]))
	rate := le.Uint32(b[4:])
	byteRate := le.Uint32(b[8:])
	h.BlockAlign = int(le.Uint16(b[12:]))
	h.Bits = int(le.Uint16(b[14:]))
	h.ValidBits = h.Bits
	if tag == TagExtensible {
		if len(b) < 40 {
			return errf(f, off, "fmt chunk", "extensible fmt chunk has %d bytes, needs 40", len(b))
		}
		h.Extensible = true
		h.ValidBits = int(le.Uint16(b[18:]))
		guid := b[24:40]
		if !bytes.Equal(guid[2:], guidTail) {
			return errAt(f, off+24, "subformat", fmt.Errorf("extensible subformat GUID % X is not PCM or IEEE float: %w", guid, format.ErrUnsupported))
		}
		tag = le.Uint16(guid)
		if tag != TagPCM && tag != TagFloat {
			return errAt(f, off+24, "subformat", fmt.Errorf("extensible subformat %s is not supported (PCM or IEEE float): %w", tagName(tag), format.ErrUnsupported))
		}
	}
	h.Tag = tag
	switch {
	case tag != TagPCM && tag != TagFloat:
		return errAt(f, off, "format tag", fmt.Errorf("format tag %s is not supported (PCM or IEEE float, plain or extensible): %w", tagName(tag), format.ErrUnsupported))
	case h.Channels == 0:
		return errf(f, off+2, "channels", "no channels")
	case h.Channels > MaxChannels:
		return errAt(f, off+2, "channels", fmt.Errorf("%d channels, more than %d: %w", h.Channels, MaxChannels, format.ErrUnsupported))
	case rate == 0:
		return errf(f, off+4, "sample rate", "sample rate is 0 Hz")
	case float64(rate) > data.MaxRate:
		return errf(f, off+4, "sample rate", "%v", data.CheckRate(float64(rate)))
	case tag == TagPCM && h.Bits != 8 && h.Bits != 16 && h.Bits != 24 && h.Bits != 32,
		tag == TagFloat && h.Bits != 32 && h.Bits != 64:
		return errAt(f, off+14, "bits per sample", fmt.Errorf("%d-bit %s samples are not supported (PCM 8, 16, 24, 32; float 32, 64): %w",
			h.Bits, tagNames[tag], format.ErrUnsupported))
	case h.BlockAlign != h.Channels*h.Bits/8:
		return errf(f, off+12, "block align", "block align %d does not match %d channels × %d bits = %d bytes",
			h.BlockAlign, h.Channels, h.Bits, h.Channels*h.Bits/8)
	}
	h.Rate = int(rate)
	if want := uint64(rate) * uint64(h.BlockAlign); uint64(byteRate) != want {
		h.Notes = append(h.Notes, fmt.Sprintf("byte rate %d should be %d (rate × block align); ignored", byteRate, want))
	}
	return nil
}

// Read decodes f into a Recording of Header.Channels channels at
// Header.Rate Hz.
func (r *Reader) Read(f format.File) (*data.Recording, error) {
	h, err := ReadHeader(f)
	if err != nil {
		return nil, err
	}
	limit := r.MaxBytes
	if limit <= 0 {
		limit = data.MaxSampleBytes // the caller's sample budget (amplink run --max-memory, a page worker)
	}
	if limit <= 0 {
		limit = DefaultMaxBytes
	}
	nc := h.Channels
	if need := h.Frames * int64(nc) * 4; need > limit {
		return nil, errAt(f, h.DataOffset, "data chunk", fmt.Errorf("%d frames × %d channels need %d bytes, more than the limit of %d: %w",
			h.Frames, nc, need, limit, format.ErrUnsupported))
	}
	rec := &data.Recording{Name: f.Name, Rate: float64(h.Rate), Channels: make([]data.Channel, nc), Samples: make([][]float32, nc)}
	for c := range nc {
		rec.Channels[c] = data.Channel{Name: "ch" + strconv.Itoa(c+1), Type: "AUDIO", Unit: "a.u."}
		rec.Samples[c] = make([]float32, h.Frames)
	}
	rec.Notes = append([]string{GainNote}, h.Notes...)
	per := max(chunkBytes/h.BlockAlign, 1)
	buf := make([]byte, min(int64(per), h.Frames)*int64(h.BlockAlign))
	for k := int64(0); k < h.Frames; {
		n := min(int64(per), h.Frames-k)
		p := buf[:n*int64(h.BlockAlign)]
		off := h.DataOffset + k*int64(h.BlockAlign)
		if err := readAt(f, p, off, "data chunk"); err != nil {
			return nil, err
		}
		if bad := convert(rec.Samples, int(k), p, h); bad >= 0 {
			return nil, badSample(f, p, h, off, k, bad)
		}
		k += n
	}
	return rec, nil
}

// badSample is the error for the bad float sample of index bad in the
// frames p read at off, the first of which is frame k.
func badSample(f format.File, p []byte, h *Header, off, k int64, bad int) error {
	nc := h.Channels
	frame, c := int64(bad/nc), bad%nc
	at := bad * h.Bits / 8
	var what string
	if h.Bits == 32 {
		what = fmt.Sprint(math.Float32frombits(binary.LittleEndian.Uint32(p[at:])))
	} else if v := math.Float64frombits(binary.LittleEndian.Uint64(p[at:])); math.IsNaN(v) || math.IsInf(v, 0) {
		what = fmt.Sprint(v)
	} else {
		what = fmt.Sprintf("%g, beyond the float32 range", v)
	}
	return errf(f, off+int64(at), "data chunk", "sample %d of channel ch%d is %s", k+frame+1, c+1, what)
}

// convert de-interleaves the frames in p into dst[c][k:]. For float data it
// returns the index of the first NaN or infinite sample in p, else −1.
func convert(dst [][]float32, k int, p []byte, h *Header) int {
	bps := h.Bits / 8
	frames := len(p) / h.BlockAlign
	le := binary.LittleEndian
	for c, d := range dst {
		d = d[k : k+frames]
		q := p[c*bps:]
		step := h.BlockAlign
		switch {
		case h.Tag == TagPCM && h.Bits == 8:
			for j := range d {
				d[j] = float32(int(q[j*step])-128) / (1 << 7)
			}
		case h.Tag == TagPCM && h.Bits == 16:
			for j := range d {
				d[j] = float32(int16(le.Uint16(q[j*step:]))) / (1 << 15)
			}
		case h.Tag == TagPCM && h.Bits == 24:
			for j := range d {
				b := q[j*step:]
				v := int32(uint32(b[0])<<8|uint32(b[1])<<16|uint32(b[2])<<24) >> 8
				d[j] = float32(v) / (1 << 23)
			}
		case h.Tag == TagPCM && h.Bits == 32:
			for j := range d {
				d[j] = float32(float64(int32(le.Uint32(q[j*step:]))) / (1 << 31))
			}
		case h.Tag == TagFloat && h.Bits == 32:
			for j := range d {
				u := le.Uint32(q[j*step:])
				if u&0x7f800000 == 0x7f800000 {
					return firstBad(p, h)
				}
				d[j] = math.Float32frombits(u)
			}
		case h.Tag == TagFloat && h.Bits == 64:
			for j := range d {
				v := math.Float64frombits(le.Uint64(q[j*step:]))
				f := float32(v)
				if math.IsNaN(v) || math.IsInf(float64(f), 0) {
					return firstBad(p, h)
				}
				d[j] = f
			}
		default:
			panic("wav: convert called with an unchecked format")
		}
	}
	return -1
}

// firstBad returns the index of the first NaN, infinite or (for float64)
// float32-overflowing sample in the float frames of p.
func firstBad(p []byte, h *Header) int {
	le := binary.LittleEndian
	for i := 0; i < len(p)/(h.Bits/8); i++ {
		if h.Bits == 32 {
			if le.Uint32(p[4*i:])&0x7f800000 == 0x7f800000 {
				return i
			}
			continue
		}
		v := math.Float64frombits(le.Uint64(p[8*i:]))
		if math.IsNaN(v) || math.IsInf(float64(float32(v)), 0) {
			return i
		}
	}
	panic("wav: firstBad found no bad sample")
}
