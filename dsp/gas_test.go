package dsp

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// propagationGolden reads testdata/golden/propagation.json (made by
// testdata/golden/propagation.py).
type propagationGolden struct {
	Gas []struct {
		FGHz   float64 `json:"f_ghz"`
		P      float64 `json:"p_hpa"`
		Rho    float64 `json:"rho_g_m3"`
		T      float64 `json:"t_k"`
		GammaO float64 `json:"gamma_o"`
		GammaW float64 `json:"gamma_w"`
	}
	ITU []struct {
		FGHz  float64 `json:"f_ghz"`
		P     float64 `json:"p_hpa"`
		Rho   float64 `json:"rho_g_m3"`
		T     float64 `json:"t_k"`
		What  string
		Value float64
		Tol   float64
	} `json:"itu_validation"`
	Sea []struct {
		FGHz     float64 `json:"f_ghz"`
		SeaState float64 `json:"sea_state"`
		Vertical bool
		PsiDeg   float64 `json:"psi_deg"`
		Sigma0DB float64 `json:"sigma0_db"`
	}
	Nathanson []struct {
		FGHz     float64 `json:"f_ghz"`
		SeaState float64 `json:"sea_state"`
		Vertical bool
		PsiDeg   float64 `json:"psi_deg"`
		Sigma0DB float64 `json:"sigma0_db"`
	}
	Deviation map[string]struct {
		Points int
		Mean   float64 `json:"mean_abs_dev_db"`
	} `json:"nathanson_deviation"`
}

func readPropagationGolden(t *testing.T) propagationGolden {
	t.Helper()
	b, err := os.ReadFile("../testdata/golden/propagation.json")
	if err != nil {
		t.Fatal(err)
	}
	var g propagationGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Gas) < 50 || len(g.ITU) < 10 || len(g.Sea) < 500 || len(g.Nathanson) < 500 {
		t.Fatalf("golden file holds %d gas, %d ITU, %d sea, %d Nathanson cases", len(g.Gas), len(g.ITU), len(g.Sea), len(g.Nathanson))
	}
	return g
}

// TestGasAttenuationITUValidation checks the model against the ITU's own
// validation examples for Recommendation ITU-R P.676-13 Annex 1 (ITU-R
// Study Group 3, CG-3M3J-13-ValEx-Rev5_1, sheet ITURP676-13_gamma; the
// values as ITU-Rpy's docs/validation/itur676_13_gamma0_table.html and
// itur676_13_gammaw_table.html reproduce them): at 1 GHz, 1013.25 hPa,
// 7.5 g/m³, 288.15 K, γo = 0.0053886581679065 and γw = 5.09046173249644e-05
// dB/km to full precision, and rows at 10 … 60 GHz as printed (6
// decimals), e.g. γw = 0.180442 dB/km at 23 GHz on the water line.
func TestGasAttenuationITUValidation(t *testing.T) {
	g := readPropagationGolden(t)
	for _, c := range g.ITU {
		o, w := GasAttenuation(c.FGHz, c.P, c.Rho, c.T)
		got := o
		if c.What == "gamma_w" {
			got = w
		}
		if math.Abs(got-c.Value) > c.Tol {
			t.Errorf("%s at %g GHz = %.16g dB/km, ITU validation %.16g (±%g)", c.What, c.FGHz, got, c.Value, c.Tol)
		}
	}
	// The total at 1 GHz, the first row's gamma_exact.
	o, w := GasAttenuation(1, 1013.25, 7.5, 288.15)
	if want := 0.0054395627852315; math.Abs(o+w-want) > 1e-14*want {
		t.Errorf("γ at 1 GHz = %.16g dB/km, ITU validation %.16g", o+w, want)
	}
}

// TestGasAttenuationGolden checks 76 frequencies and atmospheres against
// the independent Python model of testdata/golden/propagation.py.
func TestGasAttenuationGolden(t *testing.T) {
	g := readPropagationGolden(t)
	for _, c := range g.Gas {
		o, w := GasAttenuation(c.FGHz, c.P, c.Rho, c.T)
		if math.Abs(o-c.GammaO) > 1e-12*c.GammaO || math.Abs(w-c.GammaW) > 1e-12*c.GammaW+1e-300 {
			t.Errorf("f %g GHz, p %g hPa, ρ %g g/m³, T %g K: γo %.15g γw %.15g, golden %.15g %.15g", c.FGHz, c.P, c.Rho, c.T, o, w, c.GammaO, c.GammaW)
		}
	}
}

// TestGasAttenuationShape: the 60 GHz oxygen band (about 15 dB/km at sea
// level, P.676's Figure 1) and the 22.235 GHz water line; no water
// vapour, no γw; NaN for a temperature at or below 0 K.
func TestGasAttenuationShape(t *testing.T) {
	o60, _ := GasAttenuation(60, 1013.25, 7.5, 288.15)
	o10, w10 := GasAttenuation(10, 1013.25, 7.5, 288.15)
	_, w22 := GasAttenuation(22.235, 1013.25, 7.5, 288.15)
	if !(o60 > 10 && o60 < 20) || !(o60 > 1000*o10) {
		t.Errorf("oxygen at 60 GHz %.3g dB/km, at 10 GHz %.3g", o60, o10)
	}
	if !(w22 > 10*w10) {
		t.Errorf("water vapour at 22.235 GHz %.3g dB/km, at 10 GHz %.3g", w22, w10)
	}
	if _, w := GasAttenuation(10, 1013.25, 0, 288.15); w != 0 {
		t.Errorf("dry air: γw = %g, want 0", w)
	}
	if o, w := GasAttenuation(10, 1013.25, 7.5, 0); !math.IsNaN(o) || !math.IsNaN(w) {
		t.Errorf("T = 0 K: %g %g, want NaN", o, w)
	}
	if e := WaterVapourPressure(7.5, 288.15); math.Abs(e-7.5*288.15/216.7) > 1e-15 {
		t.Errorf("e = %g hPa", e)
	}
}
