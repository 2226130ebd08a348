package palettes

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strings"
	"sync"
)

// Family says what kind of data a palette is designed for.
type Family int

const (
	// Sequential maps suit magnitude attributes (envelope, sweetness): lightness
	// rises monotonically from low to high values in even perceptual steps.
	Sequential Family = iota
	// Diverging maps suit signed attributes (amplitude): a neutral light centre
	// for zero and two hues of matched lightness for the two signs.
	Diverging
	// Cyclic maps suit angles (instantaneous phase): the two ends are the same
	// colour, so -180 and +180 degrees look alike.
	Cyclic
	// Grey is an achromatic lightness ramp.
	Grey
	// Overlay maps are saturated sequential maps meant to be drawn with partial
	// opacity over an amplitude section.
	Overlay
)

// String returns the lowercase name of the family.
func (f Family) String() string {
	switch f {
	case Sequential:
		return "sequential"
	case Diverging:
		return "diverging"
	case Cyclic:
		return "cyclic"
	case Grey:
		return "grey"
	case Overlay:
		return "overlay"
	}
	return fmt.Sprintf("family(%d)", int(f))
}

// Palette is a 256-entry colour table with its name, family and a short
// description. Entry 0 is the colour of the low end of the value range and
// entry 255 that of the high end.
type Palette struct {
	Name        string
	Family      Family
	Description string
	Table       [256]color.RGBA
}

// Index returns the table entry for t in [0,1]: the unit interval is split
// into 256 equal bins, bin k shows Table[k]. Values below 0 or above 1 clamp
// to the ends; for a Cyclic palette t wraps, so t and t+1 give the same entry
// and t=0 and t=1 both give entry 0. NaN gives -1.
func (p *Palette) Index(t float64) int {
	if math.IsNaN(t) {
		return -1
	}
	if p.Family == Cyclic {
		if math.IsInf(t, 0) {
			return -1
		}
		t -= math.Floor(t)
		k := int(t * 256)
		if k > 255 { // t rounded up to 1 from just below
			k = 0
		}
		return k
	}
	if t <= 0 {
		return 0
	}
	if t >= 1 {
		return 255
	}
	return min(int(t*256), 255)
}

// At returns the colour for t in [0,1] (see Index for clamping and wrapping).
// NaN, and an infinite t on a cyclic palette, give fully transparent
// color.RGBA{}: the caller decides how a gap is shown.
func (p *Palette) At(t float64) color.RGBA {
	k := p.Index(t)
	if k < 0 {
		return color.RGBA{}
	}
	return p.Table[k]
}

// Reversed returns a new palette with the table in reverse order and the
// name suffixed with "-r". A reversed cyclic palette runs the circle the
// other way round and keeps entry 0 in place, so that it still wraps.
func (p *Palette) Reversed() *Palette {
	r := &Palette{Family: p.Family, Description: p.Description + " (reversed)"}
	if base, ok := strings.CutSuffix(p.Name, "-r"); ok {
		r.Name = base
	} else {
		r.Name = p.Name + "-r"
	}
	if p.Family == Cyclic {
		for k := range 256 {
			r.Table[k] = p.Table[(256-k)%256]
		}
		return r
	}
	for k := range 256 {
		r.Table[k] = p.Table[255-k]
	}
	return r
}

// builtinPalette is a built-in palette by name and family, generated the
// first time it is asked for (generating one takes milliseconds, all of
// them about a tenth of a second: a command that draws with one palette
// generates that one only).
type builtinPalette struct {
	name   string
	family Family
	build  func() Palette
}

// builtin lists the built-in palettes, ordered by family then name; each
// is generated once; All and ByName hand out copies, so nothing a caller
// does can change them.
var builtin = sync.OnceValue(func() []builtinPalette {
	designs := designs()
	out := make([]builtinPalette, len(designs))
	for i, d := range designs {
		out[i] = builtinPalette{name: d.name, family: d.family, build: sync.OnceValue(d.build)}
	}
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].family != out[j].family {
			return out[i].family < out[j].family
		}
		return out[i].name < out[j].name
	})
	return out
})

// All returns fresh copies of every palette, ordered by family then name.
func All() []*Palette {
	b := builtin()
	out := make([]*Palette, len(b))
	for i := range b {
		p := b[i].build()
		out[i] = &p
	}
	return out
}

// ByName returns a copy of the named palette. A name ending in "-r" returns
// the reversed palette. Names are matched case-insensitively.
func ByName(name string) (*Palette, error) {
	want := strings.ToLower(strings.TrimSpace(name))
	base, reversed := strings.CutSuffix(want, "-r")
	for _, b := range builtin() {
		if b.name == base {
			p := b.build()
			if reversed {
				return p.Reversed(), nil
			}
			return &p, nil
		}
	}
	names := make([]string, 0, 8)
	for _, b := range builtin() {
		names = append(names, b.name)
	}
	return nil, fmt.Errorf("palette %q: unknown name (known: %s)", name, strings.Join(names, ", "))
}

// Default returns a copy of the palette quadtrace uses for a family.
// An unknown family gets the grey ramp.
func Default(f Family) *Palette {
	name := "slatine"
	switch f {
	case Sequential:
		name = "lumbry"
	case Diverging:
		name = "kestrine"
	case Cyclic:
		name = "orbel"
	case Overlay:
		name = "pyrrel"
	}
	p, err := ByName(name)
	if err != nil { // cannot happen: the names above are built in
		return &Palette{Name: "empty", Family: f}
	}
	return p
}
