#!/usr/bin/python3
"""Golden values for dsp.CAEchoPd (dsp/cfarecho.go): the probability that one
cell-averaging CFAR test fires when the cell under test and its training
cells hold echoes, computed from the definition with scipy/numpy by a route
independent of the Go code.

Definition (docs/detection-probability.md §7). The complex outputs
y = (y_0 .. y_M) of the cell under test (index 0) and its M training cells
are circular complex Gaussian with mean mu (the echoes) and covariance R
(the noise), E[(y-mu)(y-mu)^H] = R. The test fires when
    D = |y_0|^2 - (alpha/M) * sum_{k>=1} |y_k|^2 > 0.
Route here (complex arithmetic throughout; the Go code works in a real
embedding and factors R by its eigen-decomposition):
  R = C C^H (scipy.linalg.cholesky, lower), y = mu + C w, w ~ CN(0, I);
  D = (w + b)^H H (w + b), b = C^-1 mu, H = C^H A C, A = diag(1, -beta ..);
  H = U diag(lam) U^H (scipy.linalg.eigh), nu = U^H b;
  for z ~ CN(nu, 1), E exp(i t lam |z|^2) = exp(i lam t |nu|^2/(1 - i lam t))
  / (1 - i lam t) (the non-central chi-square with two degrees of freedom),
  so phi(t) = prod_j of that; Gil-Pelaez (Biometrika 38, 1951):
  P(D > 0) = 1/2 + (1/pi) int_0^inf Im phi(t)/t dt  (Imhof, Biometrika 48,
  1961), by scipy.integrate.quad on a geometric grid of pieces plus a last
  piece to infinity.
Second, coarser check: a seeded numpy Monte Carlo of 10^6 draws of y.

Fluctuating targets ("fluct", dsp.CAEchoTest.PdTarget): the target's
amplitudes s at the cells scale by sqrt(x), its phase kept, x of mean 1:
Swerling 1 exponential (scipy.stats.expon), Swerling 3 Gamma(2, 1/2)
(scipy.stats.gamma); the other echoes b stay. Pd = E_x[P(D > 0 | mu =
sqrt(x) s + b)], by scipy.integrate.quad over x of the law's pdf times the
value above; the Monte Carlo draws x for every draw.

Cases: the noise correlation of a matched filter (an LFM of time-bandwidth
product 20 at 2 samples per 1/B, and a 13-chip Barker code at 2 samples a
chip), cells at the CUT 0 and training offsets +-(g+1 .. g+M/2) after g guard
cells (g = 0 puts the CUT's correlated neighbours into the training sum),
the target's own response a*rho(offset) in every cell, other echoes in
training cells, a random positive definite R with unequal powers, and
probabilities from about 1e-10 to 1 - 1e-9.

Run: cd testdata/golden && /usr/bin/python3 cfarecho.py   (writes cfarecho.json)
"""
import json

import numpy as np
import scipy
from scipy import integrate, linalg, stats


def lfm_ref(tb, os):
    n = int(round(tb * os))
    t = (np.arange(n) - (n - 1) / 2) / n           # in units of the pulse length
    return np.exp(1j * np.pi * tb * t ** 2)


def barker_ref(os):
    code = np.array([1, 1, 1, 1, 1, -1, -1, 1, 1, -1, 1, -1, 1], dtype=complex)
    return np.repeat(code, os)


def rho_of(h):
    """rho(m) = sum_n h[n] conj(h[n+m]) / sum |h|^2, m >= 0; rho(-m) = conj."""
    e = np.sum(np.abs(h) ** 2)
    r = np.array([np.sum(h[: len(h) - m] * np.conj(h[m:])) for m in range(len(h))]) / e

    def f(m):
        if abs(m) >= len(r):
            return 0j
        return r[m] if m >= 0 else np.conj(r[-m])
    return f


def offsets(guard, m):
    side = list(range(guard + 1, guard + 1 + m // 2))
    return [0] + [-k for k in reversed(side)] + side


def cov_from(rho, offs):
    n = len(offs)
    return np.array([[rho(offs[i] - offs[j]) for j in range(n)] for i in range(n)])


def pd_exact(mu, R, alpha):
    n = len(mu)
    m = n - 1
    A = np.diag([1.0] + [-alpha / m] * m)
    C = linalg.cholesky(R, lower=True)
    b = linalg.solve_triangular(C, mu, lower=True)
    lam, U = linalg.eigh(C.conj().T @ A @ C)
    nu2 = np.abs(U.conj().T @ b) ** 2

    def im_phi_over_t(t):
        z = 1 - 1j * lam * t
        logphi = np.sum(1j * lam * t * nu2 / z - np.log(z))
        return np.exp(logphi).imag / t

    # Pieces on a geometric grid around the scale 1/max|lam|, out to where
    # |phi| (which falls like t^-n) is negligible, then to infinity.
    s = 1 / np.max(np.abs(lam))
    edges = [0.0] + list(s * np.logspace(-8, 6, 57))
    total = 0.0
    for a, c in zip(edges[:-1], edges[1:]):
        v, _ = integrate.quad(im_phi_over_t, a, c, epsabs=1e-14, epsrel=1e-12, limit=400)
        total += v
    v, _ = integrate.quad(im_phi_over_t, edges[-1], np.inf, epsabs=1e-14, limit=400)
    total += v
    return 0.5 + total / np.pi


def pd_mc(mu, R, alpha, draws, rng):
    n = len(mu)
    m = n - 1
    C = np.linalg.cholesky(R)
    hits = 0
    for _ in range(draws // 100000):
        w = (rng.standard_normal((100000, n)) + 1j * rng.standard_normal((100000, n))) / np.sqrt(2)
        y = mu + w @ C.T
        p = np.abs(y) ** 2
        hits += int(np.sum(p[:, 0] - alpha / m * np.sum(p[:, 1:], axis=1) > 0))
    return hits / draws


def pd_fluct(law, s, b, R, alpha):
    dist = stats.expon() if law == 1 else stats.gamma(2, scale=0.5)
    f = lambda x: dist.pdf(x) * pd_exact(np.sqrt(x) * s + b, R, alpha)
    hi = dist.isf(1e-13)
    v, _ = integrate.quad(f, 0, hi, epsabs=1e-11, epsrel=1e-10, limit=200)
    return v


def pd_fluct_mc(law, s, b, R, alpha, draws, rng):
    n = len(s)
    m = n - 1
    C = np.linalg.cholesky(R)
    hits = 0
    for _ in range(draws // 100000):
        x = rng.exponential(1.0, 100000) if law == 1 else rng.gamma(2.0, 0.5, 100000)
        w = (rng.standard_normal((100000, n)) + 1j * rng.standard_normal((100000, n))) / np.sqrt(2)
        y = np.sqrt(x)[:, None] * s + b + w @ C.T
        p = np.abs(y) ** 2
        hits += int(np.sum(p[:, 0] - alpha / m * np.sum(p[:, 1:], axis=1) > 0))
    return hits / draws


def alpha_richards(pfa, m):
    return m * (pfa ** (-1.0 / m) - 1)


def main():
    rng = np.random.default_rng(20261203)
    lfm = rho_of(lfm_ref(20, 2))
    bark = rho_of(barker_ref(2))
    cases = []

    def add(name, offs_or_R, rho, alpha, mu):
        R = offs_or_R if rho is None else cov_from(rho, offs_or_R)
        mu = np.asarray(mu, dtype=complex)
        pd = pd_exact(mu, R, alpha)
        mc = pd_mc(mu, R, alpha, 10 ** 6, rng)
        cases.append({
            "name": name, "alpha": alpha,
            "cov_re": R.real.tolist(), "cov_im": R.imag.tolist(),
            "mu_re": mu.real.tolist(), "mu_im": mu.imag.tolist(),
            "pd": pd, "mc": mc, "mc_draws": 10 ** 6,
        })
        print(f"{name:48s} pd {pd:.12g}  mc {mc:.6f}")

    def target(rho, offs, amp, at=0):
        return [amp * rho(o - at) for o in offs]

    # 1. LFM, 16 training cells, guard 2: the target's own sidelobes.
    offs = offsets(2, 16)
    a = alpha_richards(1e-6, 16)
    add("lfm g2 M16 noise only", offs, lfm, a, np.zeros(17))
    add("lfm g2 M16 target 15 dB", offs, lfm, a, target(lfm, offs, 10 ** (15 / 20) * np.exp(0.7j)))
    # 2. Guard 0: the CUT's neighbours (correlated with it) are training cells.
    offs = offsets(0, 8)
    a = alpha_richards(1e-4, 8)
    add("lfm g0 M8 noise only", offs, lfm, a, np.zeros(9))
    add("lfm g0 M8 target 16 dB (self-masked)", offs, lfm, a, target(lfm, offs, 10 ** (16 / 20)))
    offs = offsets(0, 16)
    a = alpha_richards(1e-2, 16)
    add("lfm g0 M16 pfa 1e-2 target 8 dB", offs, lfm, a, target(lfm, offs, 10 ** (8 / 20) * np.exp(-0.4j)))
    # 3. A strong echo in the training cells (12 cells away) masking a target.
    offs = offsets(1, 24)
    a = alpha_richards(1e-6, 24)
    mu = np.array(target(lfm, offs, 10 ** (14 / 20) * np.exp(0.3j))) \
        + np.array(target(lfm, offs, 10 ** (8 / 20) * np.exp(2.1j), at=9))
    add("lfm g1 M24 target 14 dB, 8 dB echo at +9", offs, lfm, a, mu)
    mu = np.array(target(lfm, offs, 10 ** (15 / 20))) \
        + np.array(target(lfm, offs, 10 ** (8 / 20) * np.exp(-1.0j), at=-5)) \
        + np.array(target(lfm, offs, 10 ** (6 / 20) * np.exp(0.4j), at=6))
    add("lfm g1 M24 target 15 dB, two echoes", offs, lfm, a, mu)
    # 4. Barker code: flat sidelobes, correlated chips.
    offs = offsets(1, 12)
    a = alpha_richards(1e-5, 12)
    add("barker g1 M12 target 13 dB", offs, bark, a, target(bark, offs, 10 ** (13 / 20) * np.exp(-2.0j)))
    mu = np.array(target(bark, offs, 10 ** (13 / 20))) + np.array(target(bark, offs, 10 ** (8 / 20) * 1j, at=4))
    add("barker g1 M12 target 13 dB, echo at +4", offs, bark, a, mu)
    # 5. Tiny: noise only at Pfa 1e-10 behind 32 correlated cells; a weak target.
    offs = offsets(2, 32)
    a = alpha_richards(1e-10, 32)
    add("lfm g2 M32 pfa 1e-10 noise only", offs, lfm, a, np.zeros(33))
    add("lfm g2 M32 pfa 1e-10 target 3 dB", offs, lfm, a, target(lfm, offs, 10 ** (3 / 20)))
    # 6. Large: a strong target.
    offs = offsets(2, 16)
    a = alpha_richards(1e-6, 16)
    add("lfm g2 M16 target 21 dB", offs, lfm, a, target(lfm, offs, 10 ** (21 / 20) * np.exp(1.3j)))
    # 7. Random positive definite R with unequal powers, random means.
    for k, m in enumerate([4, 10]):
        n = m + 1
        G = (rng.standard_normal((n, n)) + 1j * rng.standard_normal((n, n))) / np.sqrt(2 * n)
        R = G @ G.conj().T + 0.3 * np.diag(rng.uniform(0.5, 2, n))
        mu = (rng.standard_normal(n) + 1j * rng.standard_normal(n)) * 1.5
        mu[0] *= 3
        mu[1:] *= 0.4
        add(f"random R M{m} #{k}", R, None, alpha_richards(1e-3, m), mu)
    # 8. Independent cells, echo only in one training cell (Richards' model
    # with one interferer) for a small M.
    R = np.eye(5, dtype=complex)
    add("independent M4 interferer", R, None, alpha_richards(1e-3, 4), [4.0, 0, 1.5j, 0, 0])

    fluct = []

    def add_fluct(name, law, offs, rho, alpha, s, b):
        R = cov_from(rho, offs)
        s, b = np.asarray(s, dtype=complex), np.asarray(b, dtype=complex)
        pd = pd_fluct(law, s, b, R, alpha)
        mc = pd_fluct_mc(law, s, b, R, alpha, 10 ** 6, rng)
        fluct.append({
            "name": name, "swerling": law, "alpha": alpha,
            "cov_re": R.real.tolist(), "cov_im": R.imag.tolist(),
            "target_re": s.real.tolist(), "target_im": s.imag.tolist(),
            "others_re": b.real.tolist(), "others_im": b.imag.tolist(),
            "pd": pd, "mc": mc, "mc_draws": 10 ** 6,
        })
        print(f"{name:48s} pd {pd:.12g}  mc {mc:.6f}")

    # A fluctuating target with its own range response in the training
    # cells (guard 1: its mainlobe's shoulders train), alone and beside a
    # steady echo whose sidelobes reach its cells.
    offs = offsets(1, 16)
    a = alpha_richards(1e-5, 16)
    s1 = target(lfm, offs, 10 ** (17 / 20) * np.exp(0.5j))
    echo = target(lfm, offs, 10 ** (12 / 20) * np.exp(-2.2j), at=7)
    add_fluct("swerling1 lfm g1 M16 17 dB", 1, offs, lfm, a, s1, np.zeros(17))
    add_fluct("swerling1 lfm g1 M16 17 dB, 12 dB echo at +7", 1, offs, lfm, a, s1, echo)
    add_fluct("swerling3 lfm g1 M16 17 dB, 12 dB echo at +7", 3, offs, lfm, a, s1, echo)
    # Guard 0 behind a Barker code: the echo two cells away in the CUT too.
    offs = offsets(0, 12)
    a = alpha_richards(1e-3, 12)
    s3 = target(bark, offs, 10 ** (14 / 20))
    echo = target(bark, offs, 10 ** (9 / 20) * 1j, at=2)
    add_fluct("swerling3 barker g0 M12 14 dB, 9 dB echo at +2", 3, offs, bark, a, s3, echo)

    with open("cfarecho.json", "w") as f:
        json.dump({"numpy": np.__version__, "scipy": scipy.__version__, "cases": cases, "fluct": fluct}, f, indent=1)


if __name__ == "__main__":
    main()
