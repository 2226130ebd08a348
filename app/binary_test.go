package app

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"testing"

	"quadtrace/segy/segytest"
)

// The tests in this file build the real quadtrace binary and run it as a
// user would, because what they check happens before main runs: package
// init functions (fyne's lang package looks the locale up in one) write
// to the process's own stderr, which an in-process call of Main never sees.

var built struct {
	once sync.Once
	path string
	err  error
}

// quadtraceBinary builds the program once per test run into a temporary
// folder and returns its path.
func quadtraceBinary(t *testing.T) string {
	t.Helper()
	built.once.Do(func() {
		goTool, err := exec.LookPath("go")
		if err != nil {
			built.err = err
			return
		}
		dir, err := os.MkdirTemp("", "quadtrace-binary-")
		if err != nil {
			built.err = err
			return
		}
		built.path = filepath.Join(dir, "quadtrace")
		if runtime.GOOS == "windows" {
			built.path += ".exe"
		}
		out, err := exec.Command(goTool, "build", "-o", built.path, "quadtrace").CombinedOutput()
		if err != nil {
			built.err = errors.New(err.Error() + "\n" + string(out))
		}
	})
	if built.err != nil {
		t.Fatalf("building quadtrace: %v", built.err)
	}
	return built.path
}

// TestMain removes the binary built by quadtraceBinary.
func TestMain(m *testing.M) {
	code := m.Run()
	if built.path != "" {
		os.RemoveAll(filepath.Dir(built.path))
	}
	os.Exit(code)
}

// environment returns this process's environment without the locale and
// display variables, plus extra.
func environment(extra ...string) []string {
	var env []string
	for _, kv := range os.Environ() {
		name, _, _ := strings.Cut(kv, "=")
		if name == "LANG" || name == "LANGUAGE" || strings.HasPrefix(name, "LC_") || name == "DISPLAY" || name == "WAYLAND_DISPLAY" {
			continue
		}
		env = append(env, kv)
	}
	return append(env, extra...)
}

// run runs the binary with args in env and returns exit status, stdout and
// stderr.
func run(t *testing.T, bin string, env []string, args ...string) (int, string, string) {
	t.Helper()
	cmd := exec.Command(bin, args...)
	cmd.Env = env
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err := cmd.Run()
	var exit *exec.ExitError
	switch {
	case err == nil:
		return 0, out.String(), errb.String()
	case errors.As(err, &exit) && exit.Exited():
		return exit.ExitCode(), out.String(), errb.String()
	}
	t.Fatalf("quadtrace %v: %v (stderr %q)", args, err, errb.String())
	return 0, "", ""
}

// TestBinaryPrintsOnlyItsOwnOutput runs the built program under each
// locale setting that servers, containers and desktops use (LANG=C,
// C.UTF-8, POSIX, empty, en_US.UTF-8; LC_ALL=C.UTF-8; LANGUAGE with a
// C.UTF-8 locale) and requires its stdout, stderr and exit status to be
// exactly those of the same command called in-process through Main: any
// extra stderr line (such as fyne's "Error parsing user locale C") fails.
// Failing calls are included, so their one error line is compared too.
func TestBinaryPrintsOnlyItsOwnOutput(t *testing.T) {
	bin := quadtraceBinary(t)
	small := segytest.CorpusFile(t, "small.sgy")
	calls := [][]string{
		{"help"},
		{"--help"},
		{"version"},
		{"attributes"},
		{"attributes", "--long"},
		{"scan", small},
		{"scan", small, "--json"},
		{"scan", filepath.Join(t.TempDir(), "absent.sgy")},
		{"scan"},
		{"export"},
		{"figure", "--help"},
		{"--no-such-flag"},
	}
	type result struct {
		code        int
		stdout, err string
	}
	want := make([]result, len(calls))
	for i, args := range calls {
		var out, errb bytes.Buffer
		want[i].code = Main(args, &out, &errb)
		want[i].stdout, want[i].err = out.String(), errb.String()
	}
	for _, locale := range []string{"LANG=C", "LANG=C.UTF-8", "LANG=POSIX", "LANG=", "LANG=en_US.UTF-8", "LC_ALL=C.UTF-8", "LANG=C.UTF-8 LANGUAGE=de:fr"} {
		env := environment(strings.Fields(locale)...)
		if locale == "LANG=" {
			env = environment("LANG=")
		}
		for i, args := range calls {
			code, out, errs := run(t, bin, env, args...)
			if code != want[i].code || out != want[i].stdout || errs != want[i].err {
				t.Errorf("%s quadtrace %s: exit %d, stdout %d bytes, stderr:\n%s\nwant exit %d, stdout %d bytes (same text), stderr:\n%s",
					locale, strings.Join(args, " "), code, len(out), errs, want[i].code, len(want[i].stdout), want[i].err)
			}
		}
	}
}

// TestBinaryWithoutDisplay runs the built program with no DISPLAY and no
// WAYLAND_DISPLAY: the window calls print the one no-display line on
// stderr, nothing on stdout, and exit 2, with no panic or stack trace.
func TestBinaryWithoutDisplay(t *testing.T) {
	if !displayMissing(runtime.GOOS, func(string) string { return "" }) {
		t.Skipf("%s draws through its own window system; no display check applies", runtime.GOOS)
	}
	bin := quadtraceBinary(t)
	small := segytest.CorpusFile(t, "small.sgy")
	for _, args := range [][]string{nil, {small}, {"--snapshot", filepath.Join(t.TempDir(), "s.png"), small}} {
		for _, locale := range []string{"LANG=C.UTF-8", "LANG="} {
			code, out, errs := run(t, bin, environment(locale), args...)
			if code != 2 || out != "" || errs != noDisplayMessage+"\n" {
				t.Errorf("%s quadtrace %v with no display: exit %d, stdout %q, stderr:\n%s\nwant exit 2, nothing on stdout, stderr %q",
					locale, args, code, out, errs, noDisplayMessage)
			}
		}
	}
}
