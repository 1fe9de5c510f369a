package workload

import (
	"fmt"
	"math"
	"math/rand/v2"

	"amplink/core/report"
	"amplink/core/stats"
)

// TableName is the recording name of table i (from 0) written by Tables:
// "sub-0001_task-work_eeg.f32", … (four digits up to 9999).
func TableName(i int) string { return fmt.Sprintf("sub-%04d_task-work_eeg.f32", i+1) }

// TableGroup is the group label of table i: "a" for even i, "b" for odd i.
func TableGroup(i int) string { return [2]string{"a", "b"}[i%2] }

// Tables makes k results tables for measuring amplink merge, one per
// simulated recording, from template (a results table of one recording, as
// amplink run writes it). Table i is template with its recording column set
// to TableName(i) and, on every row with a finite r, the correlation moved
// on Fisher's z scale by recording-level noise:
//
//	r_i = tanh(atanh(r) + 0.2·N(0,1)),   p_i = stats.PValueT(r_i, n − 2)
//
// Every other cell is the template's. The noise comes from a PCG generator
// seeded with seed, drawn in table order and row order, so the same template,
// k and seed give the same tables. emit receives each table in turn; the
// rows it gets are its own.
func Tables(template *report.Results, k int, seed uint64, emit func(i int, res *report.Results) error) error {
	rng := rand.New(rand.NewPCG(seed, stream+2))
	for i := range k {
		res := &report.Results{Rows: make([]report.Row, len(template.Rows))}
		for j, row := range template.Rows {
			row.Extra = append([]report.Field(nil), row.Extra...)
			found := false
			for f := range row.Extra {
				if row.Extra[f].Name == "recording" {
					row.Extra[f].Value = TableName(i)
					found = true
				}
			}
			if !found {
				row.Extra = append(row.Extra, report.Field{Name: "recording", Value: TableName(i)})
			}
			if !math.IsNaN(row.R) {
				z := math.Atanh(math.Max(-1+1e-15, math.Min(1-1e-15, row.R)))
				row.R = math.Tanh(z + 0.2*rng.NormFloat64())
				row.P = stats.PValueT(row.R, float64(row.N-2))
			}
			res.Rows[j] = row
		}
		if err := emit(i, res); err != nil {
			return err
		}
	}
	return nil
}
