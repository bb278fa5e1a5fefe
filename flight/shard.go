package flight

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// ErrRange and ErrShard are returned for malformed frame ranges and shard
// specifications.
var (
	ErrRange = errors.New("flight: bad frame range")
	ErrShard = errors.New("flight: bad shard")
)

// Range is an inclusive range of 0-based frame indices. Last < 0 means
// "through the last frame", so All (and Range{Last: -1}) selects every frame.
type Range struct{ First, Last int }

// All selects every frame.
var All = Range{First: 0, Last: -1}

// ParseRange parses "A-B" (inclusive, 0-based, A ≤ B), "A-" (from A to the
// end) or "A" (the single frame A). The empty string selects All.
func ParseRange(s string) (Range, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return All, nil
	}
	a, b, dash := strings.Cut(s, "-")
	first, err := strconv.Atoi(strings.TrimSpace(a))
	if err != nil || first < 0 {
		return Range{}, fmt.Errorf("%w %q: first frame must be an integer ≥ 0", ErrRange, s)
	}
	if !dash {
		return Range{first, first}, nil
	}
	if strings.TrimSpace(b) == "" {
		return Range{first, -1}, nil
	}
	last, err := strconv.Atoi(strings.TrimSpace(b))
	if err != nil || last < first {
		return Range{}, fmt.Errorf("%w %q: want A-B with integers 0 ≤ A ≤ B", ErrRange, s)
	}
	return Range{first, last}, nil
}

// Clip returns the range restricted to frames 0..total−1 as a half-open
// interval [lo, hi); lo == hi when nothing is left.
func (r Range) Clip(total int) (lo, hi int) {
	lo, hi = r.First, r.Last+1
	if r.Last < 0 || hi > total {
		hi = total
	}
	if lo < 0 {
		lo = 0
	}
	if lo > hi {
		lo = hi
	}
	return lo, hi
}

// String formats the range as ParseRange reads it.
func (r Range) String() string {
	if r.Last < 0 {
		return fmt.Sprintf("%d-", r.First)
	}
	return fmt.Sprintf("%d-%d", r.First, r.Last)
}

// Shard is one of N workers sharing a render: K is 0-based, 0 ≤ K < N.
// The zero value is invalid; Shard{0, 1} is the whole job.
type Shard struct{ K, N int }

// ParseShard parses "K/N" with K 0-based (0 ≤ K < N), the convention of
// Kubernetes Indexed Jobs.
func ParseShard(s string) (Shard, error) {
	a, b, ok := strings.Cut(strings.TrimSpace(s), "/")
	if !ok {
		return Shard{}, fmt.Errorf("%w %q: want K/N with 0 ≤ K < N", ErrShard, s)
	}
	k, err1 := strconv.Atoi(strings.TrimSpace(a))
	n, err2 := strconv.Atoi(strings.TrimSpace(b))
	if err1 != nil || err2 != nil {
		return Shard{}, fmt.Errorf("%w %q: want K/N with integers 0 ≤ K < N", ErrShard, s)
	}
	sh := Shard{k, n}
	return sh, sh.Validate()
}

// Validate reports whether 0 ≤ K < N.
func (s Shard) Validate() error {
	if s.N < 1 || s.K < 0 || s.K >= s.N {
		return fmt.Errorf("%w %d/%d: want 0 ≤ K < N (K is 0-based)", ErrShard, s.K, s.N)
	}
	return nil
}

// String formats the shard as ParseShard reads it.
func (s Shard) String() string { return fmt.Sprintf("%d/%d", s.K, s.N) }

// Frames returns the frames of r (clipped to 0..total−1) that this shard
// renders: a contiguous block, the blocks of shards 0..N−1 following each
// other in order, sizes differing by at most one. Over all K the blocks
// partition the range exactly. An invalid shard gets no frames.
func (s Shard) Frames(total int, r Range) []int {
	if s.Validate() != nil || total <= 0 {
		return nil
	}
	lo, hi := r.Clip(total)
	n := hi - lo
	a := lo + int(int64(n)*int64(s.K)/int64(s.N))
	b := lo + int(int64(n)*int64(s.K+1)/int64(s.N))
	out := make([]int, 0, b-a)
	for i := a; i < b; i++ {
		out = append(out, i)
	}
	return out
}

// Environment variables read by ShardFromEnv.
const (
	// EnvShard holds an explicit "K/N" (0-based K) and wins over the rest.
	EnvShard = "SKYFRAME_SHARD"
	// EnvShards holds the shard count N for a Kubernetes Indexed Job whose
	// index is in JOB_COMPLETION_INDEX.
	EnvShards = "SKYFRAME_SHARDS"
)

// ShardFromEnv detects a shard from the environment, read through getenv
// (pass os.Getenv). In order:
//
//   - SKYFRAME_SHARD="K/N";
//   - Kubernetes Indexed Jobs: K = JOB_COMPLETION_INDEX, N from
//     SKYFRAME_SHARDS, else JOB_COMPLETIONS (set it from the Job's
//     completions in the pod template; Kubernetes does not export it);
//   - Slurm job arrays: K = (SLURM_ARRAY_TASK_ID − MIN)/STEP with
//     SLURM_ARRAY_TASK_MIN (default 0) and SLURM_ARRAY_TASK_STEP (default 1);
//     N = SLURM_ARRAY_TASK_COUNT, else (MAX − MIN)/STEP + 1.
//
// found is false when none of these is set. Arrays given as arbitrary index
// lists (which no K/N can describe) are reported as errors.
func ShardFromEnv(getenv func(string) string) (sh Shard, found bool, err error) {
	sh, _, found, err = shardFromEnv(getenv)
	return sh, found, err
}

// shardFromEnv is ShardFromEnv that also says which variables gave the
// shard.
func shardFromEnv(getenv func(string) string) (sh Shard, src string, found bool, err error) {
	if v := getenv(EnvShard); v != "" && v != "auto" {
		sh, err = ParseShard(v)
		return sh, EnvShard + "=" + v, true, err
	}
	num := func(name string, def int) (int, error) {
		v := strings.TrimSpace(getenv(name))
		if v == "" {
			return def, nil
		}
		n, err := strconv.Atoi(v)
		if err != nil {
			return 0, fmt.Errorf("%w: %s=%q is not an integer", ErrShard, name, v)
		}
		return n, nil
	}
	if getenv("JOB_COMPLETION_INDEX") != "" {
		k, err := num("JOB_COMPLETION_INDEX", 0)
		if err != nil {
			return Shard{}, "", true, err
		}
		n, err := num(EnvShards, -1)
		if err != nil {
			return Shard{}, "", true, err
		}
		if n < 0 {
			if n, err = num("JOB_COMPLETIONS", -1); err != nil {
				return Shard{}, "", true, err
			}
		}
		if n < 0 {
			return Shard{}, "", true, fmt.Errorf("%w: JOB_COMPLETION_INDEX=%d but neither %s nor JOB_COMPLETIONS gives the shard count",
				ErrShard, k, EnvShards)
		}
		sh = Shard{k, n}
		return sh, fmt.Sprintf("JOB_COMPLETION_INDEX=%d of %d", k, n), true, sh.Validate()
	}
	if getenv("SLURM_ARRAY_TASK_ID") != "" {
		id, err := num("SLURM_ARRAY_TASK_ID", 0)
		if err != nil {
			return Shard{}, "", true, err
		}
		lo, err := num("SLURM_ARRAY_TASK_MIN", 0)
		if err != nil {
			return Shard{}, "", true, err
		}
		step, err := num("SLURM_ARRAY_TASK_STEP", 1)
		if err != nil {
			return Shard{}, "", true, err
		}
		if step < 1 {
			return Shard{}, "", true, fmt.Errorf("%w: SLURM_ARRAY_TASK_STEP=%d", ErrShard, step)
		}
		n, err := num("SLURM_ARRAY_TASK_COUNT", -1)
		if err != nil {
			return Shard{}, "", true, err
		}
		if n < 0 {
			hi, err := num("SLURM_ARRAY_TASK_MAX", -1)
			if err != nil {
				return Shard{}, "", true, err
			}
			if hi < lo {
				return Shard{}, "", true, fmt.Errorf("%w: SLURM_ARRAY_TASK_ID=%d without SLURM_ARRAY_TASK_COUNT or a valid SLURM_ARRAY_TASK_MAX",
					ErrShard, id)
			}
			n = (hi-lo)/step + 1
		}
		if (id-lo)%step != 0 {
			return Shard{}, "", true, fmt.Errorf("%w: SLURM_ARRAY_TASK_ID=%d is not MIN=%d plus a multiple of STEP=%d", ErrShard, id, lo, step)
		}
		sh = Shard{(id - lo) / step, n}
		if err := sh.Validate(); err != nil {
			return Shard{}, "", true, fmt.Errorf("%w (from SLURM_ARRAY_TASK_ID=%d, MIN=%d, STEP=%d: index lists are not supported)", err, id, lo, step)
		}
		return sh, fmt.Sprintf("SLURM_ARRAY_TASK_ID=%d (MIN %d, STEP %d, %d tasks)", id, lo, step, n), true, nil
	}
	return Shard{}, "", false, nil
}

// SelectShard decides which shard a run renders, and says why (for the
// log). Scheduler variables shard a run only when it asks for it, since
// they are also set for jobs that run skyframe once per task:
//
//   - flag "K/N" (--shard): that shard;
//   - flag "auto", or SKYFRAME_SHARD=auto: the first of SKYFRAME_SHARD,
//     a Kubernetes Indexed Job, a Slurm array (see ShardFromEnv); none
//     set is the whole job;
//   - no flag: SKYFRAME_SHARD="K/N", or JOB_COMPLETION_INDEX when
//     SKYFRAME_SHARDS gives the count (the Indexed Job set up for
//     skyframe); otherwise the whole job, and a generic
//     JOB_COMPLETION_INDEX or SLURM_ARRAY_TASK_ID is ignored and named in
//     why.
func SelectShard(flag string, getenv func(string) string) (sh Shard, why string, err error) {
	whole := Shard{K: 0, N: 1}
	auto := flag == "auto" || (flag == "" && getenv(EnvShard) == "auto")
	switch {
	case flag != "" && flag != "auto":
		sh, err = ParseShard(flag)
		return sh, "--shard " + flag, err
	case auto:
		how := "--shard auto"
		if flag == "" {
			how = EnvShard + "=auto"
		}
		sh, src, found, err := shardFromEnv(getenv)
		if err != nil {
			return Shard{}, "", err
		}
		if !found {
			return whole, how + ": no scheduler variables set, the whole job", nil
		}
		return sh, src + ", " + how, nil
	}
	if v := getenv(EnvShard); v != "" {
		sh, err = ParseShard(v)
		return sh, EnvShard + "=" + v, err
	}
	if getenv(EnvShards) != "" && getenv("JOB_COMPLETION_INDEX") != "" {
		sh, src, _, err := shardFromEnv(getenv)
		if err != nil {
			return Shard{}, "", err
		}
		return sh, src + ", " + EnvShards + " set", nil
	}
	var ignored []string
	for _, k := range []string{"JOB_COMPLETION_INDEX", "SLURM_ARRAY_TASK_ID"} {
		if v := getenv(k); v != "" {
			ignored = append(ignored, k+"="+v)
		}
	}
	if len(ignored) > 0 {
		return whole, fmt.Sprintf("the whole job: %s ignored (shard by it with --shard auto or %s=auto)", strings.Join(ignored, ", "), EnvShard), nil
	}
	return whole, "", nil
}
