package mp3

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"

	gomp3 "github.com/hajimehoshi/go-mp3"

	"amplink/core/data"
	"amplink/core/format"
)

func init() {
	format.Register(format.Format{
		Name:   "mp3",
		Ext:    []string{".mp3"},
		Match:  Match,
		Decode: Decode,
	})
}

// DefaultMaxBytes is the largest decoded size (4 bytes per sample) Reader
// accepts when MaxBytes is 0: 1 GiB, the memory budget of one browser worker.
const DefaultMaxBytes = 1 << 30

// GainNote is added to Recording.Notes of every decoded file.
const GainNote = "audio gain unknown, units arbitrary"

// DecoderDelay is the delay of the decoder's synthesis filter bank, in
// samples (common practice: the figure LAME's gapless tag assumes).
const DecoderDelay = 529

// searchBytes is how far past the ID3 tag the first frame header is sought.
const searchBytes = 1 << 16

// Header is what the first frame says.
type Header struct {
	Offset     int64 // byte offset of the first frame header
	Version    int   // 1 for MPEG-1, 2 for MPEG-2
	Rate       int   // Hz
	Mode       int   // channel mode: 0 stereo, 1 joint stereo, 2 dual channel, 3 single channel
	Channels   int   // 1 when Mode is 3, else 2
	FrameBytes int   // length of the first frame in bytes

	// From an Info/Xing frame, if the first frame is one.
	InfoFrame bool
	TagFrames int  // audio frames after the Info frame, if it says; else 0
	LAMETag   bool // the Info frame holds encoder delay and padding
	Delay     int  // encoder delay in samples
	Padding   int  // samples of padding at the end
}

// Reader decodes MP3 files. The zero value is ready to use.
type Reader struct {
	// MaxBytes refuses files whose samples would take more than this many
	// bytes as float32, before allocating; 0 means data.MaxSampleBytes when that is set,
	// else DefaultMaxBytes.
	MaxBytes int64
}

var bitrates = [2][16]int{ // kbit/s, Layer III
	{0, 32, 40, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320, 0}, // MPEG-1
	{0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160, 0},     // MPEG-2
}

var rates = [2][3]int{{44100, 48000, 32000}, {22050, 24000, 16000}}

// parseFrame decodes a 4-byte frame header. ok is false unless b holds a
// frame sync and a valid MPEG-1 or MPEG-2 Layer III header; v25 reports an
// otherwise valid MPEG-2.5 header.
func parseFrame(b []byte) (h Header, ok, v25 bool) {
	if len(b) < 4 || b[0] != 0xFF || b[1]&0xE0 != 0xE0 {
		return h, false, false
	}
	ver := (b[1] >> 3) & 3
	layer := (b[1] >> 1) & 3
	br := int(b[2] >> 4)
	sr := int(b[2]>>2) & 3
	if ver == 1 || layer != 1 || br == 0 || br == 15 || sr == 3 || b[3]&3 == 2 {
		return h, false, false
	}
	if ver == 0 {
		return h, false, true
	}
	lsf := 0
	h.Version = 1
	if ver == 2 {
		lsf, h.Version = 1, 2
	}
	h.Rate = rates[lsf][sr]
	h.Mode = int(b[3] >> 6)
	h.Channels = 2
	if h.Mode == 3 {
		h.Channels = 1
	}
	// Bytes per frame: 144·bitrate/rate (MPEG-1) or 72·bitrate/rate
	// (MPEG-2), plus the padding byte.
	h.FrameBytes = (144>>lsf)*1000*bitrates[lsf][br]/h.Rate + int(b[2]>>1&1)
	return h, true, false
}

// Match reports whether head starts with an ID3v2 tag or a Layer III frame.
func Match(head []byte, name string) bool {
	if bytes.HasPrefix(head, []byte("ID3")) {
		return true
	}
	_, ok, _ := parseFrame(head)
	return ok
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
	return &format.Error{Format: "mp3", File: f.Name, Offset: off, Field: field, Err: err}
}

// ReadHeader skips an ID3v2 tag, finds the first frame header within 64 KiB
// and reads an Info/Xing frame's LAME tag if there is one.
func ReadHeader(f format.File) (*Header, error) {
	start := int64(0)
	var id3 [10]byte
	if n, _ := f.R.ReadAt(id3[:], 0); n == 10 && string(id3[:3]) == "ID3" {
		for _, c := range id3[6:10] {
			if c&0x80 != 0 {
				return nil, errAt(f, 6, "ID3 tag size", fmt.Errorf("size bytes % X are not syncsafe", id3[6:10]))
			}
		}
		size := int64(id3[6])<<21 | int64(id3[7])<<14 | int64(id3[8])<<7 | int64(id3[9])
		start = 10 + size
		if id3[5]&0x10 != 0 {
			start += 10 // footer
		}
		if start >= f.Size {
			return nil, errAt(f, f.Size, "ID3 tag", fmt.Errorf("tag of %d bytes runs past the end of the file: %w", start, format.ErrTruncated))
		}
	}
	buf := make([]byte, min(searchBytes+4, f.Size-start))
	n, err := f.R.ReadAt(buf, start)
	if n < len(buf) && err != nil && err != io.EOF {
		return nil, errAt(f, start+int64(n), "", err)
	}
	buf = buf[:n]
	for i := 0; i+4 <= len(buf) && i <= searchBytes; i++ {
		if buf[i] != 0xFF {
			continue
		}
		h, ok, v25 := parseFrame(buf[i:])
		if v25 {
			return nil, errAt(f, start+int64(i), "frame header", fmt.Errorf("MPEG-2.5 audio is not supported (MPEG-1 and MPEG-2 Layer III): %w", format.ErrUnsupported))
		}
		if !ok {
			continue
		}
		h.Offset = start + int64(i)
		readInfo(&h, buf[i:])
		return &h, nil
	}
	return nil, errAt(f, start, "frame header", fmt.Errorf("no MPEG-1/2 Layer III frame header in the %d bytes from here", len(buf)))
}

// readInfo looks for an Info/Xing header after the side information of the
// frame in b, and for the LAME tag after it.
func readInfo(h *Header, b []byte) {
	side := 32
	switch {
	case h.Version == 1 && h.Channels == 1, h.Version == 2 && h.Channels == 2:
		side = 17
	case h.Version == 2:
		side = 9
	}
	x := 4 + side
	if b[1]&1 == 0 {
		x += 2 // CRC
	}
	b = b[:min(len(b), h.FrameBytes)]
	if len(b) < x+8 || (string(b[x:x+4]) != "Info" && string(b[x:x+4]) != "Xing") {
		return
	}
	h.InfoFrame = true
	flags := binary.BigEndian.Uint32(b[x+4:])
	off := x + 8
	if flags&1 != 0 && len(b) >= off+4 {
		h.TagFrames = int(binary.BigEndian.Uint32(b[off:]))
	}
	for _, f := range []struct {
		bit  uint32
		size int
	}{{1, 4}, {2, 4}, {4, 100}, {8, 4}} {
		if flags&f.bit != 0 {
			off += f.size
		}
	}
	// LAME tag: 9-byte encoder name, then revision, lowpass, 8 bytes of
	// replay gain, flags, bitrate, and 3 bytes holding 12-bit delay and
	// 12-bit padding. Layout from memory of the LAME tag description;
	// TestOnset confirms it on a tone with a known onset.
	if len(b) < off+24 {
		return
	}
	enc := string(b[off : off+4])
	if enc != "LAME" && enc != "Lavc" && enc != "Lavf" {
		return
	}
	d := b[off+21 : off+24]
	h.LAMETag = true
	h.Delay = int(d[0])<<4 | int(d[1])>>4
	h.Padding = int(d[1]&0x0F)<<8 | int(d[2])
}

// Read decodes f. See the package comment for channels, scaling and the
// removal of delay and padding.
func (r *Reader) Read(f format.File) (rec *data.Recording, err error) {
	h, err := ReadHeader(f)
	if err != nil {
		return nil, err
	}
	// go-mp3 indexes tables with values from the file; a malformed file
	// must not bring the program down.
	// The counter gives the position the decoder had read to when it failed.
	src := &counter{r: io.NewSectionReader(f.R, 0, f.Size)}
	defer func() {
		if p := recover(); p != nil {
			rec, err = nil, errAt(f, src.n, "", fmt.Errorf("the decoder failed on malformed data before this offset (%v): %w", p, format.ErrSyntax))
		}
	}()
	dec, err := gomp3.NewDecoder(src)
	if err == io.EOF {
		return nil, errAt(f, h.Offset, "", fmt.Errorf("decoding: the first frame is cut short: %w", format.ErrTruncated))
	}
	if err != nil {
		return nil, errAt(f, src.n, "", fmt.Errorf("decoding, before this offset: %w", err))
	}
	limit := r.MaxBytes
	if limit <= 0 {
		limit = data.MaxSampleBytes // the caller's sample budget (amplink run --max-memory, a page worker)
	}
	if limit <= 0 {
		limit = DefaultMaxBytes
	}
	total := dec.Length() / 4 // sample frames; go-mp3 gives bytes of 16-bit stereo
	if total <= 0 {
		return nil, errAt(f, h.Offset, "", errors.New("no audio frames"))
	}
	if need := total * int64(h.Channels) * 4; need > limit {
		return nil, errAt(f, h.Offset, "", fmt.Errorf("%d samples × %d channels need %d bytes, more than the limit of %d: %w",
			total, h.Channels, need, limit, format.ErrUnsupported))
	}
	if dec.SampleRate() != h.Rate {
		return nil, errAt(f, h.Offset, "frame header", fmt.Errorf("decoder reports %d Hz, the first frame %d Hz", dec.SampleRate(), h.Rate))
	}
	nc := h.Channels
	rec = &data.Recording{Name: f.Name, Rate: float64(h.Rate), Channels: make([]data.Channel, nc), Samples: make([][]float32, nc)}
	for c := range nc {
		rec.Channels[c] = data.Channel{Name: fmt.Sprintf("ch%d", c+1), Type: "AUDIO", Unit: "a.u."}
		rec.Samples[c] = make([]float32, total)
	}
	rec.Notes = []string{GainNote}
	buf := make([]byte, 1<<16)
	k := int64(0)
	var rest []byte
	for k < total {
		m, err := dec.Read(buf[len(rest):])
		p := buf[:len(rest)+m]
		whole := len(p) / 4 * 4
		for i := 0; i < whole && k < total; i += 4 {
			rec.Samples[0][k] = float32(int16(binary.LittleEndian.Uint16(p[i:]))) / (1 << 15)
			if nc == 2 {
				rec.Samples[1][k] = float32(int16(binary.LittleEndian.Uint16(p[i+2:]))) / (1 << 15)
			}
			k++
		}
		rest = append(buf[:0], p[whole:]...)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, errAt(f, src.n, "", fmt.Errorf("decoding sample %d, before this offset: %w", k+1, err))
		}
	}
	if k < total {
		rec.Notes = append(rec.Notes, fmt.Sprintf("decoded %d of the %d samples the frame headers announce", k, total))
		for c := range rec.Samples {
			rec.Samples[c] = rec.Samples[c][:k]
		}
	}
	trim(rec, h, k)
	if rec.Len() == 0 {
		return nil, errAt(f, h.Offset, "", errors.New("no audio samples"))
	}
	return rec, nil
}

// trim removes the Info frame, the encoder and decoder delays and the
// padding when the LAME tag gives them; n is the number of decoded samples.
func trim(rec *data.Recording, h *Header, n int64) {
	per := int64(1152)
	if h.Version == 2 {
		per = 576
	}
	if !h.LAMETag {
		msg := "no encoder-delay tag: samples start late by the encoder delay plus the decoder's 529"
		if h.InfoFrame && n > per {
			for c := range rec.Samples {
				rec.Samples[c] = rec.Samples[c][per:]
			}
			msg = fmt.Sprintf("removed the %d silent samples of the Info frame; ", per) + msg
		}
		rec.Notes = append(rec.Notes, msg)
		return
	}
	skip := per + int64(h.Delay) + DecoderDelay
	// Encoded length: every frame after the Info frame, less delay and padding.
	keep := n - per - int64(h.Delay) - int64(h.Padding)
	end := min(skip+max(keep, 0), n)
	if frames := n / per; n%per != 0 || (h.TagFrames > 0 && frames-1 != int64(h.TagFrames)) {
		// Cut short: the padding is not at the end, so keep the tail.
		end = n
		rec.Notes = append(rec.Notes, fmt.Sprintf("the Info frame announces %d audio frames, %d decoded: the file is cut short", h.TagFrames, frames-1))
	}
	if skip >= end {
		for c := range rec.Samples {
			rec.Samples[c] = rec.Samples[c][:0]
		}
		return
	}
	for c := range rec.Samples {
		rec.Samples[c] = rec.Samples[c][skip:end:end]
	}
	rec.Notes = append(rec.Notes, fmt.Sprintf(
		"removed %d leading samples (Info frame %d, encoder delay %d, decoder delay %d) and %d trailing (padding %d less the decoder delay)",
		skip, per, h.Delay, DecoderDelay, n-end, h.Padding))
}

// counter keeps the position of the decoder in the file (go-mp3 reads and
// seeks; it needs the Seek to find the length).
type counter struct {
	r *io.SectionReader
	n int64
}

func (c *counter) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

func (c *counter) Seek(off int64, whence int) (int64, error) {
	n, err := c.r.Seek(off, whence)
	if err == nil {
		c.n = n
	}
	return n, err
}
