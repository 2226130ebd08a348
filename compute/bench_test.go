package compute

import (
	"context"
	"math"
	"testing"

	"quadtrace/segy/segytest"
)

// benchSection builds the speed-test array: 2000 traces x 1501 samples at
// 4 ms. testdata/compute/scipy_speed.py builds the same array with numpy
// (same formula) to time scipy on it.
func benchSection(traces, samples int) Section {
	sec := Section{Traces: make([][]float32, traces), DT: 0.004}
	for i := range sec.Traces {
		tr := make([]float32, samples)
		for k := range tr {
			fi, fk := float64(i), float64(k)
			noise := math.Sin(fi*12.9898+fk*78.233) * 43758.5453
			noise -= math.Floor(noise)
			tr[k] = float32(math.Sin(2*math.Pi*0.004*fk*(25+0.01*fi)) + 0.5*math.Sin(2*math.Pi*0.004*fk*(40-0.005*fi)) + (noise - 0.5))
		}
		sec.Traces[i] = tr
	}
	return sec
}

// BenchmarkInstantaneousSet times envelope, phase, frequency and cosine of
// phase on 2000 x 1501 samples, with the default end treatment (pad=fast)
// and with pad=none. Besides wall time per op it reports cpu-ns/op, the
// process's CPU time per op (getrusage): with -cpu 1 that is the work of
// one core, which a busy shared machine does not inflate.
func BenchmarkInstantaneousSet(b *testing.B) {
	for _, pad := range []string{PadFast, PadNone} {
		b.Run("pad="+pad, func(b *testing.B) {
			sec := benchSection(2000, 1501)
			// One untimed run first, as scipy_speed.py's best-of-N
			// discards scipy's first: with -benchtime 1x the timed run
			// would otherwise be the first to fill a fresh heap, paying
			// the page faults of 48 MB of new output.
			if _, err := Instantaneous(context.Background(), sec, EndTreatment{Pad: pad}, nil); err != nil {
				b.Fatal(err)
			}
			b.ResetTimer()
			cpu, faults := segytest.ProcessCPU(), segytest.MinorFaults()
			for b.Loop() {
				if _, err := Instantaneous(context.Background(), sec, EndTreatment{Pad: pad}, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(segytest.ProcessCPU()-cpu)/float64(b.N), "cpu-ns/op")
			b.ReportMetric(float64(segytest.MinorFaults()-faults)/float64(b.N), "faults/op")
		})
		b.Run("into,pad="+pad, func(b *testing.B) {
			sec := benchSection(2000, 1501)
			set, err := Instantaneous(context.Background(), sec, EndTreatment{Pad: pad}, nil)
			if err != nil {
				b.Fatal(err)
			}
			b.ResetTimer()
			cpu, faults := segytest.ProcessCPU(), segytest.MinorFaults()
			for b.Loop() {
				if err := InstantaneousInto(context.Background(), sec, &set, EndTreatment{Pad: pad}, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(segytest.ProcessCPU()-cpu)/float64(b.N), "cpu-ns/op")
			b.ReportMetric(float64(segytest.MinorFaults()-faults)/float64(b.N), "faults/op")
		})
	}
}

// BenchmarkEnvelopeInto times the envelope alone (the export's attribute)
// on the 2000 x 1501 array with pad=fast, written into a reused output as
// the export and the brick store write it; cpu-ns/op as in
// BenchmarkInstantaneousSet.
func BenchmarkEnvelopeInto(b *testing.B) {
	sec := benchSection(2000, 1501)
	env, err := Lookup("envelope")
	if err != nil {
		b.Fatal(err)
	}
	out := newLike(sec)
	b.SetBytes(int64(4 * 2000 * 1501))
	b.ResetTimer()
	cpu := segytest.ProcessCPU()
	for b.Loop() {
		if err := env.ComputeInto(context.Background(), sec, out, Params{}, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(segytest.ProcessCPU()-cpu)/float64(b.N), "cpu-ns/op")
}
