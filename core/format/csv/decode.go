package csv

import (
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"amplink/core/data"
	"amplink/core/format"
)

// MaxChannels is the largest number of channel columns Decode accepts.
const MaxChannels = 4096

// maxPrealloc caps the number of float32 values allocated ahead of reading
// them (64 MiB); beyond it storage grows as rows arrive.
const maxPrealloc = 1 << 24

// StepTolerance is the relative tolerance of the time axis: every time step
// must be within StepTolerance of the mean of the steps before it, and every
// trial's k-th time within StepTolerance·T of the first trial's, where T is
// the sample period. Both also allow 1e-9 s absolute. One per cent lets
// times printed to 6 decimals at 1024 Hz through.
const StepTolerance = 0.01

func init() {
	format.Register(format.Format{
		Name:     "csv",
		Fallback: true,
		Decode:   func(f format.File, _ format.Siblings) (*format.Data, error) { return Decode(f) },
	})
}

// Decode reads an epoched or a continuous CSV or TSV file (see the package
// documentation for the layouts).
//
// The time column is in seconds. Within a trial (or the whole continuous
// file) times must increase strictly and evenly: each step Δt_k must satisfy
// |Δt_k − mean(Δt_1..Δt_{k−1})| ≤ StepTolerance·mean + 1e-9 s. The sample
// rate is
//
//	rate = (n − 1) / (t_{n−1} − t_0)  Hz
//
// over the first trial, rounded to 1 µHz when that moves it by no more than
// the float64 rounding of the times explains (so 0, 0.004, 0.008, … gives
// exactly 250 Hz, but 1000/3 Hz stays 333.333…). Start is t_0.
// Epoched trials are contiguous blocks of rows with the same trial id (any
// string); all have the same number of samples and the same times within
// StepTolerance of a period. The id of trial i is kept in
// TrialInfo[i].Extra["trial"]; TrialInfo[i].Type is left empty.
//
// On any error Decode returns nil data and a *format.Error with the line and
// the column (1-based field number).
func Decode(f format.File) (*format.Data, error) {
	r := NewReader(f)
	hdr, line, err := r.Header()
	if err != nil {
		return nil, err
	}
	d := &decoder{r: r, f: f, hdrLine: line}
	if err := d.header(hdr); err != nil {
		return nil, err
	}
	if d.epoched {
		return d.epochs()
	}
	return d.continuous()
}

type decoder struct {
	r        *Reader
	f        format.File
	hdrLine  int
	epoched  bool
	first    int // index of the first channel column
	channels []data.Channel
	hdrEnd   int64
}

func (d *decoder) header(h []string) error {
	r := d.r
	for _, f := range h {
		if strings.IndexByte(f, 0) >= 0 {
			return r.Errorf(d.hdrLine, 0, format.ErrUnsupported, "not a text file (NUL bytes in the first line); UTF-16 text must be saved as UTF-8")
		}
	}
	switch {
	case strings.EqualFold(h[0], "trial"):
		d.epoched, d.first = true, 2
		if len(h) < 2 || !strings.EqualFold(h[1], "time") {
			got := ""
			if len(h) >= 2 {
				got = h[1]
			}
			return r.Errorf(d.hdrLine, 2, format.ErrSyntax, "second header column is %s; an epoched file starts trial,time,<channel>...", quote(got))
		}
	case strings.EqualFold(h[0], "time"):
		d.first = 1
	case strings.EqualFold(h[0], "onset"):
		return r.Errorf(d.hdrLine, 1, format.ErrSyntax, "first header column is %s: this looks like an events table, not samples; the header must start with trial,time or time", quote(h[0]))
	default:
		return r.Errorf(d.hdrLine, 1, format.ErrSyntax, "first header column is %s; the header must start with trial,time (epoched) or time (continuous), separated by commas or tabs", quote(h[0]))
	}
	n := len(h) - d.first
	if n == 0 {
		return r.Errorf(d.hdrLine, 0, format.ErrSyntax, "header has no channel columns after %s", strings.Join(h, ","))
	}
	if n > MaxChannels {
		return r.Errorf(d.hdrLine, 0, format.ErrUnsupported, "header has %d channel columns; at most %d are supported", n, MaxChannels)
	}
	d.channels = make([]data.Channel, n)
	seen := make(map[string]int, n)
	for i, name := range h[d.first:] {
		col := d.first + i + 1
		if name == "" {
			return r.Errorf(d.hdrLine, col, format.ErrSyntax, "channel name is empty")
		}
		if c, ok := seen[name]; ok {
			return r.Errorf(d.hdrLine, col, format.ErrSyntax, "duplicate channel name %s (also column %d)", quote(name), c)
		}
		seen[name] = col
		d.channels[i].Name = strings.Clone(name)
	}
	d.hdrEnd = r.Offset()
	return nil
}

// row reads the next data row and checks its field count.
func (d *decoder) row() ([]string, int, error) {
	fs, line, err := d.r.Read()
	if err != nil {
		return nil, line, err
	}
	if want := d.first + len(d.channels); len(fs) != want {
		col := want + 1
		if len(fs) < want {
			col = len(fs)
		}
		return nil, line, d.r.Errorf(line, col, format.ErrSyntax, "row has %d fields; the header has %d", len(fs), want)
	}
	return fs, line, nil
}

func (d *decoder) noRows() error {
	return d.r.Errorf(d.hdrLine, 0, ErrNoData, "header only; no data rows follow")
}

func (d *decoder) value(s string, line, col int) (float32, error) {
	if s == "" {
		return 0, d.r.Errorf(line, col, format.ErrSyntax, "value is empty")
	}
	f, err := parseFloat32(s)
	v := float64(f)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return 0, d.r.Errorf(line, col, format.ErrSyntax, "%s is out of range for float32", quote(s))
		}
		return 0, d.r.Errorf(line, col, format.ErrSyntax, "%s is not a number", quote(s))
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, d.r.Errorf(line, col, format.ErrSyntax, "%s is not a finite number", quote(s))
	}
	return float32(v), nil
}

func (d *decoder) time(s string, line, col int) (float64, error) {
	if s == "" {
		return 0, d.r.Errorf(line, col, format.ErrSyntax, "time is empty")
	}
	v, err := parseFloat64(s)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, d.r.Errorf(line, col, format.ErrSyntax, "time %s is not a finite number", quote(s))
	}
	return v, nil
}

// axis checks the k-th time t of an evenly spaced axis starting at t0,
// whose previous time is prev.
func (d *decoder) axis(k int, t, t0, prev float64, line, col int) error {
	if k == 0 {
		return nil
	}
	dt := t - prev
	if !(dt > 0) {
		return d.r.Errorf(line, col, ErrTimeAxis, "time %s s is not after %s s on the row before; times must increase", fmtT(t), fmtT(prev))
	}
	if k >= 2 {
		mean := (prev - t0) / float64(k-1)
		if math.Abs(dt-mean) > StepTolerance*mean+1e-9 {
			return d.r.Errorf(line, col, ErrTimeAxis, "time step %s s differs from the earlier steps (%s s) by more than 1%%; times must be evenly spaced", fmtT(dt), fmtT(mean))
		}
	}
	return nil
}

func fmtT(t float64) string { return strconv.FormatFloat(t, 'g', 6, 64) }

// rate returns (n−1)/(tl−t0), rounded to 1 µHz when that changes it by no
// more than the rounding error of the times could: 8ε·max(|t0|,|tl|)/(tl−t0)
// relative, clamped to [1e-12, 1e-7].
func (d *decoder) rate(n int, t0, tl float64, line int) (float64, error) {
	if n < 2 {
		what := "the file has"
		if d.epoched {
			what = "the first trial has"
		}
		return 0, d.r.Errorf(line, 0, ErrTimeAxis, "%s one sample; at least two are needed to find the sample rate", what)
	}
	rate := float64(n-1) / (tl - t0)
	if math.IsNaN(rate) || math.IsInf(rate, 0) || rate <= 0 {
		return 0, d.r.Errorf(line, 0, ErrTimeAxis, "times from %s to %s s give no usable sample rate", fmtT(t0), fmtT(tl))
	}
	if err := data.CheckRate(rate); err != nil {
		return 0, d.r.Errorf(line, 0, ErrTimeAxis, "times from %s to %s s over %d samples: %v", fmtT(t0), fmtT(tl), n, err)
	}
	// The rounding error of the times, relative to their span.
	rel := 8 * 0x1p-52 * math.Max(math.Abs(t0), math.Abs(tl)) / (tl - t0)
	rel = math.Min(math.Max(rel, 1e-12), 1e-7)
	if r6 := math.Round(rate*1e6) / 1e6; r6 > 0 && math.Abs(r6-rate) <= rel*rate {
		rate = r6
	}
	return rate, nil
}

// estimate returns how many units of the given byte size probably remain,
// capped so that units·per values stay below maxPrealloc.
func (d *decoder) estimate(unitBytes int64, per int) int {
	if unitBytes <= 0 || per <= 0 {
		return 0
	}
	n := (d.f.Size-d.hdrEnd)/unitBytes + 1
	if lim := int64(maxPrealloc / per); n > lim {
		n = lim
	}
	return int(n)
}

func (d *decoder) continuous() (*format.Data, error) {
	nch := len(d.channels)
	samples := make([][]float32, nch)
	var t0, prev float64
	k, last := 0, d.hdrLine
	for {
		fs, line, err := d.row()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		t, err := d.time(fs[0], line, 1)
		if err != nil {
			return nil, err
		}
		if k == 0 {
			t0 = t
			est := d.estimate(d.r.Offset()-d.hdrEnd, nch)
			for c := range samples {
				samples[c] = make([]float32, 0, est)
			}
		}
		if err := d.axis(k, t, t0, prev, line, 1); err != nil {
			return nil, err
		}
		for c := range samples {
			v, err := d.value(fs[c+1], line, c+2)
			if err != nil {
				return nil, err
			}
			samples[c] = append(samples[c], v)
		}
		prev, last = t, line
		k++
		if k&4095 == 0 {
			if err := data.CheckSamples(int64(k) * int64(nch)); err != nil {
				return nil, d.r.Errorf(line, 0, data.ErrTooLarge, "%v", err)
			}
		}
	}
	if k == 0 {
		return nil, d.noRows()
	}
	if err := data.CheckSamples(int64(k) * int64(nch)); err != nil {
		return nil, d.r.Errorf(last, 0, data.ErrTooLarge, "%v", err)
	}
	rate, err := d.rate(k, t0, prev, last)
	if err != nil {
		return nil, err
	}
	for c := range samples {
		samples[c] = clip(samples[c])
	}
	return &format.Data{Recording: &data.Recording{
		Name: d.f.Name, Format: "csv", Rate: rate, Start: t0,
		Channels: d.channels, Samples: samples,
	}}, nil
}

func (d *decoder) epochs() (*format.Data, error) {
	nch := len(d.channels)
	var (
		ids              []string
		seen             = map[string]int{} // trial id → line of its first row
		cur              string
		t0, prev         float64
		ref              []float64   // times of the first trial
		bufs             [][]float32 // first trial, per channel
		vals             []float32
		ns, k            int
		last             = d.hdrLine
		rate, tol, per   float64
		firstTrialOffset int64
	)
	finishFirst := func(line int) error {
		ns = k
		var err error
		rate, err = d.rate(ns, t0, prev, line)
		if err != nil {
			return err
		}
		per = 1 / rate
		tol = StepTolerance*per + 1e-9
		est := d.estimate(firstTrialOffset-d.hdrEnd, nch*ns)
		if est < 1 {
			est = 1
		}
		vals = make([]float32, nch*ns, est*nch*ns)
		for c, b := range bufs {
			copy(vals[c*ns:], b)
		}
		bufs = nil
		return nil
	}
	for {
		off := d.r.Offset()
		fs, line, err := d.row()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		id := fs[0]
		if id == "" {
			return nil, d.r.Errorf(line, 1, format.ErrSyntax, "trial id is empty")
		}
		t, err := d.time(fs[1], line, 2)
		if err != nil {
			return nil, err
		}
		if len(ids) == 0 || id != cur {
			if at, ok := seen[id]; ok {
				return nil, d.r.Errorf(line, 1, format.ErrSyntax, "trial %s appears again after trial %s; its rows start at line %d and must be contiguous", quote(id), quote(cur), at)
			}
			switch {
			case len(ids) == 1:
				firstTrialOffset = off
				if err := finishFirst(last); err != nil {
					return nil, err
				}
			case len(ids) > 1 && k != ns:
				return nil, d.r.Errorf(last, 1, ErrTimeAxis, "trial %s ends after %d samples; trial %s has %d", quote(cur), k, quote(ids[0]), ns)
			}
			cur = strings.Clone(id)
			ids = append(ids, cur)
			seen[cur] = line
			if len(ids) == 1 {
				t0 = t
				bufs = make([][]float32, nch)
			} else {
				if err := data.CheckSamples(int64(len(vals) + nch*ns)); err != nil {
					return nil, d.r.Errorf(line, 0, data.ErrTooLarge, "%v", err)
				}
				vals = slices.Grow(vals, nch*ns)[:len(vals)+nch*ns]
			}
			k = 0
		}
		if len(ids) == 1 {
			if err := d.axis(k, t, t0, prev, line, 2); err != nil {
				return nil, err
			}
			ref = append(ref, t)
			for c := range bufs {
				v, err := d.value(fs[c+2], line, c+3)
				if err != nil {
					return nil, err
				}
				bufs[c] = append(bufs[c], v)
			}
			if (k+1)&4095 == 0 {
				if err := data.CheckSamples(int64(k+1) * int64(nch)); err != nil {
					return nil, d.r.Errorf(line, 0, data.ErrTooLarge, "%v", err)
				}
			}
		} else {
			if k >= ns {
				return nil, d.r.Errorf(line, 1, ErrTimeAxis, "trial %s has more than %d samples, the length of trial %s", quote(cur), ns, quote(ids[0]))
			}
			if math.Abs(t-ref[k]) > tol {
				return nil, d.r.Errorf(line, 2, ErrTimeAxis, "time %s s differs from %s s at sample %d of trial %s; all trials must share one time axis", fmtT(t), fmtT(ref[k]), k+1, quote(ids[0]))
			}
			base := (len(ids)-1)*nch*ns + k
			for c := 0; c < nch; c++ {
				v, err := d.value(fs[c+2], line, c+3)
				if err != nil {
					return nil, err
				}
				vals[base+c*ns] = v
			}
		}
		prev, last = t, line
		k++
	}
	switch {
	case len(ids) == 0:
		return nil, d.noRows()
	case len(ids) == 1:
		firstTrialOffset = d.f.Size
		if err := finishFirst(last); err != nil {
			return nil, err
		}
	case k != ns:
		return nil, d.r.Errorf(last, 1, ErrTimeAxis, "trial %s ends after %d samples; trial %s has %d", quote(cur), k, quote(ids[0]), ns)
	}
	info := make([]data.Event, len(ids))
	for i, id := range ids {
		info[i].Extra = map[string]string{"trial": id}
	}
	return &format.Data{Epochs: &data.Epochs{
		Name: d.f.Name, Format: "csv", Rate: rate, Start: t0,
		Channels: d.channels, NTrials: len(ids), NSamples: ns,
		Data: clip(vals), TrialInfo: info,
	}}, nil
}

// clip returns s without more than a quarter of spare capacity.
func clip(s []float32) []float32 {
	if cap(s)-len(s) <= len(s)/4 {
		return s
	}
	return slices.Clone(s)
}
