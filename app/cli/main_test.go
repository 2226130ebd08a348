package cli

import (
	"os"
	"testing"

	"quadtrace/app/indexcache"
)

// childEnv, when set in the environment, makes the test binary act as the
// quadtrace command instead of running tests: "export" runs Export and
// "join" Join with the process arguments. The interruption and
// memory tests start it that way to signal and measure a real process.
const childEnv = "QUADTRACE_EXPORT_TEST_CHILD"

func TestMain(m *testing.M) {
	switch os.Getenv(childEnv) {
	case "export":
		os.Exit(Export(os.Args[1:], os.Stdout, os.Stderr))
	case "join":
		os.Exit(Join(os.Args[1:], os.Stdout, os.Stderr))
	case "scan":
		os.Exit(Scan(os.Args[1:], os.Stdout, os.Stderr))
	case "figure":
		os.Exit(Figure(os.Args[1:], os.Stdout, os.Stderr))
	}
	// No test touches the user's cache: the geometry index cache goes to
	// a temporary folder (children inherit it), removed at the end.
	dir, err := os.MkdirTemp("", "quadtrace-cli-cache-")
	if err != nil {
		panic(err)
	}
	os.Setenv(indexcache.EnvDir, dir)
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}
