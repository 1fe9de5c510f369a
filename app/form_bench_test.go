package app

import (
	"testing"

	"amplink/core/demo"
)

// BenchmarkFormValidate is the work the page's thread does on every field
// change: build the recipe JSON from the form and parse it.
func BenchmarkFormValidate(b *testing.B) {
	f, err := FormFromJSON(demo.Recipe())
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, _, err := f.Validate(); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkFragment is making a share link and reading it back.
func BenchmarkFragment(b *testing.B) {
	rj := demo.Recipe()
	for b.Loop() {
		if _, err := DecodeFragment(EncodeFragment(rj)); err != nil {
			b.Fatal(err)
		}
	}
}
