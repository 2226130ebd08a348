package viewer

import (
	"image/color"
	"math"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/theme"

	"quadtrace/segy/segytest"
)

// TestTraceGainSameInEveryView picks a trace on an inline, then sees it
// from the crossline and the time slice: the amplitude track has the same
// scale each time.
func TestTraceGainSameInEveryView(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.pickAt(1.5, 10.5)
	v.jobs.wait()
	amp := v.lastTrace.tracks[0]
	if amp.Name != "Amplitude" || !(amp.Hi > 0) {
		t.Fatalf("first track %q %v..%v", amp.Name, amp.Lo, amp.Hi)
	}
	for _, o := range []string{"Crossline", "Time slice"} {
		v.ui.orientation.SetSelected(o)
		v.jobs.wait()
		if !hasLabel(v.ui.trace.labels, "Inline 3, crossline 21") {
			t.Fatalf("%s: trace panel shows %v", o, labelTexts(v.ui.trace.labels))
		}
		got := v.lastTrace.tracks[0]
		if got.Lo != amp.Lo || got.Hi != amp.Hi {
			t.Errorf("%s: amplitude track %v..%v, on the inline %v..%v", o, got.Lo, got.Hi, amp.Lo, amp.Hi)
		}
		for k, tr := range v.lastTrace.tracks[1:] {
			if first := v.lastTrace.tracks[k+1]; tr.Lo != first.Lo {
				t.Errorf("%s: track %s scale changed", o, tr.Name)
			}
		}
	}
}

// TestTrackDrawing draws tracks directly: a phase curve that wraps from
// +170 to -170 degrees has no line across the track, values beyond the
// scale are marked at its edge, every track has its value scale and time
// labels, titles are cut to their track, and the spectrum has a dB axis.
func TestTrackDrawing(t *testing.T) {
	n := 40
	phase := make([]float32, n)
	big := make([]float32, n)
	amp := make([]float32, n)
	for i := range phase {
		if i < 20 {
			phase[i] = 150 + float32(i) // rising to 169 ...
		} else {
			phase[i] = -170 + float32(i-20) // ... then wrapped to -170
		}
		big[i] = 5 // beyond Hi = 1: clipped
		amp[i] = float32(math.Sin(float64(i) / 3))
	}
	curve := color.RGBA{20, 150, 175, 255}
	pic := tracePicture{title: "Inline 1, crossline 1", s0: 0, s1: float64(n), markSample: math.NaN(), t0ms: 0, dtms: 4,
		fg: color.RGBA{0, 0, 0, 255}, grid: color.RGBA{200, 200, 200, 255}, fill: color.RGBA{0, 0, 0, 150},
		tracks: []traceTrack{
			{Name: "Amplitude", Values: amp, Lo: -1, Hi: 1, Wiggle: true, Colour: color.RGBA{0, 0, 0, 255}},
			{Name: "Instantaneous phase with a long name", Values: phase, Lo: -180, Hi: 180, Cyclic: true, Colour: curve},
			{Name: "Clipped", Values: big, Lo: 0, Hi: 1, Colour: color.RGBA{232, 120, 20, 255}},
		}}
	w, h := 300, 400
	img, labels := drawTracks(pic, w, h)
	// Between samples 19 and 20 (rows 19.5..20.5 of 40 in 400 pixels) the
	// middle of the phase track must stay free of the curve colour.
	y := int(20.0 / 40 * float64(h))
	for x := 110; x < 190; x++ {
		c := img.RGBAAt(x, y)
		if c.R == curve.R && c.G == curve.G && c.B == curve.B && c.A > 200 {
			t.Fatalf("phase wrap drawn across the track at (%d,%d)", x, y)
		}
	}
	// Clipped values: red marks at the right edge of the third track.
	red := 0
	for yy := 0; yy < h; yy++ {
		for x := 290; x < 300; x++ {
			if c := img.RGBAAt(x, yy); c.R > 200 && c.G < 60 && c.B < 60 {
				red++
			}
		}
	}
	if red < n {
		t.Errorf("%d red pixels at the clipped track's edge, want a mark per clipped sample", red)
	}
	var scales, times int
	for _, l := range labels {
		if l.Small && l.MaxWidth > 0 {
			scales++
		} else if l.Small {
			times++
		}
		if l.DY == -11 && !(l.MaxWidth > 0 && l.MaxWidth <= 1.0/3) {
			t.Errorf("track title %q may be %v of the plot wide, wider than its third", l.Text, l.MaxWidth)
		}
	}
	if scales != 6 {
		t.Errorf("%d value scale labels, want 2 per track", scales)
	}
	if times < 3*3 {
		t.Errorf("%d time labels, want some on each track", times)
	}
	// fitText keeps a title within its width.
	size := theme.CaptionTextSize()
	for _, width := range []float32{40, 90, 200} {
		cut := fitText("Instantaneous phase with a long name", width, size, fyne.TextStyle{})
		if fyne.MeasureText(cut, size, fyne.TextStyle{}).Width > width {
			t.Errorf("fitText to %v gave %q, wider", width, cut)
		}
	}
}

// TestSpectrumInDecibels opens small.sgy: the spectrum has a dB axis from
// 0 to -60.
func TestSpectrumInDecibels(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	for _, want := range []string{"0", "-20", "-40", "-60"} {
		found := false
		for _, l := range v.ui.spectrum.labels {
			if l.Outside && l.Text == want {
				found = true
			}
		}
		if !found {
			t.Errorf("spectrum lacks the %s dB label: %v", want, labelTexts(v.ui.spectrum.labels))
		}
	}
	if !hasLabel(v.ui.spectrum.labels, "Amplitude spectrum (dB") {
		t.Errorf("spectrum title: %v", labelTexts(v.ui.spectrum.labels))
	}
}
