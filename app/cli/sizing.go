package cli

import (
	"fmt"
	"strconv"
	"strings"
	"unicode"
)

// parseBytes reads a memory size such as "256M", "1G", "512MiB", "64k" or
// "1000000". The suffixes K, M, G and T (with or without a trailing "B" or
// "iB", any case) are binary multiples (1 K = 1024 bytes), as memory sizes
// commonly are.
func parseBytes(s string) (int64, error) {
	t := strings.TrimSpace(s)
	i := strings.IndexFunc(t, func(r rune) bool { return !unicode.IsDigit(r) && r != '.' })
	num, unit := t, ""
	if i >= 0 {
		num, unit = t[:i], strings.ToUpper(strings.TrimSpace(t[i:]))
	}
	unit = strings.TrimSuffix(strings.TrimSuffix(unit, "B"), "I")
	shift := map[string]uint{"": 0, "K": 10, "M": 20, "G": 30, "T": 40}
	sh, ok := shift[unit]
	if !ok || num == "" {
		return 0, fmt.Errorf("memory size %q: want a number with an optional K, M, G or T suffix", s)
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || v <= 0 {
		return 0, fmt.Errorf("memory size %q: want a positive number with an optional K, M, G or T suffix", s)
	}
	b := v * float64(uint64(1)<<sh)
	if b >= 1<<62 {
		return 0, fmt.Errorf("memory size %q: too large", s)
	}
	return int64(b), nil
}
