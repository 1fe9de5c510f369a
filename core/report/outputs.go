package report

import (
	"archive/zip"
	"bytes"
	"io"
	"path"
	"time"
)

// OutFile is one output file of a run: its path inside the output
// directory (slash-separated) and its bytes.
type OutFile struct {
	Name string
	Data []byte
}

// Outputs lists every file a run writes, in the layout of `amplink run
// --out DIR`: results.json, recipe.json, maps/<name>.csv, figures/<name>.svg
// and results.csv last (the CLI moves it into place last, so that a failed
// run leaves none). The page's archive has the same files.
func Outputs(res *Results) ([]OutFile, error) {
	var out []OutFile
	add := func(name string, fill func(w io.Writer) error) error {
		var b bytes.Buffer
		if err := fill(&b); err != nil {
			return err
		}
		out = append(out, OutFile{Name: name, Data: b.Bytes()})
		return nil
	}
	if err := add("results.json", func(w io.Writer) error { return WriteJSON(w, res) }); err != nil {
		return nil, err
	}
	out = append(out, OutFile{Name: "recipe.json", Data: res.Recipe})
	// Distinct channels may sanitise alike (A/B, A_B): unique, stable names.
	var mn, fn []string
	for i := range res.Maps {
		mn = append(mn, res.Maps[i].Name)
	}
	for i := range res.Figures {
		fn = append(fn, res.Figures[i].Name)
	}
	mapNames, figNames := UniqueNames(mn, '_'), UniqueNames(fn, '_')
	for i := range res.Maps {
		m := &res.Maps[i]
		if err := add(path.Join("maps", mapNames[i]+".csv"), func(w io.Writer) error { return WriteMapCSV(w, m) }); err != nil {
			return nil, err
		}
	}
	for i, f := range res.Figures {
		out = append(out, OutFile{Name: path.Join("figures", figNames[i]+".svg"), Data: []byte(f.SVG)})
	}
	if err := add("results.csv", func(w io.Writer) error { return WriteCSV(w, res) }); err != nil {
		return nil, err
	}
	return out, nil
}

// zipTime is the modification time of every archive entry: a fixed time,
// so the same results give the same archive bytes.
var zipTime = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

// WriteZip writes files as a zip archive (deflated), results.csv first so
// that it is the first thing an archive viewer lists.
func WriteZip(w io.Writer, files []OutFile) error {
	zw := zip.NewWriter(w)
	order := make([]OutFile, 0, len(files))
	for _, f := range files {
		if f.Name == "results.csv" {
			order = append(order, f)
		}
	}
	for _, f := range files {
		if f.Name != "results.csv" {
			order = append(order, f)
		}
	}
	for _, f := range order {
		fw, err := zw.CreateHeader(&zip.FileHeader{Name: f.Name, Method: zip.Deflate, Modified: zipTime})
		if err != nil {
			return err
		}
		if _, err := fw.Write(f.Data); err != nil {
			return err
		}
	}
	return zw.Close()
}
