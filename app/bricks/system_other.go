//go:build !linux

package bricks

import "errors"

// totalMemory is unknown here: DefaultMemory falls back to a fixed bound.
func totalMemory() (int64, bool) { return 0, false }

// freeBytes is unknown here: the store is made without checking the space.
func freeBytes(string) (int64, bool) { return 0, false }

// evict is not available here.
func evict(interface{ Fd() uintptr }) error { return errors.ErrUnsupported }
