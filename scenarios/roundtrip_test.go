package scenarios

import (
	"encoding/json"
	"github.com/pulsewright/pulsewright/dsp"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

// randomScenario draws a scenario over every kind and optional field. It
// may be invalid (derived limits); callers keep the valid ones.
func randomScenario(r *rand.Rand) *Scenario {
	pick := func(xs []string) string { return xs[r.IntN(len(xs))] }
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*r.Float64() }
	s := &Scenario{Version: Version, Seed: r.Int64N(MaxSeed), Radar: defaultRadar(), Receiver: defaultReceiver()}
	if r.IntN(2) == 0 {
		s.Name = "scene ✓ " + string(rune('A'+r.IntN(26)))
		s.Notes = "notes with \"quotes\" and\nnew lines"
	}
	w := &s.Waveform
	w.Kind = pick(waveformKinds)
	switch w.Kind {
	case KindRect:
		w.PulseWidthS = u(1e-7, 1e-4)
	case KindLFM, KindNLFM:
		w.PulseWidthS = u(1e-6, 1e-4)
		w.BandwidthHz = u(1e6, 2e7)
		w.Sweep = pick(sweeps)
		if w.Kind == KindNLFM {
			w.Sweep = ""
			w.DesignSidelobeDB = math.Round(u(-60, -20))
		}
	case KindBarker:
		w.Length = []int{2, 3, 4, 5, 7, 11, 13}[r.IntN(7)]
	case KindMPS:
		w.Length = 2 + r.IntN(dsp.MPSMaxLen()-1)
	case KindMLS:
		w.Degree = 2 + r.IntN(9)
	case KindFrank, KindP1:
		m := 2 + r.IntN(10)
		w.Length = m * m
	case KindP2:
		m := 2 * (1 + r.IntN(5))
		w.Length = m * m
	case KindP3, KindP4:
		w.Length = 2 + r.IntN(200)
	case KindZadoffChu:
		w.Length, w.Root = 61, 1+r.IntN(60)
	case KindCostas:
		w.Length = []int{4, 6, 10, 12, 16, 18, 22}[r.IntN(7)]
	case KindPhaseCode:
		if r.IntN(2) == 0 {
			w.Binary = "++-+-"
		} else {
			w.PhasesDeg = []float64{0, 90.5, -45, 180, r.Float64() * 360}
		}
	case KindSamples:
		w.SampleRateHz = u(1e6, 4e7)
		w.BandwidthHz = w.SampleRateHz * u(0.2, 1)
		w.Samples = randomIQ(r, 1+r.IntN(40))
		w.Interpolation = pick(interpolations)
	}
	if r.IntN(8) == 0 {
		s.Receiver.Filter = FilterCustom
		taps := randomIQ(r, 1+r.IntN(30))
		s.Receiver.Taps = &taps
	}
	if w.Kind != KindRect && w.Kind != KindLFM && w.Kind != KindNLFM && w.Kind != KindSamples {
		w.ChipS = u(5e-8, 2e-6)
	}
	if r.IntN(2) == 0 {
		s.Radar.CarrierHz = u(1e9, 35e9)
		s.Radar.PeakPowerW = u(1, 1e6)
		s.Radar.Pulses = 1 + r.IntN(4)
		s.Radar.BeamwidthAzDeg = u(0.5, 5)
		s.Radar.AntennaHeightM = u(1, 500)
	}
	s.Radar.SampleRateHz = w.Bandwidth() * []float64{2, 2, 3.5, 1}[r.IntN(4)]
	s.Radar.PRIS = w.PulseWidth() * u(3, 20)
	s.Radar.WindowStartM = math.Round(u(0, 2000))
	s.Radar.WindowStopM = s.Radar.WindowStartM + u(100, C*s.Radar.PRIS/2)
	if r.IntN(3) == 0 {
		s.Radar.WindowStopM = C * s.Radar.PRIS / 2
	}
	if r.IntN(5) == 0 {
		// A stagger on a grid whose shortest PRI is pri_s, so the window
		// above still ends within it.
		d := s.Radar.PRIS / float64(4+r.IntN(5))
		n0 := math.Round(s.Radar.PRIS / d)
		s.Radar.PRIS = n0 * d
		s.Radar.PRIStaggerS = []float64{s.Radar.PRIS}
		for range 1 + r.IntN(3) {
			s.Radar.PRIStaggerS = append(s.Radar.PRIStaggerS, (n0+float64(1+r.IntN(4)))*d)
		}
		s.Radar.Pulses = max(s.Radar.Pulses, 2)
		s.Radar.WindowStopM = math.Min(s.Radar.WindowStopM, C*s.Radar.PRIS/2)
	}
	if r.IntN(2) == 0 {
		s.Receiver.Window = defaultWindow(pick(windowKinds))
		if s.Receiver.Window.Kind == WindowTaylor {
			s.Receiver.Window.NBar = 2 + r.IntN(8)
		}
	}
	if r.IntN(2) == 0 {
		s.Receiver.Detector = defaultDetector(pick(detectorKinds))
		s.Receiver.Detector.PFA = math.Pow(10, -float64(2+r.IntN(10)))
	}
	if r.IntN(3) == 0 {
		s.Receiver.DopplerWindow = defaultWindow(pick(windowKinds))
	}
	if r.IntN(3) == 0 {
		s.Radar.Pulses = 4 + r.IntN(60)
		s.Receiver.MTI = pick(mtis)
		if s.Receiver.Detector.Kind != DetectorFixed {
			s.Receiver.Detector.DopplerTrainingCells = 2 * r.IntN(5)
		}
	}
	if r.IntN(4) == 0 {
		sc := &Schedule{}
		for range 1 + r.IntN(3) {
			c := CPI{PRIS: s.Radar.PRIS * u(0.8, 1.3), Pulses: s.Radar.Pulses}
			if r.IntN(2) == 0 {
				c.Pulses += r.IntN(3)
			}
			sc.CPIs = append(sc.CPIs, c)
		}
		sc.M = 1 + r.IntN(sc.N())
		s.Radar.Schedule = sc
	}
	if r.IntN(4) == 0 {
		s.Radar.Scan = &Scan{RateDegS: u(0.5, 720), Plane: pick(scanPlanes), Pattern: pick(scanPatterns)}
	}
	for i := range r.IntN(6) {
		t := Target{ID: "t" + string(rune('a'+i)), Kind: pick(targetKinds), RangeRateMPS: math.Round(u(-300, 300))}
		switch t.Kind {
		case TargetPoint:
			t.RangeM, t.RCSDBsm, t.Fluctuation = u(0, 5e4), u(-20, 40), pick(fluctuations)
			if r.IntN(3) == 0 {
				t.HeightM = u(0, 100)
			}
		case TargetExtended:
			t.RangeStartM, t.RCSDBsmPerM = u(0, 5e4), u(-40, 0)
			t.RangeStopM = t.RangeStartM + u(1, 3000)
			switch r.IntN(4) {
			case 1:
				t.RCSDBsmPerM, t.Level, t.Sigma0DB = 0, LevelSigma0, u(-50, 0)
			case 2:
				if s.Radar.AntennaHeightM > 0 {
					t.RCSDBsmPerM, t.Level, t.GammaDB = 0, LevelGamma, u(-30, 0)
				}
			case 3:
				// The NRL sea model: inside its span of grazing angles.
				if h := s.Radar.AntennaHeightM; h > 0 && s.Radar.CarrierHz >= 0.5e9 && s.Radar.CarrierHz <= 35e9 {
					near, far := seaGrazingSpan(h)
					t.RCSDBsmPerM, t.Level, t.SeaState, t.Polarisation = 0, LevelSeaState, float64(r.IntN(7)), pick(seaPolarisations)
					t.RangeStartM = near + u(0, 1)*(far-near)/2
					t.RangeStopM = t.RangeStartM + u(0, 1)*(far-t.RangeStartM)
				}
			}
		case TargetVolume:
			t.RangeStartM, t.ReflectivityDBZ = u(0, 5e4), u(0, 60)
			t.RangeStopM = t.RangeStartM + u(1, 3000)
			t.VelocitySpreadMPS = u(0, 5)
		}
		if t.Kind != TargetPoint {
			t.Role = pick(roles)
		}
		s.Targets = append(s.Targets, t)
	}
	if r.IntN(4) == 0 {
		s.View = json.RawMessage(`{"zoom":[1,2],"plots":{"raw":true}}`)
	}
	// Format version 2's optional additions: antenna height, front end,
	// propagation.
	if r.IntN(3) == 0 {
		s.Radar.AntennaHeightM = u(1, 100)
	}
	f := &s.FrontEnd
	if r.IntN(3) == 0 {
		f.PhaseNoiseOffsetsHz, f.PhaseNoiseDBcHz = []float64{1e3, u(2e3, 1e6)}, []float64{u(-110, -90), u(-160, -130)}
	}
	if r.IntN(3) == 0 {
		f.ADCBits, f.ADCFullScaleDB = 1+r.IntN(24), u(0, 100)
	}
	if r.IntN(3) == 0 {
		f.IQGainDB, f.IQPhaseDeg = u(-1, 1), u(-5, 5)
	}
	if r.IntN(4) == 0 {
		dc := u(-60, 10)
		f.DCOffsetDB = &dc
	}
	if r.IntN(3) == 0 {
		f.STCStartM = u(1, 5000)
		f.STCStopM, f.STCExponent = f.STCStartM+u(1, 2e4), float64(1+r.IntN(8))
	}
	s.Propagation = defaultPropagation()
	if r.IntN(3) == 0 {
		s.Radar.CarrierHz = u(1e9, 5e10)
		s.Propagation.RainRateMMH, s.Propagation.RainStartM, s.Propagation.RainPolarisation = u(0.1, 100), u(0, 1e4), pick(polarisations)
		s.Propagation.RainStopM = s.Propagation.RainStartM + u(1, 1e5)
	}
	if s.Radar.CarrierHz >= 1e9 && r.IntN(3) == 0 {
		s.Propagation.Gas = GasP676
		s.Propagation.AirTemperatureC, s.Propagation.AirPressureHPa, s.Propagation.WaterVapourGM3 = u(-40, 40), u(500, 1050), u(0, 20)
	}
	if s.Radar.AntennaHeightM > 0 && r.IntN(2) == 0 {
		s.Propagation.Multipath = "flat_sea"
	}
	return s
}

// randomIQ draws n samples as I and Q or as amplitude and phase.
func randomIQ(r *rand.Rand, n int) IQ {
	a, b := make([]float64, n), make([]float64, n)
	for k := range n {
		a[k], b[k] = r.NormFloat64(), r.NormFloat64()
	}
	if r.IntN(2) == 0 {
		for k := range n {
			a[k], b[k] = math.Abs(a[k])+0.1, 180*b[k]
		}
		return IQ{Amplitude: a, PhaseDeg: b}
	}
	return IQ{I: a, Q: b}
}

// TestRoundTripRandom is the property decode(encode(s)) == s over seeded
// random valid scenarios, for the canonical JSON and for share links.
func TestRoundTripRandom(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	valid := 0
	for i := 0; valid < 500 && i < 5000; i++ {
		s := randomScenario(r)
		if err := s.Validate(); err != nil {
			continue
		}
		valid++
		checkRoundTrip(t, s)
	}
	if valid < 500 {
		t.Fatalf("only %d valid scenarios drawn; the generator is broken", valid)
	}
}

func TestRoundTripDemos(t *testing.T) {
	ds, err := Demos()
	if err != nil {
		t.Fatal(err)
	}
	if len(ds) < 4 {
		t.Fatalf("%d demos, want at least 4", len(ds))
	}
	for _, d := range ds {
		t.Run(d.Name, func(t *testing.T) { checkRoundTrip(t, d.Scenario) })
	}
}

func checkRoundTrip(t *testing.T, s *Scenario) {
	t.Helper()
	data, err := Canonical(s)
	if err != nil {
		t.Fatal(err)
	}
	got, err := Decode(data)
	if err != nil {
		t.Fatalf("decode canonical %s: %v", data, err)
	}
	if !reflect.DeepEqual(got, s) {
		t.Fatalf("canonical round trip differs:\n got %+v\nwant %+v\njson %s", got, s, data)
	}
	again, _ := Canonical(got)
	if string(again) != string(data) {
		t.Fatalf("canonical form not stable:\n%s\n%s", data, again)
	}
	link, err := Link(s)
	if err != nil {
		t.Fatal(err)
	}
	fromLink, err := ParseLink("http://127.0.0.1:8750" + link)
	if err != nil {
		t.Fatalf("parse link: %v", err)
	}
	if !reflect.DeepEqual(fromLink, s) {
		t.Fatalf("link round trip differs:\n got %+v\nwant %+v", fromLink, s)
	}
}

// TestCanonicalOmitsDefaults checks the canonical form of a minimal
// scenario against the format document: defaults omitted, order kept.
func TestCanonicalOmitsDefaults(t *testing.T) {
	in := `{"waveform":{"bandwidth_hz":1e6,"kind":"lfm","pulse_width_s":1e-5,"sweep":"up"},"seed":1,"version":2,
		"receiver":{"filter":"matched","window":{"kind":"none"},"detector":{"kind":"ca_cfar","pfa":1e-6}},"view":{}}`
	s, err := Decode([]byte(in))
	if err != nil {
		t.Fatal(err)
	}
	got, _ := Canonical(s)
	want := `{"version":3,"waveform":{"kind":"lfm","pulse_width_s":0.00001,"bandwidth_hz":1000000}}`
	if string(got) != want {
		t.Fatalf("canonical:\n got %s\nwant %s", got, want)
	}
	if s.Radar.SampleRateHz != 2e6 || s.Radar.WindowStopM != C*1e-3/2 || s.Receiver.Detector.TrainingCells != 16 {
		t.Fatalf("derived defaults not filled: %+v", s.Radar)
	}
}
