// Package dsp is the numerical core of Pulsewright: pulse-compression
// waveforms, weighting windows, matched and mismatched filters, figures of
// merit, Doppler response and the ambiguity function.
//
// # Conventions
//
// Signals are complex baseband, []complex128, sampled at a rate fs in Hz.
// Times are in seconds, frequencies in Hz, ranges in metres, powers in
// linear units unless a name ends in DB (decibels, 10·log10 of a power
// ratio). A transmitted pulse is a continuous-time complex envelope u(t)
// defined for 0 ≤ t < τ and zero elsewhere; t is measured from the
// leading edge. A Doppler shift f_d multiplies an echo by exp(+j2π·f_d·t):
// f_d > 0 is a closing target.
//
// Correlation follows the filter's time axis: the compressed output of a
// window x by a reference h is
//
//	y[k] = Σ_m x[k+m]·conj(h[m]),  k = 0 … len(x)−1,
//
// with x taken as zero beyond its end, so an echo whose leading edge is
// at sample d peaks at y[d]. Fourier transforms are unnormalised, as in
// gonum.org/v1/gonum/dsp/fourier. The correlation plans use the package's
// own FFTs: a Stockham FFT (fft.go; lengths with prime factors 2, 3 and
// 5) and, for the correlator's power-of-two blocks, an in-place
// depth-first FFT that leaves the spectrum in digit-reversed order for
// the product and its mirror inverse (fftconv.go). On amd64 processors
// with AVX2 and FMA the latter runs assembly kernels (fftconv_amd64.s,
// two butterflies per instruction, about 2.7× the pure Go kernels'
// speed); the pure Go kernels run elsewhere, or everywhere when built
// with -tags purego. Both plans, and both kernels, are tested against
// numpy.fft and gonum's to 1e-12 of the transform's norm; they run
// several times faster than gonum's.
//
// # Detection probability
//
// Detector computes the probability of detection of a square-law detector
// for a steady or Swerling 1–4 target, N pulses integrated non-coherently
// or coherently, with a known noise level or behind a cell-averaging or
// ordered-statistic CFAR, by one exact series (see pd.go); RequiredSNR
// inverts it, MarcumQ is the steady single case, and Albersheim and
// Shnidman give the published approximations as cross-checks. SNR there is
// always the mean SNR of one pulse; thresholds are in units of the noise
// power of one pulse, and CFAR multipliers apply to the mean of the
// reference cells (docs/detection-probability.md). PdInCell gives the
// probability that a cell holding several echoes (a target and a
// neighbour's sidelobe, clutter) crosses any such detector's threshold,
// their carrier phases uniform; VariantPd the Pd behind the greatest-of,
// smallest-of and censored CFARs.
//
// # Purity
//
// The package holds no globals, does no I/O and never logs. It starts no
// goroutines, with one exception approved for speed: a plan made by
// NewCorrelatorWorkers with more than one worker runs its overlap-save
// blocks on that many goroutines, which live only inside Apply and share
// only read-only tables and disjoint parts of the destination (and, when
// they share the last block, disjoint parts of one buffer, phase by
// phase; for one block length the result is the same to the last bit
// whatever the worker count). Random draws take an explicit *rand.Rand so that results are
// deterministic for a seed. Plans (types named …Plan or created by
// New…) own scratch buffers, are reusable and are not safe for
// concurrent use. Methods that fill a destination take it first and
// allocate only when it is nil; a destination of the wrong length is a
// programmer error and panics with a message prefixed "dsp: ". Invalid
// user parameters are reported as errors by constructors; callers (the
// scenarios package) validate user input before it reaches here.
package dsp
