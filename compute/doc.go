// Package compute holds the numerics of quadtrace on []float32 traces: the
// analytic trace, the attribute registry, conditioning and spectra. It knows
// no file formats and no GUI.
package compute
