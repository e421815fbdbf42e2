package server

import (
	"context"
	"io"
	"log/slog"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"net/http"
	"net/http/httptest"
	"os"
	"strings"
	"sync/atomic"
	"testing"
	"testing/fstest"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
)

// fakeEval stands in for scenarios.Evaluate: EvaluateFn, when set, runs
// instead of plausibleResult.
type fakeEval struct {
	EvaluateFn func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error)
	calls      atomic.Int64
}

func (f *fakeEval) Evaluate(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error) {
	f.calls.Add(1)
	if f.EvaluateFn != nil {
		return f.EvaluateFn(ctx, s)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return plausibleResult(s), nil
}

var _ Evaluator = (*fakeEval)(nil).Evaluate

// plausibleResult builds a result of the right shape for s: the window
// sampled four times finer than the scenario's rate (a few thousand
// samples for the demos), unit-power noise from the seed, a sinc-shaped
// peak per point target at its SNR from a made-up budget, and a flat
// threshold 13 dB above the noise. The numbers are not physics; they
// only exercise the server.
func plausibleResult(s *scenarios.Scenario) *scenarios.Result {
	step := scenarios.C / (2 * s.Radar.SampleRateHz) / 4
	n := min(max(int((s.Radar.WindowStopM-s.Radar.WindowStartM)/step)+1, 16), 1<<16)
	rng := rand.New(rand.NewPCG(uint64(s.Seed), 7))
	res := &scenarios.Result{
		Report: scenarios.Report{Version: scenarios.ReportVersion, Scenario: s.Name, Warnings: []string{},
			Waveform: scenarios.WaveformReport{Kind: s.Waveform.Kind, PulseWidthS: s.Waveform.PulseWidth(), BandwidthHz: s.Waveform.Bandwidth(), PSLRDB: ptr(-13.26)}},
		Series: scenarios.Series{RangeM0: s.Radar.WindowStartM, RangeStepM: step,
			Echo: make([]complex128, n), ProfileDB: make([]float64, n), CleanDB: make([]float64, n), ThresholdDB: make([]float64, n)},
	}
	clean := make([]float64, n)
	res4 := scenarios.C / (2 * s.Waveform.Bandwidth())
	for _, t := range s.Targets {
		r := t.RangeM
		if t.Kind != scenarios.TargetPoint {
			r = (t.RangeStartM + t.RangeStopM) / 2
		}
		snr := 40 + t.RCSDBsm - 40*math.Log10(max(r, 100)/1e4)
		status := scenarios.StatusDetected
		if snr < 13 {
			status = scenarios.StatusTooWeak
		}
		res.Report.Targets = append(res.Report.Targets, scenarios.TargetReport{ID: t.ID, RangeM: r, SNRDB: snr, Status: status, Reason: "made up by the test's fake evaluator"})
		p := math.Pow(10, snr/10)
		for k := range clean {
			x := (res.Series.RangeM0 + float64(k)*step - r) / res4
			sinc := 1.0
			if x != 0 {
				sinc = math.Sin(math.Pi*x) / (math.Pi * x)
			}
			clean[k] += p * sinc * sinc
		}
	}
	for k := range n {
		noise := complex(rng.NormFloat64(), rng.NormFloat64()) / math.Sqrt2
		sig := complex(math.Sqrt(clean[k]), 0)
		res.Series.Echo[k] = noise + sig*complex(math.Cos(float64(k)), math.Sin(float64(k)))
		res.Series.ProfileDB[k] = 10 * math.Log10(cmplx.Abs(noise+sig)*cmplx.Abs(noise+sig))
		res.Series.CleanDB[k] = 10 * math.Log10(clean[k]) // −Inf where no target reaches: the server must floor it
		res.Series.ThresholdDB[k] = 13
	}
	m := 1025
	res.Series.Response = scenarios.Response{RangeM: make([]float64, m), DB: make([]float64, m)}
	for k := range m {
		x := float64(k-m/2) / 8
		v := 1.0
		if x != 0 {
			v = math.Sin(math.Pi*x) / (math.Pi * x)
		}
		res.Series.Response.RangeM[k] = x * res4
		res.Series.Response.DB[k] = max(10*math.Log10(v*v), -120)
	}
	return res
}

// testLogger writes to the test log only with -v, so that failures stay
// readable.
func testLogger(tb testing.TB) *slog.Logger {
	if testing.Verbose() {
		return slog.New(slog.NewTextHandler(os.Stderr, &slog.HandlerOptions{Level: slog.LevelInfo}))
	}
	return slog.New(slog.NewTextHandler(io.Discard, nil))
}

// mustServer starts a server on an httptest listener with a fake
// evaluator; edit adjusts the config.
func mustServer(tb testing.TB, eval *fakeEval, edit func(*Config)) (*Server, *httptest.Server) {
	tb.Helper()
	if eval == nil {
		eval = &fakeEval{}
	}
	cfg := Config{DataDir: tb.TempDir(), Static: fstest.MapFS{"index.html": {Data: []byte("<!doctype html><title>page</title>")}}}
	if edit != nil {
		edit(&cfg)
	}
	s, err := New(cfg, testLogger(tb), eval.Evaluate)
	if err != nil {
		tb.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	tb.Cleanup(func() {
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		if err := s.Close(ctx); err != nil {
			tb.Error(err)
		}
		ts.Close()
	})
	return s, ts
}

// testRequest sends one request and returns the response and its body.
func testRequest(tb testing.TB, ts *httptest.Server, method, path, body string, hdr ...string) (*http.Response, string) {
	tb.Helper()
	req, err := http.NewRequest(method, ts.URL+path, strings.NewReader(body))
	if err != nil {
		tb.Fatal(err)
	}
	if body != "" {
		req.Header.Set("Content-Type", "application/json")
	}
	for i := 0; i+1 < len(hdr); i += 2 {
		req.Header.Set(hdr[i], hdr[i+1])
	}
	client := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	resp, err := client.Do(req)
	if err != nil {
		tb.Fatal(err)
	}
	defer resp.Body.Close()
	data, err := io.ReadAll(resp.Body)
	if err != nil {
		tb.Fatal(err)
	}
	return resp, string(data)
}

func mustDemoJSON(tb testing.TB, name string) string {
	tb.Helper()
	d, err := scenarios.LoadDemo(name)
	if err != nil {
		tb.Fatal(err)
	}
	data, err := scenarios.Canonical(d.Scenario)
	if err != nil {
		tb.Fatal(err)
	}
	return string(data)
}

func ptr(v float64) *float64 { return &v }
