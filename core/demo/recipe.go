package demo

import _ "embed"

//go:embed recipe.json
var recipeJSON []byte

// Recipe returns the demo recipe as JSON.
func Recipe() []byte { return append([]byte(nil), recipeJSON...) }
