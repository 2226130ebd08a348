package export

import (
	"context"
	"fmt"
	"slices"
	"strings"

	"quadtrace/app/indexcache"
	"quadtrace/compute"
	"quadtrace/segy"
)

// Job is one whole-volume attribute export.
type Job struct {
	Input string // the SEG-Y volume; opened read-only, never written
	// Source, when set, is read instead of Input (which is then unused):
	// a survey already open, such as the demo survey in memory, exports
	// without being written to a file first. Its outputs get a textual
	// header of the export's own and a binary header from its sampling.
	Source Source
	// Stem names the outputs written into a folder, <Stem>-<id>.sgy; ""
	// takes the stem of Input's file name (or of Source's name).
	Stem        string
	SegyOptions segy.Options // header byte locations and byte order overrides

	// Attributes are attribute ids (see compute.Attributes); one output each.
	Attributes []string
	// Params are NAME=VALUE settings applied to every chosen attribute that
	// has a parameter of that name; a name that no chosen attribute has is
	// an error.
	Params map[string]string
	// Conditioning is applied to each block of traces before the attributes
	// (the zero value applies none).
	Conditioning compute.Conditioning

	// Output is the destination file for one attribute, the folder for
	// several (made when missing; files named <input stem>-<id>.sgy). For a
	// single attribute, an existing folder also works that way.
	Output string
	Format int // SEG-Y sample format of the outputs: 5 IEEE float (0 means 5) or 1 IBM float

	// Inlines and Crosslines, when set, export only the traces whose inline
	// and crossline numbers (from the trace headers, at the byte locations
	// of SegyOptions) lie in them; each such part is a complete SEG-Y file.
	Inlines, Crosslines *Range

	// BudgetBytes bounds the memory held in trace blocks, with room for
	// the garbage of finished blocks at the collector setting of the export
	// command (GOGC 25; 0 means DefaultBudget). A process also needs a
	// fixed overhead beyond it: the command allows 64 MiB, and measured a
	// peak of 293 MiB for a 256 MiB budget (BenchmarkExportPeakMemory).
	BudgetBytes int64

	// FollowLinks writes at the target of an output that is a symbolic
	// link; by default such an output is refused (app/outfile).
	FollowLinks bool

	// IndexCache, when set, keeps the input's exact geometry index between
	// runs (app/indexcache): a second export of the same file version
	// reads no trace header before the traces. nil reads every header.
	IndexCache *indexcache.Cache
}

// Run exports the attributes of job.Input, streaming blocks of traces
// through a reader, the attribute computation (on all cores) and the segy
// writers, and returns the written paths in the order of job.Attributes.
//
// The outputs are written through app/outfile as one set: unnamed
// temporary files (Linux; hidden locked files elsewhere) put in place only
// when every output is complete, all or none. On an error or cancellation
// of ctx (Run then returns ctx.Err()) nothing is left and every
// destination is as it was: absent, or the previous file untouched. A
// process killed outright leaves the destinations the same way, and on
// Linux no temporary file either. Destinations that are devices, FIFOs,
// folders, the input, or symbolic links (unless FollowLinks) are refused
// before anything is computed.
//
// progress, when not nil, is called from Run's goroutine after each block
// is written.
func Run(ctx context.Context, job Job, progress func(Progress)) ([]string, error) {
	stages, err := resolveStages(job.Attributes, job.Params)
	if err != nil {
		return nil, err
	}
	cond := job.Conditioning
	c := conditioner{describe: cond.String()}
	if !cond.IsZero() {
		c.apply = func(ctx context.Context, in compute.Section) (compute.Section, error) {
			return cond.Apply(ctx, in, nil)
		}
	}
	return runPlan(ctx, plan{
		input: job.Input, options: job.SegyOptions, stages: stages, cond: c,
		output: job.Output, format: job.Format, inlines: job.Inlines, crosslines: job.Crosslines,
		budget: job.BudgetBytes, followLinks: job.FollowLinks, source: job.Source, stem: job.Stem,
		indices: job.IndexCache,
	}, progress)
}

// resolveStages looks the attribute ids up and resolves the parameters of
// each: every parameter goes to the attributes that have it, and one that
// none has is an error (compute.ResolveAll).
func resolveStages(ids []string, params map[string]string) ([]stage, error) {
	if len(ids) == 0 {
		return nil, fmt.Errorf("no attribute chosen")
	}
	attrs := make([]*compute.Attribute, 0, len(ids))
	for _, id := range ids {
		if slices.ContainsFunc(attrs, func(a *compute.Attribute) bool { return a.ID == id }) {
			return nil, fmt.Errorf("attribute %s chosen twice", id)
		}
		a, err := compute.Lookup(id)
		if err != nil {
			return nil, err
		}
		attrs = append(attrs, a)
	}
	resolved, err := compute.ResolveAll(attrs, params)
	if err != nil {
		return nil, err
	}
	stages := make([]stage, len(attrs))
	for k, a := range attrs {
		p := resolved[k]
		stages[k] = stage{
			id: a.ID, name: a.Name, params: strings.ReplaceAll(p.Encode(), ",", " "),
			compute: func(ctx context.Context, in, out compute.Section) error {
				return a.ComputeInto(ctx, in, out, p, nil)
			},
		}
	}
	return stages, nil
}
