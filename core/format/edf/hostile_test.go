package edf

import (
	"errors"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

// TestRefusesImpossibleRate guards the rate bound: a record lasting 1e-9 s
// makes 64 samples per record a rate of 6.4e10 Hz, and the wavelets for it
// would need terabytes.
func TestRefusesImpossibleRate(t *testing.T) {
	sig := []rawSig{{"C4", "uV", "-3200", "3200", "-32768", "32767", "64"}}
	for _, tc := range []struct {
		name, dur string
		ok        bool
	}{
		{"1e-9 s", "1E-9", false},
		{"64 µs is 1 MHz, the limit", "0.000064", true},
		{"1 s", "1", true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			b := rawFile(magicEDF, "", "2", tc.dur, sig, make([]byte, 2*2*64))
			_, _, err := decodeBytes("r.edf", b)
			if tc.ok {
				if err != nil {
					t.Fatal(err)
				}
				return
			}
			if !errors.Is(err, data.ErrRate) || !strings.Contains(err.Error(), "r.edf: offset 244 (duration of a data record)") {
				t.Fatalf("err = %v, want an impossible-rate error at offset 244", err)
			}
		})
	}
}

// TestRefusesNonFiniteScaling guards the scaling check: a physical range
// whose gain or samples overflow float64 or the float32 the samples are held
// in would give Inf samples (and a row blaming a "flat channel").
func TestRefusesNonFiniteScaling(t *testing.T) {
	for _, tc := range []struct {
		name       string
		magic      string
		pmin, pmax string
		ok         bool
	}{
		{"gain overflows float64", magicEDF, "-1e308", "1e308", false},
		{"samples overflow float32", magicEDF, "-1e39", "1e39", false},
		{"bdf samples overflow float32", magicBDF, "-1e300", "1e300", false},
		{"large but finite", magicEDF, "-1e37", "1e37", true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dlo, dhi, bps, res := "-32768", "32767", 2, ""
			if tc.magic == magicBDF {
				dlo, dhi, bps, res = "-8388608", "8388607", 3, "24BIT"
			}
			sig := []rawSig{{"C4", "uV", tc.pmin, tc.pmax, dlo, dhi, "10"}}
			b := rawFile(tc.magic, res, "1", "1", sig, make([]byte, bps*10))
			rec, _, err := decodeBytes("s.edf", b)
			if tc.ok {
				if err != nil {
					t.Fatal(err)
				}
				return
			}
			if err == nil {
				t.Fatalf("accepted; first sample %v", rec.Samples[0][0])
			}
			var fe *format.Error
			if !errors.As(err, &fe) || fe.Offset != 256+16+80+8+8 || !strings.Contains(err.Error(), "float32") {
				t.Fatalf("err = %v, want a scaling error at the physical maximum (offset 368)", err)
			}
		})
	}
}
