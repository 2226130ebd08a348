//go:build !linux

package segy

// adviseScattered does nothing here: the read-ahead advice of
// advise_linux.go is Linux's madvise(2).
func adviseScattered(data []byte, on bool) {}

// prefetch does nothing here (see advise_linux.go).
func prefetch(data []byte, ranges [][2]int64) {}
