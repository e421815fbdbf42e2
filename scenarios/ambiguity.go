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
	fs := s.Radar.SampleRateHz
	u := dsp.Sample(nil, wave, fs, 0)
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
