package edf

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

// rawSig is one signal of a hand-built file; fields are written as given.
type rawSig struct{ label, dim, pmin, pmax, dmin, dmax, spr string }

// rawFile builds a file byte by byte from the layout in REFERENCES.md
// (Kemp et al. 1992), independently of the writer.
func rawFile(version, reserved, records, dur string, sigs []rawSig, samples []byte) []byte {
	var b bytes.Buffer
	put := func(s string, w int) { fmt.Fprintf(&b, "%-*s", w, s) }
	b.WriteString(version)
	put("X X X X", 80)
	put("Startdate X X X X", 80)
	put("01.02.03", 8)
	put("04.05.06", 8)
	put(fmt.Sprint(256*(len(sigs)+1)), 8)
	put(reserved, 44)
	put(records, 8)
	put(dur, 8)
	put(fmt.Sprint(len(sigs)), 4)
	for _, f := range []struct {
		w   int
		get func(s rawSig) string
	}{
		{16, func(s rawSig) string { return s.label }},
		{80, func(rawSig) string { return "" }},
		{8, func(s rawSig) string { return s.dim }},
		{8, func(s rawSig) string { return s.pmin }},
		{8, func(s rawSig) string { return s.pmax }},
		{8, func(s rawSig) string { return s.dmin }},
		{8, func(s rawSig) string { return s.dmax }},
		{80, func(rawSig) string { return "" }},
		{8, func(s rawSig) string { return s.spr }},
		{32, func(rawSig) string { return "" }},
	} {
		for _, s := range sigs {
			put(f.get(s), f.w)
		}
	}
	b.Write(samples)
	return b.Bytes()
}

// TestWorkedExamples checks the scaling and 24-bit examples of REFERENCES.md
// ("File formats", computed): d = 1000 (bytes E8 03) with pmin/pmax
// −3276.8/3276.7 and dmin/dmax −32768/32767 is 100.0; BDF bytes 28 BE FF
// are −16856.
func TestWorkedExamples(t *testing.T) {
	s := Signal{PhysMin: -3276.8, PhysMax: 3276.7, DigMin: -32768, DigMax: 32767}
	if got := s.Physical(1000); math.Abs(got-100) > 1e-9 {
		t.Errorf("Physical(1000) = %v, want 100.0", got)
	}
	dst := make([]float32, 1)
	scale16(dst, []byte{0xE8, 0x03}, &s)
	if dst[0] != 100 {
		t.Errorf("scale16(E8 03) = %v, want 100", dst[0])
	}
	if got := int24([]byte{0x28, 0xBE, 0xFF}); got != -16856 {
		t.Errorf("int24(28 BE FF) = %d, want -16856", got)
	}
	// int24 extremes, common practice (two's complement)
	for _, c := range []struct {
		b    []byte
		want int
	}{{[]byte{0xFF, 0xFF, 0x7F}, 1<<23 - 1}, {[]byte{0, 0, 0x80}, -1 << 23}, {[]byte{0xFF, 0xFF, 0xFF}, -1}} {
		if got := int24(c.b); got != c.want {
			t.Errorf("int24(% X) = %d, want %d", c.b, got, c.want)
		}
	}
	// The same through whole files: scale.edf and scale.bdf (hand-built).
	for _, tc := range []struct {
		file string
		want float32
	}{{"scale.edf", 100}, {"scale.bdf", -16856}} {
		rec, _, err := decodeBytes(tc.file, readFile(t, tc.file))
		if err != nil {
			t.Fatal(err)
		}
		if got := rec.Samples[0][0]; got != tc.want {
			t.Errorf("%s: sample %v, want %v", tc.file, got, tc.want)
		}
	}
}

// Field offsets in ours.edf (4 signals: header 1280 bytes).
const (
	oursDMax  = 256 + 4*(16+80+8+8+8+8) // digital maximum of signal 1
	oursDMin  = 256 + 4*(16+80+8+8+8)
	oursPMin  = 256 + 4*(16+80+8)
	oursPMax  = 256 + 4*(16+80+8+8)
	oursSPR   = 256 + 4*(16+80+8+8+8+8+8+80)
	oursBytes = 1280
)

func set(b []byte, off int, s string) []byte {
	b = bytes.Clone(b)
	copy(b[off:], s)
	return b
}

func replace(b []byte, old, new string) []byte {
	if len(old) != len(new) || bytes.Count(b, []byte(old)) != 1 {
		panic(fmt.Sprintf("edf test: %q must occur once and keep its length", old))
	}
	return bytes.Replace(b, []byte(old), []byte(new), 1)
}

// generated lists the files of testdata/edf made by this test from ours.edf
// or by rawFile. TestGenerated keeps the committed bytes in step; -update
// rewrites them.
func generated(t testing.TB) map[string][]byte {
	base := readFile(t, "ours.edf")
	n := len(base)
	d := func(b []byte) []byte { return set(b, 192, "EDF+D") }
	return map[string][]byte{
		"scale.edf": rawFile(magicEDF, "", "1", "1", []rawSig{{"EEG X", "uV", "-3276.8", "3276.7", "-32768", "32767", "1"}}, []byte{0xE8, 0x03}),
		"scale.bdf": rawFile(magicBDF, "24BIT", "1", "1", []rawSig{{"X", "uV", "-8388608", "8388607", "-8388608", "8388607", "1"}}, []byte{0x28, 0xBE, 0xFF}),
		// rates: two signals with 4 samples per record and two with 2 (a tie:
		// the higher rate wins); names: duplicate short names and labels.
		"names.edf": rawFile(magicEDF, "", "1", "0.5", []rawSig{
			{"EEG Fz-Ref", "uV", "-1", "1", "-32768", "32767", "4"},
			{"EOG Fz-Ref", "uV", "-1", "1", "-32768", "32767", "4"},
			{"EMG chin", "uV", "-1", "1", "-32768", "32767", "2"},
			{"EMG chin", "uV", "-1", "1", "-32768", "32767", "2"},
			{"Resp nasal", "", "-1", "1", "-32768", "32767", "4"},
			{"", "", "-1", "1", "-32768", "32767", "4"},
			{"Temp", "degC", "-1", "1", "-32768", "32767", "4"},
			{"Temp", "degC", "-1", "1", "-32768", "32767", "4"},
		}, make([]byte, 2*(6*4+2*2))),
		"edfd-contiguous.edf":                 d(base),
		"records-unknown.edf":                 set(base, 236, "-1      "),
		"trailing.edf":                        append(bytes.Clone(base), "garbage"...),
		"invalid-truncated-header.edf":        base[:200],
		"invalid-truncated-signal-header.edf": base[:700],
		"invalid-truncated-record.edf":        base[:n-10],
		"invalid-records-unknown-partial.edf": set(base, 236, "-1      ")[:n-10],
		"invalid-ns0.edf":                     set(base, 252, "0   "),
		"invalid-ns-too-many.edf":             set(base, 252, "5000"),
		"invalid-header-bytes.edf":            set(base, 184, "1024    "),
		"invalid-records-absurd.edf":          set(base, 236, "99999999"),
		"invalid-records-zero.edf":            set(base, 236, "0       "),
		"invalid-records-nonnumeric.edf":      set(base, 236, "abc     "),
		"invalid-duration.edf":                set(base, 244, "-1      "),
		"invalid-duration-zero.edf":           set(base, 244, "0       "),
		"invalid-version.edf":                 set(base, 0, "1       "),
		"invalid-reserved.edf":                set(base, 192, "EDF+X"),
		"invalid-date.edf":                    set(base, 168, "31.02.24"),
		"invalid-time.edf":                    set(base, 176, "25.00.00"),
		"invalid-digital-equal.edf":           set(base, oursDMax+8, "-32768  "),
		"invalid-digital-range.edf":           set(base, oursDMin, "-40000  "),
		"invalid-physical-equal.edf":          set(base, oursPMax+16, string(base[oursPMin+16:oursPMin+24])),
		"invalid-physmin-comma.edf":           set(base, oursPMin+8, "-1,5    "),
		"invalid-spr-zero.edf":                set(base, oursSPR+8, "0       "),
		"invalid-tal-start.edf":               replace(base, "+2\x14\x14", "*2\x14\x14"),
		"invalid-tal-unterminated.edf":        replace(base, "button\x14", "button\x00"),
		"invalid-tal-no-stamp.edf":            replace(base, "+1\x14\x14\x00", "+1\x14x\x14"),
		"invalid-tal-onset.edf":               replace(base, "+3.75\x15", "+3.7.\x15"),
		"invalid-edfd-gap.edf":                replace(d(base), "+3\x14\x14", "+7\x14\x14"),
		"invalid-edfd-overlap.edf":            replace(d(base), "+3\x14\x14", "+2\x14\x14"),
	}
}

func TestGenerated(t *testing.T) {
	gen := generated(t)
	names := make([]string, 0, len(gen))
	for k := range gen {
		names = append(names, k)
	}
	sort.Strings(names)
	for _, name := range names {
		t.Run(name, func(t *testing.T) { golden(t, name, gen[name]) })
	}
}

// TestInvalid decodes every invalid-* file of testdata/edf; the messages are
// in the golden file invalid.golden, one "file<TAB>error" line each.
func TestInvalid(t *testing.T) {
	paths, err := filepath.Glob(filepath.Join(dir, "invalid-*.edf"))
	if err != nil || len(paths) < 10 {
		t.Fatalf("found %d invalid-* files: %v", len(paths), err)
	}
	sentinel := []struct {
		part string
		err  error
	}{
		{"truncated", format.ErrTruncated}, {"records-absurd", format.ErrTruncated},
		{"unknown-partial", format.ErrTruncated},
		{"duration-zero", format.ErrUnsupported}, {"edfd-gap", format.ErrUnsupported},
	}
	var out strings.Builder
	for _, p := range paths {
		name := filepath.Base(p)
		t.Run(name, func(t *testing.T) {
			b, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			_, _, err = decodeBytes(name, b)
			if err == nil {
				t.Fatal("decoded without error")
			}
			fmt.Fprintf(&out, "%s\t%v\n", name, err)
			var fe *format.Error
			if !errors.As(err, &fe) || fe.File != name || fe.Offset < 0 || fe.Field == "" {
				t.Errorf("error %#v does not name the file, the offset and the field", err)
			}
			want := format.ErrSyntax
			for _, s := range sentinel {
				if strings.Contains(name, s.part) {
					want = s.err
				}
			}
			if !errors.Is(err, want) {
				t.Errorf("error %v does not wrap %v", err, want)
			}
			// The registry must route the file here (by magic or by extension).
			if _, err2 := format.Decode(format.Bytes(name, b), nil); err2 == nil || err2.Error() != err.Error() {
				t.Errorf("format.Decode: %v", err2)
			}
		})
	}
	golden(t, "invalid.golden", []byte(out.String()))
}

// TestValid decodes the valid variants of testdata/edf.
func TestValid(t *testing.T) {
	ours, _, err := decodeBytes("ours.edf", readFile(t, "ours.edf"))
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		file     string
		records  int64
		unknown  bool
		discont  bool
		notes    []string
		channels []data.Channel // nil: those of ours.edf
		rate     float64
	}{
		{file: "ours.edf", records: 5, rate: 250},
		{file: "edfd-contiguous.edf", records: 5, discont: true, rate: 250},
		{file: "records-unknown.edf", records: 5, unknown: true, rate: 250},
		{file: "trailing.edf", records: 5, rate: 250, notes: []string{"7 byte(s) after the last data record (offset 8890) ignored"}},
		{file: "names.edf", records: 1, rate: 8,
			notes: []string{
				"2 signal(s) with another sampling rate set aside: EMG chin (4 Hz), EMG chin (4 Hz); kept 6 at 8 Hz",
				`signal 6 "" is called "signal 6"`,
				`signal 8 "Temp" is called "Temp.2"`,
			},
			channels: []data.Channel{
				{Name: "EEG Fz-Ref", Label: "EEG Fz-Ref", Type: "EEG", Unit: "uV"},
				{Name: "EOG Fz-Ref", Label: "EOG Fz-Ref", Type: "EOG", Unit: "uV"},
				{Name: "nasal", Label: "Resp nasal", Type: "RESP"},
				{Name: "signal 6"},
				{Name: "Temp", Label: "Temp", Unit: "degC"},
				{Name: "Temp.2", Label: "Temp", Unit: "degC"},
			}},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			b := readFile(t, tc.file)
			d, err := format.Decode(format.Bytes(tc.file, b), nil)
			if err != nil {
				t.Fatal(err)
			}
			rec := d.Recording
			_, h, _ := decodeBytes(tc.file, b)
			if h.Records != tc.records || h.RecordsUnknown != tc.unknown || h.Discontinuous != tc.discont {
				t.Errorf("records %d (unknown %v), discontinuous %v", h.Records, h.RecordsUnknown, h.Discontinuous)
			}
			if rec.Rate != tc.rate || rec.Format != "edf" {
				t.Errorf("rate %v, format %q", rec.Rate, rec.Format)
			}
			if strings.Join(rec.Notes, "\n") != strings.Join(tc.notes, "\n") {
				t.Errorf("notes\n%s\nwant\n%s", strings.Join(rec.Notes, "\n"), strings.Join(tc.notes, "\n"))
			}
			want := tc.channels
			if want == nil {
				want = ours.Channels
				for c := range rec.Samples {
					if !slicesEqual(rec.Samples[c], ours.Samples[c]) {
						t.Errorf("channel %d differs from ours.edf", c)
					}
				}
				if !equalEvents(rec.Events, ours.Events, 0) {
					t.Errorf("events differ from ours.edf")
				}
			}
			if !equalChannels(rec.Channels, want) {
				t.Errorf("channels\n%+v\nwant\n%+v", rec.Channels, want)
			}
		})
	}
	// ours.edf holds fixture(): labels, types, units, events (réponse-free ASCII).
	wantCh := []data.Channel{
		{Name: "Fz", Label: "EEG Fz", Type: "EEG", Unit: "uV"},
		{Name: "Cz", Label: "EEG Cz", Type: "EEG", Unit: "uV"},
		{Name: "noise", Label: "noise", Unit: "mV"},
	}
	if !equalChannels(ours.Channels, wantCh) || !equalEvents(ours.Events, fixture().Events, 0) {
		t.Errorf("ours.edf: channels %+v events %+v", ours.Channels, ours.Events)
	}
}

func slicesEqual(a, b []float32) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// TestDetect checks the magic bytes in the registry.
func TestDetect(t *testing.T) {
	for _, tc := range []struct {
		head, name, want string
	}{
		{"0       X X X", "a.dat", "edf"},
		{"\xffBIOSEMIX X", "a.dat", "bdf"},
		{"junk", "x.EDF", "edf"},
		{"junk", "x.bdf", "bdf"},
	} {
		f, ok := format.Detect([]byte(tc.head), tc.name)
		if !ok || f.Name != tc.want {
			t.Errorf("Detect(%q, %q) = %q, %v; want %q", tc.head, tc.name, f.Name, ok, tc.want)
		}
	}
}
