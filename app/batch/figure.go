package batch

import (
	"bufio"
	"context"
	"errors"
	"flag"
	"fmt"
	"image"
	"image/color"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"

	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/synth"
	"quadtrace/render"
)

// paramList collects repeated --param NAME=VALUE flags as given;
// compute.ParseParams reads them.
type paramList []string

func (p *paramList) String() string { return strings.Join(*p, " ") }

func (p *paramList) Set(s string) error {
	*p = append(*p, s)
	return nil
}

// only returns the parameters of raw that attribute a declares.
func only(raw map[string]string, a *compute.Attribute) map[string]string {
	out := map[string]string{}
	for _, spec := range a.Params {
		if v, ok := raw[spec.Name]; ok {
			out[spec.Name] = v
		}
	}
	return out
}

// figureRequest is a parsed `quadtrace figure` call.
type figureRequest struct {
	file, out           string
	demo                bool
	inline, crossline   int
	timeMS              float64
	orientation         volume.Orientation
	attribute, overlay  string
	params              map[string]string
	condition           string
	palette, overlayPal string
	opacity             float64
	opacityFollows      bool
	clip                float64
	width, height       int
	dpi                 float64
	binM                float64
	wiggle              bool
	title               string
}

// Figure runs `quadtrace figure`: it draws one section or time slice of an
// attribute (optionally with a second attribute over it) as a report figure
// with axes, legend and scale bar, and writes it as PNG. No window opens.
func Figure(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("figure", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var r figureRequest
	var params paramList
	inline := fs.String("inline", "", "draw the inline with this number")
	crossline := fs.String("crossline", "", "draw the crossline with this number")
	timeMS := fs.String("time", "", "draw the time slice nearest this time in ms")
	fs.BoolVar(&r.demo, "demo", false, "use the built-in demo survey instead of a file")
	fs.StringVar(&r.attribute, "attribute", "amplitude", "attribute id (see `quadtrace attributes`)")
	fs.Var(&params, "param", "attribute parameter NAME=VALUE (repeatable)")
	fs.StringVar(&r.condition, "condition", "", "conditioning applied first, e.g. bandpass=8-60,agc=500")
	fs.StringVar(&r.overlay, "overlay", "", "attribute id drawn over the first one")
	fs.Float64Var(&r.opacity, "opacity", 0.6, "overlay opacity, 0 to 1")
	fs.BoolVar(&r.opacityFollows, "opacity-follows-value", true, "make weak overlay values more transparent (--opacity-follows-value=false: constant opacity)")
	fs.StringVar(&r.palette, "palette", "", "palette name (default: by the attribute's kind)")
	fs.StringVar(&r.overlayPal, "overlay-palette", "", "palette name of the overlay")
	fs.Float64Var(&r.clip, "clip", 99, "percentile of values kept inside the colour range")
	size := fs.String("size", "1600x1000", "figure size WIDTHxHEIGHT in pixels")
	fs.Float64Var(&r.dpi, "dpi", 150, "resolution recorded in the PNG, dots per inch")
	fs.Float64Var(&r.binM, "bin", 0, "trace spacing in metres for the scale bar (default: from the coordinates)")
	fs.BoolVar(&r.wiggle, "wiggle", false, "draw amplitude wiggles over the section")
	fs.StringVar(&r.title, "title", "", "figure title (default: survey, line and attribute)")
	fs.StringVar(&r.out, "out", "", "output PNG path")
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
	case r.demo && len(pos) != 0, !r.demo && len(pos) != 1:
		fs.Usage()
		return 2
	case r.out == "":
		return fail(2, errors.New("--out FIG.png is required"))
	}
	if !r.demo {
		r.file = pos[0]
	}
	if r.params, err = compute.ParseParams(params); err != nil {
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
		r.orientation = c.o
		var err error
		if c.o == volume.TimeSlice {
			r.timeMS, err = strconv.ParseFloat(c.text, 64)
		} else {
			var n int
			n, err = strconv.Atoi(c.text)
			r.inline, r.crossline = n, n
		}
		if err != nil {
			return fail(2, fmt.Errorf("--%s %q: not a number", c.o, c.text))
		}
	}
	if chosen != 1 {
		return fail(2, errors.New("give exactly one of --inline, --crossline or --time"))
	}
	if _, err := fmt.Sscanf(*size, "%dx%d", &r.width, &r.height); err != nil || r.width < 200 || r.height < 150 || r.width > 20000 || r.height > 20000 {
		return fail(2, fmt.Errorf("--size %q: want WIDTHxHEIGHT, 200x150 to 20000x20000", *size))
	}
	if r.opacity < 0 || r.opacity > 1 {
		return fail(2, fmt.Errorf("--opacity %g: want 0 to 1", r.opacity))
	}
	if r.clip <= 50 || r.clip > 100 {
		return fail(2, fmt.Errorf("--clip %g: want a percentile above 50 and at most 100", r.clip))
	}
	opt, err := options()
	if err != nil {
		return fail(2, err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	var v *volume.Volume
	if r.demo {
		v, err = volume.Demo(ctx, synth.DefaultConfig(), nil)
	} else {
		v, err = volume.Open(r.file, opt)
	}
	if err != nil {
		return fail(1, err)
	}
	defer v.Close()
	img, err := drawFigure(ctx, v, r)
	if err != nil {
		return fail(1, err)
	}
	if err := writePNG(r.out, img, r.dpi); err != nil {
		return fail(1, err)
	}
	fmt.Fprintln(stdout, r.out)
	return 0
}

// drawFigure computes what r asks for on v and draws the figure.
func drawFigure(ctx context.Context, v *volume.Volume, r figureRequest) (*image.RGBA, error) {
	fig, err := buildFigure(ctx, v, r)
	if err != nil {
		return nil, err
	}
	return fig.Draw()
}

// buildFigure computes what r asks for on v and composes the figure.
func buildFigure(ctx context.Context, v *volume.Volume, r figureRequest) (render.Figure, error) {
	info := v.Info()
	s := volume.Slice{Orientation: r.orientation}
	switch r.orientation {
	case volume.Inline:
		s.Number = r.inline
	case volume.Crossline:
		s.Number = r.crossline
	case volume.TimeSlice:
		s.Number = v.SampleIndex(r.timeMS)
	}
	cond, err := compute.ParseConditioning(r.condition)
	if err != nil {
		return render.Figure{}, fmt.Errorf("--condition: %w", err)
	}
	layer := func(id, paletteName string, overlay bool) (render.Layer, render.Legend, volume.Section, error) {
		a, err := compute.Lookup(id)
		if err != nil {
			return render.Layer{}, render.Legend{}, volume.Section{}, err
		}
		p, err := a.Resolve(only(r.params, a))
		if err != nil {
			return render.Layer{}, render.Legend{}, volume.Section{}, err
		}
		sec, err := v.Attribute(ctx, s, a, p, cond, nil)
		if err != nil {
			return render.Layer{}, render.Legend{}, volume.Section{}, err
		}
		var l render.Layer
		if overlay {
			pal, err := style.OverlayPalette(a, paletteName)
			if err != nil {
				return render.Layer{}, render.Legend{}, volume.Section{}, err
			}
			l = style.Overlay(a, sec.Traces, pal, r.clip, r.opacity, r.opacityFollows)
		} else {
			pal, err := style.Palette(a, paletteName)
			if err != nil {
				return render.Layer{}, render.Legend{}, volume.Section{}, err
			}
			l = style.Layer(a, sec.Traces, pal, r.clip)
		}
		return l, style.LegendFor(a, l), sec, nil
	}
	base, baseLegend, sec, err := layer(r.attribute, r.palette, false)
	if err != nil {
		return render.Figure{}, err
	}
	fig := render.Figure{Base: base, Legends: []render.Legend{baseLegend}, Width: r.width, Height: r.height}
	if r.overlay != "" {
		over, overLegend, _, err := layer(r.overlay, r.overlayPal, true)
		if err != nil {
			return render.Figure{}, err
		}
		fig.Overlay = &over
		fig.Legends = append(fig.Legends, overLegend)
	}
	if r.wiggle && r.orientation != volume.TimeSlice {
		// Wiggles show the amplitude: the base layer itself when it is the
		// unconditioned amplitude, else the section read once more.
		amp := sec
		if r.attribute != "amplitude" || !cond.IsZero() {
			if amp, err = v.Read(ctx, s); err != nil {
				return render.Figure{}, err
			}
		}
		fig.Wiggle = &render.WiggleStyle{Data: amp.Traces, Color: color.RGBA{A: 255}, Fill: true, Gain: 1}
	}
	name := filepath.Base(v.Name())
	keys := sec.Keys
	switch r.orientation {
	case volume.Inline, volume.Crossline:
		across := "crossline"
		if r.orientation == volume.Crossline {
			across = "inline"
		}
		fig.Horizontal = render.Axis{Title: across, First: float64(keys[0]), Last: float64(keys[len(keys)-1])}
		first := info.StartMS
		last := first + float64(info.Samples-1)*float64(info.IntervalUS)/1000
		fig.Vertical = render.Axis{Title: "time (ms)", First: first, Last: last}
		spacing := sec.MetresPerTrace
		if r.binM > 0 {
			spacing = r.binM
		}
		fig.Scale = render.ScaleBar{MetresPerTrace: spacing}
		fig.Title = fmt.Sprintf("%s: %s %d", name, r.orientation, s.Number)
	case volume.TimeSlice:
		fig.Horizontal = render.Axis{Title: "crossline", First: float64(keys[0]), Last: float64(keys[len(keys)-1])}
		fig.Vertical = render.Axis{Title: "inline", First: float64(sec.InlineKeys[0]), Last: float64(sec.InlineKeys[len(sec.InlineKeys)-1])}
		fig.MapAspect = sec.MapAspect
		spacing := info.InlineSpacingM
		if r.binM > 0 {
			spacing = r.binM
		}
		fig.Scale = render.ScaleBar{MetresPerTrace: spacing}
		fig.Title = fmt.Sprintf("%s: time slice %g ms", name, info.StartMS+float64(s.Number)*float64(info.IntervalUS)/1000)
	}
	if r.overlay != "" {
		fig.Title += ", " + fig.Legends[1].Name + " over " + fig.Legends[0].Name
	} else {
		fig.Title += ", " + fig.Legends[0].Name
	}
	if r.title != "" {
		fig.Title = r.title
	}
	return fig, nil
}

// writePNG writes img to path with its resolution recorded, through a
// temporary file renamed into place so a failed write leaves nothing.
func writePNG(path string, img *image.RGBA, dpi float64) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	// os.CreateTemp makes the file private; a figure is for sharing.
	err = tmp.Chmod(0o644)
	w := bufio.NewWriter(tmp)
	if err == nil {
		err = render.EncodePNG(w, img, dpi)
	}
	if err == nil {
		err = w.Flush()
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(tmp.Name(), path)
	}
	if err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}
