package slurmtest

import (
	"bytes"
	"crypto/rand"
	"errors"
	"fmt"
	"io/fs"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/skyframe/skyframe/internal/extools"
)

// shortPlan is the flight the array job renders: the sample's voyage (the
// same start, leg and destination as samples/plan.toml) shown in 20 frames
// of 192×108 without motion blur (sub-frames would multiply the cost), so
// each of the eight tasks renders two or three frames in a fraction of a
// second.
const shortPlan = `title = "Hesper Wren to Marrowby, short"

[catalogue]
path = "builtin"

[start]
position = [4.32735407e-06, 1.92213901e-06, -1.04106624e-06]

[[leg]]
kind = "voyage"
accel_g = 1.4
to_star = "Marrowby"
speed_cap = 0.97

[show]
fps = 4
seconds = 3
spacing = "ship"
hold_start = 1
hold_end = 1

[camera]
projection = "pinhole"
width = 192
height = 108
fov = 75
exposure = 0.5
shutter = 0
tone = "shoulder"

[[camera.look]]
at = 0
look = "ahead"

[[camera.look]]
at = 2
look = "Ambrel"

[output]
dir = "out"
frames = "frames/{frame:05}.png"
png = true
fits = false
sidecar = true
`

const planFrames = 20 // fps × (hold_start + seconds + hold_end)

// unavailable skips t with a message, or fails it under CI, where .ci/run
// installs and starts everything this test needs.
func unavailable(t *testing.T, format string, args ...any) {
	t.Helper()
	msg := fmt.Sprintf(format, args...)
	if os.Getenv("CI") == "true" {
		t.Fatalf("%s; under CI this test must run (.ci/run installs munge, slurmctld, slurmd, slurm-client)", msg)
	}
	t.Skipf("%s; skipping the Slurm integration test", msg)
}

// TestSlurmArraySample submits samples/slurm-array.sh, unchanged, to a
// single-node Slurm started for the test, for a short plan; it checks that
// every array task took its own shard (from Slurm's SLURM_ARRAY_TASK_ID and
// SLURM_ARRAY_TASK_COUNT, as the script promises), that the frames are
// byte-identical to a one-process run of the same plan, and that
// `skyframe flight --verify` passes on the result (and fails once a frame
// is removed, so the check can fail).
func TestSlurmArraySample(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a Slurm cluster (about ten seconds); run without -short")
	}
	if os.Geteuid() != 0 {
		unavailable(t, "not root (slurmd must run as root to launch jobs)")
	}
	progs := map[string]string{}
	for name, pkg := range map[string]string{
		"munged": "munge", "munge": "munge",
		"slurmctld": "slurmctld", "slurmd": "slurmd",
		"sbatch": "slurm-client", "sinfo": "slurm-client", "scontrol": "slurm-client",
		"scancel": "slurm-client",
	} {
		progs[name] = command(t, name, pkg)
	}

	root, err := filepath.Abs("../..")
	if err != nil {
		t.Fatal(err)
	}
	script := filepath.Join(root, "samples", "slurm-array.sh")
	src, err := os.ReadFile(script)
	if err != nil {
		t.Fatal(err)
	}
	shards := arraySize(t, src)

	// munged refuses a socket in a directory others cannot enter, and
	// t.TempDir's parent is private, so the cluster gets a directory of its
	// own.
	dir, err := os.MkdirTemp("", "skyframe-slurm-")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(dir) })
	for _, d := range []string{"bin", "etc", "key", "run", "log", "state", "spool", "work/samples"} {
		if err := os.MkdirAll(filepath.Join(dir, d), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Chmod(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(filepath.Join(dir, "key"), 0o700); err != nil {
		t.Fatal(err)
	}

	tb := time.Now()
	bin := filepath.Join(dir, "bin", "skyframe")
	build := exec.Command(goTool(), "build", "-o", bin, "./cmd/skyframe")
	build.Dir = root
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("go build ./cmd/skyframe: %v\n%s", err, out)
	}

	t.Logf("built in %v", time.Since(tb).Round(time.Millisecond))
	t1 := time.Now()
	c := startCluster(t, dir, progs)
	t.Logf("cluster up in %v", time.Since(t1).Round(time.Millisecond))

	work := filepath.Join(dir, "work")
	if err := os.WriteFile(filepath.Join(work, "samples", "plan.toml"), []byte(shortPlan), 0o644); err != nil {
		t.Fatal(err)
	}
	env := c.env(filepath.Dir(bin))

	// The sample as it is: its #SBATCH lines give the array, CPUs, memory
	// and log names.
	sb := exec.Command(progs["sbatch"], "--parsable", script)
	sb.Dir = work
	sb.Env = env
	t0 := time.Now()
	out, err := sb.CombinedOutput()
	if err != nil {
		c.dumpLogs(t)
		t.Fatalf("sbatch %s: %v\n%s", script, err, out)
	}
	jobID, _, _ := strings.Cut(strings.TrimSpace(string(out)), ";")
	states := c.waitJob(t, jobID, 3*time.Minute)
	t.Logf("array job %s (%d tasks) finished in %v", jobID, shards, time.Since(t0).Round(time.Millisecond))
	if len(states) != shards {
		t.Errorf("scontrol shows %d tasks of job %s, want %d: %v", len(states), jobID, shards, states)
	}
	for task, st := range states {
		if st != "COMPLETED ExitCode=0:0" {
			t.Errorf("task %s: %s", task, st)
		}
	}
	if t.Failed() {
		c.dumpLogs(t)
		dumpTaskLogs(t, work)
		t.FailNow()
	}

	// Every task says which shard it took and why (flight.SelectShard).
	for k := 0; k < shards; k++ {
		log := filepath.Join(work, fmt.Sprintf("skyframe-%s_%d.log", jobID, k))
		b, err := os.ReadFile(log)
		if err != nil {
			dumpTaskLogs(t, work)
			t.Fatalf("task %d left no log: %v", k, err)
		}
		want := fmt.Sprintf("shard %d/%d: SLURM_ARRAY_TASK_ID", k, shards)
		if !bytes.Contains(b, []byte(want)) {
			t.Errorf("task %d log does not say %q:\n%s", k, want, b)
		}
	}

	// The same plan in one process, with no scheduler variables.
	one := exec.Command(bin, "flight", "samples/plan.toml", "--out", "one")
	one.Dir = work
	one.Env = plainEnv()
	if b, err := one.CombinedOutput(); err != nil {
		t.Fatalf("one-process run: %v\n%s", err, b)
	}
	sharded := filepath.Join(work, "samples", "out")
	if n := compareTrees(t, sharded, filepath.Join(work, "one")); n != 2*planFrames {
		t.Errorf("compared %d files, want %d (PNG and sidecar of %d frames)", n, 2*planFrames, planFrames)
	}

	verify := func() (int, string) {
		cmd := exec.Command(bin, "flight", "samples/plan.toml", "--verify")
		cmd.Dir = work
		cmd.Env = plainEnv()
		b, err := cmd.CombinedOutput()
		var ee *exec.ExitError
		if errors.As(err, &ee) {
			return ee.ExitCode(), string(b)
		}
		if err != nil {
			t.Fatal(err)
		}
		return 0, string(b)
	}
	if code, msg := verify(); code != 0 {
		t.Errorf("flight --verify on the array job's frames: exit %d\n%s", code, msg)
	}
	if err := os.Remove(filepath.Join(sharded, "frames", "00007.png")); err != nil {
		t.Fatal(err)
	}
	if code, msg := verify(); code != 1 || !strings.Contains(msg, "7") {
		t.Errorf("flight --verify with frame 7's PNG removed: exit %d, want 1 naming frame 7\n%s", code, msg)
	}
}

// arraySize reads N from the script's "#SBATCH --array=0-(N-1)".
func arraySize(t *testing.T, script []byte) int {
	t.Helper()
	m := regexp.MustCompile(`(?m)^#SBATCH --array=0-(\d+)\s*$`).FindSubmatch(script)
	if m == nil {
		t.Fatal("samples/slurm-array.sh: no #SBATCH --array=0-N line")
	}
	n, _ := strconv.Atoi(string(m[1]))
	return n + 1
}

// cluster is a running munged, slurmctld and slurmd.
type cluster struct {
	dir, conf string
	progs     map[string]string // program paths by name
}

// startCluster writes a slurm.conf for one node on 127.0.0.1 and starts the
// three daemons in the foreground as children of the test; t.Cleanup stops
// them. The node is declared with 16 CPUs (config_overrides) so that the
// eight two-CPU tasks of the sample run at once, sharing one output
// directory as they would on a cluster.
func startCluster(t *testing.T, dir string, progs map[string]string) *cluster {
	t.Helper()
	c := &cluster{dir: dir, conf: filepath.Join(dir, "etc", "slurm.conf"), progs: progs}
	key := make([]byte, 1024)
	rand.Read(key)
	if err := os.WriteFile(filepath.Join(dir, "key", "munge.key"), key, 0o400); err != nil {
		t.Fatal(err)
	}
	sock := filepath.Join(dir, "run", "munge.socket")
	c.start(t, "munged", progs["munged"], "--foreground", "--force",
		"--key-file="+filepath.Join(dir, "key", "munge.key"),
		"--socket="+sock,
		"--pid-file="+filepath.Join(dir, "run", "munged.pid"),
		"--log-file="+filepath.Join(dir, "log", "munged.log"),
		"--seed-file="+filepath.Join(dir, "key", "munged.seed"))
	c.waitFor(t, "munged's socket", 15*time.Second, func() bool {
		return exec.Command(progs["munge"], "-n", "-S", sock).Run() == nil
	})

	host, err := os.Hostname()
	if err != nil {
		t.Fatal(err)
	}
	host, _, _ = strings.Cut(host, ".")
	ports := freePorts(t, 2)
	conf := fmt.Sprintf(`# single-node Slurm for skyframe's integration test
ClusterName=skyframetest
SlurmctldHost=%[1]s(127.0.0.1)
SlurmUser=root
SlurmdUser=root
SlurmctldPort=%[2]d
SlurmdPort=%[3]d
AuthType=auth/munge
AuthInfo=socket=%[4]s
CredType=cred/munge
StateSaveLocation=%[5]s/state
SlurmdSpoolDir=%[5]s/spool
SlurmctldPidFile=%[5]s/run/slurmctld.pid
SlurmdPidFile=%[5]s/run/slurmd.pid
SlurmctldLogFile=%[5]s/log/slurmctld.log
SlurmdLogFile=%[5]s/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
MpiDefault=none
SchedulerType=sched/builtin
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
SlurmdParameters=config_overrides
ReturnToService=2
MailProg=/bin/true
NodeName=skyframe0 NodeAddr=127.0.0.1 CPUs=16 RealMemory=16384 State=UNKNOWN
PartitionName=test Nodes=skyframe0 Default=YES MaxTime=INFINITE State=UP
`, host, ports[0], ports[1], sock, dir)
	if err := os.WriteFile(c.conf, []byte(conf), 0o644); err != nil {
		t.Fatal(err)
	}
	c.start(t, "slurmctld", progs["slurmctld"], "-D", "-c", "-f", c.conf)
	c.start(t, "slurmd", progs["slurmd"], "-D", "-N", "skyframe0", "-f", c.conf)
	c.waitFor(t, "the node to be idle", 30*time.Second, func() bool {
		cmd := exec.Command(progs["sinfo"], "-h", "-n", "skyframe0", "-o", "%T")
		cmd.Env = c.env("")
		out, err := cmd.Output()
		return err == nil && strings.TrimSpace(string(out)) == "idle"
	})
	return c
}

// waitJob polls `scontrol show job` (Slurm keeps finished jobs for
// MinJobAge, 300 s by default, without accounting) until every task of the
// array has ended, and returns each task's "STATE ExitCode=N:S" by its
// ArrayTaskId. It cancels the job and fails t if that takes longer than
// limit. (sbatch --wait would do, but polls at doubling intervals, which
// here tripled the test's time.)
func (c *cluster) waitJob(t *testing.T, jobID string, limit time.Duration) map[string]string {
	t.Helper()
	field := func(line, key string) string {
		i := strings.Index(" "+line, " "+key+"=")
		if i < 0 {
			return ""
		}
		v, _, _ := strings.Cut(line[i+len(key)+1:], " ")
		return v
	}
	end := time.Now().Add(limit)
	for {
		cmd := exec.Command(c.progs["scontrol"], "-o", "show", "job", jobID)
		cmd.Env = c.env("")
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("scontrol show job %s: %v\n%s", jobID, err, out)
		}
		states, running := map[string]string{}, false
		for _, line := range strings.Split(strings.TrimSpace(string(out)), "\n") {
			st := field(line, "JobState")
			switch st {
			case "PENDING", "CONFIGURING", "RUNNING", "COMPLETING", "REQUEUED", "RESIZING", "SUSPENDED":
				running = true
			}
			states[field(line, "ArrayTaskId")] = st + " ExitCode=" + field(line, "ExitCode")
		}
		if !running {
			return states
		}
		if time.Now().After(end) {
			scancel := exec.Command(c.progs["scancel"], jobID)
			scancel.Env = c.env("")
			scancel.Run()
			c.dumpLogs(t)
			t.Fatalf("job %s still running after %v: %v", jobID, limit, states)
		}
		time.Sleep(200 * time.Millisecond)
	}
}

// start runs a daemon in the foreground with its output in log/NAME.out and
// registers its stop: SIGTERM, then SIGKILL after ten seconds.
func (c *cluster) start(t *testing.T, name, prog string, args ...string) {
	t.Helper()
	out, err := os.Create(filepath.Join(c.dir, "log", name+".out"))
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(prog, args...)
	cmd.Stdout, cmd.Stderr = out, out
	cmd.Env = c.env("")
	if err := cmd.Start(); err != nil {
		out.Close()
		unavailable(t, "cannot start %s: %v", name, err)
	}
	done := make(chan error, 1)
	go func() { done <- cmd.Wait(); out.Close() }()
	t.Cleanup(func() {
		cmd.Process.Signal(syscall.SIGTERM)
		select {
		case <-done:
		case <-time.After(10 * time.Second):
			cmd.Process.Kill()
			<-done
		}
	})
}

// waitFor polls ok every 100 ms until it holds or the time is up; then it
// prints the daemons' logs and fails (skips outside CI: the daemons would
// not start here).
func (c *cluster) waitFor(t *testing.T, what string, limit time.Duration, ok func() bool) {
	t.Helper()
	for end := time.Now().Add(limit); time.Now().Before(end); time.Sleep(100 * time.Millisecond) {
		if ok() {
			return
		}
	}
	c.dumpLogs(t)
	unavailable(t, "waited %v for %s", limit, what)
}

// env is the environment of Slurm's commands and of the jobs (sbatch
// passes it on): the test's own without any scheduler variables, SLURM_CONF
// naming the test's configuration, and binDir first on PATH.
func (c *cluster) env(binDir string) []string {
	env := append(plainEnv(), "SLURM_CONF="+c.conf)
	if binDir != "" {
		for i, kv := range env {
			if strings.HasPrefix(kv, "PATH=") {
				env[i] = "PATH=" + binDir + ":" + kv[len("PATH="):]
			}
		}
	}
	return env
}

// plainEnv is os.Environ less the variables that choose a shard or a Slurm
// configuration, so the test behaves the same inside a scheduler's job.
func plainEnv() []string {
	var env []string
	for _, kv := range os.Environ() {
		k, _, _ := strings.Cut(kv, "=")
		if strings.HasPrefix(k, "SLURM_") || strings.HasPrefix(k, "SKYFRAME_SHARD") || k == "JOB_COMPLETION_INDEX" {
			continue
		}
		env = append(env, kv)
	}
	return env
}

func (c *cluster) dumpLogs(t *testing.T) {
	t.Helper()
	logs, _ := filepath.Glob(filepath.Join(c.dir, "log", "*"))
	for _, f := range logs {
		b, _ := os.ReadFile(f)
		t.Logf("== %s\n%s", filepath.Base(f), tail(b, 4000))
	}
}

func dumpTaskLogs(t *testing.T, work string) {
	t.Helper()
	logs, _ := filepath.Glob(filepath.Join(work, "skyframe-*.log"))
	for _, f := range logs {
		b, _ := os.ReadFile(f)
		t.Logf("== %s\n%s", filepath.Base(f), tail(b, 2000))
	}
}

func tail(b []byte, n int) []byte {
	if len(b) > n {
		return b[len(b)-n:]
	}
	return b
}

// freePorts returns n TCP ports that were free on 127.0.0.1 a moment ago.
func freePorts(t *testing.T, n int) []int {
	t.Helper()
	var ports []int
	var ls []net.Listener
	for range n {
		l, err := net.Listen("tcp", "127.0.0.1:0")
		if err != nil {
			t.Fatal(err)
		}
		ls = append(ls, l)
		ports = append(ports, l.Addr().(*net.TCPAddr).Port)
	}
	for _, l := range ls {
		l.Close()
	}
	return ports
}

// compareTrees fails t unless the regular files under a and b have the same
// names and bytes; it returns how many it compared.
func compareTrees(t *testing.T, a, b string) int {
	t.Helper()
	list := func(root string) map[string]bool {
		names := map[string]bool{}
		err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if d.Type().IsRegular() {
				rel, _ := filepath.Rel(root, p)
				names[rel] = true
			}
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		return names
	}
	na, nb := list(a), list(b)
	for n := range nb {
		if !na[n] {
			t.Errorf("%s: missing from the array job's output", n)
		}
	}
	same := 0
	for n := range na {
		if !nb[n] {
			t.Errorf("%s: written by the array job, not by the one-process run", n)
			continue
		}
		x, err1 := os.ReadFile(filepath.Join(a, n))
		y, err2 := os.ReadFile(filepath.Join(b, n))
		if err := errors.Join(err1, err2); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(x, y) {
			t.Errorf("%s: differs between the array job and the one-process run", n)
			continue
		}
		same++
	}
	return same
}

// command finds a program of Debian package pkg on PATH or, for a PATH
// without the system directories (the daemons are in /usr/sbin), there.
func command(t *testing.T, name, pkg string) string {
	t.Helper()
	if p, err := exec.LookPath(name); err == nil {
		return p
	}
	for _, d := range []string{"/usr/sbin", "/usr/bin"} {
		if p := filepath.Join(d, name); fileExists(p) {
			return p
		}
	}
	return extools.Command(t, name, pkg)
}

func fileExists(p string) bool {
	fi, err := os.Stat(p)
	return err == nil && fi.Mode().IsRegular()
}

// goTool is the go command of the toolchain running the test.
func goTool() string {
	if p, err := exec.LookPath("go"); err == nil {
		return p
	}
	return filepath.Join(os.Getenv("GOROOT"), "bin", "go")
}
