package web_test

import (
	"context"
	"io"
	"log/slog"
	"net/http/httptest"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/chromedp"

	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/server"
	"github.com/pulsewright/pulsewright/web"
)

// slowServer is the workbench server whose evaluations take an extra
// delay while slow is set, and that the test can stop (the page goes
// offline).
type slowServer struct {
	url  string
	slow atomic.Bool
	stop func()
}

func mustSlowServer(t *testing.T) *slowServer {
	t.Helper()
	ss := &slowServer{}
	log := slog.New(slog.NewTextHandler(io.Discard, nil))
	eval := func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error) {
		if ss.slow.Load() {
			select {
			case <-time.After(2500 * time.Millisecond):
			case <-ctx.Done():
				return nil, ctx.Err()
			}
		}
		return scenarios.Evaluate(ctx, s)
	}
	s, err := server.New(server.Config{Addr: "127.0.0.1:0", DataDir: t.TempDir(), Static: web.FS()}, log, eval)
	if err != nil {
		t.Fatalf("server.New: %v", err)
	}
	ts := httptest.NewServer(s.Handler())
	var once atomic.Bool
	ss.stop = func() {
		if once.Swap(true) {
			return
		}
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		s.Close(ctx)
		ts.Close()
	}
	t.Cleanup(ss.stop)
	ss.url = ts.URL
	return ss
}

const (
	jsBanner     = `document.querySelector('.stale-banner')`
	jsBannerKind = `(document.querySelector('.stale-banner').hidden ? 'none' : document.querySelector('.stale-banner').dataset.kind)`
	jsNoticeText = `document.querySelector('#notice-text').textContent`
)

// denyClipboard makes the browser refuse clipboard writes, as it does for
// a page served over plain HTTP from another machine.
func denyClipboard(t *testing.T, ctx context.Context) {
	t.Helper()
	origin := eval[string](t, ctx, `location.origin`)
	for _, name := range []string{"clipboard-write", "clipboard-read"} {
		err := chromedp.Do(ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			_, err := cdp.Call(ctx, tg, browser.SetPermission, browser.SetPermissionParams{
				Permission: &browser.PermissionDescriptor{Name: name}, Setting: browser.PermissionSettingDenied, Origin: origin})
			return err
		}))
		if err != nil {
			t.Fatalf("deny %s: %v", name, err)
		}
	}
}

func TestStalePlotsSaySo(t *testing.T) {
	ctx := mustBrowser(t)
	srv := mustSlowServer(t)
	openPage(t, ctx, srv.url)
	waitFor(t, ctx, "in step", fresh+` && `+jsBannerKind+` === 'none'`)
	good := eval[string](t, ctx, `window.__pw.frame().link`)

	// Text that is not a number: the field says so, and so do the plots,
	// however many frames arrive afterwards.
	const rcs = `tr[data-row="2"] input[data-path="targets[2].rcs_dbsm"]`
	typeInto(t, ctx, rcs, "12x")
	waitFor(t, ctx, "the invalid banner", jsBannerKind+` === 'invalid'`)
	time.Sleep(700 * time.Millisecond) // the frame of "12" comes and goes
	if k := eval[string](t, ctx, jsBannerKind); k != "invalid" {
		t.Errorf("after the frames of the valid prefix, banner %q, want invalid", k)
	}
	slot := eval[string](t, ctx, `document.querySelector('[data-err-for="targets[2].rcs_dbsm"]').textContent`)
	if !strings.Contains(slot, "not a number") {
		t.Errorf("the field's message is %q, want it to say the text is not a number", slot)
	}
	if v := eval[float64](t, ctx, `window.__pw.store.scenario.targets[2].rcs_dbsm`); v != 12 {
		t.Logf("scene holds %g (the last valid text, \"12\")", v)
	}
	// The figures column's verdicts are the plotted scene's too: dimmed
	// with the figures.
	o := eval[string](t, ctx, `[...document.querySelectorAll('#figures, .story-masked')].map((e) => getComputedStyle(e).opacity).join(' ')`)
	if f := strings.Fields(o); len(f) < 2 || strings.Trim(o, "0.5 ") != "" {
		t.Errorf("opacity of the figures and the masked targets' reasons while not updated: %q, want 0.5 each", o)
	}
	shot(t, ctx, "not-a-number")

	// Copy link now: the notice says the link is the plotted, last valid
	// scene, and the link held out is that scene's.
	denyClipboard(t, ctx)
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-share`)))
	waitFor(t, ctx, "the copy notice", `!document.querySelector('#notice').hidden && document.querySelector('.link-out')`)
	if txt := eval[string](t, ctx, jsNoticeText); !strings.Contains(txt, "last valid") {
		t.Errorf("copy notice %q does not say the link is of the last valid scene", txt)
	}
	plotted := eval[string](t, ctx, `window.__pw.frame().link`)
	if got := eval[string](t, ctx, `document.querySelector('.link-out').value`); !strings.HasSuffix(got, plotted) {
		t.Errorf("the link held out %.60s… is not the plotted scene's %.60s…", got, plotted)
	}
	// The link stays on screen, selected, until dismissed.
	time.Sleep(7 * time.Second)
	if eval[bool](t, ctx, `document.querySelector('#notice').hidden`) {
		t.Error("the link to copy by hand went away by itself")
	}
	if sel := eval[string](t, ctx, `(() => { const f = document.querySelector('.link-out'); return f.value.slice(f.selectionStart, f.selectionEnd); })()`); !strings.HasSuffix(sel, plotted) {
		t.Errorf("the link is not selected for copying (selection %.40s…)", sel)
	}
	shot(t, ctx, "copy-fallback")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#notice-close`)))

	// Fix the text: in step again.
	typeInto(t, ctx, rcs, "12")
	waitFor(t, ctx, "in step after the fix", fresh+` && `+jsBannerKind+` === 'none'`)

	// A value the server refuses.
	typeInto(t, ctx, `tr[data-row="1"] input[data-path="targets[1].range_m"]`, "-5")
	waitFor(t, ctx, "the refused banner", jsBannerKind+` === 'invalid' && `+jsBanner+`.textContent.includes('range')`)
	shot(t, ctx, "refused")
	typeInto(t, ctx, `tr[data-row="1"] input[data-path="targets[1].range_m"]`, "6300")
	waitFor(t, ctx, "in step after the second fix", fresh+` && `+jsBannerKind+` === 'none'`)
	if got := eval[string](t, ctx, `window.__pw.frame().link`); got == good {
		t.Log("(scene back to its start)")
	}

	// A slow computation: the plots say they are behind, and Copy link
	// gives the editor's scene, saying so.
	srv.slow.Store(true)
	typeInto(t, ctx, rcs, "18")
	waitFor(t, ctx, "the pending banner", jsBannerKind+` === 'pending'`)
	shot(t, ctx, "computing")
	do(t, ctx, chromedp.Click(chromedp.CSS(`#btn-share`)))
	waitFor(t, ctx, "the copy notice", `!document.querySelector('#notice').hidden && document.querySelector('.link-out')`)
	if txt := eval[string](t, ctx, jsNoticeText); !strings.Contains(txt, "scene in the editor") {
		t.Errorf("copy notice while computing %q does not say it is the editor's scene", txt)
	}
	held := eval[string](t, ctx, `document.querySelector('.link-out').value`)
	srv.slow.Store(false)
	waitFor(t, ctx, "in step after the slow frame", fresh+` && `+jsBannerKind+` === 'none'`)
	if now := eval[string](t, ctx, `window.__pw.frame().link`); !strings.HasSuffix(held, now) {
		t.Errorf("the link copied while computing %.60s… is not the edited scene's %.60s…", held, now)
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(`#notice-close`)))

	// Offline: the plots say so, and an edit made meanwhile is flagged.
	srv.stop()
	waitFor(t, ctx, "the offline banner", jsBannerKind+` === 'offline'`)
	typeInto(t, ctx, rcs, "19")
	waitFor(t, ctx, "the offline banner with a pending edit", jsBannerKind+` === 'offline' && `+jsBanner+`.textContent.includes('latest edits')`)
	shot(t, ctx, "offline")
}
