package flight

import (
	"errors"
	"strings"
	"testing"

	"pgregory.net/rapid"
)

func TestParseRange(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Range
		ok   bool
	}{
		{"0-9", Range{0, 9}, true},
		{" 5 - 7 ", Range{5, 7}, true},
		{"12", Range{12, 12}, true},
		{"3-", Range{3, -1}, true},
		{"", All, true},
		{"9-3", Range{}, false},
		{"-3", Range{}, false},
		{"a-b", Range{}, false},
	} {
		r, err := ParseRange(c.in)
		if (err == nil) != c.ok || (c.ok && r != c.want) {
			t.Errorf("ParseRange(%q) = %v, %v; want %v ok=%v", c.in, r, err, c.want, c.ok)
		}
		if err != nil && !errors.Is(err, ErrRange) {
			t.Errorf("ParseRange(%q): error %v is not ErrRange", c.in, err)
		}
	}
}

func TestParseShard(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Shard
		ok   bool
	}{
		{"0/4", Shard{0, 4}, true},
		{"3/4", Shard{3, 4}, true},
		{"4/4", Shard{}, false}, // K is 0-based
		{"-1/4", Shard{}, false},
		{"0/0", Shard{}, false},
		{"1", Shard{}, false},
	} {
		s, err := ParseShard(c.in)
		if (err == nil) != c.ok || (c.ok && s != c.want) {
			t.Errorf("ParseShard(%q) = %v, %v; want %v ok=%v", c.in, s, err, c.want, c.ok)
		}
	}
}

// TestSelectShard: scheduler variables shard a run only when it opts in
// (--shard auto, SKYFRAME_SHARD=auto, or SKYFRAME_SHARDS for an Indexed
// Job); a generic SLURM_ARRAY_TASK_ID or JOB_COMPLETION_INDEX alone leaves
// the whole job and is named in the reason (issue: they used to shard a
// run that did not ask).
func TestSelectShard(t *testing.T) {
	slurm := map[string]string{"SLURM_ARRAY_TASK_ID": "5", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_COUNT": "10"}
	with := func(m map[string]string, k, v string) map[string]string {
		out := map[string]string{k: v}
		for a, b := range m {
			out[a] = b
		}
		return out
	}
	for _, c := range []struct {
		name, flag string
		env        map[string]string
		want       Shard
		why        string
		ok         bool
	}{
		{"nothing", "", nil, Shard{0, 1}, "", true},
		{"generic slurm ignored", "", slurm, Shard{0, 1}, "SLURM_ARRAY_TASK_ID=5 ignored", true},
		{"generic k8s ignored", "", map[string]string{"JOB_COMPLETION_INDEX": "2", "JOB_COMPLETIONS": "4"}, Shard{0, 1}, "JOB_COMPLETION_INDEX=2 ignored", true},
		{"--shard auto, slurm", "auto", slurm, Shard{4, 10}, "SLURM_ARRAY_TASK_ID=5 (MIN 1, STEP 1, 10 tasks), --shard auto", true},
		{"SKYFRAME_SHARD=auto, slurm", "", with(slurm, EnvShard, "auto"), Shard{4, 10}, "SKYFRAME_SHARD=auto", true},
		{"k8s with SKYFRAME_SHARDS", "", map[string]string{"JOB_COMPLETION_INDEX": "2", EnvShards: "4"}, Shard{2, 4}, "JOB_COMPLETION_INDEX=2 of 4", true},
		{"--shard auto, nothing set", "auto", nil, Shard{0, 1}, "no scheduler variables", true},
		{"explicit flag wins", "1/2", slurm, Shard{1, 2}, "--shard 1/2", true},
		{"SKYFRAME_SHARD", "", with(slurm, EnvShard, "3/7"), Shard{3, 7}, "SKYFRAME_SHARD=3/7", true},
		{"bad flag", "9/2", nil, Shard{}, "", false},
	} {
		sh, why, err := SelectShard(c.flag, func(k string) string { return c.env[k] })
		if (err == nil) != c.ok || (c.ok && (sh != c.want || !strings.Contains(why, c.why))) {
			t.Errorf("%s: have %v %q %v; want %v containing %q ok=%v", c.name, sh, why, err, c.want, c.why, c.ok)
		}
		if c.ok && c.why == "" && why != "" {
			t.Errorf("%s: reason %q, want none", c.name, why)
		}
	}
}

func TestShardFromEnv(t *testing.T) {
	for _, c := range []struct {
		name  string
		env   map[string]string
		want  Shard
		found bool
		ok    bool
	}{
		{"none", nil, Shard{}, false, true},
		{"explicit", map[string]string{"SKYFRAME_SHARD": "2/5", "JOB_COMPLETION_INDEX": "0"}, Shard{2, 5}, true, true},
		{"k8s", map[string]string{"JOB_COMPLETION_INDEX": "3", "SKYFRAME_SHARDS": "8"}, Shard{3, 8}, true, true},
		{"k8s completions", map[string]string{"JOB_COMPLETION_INDEX": "0", "JOB_COMPLETIONS": "2"}, Shard{0, 2}, true, true},
		{"k8s no count", map[string]string{"JOB_COMPLETION_INDEX": "0"}, Shard{}, true, false},
		{"k8s out of range", map[string]string{"JOB_COMPLETION_INDEX": "8", "SKYFRAME_SHARDS": "8"}, Shard{}, true, false},
		{"slurm count", map[string]string{"SLURM_ARRAY_TASK_ID": "5", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_COUNT": "10"}, Shard{4, 10}, true, true},
		{"slurm min/max", map[string]string{"SLURM_ARRAY_TASK_ID": "7", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_MAX": "7"}, Shard{7, 8}, true, true},
		{"slurm step", map[string]string{"SLURM_ARRAY_TASK_ID": "8", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_MAX": "12", "SLURM_ARRAY_TASK_STEP": "4"}, Shard{2, 4}, true, true},
		{"slurm no count", map[string]string{"SLURM_ARRAY_TASK_ID": "1"}, Shard{}, true, false},
		{"slurm junk", map[string]string{"SLURM_ARRAY_TASK_ID": "x", "SLURM_ARRAY_TASK_COUNT": "2"}, Shard{}, true, false},
	} {
		s, found, err := ShardFromEnv(func(k string) string { return c.env[k] })
		if found != c.found || (err == nil) != c.ok || (c.ok && s != c.want) {
			t.Errorf("%s: have %v found=%v err=%v; want %v found=%v ok=%v", c.name, s, found, err, c.want, c.found, c.ok)
		}
	}
}

// The shards of a range partition it exactly: every frame once, in order.
func TestShardPartitionProperty(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		total := rapid.IntRange(0, 500).Draw(t, "total")
		first := rapid.IntRange(0, 520).Draw(t, "first")
		last := rapid.IntRange(-1, 520).Draw(t, "last")
		if last >= 0 && last < first {
			last = first
		}
		r := Range{first, last}
		n := rapid.IntRange(1, 40).Draw(t, "n")
		lo, hi := r.Clip(total)
		var got []int
		for k := 0; k < n; k++ {
			fr := Shard{k, n}.Frames(total, r)
			if len(fr) > (hi-lo)/n+1 {
				t.Fatalf("shard %d/%d has %d frames of %d", k, n, len(fr), hi-lo)
			}
			got = append(got, fr...)
		}
		if len(got) != hi-lo {
			t.Fatalf("shards hold %d frames, range has %d", len(got), hi-lo)
		}
		for i, f := range got {
			if f != lo+i {
				t.Fatalf("frame %d at position %d, want %d (overlap or gap)", f, i, lo+i)
			}
		}
	})
}
