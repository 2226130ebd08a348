package cli

import (
	"context"
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"

	"quadtrace/app/figure"
	"quadtrace/app/horizonjob"
	"quadtrace/app/outfile"
	"quadtrace/app/style"
	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
	"quadtrace/render"
	"quadtrace/segy"
)

// seedList collects repeated --seed IL,XL,MS flags.
type seedList [][3]float64

func (s *seedList) String() string { return fmt.Sprint(*s) }

func (s *seedList) Set(v string) error {
	parts := strings.Split(v, ",")
	if len(parts) != 3 {
		return fmt.Errorf("%q: want INLINE,CROSSLINE,MS", v)
	}
	var seed [3]float64
	for i, p := range parts {
		x, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) || i < 2 && x != math.Trunc(x) {
			return fmt.Errorf("%q: want INLINE,CROSSLINE,MS (whole line numbers, time in ms)", v)
		}
		seed[i] = x
	}
	*s = append(*s, seed)
	return nil
}

// survey is what the horizon commands read: a trace source with its
// numbering and coordinates, and the file to close.
type survey struct {
	src    horizon.Source
	layout horizon.Layout
	// live reports whether the survey has a trace at grid index (il, xl);
	// nil: every position has one.
	live  func(il, xl int) bool
	close func() error
}

// openSurvey opens FILE (or the demo survey) as a trace source.
func openSurvey(ctx context.Context, demo bool, file string, opt segy.Options) (*survey, error) {
	if demo {
		s, err := synth.Generate(ctx, synth.DefaultConfig(), nil)
		if err != nil {
			return nil, err
		}
		src, l, err := horizonjob.SurveySource(s)
		if err != nil {
			return nil, err
		}
		return &survey{src: src, layout: l, close: func() error { return nil }}, nil
	}
	f, err := segy.Open(file, opt)
	if err != nil {
		return nil, err
	}
	src, err := horizonjob.NewFileSource(f)
	if err != nil {
		f.Close()
		return nil, err
	}
	return &survey{src: src, layout: src.Layout(), live: src.Live, close: f.Close}, nil
}

// writeOutput writes an output through outfile's policy (complete or not
// at all, never over an input, a directory or a device).
func writeOutput(out string, inputs []string, write func(io.Writer) error) error {
	f, err := outfile.Create(out, outfile.Options{Inputs: inputs})
	if err != nil {
		return err
	}
	if err := write(f); err != nil {
		f.Abort()
		return err
	}
	return f.Commit()
}

// Track runs `quadtrace track`: it tracks one horizon from seed points
// through a SEG-Y file (or the demo survey) and writes it as a horizon
// text file.
func Track(args []string, stdout, stderr io.Writer) int {
	c := newCommand("track", "(FILE | --demo) --seed IL,XL,MS [--seed ...] --out HORIZON.txt [options]", `Tracks one horizon from seed points through the SEG-Y file FILE (or the demo
survey) and writes it as a horizon text file.`, stdout, stderr)
	fs := c.fs
	var seeds seedList
	var demo bool
	var out string
	fs.Var(&seeds, "seed", "seed point INLINE,CROSSLINE,MS (repeatable, at least one)")
	fs.BoolVar(&demo, "demo", false, "use the built-in demo survey instead of a file")
	event := fs.String("event", "peak", "event to follow: "+strings.Join(horizon.Events(), ", "))
	window := fs.Float64("window", 4, "search half-window in ms around the time predicted from the neighbour")
	phase := fs.Float64("max-phase-jump", 0, "largest instantaneous-phase change between neighbours, degrees (0: off)")
	env := fs.Float64("min-envelope", 0, "smallest envelope as a fraction of the local level (0: off)")
	corr := fs.Float64("min-correlation", 0.8, "smallest waveform correlation with the neighbour, -1 to 1")
	corrWin := fs.Float64("correlation-window", horizon.DefaultCorrelationMS, "length of the correlation window, ms")
	minSep := fs.Float64("min-separation", 0, "interference rule: leave empty where a strong event of the opposite polarity lies closer than this, ms; the tuning thickness stops a thinning bed at tuning (0: off)")
	fs.StringVar(&out, "out", "", "output horizon file")
	c.segyFlags()
	pos, code, done := c.parse(args)
	if done {
		return code
	}
	switch {
	case demo && len(pos) != 0, !demo && len(pos) != 1:
		return c.usage("want one FILE (or --demo), got %d arguments", len(pos))
	case out == "":
		return c.end(2, errors.New("--out HORIZON.txt is required"))
	case len(seeds) == 0:
		return c.end(2, errors.New("give at least one --seed INLINE,CROSSLINE,MS"))
	}
	ev, err := horizon.ParseEvent(*event)
	if err != nil {
		return c.end(2, fmt.Errorf("--event: %w", err))
	}
	opt := horizon.Options{Event: ev, WindowMS: *window, MaxPhaseJumpDeg: *phase, MinEnvelope: *env, MinCorrelation: *corr, CorrelationMS: *corrWin, MinSeparationMS: *minSep}
	if err := opt.Check(); err != nil {
		return c.end(2, err)
	}
	segyOpt, err := c.segy()
	if err != nil {
		return c.end(2, err)
	}
	var inputs []string
	if !demo {
		inputs = []string{pos[0]}
	}
	if err := prepareOutput(out, false, inputs...); err != nil { // refused before any work
		return c.fail(out, err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	sv, err := openSurvey(ctx, demo, firstOr(pos), segyOpt)
	if err != nil {
		return c.end(1, err)
	}
	defer sv.close()
	var hs []horizon.Seed
	for _, s := range seeds {
		h, err := horizonjob.Seed(sv.layout, int(s[0]), int(s[1]), s[2])
		if err != nil {
			return c.end(2, err)
		}
		hs = append(hs, h)
	}
	h, err := horizon.Track(ctx, sv.src, hs, opt, nil)
	if err != nil {
		if errors.Is(err, context.Canceled) {
			return c.end(1, errors.New("interrupted; nothing written"))
		}
		// Option and seed problems are the caller's; anything else is the data's.
		return c.end(1, err)
	}
	if err := writeOutput(out, inputs, func(w io.Writer) error { return horizon.Write(w, h.Picks(sv.layout)) }); err != nil {
		return c.end(1, err)
	}
	fmt.Fprintf(stdout, "%s: %d of %d traces picked\n", out, h.Picked(), len(h.State))
	return 0
}

func firstOr(pos []string) string {
	if len(pos) == 0 {
		return ""
	}
	return pos[0]
}

// readHorizon reads a horizon file onto the survey's grid; errors name
// the file and the line.
func readHorizon(path string, l horizon.Layout) (*horizon.Horizon, error) {
	return horizonjob.ReadFile(path, l)
}

// Map runs `quadtrace map`: it maps an attribute along a horizon (its value
// on the horizon, or a statistic over a window around it or down to a
// second horizon) and writes the map as a text grid (.txt) or a figure
// (.png).
func Map(args []string, stdout, stderr io.Writer) int {
	c := newCommand("map", "(FILE | --demo) --horizon HORIZON.txt --attribute ID --out MAP.png|MAP.txt [options]", `Maps an attribute along a tracked horizon (or in a window around it, or
between two horizons) and writes the map as a text grid or a PNG figure
(legend, scale bar, north arrow and the survey's outline).`, stdout, stderr)
	fs := c.fs
	var demo bool
	var out, top, base string
	var params multiFlag
	fs.BoolVar(&demo, "demo", false, "use the built-in demo survey instead of a file")
	fs.StringVar(&top, "horizon", "", "horizon file (from quadtrace track)")
	fs.StringVar(&base, "base", "", "second, deeper horizon file: the window runs from the horizon to it")
	attrID := fs.String("attribute", "amplitude", "attribute id (see `quadtrace attributes`)")
	fs.Var(&params, "param", "attribute parameter NAME=VALUE (repeatable)")
	window := fs.String("window", "", "window FROM:TO in ms relative to the horizon (negative is above), or to the base horizon's time for TO")
	statName := fs.String("stat", "", "statistic: "+strings.Join(horizon.Stats(), ", ")+" (default: value without --window, rms with it)")
	size := fs.String("size", "1400x1100", "figure size WIDTHxHEIGHT in pixels (PNG output)")
	dpi := fs.Float64("dpi", 150, "resolution recorded in the PNG")
	fs.StringVar(&out, "out", "", "output map: MAP.txt (text grid) or MAP.png (figure)")
	c.segyFlags()
	pos, code, done := c.parse(args)
	if done {
		return code
	}
	switch {
	case demo && len(pos) != 0, !demo && len(pos) != 1:
		return c.usage("want one FILE (or --demo), got %d arguments", len(pos))
	case top == "":
		return c.end(2, errors.New("--horizon HORIZON.txt is required"))
	case out == "":
		return c.end(2, errors.New("--out MAP.png or MAP.txt is required"))
	}
	ext := strings.ToLower(filepath.Ext(out))
	if ext != ".png" && ext != ".txt" {
		return c.end(2, fmt.Errorf("--out %s: want a .png or .txt name", out))
	}
	spec := horizon.MapSpec{Stat: horizon.Value}
	if *window != "" || base != "" {
		spec.Stat = horizon.RMS
	}
	if *window != "" {
		a, b, ok := strings.Cut(*window, ":")
		var e1, e2 error
		spec.FromMS, e1 = strconv.ParseFloat(a, 64)
		spec.ToMS, e2 = strconv.ParseFloat(b, 64)
		if !ok || e1 != nil || e2 != nil {
			return c.end(2, fmt.Errorf("--window %q: want FROM:TO in ms, e.g. -10:20", *window))
		}
	}
	if *statName != "" {
		var err error
		if spec.Stat, err = horizon.ParseStat(*statName); err != nil {
			return c.end(2, fmt.Errorf("--stat: %w", err))
		}
	}
	if spec.Stat == horizon.Value && (*window != "" || base != "") {
		return c.end(2, errors.New("--stat value takes no --window or --base (it reads the attribute on the horizon)"))
	}
	if err := spec.Validate(); err != nil {
		return c.end(2, err)
	}
	attr, err := compute.Lookup(*attrID)
	if err != nil {
		return c.end(2, fmt.Errorf("--attribute: %w", err))
	}
	raw, err := compute.ParseParams(params)
	if err != nil {
		return c.end(2, fmt.Errorf("--param: %w", err))
	}
	p, err := attr.Resolve(raw)
	if err != nil {
		return c.end(2, fmt.Errorf("--param: %w", err))
	}
	var width, height int
	if _, err := fmt.Sscanf(*size, "%dx%d", &width, &height); err != nil || width < 200 || height < 150 || width > 20000 || height > 20000 {
		return c.end(2, fmt.Errorf("--size %q: want WIDTHxHEIGHT, 200x150 to 20000x20000", *size))
	}
	segyOpt, err := c.segy()
	if err != nil {
		return c.end(2, err)
	}
	inputs := []string{top}
	if base != "" {
		inputs = append(inputs, base)
	}
	if !demo {
		inputs = append(inputs, pos[0])
	}
	if err := prepareOutput(out, false, inputs...); err != nil { // refused before any work
		return c.fail(out, err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	sv, err := openSurvey(ctx, demo, firstOr(pos), segyOpt)
	if err != nil {
		return c.end(1, err)
	}
	defer sv.close()
	h, err := readHorizon(top, sv.layout)
	if err != nil {
		return c.end(1, err)
	}
	if base != "" {
		if spec.Base, err = readHorizon(base, sv.layout); err != nil {
			return c.end(1, err)
		}
	}
	m, err := horizonjob.MapAttribute(ctx, sv.src, h, attr, p, spec, nil)
	if err != nil {
		if errors.Is(err, context.Canceled) {
			return c.end(1, errors.New("interrupted; nothing written"))
		}
		return c.end(1, err)
	}
	if ext == ".txt" {
		err = writeOutput(out, inputs, func(w io.Writer) error { return horizon.WriteMap(w, m, sv.layout) })
	} else {
		err = writeMapFigure(out, inputs, m, sv, attr, spec, width, height, *dpi, filepath.Base(top))
	}
	if err != nil {
		return c.end(1, err)
	}
	fmt.Fprintln(stdout, out)
	return 0
}

// writeMapFigure draws the map as a report figure (see mapFigure) with
// the survey's outline, and writes it as PNG.
func writeMapFigure(out string, inputs []string, m *horizon.AttributeMap, sv *survey, attr *compute.Attribute, spec horizon.MapSpec, width, height int, dpi float64, name string) error {
	fig, err := mapFigure(m, sv, attr, spec, width, height, name)
	if err != nil {
		return err
	}
	img, err := fig.Draw()
	if err != nil {
		return err
	}
	lay, err := fig.Layout()
	if err != nil {
		return err
	}
	drawOutline(img, lay.Plot, m.Inlines, m.Crosslines, sv.live)
	return writeOutput(out, inputs, func(w io.Writer) error { return render.EncodePNG(w, img, dpi) })
}

// mapFigure returns the report figure of a map: axes in line numbers,
// the attribute's legend, a scale bar from the bin spacing, and (when the
// survey has coordinates at the grid's corners) a north arrow and the
// corners' X/Y (figure.MapGeo).
func mapFigure(m *horizon.AttributeMap, sv *survey, attr *compute.Attribute, spec horizon.MapSpec, width, height int, name string) (render.Figure, error) {
	l := sv.layout
	data := make([][]float32, m.Inlines)
	any := false
	for il := range data {
		data[il] = m.Values[il*m.Crosslines : (il+1)*m.Crosslines]
		for _, v := range data[il] {
			any = any || !math.IsNaN(float64(v))
		}
	}
	if !any {
		return render.Figure{}, errors.New("the map holds no values (no picks, or the window is off the traces)")
	}
	pal, err := style.Palette(attr, "")
	if err != nil {
		return render.Figure{}, err
	}
	layer := style.Layer(attr, data, pal, 99)
	// Bin spacing from the coordinates of the grid's corners.
	dist := func(il0, xl0, il1, xl1 int) float64 {
		if l.XY == nil {
			return 0
		}
		x0, y0 := l.XY(il0, xl0)
		x1, y1 := l.XY(il1, xl1)
		return math.Hypot(x1-x0, y1-y0)
	}
	perXL, perIL := 0.0, 0.0
	if m.Crosslines > 1 {
		perXL = dist(0, 0, 0, m.Crosslines-1) / float64(m.Crosslines-1)
	}
	if m.Inlines > 1 {
		perIL = dist(0, 0, m.Inlines-1, 0) / float64(m.Inlines-1)
	}
	aspect := 1.0
	if perXL > 0 && perIL > 0 {
		aspect = perXL / perIL
	}
	title := fmt.Sprintf("%s along %s: %v", attr.Name, name, spec.Stat)
	if spec.Stat != horizon.Value {
		if spec.Base != nil {
			title += fmt.Sprintf(" from %g ms to the base %+g ms", spec.FromMS, spec.ToMS)
		} else {
			title += fmt.Sprintf(" over %g to %g ms", spec.FromMS, spec.ToMS)
		}
	}
	lastIL, lastXL := l.FirstInline+(m.Inlines-1)*l.InlineStep, l.FirstCrossline+(m.Crosslines-1)*l.CrosslineStep
	return render.Figure{
		Title: title, Base: layer,
		Horizontal: render.Axis{Title: "crossline", First: float64(l.FirstCrossline), Last: float64(lastXL)},
		Vertical:   render.Axis{Title: "inline", First: float64(l.FirstInline), Last: float64(lastIL)},
		MapAspect:  aspect,
		Scale:      render.ScaleBar{MetresPerTrace: perXL},
		Legends:    []render.Legend{style.LegendFor(attr, layer)},
		Width:      width, Height: height,
		Geo: figure.MapGeo(layoutPlace{l}, []int{l.FirstInline, lastIL}, []int{l.FirstCrossline, lastXL}),
	}, nil
}

// layoutPlace gives figure.MapGeo a horizon layout's coordinates by line
// numbers. A layout reads (0, 0) where a trace is missing (horizonjob's
// FileSource): that counts as no coordinates.
type layoutPlace struct{ l horizon.Layout }

func (p layoutPlace) Coordinates(inline, crossline int) (x, y float64, ok bool) {
	l := p.l
	if l.XY == nil || l.InlineStep == 0 || l.CrosslineStep == 0 {
		return 0, 0, false
	}
	il, xl := (inline-l.FirstInline)/l.InlineStep, (crossline-l.FirstCrossline)/l.CrosslineStep
	if il < 0 || il >= l.Inlines || xl < 0 || xl >= l.Crosslines {
		return 0, 0, false
	}
	x, y = l.XY(il, xl)
	return x, y, x != 0 || y != 0
}

// outlineColour is the survey outline's ink (the figure's dark ink).
var outlineColour = color.RGBA{25, 25, 25, 255}

// drawOutline draws the survey's outline on a map drawn in plot (inlines
// down, crosslines across, ni x nx cells): the edges between grid cells
// with a trace and cells without one or outside the grid. live nil means
// every cell has a trace (the outline is the map's edge).
func drawOutline(img *image.RGBA, plot image.Rectangle, ni, nx int, live func(il, xl int) bool) {
	if ni < 1 || nx < 1 || plot.Empty() {
		return
	}
	in := func(il, xl int) bool {
		return il >= 0 && il < ni && xl >= 0 && xl < nx && (live == nil || live(il, xl))
	}
	cw, ch := float64(plot.Dx())/float64(nx), float64(plot.Dy())/float64(ni)
	x := func(xl int) float64 { return float64(plot.Min.X) + float64(xl)*cw }
	y := func(il int) float64 { return float64(plot.Min.Y) + float64(il)*ch }
	const width = 2
	// Horizontal edges (between inline il-1 and il), merged along runs.
	for il := 0; il <= ni; il++ {
		for xl := 0; xl < nx; {
			if in(il-1, xl) == in(il, xl) {
				xl++
				continue
			}
			end := xl
			for end < nx && in(il-1, end) != in(il, end) {
				end++
			}
			render.StrokePolyline(img, []float64{x(xl), x(end)}, []float64{y(il), y(il)}, width, outlineColour)
			xl = end
		}
	}
	// Vertical edges (between crossline xl-1 and xl).
	for xl := 0; xl <= nx; xl++ {
		for il := 0; il < ni; {
			if in(il, xl-1) == in(il, xl) {
				il++
				continue
			}
			end := il
			for end < ni && in(end, xl-1) != in(end, xl) {
				end++
			}
			render.StrokePolyline(img, []float64{x(xl), x(xl)}, []float64{y(il), y(end)}, width, outlineColour)
			il = end
		}
	}
}
