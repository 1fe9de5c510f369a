package f32_test

import (
	"bytes"
	"fmt"

	"amplink/core/data"
	"amplink/core/format"
	"amplink/core/format/f32"
)

type files map[string][]byte

func (m files) Open(name string) (format.File, error) {
	b, ok := m[name]
	if !ok {
		return format.File{}, fmt.Errorf("%s: %w", name, format.ErrNoSibling)
	}
	return format.Bytes(name, b), nil
}

func Example() {
	e := data.NewEpochs(500, -0.002, []data.Channel{{Name: "Fz", Unit: "uV"}, {Name: "Cz", Unit: "uV"}}, 2, 3)
	for i := range e.Data {
		e.Data[i] = float32(i)
	}
	var bin, side bytes.Buffer
	if err := f32.Write(&bin, &side, e); err != nil {
		fmt.Println(err)
		return
	}
	d, err := format.Decode(format.Bytes("run1.f32", bin.Bytes()), files{"run1.json": side.Bytes()})
	if err != nil {
		fmt.Println(err)
		return
	}
	g := d.Epochs
	fmt.Println(g.Format, bin.Len(), "bytes,", g.NTrials, "trials of", data.Names(g.Channels), "at", g.Rate, "Hz")
	fmt.Println("trial 2, Cz:", g.Trial(1, 1), g.Channels[1].Unit, "from", g.Time(0), "s")
	// Output:
	// f32 48 bytes, 2 trials of [Fz Cz] at 500 Hz
	// trial 2, Cz: [9 10 11] uV from -0.002 s
}
