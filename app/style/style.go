// Package style holds the display choices the viewer and the figure command
// share: which palette family an attribute's kind gets, how a value range
// is chosen for it, and how a section becomes a render layer. No fyne.
package style

import (
	"fmt"

	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
)

// Family returns the palette family for an attribute kind: a sequential
// map for magnitudes, a diverging map with a neutral centre for signed
// values, and a cyclic map for phase-like values (common practice).
func Family(k compute.Kind) palettes.Family {
	switch k {
	case compute.Magnitude:
		return palettes.Sequential
	case compute.Cyclic:
		return palettes.Cyclic
	default:
		return palettes.Diverging
	}
}

// Palette returns the palette named name, or the default for attribute a's
// kind when name is "".
func Palette(a *compute.Attribute, name string) (*palettes.Palette, error) {
	if name == "" {
		return palettes.Default(Family(a.Kind)), nil
	}
	p, err := palettes.ByName(name)
	if err != nil {
		return nil, fmt.Errorf("palette %q: %w", name, err)
	}
	return p, nil
}

// Range returns the value range shown for attribute a on data: a cyclic
// attribute in degrees spans -180..180 whatever the data; a signed one is
// clipped symmetrically about zero at the clip percentile; a magnitude one
// runs from its low to its high percentile. clipPct is the percentile kept
// (e.g. 99 clips the top 1%).
func Range(a *compute.Attribute, data [][]float32, clipPct float64) (lo, hi float32) {
	if a.Kind == compute.Cyclic && a.Unit == "deg" {
		return -180, 180
	}
	lo, hi = render.PercentileRange(data, clipPct, a.Kind == compute.Signed)
	if a.Kind == compute.Magnitude && lo > 0 {
		// Magnitudes read from zero up: a bright spot is bright against
		// the whole range, not against the section's weakest value.
		lo = 0
	}
	if !(hi > lo) {
		hi = lo + 1
	}
	return lo, hi
}

// Layer is the usual render layer for attribute a's values: its palette,
// its range at clipPct, full opacity.
func Layer(a *compute.Attribute, data [][]float32, pal *palettes.Palette, clipPct float64) render.Layer {
	lo, hi := Range(a, data, clipPct)
	return render.Layer{Data: data, Palette: pal, Lo: lo, Hi: hi, Opacity: 1}
}

// Overlay is the layer for an attribute shown over another: opacity is the
// overlay's strength in 0..1; followValue makes weak values more
// transparent so the base shows through where the overlay is small.
func Overlay(a *compute.Attribute, data [][]float32, pal *palettes.Palette, clipPct, opacity float64, followValue bool) render.Layer {
	l := Layer(a, data, pal, clipPct)
	l.Opacity, l.OpacityFollowsValue = opacity, followValue
	return l
}

// LegendFor returns the legend entry of a layer showing attribute a.
// An attribute whose unit is the input's own amplitude ("amplitude") shows
// no unit: SEG-Y samples carry none a legend could name.
func LegendFor(a *compute.Attribute, l render.Layer) render.Legend {
	unit := a.Unit
	if unit == "amplitude" {
		unit = ""
	}
	return render.Legend{Name: a.Name, Unit: unit, Palette: l.Palette, Lo: float64(l.Lo), Hi: float64(l.Hi), Cyclic: a.Kind == compute.Cyclic}
}

// OverlayPalette returns the palette named name, or for "" the overlay
// palette when a is a magnitude (made to sit over a diverging amplitude
// base) and the kind's default otherwise.
func OverlayPalette(a *compute.Attribute, name string) (*palettes.Palette, error) {
	if name == "" && a.Kind == compute.Magnitude {
		return palettes.Default(palettes.Overlay), nil
	}
	return Palette(a, name)
}
