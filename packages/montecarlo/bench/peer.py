#!/usr/bin/env python3
"""A vectorised numpy script of the same exact offset model as `twinfet run`, the peer that
`pnpm bench --peer` times against the whole twinfet process (it is a benchmark, not a test).

    python3 packages/montecarlo/bench/peer.py '<model JSON>' SAMPLES SEED

The model JSON is written by bench/peer.ts from the compiled design (specific currents,
per-device sigmas, slope factors, thermal voltages), the constants a hand-written script would
hold. The statistics are those of the run report: mean, sigma, min, max, the failures at the
spec, a 2000-bin histogram, and the 0.1/1/50/99/99.9% quantiles of Vos and |Vos|, exact
(np.quantile, linear = Hyndman & Fan type 7) up to 2e6 samples and from the histogram above.

Model (EKV 1995 inverse v(s) = 2 ln(e^s - 1) in s = sqrt(IC); log-normal current factors):
- simple: Vos = sign (dVT1 - dVT2 + n U_T (v(s1) - v(s2))), s_i = sqrt(IC0) e^{-z_i/2}.
- mirror: M3/M4 balance a3 s^2 + a4 L4(s)^2 = 1 with L4 = ln(1 + (e^s - 1) e^{-d/2}), solved by
  vectorised Newton steps from the quadratic first guess to a residual of 1e-12, then the pair
  as in the simple stage with s1 = s c0 e^{q1}, s2 = L4 c0 e^{q2}.
Normals are numpy's own (PCG64 + ziggurat), so the numbers differ from twinfet's by sampling
error only.
"""
import json
import sys

import numpy as np

LEVELS = np.array([0.001, 0.01, 0.5, 0.99, 0.999])
KEEP_LIMIT = 2_000_000
BLOCK = 1 << 18
TOL = 1e-12


def simple_block(m, u):
    br, bs = m['betaFromVt'], m['betaOwn']
    s1 = m['s0'] * np.exp(-0.5 * (br * u[0] + bs * u[1]))
    s2 = m['s0'] * np.exp(-0.5 * (br * u[2] + bs * u[3]))
    dv = 2.0 * np.log(np.expm1(s1) / np.expm1(s2))
    return m['sign'] * (m['sigmaVt'] * (u[0] - u[2]) + m['nut'] * dv)


def mirror_block(m, u):
    brl, bsl = m['betaFromVtLoad'], m['betaOwnLoad']
    z3 = brl * u[4] + bsl * u[5]
    z4 = brl * u[6] + bsl * u[7]
    a3 = m['a0'] * np.exp(z3)
    a4 = m['a0'] * np.exp(z4)
    hd = 0.5 * m['dScale'] * (u[6] - u[4])
    dx = np.exp(-hd)
    ghd = m['gamma'] * hd
    s = (a4 * ghd + np.sqrt(a3 + a4 - a3 * a4 * ghd * ghd)) / (a3 + a4)
    for _ in range(50):
        em = np.expm1(s)
        ey = em * dx
        l4 = np.log1p(ey)
        h = a3 * s * s + a4 * l4 * l4 - 1.0
        if np.max(np.abs(h)) <= TOL:
            break
        dl4 = dx * (em + 1.0) / (1.0 + ey)
        s = s - h / (2.0 * a3 * s + 2.0 * a4 * l4 * dl4)
    else:
        raise RuntimeError('Newton did not converge')
    bri, bsi = m['betaFromVt'], m['betaOwn']
    q1 = 0.5 * (z3 - (bri * u[0] + bsi * u[1]))
    q2 = 0.5 * (z4 - (bri * u[2] + bsi * u[3]))
    s1 = s * m['c0'] * np.exp(q1)
    s2 = l4 * m['c0'] * np.exp(q2)
    dv = 2.0 * np.log(np.expm1(s1) / np.expm1(s2))
    return m['sign'] * (m['sigmaVt'] * (u[0] - u[2]) + m['nut'] * dv)


def histogram_quantiles(counts, lo, width, levels):
    cum = np.cumsum(counts)
    total = cum[-1]
    out = []
    for p in levels:
        rank = p * total
        i = int(np.searchsorted(cum, rank))
        if i >= len(counts):
            out.append(None)
            continue
        below = cum[i] - counts[i]
        out.append(float(lo + width * (i + max(0.0, (rank - below) / counts[i]))))
    return out


def main():
    m = json.loads(sys.argv[1])
    samples = int(float(sys.argv[2]))
    rng = np.random.default_rng(int(sys.argv[3]))
    block = mirror_block if m['topology'] == 'mirror' else simple_block
    dim = m['dimension']
    spec = m['spec']
    r = m['range']
    bins = 2000
    counts = np.zeros(bins, dtype=np.int64)
    keep = np.empty(samples) if samples <= KEEP_LIMIT else None
    count, mean, m2 = 0, 0.0, 0.0
    lo, hi = np.inf, -np.inf
    high = low = 0
    for start in range(0, samples, BLOCK):
        n = min(BLOCK, samples - start)
        vos = block(m, rng.standard_normal((dim, n)))
        if keep is not None:
            keep[start:start + n] = vos
        bm = vos.mean()
        bm2 = float(np.dot(vos - bm, vos - bm))
        delta = bm - mean
        total = count + n
        mean += delta * n / total
        m2 += bm2 + delta * delta * count * n / total
        count = total
        lo = min(lo, vos.min())
        hi = max(hi, vos.max())
        high += int(np.count_nonzero(vos > spec))
        low += int(np.count_nonzero(vos < -spec))
        counts += np.histogram(vos, bins=bins, range=(-r, r))[0]
    if keep is not None:
        signed = np.quantile(keep, LEVELS).tolist()
        absolute = np.quantile(np.abs(keep), LEVELS).tolist()
        method = 'exact'
    else:
        width = 2 * r / bins
        signed = histogram_quantiles(counts, -r, width, LEVELS)
        half = bins // 2
        folded = counts[half:] + counts[half - 1::-1]
        absolute = histogram_quantiles(folded, 0.0, width, LEVELS)
        method = 'histogram'
    failures = high + low
    print(json.dumps({
        'samples': count, 'mean': mean, 'sigma': (m2 / (count - 1)) ** 0.5, 'min': lo, 'max': hi,
        'failures': failures, 'failuresHigh': high, 'failuresLow': low, 'yield': 1 - failures / count,
        'quantileMethod': method, 'signed': signed, 'absolute': absolute,
    }))


if __name__ == '__main__':
    main()
