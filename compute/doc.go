// Package compute holds the numerics of quadtrace on []float32 traces: the
// analytic trace, the attribute registry, conditioning and spectra. It knows
// no file formats and no GUI.
//
// A Section is a block of equal-length traces with a sample interval and
// start time. Every attribute (Lookup, Attributes) maps a Section to a
// Section of the same shape; Instantaneous computes envelope, phase,
// frequency and cosine of phase together in one pass. Conditioning
// (band-pass, AGC) can be applied first; TraceSpectrum and SectionSpectrum
// give amplitude spectra for the trace panel.
//
// Conventions:
//   - time in seconds inside (Section.DT, T0), window lengths in ms as
//     parameters, frequency in Hz; phase is radians inside and degrees
//     (-180..180) in every output;
//   - the analytic trace is z = x + i h with h the discrete Hilbert
//     transform by FFT (Marple 1999); the end treatment (parameter `pad`,
//     EndTreatment) is zero padding to a power of two by default, none for
//     the plain discrete analytic signal; time derivatives are taken in the
//     frequency domain, so the derivative formulas of Taner, Koehler and
//     Sheriff (1979) and Barnes (1992, 1993) are exact for band-limited
//     data;
//   - NaN and ±Inf samples are gaps: zero inside transforms, left out of
//     window sums, NaN in the output at the same samples;
//   - the FFT is the package's own (fft.go, rfft.go; gonum's dsp/fourier
//     and scipy.fft are the references its tests compare with): a plan per
//     length, made once per job and shared by all workers, Stockham mixed
//     radix for lengths of small factors and Bluestein's algorithm for the
//     rest; analytic traces are computed two traces at a time, packed as
//     a + ib into one complex transform (analyticPair);
//   - long jobs run on runtime.GOMAXPROCS workers, each with its own work
//     buffers, take a context.Context for cancellation and report progress
//     as traces done.
package compute
