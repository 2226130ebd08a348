package segytest

import (
	"os/exec"
	"strings"
	"testing"
)

// Python is the interpreter that carries Debian's python3-segyio,
// python3-scipy and python3-numpy. It is named in full because the python3
// first on PATH may be another interpreter without them.
const Python = "/usr/bin/python3"

// NeedPython returns Python after checking that it imports every module
// named (for example "segyio", "numpy", "scipy.signal"). A missing
// interpreter or module fails the test: these libraries are outside
// references, installed by the README's test command (.ci/deps), and a
// check that silently does not run is no check.
func NeedPython(t testing.TB, modules ...string) string {
	t.Helper()
	code := "import " + strings.Join(modules, ", ")
	if out, err := exec.Command(Python, "-c", code).CombinedOutput(); err != nil {
		t.Fatalf("%s cannot %q (install Debian's python3-segyio python3-scipy python3-numpy, e.g. with bash .ci/deps): %v: %s", Python, code, err, strings.TrimSpace(string(out)))
	}
	return Python
}
