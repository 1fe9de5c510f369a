package edf_test

import (
	"bytes"
	"fmt"

	"amplink/core/data"
	"amplink/core/format"
	"amplink/core/format/edf"
)

func Example() {
	r := &data.Recording{
		Rate:     4,
		Channels: []data.Channel{{Name: "Cz", Label: "EEG Cz-Ref", Unit: "uV"}},
		Samples:  [][]float32{{0, 10, 20, 30, 40, 50, 60, 70}},
		Events:   []data.Event{{Onset: 0.5, Duration: 0.25, Type: "tone"}},
	}
	var b bytes.Buffer
	if err := edf.Write(&b, r, edf.WriteOptions{}); err != nil {
		fmt.Println(err)
		return
	}
	d, err := format.Decode(format.Bytes("cz.edf", b.Bytes()), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	got := d.Recording
	c := got.Channels[0]
	fmt.Println(got.Format, got.Rate, "Hz", c.Name, c.Type, c.Unit, len(got.Samples[0]), "samples")
	fmt.Printf("%.2f %+v\n", got.Samples[0][3], got.Events[0])
	// Output:
	// edf 4 Hz Cz EEG uV 8 samples
	// 30.00 {Onset:0.5 Duration:0.25 Type:tone Extra:map[]}
}
