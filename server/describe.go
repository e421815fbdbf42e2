package server

import (
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/scenarios"
)

// si formats v with an SI prefix and unit: 2e-5, "s" → "20 µs".
func si(v float64, unit string) string {
	for _, p := range []struct {
		f float64
		p string
	}{{1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1, ""}, {1e-3, "m"}, {1e-6, "µ"}, {1e-9, "n"}, {1e-12, "p"}} {
		if math.Abs(v) >= p.f {
			return fmt.Sprintf("%.4g %s%s", v/p.f, p.p, unit)
		}
	}
	return fmt.Sprintf("%.4g %s", v, unit)
}

func waveformText(w scenarios.Waveform) string {
	switch w.Kind {
	case scenarios.KindRect:
		return fmt.Sprintf("rect, τ %s", si(w.PulseWidthS, "s"))
	case scenarios.KindLFM:
		return fmt.Sprintf("LFM %s-chirp, τ %s, B %s", w.Sweep, si(w.PulseWidthS, "s"), si(w.BandwidthHz, "Hz"))
	case scenarios.KindNLFM:
		return fmt.Sprintf("NLFM designed for %.3g dB, τ %s, B %s", w.DesignSidelobeDB, si(w.PulseWidthS, "s"), si(w.BandwidthHz, "Hz"))
	}
	return fmt.Sprintf("%s, %d chips of %s", w.Kind, w.Chips(), si(w.ChipS, "s"))
}

func windowText(w scenarios.Window) string {
	switch w.Kind {
	case scenarios.WindowTaylor:
		return fmt.Sprintf("Taylor, %.3g dB, n̄ %d", w.SidelobeDB, w.NBar)
	case scenarios.WindowChebyshev:
		return fmt.Sprintf("Chebyshev, %.3g dB", w.SidelobeDB)
	case scenarios.WindowKaiser:
		return fmt.Sprintf("Kaiser, β %.3g", w.Beta)
	case scenarios.WindowGaussian:
		return fmt.Sprintf("Gaussian, σ %.3g", w.Sigma)
	}
	return w.Kind
}

func detectorText(d scenarios.Detector) string {
	switch d.Kind {
	case scenarios.DetectorFixed:
		return fmt.Sprintf("fixed threshold, Pfa %.3g", d.PFA)
	case scenarios.DetectorOS:
		return fmt.Sprintf("OS-CFAR, Pfa %.3g, %d guard, %d training, rank %d", d.PFA, d.GuardCells, d.TrainingCells, d.Rank)
	}
	return fmt.Sprintf("CA-CFAR, Pfa %.3g, %d guard, %d training cells", d.PFA, d.GuardCells, d.TrainingCells)
}

func targetText(t scenarios.Target) string {
	var s string
	switch t.Kind {
	case scenarios.TargetPoint:
		s = fmt.Sprintf("point at %.6g m, %.3g dBsm", t.RangeM, t.RCSDBsm)
		if t.Fluctuation != "" && t.Fluctuation != scenarios.FluctuationNone {
			s += ", " + t.Fluctuation
		}
	case scenarios.TargetExtended:
		s = fmt.Sprintf("extended %.6g–%.6g m, %.3g dBsm/m", t.RangeStartM, t.RangeStopM, t.RCSDBsmPerM)
	case scenarios.TargetVolume:
		s = fmt.Sprintf("volume %.6g–%.6g m, %.3g dBZ", t.RangeStartM, t.RangeStopM, t.ReflectivityDBZ)
	}
	if t.RangeRateMPS != 0 {
		s += fmt.Sprintf(", range rate %+.3g m/s", t.RangeRateMPS)
	}
	return s
}
