// Package export is quadtrace's whole-volume attribute export: the job
// (Run) behind the `quadtrace export` command (app/cli) and the window's
// export dialog, and the join (Join) that puts range exports back together.
//
// # How an export runs
//
// The input is opened read-only and read with ordinary reads (not mapped,
// so resident memory does not grow with the volume). Three stages run at
// once: a reader fills blocks of consecutive traces, the attributes are
// computed on each block (every core inside compute), and a writer hands the
// results in trace order to one segy writer per attribute. Block size comes
// from the memory budget (see blockSize), so memory is bounded whatever the
// volume's size; attributes are per trace, so blocks are independent and
// the output equals the attribute computed on the whole volume at once.
//
// Each output is a temporary file beside its destination, renamed into
// place when complete: a cancelled, failed, interrupted or killed export
// never leaves a partial file under the destination's name.
//
// # Splitting a survey across machines
//
// `--inlines A:B` (or `--crosslines A:B`) exports one range as a complete
// SEG-Y file whose textual header records the source and the range; `join`
// concatenates the parts in the order given, after checking that they share
// sampling and format and that no trace is repeated or missing. Any cluster
// scheduler that runs an indexed array of tasks will do; for example a Slurm
// job array of ten tasks of 50 inlines each over inlines 1000-1499:
//
//	#!/bin/bash
//	#SBATCH --array=0-9 --cpus-per-task=8 --mem=1G
//	first=$((1000 + 50 * SLURM_ARRAY_TASK_ID)); last=$((first + 49))
//	quadtrace export survey.sgy --attribute envelope --inlines $first:$last \
//	    --budget 512M --quiet --out parts/part-$(printf %03d $SLURM_ARRAY_TASK_ID).sgy
//
// then, when all tasks have finished (sbatch --dependency=afterok:JOBID):
//
//	quadtrace join parts/part-*.sgy --out survey-envelope.sgy
//
// A Kubernetes Job with completionMode: Indexed and completions: 10 does the
// same with $JOB_COMPLETION_INDEX in place of $SLURM_ARRAY_TASK_ID. The
// zero-padded part names keep the shell's sorted glob in inline order.
package export
