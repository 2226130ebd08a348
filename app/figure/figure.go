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
	"path/filepath"
	"quadtrace/app/outfile"
	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/render"
)

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

// Request says which figure to build: the slice, the attributes and how
// they are drawn, and the figure's size and resolution.
type Request struct {
	Inline, Crossline       int
	TimeMS                  float64
	Orientation             volume.Orientation
	Attribute, Overlay      string
	Params                  map[string]string
	Condition               string
	Palette, OverlayPalette string
	Opacity                 float64
	OpacityFollows          bool
	Clip                    float64
	Width, Height           int
	DPI                     float64
	BinM                    float64
	Wiggle                  bool
	Title                   string
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
	s := volume.Slice{Orientation: r.Orientation}
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
	layer := func(id, paletteName string, overlay bool) (render.Layer, render.Legend, volume.Section, error) {
		a, err := compute.Lookup(id)
		if err != nil {
			return render.Layer{}, render.Legend{}, volume.Section{}, err
		}
		p, err := a.Resolve(only(r.Params, a))
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
			l = style.Overlay(a, sec.Traces, pal, r.Clip, r.Opacity, r.OpacityFollows)
		} else {
			pal, err := style.Palette(a, paletteName)
			if err != nil {
				return render.Layer{}, render.Legend{}, volume.Section{}, err
			}
			l = style.Layer(a, sec.Traces, pal, r.Clip)
		}
		return l, style.LegendFor(a, l), sec, nil
	}
	base, baseLegend, sec, err := layer(r.Attribute, r.Palette, false)
	if err != nil {
		return render.Figure{}, err
	}
	fig := render.Figure{Base: base, Legends: []render.Legend{baseLegend}, Width: r.Width, Height: r.Height}
	if r.Overlay != "" {
		over, overLegend, _, err := layer(r.Overlay, r.OverlayPalette, true)
		if err != nil {
			return render.Figure{}, err
		}
		fig.Overlay = &over
		fig.Legends = append(fig.Legends, overLegend)
	}
	if r.Wiggle && r.Orientation != volume.TimeSlice {
		// Wiggles show the amplitude: the base layer itself when it is the
		// unconditioned amplitude, else the section read once more.
		amp := sec
		if r.Attribute != "amplitude" || !cond.IsZero() {
			if amp, err = v.Read(ctx, s); err != nil {
				return render.Figure{}, err
			}
		}
		fig.Wiggle = &render.WiggleStyle{Data: amp.Traces, Color: color.RGBA{A: 255}, Fill: true, Gain: 1}
	}
	name := filepath.Base(v.Name())
	keys := sec.Keys
	switch r.Orientation {
	case volume.Inline, volume.Crossline:
		across := "crossline"
		if r.Orientation == volume.Crossline {
			across = "inline"
		}
		fig.Horizontal = render.Axis{Title: across, First: float64(keys[0]), Last: float64(keys[len(keys)-1])}
		first := info.StartMS
		last := first + float64(info.Samples-1)*float64(info.IntervalUS)/1000
		fig.Vertical = render.Axis{Title: "time (ms)", First: first, Last: last}
		spacing := sec.MetresPerTrace
		if r.BinM > 0 {
			spacing = r.BinM
		}
		fig.Scale = render.ScaleBar{MetresPerTrace: spacing}
		fig.Title = fmt.Sprintf("%s: %s %d", name, r.Orientation, s.Number)
	case volume.TimeSlice:
		fig.Horizontal = render.Axis{Title: "crossline", First: float64(keys[0]), Last: float64(keys[len(keys)-1])}
		fig.Vertical = render.Axis{Title: "inline", First: float64(sec.InlineKeys[0]), Last: float64(sec.InlineKeys[len(sec.InlineKeys)-1])}
		fig.MapAspect = sec.MapAspect
		spacing := info.InlineSpacingM
		if r.BinM > 0 {
			spacing = r.BinM
		}
		fig.Scale = render.ScaleBar{MetresPerTrace: spacing}
		fig.Title = fmt.Sprintf("%s: time slice %g ms", name, info.StartMS+float64(s.Number)*float64(info.IntervalUS)/1000)
	}
	if r.Overlay != "" {
		fig.Title += ", " + fig.Legends[1].Name + " over " + fig.Legends[0].Name
	} else {
		fig.Title += ", " + fig.Legends[0].Name
	}
	if r.Title != "" {
		fig.Title = r.Title
	}
	return fig, nil
}

// WritePNG writes img to path with its resolution recorded, through
// app/outfile: nothing appears at path until the whole PNG is written,
// and destinations that are devices, FIFOs, folders, inputs (opt.Inputs)
// or symbolic links (unless opt.FollowSymlink) are refused. When ctx ends
// before the file is in place, nothing is written and ctx.Err() is
// returned.
func WritePNG(ctx context.Context, path string, img *image.RGBA, dpi float64, opt outfile.Options) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	of, err := outfile.Create(path, opt)
	if err != nil {
		return fmt.Errorf("writing figure: %w", err)
	}
	defer of.Abort()
	w := bufio.NewWriter(of)
	err = render.EncodePNG(w, img, dpi)
	if err == nil {
		err = w.Flush()
	}
	if err == nil {
		err = ctx.Err()
		if err != nil {
			return err
		}
		err = of.Commit()
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}
