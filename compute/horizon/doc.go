// Package horizon tracks seismic reflectors through a 3D survey and maps
// attributes along them.
//
// Track grows a horizon from seed points: best-first, from each tracked
// trace to its four grid neighbours, the most confident candidate first
// (a region-growing flood ordered by a priority queue, as in seeded
// region growing, Adams and Bischof 1994, IEEE Transactions on Pattern
// Analysis and Machine Intelligence 16(6)). On each neighbour it snaps to
// the chosen event (peak, trough, rising or falling zero crossing) within
// a search window around the neighbour's time, with sub-sample accuracy
// (a parabola through the three samples around a peak or trough, a
// straight line between the two samples around a zero crossing), and it
// accepts the pick only while the constraints hold: the instantaneous
// phase and the envelope (Taner, Koehler and Sheriff 1979, computed with
// compute.AnalyticTrace) and the waveform correlation with the neighbour.
// Where a constraint fails the trace stays empty.
//
// Map computes a map along a horizon from any trace source, usually an
// attribute volume: the value on the horizon, or a statistic over a
// window above and below it or between two horizons.
//
// Horizons are stored as plain text (Write, Read): a header line naming
// the columns, then one row per tracked trace.
//
// Conventions: grid indices (inline index il from 0, crossline index xl
// from 0) inside this package, inline and crossline numbers only in files;
// times in milliseconds in every horizon and option, seconds in
// Grid.DT and Grid.T0 as in compute.Section.
package horizon
