package scenarios

import (
	"context"
	"fmt"
	"runtime"
	"strings"
	"testing"
)

// The scaling figures of bench/RESULTS.md ("Sharding: points per second
// and cost per point", and the same for Monte Carlo trials). Run them with
//
//	go test ./scenarios -run X -bench 'ShardThroughput|PointCost' -cpu 1,2 -benchtime 20x
//	go test ./scenarios -run X -bench 'TrialThroughput' -cpu 1,2 -benchtime 400x
//	go test ./scenarios -run X -bench 'TrialCost' -cpu 1 -benchtime 40x

// BenchmarkShardThroughput runs one shard of 16 points of the harbour
// scene (the skiff's range swept; the waveform and the reference reused
// between points, as in any sweep) on one worker per GOMAXPROCS: -cpu 1,2
// gives the points per second of one and two cores. The shard is 0/1, the
// whole grid; a shard K/N runs Len(16) of these points at the same rate.
func BenchmarkShardThroughput(b *testing.B) {
	d, err := LoadDemo("harbour-skiff")
	if err != nil {
		b.Fatal(err)
	}
	a, err := ParseAxis("targets[skiff].range_m=6100:6400:20")
	if err != nil {
		b.Fatal(err)
	}
	g := &Grid{Base: d.Scenario, Axes: []Axis{a}}
	n := g.Len()
	workers := runtime.GOMAXPROCS(0)
	b.ReportAllocs()
	cpu0 := processCPU()
	for b.Loop() {
		if err := g.RunShard(context.Background(), Whole, workers, func(Point) error { return nil }); err != nil {
			b.Fatal(err)
		}
	}
	per := b.Elapsed().Seconds() / float64(b.N*n)
	b.ReportMetric(1/per, "points/s")
	b.ReportMetric(per*1e3, "ms/point")
	if cpu := processCPU() - cpu0; cpu > 0 {
		b.ReportMetric(cpu.Seconds()*1e3/float64(b.N*n), "cpu-ms/point")
	}
}

// benchScene is an X-band scene of its own invention: an LFM of 10 µs and
// 10 MHz sampled at 20 MHz (about 133 samples per km of window), a Taylor
// window on receive, a PRI of 1 ms (150 km unambiguous), and targets
// point scatterers of 20 dBsm spread evenly over the middle three
// quarters of the receive window, strong enough to be detected at every
// size (a masked or undetected target costs more: its reason's suggested
// change is verified by a second evaluation). pulses above 1 make a
// range–Doppler map.
func benchScene(tb testing.TB, targets int, windowM float64, pulses int) *Scenario {
	tb.Helper()
	start := 3000.0
	ts := make([]string, targets)
	for i := range ts {
		r := start + windowM/8 + 0.75*windowM*float64(i)/float64(max(targets, 1))
		ts[i] = fmt.Sprintf(`{"id":"t%d","kind":"point","range_m":%g,"rcs_dbsm":20,"range_rate_mps":%d}`, i, r, -5*(i%7))
	}
	doc := fmt.Sprintf(`{"version":1,"seed":5,"radar":{"carrier_hz":9.4e9,"peak_power_w":20000,"sample_rate_hz":2e7,"pri_s":1e-3,"pulses":%d,"window_start_m":%g,"window_stop_m":%g},
		"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7},"receiver":{"window":{"kind":"taylor"}},"targets":[%s]}`,
		pulses, start, start+windowM, strings.Join(ts, ","))
	return mustDecode(tb, doc)
}

// BenchmarkPointCost is the cost of one sweep point as the scene grows
// along one dimension at a time from 4 targets, an 8 km window and one
// pulse: targets (1 … 64), window length (2 … 128 km, 270 … 17 000
// samples) and pulses (1 … 128). Each op is one point on one worker (one
// core), the engine warm (its waveform and reference reused), a target's
// range moved at each point as a range sweep does.
func BenchmarkPointCost(b *testing.B) {
	type size struct {
		name    string
		targets int
		windowM float64
		pulses  int
	}
	var sizes []size
	for _, n := range []int{1, 4, 16, 64} {
		sizes = append(sizes, size{fmt.Sprintf("targets=%d", n), n, 8000, 1})
	}
	for _, w := range []float64{2000, 8000, 32000, 128000} {
		sizes = append(sizes, size{fmt.Sprintf("window_km=%g", w/1000), 4, w, 1})
	}
	for _, p := range []int{1, 8, 32, 128} {
		sizes = append(sizes, size{fmt.Sprintf("pulses=%d", p), 4, 8000, p})
	}
	for _, sz := range sizes {
		b.Run(sz.name, func(b *testing.B) {
			s := benchScene(b, sz.targets, sz.windowM, sz.pulses)
			a, err := ParseAxis(fmt.Sprintf("targets[0].range_m=%g:%g:7", s.Targets[0].RangeM, s.Targets[0].RangeM+7*15))
			if err != nil {
				b.Fatal(err)
			}
			g := &Grid{Base: s, Axes: []Axis{a}}
			if err := g.Validate(context.Background()); err != nil {
				b.Fatal(err)
			}
			pts := make([]*Scenario, g.Len())
			for i := range pts {
				if pts[i], err = g.Scenario(i); err != nil {
					b.Fatal(err)
				}
			}
			var e Engine
			b.ReportAllocs()
			i := 0
			cpu0 := processCPU()
			for b.Loop() {
				if _, err := e.Analyse(context.Background(), pts[i%len(pts)]); err != nil {
					b.Fatal(err)
				}
				i++
			}
			b.ReportMetric(float64(s.WindowSamples()), "samples")
			b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/point")
			if cpu := processCPU() - cpu0; cpu > 0 {
				b.ReportMetric(cpu.Seconds()*1e3/float64(b.N), "cpu-ms/point")
			}
		})
	}
}

// BenchmarkTrialThroughput is the Monte Carlo side of the sizing figures
// (bench/RESULTS.md, "trials per second"): trials of the harbour demo on
// one worker per GOMAXPROCS, so -cpu 1,2 gives one and two cores. A trials
// shard runs its block of trials at the same rate: the partition only
// picks which trial indices it runs. One op is one trial; the scene is
// prepared once (NewTrials), as a shard does before its block.
func BenchmarkTrialThroughput(b *testing.B) {
	d, err := LoadDemo("harbour-skiff")
	if err != nil {
		b.Fatal(err)
	}
	benchTrials(b, d.Scenario, runtime.GOMAXPROCS(0))
}

// BenchmarkTrialCost is the cost of one Monte Carlo trial as the scene
// grows along one dimension at a time, the scenes of BenchmarkPointCost
// (from 4 targets, an 8 km window and one pulse): targets (1 … 64),
// window length (2 … 128 km) and pulses (1 … 128), on one worker.
func BenchmarkTrialCost(b *testing.B) {
	for _, sz := range []struct {
		name    string
		targets int
		windowM float64
		pulses  int
	}{
		{"targets=1", 1, 8000, 1}, {"targets=4", 4, 8000, 1}, {"targets=16", 16, 8000, 1}, {"targets=64", 64, 8000, 1},
		{"window_km=2", 4, 2000, 1}, {"window_km=32", 4, 32000, 1}, {"window_km=128", 4, 128000, 1},
		{"pulses=8", 4, 8000, 8}, {"pulses=32", 4, 8000, 32}, {"pulses=128", 4, 8000, 128},
	} {
		b.Run(sz.name, func(b *testing.B) {
			s := benchScene(b, sz.targets, sz.windowM, sz.pulses)
			b.ReportMetric(float64(s.WindowSamples()), "samples")
			benchTrials(b, s, 1)
		})
	}
}

// benchTrials runs b.N trials of s in one run on the given workers and
// reports trials per second and the wall and CPU time per trial.
func benchTrials(b *testing.B, s *Scenario, workers int) {
	tr, err := NewTrials(context.Background(), s)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	cpu0 := processCPU()
	b.ResetTimer()
	// One run of b.N trials: a run sets up each worker's plans once, as
	// a shard's block does.
	if _, err := tr.Run(context.Background(), 0, b.N, workers, nil); err != nil {
		b.Fatal(err)
	}
	b.StopTimer()
	per := b.Elapsed().Seconds() / float64(b.N)
	b.ReportMetric(1/per, "trials/s")
	b.ReportMetric(per*1e3, "ms/trial")
	if cpu := processCPU() - cpu0; cpu > 0 {
		b.ReportMetric(cpu.Seconds()*1e3/float64(b.N), "cpu-ms/trial")
	}
}
