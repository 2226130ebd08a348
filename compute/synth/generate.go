package synth

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"
)

// Names of the invented setting.
const (
	BasinName  = "Halvane Basin"
	SurveyName = "Corrowdeep 3D"
)

// Band of the random noise: a two-pole band-pass centred on noiseCentreHz.
const (
	noiseCentreHz = 30.0
	noiseQ        = 0.7
	noiseWarmup   = 100 // samples run through the filter before the trace
)

// Generate builds the synthetic survey for cfg. The same cfg gives the
// same survey on every machine and with any number of workers: the model
// is drawn from cfg.Seed and each trace's noise from cfg.Seed and the
// trace's index.
//
// Each trace is the sum, over the model's interfaces on it, of reflection
// coefficient times the wavelet for that interface's two-way time: a
// Ricker source (Ricker 1953) attenuated by constant Q (Kjartansson 1979)
// and brought back to unit peak amplitude, as a processing gain would, so
// frequency falls with depth while amplitude follows the reflection
// coefficients. Below the gas sand the extra attenuation of the gas is
// left in, so the shadow there is both lower in frequency and dimmer.
// Band-limited random noise at cfg.Noise times the signal's RMS is added
// last.
//
// Work is spread over runtime.GOMAXPROCS(0) workers by inline. progress,
// when not nil, is called with done rising to total (2 x Inlines: the
// signal pass then the noise pass), never concurrently. Generate returns
// ctx.Err() when ctx is cancelled, and an error wrapping ErrInvalidConfig
// when cfg is invalid.
func Generate(ctx context.Context, cfg Config, progress func(done, total int)) (*Survey, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	ni, nx, ns := cfg.Inlines, cfg.Crosslines, cfg.Samples
	dtMS := float64(cfg.IntervalUS) / 1000
	m := newModel(cfg)
	recordMS := float64(ns-1) * dtMS
	// Room for the pull-down and extra attenuation below the thickest gas
	// column, which is at most gasColumnFrac of the dome's relief.
	maxGasMS := gasColumnFrac * domeHeightMS
	bank := newWaveletBank(dtMS, recordMS+maxGasMS*(pullDownFrac+QualityFactor/GasQualityFactor-1)+bankStepMS)

	s := &Survey{
		Config: cfg, Basin: BasinName, Name: SurveyName,
		FirstInline: FirstInline, FirstCrossline: FirstCrossline,
		Traces: make([][]float32, ni*nx),
	}
	samples := make([]float32, ni*nx*ns)
	for k := range s.Traces {
		s.Traces[k] = samples[k*ns : (k+1)*ns : (k+1)*ns]
	}
	delays := bank.peakDelaysMS()
	s.Surfaces = make([]Surface, len(m.surfaces))
	for k, f := range m.surfaces {
		f.TimesMS, f.PeakMS = make([]float32, ni*nx), make([]float32, ni*nx)
		for i := range f.TimesMS {
			f.TimesMS[i], f.PeakMS[i] = float32(math.NaN()), float32(math.NaN())
		}
		s.Surfaces[k] = f
	}

	var mu sync.Mutex // serialises progress and merges features
	done, total := 0, 2*ni
	step := func() {
		if progress == nil {
			return
		}
		mu.Lock()
		done++
		progress(done, total)
		mu.Unlock()
	}

	// Signal pass.
	sumSq := make([]float64, ni) // per inline, summed in order for determinism
	boxes := newFeatureBoxes()
	err := forEachInline(ctx, ni, func() func(il int) {
		refl := make([]reflector, 0, 256)
		local := newFeatureBoxes()
		return func(il int) {
			if il < 0 { // worker finished: merge its boxes
				mu.Lock()
				boxes.merge(local)
				mu.Unlock()
				return
			}
			ss := 0.0
			for xl := 0; xl < nx; xl++ {
				var info traceInfo
				refl, info = m.trace(il, xl, refl, bank)
				local.note(il, xl, info)
				tr := s.Traces[il*nx+xl]
				for _, r := range refl {
					if r.surface > 0 {
						f := &s.Surfaces[r.surface-1]
						f.TimesMS[il*nx+xl] = float32(r.tMS)
						f.PeakMS[il*nx+xl] = float32(r.tMS + delays[bank.entry(r.tqMS)])
					}
					if r.tMS < -bankHalfMS || r.tMS > recordMS+bankHalfMS {
						continue
					}
					bank.add(tr, r.tMS, r.r*r.scale, r.tqMS)
				}
				for _, a := range tr {
					ss += float64(a) * float64(a)
				}
			}
			sumSq[il] = ss
			step()
		}
	})
	if err != nil {
		return nil, err
	}
	s.Features = boxes.features(m.recordMS)

	// Noise pass.
	if cfg.Noise > 0 {
		ss := 0.0
		for _, v := range sumSq {
			ss += v
		}
		level := cfg.Noise * math.Sqrt(ss/float64(ni*nx*ns))
		err = forEachInline(ctx, ni, func() func(il int) {
			work := make([]float64, ns+noiseWarmup)
			return func(il int) {
				if il < 0 {
					return
				}
				for xl := 0; xl < nx; xl++ {
					k := il*nx + xl
					rng := rand.New(rand.NewPCG(uint64(cfg.Seed), uint64(k)))
					addNoise(s.Traces[k], work, rng, level, dtMS)
				}
				step()
			}
		})
		if err != nil {
			return nil, err
		}
	} else if progress != nil {
		for range ni {
			step()
		}
	}
	s.Wells = wells(m)
	return s, nil
}

// forEachInline runs the function made by newWorker for every inline
// index, on runtime.GOMAXPROCS(0) workers each with its own function (and
// so its own work buffers). Each worker's function is called with -1 when
// the worker has no more inlines. It stops early with ctx.Err().
func forEachInline(ctx context.Context, ni int, newWorker func() func(il int)) error {
	var next atomic.Int64
	var wg sync.WaitGroup
	workers := min(runtime.GOMAXPROCS(0), ni)
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			f := newWorker()
			defer f(-1)
			for {
				if ctx.Err() != nil {
					return
				}
				il := int(next.Add(1) - 1)
				if il >= ni {
					return
				}
				f(il)
			}
		}()
	}
	wg.Wait()
	return ctx.Err()
}

// addNoise adds band-limited random noise of RMS level to trace. White
// noise is filtered by a two-pole band-pass biquad (the band-pass with
// constant peak gain of R. Bristow-Johnson, "Cookbook formulae for audio
// EQ biquad filter coefficients"), centred on noiseCentreHz, then scaled
// to the wanted RMS over the trace. work holds len(trace)+noiseWarmup
// values.
func addNoise(trace []float32, work []float64, rng *rand.Rand, level, dtMS float64) {
	w0 := 2 * math.Pi * noiseCentreHz * dtMS / 1000
	alpha := math.Sin(w0) / (2 * noiseQ)
	a0 := 1 + alpha
	b0, b2 := alpha/a0, -alpha/a0
	a1, a2 := -2*math.Cos(w0)/a0, (1-alpha)/a0
	var x1, x2, y1, y2 float64
	var bits uint64
	for i := range work {
		// White noise, uniform on [-1, 1), two draws per 64 random bits;
		// summing many past inputs, the band-pass output is close to
		// Gaussian (central limit theorem).
		if i%2 == 0 {
			bits = rng.Uint64()
		} else {
			bits >>= 32
		}
		x := float64(int32(uint32(bits))) / (1 << 31)
		y := b0*x + b2*x2 - a1*y1 - a2*y2
		x2, x1 = x1, x
		y2, y1 = y1, y
		work[i] = y
	}
	out := work[noiseWarmup:]
	ss := 0.0
	for _, y := range out {
		ss += y * y
	}
	if ss == 0 {
		return
	}
	g := level / math.Sqrt(ss/float64(len(out)))
	for i, y := range out {
		trace[i] += float32(g * y)
	}
}

// featureBoxes accumulates, per feature, the grid indices and times of
// the traces holding it.
type featureBoxes map[string]*box

type box struct {
	ilMin, ilMax, xlMin, xlMax int
	tMin, tMax                 float64
}

func newFeatureBoxes() featureBoxes { return featureBoxes{} }

func (fb featureBoxes) extend(name string, il, xl int, t [2]float64) {
	b, ok := fb[name]
	if !ok {
		fb[name] = &box{il, il, xl, xl, t[0], t[1]}
		return
	}
	b.ilMin, b.ilMax = min(b.ilMin, il), max(b.ilMax, il)
	b.xlMin, b.xlMax = min(b.xlMin, xl), max(b.xlMax, xl)
	b.tMin, b.tMax = math.Min(b.tMin, t[0]), math.Max(b.tMax, t[1])
}

func (fb featureBoxes) note(il, xl int, info traceInfo) {
	for _, f := range []struct {
		bit  int
		name string
		t    [2]float64
	}{
		{hasThinBeds, FeatureThinBeds, info.thinBeds},
		{hasChannel, FeatureChannel, info.channel},
		{hasClinoforms, FeatureClinoforms, info.clinoforms},
		{hasFault, FeatureFault, info.fault},
		{hasWedge, FeatureWedge, info.wedge},
		{hasGas, FeatureBrightSpot, info.gas},
		{hasFlatSpot, FeatureFlatSpot, info.flatSpot},
		{hasGas, FeatureShadow, info.shadow},
	} {
		if info.present&f.bit != 0 {
			fb.extend(f.name, il, xl, f.t)
		}
	}
}

func (fb featureBoxes) merge(other featureBoxes) {
	for name, b := range other {
		fb.extend(name, b.ilMin, b.xlMin, [2]float64{b.tMin, b.tMax})
		fb.extend(name, b.ilMax, b.xlMax, [2]float64{b.tMin, b.tMax})
	}
}

// featureDescriptions lists the features in Survey.Features order with
// their one-line descriptions.
func featureDescriptions() []struct{ name, text string } {
	return []struct{ name, text string }{
		{FeatureThinBeds, "interbedded sands and shales thinner than tuning, whose reflections interfere"},
		{FeatureChannel, "a meandering channel sand cut into a muddy interval"},
		{FeatureClinoforms, "a prograding shelf margin: clinoforms toplapping below the topsets and downlapping onto the basin floor"},
		{FeatureFault, "a normal fault, downthrown basinward, dying out upwards"},
		{FeatureWedge, "a sand wedge pinching out up-dip through tuning thickness"},
		{FeatureBrightSpot, "a gas-charged sand on a dome: a bright spot"},
		{FeatureFlatSpot, "the flat gas-water contact under the bright spot"},
		{FeatureShadow, "below the gas: a low-frequency shadow and a slight pull-down"},
	}
}

// features lists the boxes in a fixed order, as inline and crossline
// numbers, dropping features that start below the record.
func (fb featureBoxes) features(recordMS float64) []Feature {
	var out []Feature
	for _, d := range featureDescriptions() {
		b, ok := fb[d.name]
		if !ok || b.tMin > recordMS {
			continue
		}
		out = append(out, Feature{
			Name:      d.name,
			InlineMin: FirstInline + b.ilMin, InlineMax: FirstInline + b.ilMax,
			CrosslineMin: FirstCrossline + b.xlMin, CrosslineMax: FirstCrossline + b.xlMax,
			TimeMinMS: b.tMin, TimeMaxMS: math.Min(b.tMax, recordMS),
			Description: d.text,
		})
	}
	return out
}

// wells places the invented wells: a discovery on the crest of the gas
// dome and a dry hole on the thick end of the wedge.
func wells(m *model) []Well {
	at := func(u, v float64) (int, int) {
		return FirstInline + int(math.Round(v*float64(m.ni-1))), FirstCrossline + int(math.Round(u*float64(m.nx-1)))
	}
	il1, xl1 := at(domeU, domeV)
	il2, xl2 := at((wedgeU0+wedgeU1)/2, 0.85)
	return []Well{
		{Name: "Corrow-1", Inline: il1, Crossline: xl1, Description: fmt.Sprintf("gas discovery on the dome crest; gas-water contact at %.0f ms", m.gwcMS)},
		{Name: "Tamsel-2", Inline: il2, Crossline: xl2, Description: "wet sand wedge, plugged and abandoned"},
	}
}
