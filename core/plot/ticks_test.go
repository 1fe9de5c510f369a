package plot

import (
	"math"
	"slices"
	"testing"
)

// Expected ticks are Heckbert's (1990) loose-labelling rules worked by
// hand: range = nicenum(hi−lo, false), step = nicenum(range/(n−1), true),
// ticks from floor(lo/step)·step to ceil(hi/step)·step.
func TestNiceTicks(t *testing.T) {
	for _, c := range []struct {
		name   string
		lo, hi float64
		n      int
		want   []float64
		step   float64
	}{
		{"0–1, 6 ticks", 0, 1, 6, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}, 0.2},
		{"3–40 Hz, 5 ticks", 3, 40, 5, []float64{0, 10, 20, 30, 40}, 10}, // range 50, step nicenum(12.5) = 10
		{"−1.0–1.5 s, 5 ticks", -1, 1.5, 5, []float64{-1, 0, 1, 2}, 1},   // range 5, step nicenum(1.25) = 1
		{"−1.0–1.5 s, 11 ticks", -1, 1.5, 11, []float64{-1, -0.5, 0, 0.5, 1, 1.5}, 0.5},
		{"0–100", 0, 100, 5, []float64{0, 20, 40, 60, 80, 100}, 20}, // step nicenum(25) = 20 (2.5 < 3)
		{"−0.37–0.52", -0.37, 0.52, 5, []float64{-0.4, -0.2, 0, 0.2, 0.4, 0.6}, 0.2},
		{"reversed", 1, 0, 6, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}, 0.2},
		{"flat at 0", 0, 0, 5, []float64{-1, -0.5, 0, 0.5, 1}, 0.5},
		{"small", 0.001, 0.0042, 5, []float64{0.001, 0.002, 0.003, 0.004, 0.005}, 0.001},
		{"large", 12000, 87000, 4, []float64{0, 50000, 100000}, 50000}, // range 100000, step nicenum(33333) = 50000
	} {
		t.Run(c.name, func(t *testing.T) {
			got, step := NiceTicks(c.lo, c.hi, c.n)
			if !slices.Equal(got, c.want) || step != c.step {
				t.Errorf("NiceTicks(%v, %v, %d) = %v step %v, want %v step %v", c.lo, c.hi, c.n, got, step, c.want, c.step)
			}
		})
	}
	t.Run("non-finite", func(t *testing.T) {
		if got, step := NiceTicks(math.NaN(), 1, 5); got != nil || step != 0 {
			t.Errorf("NaN input gave %v, %v", got, step)
		}
		if got, _ := NiceTicks(0, math.Inf(1), 5); got != nil {
			t.Errorf("Inf input gave %v", got)
		}
	})
}

func TestInnerTicks(t *testing.T) {
	for _, c := range []struct {
		name   string
		lo, hi float64
		want   []float64
	}{
		{"−1.0–1.5 s", -1, 1.5, []float64{-1, -0.5, 0, 0.5, 1, 1.5}},
		{"0–1", 0, 1, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}},
		{"edges of a time grid", -1.025, 1.525, []float64{-1, -0.5, 0, 0.5, 1, 1.5}},
		{"−0.5–1 s", -0.525, 1.025, []float64{-0.5, 0, 0.5, 1}},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, _ := InnerTicks(c.lo, c.hi, 5)
			if !slices.Equal(got, c.want) {
				t.Errorf("InnerTicks(%v, %v) = %v, want %v", c.lo, c.hi, got, c.want)
			}
		})
	}
}

// Log ticks: 1, 2, 5 × 10^k (with 3 on short ranges) — common practice
// for frequency axes; the expected lists follow from the rule by hand.
func TestLogTicks(t *testing.T) {
	grid := logGrid(8, 12, 9)
	for _, c := range []struct {
		name   string
		lo, hi float64
		grid   []float64
		want   []float64
	}{
		{"3–40 Hz", 3, 40, nil, []float64{3, 5, 10, 20, 30}},
		{"1–100 Hz", 1, 100, nil, []float64{1, 2, 5, 10, 20, 50, 100}},
		{"0.5–2000 Hz", 0.5, 2000, nil, []float64{1, 10, 100, 1000}},
		{"1e-3–1e9", 1e-3, 1e9, nil, []float64{0.01, 1, 100, 1e4, 1e6, 1e8}},
		{"narrow with grid", 8, 12, grid, []float64{grid[0], grid[2], grid[4], grid[6], grid[8]}},
		{"narrow without grid", 8, 12, nil, []float64{8, 9, 10, 11, 12}},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := LogTicks(c.lo, c.hi, c.grid, 5)
			if len(got) != len(c.want) {
				t.Fatalf("LogTicks(%v, %v) = %v, want %v", c.lo, c.hi, got, c.want)
			}
			for i := range got {
				if math.Abs(got[i]-c.want[i]) > 1e-12*c.want[i] {
					t.Fatalf("LogTicks(%v, %v) = %v, want %v", c.lo, c.hi, got, c.want)
				}
			}
		})
	}
	if got := LogTicks(0, 10, nil, 5); got != nil {
		t.Errorf("lo = 0 gave %v", got)
	}
}

func TestLabelFormats(t *testing.T) {
	for _, c := range []struct {
		got, want string
	}{
		{fmtTick(0.6000000000000001, 0.2), "0.6"},
		{fmtTick(-0.5, 0.5), "\u22120.5"},
		{fmtTick(-0.0001, 0.5), "0"},
		{fmtTick(20000, 20000), "20000"},
		{fmtTick(-0.0456, 0.001), "\u22120.046"},
		{fmtSig(12.3456, 3), "12.3"},
		{fmtSig(3, 3), "3"},
		{fmtSig(0.000015, 2), "1.5e\u22125"},
		{fmtSig(2e7, 2), "2e7"},
		{fmtSig(math.NaN(), 2), "undefined"},
		{fmtP(0.00071), "p = 0.00071"},
		{fmtP(0.0449), "p = 0.045"},
		{fmtP(3e-9), "p < 0.0001"},
		{num(-0.001), "0"},
		{num(12.345), "12.35"}, // the float64 nearest 12.345 is 12.3450000000000006, so it rounds up
		{num(3.10), "3.1"},
		{esc(`a<b & "c"`), "a&lt;b &amp; &quot;c&quot;"},
		{axisTitle("power", "µV²"), "power (µV²)"},
		{axisTitle("", "s"), "s"},
	} {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
}

func TestNumPanicsOnNaN(t *testing.T) {
	defer func() {
		if r := recover(); r == nil {
			t.Error("num(NaN) did not panic")
		}
	}()
	num(math.NaN())
}
