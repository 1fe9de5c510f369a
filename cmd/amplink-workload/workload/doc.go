// Package workload makes the standard performance workloads of amplink:
// synthetic epochs and continuous recordings with planted structure, and the
// recipes that analyse them. Everything is deterministic: the same arguments
// give the same samples, bit for bit.
//
// The package is pure Go (no file access); the amplink-workload command
// writes its output to disk, and the benchmarks in core/analysis and
// core/connect build the same data in memory.
package workload
