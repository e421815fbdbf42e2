package server

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The waveform designer's charts: the transmitted pulse, its spectrum,
// the receive filter's taps and the Doppler tolerance, made from
// scenarios.WavePlots. They depend on the waveform, the receiver and the
// sample rate only, so they are static charts cached like the ambiguity
// surface.

// Chart names and series ids of the designer's charts.
const (
	ChartPulse    = "pulse"
	ChartSpectrum = "spectrum"
	ChartFilter   = "filter"
	ChartDoppler  = "doppler"

	SeriesPhase     = "phase"
	SeriesFrequency = "frequency"
	SeriesSpectrum  = "spectrum"
	SeriesTapAmp    = "tap-amplitude"
	SeriesTapPhase  = "tap-phase"
	SeriesLoss      = "doppler-loss"
	SeriesShift     = "range-shift"
)

// wavePointsPx is the plot width the designer's series are decimated for
// (min/max per column, two points per pixel): a plot is at most half the
// page.
const wavePointsPx = 800

// xy encodes the pairs (xs[i]·xScale, ys[i]·yScale) as [[x,y],…] with the
// given decimals, min/max-decimated to wavePointsPx columns.
func xy(xs, ys []float64, xScale, yScale float64, xDec, yDec int) []byte {
	n := min(len(xs), len(ys))
	g := grid{n: n, xs: xs[:n]}
	p := decimate(g, func(k int) float64 { return clampAmp(ys[k] * yScale) }, span{lo: 0, hi: n, columns: wavePointsPx})
	b := make([]byte, 0, 24*len(p)/2+2)
	b = append(b, '[')
	for i := 0; i+1 < len(p); i += 2 {
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, '[')
		b = appendFixed(b, clampAmp(p[i]*xScale), xDec)
		b = append(b, ',')
		b = appendFixed(b, p[i+1], yDec)
		b = append(b, ']')
	}
	return append(b, ']')
}

func degrees(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x * 180 / math.Pi
	}
	return out
}

// waveCharts makes the four designer's charts; version keeps keys unique.
func waveCharts(w *scenarios.WavePlots, version int) []chartOut {
	key := func(name string) string { return fmt.Sprintf("%s/%d", name, version) }
	// The pulse: phase, and instantaneous frequency, against time.
	phaseName, phaseY, phase := "phase (unwrapped)", "phase (rad)", xy(w.TimeS, w.PhaseRad, 1e6, 1, 4, 3)
	if w.PhaseWrapped {
		phaseName, phaseY, phase = "phase", "phase (°)", xy(w.TimeS, degrees(w.PhaseRad), 1e6, 1, 4, 1)
	}
	freqTitle := "instantaneous frequency"
	if len(w.FreqHz) == 0 {
		freqTitle = "instantaneous frequency: none (a phase code jumps)"
	}
	pulse := twoCuts(ChartPulse, key(ChartPulse), [2]cutPlot{
		{title: "phase", xName: "time (µs)", yName: phaseY,
			lines: []cutLine{{SeriesPhase, phaseName, colourProfile, phase, 1.2}}},
		{title: freqTitle, xName: "time (µs)", yName: "MHz",
			lines: []cutLine{{SeriesFrequency, "frequency", colourI, xy(w.FreqTimeS, w.FreqHz, 1e6, 1e-6, 4, 4), 1.2}}},
	})
	// The filter's taps: amplitude and phase against time.
	tapUnit := "amplitude re largest tap"
	filter := twoCuts(ChartFilter, key(ChartFilter), [2]cutPlot{
		{title: "tap amplitude", xName: "time re echo (µs)", yName: tapUnit,
			lines: []cutLine{{SeriesTapAmp, strings.ReplaceAll(w.Filter, "_", " ") + " filter", colourProfile, xy(w.TapTimeS, w.TapAmp, 1e6, 1, 4, 4), 1.2}}},
		{title: "tap phase", xName: "time re echo (µs)", yName: "°",
			lines: []cutLine{{SeriesTapPhase, "phase", colourQ, xy(w.TapTimeS, degrees(w.TapPhaseRad), 1e6, 1, 4, 1), 1}}},
	})
	// The Doppler tolerance: peak loss and range shift against Doppler.
	doppler := twoCuts(ChartDoppler, key(ChartDoppler), [2]cutPlot{
		{title: "peak loss", xName: "Doppler shift (kHz)", yName: "dB",
			lines: []cutLine{{SeriesLoss, "loss", colourThreshold, xy(w.DopplerHz, w.DopplerLossDB, 1e-3, 1, 3, 3), 1.4}}},
		{title: "range–Doppler coupling", xName: "Doppler shift (kHz)", yName: "m",
			lines: []cutLine{{SeriesShift, "peak shift", colourProfile, xy(w.DopplerHz, w.DopplerShiftM, 1e-3, 1, 3, 3), 1.4}}},
	})
	out := []chartOut{pulse, spectrumChart(w, key(ChartSpectrum)), filter, doppler}
	for i := range out {
		out[i].static = true
	}
	return out
}

// spectrumChart plots the pulse's energy spectrum with the 99 % occupied
// band shaded and named.
func spectrumChart(w *scenarios.WavePlots, key string) chartOut {
	b := newBuilder("frequency re carrier (MHz)", "dB re peak", scenarios.SpectrumFloorDB)
	b.line.YAxisList[0].Max = 0.0
	b.add(SeriesSpectrum, "energy spectrum", colourProfile, xy(w.SpectrumHz, w.SpectrumDB, 1e-6, 1, 4, 2), opts.LineStyle{Width: 1.2})
	if bw := w.OccupiedBandwidthHz; bw > 0 {
		lo, hi := w.OccupiedHz[0]*1e-6, w.OccupiedHz[1]*1e-6
		b.extra[SeriesSpectrum] = seriesExtra{MarkArea: map[string]any{
			"silent":    true,
			"itemStyle": map[string]any{"color": colourClean, "opacity": 0.25},
			"label":     map[string]any{"show": true, "position": "insideTop", "color": "#1f3b52", "fontSize": 11},
			"data": [][2]map[string]any{{
				{"name": "99 % occupied: " + siHz(bw), "xAxis": math.Round(lo*1e4) / 1e4},
				{"xAxis": math.Round(hi*1e4) / 1e4}}},
		}}
	}
	// The spectrum spans ±fs/2; open on the occupied band and a margin
	// of its own width each side.
	var near *[2]float64
	if bw := w.OccupiedBandwidthHz * 1e-6; bw > 0 && len(w.SpectrumHz) > 1 {
		c := (w.OccupiedHz[0] + w.OccupiedHz[1]) / 2 * 1e-6
		a, z := math.Max(c-1.5*bw, w.SpectrumHz[0]*1e-6), math.Min(c+1.5*bw, slices.Max(w.SpectrumHz)*1e-6)
		near = &[2]float64{math.Round(a*1e4) / 1e4, math.Round(z*1e4) / 1e4}
	}
	b.line.SetGlobalOptions(charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Top: "2", Left: "64", ItemWidth: 18, ItemHeight: 10}))
	return b.buildZoomed(ChartSpectrum, key, near)
}

// siHz formats a frequency with three significant digits and an SI prefix.
func siHz(v float64) string {
	switch a := math.Abs(v); {
	case a >= 1e9:
		return fmt.Sprintf("%.3g GHz", v/1e9)
	case a >= 1e6:
		return fmt.Sprintf("%.3g MHz", v/1e6)
	case a >= 1e3:
		return fmt.Sprintf("%.3g kHz", v/1e3)
	}
	return fmt.Sprintf("%.3g Hz", v)
}

// wavePlots finds the designer's charts of the last good scenario when its
// waveform, receiver or sample rate changed, from the server's cache or by
// computing them. Charts that cannot be computed are logged and left out;
// only cancellation is an error.
func (ss *session) wavePlots(ctx context.Context, c *evalCache) error {
	w, err := json.Marshal(c.scn.Waveform)
	if err != nil {
		return err
	}
	rx, err := json.Marshal(c.scn.Receiver)
	if err != nil {
		return err
	}
	key := string(w) + "|" + string(rx) + "@" + strconv.FormatFloat(c.scn.Radar.SampleRateHz, 'g', -1, 64)
	if key == c.waveKey {
		return nil
	}
	ch, ok := ss.srv.waves.get(key)
	if !ok {
		p, err := scenarios.WaveformPlots(ctx, c.scn)
		switch {
		case ctx.Err() != nil:
			return ctx.Err()
		case err != nil:
			ss.log.Warn("waveform plots", "err", err)
			ch = nil
		default:
			ch = waveCharts(p, ss.srv.waves.version())
		}
		ss.srv.waves.put(key, ch)
	}
	c.wave, c.waveKey = ch, key
	return nil
}
