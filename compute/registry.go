package compute

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sync"
)

// Kind says how an attribute's values behave, so a renderer can pick the
// palette family: Magnitude (0 upward, sequential), Signed (either side of
// zero, diverging) or Cyclic (an angle that wraps, cyclic).
type Kind int

// Attribute kinds.
const (
	Magnitude Kind = iota + 1
	Signed
	Cyclic
)

// String returns "magnitude", "signed" or "cyclic".
func (k Kind) String() string {
	switch k {
	case Magnitude:
		return "magnitude"
	case Signed:
		return "signed"
	case Cyclic:
		return "cyclic"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// Group collects attributes for listings and menus.
type Group string

// Attribute groups, in registry order.
const (
	GroupAmplitude     Group = "amplitude"
	GroupInstantaneous Group = "instantaneous"
	GroupResponse      Group = "response"
	GroupWeighted      Group = "weighted and spectral"
	GroupConditioning  Group = "conditioning"
)

// computeFunc computes an attribute on a validated section into out, a
// section of the same shape.
type computeFunc func(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error

// Attribute is one entry of the registry: an attribute that maps a Section
// to a Section of the same shape.
type Attribute struct {
	ID, Name, Unit string
	Kind           Kind
	Group          Group
	Description    string // one line
	Source         string // short citation of the published formula
	Params         []ParamSpec

	// run writes no infinite sample: analyticRun clamps each trace while
	// it is still in cache, the other runs are wrapped in clampedAfter
	// (TestNoInfiniteOutput checks every attribute).
	run computeFunc
}

// builtRegistry is the attribute table, built once on first use and never
// changed after: Attributes and Lookup hand out copies of its entries.
var builtRegistry = sync.OnceValues(func() ([]*Attribute, map[string]*Attribute) {
	list := registry()
	byID := make(map[string]*Attribute, len(list))
	for _, a := range list {
		byID[a.ID] = a
	}
	return list, byID
})

// clone returns a copy of a that shares nothing a caller could change with
// the registry (its parameter specs and their choices are copied too).
func (a *Attribute) clone() *Attribute {
	c := *a
	c.Params = slices.Clone(a.Params)
	for i := range c.Params {
		c.Params[i].Choices = slices.Clone(c.Params[i].Choices)
	}
	return &c
}

// Attributes returns the registry in listing order (grouped), as fresh
// copies each call: callers may change what they get without affecting
// anyone else. The table itself is built once.
func Attributes() []*Attribute {
	list, _ := builtRegistry()
	out := make([]*Attribute, len(list))
	for i, a := range list {
		out[i] = a.clone()
	}
	return out
}

// IDs returns the attribute ids in listing order.
func IDs() []string {
	list, _ := builtRegistry()
	ids := make([]string, len(list))
	for i, a := range list {
		ids[i] = a.ID
	}
	return ids
}

// Lookup returns (a copy of) the attribute with the given id. An unknown id
// is an error that suggests the nearest valid one (see Nearest).
func Lookup(id string) (*Attribute, error) {
	_, byID := builtRegistry()
	if a, ok := byID[id]; ok {
		return a.clone(), nil
	}
	return nil, fmt.Errorf("unknown attribute %q%s", id, DidYouMean(id, IDs()))
}

// Compute computes the attribute on a section with all cores. p comes from
// a.Resolve (the zero Params means all defaults). It stops with an error
// wrapping ctx.Err() when ctx is cancelled. progress (may be nil) is called
// from the worker goroutines, one call at a time, with the number of
// finished traces, non-decreasing, up to about 200 times and last with
// done == total. NaN and Inf samples are gaps: NaN in the output at the same
// samples.
func (a *Attribute) Compute(ctx context.Context, in Section, p Params, progress func(done, total int)) (Section, error) {
	out := newLike(in) // shaped by trace 0; ComputeInto validates in
	if err := a.ComputeInto(ctx, in, out, p, progress); err != nil {
		return Section{}, err
	}
	return out, nil
}

// ComputeInto is Compute writing into out, whose traces the caller
// provides (and may reuse from one call to the next, so that a stream of
// blocks touches no fresh memory): out must have as many traces as in,
// each as long as in's; its DT and T0 are not consulted. Every sample of
// out is written. On an error out holds partial results.
func (a *Attribute) ComputeInto(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
	if p.text == nil {
		var err error
		if p, err = a.Resolve(nil); err != nil {
			return err
		}
	} else if p.attr != a.ID {
		return fmt.Errorf("attribute %q: parameters were resolved for %q", a.ID, p.attr)
	}
	if err := in.validate(); err != nil {
		return fmt.Errorf("attribute %q: %w", a.ID, err)
	}
	if len(out.Traces) != len(in.Traces) {
		return fmt.Errorf("attribute %q: output has %d traces for %d input traces", a.ID, len(out.Traces), len(in.Traces))
	}
	n := in.Samples()
	for i, tr := range out.Traces {
		if len(tr) != n {
			return fmt.Errorf("attribute %q: output trace %d has %d samples, want %d", a.ID, i, len(tr), n)
		}
	}
	if err := a.run(ctx, in, out, p, progress); err != nil {
		return fmt.Errorf("attribute %q: %w", a.ID, err)
	}
	return nil
}

// clampedAfter is run followed by saturate over its whole output, for the
// runs that do not go through analyticRun.
func clampedAfter(run computeFunc) computeFunc {
	return func(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
		if err := run(ctx, in, out, p, progress); err != nil {
			return err
		}
		saturate(out)
		return nil
	}
}

// saturate replaces infinite output samples by the largest finite float32
// of the same sign: values beyond float32 (a derivative of amplitudes near
// 1e35, found by FuzzAttributes) are "very large", and an Inf would break
// every range and colour computation downstream. NaN stays NaN (a gap).
func saturate(s Section) {
	for _, tr := range s.Traces {
		saturateTrace(tr)
	}
}

// saturateTrace is saturate on one trace: eight samples at a time in
// fill_amd64.s where the processor allows, the rest here.
func saturateTrace(tr []float32) {
	tr = tr[saturateVector(tr):]
	for j, v := range tr {
		if v > math.MaxFloat32 {
			tr[j] = math.MaxFloat32
		} else if v < -math.MaxFloat32 {
			tr[j] = -math.MaxFloat32
		}
	}
}

// Parameter specs shared by several attributes.
func padParam() ParamSpec { return padParamDefault(PadFast) }

// padParamDefault is the pad parameter with another default: PadDouble for
// relative impedance, whose running integral would otherwise wrap the
// trace's end round onto its start (with pad=fast a spike in the last
// samples shows as -12 % of its peak at t = 0).
func padParamDefault(def string) ParamSpec {
	return ParamSpec{Name: "pad", Default: def, Choices: PadModes(),
		Description: "end treatment of the FFT: none = plain discrete analytic signal (Marple 1999); fast = zero-pad to the next power of two; double = zero-pad to a power of two at least twice the trace"}
}

func taperParam() ParamSpec {
	return ParamSpec{Name: "taper", Unit: "ms", Default: "0", Min: 0, Max: 10000,
		Description: "half-Hann taper on each trace end before the FFT (0 = off)"}
}

func windowParam(def string) ParamSpec {
	return ParamSpec{Name: "window", Unit: "ms", Default: def, Min: 4, Max: 10000,
		Description: "length of the centred sliding window"}
}

func analyticParams(extra ...ParamSpec) []ParamSpec {
	return append([]ParamSpec{padParam(), taperParam()}, extra...)
}

const (
	srcTaner1979  = "Taner, Koehler and Sheriff (1979), Complex seismic trace analysis, Geophysics 44(6)"
	srcBarnes1992 = "Barnes (1992), The calculation of instantaneous frequency and instantaneous bandwidth, Geophysics 57(11)"
	srcBarnes1993 = "Barnes (1993), Instantaneous spectral bandwidth and dominant frequency with applications to seismic reflection data, Geophysics 58(3)"
	srcBodine1984 = "Bodine (1984), Waveform analysis with seismic attributes, 54th SEG Annual Meeting"
	srcTaner2001  = "Taner (2001), Seismic attributes, CSEG Recorder 26(7)"
)

// registry builds the attribute table. It is a function, not a package
// variable, so there is no global mutable state.
func registry() []*Attribute {
	return []*Attribute{
		// amplitude
		{ID: "amplitude", Name: "Amplitude", Unit: "amplitude", Kind: Signed, Group: GroupAmplitude,
			Description: "the input trace unchanged (Inf gap samples become NaN)", Source: "the recorded data", run: clampedAfter(runAmplitude)},
		{ID: "quadrature", Name: "Quadrature trace", Unit: "amplitude", Kind: Signed, Group: GroupAmplitude,
			Description: "imaginary part of the analytic trace (Hilbert transform of the trace)", Source: srcTaner1979,
			Params: analyticParams(), run: sampleAttribute(false, quadratureAt)},
		{ID: "envelope", Name: "Envelope (reflection strength)", Unit: "amplitude", Kind: Magnitude, Group: GroupAmplitude,
			Description: "modulus of the analytic trace", Source: srcTaner1979,
			Params: analyticParams(), run: traceAttribute(false, envelopeTrace)},
		{ID: "envelope-derivative", Name: "Envelope first derivative", Unit: "amplitude/s", Kind: Signed, Group: GroupAmplitude,
			Description: "time derivative of the envelope, (x x' + h h')/a", Source: srcTaner1979,
			Params: analyticParams(), run: sampleAttribute(true, envelopeDerivativeAt)},
		{ID: "envelope-second-derivative", Name: "Envelope second derivative", Unit: "amplitude/s^2", Kind: Signed, Group: GroupAmplitude,
			Description: "second time derivative of the envelope, (x'^2 + h'^2 + x x'' + h h'' - a'^2)/a", Source: srcTaner1979,
			Params: analyticParams(), run: envelopeSecondDerivative},
		{ID: "apparent-polarity", Name: "Apparent polarity", Unit: "amplitude", Kind: Signed, Group: GroupAmplitude,
			Description: "envelope peak value signed by the trace at the peak, held over the envelope lobe", Source: srcTaner1979,
			Params: analyticParams(), run: lobeAttribute(lobePolarity)},
		{ID: "rms-amplitude", Name: "RMS amplitude", Unit: "amplitude", Kind: Magnitude, Group: GroupAmplitude,
			Description: "root mean square of the trace over a sliding window", Source: "common practice",
			Params: []ParamSpec{windowParam("40")}, run: clampedAfter(rmsAmplitude)},
		{ID: "relative-impedance", Name: "Relative acoustic impedance", Unit: "amplitude*s", Kind: Signed, Group: GroupAmplitude,
			Description: "running integral of the trace, low-cut to remove drift", Source: srcTaner2001,
			Params: []ParamSpec{padParamDefault(PadDouble), {Name: "low-cut", Unit: "Hz", Default: "6", Min: 0.1, Max: 10000,
				Description: "half-amplitude point of the one-octave cosine-squared low-cut ramp"}}, run: relativeImpedance},

		// instantaneous
		{ID: "instantaneous-phase", Name: "Instantaneous phase", Unit: "deg", Kind: Cyclic, Group: GroupInstantaneous,
			Description: "argument of the analytic trace, -180..180 degrees", Source: srcTaner1979,
			Params: analyticParams(), run: traceAttribute(false, phaseTrace)},
		{ID: "cosine-phase", Name: "Cosine of instantaneous phase", Unit: "", Kind: Signed, Group: GroupInstantaneous,
			Description: "cosine of the instantaneous phase, x/a, in -1..1", Source: srcTaner1979,
			Params: analyticParams(), run: sampleAttribute(false, cosPhaseAt)},
		{ID: "instantaneous-frequency", Name: "Instantaneous frequency", Unit: "Hz", Kind: Magnitude, Group: GroupInstantaneous,
			Description: "phase rate (x h' - h x')/(2 pi a^2), derivatives taken in the frequency domain", Source: srcTaner1979,
			Params: analyticParams(), run: sampleAttribute(true, frequencyAt)},
		{ID: "instantaneous-bandwidth", Name: "Instantaneous bandwidth", Unit: "Hz", Kind: Magnitude, Group: GroupInstantaneous,
			Description: "|a'/a|/(2 pi), the relative rate of change of the envelope", Source: srcBarnes1992,
			Params: analyticParams(), run: sampleAttribute(true, bandwidthAt)},
		{ID: "dominant-frequency", Name: "Dominant frequency", Unit: "Hz", Kind: Magnitude, Group: GroupInstantaneous,
			Description: "sqrt(f^2 + b^2) of instantaneous frequency f and bandwidth b", Source: srcBarnes1993,
			Params: analyticParams(), run: sampleAttribute(true, dominantAt)},
		{ID: "thin-bed", Name: "Thin-bed indicator", Unit: "Hz", Kind: Signed, Group: GroupInstantaneous,
			Description: "instantaneous frequency minus its average over a window weighted by envelope squared (Barnes 1993)", Source: srcTaner2001,
			Params: analyticParams(windowParam("40")), run: windowedAttribute(thinBedAt)},

		// response
		{ID: "response-phase", Name: "Response phase", Unit: "deg", Kind: Cyclic, Group: GroupResponse,
			Description: "instantaneous phase at the envelope peak, held over the envelope lobe", Source: srcBodine1984,
			Params: analyticParams(), run: lobeAttribute(lobePhase)},
		{ID: "response-frequency", Name: "Response frequency", Unit: "Hz", Kind: Magnitude, Group: GroupResponse,
			Description: "instantaneous frequency at the envelope peak, held over the envelope lobe", Source: srcBodine1984,
			Params: analyticParams(), run: lobeAttribute(lobeFrequency)},
		{ID: "response-amplitude", Name: "Response amplitude", Unit: "amplitude", Kind: Magnitude, Group: GroupResponse,
			Description: "envelope peak value, held over the envelope lobe", Source: srcBodine1984,
			Params: analyticParams(), run: lobeAttribute(lobeAmplitude)},

		// weighted and spectral
		{ID: "weighted-frequency", Name: "Weighted average frequency", Unit: "Hz", Kind: Magnitude, Group: GroupWeighted,
			Description: "instantaneous frequency averaged with envelope-squared weights over a window", Source: srcBarnes1993,
			Params: analyticParams(windowParam("40")), run: windowedAttribute(weightedFrequencyAt)},
		{ID: "weighted-bandwidth", Name: "Weighted bandwidth", Unit: "Hz", Kind: Magnitude, Group: GroupWeighted,
			Description: "envelope-squared-weighted spread of frequency, bandwidth term included, over a window", Source: srcBarnes1993,
			Params: analyticParams(windowParam("40")), run: windowedAttribute(weightedBandwidthAt)},
		{ID: "amplitude-weighted-frequency", Name: "Amplitude-weighted frequency", Unit: "Hz", Kind: Magnitude, Group: GroupWeighted,
			Description: "instantaneous frequency averaged with envelope weights over a window", Source: srcTaner2001,
			Params: analyticParams(windowParam("40")), run: windowedAttribute(amplitudeWeightedFrequencyAt)},
		{ID: "amplitude-weighted-cosine-phase", Name: "Amplitude-weighted cosine of phase", Unit: "", Kind: Signed, Group: GroupWeighted,
			Description: "cosine of phase averaged with envelope weights over a window", Source: srcTaner2001,
			Params: analyticParams(windowParam("40")), run: windowedAttribute(amplitudeWeightedCosPhaseAt)},
		{ID: "sweetness", Name: "Sweetness", Unit: "amplitude/sqrt(Hz)", Kind: Magnitude, Group: GroupWeighted,
			Description: "envelope over the square root of the weighted average frequency", Source: "Radovich and Oliveros (1998), 3-D sequence interpretation of seismic instantaneous attributes from the Gorgon Field, The Leading Edge 17(9)",
			Params: analyticParams(windowParam("40"), ParamSpec{Name: "min-frequency", Unit: "Hz", Default: "2", Min: 0.01, Max: 10000,
				Description: "floor under the frequency before the square root, so quiet or low-frequency spots cannot blow up"}),
			run: windowedAttribute(sweetnessAt)},

		// conditioning
		{ID: "bandpass", Name: "Zero-phase band-pass", Unit: "amplitude", Kind: Signed, Group: GroupConditioning,
			Description: "frequency-domain band-pass with one-octave cosine-squared ramps centred on the corners", Source: "common practice",
			Params: []ParamSpec{
				{Name: "low-cut", Unit: "Hz", Default: "8", Min: 0, Max: 10000, Description: "half-amplitude low corner (0 = no low-cut)"},
				{Name: "high-cut", Unit: "Hz", Default: "60", Min: 0, Max: 10000, Description: "half-amplitude high corner (0 = no high-cut)"},
			}, run: clampedAfter(runBandpass)},
		{ID: "agc", Name: "Automatic gain control", Unit: "", Kind: Signed, Group: GroupConditioning,
			Description: "trace divided by its RMS over a centred sliding window", Source: "common practice",
			Params: []ParamSpec{{Name: "window", Unit: "ms", Default: "500", Min: 4, Max: 20000, Description: "length of the centred RMS window"}},
			run:    clampedAfter(runAGC)},
	}
}

func runAmplitude(ctx context.Context, in, out Section, _ Params, progress func(done, total int)) error {
	return forEachTrace(ctx, len(in.Traces), func() struct{} { return struct{}{} }, func(_ struct{}, i int) error {
		o := out.Traces[i]
		for j, v := range in.Traces[i] {
			if isGap(v) {
				v = float32(math.NaN())
			}
			o[j] = v
		}
		return nil
	}, progress)
}
