package csv

import (
	"bytes"
	"math/rand/v2"
	"testing"

	"amplink/core/format"
)

// BenchmarkDecode decodes a generated epoched CSV of 19 channels × 180
// trials × 1250 samples (about 45 MB of text, made in memory by WriteEpochs
// from normal values of 10 µV spread). The MB/s figure is input bytes.
func BenchmarkDecode(b *testing.B) {
	src := benchFile(b)
	b.SetBytes(int64(len(src)))
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		d, err := Decode(format.Bytes("bench.csv", src))
		if err != nil {
			b.Fatal(err)
		}
		if d.Epochs.NTrials != 180 {
			b.Fatal("wrong trial count")
		}
	}
}

// BenchmarkWriteEpochs writes the same epochs.
func BenchmarkWriteEpochs(b *testing.B) {
	e := randomEpochs(rand.New(rand.NewPCG(5, 6)), 500, -1, 19, 180, 1250)
	for i := range e.Data {
		e.Data[i] *= 1e-3
	}
	var buf bytes.Buffer
	if err := WriteEpochs(&buf, e); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(buf.Len()))
	b.ResetTimer()
	for b.Loop() {
		buf.Reset()
		if err := WriteEpochs(&buf, e); err != nil {
			b.Fatal(err)
		}
	}
}

func benchFile(b *testing.B) []byte {
	rng := rand.New(rand.NewPCG(5, 6))
	e := randomEpochs(rng, 500, -1, 19, 180, 1250)
	for i := range e.Data {
		e.Data[i] = float32(rng.NormFloat64() * 10)
	}
	var buf bytes.Buffer
	if err := WriteEpochs(&buf, e); err != nil {
		b.Fatal(err)
	}
	return buf.Bytes()
}
