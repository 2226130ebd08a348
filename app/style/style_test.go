package style

import (
	"testing"

	"quadtrace/compute"
	"quadtrace/palettes"
)

// TestFamilyAndRange checks the display choices, each a fact of the trade
// (common practice): phase-like attributes get a cyclic palette over the
// full -180..180 degrees, signed ones a diverging palette centred on zero,
// magnitudes a sequential palette starting at zero.
func TestFamilyAndRange(t *testing.T) {
	signed := [][]float32{{-3, -1, 0, 2, 4}, {1, 2, 3, 5, 0.5}}
	positive := [][]float32{{3, 1, 2, 2, 4}, {1, 2, 3, 5, 0.5}}
	for _, c := range []struct {
		id     string
		data   [][]float32
		family palettes.Family
		check  func(lo, hi float32) bool
	}{
		{"instantaneous-phase", signed, palettes.Cyclic, func(lo, hi float32) bool { return lo == -180 && hi == 180 }},
		{"amplitude", signed, palettes.Diverging, func(lo, hi float32) bool { return lo == -hi && hi == 5 }},
		{"envelope", positive, palettes.Sequential, func(lo, hi float32) bool { return lo == 0 && hi == 5 }},
	} {
		a, err := compute.Lookup(c.id)
		if err != nil {
			t.Fatal(err)
		}
		if got := Family(a.Kind); got != c.family {
			t.Errorf("%s: family %v, want %v", c.id, got, c.family)
		}
		pal, err := Palette(a, "")
		if err != nil || pal.Family != c.family {
			t.Errorf("%s: default palette %v (%v), want family %v", c.id, pal, err, c.family)
		}
		if lo, hi := Range(a, c.data, 100); !c.check(lo, hi) {
			t.Errorf("%s: range %g..%g", c.id, lo, hi)
		}
	}
	env, _ := compute.Lookup("envelope")
	if p, _ := OverlayPalette(env, ""); p.Family != palettes.Overlay {
		t.Errorf("envelope overlay palette family %v, want overlay", p.Family)
	}
	if _, err := Palette(env, "no-such-palette"); err == nil {
		t.Error("unknown palette name accepted")
	}
	flat := [][]float32{{2, 2, 2}}
	if lo, hi := Range(env, flat, 99); !(hi > lo) {
		t.Errorf("flat data gives empty range %g..%g", lo, hi)
	}
}
