package job

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"
)

// Output-directory locks. A run that renders frames (with or without
// resume) holds a lock file in the output directory,
// ".skyframe-<pid>.lock", recording its host, process id, frame range and
// start time. Before it renders it looks at the other lock files there:
// one whose frame range overlaps its own refuses the run (an InputError
// naming the other run), so two runs never write the same frames; shards
// of one job, whose ranges are disjoint, share the directory. A lock of a
// process on this host that no longer runs (killed, the machine
// restarted) is stale: it is removed and a note says so. A lock from
// another host cannot be checked; the message says to delete it if that
// run is gone. Verification and dry runs write nothing and take no lock.

const lockPrefix, lockSuffix = ".skyframe-", ".lock"

// Lock is a held output-directory lock; Release removes it.
type Lock struct{ path string }

// Release removes the lock file; a nil Lock does nothing.
func (l *Lock) Release() {
	if l != nil {
		_ = os.Remove(l.path) // best effort: a leftover lock is detected as stale
	}
}

// lockInfo is what a lock file records.
type lockInfo struct {
	host        string
	pid         int
	first, last int
	started     string
}

func (li lockInfo) String() string {
	return fmt.Sprintf("host %s, pid %d, frames %d-%d, started %s", li.host, li.pid, li.first, li.last, li.started)
}

func readLock(path string) (lockInfo, error) {
	f, err := os.Open(path)
	if err != nil {
		return lockInfo{}, err
	}
	defer f.Close()
	li := lockInfo{first: -1, last: -1}
	sc := bufio.NewScanner(io.LimitReader(f, 4096))
	for sc.Scan() {
		k, v, _ := strings.Cut(sc.Text(), "=")
		switch k {
		case "host":
			li.host = v
		case "pid":
			li.pid, _ = strconv.Atoi(v)
		case "frames":
			a, b, _ := strings.Cut(v, "-")
			li.first, _ = strconv.Atoi(a)
			li.last, _ = strconv.Atoi(b)
		case "started":
			li.started = v
		}
	}
	return li, sc.Err()
}

// alive reports whether process pid runs on this host (signal 0, POSIX
// kill(2): EPERM means it exists under another user).
func alive(pid int) bool {
	if pid <= 0 {
		return false
	}
	err := syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM)
}

// LockFrames takes the output directory's lock for frames first..last for
// this process, started at now. It returns the lock and notes about stale
// locks it removed.
func (j *Job) LockFrames(first, last int, now time.Time) (*Lock, []string, error) {
	host, _ := os.Hostname()
	me := lockInfo{host: host, pid: os.Getpid(), first: first, last: last, started: now.UTC().Format(time.RFC3339)}
	path := filepath.Join(j.OutDir, lockPrefix+strconv.Itoa(me.pid)+lockSuffix)
	body := fmt.Sprintf("host=%s\npid=%d\nframes=%d-%d\nstarted=%s\n", me.host, me.pid, first, last, me.started)
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_TRUNC, 0o666)
	if err != nil {
		return nil, nil, fmt.Errorf("lock %s: %w", path, err)
	}
	if _, err := f.WriteString(body); err != nil {
		f.Close()
		os.Remove(path)
		return nil, nil, fmt.Errorf("lock %s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		os.Remove(path)
		return nil, nil, fmt.Errorf("lock %s: %w", path, err)
	}
	lock := &Lock{path: path}
	var notes []string
	others, _ := filepath.Glob(filepath.Join(j.OutDir, lockPrefix+"*"+lockSuffix))
	for _, o := range others {
		if o == path {
			continue
		}
		li, err := readLock(o)
		if errors.Is(err, os.ErrNotExist) {
			continue // released meanwhile
		}
		if li.host == host && !alive(li.pid) {
			if os.Remove(o) == nil {
				notes = append(notes, fmt.Sprintf("removed a stale lock %s (%v): that process no longer runs", filepath.Base(o), li))
			}
			continue
		}
		if li.last < first || li.first > last {
			continue // another shard: disjoint frames
		}
		lock.Release()
		return nil, notes, inputf("output directory %s: another run is rendering frames %d-%d there (%v, lock %s); wait for it, or give this run other frames (--frames, --shard); if that run is gone, delete the lock file",
			j.OutDir, max(first, li.first), min(last, li.last), li, filepath.Base(o))
	}
	return lock, notes, nil
}
