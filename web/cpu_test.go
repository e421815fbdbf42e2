package web_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"

	"github.com/chromedp/chromedp"
)

// CPU time and load, so that a latency measured on a busy machine can be
// read: wall time waits for a core, CPU time does not.

// cpuUse is CPU time, ms, by process kind: "server" is this test process
// (the workbench server evaluating, encoding and sending frames, plus the
// test's own browser driving, which is small), "renderer" the page's
// process (JavaScript, style, layout, paint), "gpu" Chromium's
// compositing process (software, no GPU here), "browser" the rest.
type cpuUse map[string]float64

// clockTick is the unit of /proc/<pid>/stat's utime and stime (USER_HZ,
// 100 on Linux).
const clockTick = 10.0 // ms

func cpuNow(t *testing.T, ctx context.Context) cpuUse {
	t.Helper()
	u := cpuUse{}
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err == nil {
		u["server"] = float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e6
	}
	c := chromedp.FromContext(ctx)
	if c == nil || c.Browser == nil || c.Browser.Process() == nil {
		return u
	}
	root := c.Browser.Process().Pid
	type proc struct {
		ppid int
		ms   float64
	}
	procs := map[int]proc{}
	stats, _ := filepath.Glob("/proc/[0-9]*/stat")
	for _, p := range stats {
		b, err := os.ReadFile(p)
		if err != nil {
			continue
		}
		// pid (comm) state ppid … field 14 utime, 15 stime.
		s := string(b)
		i := strings.LastIndexByte(s, ')')
		if i < 0 {
			continue
		}
		f := strings.Fields(s[i+1:])
		if len(f) < 13 {
			continue
		}
		pid, _ := strconv.Atoi(filepath.Base(filepath.Dir(p)))
		ppid, _ := strconv.Atoi(f[1])
		ut, _ := strconv.ParseFloat(f[11], 64)
		st, _ := strconv.ParseFloat(f[12], 64)
		procs[pid] = proc{ppid, (ut + st) * clockTick}
	}
	in := func(pid int) bool {
		for range 16 {
			if pid == root {
				return true
			}
			p, ok := procs[pid]
			if !ok || p.ppid <= 1 {
				return false
			}
			pid = p.ppid
		}
		return false
	}
	for pid, p := range procs {
		if !in(pid) {
			continue
		}
		kind := "browser"
		if b, err := os.ReadFile(fmt.Sprintf("/proc/%d/cmdline", pid)); err == nil {
			// Chromium rewrites a child's command line into one string
			// with spaces; split on both.
			for _, a := range strings.FieldsFunc(string(b), func(r rune) bool { return r == 0 || r == ' ' }) {
				if v, ok := strings.CutPrefix(a, "--type="); ok {
					kind = v
				}
			}
		}
		switch kind {
		case "renderer", "browser":
		case "gpu-process":
			kind = "gpu"
		default:
			kind = "browser"
		}
		u[kind] += p.ms
	}
	return u
}

// perPicture formats the CPU used since c0, per picture.
func (c cpuUse) perPicture(c0 cpuUse, pictures int) string {
	if pictures == 0 {
		return "no pictures"
	}
	n := float64(pictures)
	return fmt.Sprintf("CPU per picture: server %.1f ms, renderer %.1f, gpu %.1f, browser %.1f",
		(c["server"]-c0["server"])/n, (c["renderer"]-c0["renderer"])/n, (c["gpu"]-c0["gpu"])/n, (c["browser"]-c0["browser"])/n)
}

// loadAvg is the 1-minute load average, as /proc/loadavg gives it.
func loadAvg() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "?"
	}
	return strings.Fields(string(b))[0]
}
