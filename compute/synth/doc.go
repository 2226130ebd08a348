// Package synth builds quadtrace's demo survey: a synthetic post-stack 3D
// seismic volume over an invented setting, the Corrowdeep 3D survey in
// the Halvane Basin, whose geology is known so that the viewer has
// something to show in its first minute and the tests have something to
// check attributes against.
//
// The model is a layered earth in two-way time: a seafloor under quiet
// water, shallow parallel beds, a package of interbedded thin beds whose
// reflections interfere, a meandering channel sand, shelf topsets over a
// prograding shelf margin (oblique clinoforms with toplap and downlap), a
// quiet shale holding a sand wedge that pinches out through tuning
// thickness, a domed reservoir sand that is gas-charged above a flat
// gas-water contact (bright spot, flat spot, pull-down and a low-frequency
// shadow below), deeper beds, and a normal fault cutting everything below
// its upper tip. Survey.Features says where each of these lies.
//
// Each trace is the sum of its reflection coefficients times the wavelet
// for their two-way time: a Ricker source (Ricker 1953, Geophysics 18)
// attenuated by constant Q with its phase dispersion (Kjartansson 1979,
// JGR 84), drawn from a bank of wavelets precomputed with gonum's FFT at
// 10 ms steps of attenuation time and 1/16-sample shifts, so frequency
// falls with depth. Band-limited random noise is added at a set level.
//
// Generate is deterministic for a Config and parallel across inlines.
package synth
