package server

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
)

const chromiumPath = "/usr/bin/chromium"

// browser starts headless Chromium for one test, or skips the test when
// Chromium is not installed (unless PULSEWRIGHT_REQUIRE_BROWSER=1). The
// returned log holds every URL the page requested and every uncaught
// exception.
func browser(t *testing.T) (context.Context, *pageLog) {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("PULSEWRIGHT_REQUIRE_BROWSER") == "1" {
			t.Fatalf("chromium required: %v", err)
		}
		t.Skipf("chromium not installed: %v", err)
	}
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(chromiumPath),
		chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-dev-shm-usage", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1200, 900),
	}
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelC := chromedp.NewContext(actx)
	t.Cleanup(func() { cancelC(); cancelA() })
	log := &pageLog{}
	if err := chromedp.Listen(ctx, log.record); err != nil {
		t.Fatal(err)
	}
	return ctx, log
}

type pageLog struct {
	mu         sync.Mutex
	urls       []string
	exceptions []string
}

func (l *pageLog) record(ev any) {
	l.mu.Lock()
	defer l.mu.Unlock()
	switch ev := ev.(type) {
	case *network.EventRequestWillBeSent:
		l.urls = append(l.urls, ev.Request.URL)
	case *runtime.EventExceptionThrown:
		l.exceptions = append(l.exceptions, fmt.Sprintf("%s %v", ev.ExceptionDetails.Text, ev.ExceptionDetails.Exception))
	}
}

// check fails the test on any exception or any request that is not the
// page file itself or a data: URL.
func (l *pageLog) check(t *testing.T) {
	t.Helper()
	l.mu.Lock()
	defer l.mu.Unlock()
	if len(l.urls) == 0 {
		t.Error("no request seen: the network listener is not working")
	}
	for _, u := range l.urls {
		if !strings.HasPrefix(u, "file://") && !strings.HasPrefix(u, "data:") {
			t.Errorf("the page requested %s", u)
		}
	}
	for _, e := range l.exceptions {
		t.Errorf("page exception: %s", e)
	}
}

// chartState is what a chart reports back from the page.
type chartState struct {
	Series  []int    `json:"series"`  // data points per series
	Names   []string `json:"names"`   // series names
	CanvasW int      `json:"canvasW"` // px of the drawn canvas
	Painted bool     `json:"painted"` // the canvas holds non-white pixels
}

// openPage loads file in the browser, waits until its charts are drawn,
// reads back each chart's option and canvas, and saves a screenshot.
func openPage(t *testing.T, ctx context.Context, file, shot string, ids ...string) map[string]chartState {
	t.Helper()
	abs, err := filepath.Abs(file)
	if err != nil {
		t.Fatal(err)
	}
	if err := chromedp.Do(ctx, chromedp.Navigate("file://"+abs)); err != nil {
		t.Fatal(err)
	}
	wctx, cancel := context.WithTimeout(ctx, 20*time.Second)
	defer cancel()
	if _, err := chromedp.Run(wctx, chromedp.Poll[bool](`document.body.dataset.charts === 'ready'`)); err != nil {
		t.Fatalf("charts not drawn: %v", err)
	}
	out := map[string]chartState{}
	for _, id := range ids {
		st, err := chromedp.Run(ctx, chromedp.Evaluate[chartState](`(() => {
			const el = document.getElementById(`+"'"+id+"'"+`);
			const opt = echarts.getInstanceByDom(el).getOption();
			const cv = el.querySelector('canvas');
			const g = cv.getContext('2d').getImageData(0, 0, cv.width, cv.height).data;
			let painted = false;
			for (let i = 0; i < g.length; i += 4) {
				if (g[i+3] > 0 && (g[i] < 200 || g[i+1] < 200 || g[i+2] < 200)) { painted = true; break; }
			}
			return {series: opt.series.map(s => s.data.length), names: opt.series.map(s => s.name),
			        canvasW: cv.width, painted};
		})()`))
		if err != nil {
			t.Fatalf("chart %s: %v", id, err)
		}
		out[id] = st
	}
	png, err := chromedp.Run(ctx, chromedp.FullScreenshot(100))
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join("..", "test-output")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, shot), png, 0o644); err != nil {
		t.Fatal(err)
	}
	return out
}
