//go:build !linux

package bricks

// totalMemory is unknown here: DefaultMemory falls back to a fixed bound.
func totalMemory() (int64, bool) { return 0, false }

// freeBytes is unknown here: the store is made without checking the space.
func freeBytes(string) (int64, bool) { return 0, false }
