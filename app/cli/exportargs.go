package cli

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"quadtrace/app/export"
	"quadtrace/compute"
)

// exportArgs is the export command line as read, before the input file is
// opened. Flags may come before or after FILE.
type exportArgs struct {
	input         string
	attributes    []string
	params        map[string]string
	condition     string
	out           string
	format        int
	inlines       *export.Range
	crosslines    *export.Range
	budget        int64
	progress      progressMode
	quiet         bool   // --quiet: no progress, no list of written paths
	inlineByte    int    // 0: the reader's default
	crosslineByte int    // 0: the reader's default
	byteOrder     string // "", "big" or "little"
	followLinks   bool   // --follow-links: write at the target of a symbolic link --out
}

// errHelp is returned by the parsers when -h or --help was given.
var errHelp = flag.ErrHelp

const exportUsage = `usage: quadtrace export FILE --attribute ID[,ID...] --out PATH [options]

Computes attributes for every trace of the SEG-Y volume FILE and writes one
SEG-Y volume per attribute: PATH is the file for one attribute, the folder for
several (files named <FILE stem>-<ID>.sgy). Memory stays within the budget
whatever the size of FILE. The written paths are printed on stdout.

options:
  --attribute ID[,ID...]  attribute ids (see 'quadtrace attributes'); repeatable
  --param NAME=VALUE      set a parameter of every chosen attribute that has it; repeatable
  --condition SPEC        conditioning before the attributes: bandpass=LOW-HIGH (Hz), agc=WINDOW (ms),
                          comma-separated, e.g. bandpass=8-60,agc=500
  --out PATH              destination file or folder (outputs appear only when all are complete;
                          devices, FIFOs, the input and symbolic links are refused)
  --follow-links          write at the target when --out is a symbolic link
  --format ieee|ibm       sample format of the outputs (default ieee, code 5; ibm is code 1)
  --inlines A:B           export only inlines A to B (inclusive)
  --crosslines A:B        export only crosslines A to B (inclusive)
  --budget SIZE           memory for trace blocks, e.g. 256M or 1G (default 256M)
  --progress bar|json|none  progress on stderr (default bar, shown only on a terminal)
  --quiet                 no progress and no summary (same as --progress none)
  --inline-byte N         header byte of the inline number (default 189)
  --crossline-byte N      header byte of the crossline number (default 193)
  --byte-order big|little override the detected byte order of FILE
`

// multiFlag collects a repeatable string flag.
type multiFlag []string

func (m *multiFlag) String() string     { return strings.Join(*m, ",") }
func (m *multiFlag) Set(s string) error { *m = append(*m, s); return nil }

// parseInterspersed parses fs over args, letting positional arguments sit
// between flags, and returns the positional arguments in order.
func parseInterspersed(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if rest[0] == "--" {
			return append(pos, rest[1:]...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// parseExportArgs reads the export command line. Usage errors name the flag
// at fault; errHelp means help was asked for.
func parseExportArgs(args []string, stderr io.Writer) (*exportArgs, error) {
	fs := flag.NewFlagSet("export", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	var (
		attrs, params                     multiFlag
		a                                 exportArgs
		format, inl, xl, budget, progress string
		byteOrder                         string
		quiet                             bool
	)
	fs.Var(&attrs, "attribute", "")
	fs.Var(&params, "param", "")
	fs.StringVar(&a.condition, "condition", "", "")
	fs.StringVar(&a.out, "out", "", "")
	fs.StringVar(&format, "format", "ieee", "")
	fs.StringVar(&inl, "inlines", "", "")
	fs.StringVar(&xl, "crosslines", "", "")
	fs.StringVar(&budget, "budget", "", "")
	fs.StringVar(&progress, "progress", "", "")
	fs.BoolVar(&quiet, "quiet", false, "")
	fs.BoolVar(&a.followLinks, "follow-links", false, "")
	fs.IntVar(&a.inlineByte, "inline-byte", 0, "")
	fs.IntVar(&a.crosslineByte, "crossline-byte", 0, "")
	fs.StringVar(&byteOrder, "byte-order", "", "")
	pos, err := parseInterspersed(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			fmt.Fprint(stderr, exportUsage)
			return nil, errHelp
		}
		return nil, err
	}
	switch len(pos) {
	case 0:
		return nil, errors.New("no input FILE given")
	case 1:
		a.input = pos[0]
	default:
		return nil, fmt.Errorf("one input FILE expected, got %d: %s", len(pos), strings.Join(pos, " "))
	}
	for _, s := range attrs {
		for id := range strings.SplitSeq(s, ",") {
			if id = strings.TrimSpace(id); id != "" {
				a.attributes = append(a.attributes, id)
			}
		}
	}
	if len(a.attributes) == 0 {
		return nil, errors.New("--attribute: no attribute id given")
	}
	if a.params, err = compute.ParseParams(params); err != nil {
		return nil, fmt.Errorf("--param: %w", err)
	}
	if a.out == "" {
		return nil, errors.New("--out: no destination given")
	}
	if a.format, err = parseFormat(format); err != nil {
		return nil, err
	}
	if inl != "" {
		if a.inlines, err = export.ParseRange(inl); err != nil {
			return nil, fmt.Errorf("--inlines: %w", err)
		}
	}
	if xl != "" {
		if a.crosslines, err = export.ParseRange(xl); err != nil {
			return nil, fmt.Errorf("--crosslines: %w", err)
		}
	}
	a.budget = export.DefaultBudget
	if budget != "" {
		if a.budget, err = parseBytes(budget); err != nil {
			return nil, fmt.Errorf("--budget: %w", err)
		}
	}
	switch {
	case quiet && progress != "" && progress != string(progressNone):
		return nil, fmt.Errorf("--quiet and --progress %s contradict each other", progress)
	case quiet:
		a.progress, a.quiet = progressNone, true
	case progress == "":
		a.progress = progressBar
	default:
		switch m := progressMode(progress); m {
		case progressBar, progressJSON, progressNone:
			a.progress = m
		default:
			return nil, fmt.Errorf("--progress %q: want bar, json or none", progress)
		}
	}
	for _, b := range []struct {
		name string
		v    int
	}{{"--inline-byte", a.inlineByte}, {"--crossline-byte", a.crosslineByte}} {
		if b.v != 0 && (b.v < 1 || b.v > 237) {
			return nil, fmt.Errorf("%s %d: a 4-byte header field starts at byte 1 to 237 of the 240-byte trace header", b.name, b.v)
		}
	}
	switch byteOrder {
	case "", "big", "little":
		a.byteOrder = byteOrder
	default:
		return nil, fmt.Errorf("--byte-order %q: want big or little", byteOrder)
	}
	return &a, nil
}

// parseFormat maps ieee/ibm (or the SEG-Y format codes 5 and 1) to the code.
func parseFormat(s string) (int, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "ieee", "5":
		return 5, nil
	case "ibm", "1":
		return 1, nil
	}
	return 0, fmt.Errorf("--format %q: want ieee (SEG-Y format code 5) or ibm (code 1)", s)
}
