// Package figure builds report figures of a survey (a section or time slice
// of an attribute, optionally with a second one over it, axes, legends and
// scale bar) and writes them as PNG files. The window and the figure
// command share it.
package figure

import (
	"bufio"
	"context"
	"fmt"
	"image"
	"image/color"
	"image/jpeg"
	"math"
	"path/filepath"
	"strings"

	"quadtrace/app/outfile"
	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
)

// Request says which figure to build: the slice, the attributes and how
// they are drawn, and the figure's size and resolution.
type Request struct {
	Orientation       volume.Orientation
	Inline, Crossline int     // the line drawn, by Orientation
	TimeMS            float64 // a time slice's time; the nearest sample is drawn
	Offset            int     // the offset of a pre-stack file (ignored for post-stack)

	Attribute, Overlay string            // attribute ids; Overlay "" draws none
	Params             map[string]string // NAME=VALUE for every chosen attribute that has NAME (compute.ResolveAll)
	Condition          string            // compute.ParseConditioning's form; "" none

	Palette, OverlayPalette string  // palette names; "" picks by the attribute's kind
	Opacity                 float64 // overlay opacity, 0 to 1
	OpacityFollows          bool    // weak overlay values more transparent
	Clip                    float64 // percentile of values inside the colour range
	Wiggle                  bool    // amplitude wiggles over a section

	Width, Height int     // pixels
	DPI           float64 // resolution recorded in a PNG
	BinM          float64 // trace spacing for the scale bar; 0 takes it from the coordinates
	Title         string  // "" makes one from the survey, line and attributes
}

// Draw computes what r asks for on v and draws the figure.
func Draw(ctx context.Context, v *volume.Volume, r Request) (*image.RGBA, error) {
	fig, err := Build(ctx, v, r)
	if err != nil {
		return nil, err
	}
	return fig.Draw()
}

// Build computes what r asks for on v and composes the figure.
func Build(ctx context.Context, v *volume.Volume, r Request) (render.Figure, error) {
	info := v.Info()
	s := volume.Slice{Orientation: r.Orientation, Offset: r.Offset}
	switch r.Orientation {
	case volume.Inline:
		s.Number = r.Inline
	case volume.Crossline:
		s.Number = r.Crossline
	case volume.TimeSlice:
		s.Number = v.SampleIndex(r.TimeMS)
	}
	cond, err := compute.ParseConditioning(r.Condition)
	if err != nil {
		return render.Figure{}, fmt.Errorf("--condition: %w", err)
	}
	ids := []string{r.Attribute}
	if r.Overlay != "" {
		ids = append(ids, r.Overlay)
	}
	attrs := make([]*compute.Attribute, len(ids))
	for i, id := range ids {
		if attrs[i], err = compute.Lookup(id); err != nil {
			return render.Figure{}, err
		}
	}
	params, err := compute.ResolveAll(attrs, r.Params)
	if err != nil {
		return render.Figure{}, err
	}
	c := Content{
		Name: filepath.Base(v.Name()), Attrs: attrs, Params: params, Cond: cond,
		Clip: r.Clip, Opacity: r.Opacity, OpacityFollows: r.OpacityFollows, Wiggle: r.Wiggle,
		Width: r.Width, Height: r.Height, Title: r.Title, MetresPerTrace: r.BinM,
	}
	for k, name := range []string{r.Palette, r.OverlayPalette}[:len(attrs)] {
		pick := style.Palette
		if k == 1 {
			pick = style.OverlayPalette
		}
		pal, err := pick(attrs[k], name)
		if err != nil {
			return render.Figure{}, err
		}
		sec, err := v.Attribute(ctx, s, attrs[k], params[k], cond, nil)
		if err != nil {
			return render.Figure{}, err
		}
		c.Palettes = append(c.Palettes, pal)
		c.Sections = append(c.Sections, &sec)
	}
	if r.Wiggle && r.Orientation != volume.TimeSlice && (r.Attribute != "amplitude" || !cond.IsZero()) {
		// Wiggles show the amplitude: the base layer itself when it is
		// the unconditioned amplitude, else the section read once more.
		amp, err := v.Read(ctx, s)
		if err != nil {
			return render.Figure{}, err
		}
		c.Amplitude = &amp
	}
	if r.Orientation == volume.TimeSlice {
		if c.MetresPerTrace == 0 {
			c.MetresPerTrace = info.InlineSpacingM
		}
		c.Geo = MapGeo(v, c.Sections[0].InlineKeys, c.Sections[0].Keys)
	}
	return Compose(c)
}

// Content is what a figure shows, already computed: the window passes what
// it displays, Build what it computed for a Request. Compose lays it out.
type Content struct {
	Name     string               // file or survey name, for the title and caption
	Attrs    []*compute.Attribute // base, then the overlay if any
	Params   []compute.Params     // as resolved, one per attribute (for the caption)
	Cond     compute.Conditioning // applied before the attributes
	Sections []*volume.Section    // one per attribute, all of one slice
	Palettes []*palettes.Palette  // one per attribute
	// Amplitude is the wiggles' data when it is not Sections[0] (an
	// attribute or conditioned base); nil draws Sections[0].
	Amplitude *volume.Section

	Clip, Opacity  float64 // percentile kept inside the colours; overlay opacity
	OpacityFollows bool    // weak overlay values more transparent
	Wiggle         bool    // amplitude wiggles over a section
	// View is the window of a section shown (render.Figure.View); the zero
	// value shows it all.
	View          render.Viewport
	Width, Height int
	Title         string // "" makes one from the name, the slice and the attributes
	// MetresPerTrace is the scale bar's trace spacing; 0 takes the
	// section's own (for a map: none, give the inline spacing).
	MetresPerTrace float64
	Geo            *render.MapGeo // a map's north arrow and corner coordinates
}

// Compose lays out the figure of c: layers and legends by the attribute's
// kind (app/style), axes labelled at the centres of the first and last
// trace and sample in view, scale bar, title and caption. It is the one
// figure builder of the window and the figure command.
func Compose(c Content) (render.Figure, error) {
	if len(c.Sections) == 0 || len(c.Sections) != len(c.Attrs) || len(c.Palettes) != len(c.Attrs) || c.Sections[0] == nil {
		return render.Figure{}, fmt.Errorf("figure: %d sections, %d attributes and %d palettes", len(c.Sections), len(c.Attrs), len(c.Palettes))
	}
	base := c.Sections[0]
	if len(base.Traces) == 0 || len(base.Traces[0]) == 0 {
		return render.Figure{}, fmt.Errorf("figure: the section is empty")
	}
	fig := render.Figure{Width: c.Width, Height: c.Height, View: c.View}
	fig.Base = style.Layer(c.Attrs[0], base.Traces, c.Palettes[0], c.Clip)
	fig.Legends = []render.Legend{style.LegendFor(c.Attrs[0], fig.Base)}
	if len(c.Attrs) > 1 && c.Sections[1] != nil {
		ov := style.Overlay(c.Attrs[1], c.Sections[1].Traces, c.Palettes[1], c.Clip, c.Opacity, c.OpacityFollows)
		fig.Overlay = &ov
		fig.Legends = append(fig.Legends, style.LegendFor(c.Attrs[1], ov))
	}
	sl := base.Slice
	if sl.Orientation == volume.TimeSlice {
		keys, rows := base.Keys, base.InlineKeys
		fig.MapAspect = base.MapAspect
		if !(fig.MapAspect > 0) {
			fig.MapAspect = 1
		}
		fig.View = render.Viewport{}
		fig.Horizontal = render.Axis{Title: "Crossline", First: float64(keys[0]), Last: float64(keys[len(keys)-1])}
		fig.Vertical = render.Axis{Title: "Inline", First: float64(rows[0]), Last: float64(rows[len(rows)-1])}
		fig.Scale = render.ScaleBar{MetresPerTrace: c.MetresPerTrace}
		fig.Geo = c.Geo
		fig.Title = fmt.Sprintf("%s: time slice %g ms", c.Name, (base.T0+float64(sl.Number)*base.DT)*1000)
	} else {
		n, m := len(base.Traces), len(base.Traces[0])
		vp := c.View
		if vp == (render.Viewport{}) {
			vp = render.Viewport{Trace0: 0, Trace1: float64(n), Sample0: 0, Sample1: float64(m)}
		}
		i0 := max(0, min(int(vp.Trace0), n-1))
		i1 := max(i0, min(int(vp.Trace1+0.999)-1, n-1))
		s0 := max(0, min(int(vp.Sample0), m-1))
		s1 := max(s0, min(int(vp.Sample1+0.999)-1, m-1))
		across := "Crossline"
		if sl.Orientation == volume.Crossline {
			across = "Inline"
		}
		fig.Horizontal = render.Axis{Title: across, First: float64(base.Keys[i0]), Last: float64(base.Keys[i1])}
		fig.Vertical = render.Axis{Title: "Time (ms)", First: (base.T0 + float64(s0)*base.DT) * 1000, Last: (base.T0 + float64(s1)*base.DT) * 1000}
		if c.Wiggle {
			amp := base
			if c.Amplitude != nil {
				amp = c.Amplitude
			}
			fig.Wiggle = &render.WiggleStyle{Data: amp.Traces, Color: color.RGBA{A: 255}, Fill: true, Gain: 1}
		}
		spacing := base.MetresPerTrace
		if c.MetresPerTrace > 0 {
			spacing = c.MetresPerTrace
		}
		fig.Scale = render.ScaleBar{MetresPerTrace: spacing}
		fig.Title = fmt.Sprintf("%s: %s %d", c.Name, sl.Orientation, sl.Number)
	}
	if len(fig.Legends) > 1 {
		fig.Title += ", " + fig.Legends[1].Name + " over " + fig.Legends[0].Name
	} else {
		fig.Title += ", " + fig.Legends[0].Name
	}
	if c.Title != "" {
		fig.Title = c.Title
	}
	fig.Caption = Caption(c.Name, c.Attrs, c.Params, c.Cond)
	return fig, nil
}

// Caption is a figure's caption line: the file or survey name, then each
// attribute with its parameters as resolved and the conditioning, e.g.
// "survey.sgy · Envelope (pad=fast, taper=0 ms) · band-pass 8-60 Hz".
func Caption(name string, attrs []*compute.Attribute, params []compute.Params, cond compute.Conditioning) string {
	parts := []string{name}
	for i, a := range attrs {
		text := a.Name
		if i < len(params) && len(a.Params) > 0 {
			var ps []string
			for _, spec := range a.Params {
				v := params[i].String(spec.Name)
				if spec.Unit != "" {
					v += " " + spec.Unit
				}
				ps = append(ps, spec.Name+"="+v)
			}
			text += " (" + strings.Join(ps, ", ") + ")"
		}
		parts = append(parts, text)
	}
	if !cond.IsZero() {
		parts = append(parts, "conditioning "+cond.String())
	}
	return strings.Join(parts, " · ")
}

// Located is a survey that knows its traces' CDP coordinates
// (*volume.Volume is one).
type Located interface {
	Coordinates(inline, crossline int) (x, y float64, ok bool)
}

// MapGeo places a time slice's map on the ground from the survey's CDP
// coordinates at the grid's corners (inlines down the page, crosslines
// across): the direction of grid north on the page and the corners' X/Y.
// It is nil when the survey has no coordinates at the corners or the grid
// is degenerate (one line, or collinear corners).
func MapGeo(v Located, inlines, crosslines []int) *render.MapGeo {
	if len(inlines) < 2 || len(crosslines) < 2 {
		return nil
	}
	il0, il1 := inlines[0], inlines[len(inlines)-1]
	xl0, xl1 := crosslines[0], crosslines[len(crosslines)-1]
	type pt struct {
		x, y float64
		ok   bool
	}
	at := func(il, xl int) pt { x, y, ok := v.Coordinates(il, xl); return pt{x, y, ok} }
	corners := [4]pt{at(il0, xl0), at(il0, xl1), at(il1, xl0), at(il1, xl1)}
	g := &render.MapGeo{NorthDegrees: math.NaN()}
	any := false
	for k, c := range corners {
		if c.ok {
			g.Corners[k] = fmt.Sprintf("X %.0f  Y %.0f", c.x, c.y)
			any = true
		}
	}
	if !any {
		return nil
	}
	tl, tr, bl := corners[0], corners[1], corners[2]
	if tl.ok && tr.ok && bl.ok {
		// Page right is the crossline direction (tl to tr), page down the
		// inline direction (tl to bl); the map is drawn with equal metres
		// both ways. North (0, 1) on the ground is a*across + b*down with
		// across and down the unit vectors of those directions.
		ax, ay := tr.x-tl.x, tr.y-tl.y
		dx, dy := bl.x-tl.x, bl.y-tl.y
		la, ld := math.Hypot(ax, ay), math.Hypot(dx, dy)
		if la > 0 && ld > 0 {
			ax, ay, dx, dy = ax/la, ay/la, dx/ld, dy/ld
			det := ax*dy - ay*dx
			if math.Abs(det) > 1e-6 {
				a := -dx / det // solves a*(ax,ay) + b*(dx,dy) = (0,1)
				b := ax / det
				g.NorthDegrees = math.Mod(math.Atan2(a, -b)*180/math.Pi+360, 360)
			}
		}
	}
	return g
}

// Format is an image file format a figure can be written in.
type Format string

// The formats Write knows.
const (
	PNG  Format = "png"  // lossless, with the resolution in a pHYs chunk
	JPEG Format = "jpeg" // baseline JPEG (image/jpeg) at quality 92
)

// FormatOf picks the format from path's extension (any case): .png is PNG,
// .jpg and .jpeg are JPEG; anything else, SVG included (a figure is a
// raster image), is an error naming the ones that work.
func FormatOf(path string) (Format, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".png":
		return PNG, nil
	case ".jpg", ".jpeg":
		return JPEG, nil
	case "":
		return "", fmt.Errorf("%s has no extension: want .png, .jpg or .jpeg", path)
	default:
		return "", fmt.Errorf("%s: cannot write %s figures: want .png, .jpg or .jpeg", path, ext)
	}
}

// Write writes img to path in the format its extension names (FormatOf),
// a PNG with dpi recorded. It is the one figure writer of the window and
// the figure command, through app/outfile: nothing appears at path until
// the whole image is written (mode 0644), missing folders are made, and
// destinations that are devices, FIFOs, folders, inputs (opt.Inputs) or
// symbolic links (unless opt.FollowSymlink) are refused. When ctx ends
// before the file is in place, nothing is written and ctx.Err() is
// returned.
func Write(ctx context.Context, path string, img image.Image, dpi float64, opt outfile.Options) error {
	format, err := FormatOf(path)
	if err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	out, err := outfile.Create(path, opt)
	if err != nil {
		return err
	}
	defer out.Abort()
	w := bufio.NewWriter(out)
	switch format {
	case PNG:
		err = render.EncodePNG(w, img, dpi)
	case JPEG:
		err = jpeg.Encode(w, img, &jpeg.Options{Quality: 92})
	}
	if err == nil {
		err = w.Flush()
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	return out.Commit()
}
