package scenarios

import (
	"fmt"
	"math"
	"strings"
)

// SI formats v with an SI prefix and a unit, to four significant digits:
// SI(2e-5, "s") is "20 µs".
func SI(v float64, unit string) string {
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

// Describe returns a short description of the waveform for people:
// "LFM up-chirp, τ 20 µs, B 10 MHz".
func (w Waveform) Describe() string {
	switch w.Kind {
	case KindRect:
		return fmt.Sprintf("rect, τ %s", SI(w.PulseWidthS, "s"))
	case KindLFM:
		return fmt.Sprintf("LFM %s-chirp, τ %s, B %s", w.Sweep, SI(w.PulseWidthS, "s"), SI(w.BandwidthHz, "Hz"))
	case KindNLFM:
		return fmt.Sprintf("NLFM designed for %.3g dB, τ %s, B %s", w.DesignSidelobeDB, SI(w.PulseWidthS, "s"), SI(w.BandwidthHz, "Hz"))
	case KindMLS:
		return fmt.Sprintf("MLS of degree %d, %d chips of %s", w.Degree, w.Chips(), SI(w.ChipS, "s"))
	case KindZadoffChu:
		return fmt.Sprintf("Zadoff–Chu root %d, %d chips of %s", w.Root, w.Chips(), SI(w.ChipS, "s"))
	case KindSamples:
		return describeSamples(w)
	}
	return fmt.Sprintf("%s, %d chips of %s", w.Kind, w.Chips(), SI(w.ChipS, "s"))
}

// Describe returns a short description of the window: "Taylor, −35 dB, n̄ 5".
func (w Window) Describe() string {
	switch w.Kind {
	case WindowTaylor:
		return fmt.Sprintf("Taylor, %.3g dB, n̄ %d", w.SidelobeDB, w.NBar)
	case WindowChebyshev:
		return fmt.Sprintf("Chebyshev, %.3g dB", w.SidelobeDB)
	case WindowKaiser:
		return fmt.Sprintf("Kaiser, β %.3g", w.Beta)
	case WindowGaussian:
		return fmt.Sprintf("Gaussian, σ %.3g", w.Sigma)
	}
	return w.Kind
}

// Describe returns a short description of the detector.
func (d Detector) Describe() string {
	switch d.Kind {
	case DetectorFixed:
		return fmt.Sprintf("fixed threshold, Pfa %.3g", d.PFA)
	case DetectorOS:
		return fmt.Sprintf("OS-CFAR, Pfa %.3g, %d guard, %d training, rank %d", d.PFA, d.GuardCells, d.TrainingCells, d.Rank)
	case DetectorGO, DetectorSO:
		return fmt.Sprintf("%s, Pfa %.3g, %d guard, %d training cells", detectorName(d), d.PFA, d.GuardCells, d.TrainingCells)
	case DetectorCens:
		return fmt.Sprintf("censored CA-CFAR, Pfa %.3g, %d guard, %d training, %d largest dropped", d.PFA, d.GuardCells, d.TrainingCells, d.CensoredCells)
	}
	return fmt.Sprintf("CA-CFAR, Pfa %.3g, %d guard, %d training cells", d.PFA, d.GuardCells, d.TrainingCells)
}

// Describe returns a short description of the target, without its id.
func (t Target) Describe() string {
	var s string
	switch t.Kind {
	case TargetPoint:
		s = fmt.Sprintf("point at %.6g m, %.3g dBsm", t.RangeM, t.RCSDBsm)
		if t.Fluctuation != "" && t.Fluctuation != FluctuationNone {
			s += ", " + t.Fluctuation
		}
	case TargetExtended:
		s = fmt.Sprintf("extended %.6g–%.6g m, %.3g dBsm/m", t.RangeStartM, t.RangeStopM, t.RCSDBsmPerM)
	case TargetVolume:
		s = fmt.Sprintf("volume %.6g–%.6g m, %.3g dBZ", t.RangeStartM, t.RangeStopM, t.ReflectivityDBZ)
	}
	if t.RangeRateMPS != 0 {
		s += fmt.Sprintf(", range rate %+.3g m/s", t.RangeRateMPS)
	}
	return s
}

// DescribeTargets counts targets by kind: "3 (2 point, 1 volume)".
func DescribeTargets(ts []Target) string {
	if len(ts) == 0 {
		return "none"
	}
	count := map[string]int{}
	for _, t := range ts {
		count[t.Kind]++
	}
	var parts []string
	for _, k := range targetKinds {
		if count[k] > 0 {
			parts = append(parts, fmt.Sprintf("%d %s", count[k], k))
		}
	}
	return fmt.Sprintf("%d (%s)", len(ts), strings.Join(parts, ", "))
}
