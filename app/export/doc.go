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
// scheduler that runs an indexed array of tasks will do. The README
// ("Large surveys on a cluster") holds the recipe for a Slurm job array
// (submitted with sbatch --parsable, the join with
// --dependency=afterok:$JOBID) and names the Kubernetes manifest
// (testdata/cluster/quadtrace-export-job.yaml: an Indexed Job and the join
// as a second Job); .ci/cluster-check runs both as written and compares the
// join with one whole export, byte for byte. The zero-padded part names keep
// the shell's sorted glob in inline order. Output folders are made by the
// export; a task that fails leaves nothing under its part's name, and join
// names the inlines that no part holds. The export command uses only the
// CPUs it was granted (LimitCPUs: SLURM_CPUS_PER_TASK, and the affinity and
// CPU quota Go follows).
package export
