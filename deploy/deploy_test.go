// Package deploy holds no Go code: its tests check the files under
// deploy/ that run pulsewright on a cluster, since no cluster is
// reachable from the tests. The runs themselves are exercised in
// cmd/pulsewright (shard_test.go), through these same scripts.
package deploy

import (
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"
)

// manifest reads one YAML document into a generic tree.
func manifest(t *testing.T, path string) map[string]any {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := yaml.Unmarshal(data, &m); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return m
}

// at walks a path of map keys and list indices ("spec", "template", 0…)
// and fails the test, naming the path, when a step is missing.
func at(t *testing.T, file string, v any, path ...any) any {
	t.Helper()
	for i, p := range path {
		switch k := p.(type) {
		case string:
			m, ok := v.(map[string]any)
			if !ok {
				t.Fatalf("%s: %v is not a mapping", file, path[:i])
			}
			if v, ok = m[k]; !ok {
				t.Fatalf("%s: no %v", file, path[:i+1])
			}
		case int:
			l, ok := v.([]any)
			if !ok || k >= len(l) {
				t.Fatalf("%s: no %v", file, path[:i+1])
			}
			v = l[k]
		}
	}
	return v
}

// TestKubernetesManifests parses every manifest and checks what the
// sharded run depends on: the sweep is an Indexed Job whose completion
// index, passed as SHARD, is the K of --shard K/N with N (SHARDS) equal
// to spec.completions; it writes under the mounted volume, which the
// merge Job reads with the same N; the image is the one the Dockerfile
// builds, run as its nonroot user with /pulsewright as the command
// (the image's entry point serves the page).
func TestKubernetesManifests(t *testing.T) {
	dir := "kubernetes"
	files, _ := filepath.Glob(filepath.Join(dir, "*.yaml"))
	if len(files) < 3 {
		t.Fatalf("manifests: %v", files)
	}
	kinds := map[string]map[string]any{}
	for _, f := range files {
		m := manifest(t, f)
		for _, k := range []string{"apiVersion", "kind"} {
			if s, _ := m[k].(string); s == "" {
				t.Errorf("%s: no %s", f, k)
			}
		}
		name, _ := at(t, f, m, "metadata", "name").(string)
		kinds[m["kind"].(string)+"/"+name] = m
	}
	sweep, merge, pvc := kinds["Job/pulsewright-sweep"], kinds["Job/pulsewright-merge"], kinds["PersistentVolumeClaim/pulsewright-shards"]
	if sweep == nil || merge == nil || pvc == nil {
		t.Fatalf("want Job/pulsewright-sweep, Job/pulsewright-merge and PersistentVolumeClaim/pulsewright-shards; have %v", kinds)
	}
	const f = "sweep-job.yaml"
	if v := at(t, f, sweep, "apiVersion"); v != "batch/v1" {
		t.Errorf("%s: apiVersion %v", f, v)
	}
	if v := at(t, f, sweep, "spec", "completionMode"); v != "Indexed" {
		t.Errorf("%s: completionMode %v, want Indexed", f, v)
	}
	n, ok := at(t, f, sweep, "spec", "completions").(int)
	if !ok || n < 1 {
		t.Fatalf("%s: completions %v", f, at(t, f, sweep, "spec", "completions"))
	}
	if v := at(t, f, sweep, "spec", "template", "spec", "restartPolicy"); v != "Never" {
		t.Errorf("%s: restartPolicy %v (podFailurePolicy needs Never)", f, v)
	}
	c := at(t, f, sweep, "spec", "template", "spec", "containers", 0).(map[string]any)
	env := map[string]any{}
	for _, e := range at(t, f, c, "env").([]any) {
		em := e.(map[string]any)
		env[em["name"].(string)] = em
	}
	if p := at(t, f, env["SHARD"], "valueFrom", "fieldRef", "fieldPath"); p != "metadata.annotations['batch.kubernetes.io/job-completion-index']" {
		t.Errorf("%s: SHARD from %v, want the completion index", f, p)
	}
	if v := at(t, f, env["SHARDS"], "value"); v != strconv.Itoa(n) {
		t.Errorf("%s: SHARDS %v but completions %d: they must be equal", f, v, n)
	}
	args := strs(t, f, at(t, f, c, "args"))
	if args[0] != "sweep" || !hasPair(args, "--shard", "$(SHARD)/$(SHARDS)") {
		t.Errorf("%s: args %q; want sweep … --shard $(SHARD)/$(SHARDS)", f, args)
	}
	outArg := after(args, "--out")
	mounts := map[string]string{}
	for _, vm := range at(t, f, c, "volumeMounts").([]any) {
		m := vm.(map[string]any)
		mounts[m["name"].(string)] = m["mountPath"].(string)
	}
	if !strings.HasPrefix(outArg, mounts["out"]+"/") || !strings.Contains(outArg, "$(SHARD)") {
		t.Errorf("%s: --out %q is not a per-shard file under the volume mounted at %q", f, outArg, mounts["out"])
	}
	scen := args[1]
	if !strings.HasPrefix(scen, mounts["scenario"]+"/") {
		t.Errorf("%s: scenario %q is not under the mounted ConfigMap %q", f, scen, mounts["scenario"])
	}
	for _, r := range at(t, f, sweep, "spec", "podFailurePolicy", "rules").([]any) {
		checkKnown(t, f, "PodFailurePolicyRule", r)
	}
	for name, m := range map[string]map[string]any{"sweep-job.yaml": sweep, "merge-job.yaml": merge} {
		checkKnown(t, name, "JobSpec", at(t, name, m, "spec"))
		spec := at(t, name, m, "spec", "template", "spec").(map[string]any)
		checkKnown(t, name, "PodSpec", spec)
		c := at(t, name, spec, "containers", 0).(map[string]any)
		checkKnown(t, name, "Container", c)
		if cmd := strs(t, name, at(t, name, c, "command")); len(cmd) != 1 || cmd[0] != "/pulsewright" {
			t.Errorf("%s: command %q, want [/pulsewright] (the Dockerfile's binary)", name, cmd)
		}
		if img, _ := c["image"].(string); !strings.Contains(img, "pulsewright") || !strings.Contains(img, ":") || strings.HasSuffix(img, ":latest") {
			t.Errorf("%s: image %q; want the pulsewright image at a fixed tag (merge refuses shards of two builds)", name, img)
		}
		if u := at(t, name, spec, "securityContext", "runAsUser"); u != 65532 {
			t.Errorf("%s: runAsUser %v, want the image's nonroot 65532", name, u)
		}
		var claim any
		for _, v := range at(t, name, spec, "volumes").([]any) {
			if pv, ok := v.(map[string]any)["persistentVolumeClaim"]; ok {
				claim = at(t, name, pv, "claimName")
			}
		}
		if claim != "pulsewright-shards" {
			t.Errorf("%s: volume claim %v, want pulsewright-shards", name, claim)
		}
	}
	if a, b := at(t, "sweep-job.yaml", sweep, "spec", "template", "spec", "containers", 0, "image"), at(t, "merge-job.yaml", merge, "spec", "template", "spec", "containers", 0, "image"); a != b {
		t.Errorf("the sweep runs %v but the merge %v: use one image", a, b)
	}
	margs := strs(t, "merge-job.yaml", at(t, "merge-job.yaml", merge, "spec", "template", "spec", "containers", 0, "args"))
	if margs[0] != "merge" || !strings.Contains(strings.Join(margs, " "), "-of-"+strconv.Itoa(n)+".csv") {
		t.Errorf("merge-job.yaml: args %q do not read the %d shards", margs, n)
	}
	if modes := strs(t, "volume.yaml", at(t, "volume.yaml", pvc, "spec", "accessModes")); len(modes) != 1 || modes[0] != "ReadWriteMany" {
		t.Errorf("volume.yaml: access modes %q; shards on several nodes need ReadWriteMany", modes)
	}
	// The image's engine line names its commit (merge and every report
	// trace a figure to it): go build reads it from .git, which the build
	// context must therefore hold.
	if di, err := os.ReadFile("../.dockerignore"); err == nil {
		for _, l := range strings.Split(string(di), "\n") {
			if l = strings.TrimSpace(l); l == ".git" || l == ".git/" || l == "/.git" {
				t.Errorf(".dockerignore leaves out .git: the image would be stamped \"pulsewright devel\" without its commit")
			}
		}
	}
	// The Dockerfile puts the binary where the Jobs call it.
	df, err := os.ReadFile("../Dockerfile")
	if err != nil {
		t.Fatal(err)
	}
	if !regexp.MustCompile(`COPY --from=build /out/pulsewright /pulsewright`).Match(df) || !strings.Contains(string(df), "USER nonroot") {
		t.Errorf("the Dockerfile no longer installs /pulsewright run as nonroot; update the manifests")
	}
}

// known lists fields of the Kubernetes objects the manifests use
// (batch/v1 JobSpec, core/v1 PodSpec and Container, Kubernetes 1.31;
// from memory of the API reference, and not every PodSpec field), so
// that a misspelt field, which the API server would reject or drop,
// fails here. A real field missing from a list fails too: add it.
var known = map[string][]string{
	"JobSpec": {"activeDeadlineSeconds", "backoffLimit", "backoffLimitPerIndex", "completionMode", "completions", "managedBy",
		"manualSelector", "maxFailedIndexes", "parallelism", "podFailurePolicy", "podReplacementPolicy", "selector",
		"successPolicy", "suspend", "template", "ttlSecondsAfterFinished"},
	"PodSpec": {"activeDeadlineSeconds", "affinity", "automountServiceAccountToken", "containers", "dnsPolicy", "enableServiceLinks",
		"hostname", "imagePullSecrets", "initContainers", "nodeName", "nodeSelector", "priorityClassName", "restartPolicy",
		"schedulerName", "securityContext", "serviceAccountName", "subdomain", "terminationGracePeriodSeconds", "tolerations",
		"topologySpreadConstraints", "volumes"},
	"Container": {"args", "command", "env", "envFrom", "image", "imagePullPolicy", "lifecycle", "livenessProbe", "name", "ports",
		"readinessProbe", "resources", "securityContext", "startupProbe", "stdin", "terminationMessagePath",
		"terminationMessagePolicy", "tty", "volumeDevices", "volumeMounts", "workingDir"},
	"PodFailurePolicyRule": {"action", "onExitCodes", "onPodConditions"},
}

// checkKnown fails the test for any key of m that kind does not have.
func checkKnown(t *testing.T, file, kind string, m any) {
	t.Helper()
	mm, ok := m.(map[string]any)
	if !ok {
		t.Errorf("%s: %s is not a mapping", file, kind)
		return
	}
	for k := range mm {
		if !slices.Contains(known[kind], k) {
			t.Errorf("%s: %s has no field %q", file, kind, k)
		}
	}
}

func strs(t *testing.T, file string, v any) []string {
	t.Helper()
	l, ok := v.([]any)
	if !ok || len(l) == 0 {
		t.Fatalf("%s: %v is not a list of strings", file, v)
	}
	out := make([]string, len(l))
	for i, x := range l {
		s, ok := x.(string)
		if !ok {
			t.Fatalf("%s: %v is not a string (quote it)", file, x)
		}
		out[i] = s
	}
	return out
}

func hasPair(args []string, flag, val string) bool { return after(args, flag) == val }

func after(args []string, flag string) string {
	for i, a := range args[:len(args)-1] {
		if a == flag {
			return args[i+1]
		}
	}
	return ""
}

// TestScripts checks the shell scripts with bash -n, and with shellcheck
// when it is installed (Debian: apt-get install shellcheck).
func TestScripts(t *testing.T) {
	scripts, _ := filepath.Glob("*/*.sh")
	sb, _ := filepath.Glob("*/*.sbatch")
	scripts = append(scripts, sb...)
	if len(scripts) < 3 {
		t.Fatalf("scripts: %v", scripts)
	}
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("bash is not installed")
	}
	sc, scErr := exec.LookPath("shellcheck")
	for _, s := range scripts {
		if out, err := exec.Command("bash", "-n", s).CombinedOutput(); err != nil {
			t.Errorf("bash -n %s: %v\n%s", s, err, out)
		}
		if fi, err := os.Stat(s); err != nil || fi.Mode()&0o111 == 0 {
			t.Errorf("%s is not executable", s)
		}
		if scErr == nil {
			if out, err := exec.Command(sc, "-s", "bash", s).CombinedOutput(); err != nil {
				t.Errorf("shellcheck %s: %v\n%s", s, err, out)
			}
		}
	}
	if scErr != nil {
		t.Log("shellcheck is not installed; bash -n only")
	}
}
