package main

import (
	"bytes"
	"regexp"
	"strings"
	"testing"
	"time"
)

// TestProgressBar: the trials and sweep bar on a terminal shows the share
// done and an ETA from the mean time per step so far (40 s for the first
// of 4 steps: 2 min left; the pattern allows a few seconds of a loaded
// machine between the lines), redraws at most every 100 ms but always
// draws the last step, and writes nothing to a writer that is not a
// terminal (a pipe or file keeps only the report).
func TestProgressBar(t *testing.T) {
	var b bytes.Buffer
	p := &progress{w: &b, n: 4, start: time.Now().Add(-40 * time.Second)}
	p.step()
	if got, want := b.String(), `^\r\[#{7}\.{23}\] 1/4  ETA 2m[0-9]s $`; !regexp.MustCompile(want).MatchString(got) {
		t.Errorf("first step %q, want %s", got, want)
	}
	b.Reset()
	p.last = time.Now().Add(time.Hour) // the next draws fall within 100 ms of it
	p.step()
	p.step()
	if b.Len() != 0 {
		t.Errorf("steps within 100 ms drew %q", b.String())
	}
	p.step()
	p.done()
	if got := b.String(); !strings.HasPrefix(got, "\r[##############################] 4/4  ETA 0s ") || !strings.HasSuffix(got, "\n") {
		t.Errorf("last step %q", got)
	}
	var pipe bytes.Buffer
	q := newProgress(&pipe, 3)
	q.step()
	q.done()
	if pipe.Len() != 0 {
		t.Errorf("not a terminal, yet the bar wrote %q", pipe.String())
	}
}
