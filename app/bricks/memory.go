package bricks

import (
	"fmt"
	"os"
	"strconv"
	"strings"
)

// fallbackMemory is the bound where the machine's RAM is unknown.
const fallbackMemory = 1 << 30

// DefaultMemory is the default bound of resident bricks: the value of
// $QUADTRACE_BRICK_MEMORY when set (bytes, or with a suffix K, M or G for
// KiB, MiB, GiB), else a quarter of the machine's RAM (1 GiB where it is
// unknown). A malformed setting is an error naming it.
func DefaultMemory() (int64, error) {
	if s := os.Getenv("QUADTRACE_BRICK_MEMORY"); s != "" {
		n, err := ParseBytes(s)
		if err != nil {
			return 0, fmt.Errorf("QUADTRACE_BRICK_MEMORY: %w", err)
		}
		return n, nil
	}
	if ram, ok := totalMemory(); ok && ram > 0 {
		return ram / 4, nil
	}
	return fallbackMemory, nil
}

// ParseBytes reads a size: a whole number of bytes, or with a suffix K, M
// or G (powers of 1024; "MiB" and "MB" read the same).
func ParseBytes(s string) (int64, error) {
	t := strings.ToUpper(strings.TrimSpace(s))
	t = strings.TrimSuffix(strings.TrimSuffix(t, "B"), "I")
	mult := int64(1)
	switch {
	case strings.HasSuffix(t, "K"):
		mult, t = 1<<10, t[:len(t)-1]
	case strings.HasSuffix(t, "M"):
		mult, t = 1<<20, t[:len(t)-1]
	case strings.HasSuffix(t, "G"):
		mult, t = 1<<30, t[:len(t)-1]
	}
	n, err := strconv.ParseInt(strings.TrimSpace(t), 10, 64)
	if err != nil || n < 0 || n > (1<<62)/mult {
		return 0, fmt.Errorf("%q is not a size (e.g. 512M, 2G)", s)
	}
	return n * mult, nil
}
