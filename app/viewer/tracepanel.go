package viewer

import (
	"fmt"
	"image"
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/theme"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/render"
)

// Curve colours of the trace panel's attribute tracks, chosen to read on
// both the light and the dark theme.
var trackColours = []color.RGBA{{232, 120, 20, 255}, {20, 150, 175, 255}}

// traceTrack is one column of the trace panel: a curve of values against
// sample index, drawn between Lo and Hi.
type traceTrack struct {
	Name   string
	Values []float32
	Lo, Hi float64
	Wiggle bool // amplitude: a wiggle with its positive lobes filled
	Cyclic bool // values wrap from Hi round to Lo (phase)
	Colour color.RGBA
}

// tracePicture is what the trace panel and the spectrum show for one trace.
type tracePicture struct {
	title          string
	tracks         []traceTrack
	s0, s1         float64 // sample range shown (the section's, for sections)
	markSample     float64 // a time to mark (the time slice's); NaN: none
	t0ms, dtms     float64
	spectrum       compute.Spectrum
	spectrumOK     bool
	fg, grid, fill color.RGBA
}

// curveSource is an attribute drawn as a curve in the trace panel: the
// attribute, the key and section it was shown with, and its parameters.
type curveSource struct {
	a      *compute.Attribute
	key    string
	sec    *volume.Section
	params map[string]string
}

// requestTrace fills the trace panel for the picked trace in the
// background: its amplitude and attribute curves and its spectrum.
func (v *viewer) requestTrace() {
	v.ui.mapPanel.refreshMarks() // the pick on the map
	d := v.data
	if !d.complete() || v.state.PickTrace < 0 || v.vol == nil {
		v.ui.trace.setMessage("Click a trace to see it here")
		v.ui.spectrum.setMessage("")
		return
	}
	st := v.state
	pl := d.plan // the layers of the shown data, not those requested
	tw, th := v.ui.trace.plotPixels()
	sw, sh := v.ui.spectrum.plotPixels()
	fg := toRGBA(theme.Color(theme.ColorNameForeground))
	grid := toRGBA(theme.Color(theme.ColorNameSeparator))
	ranges := copyRanges(v.ranges)
	ampRange := ranges[rangeKey(lookup(amplitudeID), nil, compute.Conditioning{}, st.ClipPercent)]
	baseParams, overParams, cond := d.baseParams, d.overParams, d.cond
	nx, ny := v.dims()
	vp := st.viewport(nx, ny)
	v.startWithSurvey("trace", func(j *job, vol survey) {
		pic := tracePicture{fg: fg, grid: grid, markSample: math.NaN()}
		pic.fill = fg
		pic.fill.A = 150
		var amp []float32
		var attrs []curveSource
		if pl.Overlay != nil {
			attrs = append(attrs, curveSource{pl.Overlay, d.overKey, d.over, overParams})
		}
		if pl.Base.ID != amplitudeID {
			attrs = append(attrs, curveSource{pl.Base, d.baseKey, d.base, baseParams})
		}
		var curves [][]float32
		if d.amp.Slice.Orientation == volume.TimeSlice {
			// A map pick is a point: read that trace and compute its
			// attributes on it alone.
			row, col := st.PickTrace/max(nx, 1), st.PickTrace%max(nx, 1)
			if row >= len(d.amp.InlineKeys) || col >= len(d.amp.Keys) {
				return
			}
			il, xl := d.amp.InlineKeys[row], d.amp.Keys[col]
			pic.title = fmt.Sprintf("Inline %d, crossline %d", il, xl)
			var err error
			amp, err = vol.Trace(il, xl, d.amp.Slice.Offset)
			if err != nil {
				v.onUI(j, func() { v.ui.trace.setMessage(err.Error()); v.ui.spectrum.setMessage("") })
				return
			}
			for _, at := range attrs {
				p, err := at.a.Resolve(at.params)
				if err != nil {
					return
				}
				c, err := vol.TraceAttribute(j.ctx, il, xl, d.amp.Slice.Offset, at.a, p, cond)
				if err != nil {
					v.onUI(j, func() { v.ui.trace.setMessage(err.Error()) })
					return
				}
				curves = append(curves, c)
			}
			pic.s0, pic.s1 = 0, float64(len(amp))
			pic.markSample = float64(d.amp.Slice.Number) + 0.5
		} else {
			i := st.PickTrace
			if i >= len(d.amp.Traces) {
				return
			}
			amp = d.amp.Traces[i]
			for _, at := range attrs {
				curves = append(curves, at.sec.Traces[i])
			}
			il, xl := st.Inline, d.amp.Keys[i]
			if d.amp.Slice.Orientation == volume.Crossline {
				il, xl = d.amp.Keys[i], st.Crossline
			}
			pic.title = fmt.Sprintf("Inline %d, crossline %d", il, xl)
			pic.s0, pic.s1 = vp.Sample0, vp.Sample1
		}
		pic.t0ms, pic.dtms = d.amp.T0*1000, d.amp.DT*1000
		// The amplitude's kept range gives every trace the same gain,
		// whatever view it was picked from; the first trace panel of a
		// survey keeps one if the section has not yet.
		hi := float64(max(math.Abs(float64(ampRange[0])), math.Abs(float64(ampRange[1]))))
		if !(hi > 0) {
			lo, h := displayRange(lookup(amplitudeID), d.amp.Traces, st.ClipPercent)
			hi = math.Max(math.Abs(float64(lo)), math.Abs(float64(h)))
			key := rangeKey(lookup(amplitudeID), nil, compute.Conditioning{}, st.ClipPercent)
			v.onUI(j, func() {
				if _, ok := v.ranges[key]; !ok {
					v.ranges[key] = [2]float32{lo, h}
				}
			})
		}
		if !(hi > 0) {
			hi = maxAbs(amp)
		}
		pic.tracks = append(pic.tracks, traceTrack{Name: "Amplitude", Values: amp, Lo: -hi, Hi: hi, Wiggle: true, Colour: fg})
		for k, at := range attrs {
			lo, hi := finiteRange(curves[k])
			if r, ok := ranges[rangeKey(at.a, at.params, cond, st.ClipPercent)]; ok {
				lo, hi = float64(r[0]), float64(r[1])
			}
			pic.tracks = append(pic.tracks, traceTrack{Name: at.a.Name, Values: curves[k], Lo: lo, Hi: hi, Cyclic: at.a.Kind == compute.Cyclic, Colour: trackColours[k%len(trackColours)]})
		}
		if hasFinite(amp) {
			pic.spectrum = compute.TraceSpectrum(withoutGaps(amp), d.amp.DT)
			pic.spectrumOK = len(pic.spectrum.Freqs) > 1
		}
		timg, tlabels := drawTracks(pic, tw, th)
		simg, slabels := drawSpectrum(pic, sw, sh)
		v.onUI(j, func() {
			v.lastTrace = pic
			v.ui.trace.set(timg, tlabels)
			if simg != nil {
				v.ui.spectrum.set(simg, slabels)
			} else {
				v.ui.spectrum.setMessage("No spectrum: the trace is missing")
			}
			v.traceDrawn++
			v.maybeSnapshot()
		})
	})
}

// drawTracks draws the trace panel's tracks side by side on a shared time
// axis and returns the picture with its labels: each track has its title
// (cut to the track's width, so titles never overlap), its value scale
// (the values at its left and right edges) and time labels at the grid
// lines. Values beyond a track's scale are drawn at its edge and marked
// there in red, so a clipped curve shows that it is clipped. A cyclic
// track (phase) breaks its curve where the value wraps round instead of
// drawing a line across the track.
func drawTracks(pic tracePicture, w, h int) (*image.RGBA, []plotLabel) {
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	labels := []plotLabel{{X: 0, DY: -30, Text: pic.title, Bold: true, MaxWidth: 1}}
	if len(pic.tracks) == 0 || !(pic.s1 > pic.s0) {
		return img, labels
	}
	tw := float64(w) / float64(len(pic.tracks))
	row := func(s float64) float64 { return (s - pic.s0) / (pic.s1 - pic.s0) * float64(h) }
	// Time grid at the section's tick times.
	t0 := pic.t0ms + pic.s0*pic.dtms
	t1 := pic.t0ms + pic.s1*pic.dtms
	timeTicks := render.TimeTicks(t0, t1, float64(h), 45) // the section's and figures' rule
	for _, t := range timeTicks {
		y := int(row((t - pic.t0ms) / pic.dtms))
		fillRect(img, image.Rect(0, y, w, y+1), pic.grid)
	}
	if !math.IsNaN(pic.markSample) {
		y := row(pic.markSample)
		fillRect(img, image.Rect(0, int(y)-1, w, int(y)+1), color.RGBA{255, 200, 0, 255})
	}
	clipMark := color.RGBA{220, 40, 40, 255}
	i0 := max(int(math.Floor(pic.s0)), 0)
	for k, tr := range pic.tracks {
		left := float64(k) * tw
		if k > 0 {
			fillRect(img, image.Rect(int(left), 0, int(left)+1, h), pic.grid)
		}
		fx := func(x float64) float64 { return x / float64(w) }
		labels = append(labels, plotLabel{X: fx(left + tw/2), DY: -11, Text: tr.Name, Align: fyne.TextAlignCenter, Color: colourOrNil(tr, pic.fg), MaxWidth: fx(tw - 4)})
		for _, t := range timeTicks {
			labels = append(labels, plotLabel{X: fx(left + 2), Y: ((t-pic.t0ms)/pic.dtms - pic.s0) / (pic.s1 - pic.s0), DY: -6, Text: formatMS(t), Small: true})
		}
		i1 := min(int(math.Ceil(pic.s1))+1, len(tr.Values))
		if i1 <= i0 || !(tr.Hi > tr.Lo) {
			continue
		}
		dec := decimalsFor(float32(tr.Lo), float32(tr.Hi))
		labels = append(labels,
			plotLabel{X: fx(left + 2), Y: 1, DY: 2, Text: render.FormatTick(tr.Lo, dec), Small: true, MaxWidth: fx(tw/2 - 2)},
			plotLabel{X: fx(left + tw - 2), Y: 1, DY: 2, Text: render.FormatTick(tr.Hi, dec), Align: fyne.TextAlignTrailing, Small: true, MaxWidth: fx(tw/2 - 2)})
		xs := make([]float64, 0, i1-i0)
		ys := make([]float64, 0, i1-i0)
		pad := 6.0
		col := func(v float64) (float64, int) {
			f := (v - tr.Lo) / (tr.Hi - tr.Lo)
			side := 0
			if f < 0 {
				f, side = 0, -1
			} else if f > 1 {
				f, side = 1, 1
			}
			return left + pad + f*(tw-2*pad), side
		}
		prev := math.NaN()
		var marks []image.Rectangle
		for i := i0; i < i1; i++ {
			x := float64(tr.Values[i])
			if math.IsNaN(x) || math.IsInf(x, 0) {
				xs, ys = append(xs, math.NaN()), append(ys, math.NaN())
				prev = math.NaN()
				continue
			}
			if tr.Cyclic && !math.IsNaN(prev) && math.Abs(x-prev) > (tr.Hi-tr.Lo)/2 {
				xs, ys = append(xs, math.NaN()), append(ys, math.NaN()) // wrapped round
			}
			prev = x
			c, side := col(x)
			y := row(float64(i) + 0.5)
			xs, ys = append(xs, c), append(ys, y)
			if side != 0 {
				e := int(left) + 1
				if side > 0 {
					e = int(left+tw) - 4
				}
				marks = append(marks, image.Rect(e, int(y)-1, e+3, int(y)+2))
			}
		}
		if tr.Wiggle {
			zero, _ := col(0)
			fillRect(img, image.Rect(int(zero), 0, int(zero)+1, h), pic.grid)
			fillPositive(img, xs, ys, zero, pic.fill)
		}
		strokePolyline(img, xs, ys, 1.5, tr.Colour)
		for _, m := range marks { // over the curve and its fill, to be seen
			fillRect(img, m, clipMark)
		}
	}
	return img, labels
}

// drawSpectrum draws the amplitude spectrum in decibels below its peak
// (0 to -60 dB, labelled on the left; common practice for spectra) against
// frequency, with its peak and centroid.
func drawSpectrum(pic tracePicture, w, h int) (*image.RGBA, []plotLabel) {
	if !pic.spectrumOK {
		return nil, nil
	}
	sp := pic.spectrum
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	amax := 0.0
	for _, a := range sp.Amps {
		amax = math.Max(amax, a)
	}
	// Show up to a little past the last frequency within 40 dB of the peak:
	// above it the plot would be an empty tail to Nyquist.
	fmax := sp.Freqs[len(sp.Freqs)-1]
	for i := len(sp.Amps) - 1; i > 0; i-- {
		if sp.Amps[i] >= 0.01*amax {
			fmax = math.Min(fmax, niceCeil(sp.Freqs[i]*1.15))
			break
		}
	}
	if !(fmax > 0) || !(amax > 0) {
		return nil, nil
	}
	const floorDB = -60.0
	xOf := func(f float64) float64 { return f / fmax * float64(w) }
	yOfDB := func(db float64) float64 { return db / floorDB * float64(h-1) }
	yOf := func(a float64) float64 {
		db := floorDB
		if a > 0 {
			db = math.Max(20*math.Log10(a/amax), floorDB)
		}
		return yOfDB(db)
	}
	var labels []plotLabel
	for _, f := range render.NiceTicks(0, fmax, max(w/60, 1)) {
		x := int(xOf(f))
		fillRect(img, image.Rect(x, 0, x+1, h), pic.grid)
		labels = append(labels, plotLabel{X: f / fmax, Y: 1, DY: 9, Text: render.FormatTick(f, 0), Align: fyne.TextAlignCenter})
	}
	for db := 0.0; db >= floorDB; db -= 20 {
		y := int(yOfDB(db))
		fillRect(img, image.Rect(0, y, w, y+1), pic.grid)
		labels = append(labels, plotLabel{X: 0, Y: db / floorDB, DY: 0, Text: render.FormatTick(db, 0), Align: fyne.TextAlignTrailing, Small: true, Outside: true})
	}
	var xs, ys []float64
	for i := range sp.Freqs {
		if sp.Freqs[i] > fmax {
			break
		}
		xs, ys = append(xs, xOf(sp.Freqs[i])), append(ys, yOf(sp.Amps[i]))
	}
	strokePolyline(img, xs, ys, 1.5, pic.fg)
	peak, cent := color.RGBA{220, 50, 50, 255}, color.RGBA{40, 120, 220, 255}
	px, cx := int(xOf(sp.PeakHz)), int(xOf(sp.CentroidHz))
	fillRect(img, image.Rect(px-1, 0, px+1, h), peak)
	for y := 0; y < h; y += 6 { // dashed: the centroid is a statistic, not a bin
		fillRect(img, image.Rect(cx-1, y, cx+1, min(y+3, h)), cent)
	}
	labels = append(labels,
		plotLabel{X: 0, DY: -25, Text: "Amplitude spectrum (dB below peak; Hz)", Bold: true, MaxWidth: 1},
		plotLabel{X: 0, DY: -10, Text: fmt.Sprintf("peak %.0f Hz", sp.PeakHz), Color: peak},
		plotLabel{X: 1, DY: -10, Text: fmt.Sprintf("centroid %.0f Hz", sp.CentroidHz), Align: fyne.TextAlignTrailing, Color: cent},
	)
	return img, labels
}

// niceCeil rounds f up to a multiple of a 1-2-5 step.
func niceCeil(f float64) float64 {
	step := niceStep(f, 5)
	return math.Ceil(f/step) * step
}

func colourOrNil(tr traceTrack, fg color.RGBA) color.Color {
	if tr.Wiggle {
		return nil
	}
	return tr.Colour
}

func maxAbs(x []float32) float64 {
	m := 0.0
	for _, v := range x {
		if a := math.Abs(float64(v)); a > m && !math.IsInf(a, 0) {
			m = a
		}
	}
	if m == 0 {
		return 1
	}
	return m
}

func finiteRange(x []float32) (float64, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range x {
		f := float64(v)
		if math.IsNaN(f) || math.IsInf(f, 0) {
			continue
		}
		lo, hi = math.Min(lo, f), math.Max(hi, f)
	}
	if !(hi > lo) {
		return lo - 1, lo + 1
	}
	return lo, hi
}

func hasFinite(x []float32) bool {
	for _, v := range x {
		if f := float64(v); !math.IsNaN(f) && !math.IsInf(f, 0) {
			return true
		}
	}
	return false
}

// withoutGaps returns x with NaN and infinite samples set to zero (a gap
// carries no energy into the spectrum).
func withoutGaps(x []float32) []float32 {
	out := make([]float32, len(x))
	for i, v := range x {
		if f := float64(v); !math.IsNaN(f) && !math.IsInf(f, 0) {
			out[i] = v
		}
	}
	return out
}

func toRGBA(c color.Color) color.RGBA {
	r, g, b, a := c.RGBA()
	return color.RGBA{uint8(r >> 8), uint8(g >> 8), uint8(b >> 8), uint8(a >> 8)}
}
