package format

import (
	"errors"
	"fmt"
	"io"
	"strings"
	"sync"
	"testing"

	"amplink/core/data"
)

// Fake formats, registered once per test binary under names no real format
// uses. Their decoders record what they were given.
var (
	registerOnce sync.Once
	registered   bool
	lastSib      Siblings
)

func fakeDecoder(name string) func(File, Siblings) (*Data, error) {
	return func(f File, sib Siblings) (*Data, error) {
		lastSib = sib
		switch {
		case strings.Contains(f.Name, "fail"):
			return nil, fmt.Errorf("%s: %s: broken", name, f.Name)
		case strings.Contains(f.Name, "nothing"):
			return &Data{}, nil
		case strings.Contains(f.Name, "both"):
			return &Data{Recording: &data.Recording{}, Epochs: &data.Epochs{}}, nil
		case strings.Contains(f.Name, "epochs"):
			return &Data{Epochs: &data.Epochs{Name: f.Name}}, nil
		case strings.Contains(f.Name, "named"):
			return &Data{Recording: &data.Recording{Name: f.Name, Format: "own"}}, nil
		}
		return &Data{Recording: &data.Recording{Name: f.Name}}, nil
	}
}

func registerFakes() {
	registerOnce.Do(func() {
		Register(Format{Name: "zz-test-magic", Magic: "AB?D", Decode: fakeDecoder("zz-test-magic")})
		Register(Format{Name: "zz-test-magic2", Magic: "\xffXY", Decode: fakeDecoder("zz-test-magic2")})
		Register(Format{Name: "zz-test-ext", Ext: []string{".zzt", ".zzx"}, Decode: fakeDecoder("zz-test-ext")})
		Register(Format{Name: "zz-test-match", Decode: fakeDecoder("zz-test-match"),
			Match: func(head []byte, name string) bool { return strings.HasPrefix(string(head), "match me") }})
		Register(Format{Name: "zz-test-fallback", Fallback: true, Decode: fakeDecoder("zz-test-fallback")})
		registered = true
	})
}

// TestUnknown must see the registry before the fakes are added: with no
// fallback registered nothing fits. It is skipped when another test in the
// binary registered them first (e.g. with -shuffle or -count).
func TestUnknown(t *testing.T) {
	if registered || len(Names()) > 0 {
		t.Skip("formats already registered")
	}
	if f, ok := Detect([]byte("anything"), "x.bin"); ok {
		t.Fatalf("Detect found %q in an empty registry", f.Name)
	}
	_, err := Decode(Bytes("x.bin", []byte("anything")), nil)
	if !errors.Is(err, ErrUnknown) || err.Error() != "x.bin: unknown format (formats: )" {
		t.Fatalf("error %v, want ErrUnknown", err)
	}
}

func TestDetect(t *testing.T) {
	registerFakes()
	for _, tc := range []struct {
		name, head, file, want string
	}{
		{"magic", "ABCDEF", "x.bin", "zz-test-magic"},
		{"magic wildcard", "AB\x00D", "x.bin", "zz-test-magic"},
		{"magic beats extension", "ABzD", "x.zzt", "zz-test-magic"},
		{"second magic", "\xffXYZ", "x", "zz-test-magic2"},
		{"magic mismatch", "ABCE", "x.bin", "zz-test-fallback"},
		{"head shorter than magic", "AB", "x.bin", "zz-test-fallback"},
		{"extension", "hello", "rec.zzt", "zz-test-ext"},
		{"extension case", "hello", "REC.ZZX", "zz-test-ext"},
		{"extension beats match", "match me", "rec.zzx", "zz-test-ext"},
		{"match", "match me please", "rec.bin", "zz-test-match"},
		{"fallback", "time,Fz\n", "rec.csv", "zz-test-fallback"},
		{"empty head", "", "rec", "zz-test-fallback"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f, ok := Detect([]byte(tc.head), tc.file)
			if !ok || f.Name != tc.want {
				t.Errorf("Detect(%q, %q) = %q, %v; want %q", tc.head, tc.file, f.Name, ok, tc.want)
			}
		})
	}
}

func TestDecode(t *testing.T) {
	registerFakes()
	for _, tc := range []struct {
		name, file, body string
		format, err      string
		epochs           bool
	}{
		{"sets format", "a.zzt", "x", "zz-test-ext", "", false},
		{"keeps own format", "named.zzt", "x", "own", "", false},
		{"epochs", "epochs.bin", "ABCD", "zz-test-magic", "", true},
		{"decoder error", "fail.zzt", "x", "", "zz-test-ext: fail.zzt: broken", false},
		{"no data", "nothing.zzt", "x", "", "format: zz-test-ext decoder returned no data for nothing.zzt", false},
		{"both", "both.zzt", "x", "", "format: zz-test-ext decoder returned no data for both.zzt", false},
		{"empty", "a.zzt", "", "", "a.zzt: empty file", false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lastSib = nil
			d, err := Decode(Bytes(tc.file, []byte(tc.body)), nil)
			if tc.err != "" {
				if err == nil || err.Error() != tc.err || d != nil {
					t.Fatalf("got %v, %v; want error %s", d, err, tc.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if _, ok := lastSib.(NoSiblings); !ok {
				t.Errorf("decoder got siblings %T, want NoSiblings for nil", lastSib)
			}
			got := ""
			if tc.epochs {
				got = d.Epochs.Format
			} else {
				got = d.Recording.Format
			}
			if got != tc.format {
				t.Errorf("format %q, want %q", got, tc.format)
			}
		})
	}
}

type errReader struct{}

func (errReader) ReadAt([]byte, int64) (int, error) { return 0, io.ErrClosedPipe }

func TestDecodeReadError(t *testing.T) {
	_, err := Decode(File{Name: "p.bin", R: errReader{}, Size: 10}, nil)
	if !errors.Is(err, io.ErrClosedPipe) || err.Error() != "p.bin: io: read/write on closed pipe" {
		t.Fatalf("error %v", err)
	}
}

func TestRegisterDuplicate(t *testing.T) {
	registerFakes()
	defer func() {
		if r := recover(); r != "format: duplicate format zz-test-ext" {
			t.Errorf("recover() = %v", r)
		}
	}()
	Register(Format{Name: "zz-test-ext"})
}

func TestNoSiblings(t *testing.T) {
	_, err := NoSiblings{}.Open("events.tsv")
	if !errors.Is(err, ErrNoSibling) || err.Error() != "events.tsv: no such file" {
		t.Fatalf("error %v", err)
	}
}

// TestErrorString checks the two message shapes documented on Error.
func TestErrorString(t *testing.T) {
	for _, tc := range []struct {
		e    Error
		want string
	}{
		{Error{Format: "csv", File: "trials.csv", Line: 1042, Column: 3, Offset: -1, Err: errors.New(`"abc" is not a number`)},
			`csv: trials.csv:1042:3: "abc" is not a number`},
		{Error{Format: "csv", File: "a.csv", Line: 7, Offset: -1, Err: errors.New("m")}, "csv: a.csv:7: m"},
		{Error{Format: "edf", File: "rec.edf", Offset: 236, Field: "number of data records", Err: errors.New("not an integer")},
			"edf: rec.edf: offset 236 (number of data records): not an integer"},
		{Error{File: "x", Offset: -1, Err: ErrTruncated}, "x: file is truncated"},
	} {
		t.Run(tc.want, func(t *testing.T) {
			if got := tc.e.Error(); got != tc.want {
				t.Errorf("got %q, want %q", got, tc.want)
			}
			if !errors.Is(&tc.e, tc.e.Err) {
				t.Error("Unwrap does not give Err")
			}
		})
	}
}
