package viewer

import (
	"context"
	"testing"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/synth"
)

// TestFetchDataComputesAsTheSurvey: fetchData computes an inline's or a
// crossline's attribute from the amplitude it holds instead of asking the
// survey to read the section again; the result must be the survey's own
// (volume.Attribute, whose attributes are checked against scipy in
// compute), sample for sample, with and without conditioning, and keep the
// section's axes.
func TestFetchDataComputesAsTheSurvey(t *testing.T) {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = 4, 40, 200
	vol, err := volume.Demo(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer vol.Close()
	ctx := context.Background()
	info := vol.Info()
	for _, o := range []volume.Orientation{volume.Inline, volume.Crossline} {
		for _, cond := range []compute.Conditioning{{}, {LowCutHz: 8, HighCutHz: 60, AGCWindowMS: 100}} {
			for _, id := range []string{"envelope", "instantaneous-frequency", "sweetness"} {
				st := newViewState(info)
				st.AttributeID, st.CoRender, st.Cond = id, false, cond
				st.Orientation = o
				req := dataRequestFor(&st)
				got, err := fetchData(ctx, vol, req, shown{}, nil, nil)
				if err != nil {
					t.Fatal(err)
				}
				a := lookup(id)
				p, err := a.Resolve(req.baseParams)
				if err != nil {
					t.Fatal(err)
				}
				want, err := vol.Attribute(ctx, req.slice, a, p, cond, nil)
				if err != nil {
					t.Fatal(err)
				}
				g := got.base
				if g.Slice != want.Slice || g.DT != want.DT || g.T0 != want.T0 || len(g.Keys) != len(want.Keys) || len(g.Traces) != len(want.Traces) {
					t.Fatalf("%v %s %+v: axes differ from the survey's", o, id, cond)
				}
				for i := range want.Traces {
					for j, w := range want.Traces[i] {
						if v := g.Traces[i][j]; v != w && !(v != v && w != w) {
							t.Fatalf("%v %s %+v: trace %d sample %d is %v, the survey gives %v", o, id, cond, i, j, v, w)
						}
					}
				}
			}
		}
	}
}
