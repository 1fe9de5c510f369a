//go:build !wasm

package app

import (
	"time"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app/wire"
)

// Natively the page is only rendered (to pre-render the static site), never
// run: these stand-ins do nothing.

type handle = struct{}

type buffer = struct{}

type pool struct{}

func workerCount() int { return 1 }

func newPool(int, func(int, wire.Reply, []buffer)) *pool { return &pool{} }

func (p *pool) restart()                                   {}
func (p *pool) size() int                                  { return 0 }
func (p *pool) send(int, wire.Request, []string, []handle) {}

func readText(fileRef) (string, error) { return "", errNative }
func filesOf(goapp.Value) []fileRef    { return nil }
func blobURL(string, string) string    { return "" }
func bufferURL(buffer, string) string  { return "" }
func revokeURL(string)                 {}
func fragment() string                 { return "" }
func setFragment(string) string        { return "" }
func copyText(string)                  {}
func nowMillis() float64               { return 0 }
func handBack()                        {}
func bodyRows(string) int              { return 0 }
func setBodyHTML(string, string)       {}
func appendBodyHTML(string, string)    {}

func plotGeometry() (geometry, [4]float64, bool)         { return geometry{}, [4]float64{}, false }
func showSelection(x0, y0, x1, y1 float64, visible bool) {}
func attachDrag(func(x0, y0, x1, y1 float64))            {}

func markTime(string)   {}
func focusField(string) {}

func afterTask(d time.Duration, fn func()) { time.AfterFunc(d, fn) }
func bufferText(buffer) string             { return "" }
func copyBuffer(b buffer) buffer           { return b }
