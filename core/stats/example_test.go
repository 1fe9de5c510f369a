package stats_test

import (
	"fmt"

	"amplink/core/stats"
)

// The tie example of REFERENCES.md (values computed with scipy 1.10.1
// spearmanr): ρ = 0.808824, p = 0.05133.
func ExampleSpearman() {
	x := []float64{1, 2, 2, 3, 4, 5}
	y := []float64{2, 1, 3, 3, 5, 4}
	r := stats.Spearman(x, y)
	fmt.Printf("rho=%.6f p=%.5f\n", r, stats.PValueT(r, float64(len(x)-2)))
	// Output: rho=0.808824 p=0.05133
}

// Benjamini & Hochberg (1995) example, p-values from memory
// (REFERENCES.md): four tests have q ≤ 0.05.
func ExampleBH() {
	p := []float64{.0001, .0004, .0019, .0095, .0201, .0278, .0298, .0344, .0459,
		.3240, .4262, .5719, .6528, .7590, 1.0}
	for _, q := range stats.BH(p)[:5] {
		fmt.Printf("%.5f ", q)
	}
	fmt.Println()
	// Output: 0.00150 0.00300 0.00950 0.03562 0.06030
}
