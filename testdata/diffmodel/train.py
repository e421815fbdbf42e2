#!/usr/bin/python3
"""The pulse-train part of the independent model: uniform-PRI and staggered
trains (`radar.pulses` > 1, `pri_stagger_s`) of point targets and PRF
schedules with M-of-N (`radar.schedule`, §11), from docs/detection.md §9
and §16 (the
slow-time plan, the expected range-Doppler map, the 2-D CFAR, the
verdict read over the peak bin's noise), §6-7 (statuses, masked_by),
§10 (the false-alarm rate of a map), docs/detection-probability.md §7
(one test at the integrated SNR) and the report format's "Pulse trains"
fields, never from the Go code.

It reuses model.py's waveform, filter, sampling and Pd functions and
writes its own scene, as clutter.py does.

Slow time (docs/detection.md §9, §16 with equal PRIs, scenario-format.md
"mti"): pulses x_0 .. x_{P-1} of one range gate; the binomial canceller
h (none [1], two_pulse [1, -1], three_pulse [1, -2, 1]) gives
y_q = sum_i h_i x_{q+l-1-i}, q = 0 .. M-1, M = P - l + 1; the Doppler
window w (the symmetric M-point window; see README "Ambiguities"); the
bank Y_d = s sum_q w_q y_q exp(-j 2 pi f_d q), f_d = (d - floor(M/2))/M
cycles per PRI, s = 1/sqrt(sum h^2 sum w^2). Y = A x; the bins' noise
covariance for white unit noise per pulse is C_d = A A^H, N(d) = C_d(d, d);
a target's gain g(d) = |A t|^2 for its tone t_p = exp(j 2 pi f_D PRI p).
"""
import math

import numpy as np
import scipy.optimize
import scipy.signal
import scipy.special
from scipy import integrate, stats

import model

C = model.C
MTI_TAPS = {"none": [1.0], "two_pulse": [1.0, -1.0], "three_pulse": [1.0, -2.0, 1.0]}


class Plan:
    """The slow-time plan of a uniform train."""

    def __init__(self, pulses, mti, dwin, pattern=None):
        """pattern: a staggered train's PRIs (docs/detection.md §16): pulse p
        at t_p = T_0 + ... + T_{p-1}, cycling; the bank is evaluated at the
        MTI outputs' true times t_{q+l-1} - t_{l-1} in mean PRIs."""
        h = np.array(MTI_TAPS[mti])
        l = len(h)
        M = pulses - l + 1
        w = model.window_sym(dwin, M)
        s = 1 / math.sqrt(np.sum(h ** 2) * np.sum(w ** 2))
        fbin = (np.arange(M) - M // 2) / M
        self.pattern = pattern
        if pattern is None:
            tq = np.arange(M, dtype=float)
            self.times = np.arange(pulses, dtype=float)  # in PRIs
        else:
            tb = sum(pattern) / len(pattern)
            tp = np.concatenate([[0.0], np.cumsum([pattern[p % len(pattern)] for p in range(pulses - 1)])])
            self.times = tp / tb  # in mean PRIs
            tq = self.times[l - 1:] - self.times[l - 1]
        F = np.exp(-2j * math.pi * np.outer(fbin, tq)) * w[None, :] * s  # M x M (bins x MTI outputs)
        H = np.zeros((M, pulses))  # MTI outputs x pulses
        for q in range(M):
            for i in range(l):
                H[q, q + l - 1 - i] = h[i]
        self.A = F @ H
        self.F, self.H = F, H
        self.M, self.P, self.h, self.w, self.s = M, pulses, h, w, s
        self.Cd = self.A @ self.A.conj().T
        self.N = np.real(np.diag(self.Cd)).copy()
        self.fbin = fbin

    def gain(self, fd_pri):
        """|A t|^2 per bin for the unit tone of fd_pri cycles per PRI. The
        canceller's output of a tone is the tone times H(f) = sum_i h_i
        exp(-j 2 pi f i), periodic in f: computed at f - round(f), so that
        a tone at a multiple of the PRF is cancelled exactly (H = sum h = 0),
        as the canceller cancels it."""
        if self.pattern is not None:  # fd_pri in cycles per mean PRI: the tone at the true times
            t = np.exp(2j * math.pi * fd_pri * self.times)
            # the canceller first (a zero-Doppler tone cancels exactly), then the bank
            return np.abs(self.F @ (self.H @ t)) ** 2
        f = fd_pri - round(fd_pri)
        l = len(self.h)
        Hf = np.sum(self.h * np.exp(-2j * math.pi * f * np.arange(l)))
        q = np.arange(self.M)
        y = np.exp(2j * math.pi * f * (q + l - 1)) * Hf  # MTI output q (its newest pulse q + l - 1)
        fbin = (np.arange(self.M) - self.M // 2) / self.M
        Y = (np.exp(-2j * math.pi * np.outer(fbin, q)) * (self.w * self.s)[None, :]) @ y
        return np.abs(Y) ** 2


def rnd(x):
    """round half away from zero."""
    return math.copysign(math.floor(abs(x) + 0.5), x)


def first_argmax(p, rel=1e-9):
    """first index whose value is within rel of the maximum."""
    mx = np.max(p)
    if mx <= 0:
        return int(np.argmax(p))
    return int(np.argmax(p >= mx * (1 - rel)))


def pd_sw1(chi, kind, pfa, r, M=None, N=None, kk=None):
    """Swerling 1, one test (the coherent train's integrated SNR chi):
    detection-probability.md §7 closed forms at the raised threshold r."""
    if kind == "fixed":
        return math.exp(-r * -math.log(pfa) / (1 + chi))
    if kind == "ca_cfar":
        c = pfa ** (-1.0 / M) - 1
        return (1 + r * c / (1 + chi)) ** -M
    a = r * model.os_alpha(N, kk, pfa) / (1 + chi)
    return math.exp(sum(math.log((N - i) / (N - i + a)) for i in range(kk)))


def train_scene(sc, cpi=False):
    """cpi: judged as a schedule's CPI (docs/detection.md §11): a folded
    echo is judged where it appears, not `folded`."""
    wf, wave, filt = model.waveform_figures(sc)
    rx = sc.get("receiver", {})
    rd = model.radar_defaults(sc, wave)
    det = model.detector_defaults(rx)
    if det["kind"] != "fixed":
        det.setdefault("doppler_guard_cells", 1)
        det.setdefault("doppler_training_cells", 4)
    pattern = rd.get("pri_stagger_s")
    if pattern:
        rd["pri_s"] = min(pattern)
        if not sc.get("radar", {}).get("window_stop_m"):
            rd["window_stop_m"] = C * rd["pri_s"] / 2
    fs, pri, tau = rd["sample_rate_hz"], rd["pri_s"], wave.tau
    pulses = rd["pulses"]
    lam = C / rd["carrier_hz"]
    plan = Plan(pulses, rx.get("mti", "none"), rx.get("doppler_window", {"kind": "hann"}), pattern)
    M = plan.M
    tbar = sum(pattern) / len(pattern) if pattern else pri  # the bins span one mean PRF
    wf = {k: v for k, v in wf.items() if not k.startswith("_")}
    wf["unambiguous_range_m"] = C * pri / 2
    wf["unambiguous_velocity_mps"] = lam / (4 * tbar)
    wf["doppler_resolution_hz"] = 1 / (pulses * tbar)
    wf["velocity_resolution_mps"] = lam / 2 / (pulses * tbar)
    stag = None
    if pattern:
        stag = stagger_fields(plan, pattern, lam)

    # ---- the single-pulse responses (docs/detection.md §1-3), as model.scene
    ws, we = rd["window_start_m"], rd["window_stop_m"]
    t0 = 2 * ws / C
    n = int((we - ws) * 2 / C * fs) + 1
    ref, lead = model.reference_at(wave, filt, fs)
    L = len(ref)
    G = float(np.sum(np.abs(ref) ** 2))
    nraw = n + L - 1 - lead
    jr = np.arange(nraw)
    traw = t0 + jr / fs

    def ceil9(x):
        r = round(x)
        return int(r) if abs(x - r) <= 1e-9 * max(1.0, abs(x)) else int(math.ceil(x))
    blank = np.zeros(nraw, bool)
    m = max(math.floor(t0 / pri) - 1, 0)
    while m * pri < t0 + nraw / fs:
        lo, hi = ceil9((m * pri - t0) * fs), ceil9((m * pri + tau - t0) * fs)
        blank[max(lo, 0):max(min(hi, nraw), 0)] = True
        m += 1
    processed = ~blank[:n]

    def compress(x):
        xp = np.concatenate([np.zeros(lead, complex), x])
        y = scipy.signal.correlate(xp, ref, "full", method="fft" if len(xp) * L > 1e6 else "direct")
        return y[L - 1:L - 1 + n]

    G0 = 10 ** (rd["antenna_gain_dbi"] / 10)
    Fn = 10 ** (rd["noise_figure_db"] / 10)
    Ls = 10 ** (rd["system_loss_db"] / 10)
    runamb = C * pri / 2
    objs = []
    for t in sc.get("targets", []):
        R = t["range_m"]
        rr = t.get("range_rate_mps", 0.0)
        fd = -2 * rr / lam
        snr_eq = rd["peak_power_w"] * tau * G0 ** 2 * lam ** 2 * 10 ** (t["rcs_dbsm"] / 10) / (
            (4 * math.pi) ** 3 * R ** 4 * model.KB * model.T0 * Fn * Ls)
        folds = math.floor(R / runamb)
        Ra = R - folds * runamb
        delta = 2 * Ra / C - t0
        amp = math.sqrt(snr_eq / (tau * fs))
        x = model.sample_wave(wave, fs, jr, delta) * amp
        inpulse = np.abs(x) > 0
        x = x * np.exp(2j * math.pi * fd * traw)  # |fd| < fs/2 in these cases
        Pu = np.abs(compress(x)) ** 2 / G
        nb = int(np.count_nonzero(inpulse & blank))
        nin = int(np.count_nonzero(inpulse))
        P = np.abs(compress(np.where(blank, 0, x))) ** 2 / G
        Pp = np.where(processed, P, -1.0)
        k = first_argmax(Pp)
        Pstar = max(P[k], 0.0) if processed[k] else 0.0
        g = plan.gain(fd * tbar)
        d = first_argmax(g)  # ties: first bin (README "Ambiguities")
        if t.get("fluctuation", "none") in DECORRELATING and pattern is None:
            g, d = decorrelating_gain(plan, fd * tbar)
        dl, shift = model.doppler_response(wave, filt, fd)
        objs.append(dict(t=t, rr=rr, R=R, Ra=Ra, folds=folds, fd=fd, snr_eq=snr_eq, P=P, Pu=Pu, k=k, d=d, g=g,
                         Pstar=Pstar, Pustar=float(Pu.max()), nb=nb, nin=nin, dl=dl, shift=shift))
    # the expected map S(k, d) = sum_i P_i(k) g_i(d)
    S = np.zeros((n, M))
    for o in objs:
        S += np.outer(o["P"], o["g"])

    acf = scipy.signal.correlate(ref, ref, "full")

    def rho(mm):
        mm = np.asarray(mm)
        out = np.zeros(mm.shape, complex)
        ok = np.abs(mm) < L
        out[ok] = np.conj(acf[L - 1 + mm[ok]]) / G
        return out
    kind, pfa = det["kind"], det["pfa"]
    Nd = plan.N
    Cn = plan.Cd / np.sqrt(np.outer(Nd, Nd))  # normalised bin correlation

    # Doppler and range lattice spacings of the OS-CFAR (§5, §9)
    if kind != "fixed":
        g_, tr = det["guard_cells"], det["training_cells"]
        dg, dtr = det["doppler_guard_cells"], det["doppler_training_cells"]
        bmax = min(dg + dtr // 2, (M - 1) // 2)
        sr = sd = 1
        if kind in ("os_cfar", "go_cfar", "so_cfar"):
            span = 2 * (g_ + tr // 2)
            while sr <= span:
                js = np.arange(1, span // sr + 1)
                if np.all(np.abs(rho(js * sr)) <= 0.1):
                    break
                sr += 1
            # Doppler: every lag j s_d up to the span min(2 (dguard +
            # dtraining/2), M - 1), every d, modulo M (docs/detection.md
            # §9); none: span + 1
            dspan = min(2 * (dg + dtr // 2), M - 1)
            sd = 1
            while sd <= dspan:
                ok = True
                for j in range(1, dspan // sd + 1):
                    lag = j * sd
                    if np.max(np.abs(np.array([Cn[dd, (dd + lag) % M] for dd in range(M)]))) > 0.1:
                        ok = False
                        break
                if ok:
                    break
                sd += 1

    cache = {}

    def os_rank(Nc):
        """the rank on the map (§9): 1 + round((rank - 1)/training N_2D),
        N_2D the cells of the whole 2-D region (Doppler extent unclamped),
        then scaled to the Nc cells kept as one pulse's OS: round(r N/N_2D),
        clamped to 1 .. Nc (round: half away from zero)."""
        n2 = (2 * (g_ + tr // 2) + 1) * (2 * (dg + dtr // 2) + 1) - (2 * g_ + 1) * (2 * dg + 1)
        r2 = 1 + int(math.floor((det["rank"] - 1) / tr * n2 + 0.5))
        return min(max(int(math.floor(r2 * Nc / n2 + 0.5)), 1), Nc)

    def cells(k, d):
        """training cells (a, b) of cell (k, d) (§9)."""
        out = []
        for a in range(-(g_ + tr // 2), g_ + tr // 2 + 1):
            if not (0 <= k + a < n and processed[k + a]):
                continue
            if a % sr:
                continue
            for b in range(-bmax, bmax + 1):
                if abs(a) <= g_ and abs(b) <= dg:
                    continue
                if b % sd:
                    continue
                out.append((a, b))
        return out

    def level(k, d, power):
        """(level with training cells N + power, level with N alone,
        cells) at map cell (k, d)."""
        if kind == "fixed":
            v = -math.log(pfa) * Nd[d]
            return v, v, []
        cs = cells(k, d)
        Nc = len(cs)
        if Nc == 0:
            return float("inf"), float("inf"), cs
        kk_ = np.array([k + a for a, b in cs])
        dd_ = np.array([(d + b) % M for a, b in cs])
        vals = Nd[dd_] + power[kk_, dd_]
        noise = Nd[dd_]
        if kind == "ca_cfar":
            key = (d, tuple(cs))
            if key not in cache:
                aa = np.array([0] + [a for a, b in cs])
                bb = np.array([d] + list(dd_))
                Sig = rho(aa[None, :] - aa[:, None]) * plan.Cd[bb[:, None], bb[None, :]] / Nd[d]
                Sig = (Sig + Sig.conj().T) / 2
                if Nc <= 64:
                    cache[key] = model.ca_alpha_cut(Sig + 1e-12 * np.eye(Nc + 1), pfa)
                else:
                    St = Sig[1:, 1:]
                    tr_ = float(np.real(np.trace(St)))
                    Ne = tr_ ** 2 / float(np.sum(np.abs(St) ** 2))
                    cache[key] = (Nc / tr_) * Ne * (pfa ** (-1 / Ne) - 1)
            a = cache[key]
            return a * vals.mean(), a * noise.mean(), cs
        if kind in ("go_cfar", "so_cfar"):
            lead = np.array([a < 0 or (a == 0 and b < 0) for a, b in cs])
            n1, n2 = int(np.sum(lead)), int(np.sum(~lead))
            a = goso_alpha(pfa, n1, n2, kind)
            return a * goso_mean(vals, lead, kind), a * goso_mean(noise, lead, kind), cs
        r = os_rank(Nc)
        a = model.os_alpha(Nc, r, pfa)
        return a * np.sort(vals)[r - 1], a * np.sort(noise)[r - 1], cs

    out = []
    req = det["pd_required"]
    mti_on = rx.get("mti", "none") != "none"
    for j, o in enumerate(objs):
        t = o["t"]
        k, d = o["k"], o["d"]
        Pmap = o["Pstar"] * o["g"][d]
        Lk, Lnoise, cs = level(k, d, S)
        Cc = S[k, d] - Pmap
        T = max(Lk, Cc)
        ecl = None
        if 0 < o["nb"] < o["nin"] and o["Pstar"] > 0:
            ecl = max(0.0, 10 * math.log10(o["Pustar"] / o["Pstar"]))
        snr = 10 * math.log10(o["snr_eq"]) - wf["mismatch_loss_db"] - o["dl"] - (ecl or 0.0)
        rec = {"id": t["id"], "range_m": o["R"], "snr_db": max(snr, -100.0), "doppler_hz": o["fd"],
               "doppler_loss_db": o["dl"], "range_shift_m": o["shift"] * C / 2}
        if ecl is not None:
            rec["eclipsing_loss_db"] = ecl
        chi = Pmap / Nd[d]
        chiu = o["Pustar"] * o["g"][d] / Nd[d]
        fl = t.get("fluctuation", "none")
        pdf = None
        sceneok = lambda r: True
        reach = lambda r: True
        if Pmap > 0 and math.isfinite(Lnoise) and Lnoise > 0:
            if kind == "fixed":
                if fl == "swerling1":
                    pdf = lambda x, r=1.0: pd_sw1(x, kind, pfa, r)
                else:
                    pdf = lambda x, r=1.0: model.pd_fixed(x, pfa, r)
            elif kind == "ca_cfar" and cs:
                Mc = len(cs)
                cc = pfa ** (-1.0 / Mc) - 1
                if fl == "swerling1":
                    pdf = lambda x, r=1.0, Mc=Mc: pd_sw1(x, kind, pfa, r, M=Mc)
                else:
                    pdf = lambda x, r=1.0, Mc=Mc: model.pd_ca(x, pfa, Mc, r)
                sceneok = lambda r, Mc=Mc, cc=cc: -Mc * math.log1p(r * cc) >= math.log(1e-300)
                reach = lambda r, cc=cc: r * cc <= 1e4  # multiplier on the sum (detection-probability.md §3)
            elif kind == "os_cfar" and cs:
                Nc = len(cs)
                kk = os_rank(Nc)
                if fl == "swerling1":
                    pdf = lambda x, r=1.0, Nc=Nc, kk=kk: pd_sw1(x, kind, pfa, r, N=Nc, kk=kk)
                else:
                    pdf = lambda x, r=1.0, Nc=Nc, kk=kk: model.pd_os(x, pfa, Nc, kk, r)
                a0 = model.os_alpha(Nc, kk, pfa)
                sceneok = lambda r, Nc=Nc, kk=kk, a0=a0: sum(math.log((Nc - i) / (Nc - i + r * a0)) for i in range(kk)) >= math.log(1e-300)
                reach = lambda r, Nc=Nc, a0=a0: r * a0 <= 1e4 * Nc  # idem, OS: 1e4 times the cells
        if Pmap > 0 and math.isfinite(Lnoise) and Lnoise > 0 and (fl in DECORRELATING or kind in ("go_cfar", "so_cfar")):
            pdf, sceneok, reach = map_pdf(plan, d, fl, kind, pfa, cs, reach, sceneok, os_rank)
        if pdf is not None and fl != "none" and not reach(1.0):
            # the nominal detector itself is beyond the series (a few OS
            # cells at a low Pfa): no Pd for a fluctuating target, the
            # threshold decides (detection.md §6)
            pdf = None
        touched = o["nb"] > 0
        inwin = ws <= o["Ra"] <= we
        rule = None
        pd_noise = pd_scene = None
        pd_status = None
        in_cell = False
        if pdf is not None:
            rr_ = max(T / Lnoise, 1.0)
            pd_noise = pdf(chi)
            # a steady target's Pd is the average of detection.md §6 at any
            # raise; the series' limits (Pfa below 1e-300) bind the
            # fluctuating ones only
            pd_scene = pdf(chi, rr_) if (fl == "none" or sceneok(rr_)) else None
            if fl != "none" and fl != "swerling4" and not reach(rr_):
                # beyond the series' reach a fluctuating target's Pd in
                # the scene is left out and P >= T decides (detection.md §6)
                pd_scene = None
            if pd_scene is not None and 0 < Cc < Lk and math.isfinite(Lk):
                # the others' power in the cell, under the level, adds to
                # the echo (detection-probability.md §7, "Echoes sharing
                # the tested cell"): pd is the crossing probability of the
                # sum over uniform phases, steady echoes as phasors and
                # Swerling 1 ones as Gaussian (their powers widen the
                # noise); the status is decided on the smaller of it and
                # the target's own Pd
                steady_pdf = None
                if kind == "fixed":
                    steady_pdf = lambda x, r: model.pd_fixed(x, pfa, r)
                elif kind == "ca_cfar":
                    steady_pdf = lambda x, r, Mc=len(cs): model.pd_ca(x, pfa, Mc, r)
                elif kind == "os_cfar":
                    steady_pdf = lambda x, r, Nc=len(cs), kk=os_rank(len(cs)): model.pd_os(x, pfa, Nc, kk, r)
                elif kind in ("go_cfar", "so_cfar"):
                    steady_pdf = lambda x, r, cs=cs: goso_pd_steady(x, pfa, cs, kind, r)
                steady, gauss = [], 0.0
                for i, q in enumerate(objs):
                    pw = chi if i == j else q["P"][k] * q["g"][d] / Nd[d]
                    if pw <= 0:
                        continue
                    if q["t"].get("fluctuation", "none") == "swerling4":
                        raise Chi4InCell(t["id"])
                    if q["t"].get("fluctuation", "none") in ("swerling1", "swerling2"):
                        gauss += pw
                    else:
                        steady.append(pw)
                if steady_pdf is not None:
                    vg = 1.0 + gauss
                    pd_own = pd_scene
                    if steady:
                        # the Gaussian part scales the steady powers and the
                        # threshold by 1/vg (pd_in_cell adds its own weak
                        # phasors to vg·v)
                        pd_scene = model.pd_in_cell(steady_pdf, [x / vg for x in steady], rr_ / vg)
                    else:
                        pd_scene = steady_pdf(0.0, rr_ / vg)
                    pd_status = min(pd_scene, pd_own)
                    in_cell = pd_own >= req and pd_scene < req
            if pd_status is None:
                pd_status = pd_scene
        if not inwin:
            st = "out_of_window"
        elif o["folds"] > 0 and not cpi:
            st = "folded"
        elif mti_on and Pmap <= 0 and o["Pstar"] > 0 and o["nb"] < o["nin"]:
            # its echo reaches processed gates but the MTI canceller leaves
            # none of it on the map (zero Doppler): too_weak, decided before
            # any detector, no Pd figures (detection.md §6 step 3)
            st = "too_weak"
        elif touched and (o["nb"] == o["nin"] or Pmap == 0):  # on the map: no cell holds its power
            st = "eclipsed"
        elif Pmap <= 0:
            st = "out_of_window"
        elif pdf is not None:
            rule = "pd"
            if (pd_status >= req) if pd_status is not None else (Pmap >= T):
                st = "detected"
            elif touched and chiu > 0 and pdf(chiu) >= req:
                st = "eclipsed"
            elif pd_noise < req:
                st = "too_weak"
            else:
                st = "masked"
        else:
            rule = "threshold"
            if Pmap >= T:
                st = "detected"
            elif touched and o["Pustar"] * o["g"][d] >= Lnoise:
                st = "eclipsed"
            elif Pmap < Lnoise:
                st = "too_weak"
            else:
                st = "masked"
        by_cell = Cc >= Lk or in_cell
        if st == "masked":
            if by_cell:
                contrib = [q["P"][k] * q["g"][d] if i != j else -1 for i, q in enumerate(objs)]
            else:
                kk_ = np.array([k + a for a, b in cs])
                dd_ = np.array([(d + b) % M for a, b in cs])
                contrib = [float(np.sum(q["P"][kk_] * q["g"][dd_])) for q in objs]
            best = int(np.argmax(contrib))
            if contrib[best] > 0:
                rec["masked_by"] = objs[best]["t"]["id"]
            rec["_masked_via"] = "cell" if by_cell else "cfar"
        rec["status"] = st
        if rule is not None:
            rec["decided_on"] = rule
        if st not in ("eclipsed", "out_of_window", "folded") and Pmap > 0 and math.isfinite(T):
            rec["threshold_margin_db"] = 10 * math.log10(Pmap / T)
        if pdf is not None and (rule is not None or st == "folded"):
            if pd_scene is not None:
                rec["pd"] = pd_scene
            cr = model.required_snr(pdf, req)
            if cr is not None:
                rec["snr_required_db"] = 10 * math.log10(cr)
                rec["margin_db"] = 10 * math.log10(chi) - rec["snr_required_db"]
        # snr_db (the continuous peak: no range straddle) plus the
        # slow-time gain of the peak bin over its noise (report-format.md
        # "Pulse trains"; README "Ambiguities" for the tested SNR)
        if Pmap > 0:
            rec["snr_integrated_db"] = rec["snr_db"] + 10 * math.log10(o["g"][d] / Nd[d])
        # the target's range rate folded into +- lambda/(4 PRI) (a
        # stagger: by lambda/(2 Tbar), §16)
        vu = lam / (4 * tbar)
        rec["apparent_range_rate_mps"] = o["rr"] - 2 * vu * round(o["rr"] / (2 * vu))
        # blind: the Doppler folds by a non-zero multiple of the PRF (a
        # stagger: of 1/Delta) to within half a bin 1/(2 M Tbar) of zero
        step = stag["step_s"] if stag else pri
        mult = round(o["fd"] * step)
        rec["blind_speed"] = bool(mult != 0 and abs(o["fd"] - mult / step) <= 0.5 / (M * tbar))
        if cpi:
            # the schedule's measurements (§11; report-format.md "PRF schedules")
            rec["folds"] = o["folds"]
            # the gate nearest the folded range plus the range shift, when
            # that lies in the window; the apparent range rate (above) on
            # the bin grid lambda/(2 PRI M) (round: half away from zero)
            a = o["Ra"] + o["shift"] * C / 2
            if ws <= a <= we:
                dr = C / (2 * fs)
                rec["apparent_range_m"] = ws + dr * rnd((a - ws) / dr)
            wgrid = lam / (2 * tbar * M)
            rec["apparent_range_rate_mps"] = wgrid * rnd(rec["apparent_range_rate_mps"] / wgrid)
        rec["_peak"] = [k, d]
        rec["_level_db"] = 10 * math.log10(Lk) if math.isfinite(Lk) else None
        rec["_noise_level_db"] = 10 * math.log10(Lnoise) if math.isfinite(Lnoise) else None
        rec["_cells"] = len(cs)
        out.append(rec)

    nproc = int(np.count_nonzero(processed))
    corr_len = float(np.sum(np.abs(acf) ** 2)) / G ** 2
    indep_r = min(nproc / corr_len, nproc)
    indep_d = M ** 2 / float(np.sum(np.abs(Cn) ** 2))
    look = pulses * pri  # report-format.md: pulses x pri_s (a stagger: its shortest PRI)
    indep = indep_r * indep_d
    fa = {"pfa": pfa, "tested_cells": nproc * M, "independent_cells": indep, "look_s": look,
          "cells_per_s": indep / look, "rate_per_s": pfa * indep / look}
    rep = {"false_alarms": fa}
    if stag:
        rep["stagger"] = stag
    return wf, out, rep


def common_step(pattern):
    """Delta: the largest step with T_i = n_i Delta, n_i whole, at most
    10 000, within 1e-9 (docs/detection.md §16); the cases use whole
    nanoseconds, so the integer gcd."""
    ns = [round(t * 1e9) for t in pattern]
    assert all(abs(n - t * 1e9) < 1e-6 for n, t in zip(ns, pattern))
    g = 0
    for n in ns:
        g = math.gcd(g, n)
    assert max(ns) // g <= 10000
    return g * 1e-9


def stagger_fields(plan, pattern, lam):
    """report.stagger (report-format.md, docs/detection.md §16)."""
    tbar = sum(pattern) / len(pattern)
    step = common_step(pattern)
    V = lam / (2 * step)
    out = {"pri_s": list(pattern), "mean_pri_s": tbar, "step_s": step, "first_blind_speed_mps": V,
           "mean_pri_blind_speed_mps": lam / (2 * tbar)}
    if plan.M <= 256:
        def resp(v):
            fd = -2 * np.asarray(v) / lam
            T = np.exp(2j * math.pi * np.outer(plan.times, fd * tbar))  # pulses x speeds
            return np.max(np.abs(plan.A @ T) ** 2, axis=0)
        mean = float(np.mean(resp((np.arange(4096) + 0.5) / 4096 * V)))
        edge = lam / (4 * max(pattern))
        vs = np.linspace(edge, V - edge, 4097)
        r = resp(vs)
        i = int(np.argmin(r))
        out["deepest_dip_db"] = 10 * math.log10(r[i] / mean)
        out["deepest_dip_mps"] = float(vs[i])
    return out


# ---------------------------------------------------------------- cases

# ---- Swerling 2 and 4 on maps; GO and SO CFARs on maps (docs/detection.md
# §9 "expected map power", §5 "2-D"; detection-probability.md §2 "Pulse-to-
# pulse fluctuation in a Doppler bin", §7). Written from those documents.

DECORRELATING = ("swerling2", "swerling4")


class Chi4InCell(Exception):
    """A Swerling 4 echo in a tested cell under the level: the in-cell law
    of a chi-square-4 phasor is not in this model; such cases are not
    generated (mapfl_case)."""


def decorrelating_gain(plan, fd_pri):
    """A Swerling 2/4 echo's complex amplitude is new every pulse: its
    power spreads over the bins as noise, N(d); the peak bin is, among the
    bins within 1e-9 of the largest, the one nearest its own folded
    Doppler (detection.md §9)."""
    g = plan.N.copy()
    mx = g.max()
    own = fd_pri - math.floor(fd_pri + 0.5)
    best, d = float("inf"), 0
    for i in range(plan.M):
        if g[i] >= mx * (1 - 1e-9):
            e = plan.fbin[i] - own
            e = abs(e - math.floor(e + 0.5))
            if e < best:
                best, d = e, i
    return g, d


def bin_weights(plan, d):
    """|A_{d,p}|^2: the bin's weight on each pulse (detection-probability.md §2)."""
    return np.abs(plan.A[d, :]) ** 2


def chi4_coeffs(w):
    """c_m = m! e_m(w), w normalised to sum 1."""
    w = np.asarray(w, float)
    w = w[w > 0] / np.sum(w)
    c = np.zeros(len(w) + 1)
    c[0] = 1.0
    for x in w:
        c[1:] = c[1:] + np.arange(1, len(c)) * x * c[:-1]
    return c


def chi4_survival(c, chi, T):
    """detection-probability.md §2: Pd(T) = e^-y [1 + sum_m (-1)^(m+1) (c_m/m)
    rho^m y L_{m-1}^(1)(y)], y = T/V, V = 1 + chi/2, rho = (chi/2)/V."""
    V = 1 + chi / 2
    rho, y = chi / 2 / V, T / V
    m = np.arange(1, len(c))
    L = scipy.special.eval_genlaguerre(m - 1, 1, y)
    s = 1 + np.sum((-1.0) ** (m + 1) * c[1:] / m * rho ** m * y * L)
    return min(max(math.exp(-y) * s, 0.0), 1.0)


def chi4_density(c, chi, x):
    V = 1 + chi / 2
    rho, y = chi / 2 / V, x / V
    m = np.arange(0, len(c))
    L = scipy.special.eval_laguerre(m, y)
    return max(math.exp(-y) * float(np.sum((-1.0) ** m * c * rho ** m * L)) / V, 0.0)


def chi4_over_x(c, chi, G):
    """E_X[G(X)] for the Swerling 4 bin law, quad over x."""
    f = lambda x: chi4_density(c, chi, x) * G(x)
    V = 1 + chi
    edges = [0, V, 5 * V, 20 * V, 80 * V]
    return min(max(sum(integrate.quad(f, a, b, limit=200, epsabs=1e-12)[0] for a, b in zip(edges, edges[1:])), 0.0), 1.0)


def goso_mean(vals, lead, kind):
    """max (GO) or min (SO) of the halves' means; an empty half: the other."""
    h = [vals[lead], vals[~lead]]
    ms = [float(np.mean(x)) for x in h if len(x)]
    return max(ms) if kind == "go_cfar" else min(ms)


def goso_cdf(x, n1, n2, a, kind):
    """P(a * Z <= x), Z the max/min of the half-means (Gamma(n, 1/n) each)."""
    p = [scipy.special.gammainc(n, n * x / a) for n in (n1, n2) if n > 0]
    if len(p) == 1 or kind == "go_cfar":
        return float(np.prod(p))
    return 1 - (1 - p[0]) * (1 - p[1])


def goso_pfa(a, n1, n2, kind):
    """E over the unit-exponential cell under test: int e^-x dF(x) = int F(x) e^-x dx."""
    f = lambda x: goso_cdf(x, n1, n2, a, kind) * math.exp(-x)
    # e^-x falls on the scale 1, F rises on the scale a: edges on both
    edges = sorted({0.0, 1.0, 4.0, 16.0, 64.0, 256.0, a / 4, a, 4 * a, 16 * a, 64 * a}) + [np.inf]
    return sum(integrate.quad(f, lo, hi, limit=200, epsabs=0, epsrel=1e-11)[0] for lo, hi in zip(edges, edges[1:]))


_goso_cache = {}


def goso_alpha(pfa, n1, n2, kind):
    key = (pfa, n1, n2, kind)
    if key not in _goso_cache:
        g = lambda la: math.log(max(goso_pfa(math.exp(la), n1, n2, kind), 1e-320)) - math.log(pfa)
        hi = 1.0
        while g(hi) > 0:
            hi += 1.0
        _goso_cache[key] = math.exp(scipy.optimize.brentq(g, hi - 1.0 if hi > 1 else math.log(1e-3), hi, xtol=1e-14))
    return _goso_cache[key]


def halves(cs):
    lead = [a < 0 or (a == 0 and b < 0) for a, b in cs]
    return sum(lead), len(lead) - sum(lead)


def goso_pd_steady(chi, pfa, cs, kind, r=1.0):
    n1, n2 = halves(cs)
    a = r * goso_alpha(pfa, n1, n2, kind)
    return model._over_x(chi, np.vectorize(lambda x: goso_cdf(x, n1, n2, a, kind)))


def map_pdf(plan, d, fl, kind, pfa, cs, reach, sceneok, os_rank):
    """(pdf, sceneok, reach) of a target on the map: Swerling 2 the
    exponential law at its bin's SNR (every detector as Swerling 1: the
    CFAR's false-alarm law at alpha r / (1 + chi)); Swerling 4 the bin law
    of §2 with the bin's weights, behind a CFAR E_X[F(X)]; GO and SO with
    the 2-D halves (detection.md §5 "2-D")."""
    if kind != "fixed" and not cs:
        return None, sceneok, reach
    if fl == "swerling4":
        c = chi4_coeffs(bin_weights(plan, d))
        if kind == "fixed":
            return (lambda x, r=1.0: chi4_survival(c, x, r * -math.log(pfa))), sceneok, reach
        if kind == "ca_cfar":
            Mc = len(cs)
            F = lambda r: (lambda x: scipy.special.gammainc(Mc, x / (r * (pfa ** (-1.0 / Mc) - 1))))
        elif kind == "os_cfar":
            Nc = len(cs)
            kk = os_rank(Nc)
            F = lambda r: (lambda x: stats.binom.sf(kk - 1, Nc, -math.expm1(-x / (r * model.os_alpha(Nc, kk, pfa)))))
        else:
            n1, n2 = halves(cs)
            F = lambda r: (lambda x: goso_cdf(x, n1, n2, r * goso_alpha(pfa, n1, n2, kind), kind))
        return (lambda x, r=1.0: chi4_over_x(c, x, F(r))), (lambda r: True), reach
    if kind in ("go_cfar", "so_cfar"):
        n1, n2 = halves(cs)
        if fl in ("swerling1", "swerling2"):
            return (lambda x, r=1.0: goso_pfa(r * goso_alpha(pfa, n1, n2, kind) / (1 + x), n1, n2, kind)), (lambda r: True), (lambda r: True)
        return (lambda x, r=1.0: goso_pd_steady(x, pfa, cs, kind, r)), (lambda r: True), (lambda r: True)
    # Swerling 2 behind fixed, CA, OS: the Swerling 1 forms at the bin's SNR
    if kind == "fixed":
        return (lambda x, r=1.0: pd_sw1(x, kind, pfa, r)), sceneok, reach
    if kind == "ca_cfar":
        return (lambda x, r=1.0, Mc=len(cs): pd_sw1(x, kind, pfa, r, M=Mc)), sceneok, reach
    Nc = len(cs)
    return (lambda x, r=1.0, kk=os_rank(Nc): pd_sw1(x, kind, pfa, r, N=Nc, kk=kk)), sceneok, reach


N_MAPFL = 40


def mapfl_case(rng, i):
    """A uniform train (train_case) with Swerling 2 and 4 targets among
    steady and Swerling 1 ones, behind fixed, CA, OS, GO and SO detectors;
    a case where a Swerling 4 echo would share a tested cell under the
    level is drawn again."""
    while True:
        sc = train_case(rng, i)
        sc["name"] = f"mapfl-{i:03d}"
        det = sc["receiver"]["detector"]
        kind = ["fixed", "ca_cfar", "os_cfar", "go_cfar", "so_cfar"][i % 5]
        if kind != det["kind"]:
            det["kind"] = kind
            if kind != "fixed":
                det.setdefault("guard_cells", int(rng.integers(0, 4)))
                det.setdefault("training_cells", 2 * int(rng.integers(2, 9)))
                det.setdefault("doppler_guard_cells", int(rng.integers(0, 3)))
                det.setdefault("doppler_training_cells", 2 * int(rng.integers(1, 4)))
            else:
                for f in ("guard_cells", "training_cells", "doppler_guard_cells", "doppler_training_cells", "rank"):
                    det.pop(f, None)
            if kind == "os_cfar":
                det["rank"] = int(rng.integers(1, det["training_cells"] + 1))
            else:
                det.pop("rank", None)
        for t in sc["targets"]:
            t["fluctuation"] = str(rng.choice(["none", "swerling1", "swerling2", "swerling4", "swerling2"]))
            if t["fluctuation"] == "none":
                del t["fluctuation"]
        try:
            train_scene(sc)
        except Chi4InCell:
            continue
        return sc


SEED = 20261202 + 31
N_TRAIN = 200
TRAIN_KINDS = ["lfm", "rect", "barker", "p4", "lfm", "frank", "mps", "mls", "lfm", "zadoff_chu", "p1", "barker"]
DWINDOWS = ["default", "none", "hann", "hamming", "blackman", "blackman_harris", "taylor", "chebyshev",
            "kaiser", "gaussian"]
MTIS = ["none", "two_pulse", "three_pulse"]


def train_case(rng, i):
    """A random uniform pulse train: kinds, range and Doppler windows, MTI,
    pulses, PRIs, Dopplers (a quarter near a blind speed), 1-4 targets,
    fixed / CA / OS detectors with small (exact alpha) and large
    (effective-cells) 2-D regions."""
    import gen  # the single-pulse generator's random waveforms and windows
    kind = TRAIN_KINDS[i % len(TRAIN_KINDS)]
    w = gen.random_waveform(rng, kind, small=True)
    rx = {}
    if rng.random() < 0.4:
        rx["window"] = gen.random_window(rng, gen.WINDOWS[int(rng.integers(1, len(gen.WINDOWS)))])
    dwk = DWINDOWS[int(rng.integers(0, len(DWINDOWS)))]
    if dwk != "default":
        rx["doppler_window"] = gen.random_window(rng, dwk)
    mti = MTIS[i % 3]
    if mti != "none":
        rx["mti"] = mti
    dk = ["fixed", "ca_cfar", "os_cfar", "ca_cfar"][(i // 3) % 4]
    det = {"kind": dk, "pfa": float(f"{10 ** rng.uniform(-8, -3):.2g}")}
    if dk != "fixed":
        small = rng.random() < 0.5
        det["guard_cells"] = int(rng.integers(0, 4))
        det["training_cells"] = 2 * int(rng.integers(1, 5 if small else 9))
        det["doppler_guard_cells"] = int(rng.integers(0, 3))
        det["doppler_training_cells"] = 2 * int(rng.integers(0, 2 if small else 4))
        if dk == "os_cfar":
            det["rank"] = int(rng.integers(1, det["training_cells"] + 1))
    rx["detector"] = det
    B = gen.bandwidth(w)
    tau = gen.pulse_width(w)
    fs = gen.rate_for(float(rng.choice([1, 1.5, 2, 3])), B)
    pulses = int(rng.integers(6, 49))
    pri = float(f"{max(5 * tau, 1e-6 * rng.uniform(40, 300)):.3g}")
    runamb = C * pri / 2
    blind = C * tau / 2
    start = float(round(rng.uniform(0, 0.5) * blind)) if rng.random() < 0.5 else 0.0
    stop = float(round(min(runamb, start + 3000 * C / (2 * fs))))
    if stop >= runamb:
        stop = None
    wstop = stop if stop is not None else runamb
    # Dopplers within the codes' single-peak range and the band, well
    # away from fs/2
    fdmax = min(0.3 * B, 0.4 * fs)
    if kind not in ("lfm", "nlfm"):
        fdmax = min(fdmax, 0.3 / tau)
    M = pulses - len(MTI_TAPS[mti]) + 1
    nt = int(rng.integers(1, 5))
    targets = []
    fds = []
    for j in range(nt):
        r = rng.random()
        if r < 0.25:  # near a blind speed: a multiple of the PRF plus a fraction of a bin
            kmax = int(fdmax * pri)
            mult = int(rng.integers(-kmax, kmax + 1)) if kmax > 0 else 0
            fdp = mult + rng.uniform(-1.5, 1.5) / M
        elif r < 0.35 and j > 0:  # the same Doppler bin as a neighbour
            fdp = fds[-1] * pri + rng.uniform(-0.5, 0.5) / M
        elif r < 0.45:
            fdp = 0.0
        else:
            fdp = rng.uniform(-1, 1) * fdmax * pri
        fd = float(np.clip(fdp / pri, -fdmax, fdmax))
        fds.append(fd)
    carrier = gen.carrier_for(max(abs(f) for f in fds))
    lam = C / carrier
    base = rng.uniform(start + blind, wstop)
    for j in range(nt):
        r = rng.random()
        if r < 0.4 and j > 0:  # near a previous target: masking in range, perhaps not in Doppler
            R = targets[-1]["range_m"] + rng.uniform(-1, 1) * rng.choice([1, 3, 10]) * C / (2 * B)
        elif r < 0.5:
            R = blind * rng.uniform(0.6, 1.3)
        elif r < 0.6:
            R = runamb - blind * rng.uniform(-0.2, 1.3)
        elif r < 0.65:
            R = wstop + rng.uniform(0, 2) * runamb * 0.3
        else:
            R = base + rng.uniform(-1, 1) * 1500
        R = float(round(max(R, 10.0), 2))
        rcs = float(round(rng.uniform(-30, 20) - 10 * math.log10(pulses), 1))
        rr = float(f"{-fds[j] * lam / 2:.6g}")
        t = {"id": f"t{j}", "kind": "point", "range_m": R, "rcs_dbsm": rcs}
        if rr:
            t["range_rate_mps"] = rr
        if rng.random() < 0.25:
            t["fluctuation"] = "swerling1"
        targets.append(t)
    radar = {"carrier_hz": carrier, "sample_rate_hz": fs, "pri_s": pri, "pulses": pulses,
             "window_start_m": start, "peak_power_w": float(f"{10 ** rng.uniform(1, 4):.3g}")}
    if stop is not None:
        radar["window_stop_m"] = stop
    return {"version": 2, "name": f"train-{i:03d}", "radar": radar, "waveform": w, "receiver": rx,
            "targets": targets}


N_STAGGER = 60
N_SCHEDULE = 40


def at_least(ps, m):
    """P(at least m of independent events with probabilities ps)."""
    dist = [1.0]
    for p in ps:
        nd = [0.0] * (len(dist) + 1)
        for k, v in enumerate(dist):
            nd[k] += v * (1 - p)
            nd[k + 1] += v * p
        dist = nd
    return sum(dist[m:])


def schedule_scene(sc):
    """Every CPI of radar.schedule judged by train_scene (the first with
    the radar's own PRI and pulses), the window's end following each
    CPI's PRI when left at its default, and the M-of-N combination
    (docs/detection.md §11, report-format.md "PRF schedules")."""
    import copy
    rd = sc["radar"]
    sch = rd["schedule"]
    cpis = [{"pri_s": rd["pri_s"], "pulses": rd.get("pulses", 1)}] + [
        {"pri_s": c["pri_s"], "pulses": c.get("pulses", rd.get("pulses", 1))} for c in sch["cpis"]]
    n = len(cpis)
    m = sch.get("m", n)
    out_cpis = []
    lam = C / rd.get("carrier_hz", 9.5e9)
    for c in cpis:
        s2 = copy.deepcopy(sc)
        r2 = s2["radar"]
        del r2["schedule"]
        r2["pri_s"], r2["pulses"] = c["pri_s"], c["pulses"]
        _, ts, _ = train_scene(s2, cpi=True)
        tt = []
        for t in ts:
            e = {"id": t["id"], "status": t["status"], "detected": t["status"] == "detected", "folds": t["folds"]}
            for f in ("margin_db", "pd", "apparent_range_m", "apparent_range_rate_mps", "blind_speed"):
                if f in t:
                    e[f] = t[f]
            tt.append(e)
        out_cpis.append({"pri_s": c["pri_s"], "pulses": c["pulses"], "unambiguous_range_m": C * c["pri_s"] / 2,
                         "blind_speed_mps": lam / (2 * c["pri_s"]), "targets": tt})
    step = common_step([c["pri_s"] for c in cpis])
    ns = [round(c["pri_s"] / step) for c in cpis]
    l = 1
    for v in ns:
        l = l * v // math.gcd(l, v)
    out = {"n": n, "m": m, "unambiguous_range_m": C * l * step / 2, "cpis": out_cpis}
    if all(c["pulses"] > 1 for c in cpis):
        out["first_blind_speed_mps"] = lam / (2 * step)
    targets = []
    for j, t in enumerate(sc["targets"]):
        det_in = sum(1 for c in out_cpis if c["targets"][j]["detected"])
        e = {"id": t["id"], "detected_in": det_in, "detected": det_in >= m}
        ps = [c["targets"][j].get("pd") for c in out_cpis]
        if all(p is not None for p in ps):
            e["pd"] = at_least(ps, m)
        targets.append(e)
    out["targets"] = targets
    return out


def schedule_case(rng, i):
    """A uniform train (train_case) with 1-3 more CPIs of whole-microsecond
    PRIs within 0.6-1.6 times the first, their own pulse counts at times,
    M random; the window's end left at its default so that each CPI
    listens to its own c PRI/2; targets anywhere up to three first-CPI
    unambiguous ranges (folded echoes are judged where they appear)."""
    sc = train_case(rng, i)
    sc["name"] = f"schedule-{i:03d}"
    rd = sc["radar"]
    import gen
    tau = gen.pulse_width(gen_w := sc["waveform"])
    pri0 = max(round(rd["pri_s"] * 1e6), int(math.ceil(6 * tau * 1e6)))
    rd["pri_s"] = float(f"{pri0 * 1e-6:.6g}")
    rd.pop("window_stop_m", None)
    rd["window_start_m"] = 0.0
    mti = sc["receiver"].get("mti", "none")
    minp = {"none": 2, "two_pulse": 3, "three_pulse": 4}[mti]
    rd["pulses"] = max(rd["pulses"], minp + 2)
    nc = int(rng.integers(1, 4))
    cpis = []
    for _ in range(nc):
        c = {"pri_s": float(f"{int(round(pri0 * rng.uniform(0.6, 1.6))) * 1e-6:.6g}")}
        if rng.random() < 0.3:
            c["pulses"] = int(rng.integers(minp + 2, 33))
        cpis.append(c)
    rd["schedule"] = {"cpis": cpis, "m": int(rng.integers(1, nc + 2))}
    runamb = C * rd["pri_s"] / 2
    # the gate count stays moderate at the longest PRI
    blind = C * tau / 2
    for t in sc["targets"]:
        if rng.random() < 0.4:
            t["range_m"] = float(round(rng.uniform(1.2 * blind, 3 * runamb), 2))
    return sc


def stagger_case(rng, i):
    """A random staggered train (docs/detection.md §16): 2-4 PRIs of whole
    microseconds, 8-40 pulses, MTI and Doppler windows as train_case; the
    window ends at least 2 c tau/2 short of c T_min/2 and the targets lie
    inside it, beyond 1.2 c tau/2 and clear of its end, so that every
    sweep hears every echo whole (per-sweep eclipsing and folding are not
    generated); Dopplers random, near 1/Delta (the first true blind
    speed), near a single PRI's blind speed, or zero."""
    sc = train_case(rng, i)
    sc["name"] = f"stagger-{i:03d}"
    w = sc["waveform"]
    import gen
    tau = gen.pulse_width(w)
    B = gen.bandwidth(w)
    L = int(rng.integers(2, 5))
    base = max(int(math.ceil(6 * tau * 1e6)), int(rng.integers(40, 200)))
    pattern = sorted(set(base + int(rng.integers(0, base // 2 + 2)) for _ in range(L)))
    if len(pattern) < 2:
        pattern = [base, base + int(rng.integers(1, base // 2 + 2))]
    rng.shuffle(pattern)
    pattern = [p * 1e-6 for p in pattern]
    rd = sc["radar"]
    rd.pop("pri_s", None)
    rd["pri_stagger_s"] = pattern
    rd["pulses"] = int(rng.integers(8, 41))
    blind = C * tau / 2
    stop = C * min(pattern) / 2 - 2 * blind - 4 * C / (2 * rd["sample_rate_hz"])
    start = rd["window_start_m"]
    if stop - start < 4 * blind + 100:
        start = 0.0
    rd["window_start_m"] = start
    rd["window_stop_m"] = float(math.floor(stop))
    lam = C / rd["carrier_hz"]
    tbar = sum(pattern) / len(pattern)
    step = common_step(pattern)
    fdmax = min(0.3 * B, 0.4 * rd["sample_rate_hz"])
    if w["kind"] not in ("lfm", "nlfm"):
        fdmax = min(fdmax, 0.3 / tau)
    M = rd["pulses"] - len(MTI_TAPS[sc["receiver"].get("mti", "none")]) + 1
    fds = []
    for t in sc["targets"]:
        lo, hi = max(start, 1.2 * blind), rd["window_stop_m"] - blind
        t["range_m"] = float(round(rng.uniform(lo, hi), 2))
        r = rng.random()
        if r < 0.25 and 1 / step <= fdmax:
            fd = (1 / step) * rng.choice([-1, 1]) + rng.uniform(-1.5, 1.5) / (M * tbar)
        elif r < 0.45:
            fd = rng.choice([-1, 1]) / pattern[int(rng.integers(0, len(pattern)))] + rng.uniform(-1, 1) / (M * tbar)
        elif r < 0.55:
            fd = 0.0
        else:
            fd = rng.uniform(-1, 1) * fdmax
        fds.append(float(np.clip(fd, -fdmax, fdmax)))
    rd["carrier_hz"] = gen.carrier_for(max(abs(f) for f in fds))  # |range rate| <= 1e4 m/s
    lam = C / rd["carrier_hz"]
    for t, fd in zip(sc["targets"], fds):
        rr = float(f"{-fd * lam / 2:.6g}")
        t.pop("range_rate_mps", None)
        if rr:
            t["range_rate_mps"] = rr
    return sc


def strip(d):
    return {k: v for k, v in d.items() if not k.startswith("_")}


def expect(sc):
    wf, ts, rep = train_scene(sc)
    if "schedule" in sc["radar"]:
        rep["schedule"] = schedule_scene(sc)
    return ({"waveform": strip(wf), "targets": [strip(t) for t in ts], **rep},
            {"peak": [t["_peak"] for t in ts], "level_db": [t["_level_db"] for t in ts],
             "noise_level_db": [t["_noise_level_db"] for t in ts], "cells": [t["_cells"] for t in ts],
             "masked_via": [t.get("_masked_via", "") for t in ts]})


def check():
    """The slow-time plan against definitions with closed forms."""
    p = Plan(16, "none", {"kind": "none"})
    # no MTI, no window: unit noise in every bin, gain = pulses at a bin centre
    assert np.allclose(p.N, 1) and abs(p.gain(3 / 16).max() - 16) < 1e-9
    # two-pulse canceller, no window: the bins' noise follows |H(f)|^2/sum h^2
    # = 2 sin^2(pi f) ... averaged to 1 over the bins (docs/detection.md §9)
    p = Plan(17, "two_pulse", {"kind": "none"})
    assert abs(p.N.mean() - 1) < 1e-12
    # a tone at zero Doppler is cancelled
    assert p.gain(0.0).max() < 1e-20


def main():
    import json
    import sys
    import time
    check()
    rng = np.random.default_rng(SEED)
    only = sys.argv[1] if len(sys.argv) > 1 else None
    t0 = time.time()
    cases = []
    scs = [train_case(rng, i) for i in range(N_TRAIN)]
    scs += [stagger_case(rng, i) for i in range(N_STAGGER)]
    scs += [schedule_case(rng, i) for i in range(N_SCHEDULE)]
    rng2 = np.random.default_rng(SEED + 1)  # a stream of its own: the cases above stay as they were
    scs += [mapfl_case(rng2, i) for i in range(N_MAPFL)]
    for sc in scs:
        if only and sc["name"] != only:
            continue
        exp, info = expect(sc)
        cases.append({"scenario": sc, "expected": exp, "info": info})
    out = {"generator": "testdata/diffmodel/train.py", "seed": SEED, "numpy": np.__version__,
           "scipy": scipy.__version__, "cases": cases}
    name = "train.json" if not only else "/tmp/train_" + only + ".json"
    with open(name, "w") as f:
        json.dump(out, f, separators=(",", ":"))
        f.write("\n")
    print(len(cases), "train cases in %.0f s" % (time.time() - t0), file=sys.stderr)


if __name__ == "__main__":
    main()
