// Package data holds the in-memory forms of a recording: a continuous
// Recording (channel × sample) and Epochs (trial × channel × sample).
//
// Samples are stored as float32 to halve memory; all computation converts
// them to float64. Times are in seconds, rates in Hz, amplitudes in the
// channel's physical unit (usually µV).
package data
