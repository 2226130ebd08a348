//go:build !unix

package segytest

import "errors"

// fifoCases: no named pipes in the file system here.
func fifoCases() []Case { return nil }

func mkfifo(p string) error { return errors.ErrUnsupported }
