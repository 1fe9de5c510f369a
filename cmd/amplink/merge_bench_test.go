package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"amplink/cmd/amplink-workload/workload"
	"amplink/core/report"
)

// BenchmarkMerge merges k tables of m rows each (workload.Tables on an
// m-row template, with two groups) and reports the time per input row.
// The peak memory of a whole merge is measured on whole processes (see
// README, Scale); B/op here is what one merge allocates in total.
func BenchmarkMerge(b *testing.B) {
	for _, size := range []struct{ k, m int }{{100, 64}, {200, 1024}} {
		dir := b.TempDir()
		var tmpl report.Results
		for j := range size.m {
			tmpl.Rows = append(tmpl.Rows, report.Row{Analysis: "a1", Type: "trial-window", Seed: fmt.Sprintf("E%02d", j/32+1), Target: fmt.Sprintf("E%02d", j%32+1),
				Method: "spearman", N: 200, R: 0.6 * math.Sin(float64(j)), P: 0.01,
				Extra: []report.Field{{Name: "df", Value: "198"}, {Name: "correction", Value: "fdr"}, {Name: "note", Value: ""}, {Name: "recording", Value: "x"}}})
		}
		args := []string{"--out", filepath.Join(dir, "merged.csv"), "--groups", filepath.Join(dir, "groups.csv")}
		var groups bytes.Buffer
		groups.WriteString("recording,group\n")
		err := workload.Tables(&tmpl, size.k, 1, func(i int, res *report.Results) error {
			p := filepath.Join(dir, fmt.Sprint(i), "results.csv")
			if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
				return err
			}
			var buf bytes.Buffer
			if err := report.WriteCSV(&buf, res); err != nil {
				return err
			}
			args = append(args, p)
			fmt.Fprintf(&groups, "%s,%s\n", workload.TableName(i), workload.TableGroup(i))
			return os.WriteFile(p, buf.Bytes(), 0o644)
		})
		if err != nil {
			b.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, "groups.csv"), groups.Bytes(), 0o644); err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("tables=%d/rows=%d", size.k, size.m), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := cmdMerge(io.Discard, io.Discard, args); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*size.k*size.m), "ns/row")
		})
	}
}
