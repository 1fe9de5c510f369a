package demo

import _ "embed"

//go:embed recipe.json
var recipe []byte

// Recipe returns the demo recipe as JSON.
func Recipe() []byte { return append([]byte(nil), recipe...) }
