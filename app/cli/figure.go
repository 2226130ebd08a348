package cli

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strconv"
	"strings"
	"syscall"

	"quadtrace/app/figure"
	"quadtrace/app/outfile"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/synth"
)

// paramList collects repeated --param NAME=VALUE flags as given;
// compute.ParseParams reads them.
type paramList []string

func (p *paramList) String() string { return strings.Join(*p, " ") }

func (p *paramList) Set(s string) error {
	*p = append(*p, s)
	return nil
}

// Figure runs `quadtrace figure`: it draws one section or time slice of an
// attribute (optionally with a second attribute over it) as a report figure
// with axes, legend and scale bar, and writes it as PNG. No window opens.
func Figure(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("figure", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var r figure.Request
	var file, out string
	var demo bool
	var params paramList
	inline := fs.String("inline", "", "draw the inline with this number")
	crossline := fs.String("crossline", "", "draw the crossline with this number")
	timeMS := fs.String("time", "", "draw the time slice nearest this time in ms")
	fs.BoolVar(&demo, "demo", false, "use the built-in demo survey instead of a file")
	fs.StringVar(&r.Attribute, "attribute", "amplitude", "attribute id (see `quadtrace attributes`)")
	fs.Var(&params, "param", "attribute parameter NAME=VALUE (repeatable)")
	fs.StringVar(&r.Condition, "condition", "", "conditioning applied first, e.g. bandpass=8-60,agc=500")
	fs.StringVar(&r.Overlay, "overlay", "", "attribute id drawn over the first one")
	fs.Float64Var(&r.Opacity, "opacity", 0.6, "overlay opacity, 0 to 1")
	fs.BoolVar(&r.OpacityFollows, "opacity-follows-value", true, "make weak overlay values more transparent (--opacity-follows-value=false: constant opacity)")
	fs.StringVar(&r.Palette, "palette", "", "palette name (default: by the attribute's kind)")
	fs.StringVar(&r.OverlayPalette, "overlay-palette", "", "palette name of the overlay")
	fs.Float64Var(&r.Clip, "clip", 99, "percentile of values kept inside the colour range")
	size := fs.String("size", "1600x1000", "figure size WIDTHxHEIGHT in pixels")
	fs.Float64Var(&r.DPI, "dpi", 150, "resolution recorded in the PNG, dots per inch")
	fs.Float64Var(&r.BinM, "bin", 0, "trace spacing in metres for the scale bar (default: from the coordinates)")
	fs.BoolVar(&r.Wiggle, "wiggle", false, "draw amplitude wiggles over the section")
	fs.StringVar(&r.Title, "title", "", "figure title (default: survey, line and attribute)")
	fs.StringVar(&out, "out", "", "output PNG path")
	var followLinks bool
	fs.BoolVar(&followLinks, "follow-links", false, "write at the target when --out is a symbolic link (refused otherwise)")
	options := segyFlags(fs)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: quadtrace figure (FILE | --demo) (--inline N | --crossline N | --time MS) --attribute ID [--param NAME=VALUE] [--overlay ID --opacity X] [--palette NAME] [--clip PCT] [--size WxH] [--dpi N] --out FIG.png")
		fs.PrintDefaults()
	}
	pos, err := parseArgs(fs, args)
	if err != nil {
		return 2
	}
	fail := func(code int, err error) int {
		fmt.Fprintln(stderr, "quadtrace figure:", err)
		return code
	}
	switch {
	case demo && len(pos) != 0, !demo && len(pos) != 1:
		fs.Usage()
		return 2
	case out == "":
		return fail(2, errors.New("--out FIG.png is required"))
	}
	if !demo {
		file = pos[0]
	}
	if r.Params, err = compute.ParseParams(params); err != nil {
		return fail(2, fmt.Errorf("--param: %w", err))
	}
	chosen := 0
	for _, c := range []struct {
		text string
		o    volume.Orientation
	}{{*inline, volume.Inline}, {*crossline, volume.Crossline}, {*timeMS, volume.TimeSlice}} {
		if c.text == "" {
			continue
		}
		chosen++
		r.Orientation = c.o
		var err error
		if c.o == volume.TimeSlice {
			r.TimeMS, err = strconv.ParseFloat(c.text, 64)
		} else {
			var n int
			n, err = strconv.Atoi(c.text)
			r.Inline, r.Crossline = n, n
		}
		if err != nil {
			return fail(2, fmt.Errorf("--%s %q: not a number", c.o, c.text))
		}
	}
	if chosen != 1 {
		return fail(2, errors.New("give exactly one of --inline, --crossline or --time"))
	}
	if _, err := fmt.Sscanf(*size, "%dx%d", &r.Width, &r.Height); err != nil || r.Width < 200 || r.Height < 150 || r.Width > 20000 || r.Height > 20000 {
		return fail(2, fmt.Errorf("--size %q: want WIDTHxHEIGHT, 200x150 to 20000x20000", *size))
	}
	if r.Opacity < 0 || r.Opacity > 1 {
		return fail(2, fmt.Errorf("--opacity %g: want 0 to 1", r.Opacity))
	}
	if r.Clip <= 50 || r.Clip > 100 {
		return fail(2, fmt.Errorf("--clip %g: want a percentile above 50 and at most 100", r.Clip))
	}
	opt, err := options()
	if err != nil {
		return fail(2, err)
	}
	// SIGINT and SIGTERM stop every stage: the open and header scan, the
	// computation, the drawing, and the writing (nothing is left then).
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	interrupted := func() int {
		fmt.Fprintln(stderr, "quadtrace figure: interrupted; nothing written")
		return exitInterrupted
	}
	var v *volume.Volume
	var inputs []string
	if !demo {
		inputs = []string{file}
	}
	outOpt := outfile.Options{Inputs: inputs, FollowSymlink: followLinks}
	if err := outfile.Check(out, outOpt); err != nil { // refused before any work
		return fail(1, err)
	}
	if demo {
		v, err = volume.Demo(ctx, synth.DefaultConfig(), nil)
	} else {
		v, err = volume.OpenContext(ctx, file, opt)
	}
	if ctx.Err() != nil {
		if v != nil {
			v.Close()
		}
		return interrupted()
	}
	if err != nil {
		return fail(1, err)
	}
	defer v.Close()
	img, err := figure.Draw(ctx, v, r)
	if ctx.Err() != nil {
		return interrupted()
	}
	if err != nil {
		return fail(1, err)
	}
	if err := figure.WritePNG(ctx, out, img, r.DPI, outOpt); err != nil {
		if ctx.Err() != nil {
			return interrupted()
		}
		return fail(1, err)
	}
	fmt.Fprintln(stdout, out)
	return 0
}
