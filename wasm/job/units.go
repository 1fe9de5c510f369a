package job

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"

	"amplink/core/pipeline"
)

// Unit results cross the worker boundary as bytes, not JSON: JSON has no
// NaN, and the bytes keep every float64 exact, so the page's results equal
// a native run's bit for bit.
//
// Layout, little-endian: count uint32, then per unit: id uint32, n uint32,
// n float64 values.

// ErrUnitBytes reports a unit buffer that does not parse.
var ErrUnitBytes = errors.New("malformed unit results")

// EncodeUnits packs unit results.
func EncodeUnits(res []pipeline.UnitResult) []byte {
	n := 4
	for _, r := range res {
		n += 8 + 8*len(r.Values)
	}
	b := make([]byte, 0, n)
	b = binary.LittleEndian.AppendUint32(b, uint32(len(res)))
	for _, r := range res {
		b = binary.LittleEndian.AppendUint32(b, uint32(r.ID))
		b = binary.LittleEndian.AppendUint32(b, uint32(len(r.Values)))
		for _, v := range r.Values {
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(v))
		}
	}
	return b
}

// DecodeUnits unpacks EncodeUnits output. It checks every length against
// the bytes left before allocating.
func DecodeUnits(b []byte) ([]pipeline.UnitResult, error) {
	if len(b) < 4 {
		return nil, fmt.Errorf("%w: %d bytes, want at least 4", ErrUnitBytes, len(b))
	}
	count := binary.LittleEndian.Uint32(b)
	off := 4
	if uint64(count)*8 > uint64(len(b)-off) {
		return nil, fmt.Errorf("%w: %d units cannot fit in %d bytes", ErrUnitBytes, count, len(b))
	}
	out := make([]pipeline.UnitResult, 0, count)
	for i := uint32(0); i < count; i++ {
		if len(b)-off < 8 {
			return nil, fmt.Errorf("%w: unit %d: header truncated at byte %d", ErrUnitBytes, i, off)
		}
		id := binary.LittleEndian.Uint32(b[off:])
		n := binary.LittleEndian.Uint32(b[off+4:])
		off += 8
		if uint64(n)*8 > uint64(len(b)-off) {
			return nil, fmt.Errorf("%w: unit %d: %d values truncated at byte %d", ErrUnitBytes, i, n, off)
		}
		vals := make([]float64, n)
		for k := range vals {
			vals[k] = math.Float64frombits(binary.LittleEndian.Uint64(b[off:]))
			off += 8
		}
		out = append(out, pipeline.UnitResult{ID: int(id), Values: vals})
	}
	if off != len(b) {
		return nil, fmt.Errorf("%w: %d bytes left over at byte %d", ErrUnitBytes, len(b)-off, off)
	}
	return out, nil
}
