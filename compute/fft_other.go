//go:build !amd64 || purego

package compute

// haveSIMD is false where fft_amd64.s does not build: every pass runs in
// Go.
const haveSIMD = false

// applySIMD runs nothing here: there are no vector passes.
func (g *fftStage) applySIMD(y, x []complex128) bool { return false }

// instFillVector writes nothing here: InstantaneousSet.fill does every
// sample in Go.
func instFillVector(a, ph, f, c []float32, x, h, dx, dh []float64, eps float64) int { return 0 }

// envFillVector writes nothing here: envelopeTrace does every sample in
// Go.
func envFillVector(a []float32, x, h []float64) int { return 0 }

// saturateVector handles nothing here: saturateTrace does every sample in
// Go.
func saturateVector(tr []float32) int { return 0 }

// loadVector converts nothing here: analyticTrace.load does every sample
// in Go.
func loadVector(x []float64, tr []float32) (done, gaps int) { return 0, 0 }

// specOpVector writes nothing here: analyticPair.apply does every bin in
// Go.
func specOpVector(z, s []complex128, g []float64, m, pos int, imaginary bool) int { return 0 }

// interleaveVector packs nothing here: analyticPair.forward does it in Go.
func interleaveVector(z []complex128, a, b []float64) int { return 0 }

// deinterleaveVector unpacks nothing here: analyticPair.unpack does it in
// Go.
func deinterleaveVector(ra, rb []float64, z []complex128) int { return 0 }
