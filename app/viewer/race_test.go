//go:build race

package viewer

// raceDetector is true when the tests run under the race detector, which
// slows the window's tests by about ten times.
const raceDetector = true
