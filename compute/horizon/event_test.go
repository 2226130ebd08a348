package horizon_test

import (
	"math"
	"testing"

	"quadtrace/compute/horizon"
)

// ricker is the Ricker wavelet of peak frequency f (Hz) centred at t0, at
// time t (seconds): (1 - 2 pi^2 f^2 tau^2) exp(-pi^2 f^2 tau^2), tau = t - t0
// (Ricker 1953, "The form and laws of propagation of seismic wavelets",
// Geophysics 18). Its peak is at t0 and its zero crossings at
// t0 -+ 1/(sqrt(2) pi f).
func ricker(t, t0, f float64) float64 {
	a := math.Pi * f * (t - t0)
	return (1 - 2*a*a) * math.Exp(-a*a)
}

// sampledRicker returns n samples at interval dt of sign times the Ricker
// wavelet centred at t0.
func sampledRicker(n int, dt, t0, f, sign float64) []float32 {
	out := make([]float32, n)
	for i := range out {
		out[i] = float32(sign * ricker(float64(i)*dt, t0, f))
	}
	return out
}

// Sub-sample snapping against closed forms on a sampled Ricker wavelet, for
// peak frequencies 20 to 60 Hz at 2 and 4 ms and centres anywhere between
// samples:
//   - the peak (and the trough of the negated wavelet) lies at the vertex
//     of the parabola through the three samples around it, whose closed
//     form is i + (w[i-1] - w[i+1]) / (2 (w[i-1] - 2 w[i] + w[i+1])) with
//     w the Ricker formula evaluated at the sample times; Locate agrees
//     with it to 1e-4 of a sample (float32 samples), and it lies within
//     0.05 of a sample of the true centre while the wavelet has at least
//     8 samples per period of its peak frequency (the bias of three-point
//     parabolic interpolation grows with f dt; common practice);
//   - the rising and falling zero crossings lie where the straight line
//     through the two samples around them crosses zero, i + w[i] / (w[i] -
//     w[i+1]); Locate agrees to 1e-4 of a sample, within 0.1 of a sample
//     of the true crossings t0 -+ 1/(sqrt(2) pi f).
func TestSubSampleSnapOnRicker(t *testing.T) {
	const n = 200
	for _, dt := range []float64{0.002, 0.004} {
		for _, f := range []float64{20, 30, 40, 60} {
			if 1/(f*dt) < 8 {
				continue
			}
			for _, frac := range []float64{-0.5, -0.37, -0.2, -0.05, 0, 0.13, 0.25, 0.41, 0.49} {
				c := 100 + frac // centre in samples
				t0 := c * dt
				w := func(i int) float64 { return ricker(float64(i)*dt, t0, f) }
				for _, ev := range []horizon.Event{horizon.Peak, horizon.Trough} {
					sign := 1.0
					if ev == horizon.Trough {
						sign = -1
					}
					a := sampledRicker(n, dt, t0, f, sign)
					got := ev.Locate(a, c-0.6, c+0.6, nil)
					i := int(math.Round(c))
					if w(i+1) > w(i) { // a tie at frac = 0.5 goes to the later sample
						i++
					}
					want := float64(i) + (w(i-1)-w(i+1))/(2*(w(i-1)-2*w(i)+w(i+1)))
					if len(got) != 1 || math.Abs(got[0]-want) > 1e-4 || math.Abs(got[0]-c) > 0.05 {
						t.Errorf("%v of a %g Hz Ricker at %g ms, centre at sample %.2f: got %v, want the parabola's vertex %.5f", ev, f, dt*1000, c, got, want)
					}
				}
				a := sampledRicker(n, dt, t0, f, 1)
				tau := 1 / (math.Sqrt2 * math.Pi * f) / dt // crossing offset, samples
				for _, z := range []struct {
					ev horizon.Event
					at float64
				}{{horizon.ZeroRising, c - tau}, {horizon.ZeroFalling, c + tau}} {
					got := z.ev.Locate(a, z.at-0.9, z.at+0.9, nil)
					i := int(math.Floor(z.at))
					if w(i) == 0 {
						i-- // the crossing is a sample: the line from the sample before ends there
					}
					want := float64(i) + w(i)/(w(i)-w(i+1))
					if len(got) != 1 || math.Abs(got[0]-want) > 1e-4 || math.Abs(got[0]-z.at) > 0.1 {
						t.Errorf("%v of a %g Hz Ricker at %g ms, centre at sample %.2f: got %v, want the line's zero %.5f (true crossing %.5f)", z.ev, f, dt*1000, c, got, want, z.at)
					}
				}
			}
		}
	}
}

// Locate finds nothing in flat, gap-only or too-short traces, and nothing
// outside [from, to].
func TestLocateOddTraces(t *testing.T) {
	nan := float32(math.NaN())
	for _, tc := range []struct {
		name     string
		a        []float32
		from, to float64
	}{
		{"empty", nil, 0, 10},
		{"one sample", []float32{1}, 0, 1},
		{"flat", []float32{0, 0, 0, 0, 0}, 0, 4},
		{"gaps", []float32{nan, nan, nan, nan}, 0, 3},
		{"gap at the top", []float32{0, nan, 0}, 0, 2},
		{"reversed range", []float32{0, 1, 0}, 2, 0},
		{"outside", []float32{0, 1, 0, 0, 0, 0}, 3, 5},
	} {
		for _, ev := range []horizon.Event{horizon.Peak, horizon.Trough, horizon.ZeroRising, horizon.ZeroFalling} {
			if got := ev.Locate(tc.a, tc.from, tc.to, nil); len(got) != 0 {
				t.Errorf("%s: %v: got %v, want nothing", tc.name, ev, got)
			}
		}
	}
}

// ParseEvent accepts the four names and refuses others.
func TestParseEvent(t *testing.T) {
	for _, name := range horizon.Events() {
		e, err := horizon.ParseEvent(name)
		if err != nil || e.String() != name {
			t.Errorf("ParseEvent(%q) = %v, %v", name, e, err)
		}
	}
	for _, bad := range []string{"", "Peak", "zero", "max"} {
		if _, err := horizon.ParseEvent(bad); err == nil {
			t.Errorf("ParseEvent(%q): no error", bad)
		}
	}
}
