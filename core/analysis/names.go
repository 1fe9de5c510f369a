package analysis

import (
	"amplink/core/dataset"
	"amplink/core/recipe"
)

// The analyses are written in the recipe's own words: these are the recipe's
// and the dataset's types and values under the names the recipe gives them,
// so that analysis code reads a.Seed.Freq or TypeTFMap rather than
// recipe-qualified names on every line. They are aliases, not copies.
type (
	// Recipe is recipe.Recipe.
	Recipe = recipe.Recipe
	// Analysis is recipe.Analysis: one entry of the recipe's "analyses".
	Analysis = recipe.Analysis
	// Window is recipe.Window: a channel selection, time span and band.
	Window = recipe.Window
	// Conditions is recipe.Conditions.
	Conditions = recipe.Conditions
	// Orth is recipe.Orth, the leakage correction of an envelope analysis.
	Orth = recipe.Orth
	// Dataset is dataset.Dataset: the recording a plan runs on.
	Dataset = dataset.Dataset
)

// The analysis types and leakage corrections, as the recipe names them.
const (
	TypeTrialWindow, TypeTFMap            = recipe.TypeTrialWindow, recipe.TypeTFMap
	TypeEnvelope, TypeComodulogram        = recipe.TypeEnvelope, recipe.TypeComodulogram
	OrthNone, OrthPairwise, OrthSymmetric = recipe.OrthNone, recipe.OrthPairwise, recipe.OrthSymmetric
)

// ferr is a recipe field error: the analyses refuse a recipe that does not
// fit the data by naming the field.
var ferr = recipe.Errorf
