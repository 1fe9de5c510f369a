package report

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"testing"
)

// writeJSONEncoder is WriteJSON through encoding/json alone (every row a
// RawMessage, the whole document indented by the encoder): the reference
// WriteJSON's hand-indented rows must equal byte for byte.
func writeJSONEncoder(res *Results) []byte {
	header, cells := res.Table()
	out := jsonOut{Columns: header, Rows: []json.RawMessage{}, Maps: []string{}, Figures: []map[string]string{}, Warnings: res.Warnings}
	if out.Warnings == nil {
		out.Warnings = []string{}
	}
	last := map[string]int{}
	for i, c := range header {
		last[c] = i
	}
	var keys []string
	for c := range last {
		keys = append(keys, c)
	}
	sort.Strings(keys)
	for _, row := range cells {
		obj := []byte{'{'}
		for k, c := range keys {
			if k > 0 {
				obj = append(obj, ',')
			}
			q, _ := json.Marshal(c)
			obj = append(append(obj, q...), ':')
			v := row[last[c]]
			switch {
			case v == "":
				obj = append(obj, "null"...)
			case isJSONNumber(v) && c != "seed" && c != "target" && c != "analysis" && c != "recording":
				obj = append(obj, v...)
			default:
				q, _ := json.Marshal(v)
				obj = append(obj, q...)
			}
		}
		out.Rows = append(out.Rows, append(obj, '}'))
	}
	for _, m := range res.Maps {
		out.Maps = append(out.Maps, m.Name)
	}
	for _, f := range res.Figures {
		out.Figures = append(out.Figures, map[string]string{"name": f.Name, "title": f.Title})
	}
	if len(res.Recipe) > 0 && json.Valid(res.Recipe) {
		out.Recipe = json.RawMessage(res.Recipe)
	}
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", "  ")
	enc.Encode(out)
	return b.Bytes()
}

func TestWriteJSONEqualsEncoder(t *testing.T) {
	many := &Results{Recipe: []byte(`{"analyses": [{"id": "x", "note": "\n  \"rows\": []"}]}`), Warnings: []string{"a <warning> & \"more\""}}
	for i := range 3000 { // past the 32 KiB flush
		many.Rows = append(many.Rows, Row{Analysis: "a", Type: "envelope", Seed: fmt.Sprint("S", i), Target: "T\u2028é<>&\"\\\t", Method: "pearson", N: i, R: math.Sin(float64(i)), P: math.NaN(),
			Extra: []Field{{"note", "\n  \"rows\": []"}, {"z", "1e-300"}, {"a_b", ""}}})
	}
	many.Maps = []Map{{Name: "m<1>"}}
	many.Figures = []Figure{{Name: "f", Title: "t & u"}}
	for name, res := range map[string]*Results{"sample": sample(), "empty": {}, "many": many} {
		var got bytes.Buffer
		if err := WriteJSON(&got, res); err != nil {
			t.Fatal(err)
		}
		if want := writeJSONEncoder(res); !bytes.Equal(got.Bytes(), want) {
			t.Errorf("%s: WriteJSON differs from the encoder's document (%d bytes, want %d)", name, got.Len(), len(want))
		}
	}
}
