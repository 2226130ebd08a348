package synth

import "math"

// Survey geometry of the demo. The grid is invented: a projected
// (UTM-like) coordinate system with metre units, an origin in the
// middle of nowhere in particular, and 25 m bins, a common 3D bin size
// (common practice).
const (
	// BinSizeM is the bin spacing along both inlines and crosslines, metres.
	BinSizeM = 25.0
	// OriginEasting and OriginNorthing are the projected coordinates of the
	// first inline and first crossline, metres.
	OriginEasting  = 512000.0
	OriginNorthing = 6780000.0
	// AzimuthDeg is the bearing, clockwise from grid north, of the
	// direction of increasing crossline number along an inline. Increasing
	// inline numbers run at AzimuthDeg+90.
	AzimuthDeg = 30.0
	// FirstInline and FirstCrossline number the grid's first line of each
	// kind; numbers step by one.
	FirstInline    = 1000
	FirstCrossline = 2000
)

// Names of the features in Survey.Features.
const (
	FeatureThinBeds   = "thin-beds"
	FeatureChannel    = "channel"
	FeatureClinoforms = "clinoforms"
	FeatureFault      = "fault"
	FeatureWedge      = "wedge"
	FeatureBrightSpot = "bright-spot"
	FeatureFlatSpot   = "flat-spot"
	FeatureShadow     = "low-frequency-shadow"
)

// Survey is a generated post-stack 3D survey held in memory.
type Survey struct {
	// Config is the configuration the survey was generated from.
	Config Config
	// Basin and Name are the invented names of the setting and the survey.
	Basin, Name string
	// FirstInline and FirstCrossline number the first line of each kind.
	FirstInline, FirstCrossline int
	// Traces holds the samples, inline-major: Traces[il*Crosslines+xl] is
	// the trace at grid index (il, xl), Config.Samples samples each, the
	// first at time zero.
	Traces [][]float32
	// Features says where the model put each geological feature: the box
	// of inline and crossline numbers and times holding it.
	Features []Feature
	// Wells are invented wells, for the demo's flavour.
	Wells []Well
	// Surfaces are the model's main interfaces with their true two-way
	// times on every trace, so that tracked horizons can be checked
	// against them.
	Surfaces []Surface
}

// Names of some of the modelled surfaces in Survey.Surfaces. The others
// are named by their unit and number from the top: shallow-1..10,
// topset-1..3, bottomset-1..2, deep-1..10, and thin-beds-top,
// clinoform-top, clinoform-base, quiet-top, quiet-base,
// gas-water-contact, reservoir-base.
const (
	SurfaceSeafloor = "seafloor"
	// SurfaceChannel is the surface the channel is cut down from: maps
	// along it over a window below show the channel sand.
	SurfaceChannel = "channel-surface"
	// SurfaceWedgeTop and SurfaceWedgeBase bound the sand wedge; they
	// exist only where the wedge has thickness.
	SurfaceWedgeTop  = "wedge-top"
	SurfaceWedgeBase = "wedge-base"
	// SurfaceReservoirTop is the top of the domed reservoir sand: maps
	// along it show the gas sand's bright spot.
	SurfaceReservoirTop = "reservoir-top"
)

// Surface is one modelled interface and its true two-way time on every
// trace: the time the model put its reflection at (after doming, the
// fault and the pull-down below the gas), where the wavelet is centred.
type Surface struct {
	Name string
	// R is the interface's nominal reflection coefficient (away from the
	// gas, before its lateral variation of up to a quarter); its sign is
	// the polarity of its reflection: positive gives a peak.
	R float64
	// TimesMS holds the time in ms on each trace, inline-major like
	// Survey.Traces; NaN where the surface is absent (cut out by the
	// fault, or the wedge where it has no thickness).
	TimesMS []float32
	// PeakMS holds the time in ms of the largest lobe of the surface's
	// reflection wavelet on each trace, NaN where the surface is absent:
	// TimesMS plus the delay that the constant-Q phase dispersion gives
	// the wavelet's peak (about 2 ms at 1 s; more below the gas). It is
	// where a peak or trough pick on an isolated reflection belongs.
	PeakMS []float32
}

// Feature is a box in the survey that holds one geological feature of the
// model. Lines are inline and crossline numbers (not grid indices); times
// are two-way times in milliseconds.
type Feature struct {
	Name                       string
	InlineMin, InlineMax       int
	CrosslineMin, CrosslineMax int
	TimeMinMS, TimeMaxMS       float64
	// Description says in a line what the feature is, for the demo.
	Description string
}

// Well is an invented well at a trace location.
type Well struct {
	Name              string
	Inline, Crossline int
	// Description says in a line what the well found.
	Description string
}

// CDP returns the projected coordinates (easting x, northing y, metres) of
// the bin centre at the given inline and crossline numbers. The grid is
// rotated: crossline numbers increase along bearing AzimuthDeg and inline
// numbers along bearing AzimuthDeg+90, BinSizeM apart. Numbers outside the
// survey extrapolate the same grid.
func (s *Survey) CDP(inline, crossline int) (x, y float64) {
	a := AzimuthDeg * math.Pi / 180
	dxl := float64(crossline-s.FirstCrossline) * BinSizeM
	dil := float64(inline-s.FirstInline) * BinSizeM
	// Unit vectors (east, north) of the two grid directions.
	xlE, xlN := math.Sin(a), math.Cos(a)
	ilE, ilN := math.Sin(a+math.Pi/2), math.Cos(a+math.Pi/2)
	return OriginEasting + dxl*xlE + dil*ilE, OriginNorthing + dxl*xlN + dil*ilN
}

// IntervalMS returns the sample interval in milliseconds.
func (s *Survey) IntervalMS() float64 { return float64(s.Config.IntervalUS) / 1000 }

// Trace returns the trace at the given inline and crossline numbers, or nil
// when they are outside the survey. The slice is the survey's own.
func (s *Survey) Trace(inline, crossline int) []float32 {
	il, xl := inline-s.FirstInline, crossline-s.FirstCrossline
	if il < 0 || il >= s.Config.Inlines || xl < 0 || xl >= s.Config.Crosslines {
		return nil
	}
	return s.Traces[il*s.Config.Crosslines+xl]
}

// Feature returns the feature with the given name and whether the model
// placed it inside the survey.
func (s *Survey) Feature(name string) (Feature, bool) {
	for _, f := range s.Features {
		if f.Name == name {
			return f, true
		}
	}
	return Feature{}, false
}

// Surface returns the modelled surface with the given name and whether
// there is one.
func (s *Survey) Surface(name string) (Surface, bool) {
	for _, f := range s.Surfaces {
		if f.Name == name {
			return f, true
		}
	}
	return Surface{}, false
}
