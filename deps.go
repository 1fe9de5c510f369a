//go:build tools

// Package amplink pins module versions that are not yet imported by any
// package, so that `go mod tidy` keeps them at the exact versions required.
package amplink

import (
	_ "github.com/hajimehoshi/go-mp3"
	_ "github.com/maxence-charriere/go-app/v9/pkg/app"
	_ "gonum.org/v1/gonum/floats"
)
