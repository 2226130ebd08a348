package horizon

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"quadtrace/compute"
	"quadtrace/compute/synth"
)

// The envelope and phase the tracker takes from a stretch of trace around
// a pick agree with those of compute's analytic trace of the whole trace
// (Taner, Koehler and Sheriff 1979; Marple 1999), on the demo survey at
// the peaks and troughs of its modelled surfaces, at every pick more than
// half a stretch from the trace's ends: the analytic values differ by at
// most 2 % of the trace's largest envelope, and the phases by at most 3
// degrees where the envelope is at least a quarter of its largest.
func TestAnalyticStretchMatchesWholeTrace(t *testing.T) {
	for _, us := range []int{2000, 4000} {
		t.Run(fmt.Sprintf("%d us", us), func(t *testing.T) { stretchMatchesWholeTrace(t, us) })
	}
}

func stretchMatchesWholeTrace(t *testing.T, intervalUS int) {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines = 6, 8
	cfg.IntervalUS, cfg.Samples = intervalUS, 1500000/intervalUS+1
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	dt := s.IntervalMS() / 1000
	tr := &tracker{g: Grid{Inlines: 6, Crosslines: 8, Samples: cfg.Samples, DT: dt}}
	if err := tr.setSpan(); err != nil {
		t.Fatal(err)
	}
	worstPhase, worstEnv, n := 0.0, 0.0, 0
	for k, a := range s.Traces {
		whole, err := compute.AnalyticTrace(a, dt, compute.EndTreatment{Pad: compute.PadDouble})
		if err != nil {
			t.Fatal(err)
		}
		maxEnv := 0.0
		for _, z := range whole {
			maxEnv = math.Max(maxEnv, math.Hypot(real(z), imag(z)))
		}
		for _, f := range s.Surfaces {
			ms := float64(f.TimesMS[k])
			ev := Peak
			if f.R < 0 {
				ev = Trough
			}
			at := ms / s.IntervalMS()
			xs := ev.Locate(a, at-3, at+3, nil)
			for _, x := range xs {
				if x < float64(tr.span/2) || x > float64(len(a)-tr.span/2) {
					continue
				}
				start := tr.stretchStart(x)
				stretch := a[start : start+tr.span]
				q, err := tr.quadrature(context.Background(), compute.Section{Traces: [][]float32{stretch}, DT: dt})
				if err != nil {
					t.Fatal(err)
				}
				env, ph := tr.analyticAt(stretch, q.Traces[0], x-float64(start))
				i0 := int(x)
				f := x - float64(i0)
				z := complex(1-f, 0)*whole[i0] + complex(f, 0)*whole[i0+1]
				// The difference of the two analytic values, as a fraction of
				// the trace's largest envelope, bounds both the envelope's
				// and (divided by the envelope there) the phase's.
				d := cmplx.Abs(cmplx.Rect(float64(env), float64(ph))-z) / maxEnv
				worstEnv = math.Max(worstEnv, d)
				if cmplx.Abs(z) >= maxEnv/4 {
					dph := math.Abs(math.Remainder(float64(ph)-cmplx.Phase(z), 2*math.Pi)) * 180 / math.Pi
					worstPhase = math.Max(worstPhase, dph)
				}
				n++
			}
		}
	}
	t.Logf("%d picks: largest analytic difference %.2f %% of the largest envelope, phase difference %.2f degrees", n, 100*worstEnv, worstPhase)
	if n < 500 || worstPhase > 3 || worstEnv > 0.02 {
		t.Errorf("%d picks: largest analytic difference %.2f %% (want <= 2 %%), phase difference %.2f degrees (want <= 3)", n, 100*worstEnv, worstPhase)
	}
}
