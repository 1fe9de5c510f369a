package report

import (
	"bytes"
	"fmt"
	"math"
	"testing"
)

// benchRows is k recordings × m tests with r = sin(·), half of the
// recordings in each of two groups.
func benchRows(k, m int) ([]Row, map[string]string) {
	var rows []Row
	groups := map[string]string{}
	for i := range k {
		rec := fmt.Sprintf("sub-%03d.edf", i)
		groups[rec] = []string{"a", "b"}[i%2]
		for j := range m {
			rows = append(rows, recRow("a1", "trial-window", "C4", fmt.Sprintf("E%03d", j), rec, 0.9*math.Sin(float64(i*m+j))))
		}
	}
	return rows, groups
}

// BenchmarkGroupRows reports the time per pooled test (rows/op is the
// input size).
func BenchmarkGroupRows(b *testing.B) {
	for _, size := range []struct{ k, m int }{{20, 64}, {200, 64}, {500, 256}} {
		rows, groups := benchRows(size.k, size.m)
		for _, g := range []struct {
			name   string
			groups map[string]string
		}{{"pooled", nil}, {"two-groups", groups}} {
			b.Run(fmt.Sprintf("k=%d/m=%d/%s", size.k, size.m, g.name), func(b *testing.B) {
				for b.Loop() {
					if _, err := GroupRows(rows, g.groups, 0.95); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*size.m), "ns/test")
				b.ReportMetric(float64(len(rows)), "rows/op")
			})
		}
	}
}

// BenchmarkReadCSV reads a table of k recordings × 64 tests as WriteCSV
// writes it, and reports the throughput.
func BenchmarkReadCSV(b *testing.B) {
	for _, k := range []int{20, 500} {
		rows, _ := benchRows(k, 64)
		var buf bytes.Buffer
		if err := WriteCSV(&buf, &Results{Rows: rows}); err != nil {
			b.Fatal(err)
		}
		data := buf.Bytes()
		b.Run(fmt.Sprintf("rows=%d", len(rows)), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				if _, err := ReadCSV(bytes.NewReader(data), "bench.csv"); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
