package scenarios

import (
	"math"
	"math/cmplx"

	"github.com/pulsewright/pulsewright/dsp"
)

// Non-coherent integration (receiver.integration noncoherent;
// docs/detection.md §17). Each of the radar.pulses pulses of a uniform
// train is synthesised, compressed and square-law detected on its own,
// and the detected powers of each range gate are summed (video
// integration). The profile the detector tests is that sum divided by
// the number of pulses N: noise alone then has mean 1 at every gate, as
// a single pulse's profile, so the noise-free scene power and the
// thresholds keep their single-pulse units; the fixed threshold is
// T/N with Q(N, T) = Pfa (fixedLevel) and a CA-CFAR's multiplier holds
// Pfa for M reference cells that are each the mean of N pulses
// (dsp.CFAR.Pulses). No Doppler filter runs: there is no range–Doppler
// map.
//
// Pulse p of the train is the single pulse of the scene, with:
//   - its own thermal noise (the stream pulse p of a coherent train uses);
//   - a point target's range advanced by its range rate over p·PRI, its
//     amplitude scaled by the R⁴ law for that range and its carrier phase
//     turned by the two-way path change (what a coherent train would
//     integrate; here the phase matters only where echoes overlap);
//   - Swerling 1 and 3 amplitudes drawn once per train, Swerling 2 and 4
//     per pulse (the coherent train's draws, pulse for pulse);
//   - clutter advanced to pulse p as in the coherent train (each
//     scatterer's own Doppler), so that it decorrelates from pulse to
//     pulse as its velocity spread says.
//
// Pulse 0 is exactly the single pulse Evaluate synthesises for the same
// scenario with radar.pulses 1, except for the noise stream.

// nciPower writes the non-coherently integrated power of gates 0 … n−1
// into p (len n; the mean over the pulses of |y|² re the output noise of
// one pulse), synthesising each pulse into x and compressing it into y
// (y nil: allocated) on up to workers goroutines. It returns pulse 0's
// raw echo (x past the lead zeros): the pulses are synthesised last to
// first.
func (sc *scene) nciPower(workers int, x, y []complex128, p []float64) []complex128 {
	m := sc.m
	r := m.s.Radar
	np := r.Pulses
	if m.winCorr == nil || m.winCorr.Len() != len(x) {
		m.winCorr = dsp.NewCorrelatorWorkers(m.ref, len(x), workers)
	}
	if y == nil {
		y = make([]complex128, len(x))
	}
	targets := sc.targets
	// Amplitudes per target and pulse (train.simulate's draws).
	amps := make([][]float64, len(targets))
	fields := make([]*clutterField, len(targets))
	pns := make([]*pnEcho, len(targets))
	for j, g := range targets {
		pns[j] = sc.fe.newPNEcho(m, g, np, m.s.Seed)
		if g.density != nil {
			fields[j] = sc.newClutterField(g)
			fields[j].pn = pns[j]
		}
		if g.t.Kind != TargetPoint || !(g.amp > 0) {
			continue
		}
		amps[j] = make([]float64, np)
		rng := streamOf(m.s.Seed, g.t.ID, 0x5157)
		fl := swerling(g.t.Fluctuation)
		a := math.Sqrt(dsp.SwerlingRCS(rng, 1, fl))
		for q := range np {
			if q > 0 && (fl == dsp.Swerling2 || fl == dsp.Swerling4) {
				a = math.Sqrt(dsp.SwerlingRCS(rng, 1, fl))
			}
			amps[j][q] = a
		}
	}
	clear(p[:m.n])
	inv := 1 / (m.noiseGain * float64(np))
	var echo []complex128
	for q := np - 1; q >= 0; q-- {
		clear(x)
		echo = x[m.lead:]
		t := float64(q) * r.PRIS
		for j, g := range targets {
			switch {
			case amps[j] != nil:
				walk := g.t.RangeRateMPS * t
				rp := g.t.RangeM + walk
				if rp <= 0 {
					continue
				}
				ph := g.phase * cmplx.Rect(1, -4*math.Pi*math.Mod(walk/m.lambda, 1))
				amp := complex(g.amp*math.Pow(g.t.RangeM/rp, 2)*amps[j][q], 0) * ph
				delay := g.delay + 2*walk/C
				if pns[j] != nil {
					m.addPointEchoPN(echo, pns[j], g.t.ID, q, delay, amp, g.fd)
				} else {
					m.addPointEcho(echo, delay, amp, g.fd)
				}
			case fields[j] != nil:
				fields[j].add(echo, q)
			}
		}
		sc.fe.stcShape(m, echo, 0)
		addNoise(echo, m.s.Seed, 0x4e01+uint64(q)<<24)
		sc.fe.receive(echo)
		sc.blank(echo, 0)
		y = m.winCorr.Apply(y, x)
		for k := range p[:m.n] {
			v := y[k]
			p[k] += (real(v)*real(v) + imag(v)*imag(v)) * inv
		}
	}
	return echo
}

// nciWarnings warns of point targets that move more than a range
// resolution cell during the integrated train: the verdict takes them at
// one gate, while the simulated pulses (and so the integrated profile)
// spread their echo over several.
func (sc *scene) nciWarnings() {
	m := sc.m
	r := m.s.Radar
	for _, g := range sc.targets {
		if g.t.Kind != TargetPoint {
			continue
		}
		if move := math.Abs(g.t.RangeRateMPS) * r.pulseTime(r.Pulses); move > m.resolution() {
			m.warn("target %s moves %.1f m during the %d integrated pulses, more than the %.1f m resolution: its echo migrates across range cells, which the integrated profile shows and its Pd (taken at one gate) does not", g.t.ID, move, r.Pulses, m.resolution())
		}
	}
}
