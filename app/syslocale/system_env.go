//go:build !windows

package locale

import "os"

// systemLocales reads the preference from the environment (see the
// package comment).
func systemLocales() []string { return fromEnvironment(os.Getenv) }
