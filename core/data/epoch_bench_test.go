package data

import (
	"fmt"
	"testing"
)

// BenchmarkEpoch cuts 64 channels at 1 kHz into 2 s epochs around 100 events.
func BenchmarkEpoch(b *testing.B) {
	for _, nch := range []int{8, 64} {
		b.Run(fmt.Sprintf("ch=%d", nch), func(b *testing.B) {
			var evs []Event
			for i := range 100 {
				evs = append(evs, ev(2+3*float64(i), "tone"))
			}
			r := ramp(1000, 0, nch, 310000, evs)
			b.SetBytes(int64(100 * nch * 2001 * 4))
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Epoch(r, nil, "tone", -1, 1); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
