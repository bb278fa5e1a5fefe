package k8stest

import (
	"errors"
	"fmt"
	"os"
	"path"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/flight"
	batchv1 "k8s.io/api/batch/v1"
	corev1 "k8s.io/api/core/v1"
	"k8s.io/apimachinery/pkg/util/validation"
	kjson "sigs.k8s.io/json"
	"sigs.k8s.io/yaml"
)

const (
	manifestPath = "../../samples/k8s-indexed-job.yaml"
	planPath     = "../../samples/plan.toml"
)

// decodeJob decodes a manifest strictly into the batch/v1 Job type, the way
// the API server does for `kubectl apply --validate=strict`: YAML to JSON
// with duplicate keys refused (sigs.k8s.io/yaml), then JSON decoding that
// matches field names case-sensitively and refuses unknown and duplicate
// fields (sigs.k8s.io/json, the decoder of k8s.io/apimachinery's strict
// serializer).
func decodeJob(src []byte) (*batchv1.Job, error) {
	js, err := yaml.YAMLToJSONStrict(src)
	if err != nil {
		return nil, err
	}
	var job batchv1.Job
	strict, err := kjson.UnmarshalStrict(js, &job)
	if err != nil {
		return nil, err
	}
	if err := errors.Join(strict...); err != nil {
		return nil, err
	}
	return &job, nil
}

func readManifest(t *testing.T) []byte {
	t.Helper()
	src, err := os.ReadFile(manifestPath)
	if err != nil {
		t.Fatal(err)
	}
	return src
}

// TestStrictDecodingCatchesMistakes shows the decoding can fail: each
// mutation of the sample is a mistake the Job API refuses (an unknown or
// misspelt field, a string where a number goes, a bad quantity).
func TestStrictDecodingCatchesMistakes(t *testing.T) {
	src := string(readManifest(t))
	for _, c := range []struct{ name, old, new string }{
		{"misspelt field", "completionMode: Indexed", "completionmode: Indexed"},
		{"unknown field", "backoffLimit: 4", "backoffLimit: 4\n  retries: 4"},
		{"string for an integer", "completions: 8", `completions: "8"`},
		{"bad quantity", "memory: 1Gi", "memory: 1 GiB"},
		{"duplicate key", "parallelism: 4", "parallelism: 4\n  parallelism: 2"},
	} {
		bad := strings.Replace(src, c.old, c.new, 1)
		if bad == src {
			t.Fatalf("%s: %q not in the sample", c.name, c.old)
		}
		if _, err := decodeJob([]byte(bad)); err == nil {
			t.Errorf("%s (%q → %q): decoded without error", c.name, c.old, c.new)
		}
	}
}

// TestIndexedJobSample checks samples/k8s-indexed-job.yaml against the
// batch/v1 Job API and against skyframe's sharding. The API rules are from
// the field documentation in k8s.io/api batch/v1 (types.go): Indexed
// completion needs spec.completions; a Job's pod template restarts Never or
// OnFailure; object names are DNS-1123 subdomains, container and volume
// names DNS-1123 labels (k8s.io/apimachinery's validators). Kubernetes sets
// JOB_COMPLETION_INDEX = 0..completions−1 in the pods of an Indexed Job
// (Kubernetes documentation, "Jobs", completion mode; from memory).
func TestIndexedJobSample(t *testing.T) {
	for _, msg := range checkJob(readManifest(t), readPlan(t)) {
		t.Error(msg)
	}
}

// TestCheckJobCatchesMistakes shows checkJob can fail: each mutation of
// the sample decodes as a Job but breaks the API's rules or the contract
// with skyframe's sharding.
func TestCheckJobCatchesMistakes(t *testing.T) {
	src, plan := string(readManifest(t)), readPlan(t)
	for _, c := range []struct{ name, old, new string }{
		{"shard count differs from completions", `value: "8"`, `value: "4"`},
		{"not indexed", "completionMode: Indexed", "completionMode: NonIndexed"},
		{"restart policy", "restartPolicy: Never", "restartPolicy: Always"},
		{"no resume", `"--resume"]`, "]"},
		{"one shard for all", `"--resume"]`, `"--resume", "--shard", "0/8"]`},
		{"parallelism over completions", "parallelism: 4", "parallelism: 9"},
		{"bad container name", "- name: skyframe", "- name: Skyframe_1"},
		{"output on the plan's read-only volume", `"--out", "/frames/out"`, `"--out", "/plan/out"`},
		{"config map named otherwise", "name: skyframe-plan", "name: skyframe-plans"},
	} {
		bad := strings.Replace(src, c.old, c.new, 1)
		if bad == src {
			t.Fatalf("%s: %q not in the sample", c.name, c.old)
		}
		if msgs := checkJob([]byte(bad), plan); len(msgs) == 0 {
			t.Errorf("%s (%q → %q): no problem found", c.name, c.old, c.new)
		} else {
			t.Logf("%s: %s", c.name, msgs[0])
		}
	}
}

func readPlan(t *testing.T) []byte {
	t.Helper()
	text, err := os.ReadFile(planPath)
	if err != nil {
		t.Fatal(err)
	}
	return text
}

// checkJob returns the problems of manifest src as a sample for rendering
// planText: the API rules and the sharding contract described at
// TestIndexedJobSample.
func checkJob(src, planText []byte) (problems []string) {
	errorf := func(format string, args ...any) {
		problems = append(problems, fmt.Sprintf(format, args...))
	}
	job, err := decodeJob(src)
	if err != nil {
		errorf("%s: not a batch/v1 Job: %v", manifestPath, err)
		return
	}
	if job.APIVersion != "batch/v1" || job.Kind != "Job" {
		errorf("apiVersion %q kind %q, want batch/v1 Job", job.APIVersion, job.Kind)
	}
	for _, msg := range validation.IsDNS1123Subdomain(job.Name) {
		errorf("metadata.name %q: %s", job.Name, msg)
	}

	spec := job.Spec
	if mode := spec.CompletionMode; mode == nil {
		errorf("spec.completionMode unset (NonIndexed), want Indexed")
	} else if *mode != batchv1.IndexedCompletion {
		errorf("spec.completionMode %s, want Indexed", *mode)
	}
	if spec.Completions == nil || *spec.Completions < 1 {
		errorf("spec.completions must be set (≥ 1) for an Indexed Job")
		return
	}
	n := int(*spec.Completions)
	if p := spec.Parallelism; p != nil && (*p < 1 || *p > *spec.Completions) {
		errorf("spec.parallelism %d: want 1..completions (%d); more pods than indices would idle", *p, n)
	}
	pod := spec.Template.Spec
	if pod.RestartPolicy != corev1.RestartPolicyNever && pod.RestartPolicy != corev1.RestartPolicyOnFailure {
		errorf("template restartPolicy %q: a Job allows Never or OnFailure", pod.RestartPolicy)
	}
	if len(pod.Containers) != 1 {
		errorf("%d containers, want the one running skyframe", len(pod.Containers))
		return
	}
	ctr := pod.Containers[0]
	for _, msg := range validation.IsDNS1123Label(ctr.Name) {
		errorf("container name %q: %s", ctr.Name, msg)
	}
	for _, v := range pod.Volumes {
		for _, msg := range validation.IsDNS1123Label(v.Name) {
			errorf("volume name %q: %s", v.Name, msg)
		}
	}
	if ctr.Resources.Requests.Memory().IsZero() || ctr.Resources.Requests.Cpu().IsZero() {
		errorf("container requests %v: want cpu and memory", ctr.Resources.Requests)
	}

	// The command: skyframe flight PLAN --out DIR --resume, and no fixed
	// shard (each pod finds its own from the environment).
	argv := append(slices.Clone(ctr.Command), ctr.Args...)
	if len(argv) < 3 || argv[0] != "skyframe" || argv[1] != "flight" {
		errorf("command %q: want skyframe flight PLAN ...", argv)
		return
	}
	plan := argv[2]
	opt := func(name string) (string, bool) {
		for i, a := range argv {
			if a == name && i+1 < len(argv) {
				return argv[i+1], true
			}
			if v, ok := strings.CutPrefix(a, name+"="); ok {
				return v, true
			}
		}
		return "", false
	}
	if !slices.Contains(argv, "--resume") {
		errorf("command %q: a retried pod needs --resume to keep its finished frames", argv)
	}
	if sh, ok := opt("--shard"); ok && sh != "auto" {
		errorf("command %q: --shard %s fixes one shard for every pod", argv, sh)
	}
	out, ok := opt("--out")
	if !ok {
		errorf("command %q: no --out (the shared volume)", argv)
	}

	// The plan comes from the config map that the manifest's comment
	// creates, under the key the command names; the output is on a
	// writable volume shared by all pods.
	mounts := map[string]corev1.VolumeMount{}
	for _, m := range ctr.VolumeMounts {
		mounts[m.Name] = m
	}
	mountOf := func(p string) (corev1.Volume, corev1.VolumeMount, bool) {
		for _, v := range pod.Volumes {
			m, ok := mounts[v.Name]
			if ok && strings.HasPrefix(p, strings.TrimSuffix(m.MountPath, "/")+"/") {
				return v, m, true
			}
		}
		return corev1.Volume{}, corev1.VolumeMount{}, false
	}
	if v, m, ok := mountOf(plan); !ok || v.ConfigMap == nil {
		errorf("plan %s is not in a mounted config map", plan)
	} else {
		key := strings.TrimPrefix(plan, strings.TrimSuffix(m.MountPath, "/")+"/")
		for _, msg := range validation.IsConfigMapKey(key) {
			errorf("config map key %q: %s", key, msg)
		}
		create := regexp.MustCompile(`kubectl create configmap (\S+) --from-file=(\S+)=samples/plan\.toml`).FindSubmatch(src)
		if create == nil {
			errorf("the manifest's comment does not say how to create the config map")
		} else if string(create[1]) != v.ConfigMap.Name || string(create[2]) != key {
			errorf("comment creates config map %s with key %s; the pod reads %s key %s",
				create[1], create[2], v.ConfigMap.Name, key)
		}
	}
	if v, m, ok := mountOf(path.Clean(out) + "/x"); !ok || m.ReadOnly || v.PersistentVolumeClaim == nil {
		errorf("--out %s is not on a writable persistent volume claim", out)
	}

	// Each pod's shard, as skyframe takes it: the container's environment
	// plus the JOB_COMPLETION_INDEX Kubernetes adds.
	env := map[string]string{}
	for _, e := range ctr.Env {
		for _, msg := range validation.IsEnvVarName(e.Name) {
			errorf("env %q: %s", e.Name, msg)
		}
		if e.ValueFrom != nil {
			errorf("env %s: from %v; the test expects literal values", e.Name, e.ValueFrom)
		}
		env[e.Name] = e.Value
	}
	if env[flight.EnvShards] != strconv.Itoa(n) {
		errorf("env %s = %q, want spec.completions = %d", flight.EnvShards, env[flight.EnvShards], n)
		return
	}
	if _, set := env[flight.EnvShard]; set {
		errorf("env %s fixes one shard for every pod", flight.EnvShard)
	}
	p, err := flight.ParsePlan(planText, planPath)
	if err != nil {
		errorf("%v", err)
		return
	}
	total := p.Frames()
	shardFlag, _ := opt("--shard")
	var frames []int
	for k := range n {
		getenv := func(key string) string {
			if key == "JOB_COMPLETION_INDEX" {
				return strconv.Itoa(k)
			}
			return env[key]
		}
		sh, why, err := flight.SelectShard(shardFlag, getenv)
		if err != nil {
			errorf("pod %d: %v", k, err)
			return
		}
		if sh != (flight.Shard{K: k, N: n}) {
			errorf("pod %d takes shard %v (%s), want %d/%d", k, sh, why, k, n)
		}
		block := sh.Frames(total, flight.All)
		if len(block) < total/n || len(block) > total/n+1 {
			errorf("pod %d: %d frames of %d, want %d or %d", k, len(block), total, total/n, total/n+1)
		}
		frames = append(frames, block...)
	}
	// The blocks in index order are exactly the plan's frames.
	if len(frames) != total {
		errorf("the pods render %d frames, the plan has %d", len(frames), total)
	}
	for i, f := range frames {
		if f != i {
			errorf("frame %d rendered as the %d-th: the pods' blocks do not partition the plan", f, i)
			break
		}
	}
	return problems
}
