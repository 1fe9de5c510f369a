// Package job is what an analysis worker does with a wire.Request: decode
// the bytes it was handed, build the deterministic plan, compute its share
// of the units, and (worker 0) combine every worker's units into results.
//
// It is plain Go, so the native tests run the very code the browser's
// workers run, and can compare a split run against pipeline.Run.
package job
