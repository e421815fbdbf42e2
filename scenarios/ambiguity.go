package scenarios

import (
	"context"
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// AmbiguitySurface is |χ(τ, f_d)| of the transmitted pulse on a grid
// reduced for the screen: each cell holds the largest value of the full
// sample-lag grid that falls into it (max-hold), so no ridge or peak
// vanishes. Values are in dB relative to |χ(0,0)|, floored at −60 dB.
type AmbiguitySurface struct {
	DelayM      []float64   // column centres as range offsets c·τ/2, m
	DopplerHz   []float64   // row Doppler shifts, Hz
	DB          [][]float64 // DB[row][col]
	ZeroDoppler []float64   // the f_d = 0 cut, per column, dB
	ZeroDelay   []float64   // the τ = 0 cut, per row, dB
}

// Ambiguity limits.
const (
	MaxAmbiguityCols = 1024
	MaxAmbiguityRows = 512
)

const ambFloorDB = -60

// ambMaxSamples bounds the pulse samples of the ambiguity surface: each
// Doppler row costs two FFTs of about twice that.
const ambMaxSamples = 1 << 15

// ambiguityPulse returns the pulse sampled for the ambiguity surface and
// its rate: the internal grid of the waveform's figures (a code held at
// 8 or more samples per chip, FM at 8·B or more; docs/figures.md §4), and
// at least enough samples that every one of cols columns receives a
// delay of its own, so no column falls between two lags and draws a
// false null (issue 12: Barker 13 on 512 columns). Pulses longer than
// ambMaxSamples on that grid use the scenario's rate fs or the rate that
// fits, whichever is higher.
func ambiguityPulse(wave dsp.Waveform, fs float64, cols int) ([]complex128, float64) {
	tau := wave.Duration()
	need := (cols + 2) / 2 // samples for 2·(n−1)+1 ≥ cols lags
	if a, chip := chipValues(wave); a != nil {
		k := max(heldPerChip, (need+len(a)-1)/len(a))
		if k*len(a) > ambMaxSamples {
			k = max(1, ambMaxSamples/len(a))
			if float64(k)/chip < fs { // already long: keep the scenario's samples
				return dsp.Sample(nil, wave, fs, 0), fs
			}
		}
		return repeatChips(a, k), float64(k) / chip
	}
	rate := math.Max(math.Max(fmPerBandwidth*wave.Bandwidth(), fmMinSamples/tau), float64(need)/tau)
	if rate*tau > ambMaxSamples {
		rate = math.Max(ambMaxSamples/tau, fs)
	}
	return dsp.Sample(nil, wave, rate, 0), rate
}

// Ambiguity computes the ambiguity surface of a valid scenario's pulse
// over delays ±τ on cols columns and Doppler shifts over ±span on rows
// rows, where span is 4/τ, widened for FM pulses to show the range–
// Doppler ridge up to half the bandwidth (at most 25/τ).
func Ambiguity(ctx context.Context, s *Scenario, cols, rows int) (*AmbiguitySurface, error) {
	if cols < 3 || cols > MaxAmbiguityCols || rows < 3 || rows > MaxAmbiguityRows {
		return nil, fmt.Errorf("ambiguity grid %d×%d is outside 3…%d columns and 3…%d rows: %w", cols, rows, MaxAmbiguityCols, MaxAmbiguityRows, ErrInvalid)
	}
	wave, err := buildWaveform(s.Waveform)
	if err != nil {
		return nil, err
	}
	u, fs := ambiguityPulse(wave, s.Radar.SampleRateHz, cols)
	tau := s.Waveform.PulseWidth()
	span := 4 / tau
	if k := s.Waveform.Kind; k == KindLFM || k == KindNLFM || k == KindCostas {
		span = math.Min(math.Max(span, s.Waveform.Bandwidth()/2), 25/tau)
	}
	if rows%2 == 0 {
		rows++ // keep f_d = 0 on a row
	}
	out := &AmbiguitySurface{DopplerHz: make([]float64, rows), DB: make([][]float64, rows)}
	for i := range out.DopplerHz {
		out.DopplerHz[i] = span * (2*float64(i)/float64(rows-1) - 1)
	}
	delays := len(u) - 1
	if cols%2 == 0 {
		cols++ // keep τ = 0 in a column of its own
	}
	lagsPerCol := float64(2*delays+1) / float64(cols)
	out.DelayM = make([]float64, cols)
	for c := range out.DelayM {
		out.DelayM[c] = (float64(c) - float64(cols-1)/2) * lagsPerCol / fs * C / 2
	}
	row := make([][]float64, 1)
	row[0] = make([]float64, 2*delays+1)
	for i, nu := range out.DopplerHz {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		dsp.Ambiguity(row, u, fs, delays, []float64{nu})
		cells := make([]float64, cols)
		for j, v := range row[0] {
			// Lag j−delays maps to the column whose centre is nearest.
			c := int(math.Round(float64(j-delays)/lagsPerCol + float64(cols-1)/2))
			c = min(max(c, 0), cols-1)
			cells[c] = math.Max(cells[c], v)
		}
		for c, v := range cells {
			cells[c] = math.Max(20*math.Log10(v), ambFloorDB)
		}
		out.DB[i] = cells
	}
	mid := rows / 2
	out.ZeroDoppler = append([]float64(nil), out.DB[mid]...)
	out.ZeroDelay = make([]float64, rows)
	for i := range out.DB {
		out.ZeroDelay[i] = out.DB[i][cols/2]
	}
	return out, nil
}
