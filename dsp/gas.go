package dsp

import "math"

// Attenuation by atmospheric gases: the line-by-line model of
// Recommendation ITU-R P.676-13 (08/2022), "Attenuation by atmospheric
// gases and related effects", Annex 1 §1, valid from 1 to 1000 GHz. The
// specific attenuation is
//
//	γ = γo + γw = 0.1820·f·(N″_oxygen(f) + N″_water vapour(f))  dB/km
//
// (Annex 1 eq. (1)), f in GHz, with N″ the imaginary part of the
// frequency-dependent complex refractivity: for oxygen the sum of its
// lines' strength S_i times shape F_i plus the dry continuum N″_D (the
// Debye spectrum of oxygen below 10 GHz and pressure-induced nitrogen
// absorption), for water vapour the sum over its lines:
//
//	θ = 300/T, e = ρ·T/216.7 (hPa)
//	oxygen:  S_i = a1·10⁻⁷·p·θ³·exp(a2·(1−θ))
//	         Δf = a3·10⁻⁴·(p·θ^(0.8−a4) + 1.1·e·θ),  Δf ← √(Δf² + 2.25·10⁻⁶)
//	         δ  = (a5 + a6·θ)·10⁻⁴·(p + e)·θ^0.8
//	water:   S_i = b1·10⁻¹·e·θ^3.5·exp(b2·(1−θ))
//	         Δf = b3·10⁻⁴·(p·θ^b4 + b5·e·θ^b6),  Δf ← 0.535·Δf + √(0.217·Δf² + 2.1316·10⁻¹²·f_i²/θ)
//	         δ  = 0
//	F_i = (f/f_i)·[(Δf − δ·(f_i − f))/((f_i − f)² + Δf²) + (Δf − δ·(f_i + f))/((f_i + f)² + Δf²)]
//	N″_D = f·p·θ²·[6.14·10⁻⁵/(d·(1 + (f/d)²)) + 1.4·10⁻¹²·p·θ^1.5/(1 + 1.9·10⁻⁵·f^1.5)],
//	       d = 5.6·10⁻⁴·(p + e)·θ^0.8
//
// with p the dry-air pressure (hPa), e the water-vapour partial pressure
// (hPa), T the temperature (K) and ρ the water-vapour density (g/m³). The
// line data are the Recommendation's Table 1 (44 oxygen lines, a1 … a6)
// and Table 2 (35 water-vapour lines, b1 … b6), transcribed from the data
// files of ITU-Rpy (github.com/inigodelportillo/ITU-Rpy, itur/data/676:
// v11_lines_oxygen.txt, the oxygen table P.676-13 keeps, and
// v13_lines_water_vapour.txt). Only eq. (1) is numbered here as read; the
// formulas above follow the Recommendation's Annex 1 §1 as that library
// transcribes them. Checked against the ITU's own validation examples
// (ITU-R Study Group 3, CG-3M3J-13-ValEx-Rev5_1, sheet ITURP676-13_gamma)
// to 10⁻¹⁴ relative in dsp/gas_test.go.

// GasTableGHz returns the frequency range of the line-by-line model, GHz.
func GasTableGHz() (lo, hi float64) { return 1, 1000 }

// WaterVapourPressure returns the partial pressure e (hPa) of water vapour
// of density rho (g/m³) at temperature t (K): e = ρ·T/216.7 (ITU-R P.676-13
// Annex 1 §1).
func WaterVapourPressure(rho, t float64) float64 { return rho * t / 216.7 }

// oxygenLines returns P.676-13 Annex 1 Table 1: f_i (GHz), a1 … a6 (a
// value, so the package holds no global).
func oxygenLines() [44][7]float64 {
	return [44][7]float64{
		{50.474214, 0.975, 9.651, 6.69, 0, 2.566, 6.85},
		{50.987745, 2.529, 8.653, 7.17, 0, 2.246, 6.8},
		{51.50336, 6.193, 7.709, 7.64, 0, 1.947, 6.729},
		{52.021429, 14.32, 6.819, 8.11, 0, 1.667, 6.64},
		{52.542418, 31.24, 5.983, 8.58, 0, 1.388, 6.526},
		{53.066934, 64.29, 5.201, 9.06, 0, 1.349, 6.206},
		{53.595775, 124.6, 4.474, 9.55, 0, 2.227, 5.085},
		{54.130025, 227.3, 3.8, 9.96, 0, 3.17, 3.75},
		{54.67118, 389.7, 3.182, 10.37, 0, 3.558, 2.654},
		{55.221384, 627.1, 2.618, 10.89, 0, 2.56, 2.952},
		{55.783815, 945.3, 2.109, 11.34, 0, -1.172, 6.135},
		{56.264774, 543.4, 0.014, 17.03, 0, 3.525, -0.978},
		{56.363399, 1331.8, 1.654, 11.89, 0, -2.378, 6.547},
		{56.968211, 1746.6, 1.255, 12.23, 0, -3.545, 6.451},
		{57.612486, 2120.1, 0.91, 12.62, 0, -5.416, 6.056},
		{58.323877, 2363.7, 0.621, 12.95, 0, -1.932, 0.436},
		{58.446588, 1442.1, 0.083, 14.91, 0, 6.768, -1.273},
		{59.164204, 2379.9, 0.387, 13.53, 0, -6.561, 2.309},
		{59.590983, 2090.7, 0.207, 14.08, 0, 6.957, -0.776},
		{60.306056, 2103.4, 0.207, 14.15, 0, -6.395, 0.699},
		{60.434778, 2438, 0.386, 13.39, 0, 6.342, -2.825},
		{61.150562, 2479.5, 0.621, 12.92, 0, 1.014, -0.584},
		{61.800158, 2275.9, 0.91, 12.63, 0, 5.014, -6.619},
		{62.41122, 1915.4, 1.255, 12.17, 0, 3.029, -6.759},
		{62.486253, 1503, 0.083, 15.13, 0, -4.499, 0.844},
		{62.997984, 1490.2, 1.654, 11.74, 0, 1.856, -6.675},
		{63.568526, 1078, 2.108, 11.34, 0, 0.658, -6.139},
		{64.127775, 728.7, 2.617, 10.88, 0, -3.036, -2.895},
		{64.67891, 461.3, 3.181, 10.38, 0, -3.968, -2.59},
		{65.224078, 274, 3.8, 9.96, 0, -3.528, -3.68},
		{65.764779, 153, 4.473, 9.55, 0, -2.548, -5.002},
		{66.302096, 80.4, 5.2, 9.06, 0, -1.66, -6.091},
		{66.836834, 39.8, 5.982, 8.58, 0, -1.68, -6.393},
		{67.369601, 18.56, 6.818, 8.11, 0, -1.956, -6.475},
		{67.900868, 8.172, 7.708, 7.64, 0, -2.216, -6.545},
		{68.431006, 3.397, 8.652, 7.17, 0, -2.492, -6.6},
		{68.960312, 1.334, 9.65, 6.69, 0, -2.773, -6.65},
		{118.750334, 940.3, 0.01, 16.64, 0, -0.439, 0.079},
		{368.498246, 67.4, 0.048, 16.4, 0, 0, 0},
		{424.76302, 637.7, 0.044, 16.4, 0, 0, 0},
		{487.249273, 237.4, 0.049, 16, 0, 0, 0},
		{715.392902, 98.1, 0.145, 16, 0, 0, 0},
		{773.83949, 572.3, 0.141, 16.2, 0, 0, 0},
		{834.145546, 183.1, 0.145, 14.7, 0, 0, 0},
	}
}

// waterVapourLines returns P.676-13 Annex 1 Table 2: f_i (GHz), b1 … b6.
func waterVapourLines() [35][7]float64 {
	return [35][7]float64{
		{22.23508, 0.1079, 2.144, 26.38, 0.76, 5.087, 1},
		{67.80396, 0.0011, 8.732, 28.58, 0.69, 4.93, 0.82},
		{119.99594, 0.0007, 8.353, 29.48, 0.7, 4.78, 0.79},
		{183.310087, 2.273, 0.668, 29.06, 0.77, 5.022, 0.85},
		{321.22563, 0.047, 6.179, 24.04, 0.67, 4.398, 0.54},
		{325.152888, 1.514, 1.541, 28.23, 0.64, 4.893, 0.74},
		{336.227764, 0.001, 9.825, 26.93, 0.69, 4.74, 0.61},
		{380.197353, 11.67, 1.048, 28.11, 0.54, 5.063, 0.89},
		{390.134508, 0.0045, 7.347, 21.52, 0.63, 4.81, 0.55},
		{437.346667, 0.0632, 5.048, 18.45, 0.6, 4.23, 0.48},
		{439.150807, 0.9098, 3.595, 20.07, 0.63, 4.483, 0.52},
		{443.018343, 0.192, 5.048, 15.55, 0.6, 5.083, 0.5},
		{448.001085, 10.41, 1.405, 25.64, 0.66, 5.028, 0.67},
		{470.888999, 0.3254, 3.597, 21.34, 0.66, 4.506, 0.65},
		{474.689092, 1.26, 2.379, 23.2, 0.65, 4.804, 0.64},
		{488.490108, 0.2529, 2.852, 25.86, 0.69, 5.201, 0.72},
		{503.568532, 0.0372, 6.731, 16.12, 0.61, 3.98, 0.43},
		{504.482692, 0.0124, 6.731, 16.12, 0.61, 4.01, 0.45},
		{547.67644, 0.9785, 0.158, 26, 0.7, 4.5, 1},
		{552.02096, 0.184, 0.158, 26, 0.7, 4.5, 1},
		{556.935985, 497, 0.159, 30.86, 0.69, 4.552, 1},
		{620.700807, 5.015, 2.391, 24.38, 0.71, 4.856, 0.68},
		{645.766085, 0.0067, 8.633, 18, 0.6, 4, 0.5},
		{658.00528, 0.2732, 7.816, 32.1, 0.69, 4.14, 1},
		{752.033113, 243.4, 0.396, 30.86, 0.68, 4.352, 0.84},
		{841.051732, 0.0134, 8.177, 15.9, 0.33, 5.76, 0.45},
		{859.965698, 0.1325, 8.055, 30.6, 0.68, 4.09, 0.84},
		{899.303175, 0.0547, 7.914, 29.85, 0.68, 4.53, 0.9},
		{902.611085, 0.0386, 8.429, 28.65, 0.7, 5.1, 0.95},
		{906.205957, 0.1836, 5.11, 24.08, 0.7, 4.7, 0.53},
		{916.171582, 8.4, 1.441, 26.73, 0.7, 5.15, 0.78},
		{923.112692, 0.0079, 10.293, 29, 0.7, 5, 0.8},
		{970.315022, 9.009, 1.919, 25.5, 0.64, 4.94, 0.67},
		{987.926764, 134.6, 0.257, 29.85, 0.68, 4.55, 0.9},
		{1780, 17506, 0.952, 196.3, 2, 24.15, 5},
	}
}

// GasAttenuation returns the specific attenuation of dry air (oxygen and
// the dry continuum) and of water vapour, dB/km, at fGHz (GHz) for dry-air
// pressure p (hPa), water-vapour density rho (g/m³) and temperature t
// (K), by ITU-R P.676-13 Annex 1 (see above). The total pressure is
// p + WaterVapourPressure(rho, t). Valid for 1 … 1000 GHz (GasTableGHz);
// the caller checks the inputs: it returns NaN for t ≤ 0.
func GasAttenuation(fGHz, p, rho, t float64) (oxygen, water float64) {
	if !(t > 0) {
		return math.NaN(), math.NaN()
	}
	th := 300 / t
	e := WaterVapourPressure(rho, t)
	f := fGHz
	shape := func(fi, df, delta float64) float64 {
		return f / fi * ((df-delta*(fi-f))/((fi-f)*(fi-f)+df*df) + (df-delta*(fi+f))/((fi+f)*(fi+f)+df*df))
	}
	var no float64
	for _, l := range oxygenLines() {
		s := l[1] * 1e-7 * p * th * th * th * math.Exp(l[2]*(1-th))
		df := l[3] * 1e-4 * (p*math.Pow(th, 0.8-l[4]) + 1.1*e*th)
		df = math.Sqrt(df*df + 2.25e-6)
		delta := (l[5] + l[6]*th) * 1e-4 * (p + e) * math.Pow(th, 0.8)
		no += s * shape(l[0], df, delta)
	}
	d := 5.6e-4 * (p + e) * math.Pow(th, 0.8)
	no += f * p * th * th * (6.14e-5/(d*(1+(f/d)*(f/d))) + 1.4e-12*p*math.Pow(th, 1.5)/(1+1.9e-5*math.Pow(f, 1.5)))
	var nw float64
	for _, l := range waterVapourLines() {
		s := l[1] * 1e-1 * e * math.Pow(th, 3.5) * math.Exp(l[2]*(1-th))
		df := l[3] * 1e-4 * (p*math.Pow(th, l[4]) + l[5]*e*math.Pow(th, l[6]))
		df = 0.535*df + math.Sqrt(0.217*df*df+2.1316e-12*l[0]*l[0]/th)
		nw += s * shape(l[0], df, 0)
	}
	return 0.1820 * f * no, 0.1820 * f * nw
}
