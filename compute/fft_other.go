//go:build !amd64 || purego

package compute

// haveSIMD is false where fft_amd64.s does not build: every pass runs in
// Go.
const haveSIMD = false

// applySIMD runs nothing here: there are no vector passes.
func (g *fftStage) applySIMD(y, x []complex128) bool { return false }
