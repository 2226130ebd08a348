//go:build unix

package segytest

import "golang.org/x/sys/unix"

// fifoCases are the inputs that are named pipes: Unix only.
func fifoCases() []Case {
	return []Case{{Name: "a FIFO", FIFO: true,
		Expect: fails("is a FIFO (named pipe), not a SEG-Y file", NoTrace, 0)}}
}

func mkfifo(p string) error { return unix.Mkfifo(p, 0o644) }
