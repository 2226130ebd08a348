package volume

import (
	"context"
	"math"
	"testing"

	"quadtrace/app/bricks"
	"quadtrace/compute"
	"quadtrace/compute/synth"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// corpusValue is the corpus README's value rule for small.sgy and its
// twins: sample k of (il, xl) = il + xl/100 + k*1e-5, as float32.
func corpusValue(il, xl, k int) float32 {
	return float32(float64(il) + float64(xl)/100 + float64(k)*1e-5)
}

// near compares a sample read from the corpus with the value rule. The
// files store 4-byte IBM floats, whose hexadecimal normalisation keeps as
// few as 21 significant bits (IBM System/370 Principles of Operation), so
// 1.2 reads back as 1.1999998: a relative tolerance of 2^-20 covers it.
func near(got, want float32) bool {
	return math.Abs(float64(got-want)) <= math.Abs(float64(want))*0x1p-20
}

// TestSectionsFollowCorpusRule reads inlines, crosslines and time slices of
// small.sgy and its little-endian twin and checks every sample against the
// corpus value rule.
func TestSectionsFollowCorpusRule(t *testing.T) {
	for _, name := range []string{"small.sgy", "small-lsb.sgy"} {
		v, err := Open(segytest.CorpusFile(t, name), segy.Options{})
		if err != nil {
			t.Fatal(err)
		}
		ctx := context.Background()
		for il := 1; il <= 5; il++ {
			sec, err := v.Read(ctx, Slice{Orientation: Inline, Number: il})
			if err != nil {
				t.Fatal(err)
			}
			if len(sec.Keys) != 5 || sec.Keys[0] != 20 || sec.DT != 0.004 {
				t.Fatalf("%s inline %d: keys %v dt %g", name, il, sec.Keys, sec.DT)
			}
			for j, xl := range sec.Keys {
				for k := 0; k < 50; k++ {
					if got, want := sec.Traces[j][k], corpusValue(il, xl, k); !near(got, want) {
						t.Fatalf("%s inline %d crossline %d sample %d = %v, want %v", name, il, xl, k, got, want)
					}
				}
			}
		}
		xsec, err := v.Read(ctx, Slice{Orientation: Crossline, Number: 22})
		if err != nil {
			t.Fatal(err)
		}
		for j, il := range xsec.Keys {
			if got, want := xsec.Traces[j][7], corpusValue(il, 22, 7); !near(got, want) {
				t.Errorf("%s crossline 22 inline %d sample 7 = %v, want %v", name, il, got, want)
			}
		}
		ts, err := v.Read(ctx, Slice{Orientation: TimeSlice, Number: 31})
		if err != nil {
			t.Fatal(err)
		}
		for i, il := range ts.InlineKeys {
			for j, xl := range ts.Keys {
				if got, want := ts.Traces[i][j], corpusValue(il, xl, 31); !near(got, want) {
					t.Errorf("%s time slice sample 31 at (%d,%d) = %v, want %v", name, il, xl, got, want)
				}
			}
		}
		if _, err := v.Read(ctx, Slice{Orientation: Inline, Number: 9}); err == nil {
			t.Errorf("%s: inline 9 does not exist but Read returned no error", name)
		}
		v.Close()
	}
}

// TestTimeSliceAttributeMatchesSections checks the whole-volume store: the
// envelope time slice at a sample equals the envelope of each inline
// section at that sample (attribute_test.go checks every sample, with
// small bricks and a tiny memory bound).
func TestTimeSliceAttributeMatchesSections(t *testing.T) {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = 7, 11, 300
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	a, err := compute.Lookup("envelope")
	if err != nil {
		t.Fatal(err)
	}
	p, err := a.Resolve(nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	v := FromSurvey(s)
	v.SetBrickOptions(bricks.Options{Dir: t.TempDir()}, 0, 0)
	defer v.Close()
	const sample = 150
	var calls int
	ts, err := v.Attribute(ctx, Slice{Orientation: TimeSlice, Number: sample}, a, p, compute.Conditioning{}, func(done, total int) { calls++ })
	if err != nil {
		t.Fatal(err)
	}
	if calls == 0 {
		t.Error("no progress reported while computing the volume")
	}
	for i, il := range ts.InlineKeys {
		sec, err := directAttribute(ctx, v, Slice{Orientation: Inline, Number: il}, a, p, compute.Conditioning{})
		if err != nil {
			t.Fatal(err)
		}
		for j := range ts.Keys {
			if d := math.Abs(float64(ts.Traces[i][j] - sec.Traces[j][sample])); d > 1e-6 {
				t.Fatalf("inline %d crossline %d: slice %v, section %v", il, ts.Keys[j], ts.Traces[i][j], sec.Traces[j][sample])
			}
		}
	}
}

// TestCancelledTimeSlice: a cancelled context stops the volume job.
func TestCancelledTimeSlice(t *testing.T) {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = 5, 5, 100
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := compute.Lookup("envelope")
	p, _ := a.Resolve(nil)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := FromSurvey(s).Attribute(ctx, Slice{Orientation: TimeSlice, Number: 3}, a, p, compute.Conditioning{}, nil); err == nil {
		t.Error("cancelled job returned no error")
	}
}
