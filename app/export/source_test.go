package export

import (
	"context"
	"path/filepath"
	"testing"

	"quadtrace/app/apptest"
	"quadtrace/app/volume"
	"quadtrace/compute/synth"
	"quadtrace/segy"
)

// TestExportFromTheDemoSurveyInMemory: the demo survey exports straight
// from memory (Job.Source, no SEG-Y written first), and the result has the
// same trace headers and samples, byte for byte, as the export of the same
// survey written to a file by volume.WriteSurvey (raw bytes located by the
// SEG-Y rev 1 layout).
func TestExportFromTheDemoSurveyInMemory(t *testing.T) {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = 6, 8, 120
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	file := filepath.Join(dir, "demo.sgy")
	if err := volume.WriteSurvey(context.Background(), file, s, segy.WriteOptions{Format: 5}); err != nil {
		t.Fatal(err)
	}
	fromFile := filepath.Join(dir, "from-file")
	if _, err := Run(context.Background(), Job{Input: file, Attributes: []string{"envelope", "instantaneous-phase"}, Output: fromFile}, nil); err != nil {
		t.Fatal(err)
	}
	vol := volume.FromSurvey(s)
	defer vol.Close()
	fromMemory := filepath.Join(dir, "from-memory")
	paths, err := Run(context.Background(), Job{Source: vol, Stem: "demo", Attributes: []string{"envelope", "instantaneous-phase"}, Output: fromMemory}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k, id := range []string{"envelope", "instantaneous-phase"} {
		want := filepath.Join(fromMemory, "demo-"+id+".sgy")
		if paths[k] != want {
			t.Errorf("output %d: %s, want %s", k, paths[k], want)
		}
		wh, wd := apptest.TraceSampleBytes(t, filepath.Join(fromFile, "demo-"+id+".sgy"), cfg.Samples)
		gh, gd := apptest.TraceSampleBytes(t, paths[k], cfg.Samples)
		if len(gd) != len(wd) || len(gd) != cfg.Inlines*cfg.Crosslines {
			t.Fatalf("%s: %d traces from memory, %d from the file", id, len(gd), len(wd))
		}
		for i := range wd {
			if string(gd[i]) != string(wd[i]) || string(gh[i]) != string(wh[i]) {
				t.Fatalf("%s: trace %d differs between the export from memory and from the file", id, i)
			}
		}
	}
}
