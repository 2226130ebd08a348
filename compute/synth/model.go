package synth

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// The earth model. Lateral positions are fractions of the grid: u runs
// from 0 at the first crossline to 1 at the last (the dip direction, the
// shelf progrades towards +u) and v from 0 at the first inline to 1 at
// the last. Times are two-way times in milliseconds. The geometry is the
// same for every seed; the seed draws the layer reflection coefficients
// and the thin-bed sequence.
//
// From top to bottom:
//
//	0 - seafloor      water, then the seafloor reflection
//	shallow layers    parallel beds draping the seafloor
//	thin beds         interbedded sand and shale beds thinner than tuning
//	channel level     a meandering channel cut into a mud-prone interval
//	topsets           parallel shelf beds
//	clinoforms        a prograding shelf margin: oblique clinoforms with
//	                  toplap below the topsets and downlap onto the base
//	quiet shale       holding a sand wedge that pinches out up-dip
//	reservoir         a domed sand, gas-charged above a flat gas-water
//	                  contact (bright spot and flat spot), with pull-down
//	                  and a low-frequency shadow beneath it
//	deep layers       parallel beds
//
// A normal fault cuts everything below its upper tip.
type model struct {
	ni, nx   int     // grid size
	recordMS float64 // time of the last sample

	shallow, topsets, bottomsets, deep []surface
	thinBeds                           []thinBed
	clinoR                             []float64 // reflection coefficient of each clinoform
	gwcMS                              float64   // the flat gas-water contact, after structure

	// surfaces names the interfaces whose times Survey.Surfaces keeps, in
	// that order; ids holds their positions.
	surfaces []Surface
	ids      surfaceIDs
}

// surfaceIDs are positions in model.surfaces (plus one, so that zero in
// reflector.surface means an unnamed interface); the layer groups take
// consecutive ids from their first.
type surfaceIDs struct {
	seafloor, shallow, thinTop, channel, topsets, clinoTop, clinoBase, bottomsets,
	quietTop, wedgeTop, wedgeBase, quietBase, resTop, gwc, resBase, deep int16
}

// nameSurfaces lists the interfaces kept in Survey.Surfaces, with their
// nominal reflection coefficients, and sets m.ids.
func (m *model) nameSurfaces() {
	add := func(name string, r float64) int16 {
		m.surfaces = append(m.surfaces, Surface{Name: name, R: r})
		return int16(len(m.surfaces))
	}
	group := func(prefix string, layers []surface) int16 {
		first := int16(len(m.surfaces) + 1)
		for k, l := range layers {
			add(fmt.Sprintf("%s-%d", prefix, k+1), l.r)
		}
		return first
	}
	m.ids.seafloor = add(SurfaceSeafloor, 0.18)
	m.ids.shallow = group("shallow", m.shallow)
	m.ids.thinTop = add("thin-beds-top", m.thinBeds[0].r)
	m.ids.channel = add(SurfaceChannel, 0.03)
	m.ids.topsets = group("topset", m.topsets)
	m.ids.clinoTop = add("clinoform-top", 0.07)
	m.ids.clinoBase = add("clinoform-base", 0.08)
	m.ids.bottomsets = group("bottomset", m.bottomsets)
	m.ids.quietTop = add("quiet-top", 0.03)
	m.ids.wedgeTop = add(SurfaceWedgeTop, -wedgeR)
	m.ids.wedgeBase = add(SurfaceWedgeBase, wedgeR)
	m.ids.quietBase = add("quiet-base", 0.04)
	m.ids.resTop = add(SurfaceReservoirTop, waterTopR)
	m.ids.gwc = add("gas-water-contact", flatSpotR)
	m.ids.resBase = add("reservoir-base", sandBaseR)
	m.ids.deep = group("deep", m.deep)
}

// surface is a background interface:
// t = t0 + dipU*u + dipV*v + amp*sin(2*pi*(ku*u + kv*v) + phase).
type surface struct {
	t0, dipU, dipV, amp, ku, kv, phase float64
	r                                  float64
}

func (s surface) at(u, v float64) float64 {
	return s.t0 + s.dipU*u + s.dipV*v + s.amp*math.Sin(2*math.Pi*(s.ku*u+s.kv*v)+s.phase)
}

// coefAt returns the surface's reflection coefficient at (u, v): r varied
// laterally by up to a quarter, as lithology varies along a bed.
func (s surface) coefAt(u, v float64) float64 {
	return s.r * (1 + 0.25*math.Sin(2*math.Pi*(1.7*s.ku*u-1.3*s.kv*v)+2*s.phase))
}

// thinBed is one bed of the thin-bed package: its base lies thick ms
// below the previous interface, thickness varying laterally by +-vary.
type thinBed struct {
	thick, vary, ku, kv, phase, r float64
}

// Model constants (ms unless said otherwise).
const (
	seafloorMS = 80.0

	thinTopMS  = 250.0 // top of the thin-bed package at u = 0
	channelMS  = 410.0 // the surface the channel cuts down from, at u = 0
	channelDep = 16.0  // channel depth at its axis
	channelHW  = 4.0   // channel half-width at the top, bins

	clinoTopMS   = 520.0 // toplap surface at u = 0
	clinoBaseMS  = 780.0 // downlap surface at u = 0
	clinoWidth   = 0.11  // foreset width scale, fraction of the survey
	clinoFirst   = 0.05  // first (oldest) clinoform front
	clinoLast    = 0.80  // last (youngest) clinoform front
	clinoSpacing = 0.05  // spacing of successive clinoform fronts
	clinoFadeMS  = 6.0   // clinoforms fade out this close to the bounding surfaces

	faultTipMS   = 560.0 // upper tip of the normal fault
	faultU       = 0.60  // fault position at its tip
	faultSlope   = 0.10  // basinward shift of the fault plane per faultSpanMS
	faultSpanMS  = 940.0 //
	faultThrowMS = 35.0  // largest throw

	quietTopMS  = 860.0  // a quiet shale interval holds the wedge
	quietBaseMS = 1010.0 //
	wedgeTopMS  = 915.0  // wedge top
	wedgeMaxMS  = 45.0   // wedge two-way thickness at the thick end (v = 0.95)
	wedgeV0     = 0.10   // pinch-out line
	wedgeV1     = 0.95   // thick end
	wedgeU0     = 0.08   // crossline extent of the wedge
	wedgeU1     = 0.42   //
	wedgeR      = 0.12   // |reflection coefficient| at top (-) and base (+)

	domeU, domeV     = 0.83, 0.50 // dome crest
	domeSU, domeSV   = 0.08, 0.14 // dome widths
	domeHeightMS     = 60.0       // structural relief at the reservoir
	domeRampTopMS    = 950.0      // relief grows from zero here ...
	domeRampBaseMS   = 1080.0     // ... to full here
	reservoirMS      = 1080.0     // reservoir sand top before doming
	reservoirThickMS = 40.0       // sand two-way thickness
	gasColumnFrac    = 0.50       // gas column as a fraction of dome relief
	gasTopR          = -0.30      // shale on gas sand: the bright spot
	waterTopR        = -0.06      // shale on brine sand
	flatSpotR        = 0.16       // gas sand on brine sand: the flat spot
	sandBaseR        = 0.06       // brine sand on shale
	pullDownFrac     = 0.12       // time sag below the gas per ms of gas column
)

// newModel draws the stratigraphy for a seed.
func newModel(cfg Config) *model {
	rng := rand.New(rand.NewPCG(uint64(cfg.Seed), 0x9e3779b97f4a7c15))
	m := &model{ni: cfg.Inlines, nx: cfg.Crosslines, recordMS: float64(cfg.Samples-1) * float64(cfg.IntervalUS) / 1000}
	coef := func(scale float64) float64 {
		// Random magnitude between scale/3 and scale, random sign.
		r := scale * (1 + 2*rng.Float64()) / 3
		if rng.IntN(2) == 0 {
			r = -r
		}
		return r
	}
	layers := func(top, base float64, n int, dipU, scale float64) []surface {
		out := make([]surface, n)
		for k := range out {
			t := top + (base-top)*(float64(k)+0.3+0.4*rng.Float64())/float64(n)
			out[k] = surface{
				t0: t, dipU: dipU, dipV: 4 * (rng.Float64() - 0.5),
				amp: 1 + 3*rng.Float64(), ku: 0.5 + rng.Float64(), kv: 0.3 + rng.Float64(),
				phase: 2 * math.Pi * rng.Float64(), r: coef(scale),
			}
		}
		return out
	}
	m.shallow = layers(110, thinTopMS-10, 6, 20, 0.06)
	// Channel-level interval: the channel surface itself plus mud-prone
	// beds above and below it.
	m.shallow = append(m.shallow, layers(thinTopMS+95, 470, 4, 18, 0.04)...)
	m.topsets = layers(clinoTopMS-45, clinoTopMS-5, 3, 15, 0.06)
	m.bottomsets = layers(clinoBaseMS+15, quietTopMS, 2, 10, 0.05)
	m.deep = layers(1150, 1600, 10, 30, 0.07)
	// Thin beds: alternating sand and shale, 2 to 6 ms thick.
	sign := 1.0
	for k := 0; k < 24; k++ {
		m.thinBeds = append(m.thinBeds, thinBed{
			thick: 2 + 4*rng.Float64(), vary: 0.35,
			ku: 0.5 + rng.Float64(), kv: 0.5 + rng.Float64(), phase: 2 * math.Pi * rng.Float64(),
			r: sign * (0.02 + 0.03*rng.Float64()),
		})
		sign = -sign
	}
	for k := 0; k <= int(math.Round((clinoLast-clinoFirst)/clinoSpacing)); k++ {
		m.clinoR = append(m.clinoR, coef(0.07))
	}
	// The gas-water contact is flat: set once from the crest of the
	// reservoir after doming and faulting.
	crestTop, _ := place(reservoirMS, domeU, domeV, faultCrossMS(domeU, domeV))
	m.gwcMS = crestTop + gasColumnFrac*domeHeightMS
	m.nameSurfaces()
	return m
}

func smoothstep(e0, e1, x float64) float64 {
	t := math.Max(0, math.Min(1, (x-e0)/(e1-e0)))
	return t * t * (3 - 2*t)
}

// dome returns the dome's shape factor (1 at the crest) at (u, v).
func dome(u, v float64) float64 {
	du, dv := (u-domeU)/domeSU, (v-domeV)/domeSV
	return math.Exp(-0.5 * (du*du + dv*dv))
}

// faultThrow returns the throw of the normal fault for an interface at
// (post-doming) time tMS on inline fraction v: zero above the tip,
// growing to its full value over the 140 ms below it, largest mid-survey
// and dying away towards the survey edges.
func faultThrow(tMS, v float64) float64 {
	dv := (v - 0.5) / 0.65
	return faultThrowMS * math.Max(0, 1-dv*dv) * smoothstep(faultTipMS, faultTipMS+140, tMS)
}

// faultCrossMS returns the time at which the fault plane crosses the
// trace at (u, v): above it the trace is in the hanging wall, below it in
// the footwall.
func faultCrossMS(u, v float64) float64 {
	u0 := faultU + 0.03*math.Sin(math.Pi*v)
	return faultTipMS + (u-u0)/faultSlope*faultSpanMS
}

// place maps an undeformed interface time to its time at (u, v) after
// doming and the normal fault, and reports false where the fault cuts the
// interface out. tCross is faultCrossMS(u, v).
func place(tMS, u, v, tCross float64) (float64, bool) {
	t := tMS
	if tMS > domeRampTopMS {
		t -= domeHeightMS * dome(u, v) * smoothstep(domeRampTopMS, domeRampBaseMS, tMS)
	}
	if h := faultThrow(t, v); h > 0 {
		switch {
		case t+h < tCross: // hanging wall: moved down by the throw
			return t + h, true
		case t >= tCross: // footwall: in place
		default: // between the two: cut out by the fault
			return 0, false
		}
	}
	return t, true
}

// reflector is one interface on one trace.
type reflector struct {
	tMS   float64 // two-way time
	r     float64 // reflection coefficient
	tqMS  float64 // attenuation time: two-way time plus any extra from gas
	scale float64 // amplitude loss from extra attenuation (1 outside shadows)
	// surface is the interface's position in model.surfaces plus one, 0
	// when it is not one of the kept surfaces.
	surface int16
}

// Bits of traceInfo.present.
const (
	hasThinBeds = 1 << iota
	hasChannel
	hasClinoforms
	hasFault
	hasWedge
	hasGas
	hasFlatSpot
)

// traceInfo says which features a trace holds and where in time.
type traceInfo struct {
	present int
	// Time ranges, valid when the matching bit is set.
	thinBeds, channel, clinoforms, fault, wedge, gas, flatSpot, shadow [2]float64
}

// trace appends to buf the reflectors at grid index (il, xl) and says
// which features the trace holds.
func (m *model) trace(il, xl int, buf []reflector, bank *waveletBank) ([]reflector, traceInfo) {
	var info traceInfo
	u := float64(xl) / float64(m.nx-1)
	v := float64(il) / float64(m.ni-1)
	out := buf[:0]
	tCross := faultCrossMS(u, v)

	// Reservoir geometry first: it decides pull-down and shadow for
	// everything below it.
	resTop, okTop := place(reservoirMS, u, v, tCross)
	resBase, okBase := place(reservoirMS+reservoirThickMS, u, v, tCross)
	gasColumn := 0.0
	// Gas fills the dome's closure above the contact; the spill point
	// keeps it off the regional sand outside the closure.
	if okTop && okBase && resTop < m.gwcMS && dome(u, v) > 1-gasColumnFrac-0.1 {
		gasColumn = math.Min(m.gwcMS, resBase) - resTop
	}
	if !okBase {
		resBase = math.Inf(1)
	}
	pullDown := pullDownFrac * gasColumn
	extraTq := gasColumn * (QualityFactor/GasQualityFactor - 1)

	// add places an undeformed interface tMS with coefficient r.
	add := func(tMS, r float64) {
		if t, ok := place(tMS, u, v, tCross); ok {
			m.emit(&out, t, r, resBase, pullDown, extraTq, bank)
		}
	}
	// named marks the interfaces appended since out had n of them as
	// surface id.
	named := func(id int16, n int) {
		for k := n; k < len(out); k++ {
			out[k].surface = id
		}
	}
	addNamed := func(id int16, tMS, r float64) {
		n := len(out)
		add(tMS, r)
		named(id, n)
	}

	// Seafloor and shallow layers.
	sf := seafloorMS + 25*u + 8*math.Sin(2*math.Pi*(0.7*v+0.2))
	addNamed(m.ids.seafloor, sf, 0.18)
	for k, s := range m.shallow {
		addNamed(m.ids.shallow+int16(k), s.at(u, v), s.coefAt(u, v))
	}

	// Thin beds.
	t := thinTopMS + 20*u + 3*math.Sin(2*math.Pi*(0.4*u+0.6*v))
	info.present |= hasThinBeds
	info.thinBeds[0] = t
	for k, b := range m.thinBeds {
		if k == 0 {
			addNamed(m.ids.thinTop, t, b.r)
		} else {
			add(t, b.r)
		}
		t += b.thick * (1 + b.vary*math.Sin(2*math.Pi*(b.ku*u+b.kv*v)+b.phase))
	}
	info.thinBeds[1] = t

	// Channel: a meandering U-shaped cut below the channel surface.
	chTop := channelMS + 18*u + 2*math.Sin(2*math.Pi*(0.8*u+0.3*v))
	addNamed(m.ids.channel, chTop, 0.03)
	if d := m.channelDistance(u, v); d < channelHW {
		depth := channelDep * (1 - (d/channelHW)*(d/channelHW))
		add(chTop+0.5, -0.13) // sand fill below the mud drape
		add(chTop+0.5+depth, 0.10)
		info.present |= hasChannel
		info.channel = [2]float64{chTop, chTop + 0.5 + depth}
	}

	// Topsets, then the clinoform unit.
	for k, s := range m.topsets {
		addNamed(m.ids.topsets+int16(k), s.at(u, v), s.coefAt(u, v))
	}
	cTop := clinoTopMS + 15*u + 2*math.Sin(2*math.Pi*(0.5*v+0.1))
	cBase := clinoBaseMS + 10*u
	addNamed(m.ids.clinoTop, cTop, 0.07)
	addNamed(m.ids.clinoBase, cBase, 0.08)
	front0 := clinoFirst + 0.04*math.Sin(2*math.Pi*v+1)
	visible := false
	for k, r := range m.clinoR {
		z := (u - (front0 + float64(k)*clinoSpacing)) / clinoWidth
		s := (0.5*(1+math.Tanh(z)) - 0.15) / 0.85
		if s <= 0 || s >= 1 {
			continue
		}
		tc := cTop + (cBase-cTop)*s
		fade := smoothstep(0, clinoFadeMS, math.Min(tc-cTop, cBase-tc))
		if fade == 0 {
			continue
		}
		visible = true
		add(tc, r*fade)
	}
	if visible {
		info.present |= hasClinoforms
		info.clinoforms = [2]float64{cTop, cBase}
	}
	for k, s := range m.bottomsets {
		addNamed(m.ids.bottomsets+int16(k), s.at(u, v), s.coefAt(u, v))
	}

	// Quiet shale with the wedge.
	addNamed(m.ids.quietTop, quietTopMS, 0.03)
	addNamed(m.ids.quietBase, quietBaseMS, 0.04)
	if th := wedgeThickness(u, v); th > 0 {
		top := wedgeTopMS + 5*u
		addNamed(m.ids.wedgeTop, top, -wedgeR)
		addNamed(m.ids.wedgeBase, top+th, wedgeR)
		info.present |= hasWedge
		info.wedge = [2]float64{top, top + th}
	}

	// Reservoir: the sand, gas above the flat contact.
	if gasColumn > 0 {
		n := len(out)
		m.emit(&out, resTop, gasTopR, resBase, 0, 0, bank)
		named(m.ids.resTop, n)
		info.present |= hasGas
		info.gas = [2]float64{resTop, math.Min(m.gwcMS, resBase)}
		if m.gwcMS < resBase {
			n = len(out)
			m.emit(&out, m.gwcMS, flatSpotR, resBase, 0, 0, bank)
			named(m.ids.gwc, n)
			n = len(out)
			m.emit(&out, resBase, sandBaseR, resBase, pullDown, extraTq, bank)
			named(m.ids.resBase, n)
			info.present |= hasFlatSpot
			info.flatSpot = [2]float64{m.gwcMS, m.gwcMS}
		} else {
			n = len(out)
			m.emit(&out, resBase, -gasTopR/2, resBase, pullDown, extraTq, bank)
			named(m.ids.resBase, n)
		}
		info.shadow = [2]float64{resBase, math.Min(resBase+300, m.recordMS)}
	} else {
		addNamed(m.ids.resTop, reservoirMS, waterTopR)
		addNamed(m.ids.resBase, reservoirMS+reservoirThickMS, sandBaseR)
	}

	for k, s := range m.deep {
		addNamed(m.ids.deep+int16(k), s.at(u, v), s.coefAt(u, v))
	}

	// The fault crosses this trace between its tip and the record's end
	// where it has throw.
	if tCross >= faultTipMS && tCross <= m.recordMS && faultThrow(tCross, v) > 1 {
		info.present |= hasFault
		info.fault = [2]float64{tCross, tCross}
	}
	return out, info
}

// emit appends a reflector at time tMS after structure, applying the gas
// pull-down and shadow to interfaces at and below the reservoir base.
func (m *model) emit(out *[]reflector, tMS, r, resBase, pullDown, extraTq float64, bank *waveletBank) {
	rf := reflector{tMS: tMS, r: r, tqMS: tMS, scale: 1}
	if tMS >= resBase && (pullDown > 0 || extraTq > 0) {
		rf.tMS += pullDown
		rf.tqMS = rf.tMS + extraTq
		rf.scale = bank.gain[bank.entry(rf.tqMS)] / bank.gain[bank.entry(rf.tMS)]
	}
	*out = append(*out, rf)
}

// channelCentre returns the channel axis as a crossline fraction on
// inline fraction v, and its slope du/dv.
func channelCentre(v float64) (u, slope float64) {
	a1, k1, p1 := 0.08, 1.6, 0.4
	a2, k2, p2 := 0.03, 3.7, 1.3
	u = 0.30 + a1*math.Sin(2*math.Pi*k1*v+p1) + a2*math.Sin(2*math.Pi*k2*v+p2)
	slope = a1*2*math.Pi*k1*math.Cos(2*math.Pi*k1*v+p1) + a2*2*math.Pi*k2*math.Cos(2*math.Pi*k2*v+p2)
	return u, slope
}

// channelDistance returns the distance in bins from (u, v) to the
// channel axis, measured across the channel.
func (m *model) channelDistance(u, v float64) float64 {
	uc, slope := channelCentre(v)
	// Slope in bins of crossline per bin of inline.
	sb := slope * float64(m.nx-1) / float64(m.ni-1)
	return math.Abs(u-uc) * float64(m.nx-1) / math.Sqrt(1+sb*sb)
}

// wedgeThickness returns the wedge's two-way thickness at (u, v): zero
// up-dip of the pinch-out line v = wedgeV0, growing linearly to
// wedgeMaxMS at v = wedgeV1, tapered to zero at the crossline edges.
func wedgeThickness(u, v float64) float64 {
	if u <= wedgeU0 || u >= wedgeU1 || v <= wedgeV0 {
		return 0
	}
	v = math.Min(v, wedgeV1)
	edge := smoothstep(wedgeU0, wedgeU0+0.04, u) * (1 - smoothstep(wedgeU1-0.04, wedgeU1, u))
	return wedgeMaxMS * (v - wedgeV0) / (wedgeV1 - wedgeV0) * edge
}
