package compute

import (
	"context"
	"encoding/binary"
	"math"
	"strconv"
	"testing"
)

// FuzzAttributes runs every registered attribute on arbitrary float32
// traces (denormals, zeros, NaN, Inf, extremes) with arbitrary parameter
// values: no panic, and every output sample is finite, or NaN at an input
// gap (NaN or Inf sample: a gap never spreads, see Section).
func FuzzAttributes(f *testing.F) {
	le := func(vs ...float32) []byte {
		b := make([]byte, 4*len(vs))
		for i, v := range vs {
			binary.LittleEndian.PutUint32(b[4*i:], math.Float32bits(v))
		}
		return b
	}
	inf := float32(math.Inf(1))
	f.Add(le(1e-40, -2e-40, 3e-41, 0, 1e-45), uint8(0), uint8(2), uint16(64), 0.004, 0.5, "")
	f.Add(le(0, 0, 0, 0), uint8(5), uint8(1), uint16(32), 0.002, 0.0, "")
	f.Add(le(float32(math.NaN()), inf, -inf, 1, 2, 3), uint8(9), uint8(3), uint16(100), 0.001, 1.0, "fast")
	f.Add(le(math.MaxFloat32, -math.MaxFloat32, math.MaxFloat32), uint8(20), uint8(2), uint16(17), 0.004, 0.99, "")
	f.Add(le(1, -1, 1, -1, 1e30, -1e30), uint8(13), uint8(1), uint16(250), 1e-6, 0.01, "x")
	attrs := Attributes()
	f.Fuzz(func(t *testing.T, data []byte, which, ntr uint8, ns uint16, dt, frac float64, text string) {
		a := attrs[int(which)%len(attrs)]
		n, nt := int(ns%400), int(ntr%5)
		sec := Section{DT: dt, T0: 0}
		for i := 0; i < nt; i++ {
			tr := make([]float32, n)
			for k := range tr {
				if j := 4 * (i*n + k); len(data) >= 4 {
					tr[k] = math.Float32frombits(binary.LittleEndian.Uint32(data[j%(len(data)-3):]))
				}
			}
			sec.Traces = append(sec.Traces, tr)
		}
		raw := map[string]string{}
		for i, p := range a.Params {
			switch {
			case p.Choices != nil:
				raw[p.Name] = p.Choices[(int(which)+i)%len(p.Choices)]
				if text != "" && i == 0 {
					raw[p.Name] = text
				}
			case !math.IsNaN(frac):
				// anywhere in the range, and sometimes just outside it
				v := p.Min + math.Mod(math.Abs(frac)*float64(i+1), 1.1)*(p.Max-p.Min)
				raw[p.Name] = strconv.FormatFloat(v, 'g', -1, 64)
			}
		}
		params, err := a.Resolve(raw)
		if err != nil {
			return // refused with an error: fine
		}
		out, err := a.Compute(context.Background(), sec, params, nil)
		if err != nil {
			return
		}
		if len(out.Traces) != len(sec.Traces) {
			t.Fatalf("%s: %d traces out of %d", a.ID, len(out.Traces), len(sec.Traces))
		}
		for i, tr := range out.Traces {
			if len(tr) != n {
				t.Fatalf("%s: trace %d has %d samples, want %d", a.ID, i, len(tr), n)
			}
			for k, v := range tr {
				x, in := float64(v), float64(sec.Traces[i][k])
				gap := math.IsNaN(in) || math.IsInf(in, 0)
				if math.IsInf(x, 0) || math.IsNaN(x) != gap {
					t.Fatalf("%s %v: trace %d sample %d = %v from input %v", a.ID, raw, i, k, v, sec.Traces[i])
				}
			}
		}
	})
}
