//go:build linux

package export

import (
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"

	"quadtrace/app/apptest"
)

// manifestPath is the Kubernetes manifest the README names.
const manifestPath = "testdata/cluster/quadtrace-export-job.yaml"

// k8sObject is the part of a Kubernetes object the checks read (field names
// from the Kubernetes API reference: PersistentVolumeClaim v1, Job
// batch/v1, PodSpec v1).
type k8sObject struct {
	APIVersion string `yaml:"apiVersion"`
	Kind       string `yaml:"kind"`
	Metadata   struct {
		Name   string            `yaml:"name"`
		Labels map[string]string `yaml:"labels"`
	} `yaml:"metadata"`
	Spec struct {
		AccessModes          []string  `yaml:"accessModes"`
		Resources            resources `yaml:"resources"`
		CompletionMode       string    `yaml:"completionMode"`
		Completions          int       `yaml:"completions"`
		Parallelism          int       `yaml:"parallelism"`
		BackoffLimit         *int      `yaml:"backoffLimit"`
		BackoffLimitPerIndex *int      `yaml:"backoffLimitPerIndex"`
		Template             struct {
			Metadata struct {
				Labels map[string]string `yaml:"labels"`
			} `yaml:"metadata"`
			Spec struct {
				RestartPolicy string `yaml:"restartPolicy"`
				Containers    []struct {
					Name         string    `yaml:"name"`
					Image        string    `yaml:"image"`
					WorkingDir   string    `yaml:"workingDir"`
					Command      []string  `yaml:"command"`
					Args         []string  `yaml:"args"`
					Resources    resources `yaml:"resources"`
					VolumeMounts []struct {
						Name      string `yaml:"name"`
						MountPath string `yaml:"mountPath"`
					} `yaml:"volumeMounts"`
				} `yaml:"containers"`
				Volumes []struct {
					Name                  string `yaml:"name"`
					PersistentVolumeClaim struct {
						ClaimName string `yaml:"claimName"`
					} `yaml:"persistentVolumeClaim"`
				} `yaml:"volumes"`
			} `yaml:"spec"`
		} `yaml:"template"`
	} `yaml:"spec"`
}

// resources are requests and limits (quantities as written).
type resources struct {
	Requests map[string]string `yaml:"requests"`
	Limits   map[string]string `yaml:"limits"`
}

// readManifest parses every document of the manifest; a field the
// structures above do not know (a typo, a misplaced key) is an error.
func readManifest(t *testing.T) map[string]k8sObject {
	t.Helper()
	path := filepath.Join(apptest.ProjectRoot(t), manifestPath)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	objs := map[string]k8sObject{}
	dec := yaml.NewDecoder(f)
	dec.KnownFields(true)
	for {
		var o k8sObject
		if err := dec.Decode(&o); err != nil {
			if err.Error() == "EOF" {
				break
			}
			t.Fatalf("%s: %v", path, err)
		}
		objs[o.Kind+"/"+o.Metadata.Name] = o
	}
	return objs
}

// shellPart returns the shell script a Job's one container runs with
// /bin/sh -c, after checking the Job's pod: restartPolicy Never, an image,
// the claim mounted at the working folder.
func shellPart(t *testing.T, job k8sObject, claim string) string {
	t.Helper()
	pod := job.Spec.Template.Spec
	if pod.RestartPolicy != "Never" || len(pod.Containers) != 1 || len(pod.Volumes) != 1 {
		t.Fatalf("%s: want restartPolicy Never, one container, one volume: %+v", job.Metadata.Name, pod)
	}
	c := pod.Containers[0]
	if c.Image == "" || strings.Join(c.Command, " ") != "/bin/sh -c" || len(c.Args) != 1 {
		t.Fatalf("%s: want an image and /bin/sh -c SCRIPT: %+v", job.Metadata.Name, c)
	}
	v := pod.Volumes[0]
	if v.PersistentVolumeClaim.ClaimName != claim || len(c.VolumeMounts) != 1 ||
		c.VolumeMounts[0].Name != v.Name || c.VolumeMounts[0].MountPath != c.WorkingDir {
		t.Fatalf("%s: want claim %s mounted at the working folder: %+v %+v", job.Metadata.Name, claim, v, c)
	}
	return c.Args[0]
}

// recordingQuadtrace puts on PATH a `quadtrace` that appends its arguments,
// one call a line, to the file it returns.
func recordingQuadtrace(t *testing.T) (env []string, log string) {
	t.Helper()
	bin := t.TempDir()
	log = filepath.Join(bin, "calls")
	stub := "#!/bin/sh\necho \"$*\" >>" + log + "\n"
	if err := os.WriteFile(filepath.Join(bin, "quadtrace"), []byte(stub), 0o755); err != nil {
		t.Fatal(err)
	}
	return append(os.Environ(), "PATH="+bin+":"+os.Getenv("PATH")), log
}

// readmeScript returns the Slurm job-array script of the README.
func readmeScript(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(apptest.ProjectRoot(t), "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	i := strings.Index(s, "```\n#!/bin/bash\n#SBATCH")
	if i < 0 {
		t.Fatal("README.md: no Slurm job-array script")
	}
	s = s[i+4:]
	return s[:strings.Index(s, "```")]
}

// Checks: the manifest the README names holds a claim for the survey and
// the parts, an Indexed Job of ten completions and the join as a second
// Job, both over that claim (Kubernetes API reference: Job batch/v1
// completionMode Indexed sets JOB_COMPLETION_INDEX in each pod). Its
// shell parts, run with JOB_COMPLETION_INDEX 0..9 against a recording
// quadtrace, call export with the same arguments as the README's Slurm
// script with SLURM_ARRAY_TASK_ID 0..9 (so ten parts of 50 inlines over
// 1000-1499, names part-000..part-009), and the join joins parts/part-*.sgy.
// (.ci/cluster-check runs the same shell parts with the real program and
// compares the joined volume with one whole export.)
func TestKubernetesManifest(t *testing.T) {
	objs := readManifest(t)
	claim, ok := objs["PersistentVolumeClaim/quadtrace-data"]
	if !ok || claim.APIVersion != "v1" || len(claim.Spec.AccessModes) == 0 {
		t.Fatalf("no PersistentVolumeClaim quadtrace-data: %v", objs)
	}
	exp, ok := objs["Job/quadtrace-export"]
	if !ok || exp.APIVersion != "batch/v1" || exp.Spec.CompletionMode != "Indexed" || exp.Spec.Completions != 10 {
		t.Fatalf("want Job quadtrace-export (batch/v1, Indexed, 10 completions): %+v", exp)
	}
	join, ok := objs["Job/quadtrace-join"]
	if !ok || join.APIVersion != "batch/v1" {
		t.Fatalf("want Job quadtrace-join: %v", objs)
	}
	for name, o := range objs {
		if o.Metadata.Labels["step"] == "" {
			t.Errorf("%s has no step label (the README applies by step)", name)
		}
	}
	expScript := shellPart(t, exp, "quadtrace-data")
	joinScript := shellPart(t, join, "quadtrace-data")

	run := func(script string, env ...string) string {
		t.Helper()
		stubEnv, log := recordingQuadtrace(t)
		cmd := exec.Command("/bin/sh", "-c", script)
		cmd.Env = append(stubEnv, env...)
		cmd.Dir = t.TempDir()
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("%v: %s", err, out)
		}
		b, err := os.ReadFile(log)
		if err != nil {
			t.Fatal(err)
		}
		return strings.TrimSpace(string(b))
	}
	slurm := readmeScript(t)
	for i := 0; i < exp.Spec.Completions; i++ {
		k8s := run(expScript, "JOB_COMPLETION_INDEX="+strconv.Itoa(i))
		want := run(slurm, "SLURM_ARRAY_TASK_ID="+strconv.Itoa(i))
		if k8s != want {
			t.Errorf("index %d: the manifest runs\n  quadtrace %s\nthe README's Slurm script\n  quadtrace %s", i, k8s, want)
		}
		first := 1000 + 50*i
		if !strings.Contains(k8s, "--inlines "+strconv.Itoa(first)+":"+strconv.Itoa(first+49)+" ") ||
			!strings.HasSuffix(k8s, "--out parts/part-00"+strconv.Itoa(i)+".sgy") {
			t.Errorf("index %d: quadtrace %s", i, k8s)
		}
	}
	if got := run(joinScript); got != "join parts/part-*.sgy --out survey-envelope.sgy" {
		t.Errorf("the join Job runs quadtrace %s", got)
	}
}
