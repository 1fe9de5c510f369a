package csv

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// TestParseFloat32 checks the fast decimal path bit for bit against the
// standard library's strconv.ParseFloat(s, 32) and (s, 64), on many
// formattings of random float32 and float64 values and on edge cases.
func TestParseFloat32(t *testing.T) {
	cases := []string{"0", "-0", "+0.0", "1", "-1", ".5", "5.", "1e5", "1E-5", "1e+22", "1e-22", "1e23", "1e-23",
		"123456789012345", "1234567890123456", "0.000000000000000000001", "3.4028235e38", "1.17549435e-38",
		"16777217", "16777219", "0.1", "0.2", "0.3", "4.0000004", "1.00000006", "33554435",
		"", "-", ".", "e5", "1e", "1e+", "1.2.3", "1,5", "abc", "NaN", "inf", "0x1p3", "1_0", " 1", "1 ", "--1",
		"9007199254740993", "2.5e-8", "7.006492321624085e-46"}
	rng := rand.New(rand.NewPCG(7, 8))
	for i := 0; i < 200000; i++ {
		f := math.Float32frombits(rng.Uint32())
		if math.IsNaN(float64(f)) || math.IsInf(float64(f), 0) {
			continue
		}
		switch i % 4 {
		case 0:
			cases = append(cases, strconv.FormatFloat(float64(f), 'g', -1, 32))
		case 1:
			cases = append(cases, strconv.FormatFloat(float64(f), 'e', rng.IntN(12), 32))
		case 2:
			x := rng.NormFloat64() * math.Pow(10, float64(rng.IntN(12)-6))
			cases = append(cases, strconv.FormatFloat(x, 'f', rng.IntN(10), 64))
		case 3:
			// Midpoints of float32 neighbours, printed exactly: the hard case.
			g := math.Nextafter32(f, float32(math.Inf(1)))
			mid := (float64(f) + float64(g)) / 2
			cases = append(cases, strconv.FormatFloat(mid, 'g', -1, 64))
		}
	}
	for _, s := range cases {
		want, werr := strconv.ParseFloat(s, 32)
		got, gerr := parseFloat32(s)
		if (werr == nil) != (gerr == nil) || math.Float32bits(got) != math.Float32bits(float32(want)) {
			t.Fatalf("parseFloat32(%q) = %v, %v; strconv gives %v, %v", s, got, gerr, float32(want), werr)
		}
		want64, werr := strconv.ParseFloat(s, 64)
		got64, gerr := parseFloat64(s)
		if (werr == nil) != (gerr == nil) || math.Float64bits(got64) != math.Float64bits(want64) {
			t.Fatalf("parseFloat64(%q) = %v, %v; strconv gives %v, %v", s, got64, gerr, want64, werr)
		}
	}
}

// FuzzParseFloat compares the fast decimal path with strconv on any input.
func FuzzParseFloat(f *testing.F) {
	for _, s := range []string{"1.5", "-0.000123", "1e-7", "16777217", "3.4028235e38", "0x10", "abc"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		want, werr := strconv.ParseFloat(s, 32)
		got, gerr := parseFloat32(s)
		if (werr == nil) != (gerr == nil) || math.Float32bits(got) != math.Float32bits(float32(want)) {
			t.Fatalf("parseFloat32(%q) = %v, %v; strconv gives %v, %v", s, got, gerr, float32(want), werr)
		}
		want64, werr := strconv.ParseFloat(s, 64)
		got64, gerr := parseFloat64(s)
		if (werr == nil) != (gerr == nil) || math.Float64bits(got64) != math.Float64bits(want64) {
			t.Fatalf("parseFloat64(%q) = %v, %v; strconv gives %v, %v", s, got64, gerr, want64, werr)
		}
	})
}
