//go:build !linux

package segy

import "os"

// openScattered has no read-ahead advice to give here (see
// scatter_linux.go): the sample reads through the file.
func openScattered(path string) *os.File { return nil }
