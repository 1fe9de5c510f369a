package data

import "fmt"

// Source reads the samples of a continuous recording on demand, so that an
// analysis that works through the recording a stretch at a time holds only
// that stretch (a reader's Open: edf.Open, wav.Open). Every call reads the
// file again; Read may be called from several goroutines at once.
type Source interface {
	// Read fills dst[i] with the samples lo, lo+1, …, lo+len(dst[i])−1 of
	// channel chans[i]. Every dst[i] has the same length and the samples
	// lie inside the recording; a failure to read the file is an error
	// naming the file and the offset.
	Read(dst [][]float32, chans []int, lo int) error
}

// Streamed reports whether r's samples are read on demand (Samples is nil).
func (r *Recording) Streamed() bool { return r.Samples == nil && r.Source != nil }

// Block fills dst[i] with the samples lo, …, lo+len(dst[i])−1 of channel
// chans[i], from Samples or, for a streamed recording, from its Source.
func (r *Recording) Block(dst [][]float32, chans []int, lo int) error {
	if len(dst) != len(chans) {
		panic("data: Block: channel count mismatch")
	}
	if len(dst) == 0 {
		return nil
	}
	n := len(dst[0])
	if lo < 0 || lo+n > r.Len() {
		panic(fmt.Sprintf("data: Block: samples [%d, %d) outside [0, %d)", lo, lo+n, r.Len()))
	}
	if !r.Streamed() {
		for i, c := range chans {
			copy(dst[i], r.Samples[c][lo:lo+n])
		}
		return nil
	}
	return r.Source.Read(dst, chans, lo)
}

// Keep keeps the listed channels, in that order (bad channels dropped);
// a streamed recording keeps reading the same file through the new
// channel numbers.
func (r *Recording) Keep(idx []int) {
	cs := make([]Channel, len(idx))
	for i, c := range idx {
		cs[i] = r.Channels[c]
	}
	r.Channels = cs
	if r.Streamed() {
		r.Source = subset{r.Source, append([]int(nil), idx...)}
		return
	}
	ss := make([][]float32, len(idx))
	for i, c := range idx {
		ss[i] = r.Samples[c]
	}
	r.Samples = ss
}

// subset renumbers the channels of a Source.
type subset struct {
	src Source
	idx []int
}

func (s subset) Read(dst [][]float32, chans []int, lo int) error {
	m := make([]int, len(chans))
	for i, c := range chans {
		m[i] = s.idx[c]
	}
	return s.src.Read(dst, m, lo)
}
