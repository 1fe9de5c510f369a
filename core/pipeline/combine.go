package pipeline

import (
	"amplink/core/dataset"
	"amplink/core/figures"
	"amplink/core/report"
)

// Combined joins the results of several recordings analysed with one
// recipe, as `amplink run FILE...` and `amplink run --dataset` write them,
// so that the page can give the same tables: every row gets a "recording"
// field (the recording's file name); with several recordings, map and
// figure names get the recording's stem as a prefix and warnings its name;
// Group then appends the group rows and figures.
type Combined struct {
	several bool
	res     *report.Results
	n       int
}

// NewCombined starts the results of a run over recordings recordings; the
// names get prefixes when there is more than one.
func NewCombined(recordings int) *Combined {
	return &Combined{several: recordings > 1}
}

// Add appends one recording's results. name is its file name (no folders);
// res is changed in place.
func (c *Combined) Add(name string, res *report.Results) {
	if c.several {
		stem := dataset.Stem(name)
		for i := range res.Maps {
			res.Maps[i].Name = stem + "_" + res.Maps[i].Name
		}
		for i := range res.Figures {
			res.Figures[i].Name = stem + "_" + res.Figures[i].Name
		}
		for i, w := range res.Warnings {
			res.Warnings[i] = name + ": " + w
		}
	}
	for i := range res.Rows {
		res.Rows[i].Extra = append(res.Rows[i].Extra, report.Field{Name: "recording", Value: name})
	}
	c.n++
	if c.res == nil {
		c.res = res
		return
	}
	c.res.Rows = append(c.res.Rows, res.Rows...)
	c.res.Maps = append(c.res.Maps, res.Maps...)
	c.res.Figures = append(c.res.Figures, res.Figures...)
	c.res.Warnings = append(c.res.Warnings, res.Warnings...)
}

// Recordings is the number of recordings added.
func (c *Combined) Recordings() int { return c.n }

// Results returns the combined results so far; nil before the first Add.
func (c *Combined) Results() *report.Results { return c.res }

// Group appends the group rows of report.GroupRows (groups and level as
// there) and, when draw is true, the group figures. It needs at least two
// recordings.
func (c *Combined) Group(groups map[string]string, level float64, draw bool) error {
	g, err := report.GroupRows(c.res.Rows, groups, level)
	if err != nil {
		return err
	}
	c.res.Rows = append(c.res.Rows, g...)
	if draw {
		c.res.Figures = append(c.res.Figures, figures.Group(c.res.Rows)...)
	}
	return nil
}
