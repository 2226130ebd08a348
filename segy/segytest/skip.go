package segytest

import (
	"os"
	"testing"
)

// SkipOutsideCI skips t with the reason given, except in CI (CI=true),
// where a check that cannot run is a failure: CI runs as root on Linux with
// every package installed, so a skip there would hide a missing check.
func SkipOutsideCI(t testing.TB, format string, args ...any) {
	t.Helper()
	if os.Getenv("CI") == "true" {
		t.Fatalf("cannot run in CI, where every check must: "+format, args...)
	}
	t.Skipf(format, args...)
}
