package cli

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"slices"
	"strconv"
	"syscall"

	"quadtrace/app/figure"
	"quadtrace/app/indexcache"
	"quadtrace/app/outfile"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/synth"
)

const figureAbout = `Draws one inline, crossline or time slice of an attribute (optionally with a
second attribute over it) as a report figure with axes, legends, caption and
scale bar, and writes it without opening a window. The extension of --out
decides the format: .png (resolution recorded) or .jpg/.jpeg.`

// Figure runs `quadtrace figure`: it draws one section or time slice of an
// attribute (optionally with a second attribute over it) as a report figure
// with axes, legend and scale bar, and writes it as PNG or JPEG. No window
// opens.
func Figure(args []string, stdout, stderr io.Writer) int {
	// SIGINT and SIGTERM stop every stage: the open and header scan, the
	// computation, the drawing, and the writing (nothing is left then).
	// They are caught from the start, before the arguments are checked.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	c := newCommand("figure", "(FILE | --demo) (--inline N | --crossline N | --time MS) --attribute ID --out FIG.png [options]", figureAbout, stdout, stderr)
	fs := c.fs
	var r figure.Request
	var out string
	var demo bool
	var params multiFlag
	inline := fs.String("inline", "", "draw the inline with this number")
	crossline := fs.String("crossline", "", "draw the crossline with this number")
	timeMS := fs.String("time", "", "draw the time slice at this time in ms (the nearest sample)")
	offset := fs.String("offset", "", "offset to draw in a pre-stack file (default: the first)")
	fs.BoolVar(&demo, "demo", false, "use the built-in demo survey instead of a file")
	fs.StringVar(&r.Attribute, "attribute", "amplitude", "attribute id (see 'quadtrace attributes')")
	fs.Var(&params, "param", "attribute parameter NAME=VALUE (repeatable)")
	fs.StringVar(&r.Condition, "condition", "", "conditioning applied first, e.g. bandpass=8-60,agc=500")
	fs.StringVar(&r.Overlay, "overlay", "", "attribute id drawn over the first one")
	fs.Float64Var(&r.Opacity, "opacity", 0.6, "overlay opacity, 0 to 1")
	fs.BoolVar(&r.OpacityFollows, "opacity-follows-value", true, "make weak overlay values more transparent (--opacity-follows-value=false: constant opacity)")
	fs.StringVar(&r.Palette, "palette", "", "palette name (default: by the attribute's kind)")
	fs.StringVar(&r.OverlayPalette, "overlay-palette", "", "palette name of the overlay")
	fs.Float64Var(&r.Clip, "clip", 99, "percentile of values kept inside the colour range")
	size := fs.String("size", "1600x1000", "figure size WIDTHxHEIGHT in pixels")
	fs.Float64Var(&r.DPI, "dpi", 150, "resolution recorded in a PNG, dots per inch")
	fs.Float64Var(&r.BinM, "bin", 0, "trace spacing in metres for the scale bar (default: from the coordinates)")
	fs.BoolVar(&r.Wiggle, "wiggle", false, "draw amplitude wiggles over the section")
	fs.StringVar(&r.Title, "title", "", "figure title (default: survey, line and attribute)")
	fs.StringVar(&out, "out", "", "output path: .png, .jpg or .jpeg")
	followLinks := fs.Bool("follow-links", false, "write at the target when --out is a symbolic link (refused otherwise)")
	c.segyFlags()
	pos, code, done := c.parse(args)
	if done {
		return code
	}
	var file string
	switch {
	case demo && len(pos) != 0:
		return c.usage("--demo takes no FILE, got %d arguments", len(pos))
	case !demo && len(pos) != 1:
		return c.usage("want one FILE (or --demo), got %d arguments", len(pos))
	case out == "":
		return c.usage("--out FIG.png is required")
	}
	if !demo {
		file = pos[0]
	}
	raw, err := compute.ParseParams(params)
	if err != nil {
		return c.usage("--param: %v", err)
	}
	r.Params = raw
	attrs := []*compute.Attribute{}
	for _, o := range []struct{ option, id string }{{"attribute", r.Attribute}, {"overlay", r.Overlay}} {
		if o.id == "" {
			continue
		}
		a, err := lookupAttribute(o.option, o.id)
		if err != nil {
			return c.usage("%v", err)
		}
		attrs = append(attrs, a)
	}
	if _, err := compute.ResolveAll(attrs, r.Params); err != nil {
		return c.usage("--param: %v", err)
	}
	if _, err := compute.ParseConditioning(r.Condition); err != nil {
		return c.usage("--condition: %v", err)
	}
	chosen := 0
	for _, s := range []struct {
		text string
		o    volume.Orientation
	}{{*inline, volume.Inline}, {*crossline, volume.Crossline}, {*timeMS, volume.TimeSlice}} {
		if s.text == "" {
			continue
		}
		chosen++
		r.Orientation = s.o
		var err error
		if s.o == volume.TimeSlice {
			r.TimeMS, err = strconv.ParseFloat(s.text, 64)
		} else {
			var n int
			n, err = strconv.Atoi(s.text)
			r.Inline, r.Crossline = n, n
		}
		if err != nil {
			return c.usage("--%s %q: not a number", s.o, s.text)
		}
	}
	if chosen != 1 {
		return c.usage("give exactly one of --inline, --crossline or --time")
	}
	if *offset != "" {
		if r.Offset, err = strconv.Atoi(*offset); err != nil {
			return c.usage("--offset %q: not a whole number", *offset)
		}
	}
	if _, err := fmt.Sscanf(*size, "%dx%d", &r.Width, &r.Height); err != nil || r.Width < 200 || r.Height < 150 || r.Width > 20000 || r.Height > 20000 {
		return c.usage("--size %q: want WIDTHxHEIGHT, 200x150 to 20000x20000", *size)
	}
	if r.Opacity < 0 || r.Opacity > 1 {
		return c.usage("--opacity %g: want 0 to 1", r.Opacity)
	}
	if r.Clip <= 50 || r.Clip > 100 {
		return c.usage("--clip %g: want a percentile above 50 and at most 100", r.Clip)
	}
	if !(r.DPI > 0) || r.DPI > 100000 {
		return c.usage("--dpi %g: want a positive resolution up to 100000", r.DPI)
	}
	opt, err := c.segy()
	if err != nil {
		return c.usage("%v", err)
	}
	var inputs []string
	if !demo {
		inputs = []string{file}
	}
	if err := prepareOutput(out, *followLinks, inputs...); err != nil { // refused before any work
		return c.fail(out, err)
	}
	if _, err := figure.FormatOf(out); err != nil {
		return c.usage("--out: %v", err)
	}
	interrupted := func() int {
		fmt.Fprintln(stderr, "quadtrace figure: interrupted; nothing written")
		return exitInterrupted
	}
	var v *volume.Volume
	if demo {
		v, err = volume.Demo(ctx, synth.DefaultConfig(), nil)
	} else {
		v, err = volume.OpenFast(ctx, file, opt, indexcache.Default())
	}
	if ctx.Err() != nil {
		if v != nil {
			v.Close()
		}
		return interrupted()
	}
	if err != nil {
		return c.fail(file, err)
	}
	defer v.Close()
	if err := checkRange(v, r, *offset != ""); err != nil {
		if v.Exact() {
			return c.fail(file, err)
		}
		// the sampled geometry may lack the line: ask the exact one
		nv, _, cerr := v.Check(ctx, nil)
		if ctx.Err() != nil {
			return interrupted()
		}
		if cerr != nil {
			return c.fail(file, cerr)
		}
		if nv != nil {
			defer nv.Close()
			v = nv
		}
		if err := checkRange(v, r, *offset != ""); err != nil {
			return c.fail(file, err)
		}
	}
	img, err := figure.Draw(ctx, v, r)
	if err == nil && !demo {
		// a sampled geometry: confirm the drawn traces, else check every
		// header and draw again (see exactFigure)
		var nv *volume.Volume
		if nv, err = exactFigure(ctx, v, r, stderr); nv != nil {
			defer nv.Close()
			if err = checkRange(nv, r, *offset != ""); err == nil {
				img, err = figure.Draw(ctx, nv, r)
			}
		}
	}
	if ctx.Err() != nil {
		return interrupted()
	}
	if err != nil {
		return c.fail(file, err)
	}
	if err := figure.Write(ctx, out, img, r.DPI, outfile.Options{Inputs: inputs, FollowSymlink: *followLinks}); err != nil {
		if ctx.Err() != nil {
			return interrupted()
		}
		return c.fail(out, err)
	}
	fmt.Fprintln(stdout, out)
	return exitOK
}

// exactFigure is the figure's geometry contract with the fast open: a
// figure is drawn from the index the open gave (exact from the cache, or
// a sampled hypothesis). For a hypothesis, the header of every trace
// drawn is read (volume.Confirm); when one is not where the hypothesis put
// it, when the line has positions without a trace, or for a time slice
// (every trace), every header is checked (volume.Check, which also fills
// the cache) and the figure is drawn again from the exact index, with a
// note on stderr when the geometry changed. It returns that exact volume
// (nil when the first drawing stands).
func exactFigure(ctx context.Context, v *volume.Volume, r figure.Request, stderr io.Writer) (*volume.Volume, error) {
	if v.Exact() {
		return nil, nil
	}
	ok, err := v.Confirm(ctx, volume.Slice{Orientation: r.Orientation, Number: lineNumber(r), Offset: r.Offset})
	if err != nil || ok {
		return nil, err
	}
	nv, ch, err := v.Check(ctx, nil)
	if err != nil {
		return nil, err
	}
	if ch != nil && ch.Geometry {
		fmt.Fprintf(stderr, "quadtrace figure: %s: %s\n", v.Path(), ch.Summary)
	}
	return nv, nil
}

// lineNumber is the inline or crossline a request draws (0 for a time slice).
func lineNumber(r figure.Request) int {
	switch r.Orientation {
	case volume.Inline:
		return r.Inline
	case volume.Crossline:
		return r.Crossline
	}
	return 0
}

// checkRange refuses a line, time or offset outside the survey, naming the
// valid range.
func checkRange(v *volume.Volume, r figure.Request, offsetGiven bool) error {
	info := v.Info()
	switch r.Orientation {
	case volume.Inline:
		if !slices.Contains(volume.Numbers(info.Inline), r.Inline) {
			return fmt.Errorf("no inline %d: the inlines are %s", r.Inline, rangeText(info.Inline.Min, info.Inline.Max, info.Inline.Step))
		}
	case volume.Crossline:
		if !slices.Contains(volume.Numbers(info.Crossline), r.Crossline) {
			return fmt.Errorf("no crossline %d: the crosslines are %s", r.Crossline, rangeText(info.Crossline.Min, info.Crossline.Max, info.Crossline.Step))
		}
	case volume.TimeSlice:
		first := info.StartMS
		last := first + float64(info.Samples-1)*float64(info.IntervalUS)/1000
		half := float64(info.IntervalUS) / 2000 // the nearest sample is at most half an interval away
		if info.Samples == 0 || r.TimeMS < first-half || r.TimeMS > last+half {
			return fmt.Errorf("time %g ms is outside the traces: %g to %g ms", r.TimeMS, first, last)
		}
	}
	if offsetGiven && !slices.Contains(info.Offsets, r.Offset) {
		return fmt.Errorf("no offset %d: the offsets are %v", r.Offset, info.Offsets)
	}
	return nil
}

// rangeText writes a line numbering for a message.
func rangeText(first, last, step int) string {
	if step > 1 {
		return fmt.Sprintf("%d to %d in steps of %d", first, last, step)
	}
	return fmt.Sprintf("%d to %d", first, last)
}
