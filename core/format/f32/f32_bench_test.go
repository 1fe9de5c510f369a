package f32

import (
	"bytes"
	"fmt"
	"testing"

	"amplink/core/format"
)

// BenchmarkDecode reports decode throughput (MB/s of the binary).
func BenchmarkDecode(b *testing.B) {
	for _, mb := range []int{1, 16} {
		e := randomEpochs(1, 16, 32, mb<<20/(16*32*4))
		var bin, side bytes.Buffer
		if err := Write(&bin, &side, e); err != nil {
			b.Fatal(err)
		}
		sib := mapSib{"r.json": side.Bytes()}
		b.Run(fmt.Sprintf("%dMB", mb), func(b *testing.B) {
			b.SetBytes(int64(bin.Len()))
			for b.Loop() {
				if _, err := Decode(format.Bytes("r.f32", bin.Bytes()), sib); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkWrite reports write throughput (MB/s of the binary).
func BenchmarkWrite(b *testing.B) {
	e := randomEpochs(1, 16, 32, 1<<20/(16*32*4))
	var bin, side bytes.Buffer
	b.SetBytes(int64(4 * len(e.Data)))
	for b.Loop() {
		bin.Reset()
		side.Reset()
		if err := Write(&bin, &side, e); err != nil {
			b.Fatal(err)
		}
	}
}
