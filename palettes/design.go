package palettes

import (
	"image/color"
	"math"
	"sync"

	colorful "github.com/lucasb-eyer/go-colorful"
)

// lch is a colour in the polar form of CIELAB (CIE 1976 L*, C*ab, hab in
// degrees; D65 white, as go-colorful's Hcl uses). L runs 0..100.
type lch struct{ L, C, H float64 }

// toColor converts to a go-colorful colour (sRGB, possibly out of gamut).
func (c lch) toColor() colorful.Color {
	return colorful.Hcl(c.H, c.C/100, c.L/100)
}

// maxChroma returns the largest chroma at lightness l and hue h that still
// lies inside the sRGB gamut, by bisection.
func maxChroma(l, h float64) float64 {
	lo, hi := 0.0, 200.0
	for range 40 {
		mid := (lo + hi) / 2
		if (lch{l, mid, h}).toColor().IsValid() {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// gamutMargin keeps designed colours a little inside the sRGB boundary so
// that rounding to 8 bits never clips a channel.
const gamutMargin = 0.97

// inGamut returns c with its chroma reduced, if needed, to fit in sRGB.
func inGamut(c lch) lch {
	if m := gamutMargin * maxChroma(c.L, c.H); c.C > m {
		c.C = m
	}
	return c
}

// knot is a control point of a palette path at parameter At in [0,1].
type knot struct {
	At float64
	lch
}

// design describes how one palette is generated.
type design struct {
	name, description string
	family            Family
	// path returns the designed colour at parameter u in [0,1]; for cyclic
	// designs path(0) and path(1) must be the same colour.
	path func(u float64) lch
	// evenSteps reparametrises the path by CIEDE2000 arc length so that
	// consecutive table entries differ by equal perceptual steps.
	evenSteps bool
}

// denseSamples is how finely the path is sampled to measure its arc length.
const denseSamples = 4096

// build generates the 256-entry table of a design.
func (d design) build() Palette {
	p := Palette{Name: d.name, Family: d.family, Description: d.description}
	colours := d.curve(256)
	if d.family == Sequential || d.family == Grey || d.family == Overlay {
		quantizeRising(colours, &p.Table)
	} else {
		for k, c := range colours {
			r, g, b := c.Clamped().RGB255()
			p.Table[k] = color.RGBA{r, g, b, 255}
		}
	}
	return p
}

// curve returns n colours along the design before rounding to 8 bits. For
// a cyclic design the n colours split the closed loop into n equal parts
// (colour n would be colour 0 again); otherwise both ends are included.
func (d design) curve(n int) []colorful.Color {
	cyclic := d.family == Cyclic
	params := make([]float64, n)
	for j := range n {
		if cyclic {
			params[j] = float64(j) / float64(n)
		} else {
			params[j] = float64(j) / float64(n-1)
		}
	}
	if d.evenSteps {
		params = d.arcLengthParams(params)
	}
	out := make([]colorful.Color, n)
	for j, u := range params {
		out[j] = inGamut(d.path(u)).toColor()
	}
	return out
}

// arcLengthParams maps fractions of the path's CIEDE2000 length to path
// parameters, so that equal fractions are equal perceptual distances.
func (d design) arcLengthParams(fractions []float64) []float64 {
	u := make([]float64, denseSamples+1)
	s := make([]float64, denseSamples+1)
	prev := inGamut(d.path(0)).toColor()
	for k := 1; k <= denseSamples; k++ {
		u[k] = float64(k) / denseSamples
		c := inGamut(d.path(u[k])).toColor()
		s[k] = s[k-1] + ciede2000(prev, c)
		prev = c
	}
	total := s[denseSamples]
	out := make([]float64, len(fractions))
	k := 0
	for j, f := range fractions {
		target := f * total
		for k < denseSamples-1 && s[k+1] < target {
			k++
		}
		w := 0.0
		if ds := s[k+1] - s[k]; ds > 0 {
			w = (target - s[k]) / ds
		}
		out[j] = u[k] + math.Min(math.Max(w, 0), 1)*(u[k+1]-u[k])
	}
	return out
}

// ciede2000 is the CIEDE2000 colour difference (CIE 142-2001) on the usual
// 0..100 lightness scale; go-colorful returns it divided by 100.
func ciede2000(a, b colorful.Color) float64 {
	return 100 * a.DistanceCIEDE2000(b)
}

// quantizeRising rounds colours to 8 bits keeping CIELAB lightness from
// falling, for normal vision and for simulated protanopia and deuteranopia:
// of the eight floor/ceil roundings of each colour it takes the one nearest
// the designed colour (CIE 1976 distance) whose L* exceeds the previous
// entry's and whose simulated L* does not fall below the previous entry's;
// when no rounding qualifies it takes the lightest one.
func quantizeRising(colours []colorful.Color, table *[256]color.RGBA) {
	deficiencies := []Deficiency{Protanopia, Deuteranopia}
	prevL := math.Inf(-1)
	prevSim := []float64{math.Inf(-1), math.Inf(-1)}
	for k, c := range colours {
		tl, ta, tb := c.Lab()
		var best, lightest color.RGBA
		var bestSim, lightestSim [2]float64
		bestD, lightestL := math.Inf(1), math.Inf(-1)
		for corner := range 8 {
			rgb := [3]float64{c.R, c.G, c.B}
			var q [3]uint8
			for ch := range 3 {
				v := math.Min(math.Max(rgb[ch]*255, 0), 255)
				if corner&(1<<ch) != 0 {
					q[ch] = uint8(math.Ceil(v))
				} else {
					q[ch] = uint8(math.Floor(v))
				}
			}
			qc := colorful.Color{R: float64(q[0]) / 255, G: float64(q[1]) / 255, B: float64(q[2]) / 255}
			l, a, b := qc.Lab()
			var sim [2]float64
			simOK := true
			for i, d := range deficiencies {
				sim[i], _, _ = simulate(qc, d).Lab()
				simOK = simOK && sim[i] >= prevSim[i]
			}
			rgba := color.RGBA{q[0], q[1], q[2], 255}
			if l > lightestL {
				lightest, lightestL, lightestSim = rgba, l, sim
			}
			if l <= prevL || !simOK {
				continue
			}
			if dd := (l-tl)*(l-tl) + (a-ta)*(a-ta) + (b-tb)*(b-tb); dd < bestD {
				best, bestD, bestSim = rgba, dd, sim
			}
		}
		if math.IsInf(bestD, 1) {
			best, bestSim = lightest, lightestSim
		}
		table[k] = best
		prevL, _, _ = colorful.Color{R: float64(best.R) / 255, G: float64(best.G) / 255, B: float64(best.B) / 255}.Lab()
		prevSim[0], prevSim[1] = bestSim[0], bestSim[1]
	}
}

// monotoneCubic returns the shape-preserving piecewise cubic Hermite
// interpolant through (x[i], y[i]) with slopes limited as in Fritsch and
// Carlson (1980), "Monotone piecewise cubic interpolation", SIAM J. Numer.
// Anal. 17(2): monotone data give a monotone curve with no overshoot. x must
// be strictly increasing; outside [x0, xn] the end values are held.
func monotoneCubic(x, y []float64) func(float64) float64 {
	n := len(x)
	delta := make([]float64, n-1)
	for i := range n - 1 {
		delta[i] = (y[i+1] - y[i]) / (x[i+1] - x[i])
	}
	m := make([]float64, n)
	m[0], m[n-1] = delta[0], delta[n-2]
	for i := 1; i < n-1; i++ {
		if delta[i-1]*delta[i] <= 0 {
			m[i] = 0
		} else {
			m[i] = (delta[i-1] + delta[i]) / 2
		}
	}
	for i := range n - 1 {
		if delta[i] == 0 {
			m[i], m[i+1] = 0, 0
			continue
		}
		a, b := m[i]/delta[i], m[i+1]/delta[i]
		if r := a*a + b*b; r > 9 {
			tau := 3 / math.Sqrt(r)
			m[i], m[i+1] = tau*a*delta[i], tau*b*delta[i]
		}
	}
	return func(t float64) float64 {
		if t <= x[0] {
			return y[0]
		}
		if t >= x[n-1] {
			return y[n-1]
		}
		i := 0
		for i < n-2 && t > x[i+1] {
			i++
		}
		h := x[i+1] - x[i]
		s := (t - x[i]) / h
		s2, s3 := s*s, s*s*s
		return (2*s3-3*s2+1)*y[i] + (s3-2*s2+s)*h*m[i] + (-2*s3+3*s2)*y[i+1] + (s3-s2)*h*m[i+1]
	}
}

// knotPath interpolates L, C and h separately through the knots with
// monotone cubics. Hues are taken as written (unwrapped), so a path can
// turn more than 180 degrees.
func knotPath(knots []knot) func(float64) lch {
	x := make([]float64, len(knots))
	ls := make([]float64, len(knots))
	cs := make([]float64, len(knots))
	hs := make([]float64, len(knots))
	for i, k := range knots {
		x[i], ls[i], cs[i], hs[i] = k.At, k.L, k.C, k.H
	}
	fl, fc, fh := monotoneCubic(x, ls), monotoneCubic(x, cs), monotoneCubic(x, hs)
	return func(u float64) lch { return lch{fl(u), fc(u), fh(u)} }
}

// divergingPath builds a signed map: lightness falls linearly from the
// neutral centre (u=0.5, chroma 0) to endL at both ends; chroma rises with
// distance from the centre up to peakC, limited at every lightness by the
// smaller of the two sides' sRGB gamut so both halves stay mirror images in
// L* and C*; only the hue tells the sign.
func divergingPath(centreL, endL, peakC, negHue, posHue float64) func(float64) lch {
	return func(u float64) lch {
		s := math.Abs(2*u - 1) // 0 at centre, 1 at either end
		l := centreL + (endL-centreL)*s
		c := peakC * math.Sin(math.Pi/2*s)
		limit := gamutMargin * math.Min(maxChroma(l, negHue), maxChroma(l, posHue))
		c = math.Min(c, limit)
		h := posHue
		if u < 0.5 {
			h = negHue
		}
		return lch{l, c, h}
	}
}

// cyclicPath builds a closed loop: the hue turns once round the circle,
// lightness swings sinusoidally between midL-swing (at u=0 and 1) and
// midL+swing (at u=0.5), and chroma is the largest constant the sRGB gamut
// allows all the way round. Every component is periodic in u, so the loop
// closes without a seam.
func cyclicPath(midL, swing, hueAtEnds float64) func(float64) lch {
	l := func(u float64) float64 { return midL - swing*math.Cos(2*math.Pi*u) }
	h := func(u float64) float64 { return math.Mod(hueAtEnds+360*u, 360) }
	// the chroma is found when the palette is first generated, not when
	// the designs are listed
	chroma := sync.OnceValue(func() float64 {
		c := math.Inf(1)
		for k := range 720 {
			u := float64(k) / 720
			c = math.Min(c, maxChroma(l(u), h(u)))
		}
		return c * gamutMargin * gamutMargin
	})
	return func(u float64) lch { return lch{l(u), chroma(), h(u)} }
}

// designs lists quadtrace's palettes. Every hue path and lightness profile
// here is our own design; the numbers are CIELAB L*, C*ab and hue angles.
func designs() []design {
	return []design{
		{
			name:   "lumbry",
			family: Sequential,
			description: "magnitude: near-black moss green rising through deep sea blue and " +
				"lavender to a pale blush; lightness rises in even CIEDE2000 steps",
			path: knotPath([]knot{
				{0.00, lch{10, 14, 150}},
				{0.30, lch{38, 38, 215}},
				{0.65, lch{66, 40, 295}},
				{1.00, lch{96, 10, 355}},
			}),
			evenSteps: true,
		},
		{
			name:   "kestrine",
			family: Diverging,
			description: "signed amplitude: negative values in indigo, positive in burnt " +
				"orange, zero a neutral near-white; both sides have equal lightness at " +
				"equal distance from zero",
			path: divergingPath(97, 32, 70, 290, 50),
		},
		{
			name:   "orbel",
			family: Cyclic,
			description: "phase: one turn of hue with lightness highest at 0 degrees and lowest " +
				"at +-180 degrees, which meet seamlessly",
			path:      cyclicPath(60, 13, 270),
			evenSteps: true,
		},
		{
			name:        "slatine",
			family:      Grey,
			description: "grey ramp from near-black to near-white in even lightness steps",
			path: knotPath([]knot{
				{0, lch{4, 0, 0}},
				{1, lch{98, 0, 0}},
			}),
			evenSteps: true,
		},
		{
			name:   "pyrrel",
			family: Overlay,
			description: "overlay: saturated crimson through coral to gold, meant for partial " +
				"opacity over an amplitude section in grey or a diverging map",
			path: knotPath([]knot{
				{0.0, lch{36, 62, 12}},
				{0.5, lch{64, 72, 45}},
				{1.0, lch{90, 80, 92}},
			}),
			evenSteps: true,
		},
	}
}
