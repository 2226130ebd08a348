package export

import (
	"fmt"
	"runtime"
	"strconv"
	"strings"
)

// SlurmCPUs reads the CPUs a Slurm task was granted from
// SLURM_CPUS_PER_TASK (set by sbatch and srun when the job asks for
// --cpus-per-task; Slurm's sbatch(1) manual, "OUTPUT ENVIRONMENT
// VARIABLES"). getenv is os.Getenv in the program. ok is false when the
// variable is unset or empty; a value that is not a positive integer is an
// error naming the variable and the value.
func SlurmCPUs(getenv func(string) string) (n int, ok bool, err error) {
	v := strings.TrimSpace(getenv("SLURM_CPUS_PER_TASK"))
	if v == "" {
		return 0, false, nil
	}
	n, err = strconv.Atoi(v)
	if err != nil || n < 1 {
		return 0, false, fmt.Errorf("SLURM_CPUS_PER_TASK=%q is not a positive number of CPUs", v)
	}
	return n, true, nil
}

// LimitCPUs makes the export's worker pools (every pool in compute, the
// segy decoders and the collector, all sized by runtime.GOMAXPROCS) use no
// more CPUs than the process was granted, and returns the function that
// undoes it. Go already sets GOMAXPROCS from the process's CPU affinity
// (Slurm's task/affinity binding, taskset) and its cgroup CPU quota
// (Kubernetes CPU limits), and follows later changes; LimitCPUs adds
// SLURM_CPUS_PER_TASK, which Slurm sets even where it binds no CPUs, and
// lowers GOMAXPROCS to it when it is smaller. A GOMAXPROCS set in the
// environment is the user's choice and is left alone. The returned
// function restores Go's default (affinity and quota, followed again).
func LimitCPUs(getenv func(string) string) (restore func(), err error) {
	none := func() {}
	if getenv("GOMAXPROCS") != "" {
		return none, nil
	}
	n, ok, err := SlurmCPUs(getenv)
	if err != nil || !ok || n >= runtime.GOMAXPROCS(0) {
		return none, err
	}
	runtime.GOMAXPROCS(n)
	return runtime.SetDefaultGOMAXPROCS, nil
}
