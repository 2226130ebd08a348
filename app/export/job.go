package export

import (
	"context"
	"fmt"
	"slices"
	"strings"

	"quadtrace/compute"
	"quadtrace/segy"
)

// Job is one whole-volume attribute export.
type Job struct {
	Input       string       // the SEG-Y volume; opened read-only, never written
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
		budget: job.BudgetBytes, followLinks: job.FollowLinks,
	}, progress)
}

// resolveStages looks the attribute ids up and resolves the parameters of
// each: every parameter goes to the attributes that have it.
func resolveStages(ids []string, params map[string]string) ([]stage, error) {
	if len(ids) == 0 {
		return nil, fmt.Errorf("export: no attribute chosen")
	}
	used := map[string]bool{}
	stages := make([]stage, 0, len(ids))
	seen := map[string]bool{}
	for _, id := range ids {
		if seen[id] {
			return nil, fmt.Errorf("export: attribute %s chosen twice", id)
		}
		seen[id] = true
		a, err := compute.Lookup(id)
		if err != nil {
			return nil, fmt.Errorf("export: %w", err)
		}
		mine := map[string]string{}
		for _, spec := range a.Params {
			if v, ok := params[spec.Name]; ok {
				mine[spec.Name] = v
				used[spec.Name] = true
			}
		}
		p, err := a.Resolve(mine)
		if err != nil {
			return nil, fmt.Errorf("export: %w", err)
		}
		stages = append(stages, stage{
			id: a.ID, name: a.Name, params: strings.ReplaceAll(p.Encode(), ",", " "),
			compute: func(ctx context.Context, in compute.Section) (compute.Section, error) {
				return a.Compute(ctx, in, p, nil)
			},
		})
	}
	var unknown []string
	for name := range params {
		if !used[name] {
			unknown = append(unknown, name)
		}
	}
	if len(unknown) > 0 {
		slices.Sort(unknown)
		return nil, fmt.Errorf("export: parameter %s: none of the chosen attributes (%s) has it", strings.Join(unknown, ", "), strings.Join(ids, ", "))
	}
	return stages, nil
}
