#!/usr/bin/python3
"""Reference fixtures for the calibration functions (INVERSE, LIMITS, GOF, known uncertainties),
computed independently in 50-digit arithmetic with Debian's python3-mpmath.

Run with Debian's interpreter:  /usr/bin/python3 scripts/gen-calibration.py
Writes test/fixtures/calibration.json.

Every problem states its formula here, written from the published definitions (see README
"Calibration" for the sources), not from the engine's code:
- weighted least squares by the normal equations in mpmath; covariance s²(XᵀWX)⁻¹ with s² =
  RSS_w/(n − p) for relative weights, (XᵀWX)⁻¹ for standard uncertainties (w = 1/u²);
- inverse prediction: x̂ with f(x̂) = ȳ₀, u(x̂)² = (s_r²/k + zᵀCz)/f′(x̂)²; limits: the roots of
  (f(x) − ȳ₀)² = q²(s_r²/k + zᵀCz) around x̂ (q: t(n − p) or normal quantile);
- DIN 32645 calibration-line limits; ICH Q2 3.3·s/b and 10·s/b;
- lack of fit against pure error; χ²; the t of an added power term;
- influence measures of NIST's Longley data from the exact rational hat matrix (Python fractions);
- t and normal quantiles, F and χ² upper tails (mpmath's incomplete beta and gamma functions);
- generalized distance regression (LINEXY): the slope by minimizing S(b) directly (not York's
  iteration) and the uncertainties from the full Jacobian in (a, b, x*); Deming's closed-form slope
  and the orthogonal line from an SVD as independent special cases.

Published data sets reproduced here (values typed from the publications):
- Massart et al., Handbook of Chemometrics and Qualimetrics (1997), Part A, ch. 8 worked example;
- ISO/TS 28037:2010 clause 6 examples 1 and 2 (and the inverse evaluation of clause 11);
- DIN 32645 example (x = 0.05 … 0.50, y = 3060 … 7178);
- NIST/SEMATECH e-Handbook §4.6.1 load cell (NIST StRD Pontius data, read from the committed fixture).
Invented problems use numpy's seeded generator (PCG64, seed below).
"""
import json
import os
import sys

import mpmath as mp
import numpy as np

SEED = 20261202
mp.mp.dps = 50
rng = np.random.Generator(np.random.PCG64(SEED))
M = mp.mpf


def t_two_sided(t, df):
    df = M(df)
    return mp.betainc(df / 2, M(1) / 2, 0, df / (df + t * t), regularized=True)


def t_quantile(p, df):
    target = 2 * (1 - M(p))
    return mp.findroot(lambda q: t_two_sided(q, df) - target, M(2))


def normal_quantile(p):
    return mp.sqrt(2) * mp.erfinv(2 * M(p) - 1)


def f_upper(f, d1, d2):
    d1, d2 = M(d1), M(d2)
    return mp.betainc(d2 / 2, d1 / 2, 0, d2 / (d2 + d1 * f), regularized=True)


def chi2_upper(x, k):
    return mp.gammainc(M(k) / 2, x / 2, mp.inf, regularized=True)


def fit(x, y, w=None, intercept=True, degree=1, known=False):
    """Weighted polynomial least squares in mpmath. Returns coefficients by power, covariance, etc."""
    n = len(x)
    w = [M(1)] * n if w is None else [M(v) for v in w]
    xs = [M(v) for v in x]
    ys = [M(v) for v in y]
    powers = ([0] if intercept else []) + list(range(1, degree + 1))
    p = len(powers)
    X = [[xi ** e for e in powers] for xi in xs]
    G = mp.matrix(p, p)
    h = mp.matrix(p, 1)
    for a in range(p):
        for c in range(p):
            G[a, c] = mp.fsum(w[i] * X[i][a] * X[i][c] for i in range(n))
        h[a] = mp.fsum(w[i] * X[i][a] * ys[i] for i in range(n))
    Gi = G ** -1
    b = Gi * h
    res = [ys[i] - mp.fsum(X[i][a] * b[a] for a in range(p)) for i in range(n)]
    rss = mp.fsum(w[i] * res[i] ** 2 for i in range(n))
    df = n - p
    s2 = M(1) if known else rss / df
    C = Gi * s2
    coef = {e: b[a] for a, e in enumerate(powers)}
    return dict(powers=powers, b=b, C=C, rss=rss, df=df, s2=s2, n=n, xs=xs, ys=ys, w=w, res=res, known=known, p=p)


def f_of(F, x):
    return mp.fsum(F["b"][a] * x ** e for a, e in enumerate(F["powers"]))


def df_of(F, x):
    return mp.fsum(F["b"][a] * e * x ** (e - 1) for a, e in enumerate(F["powers"]) if e > 0)


def var_of(F, x):
    z = [x ** e for e in F["powers"]]
    return mp.fsum(z[a] * F["C"][a, c] * z[c] for a in range(F["p"]) for c in range(F["p"]))


def inverse(F, y0, k=1, level=0.95, ureading=None):
    y0 = M(y0)
    lo, hi = min(F["xs"]), max(F["xs"])
    if F["powers"][-1] == 1:
        a = F["b"][0] if F["powers"][0] == 0 else M(0)
        b = F["b"][len(F["b"]) - 1]
        xh = (y0 - a) / b
    else:
        # the single root in [lo, hi], by findroot from a grid bracket
        N = 2000
        g = lambda t: f_of(F, t) - y0
        roots = []
        prev = lo
        gp = g(lo)
        for s in range(1, N + 1):
            t = lo + (hi - lo) * s / N
            gt = g(t)
            if gp * gt < 0:
                roots.append(mp.findroot(g, (prev, t), solver="bisect" if False else "anderson"))
            prev, gp = t, gt
        assert len(roots) == 1, roots
        xh = roots[0]
    rv = (F["s2"] if not F["known"] else M(ureading) ** 2) / k
    u = mp.sqrt(rv + var_of(F, xh)) / abs(df_of(F, xh))
    q = normal_quantile(M(1) / 2 + M(level) / 2) if F["known"] else t_quantile(M(1) / 2 + M(level) / 2, F["df"])
    band = lambda t: (f_of(F, t) - y0) ** 2 - q * q * (rv + var_of(F, t))
    if F["powers"][-1] == 1:
        # closed form quadratic in x
        i1 = len(F["powers"]) - 1
        c11 = F["C"][i1, i1]
        c00 = F["C"][0, 0] if F["powers"][0] == 0 else M(0)
        c01 = F["C"][0, i1] if F["powers"][0] == 0 else M(0)
        a = F["b"][0] if F["powers"][0] == 0 else M(0)
        b = F["b"][i1]
        A = b * b - q * q * c11
        B = 2 * (b * (a - y0) - q * q * c01)
        C0 = (a - y0) ** 2 - q * q * (rv + c00)
        d = mp.sqrt(B * B - 4 * A * C0)
        r = sorted([(-B - d) / (2 * A), (-B + d) / (2 * A)])
        lower, upper = r
    else:
        # bracket by stepping outward, then solve in 50 digits
        h = (hi - lo) / 1024

        def side(sgn):
            t0 = xh
            s = 1
            while True:
                t = xh + sgn * s * h
                if band(t) >= 0:
                    return mp.findroot(band, (t0, t), solver="anderson")
                t0 = t
                s += 1

        lower, upper = side(-1), side(1)
    return dict(y0=float(y0), replicates=k, level=level, ureading=ureading, x=float(xh), u=float(u), lower=float(lower), upper=float(upper))


def din_limits(x, y, alpha, beta, k, m):
    F = fit(x, y)
    n = F["n"]
    s = mp.sqrt(F["s2"])
    b = F["b"][1]
    a = F["b"][0]
    sx0 = s / abs(b)
    xbar = mp.fsum(F["xs"]) / n
    Qx = mp.fsum((xi - xbar) ** 2 for xi in F["xs"])
    f = n - 2
    tA = t_quantile(1 - M(alpha), f)
    tB = t_quantile(1 - M(beta), f)
    tQ = t_quantile(1 - M(alpha) / 2, f)
    root = mp.sqrt(M(1) / m + M(1) / n + xbar ** 2 / Qx)
    dec = sx0 * tA * root
    det = sx0 * (tA + tB) * root
    K = k * sx0 * tQ
    quant = mp.findroot(lambda t: t - K * mp.sqrt(M(1) / m + M(1) / n + (t - xbar) ** 2 / Qx), 3 * dec)
    return dict(alpha=alpha, beta=beta, k=k, samples=m, decision=float(dec), detection=float(det), quantitation=float(quant), criticalResponse=float(a + b * dec), ichDetection=float(3.3 * sx0), ichQuantitation=float(10 * sx0))


def lack_of_fit(F, xs_raw):
    groups = {}
    for i, xv in enumerate(xs_raw):
        groups.setdefault(xv, []).append(i)
    sspe = M(0)
    for idx in groups.values():
        W = mp.fsum(F["w"][i] for i in idx)
        ym = mp.fsum(F["w"][i] * F["ys"][i] for i in idx) / W
        sspe += mp.fsum(F["w"][i] * (F["ys"][i] - ym) ** 2 for i in idx)
    g = len(groups)
    dfpe = F["n"] - g
    dflof = g - F["p"]
    sslof = F["rss"] - sspe
    Fv = (sslof / dflof) / (sspe / dfpe)
    return dict(sumSquares=float(sslof), df=dflof, pureErrorSumSquares=float(sspe), pureErrorDf=dfpe, F=float(Fv), p=float(f_upper(Fv, dflof, dfpe)))


def added_term(x, y, w, intercept, degree, known):
    F2 = fit(x, y, w, intercept, degree + 1, known)
    j = F2["p"] - 1
    t = F2["b"][j] / mp.sqrt(F2["C"][j, j])
    pv = mp.erfc(abs(t) / mp.sqrt(2)) if known else t_two_sided(t, F2["df"])
    return dict(term=f"x^{degree + 1}", t=float(t), p=float(pv))


def summary(F):
    return dict(
        coefficients=[float(v) for v in F["b"]],
        standardErrors=[float(mp.sqrt(F["C"][a, a])) for a in range(F["p"])],
        covariance=[[float(F["C"][a, c]) for c in range(F["p"])] for a in range(F["p"])],
        rss=float(F["rss"]),
        df=F["df"],
    )


def case(name, source, x, y, w=None, intercept=True, degree=1, known=False, readings=(), lof=False, limits=None):
    F = fit(x, y, w, intercept, degree, known)
    out = dict(name=name, source=source, x=[float(v) for v in x], y=[float(v) for v in y], weights=None if w is None else [float(v) for v in w], intercept=intercept, degree=degree, weighting="uncertainty" if known else "relative")
    if known:
        # weights are given to the functions as uncertainties u (w = 1/u²)
        out["weights"] = [float(1 / mp.sqrt(M(v))) for v in w]
    out.update(summary(F))
    if known:
        out["chi2"] = dict(chi2=float(F["rss"]), df=F["df"], p=float(chi2_upper(F["rss"], F["df"])), reduced=float(F["rss"] / F["df"]))
    out["inverse"] = [inverse(F, *r) for r in readings]
    if lof:
        out["lackOfFit"] = lack_of_fit(F, [float(v) for v in x])
    if F["df"] >= 2:
        out["addedTerm"] = added_term(x, y, w, intercept, degree, known)
    if limits:
        out["limits"] = din_limits(x, y, *limits)
    return out


def pontius():
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "..", "test", "fixtures", "nist-strd", "Pontius.dat")
    text = open(path).read()
    lines = text.splitlines()
    import re
    a, b = map(int, re.search(r"Data\s*\(lines\s+(\d+)\s+to\s+(\d+)\)", text).groups())
    rows = [l.split() for l in lines[a - 1:b] if l.strip()]
    y = [float(r[0]) for r in rows]
    x = [float(r[1]) for r in rows]
    return x, y


def gdr_line(x, y, ux, uy, r=None, level=0.95):
    """Generalized distance regression in mpmath, independently of York's iteration: b minimizes
    S(b) = Σ W_i(b)(y_i − a(b) − b x_i)² with a(b) the optimal intercept (found by findroot on
    dS/db = 0 from the ordinary line), and the uncertainties are (JᵀJ)⁻¹ of the full problem in
    (a, b, x*_1 … x*_n) with residuals ((x − x*)/u_x, (y − a − b x*)/u_y), correlated errors
    whitened by their 2 × 2 covariance."""
    n = len(x)
    r = r or [0] * n
    X = [M(v) for v in x]
    Y = [M(v) for v in y]
    vx = [M(v) ** 2 for v in ux]
    vy = [M(v) ** 2 for v in uy]
    cxy = [M(r[i]) * M(ux[i]) * M(uy[i]) for i in range(n)]

    def a_of(b):
        W = [1 / (vy[i] + b * b * vx[i] - 2 * b * cxy[i]) for i in range(n)]
        return mp.fsum(W[i] * (Y[i] - b * X[i]) for i in range(n)) / mp.fsum(W), W

    def S(b):
        a, W = a_of(b)
        return mp.fsum(W[i] * (Y[i] - a - b * X[i]) ** 2 for i in range(n))

    xb = mp.fsum(X) / n
    yb = mp.fsum(Y) / n
    b0 = mp.fsum((X[i] - xb) * (Y[i] - yb) for i in range(n)) / mp.fsum((X[i] - xb) ** 2 for i in range(n))
    b = mp.findroot(lambda t: mp.diff(S, t), b0)
    a, W = a_of(b)
    Smin = S(b)
    # full Jacobian: parameters (a, b, x*_i); per row residual vector L_i⁻¹ [x_i − x*_i, y_i − a − b x*_i]
    # where Σ_i = L_i L_iᵀ is the covariance of the row's errors; x*_i minimizes the row's distance.
    P = 2 + n
    J = mp.matrix(2 * n, P)
    for i in range(n):
        Si = mp.matrix([[vx[i], cxy[i]], [cxy[i], vy[i]]])
        Wi = Si ** -1
        # x*_i = argmin [dx, dy] Wi [dx, dy]ᵀ with dx = x − x*, dy = y − a − b x*
        A_ = mp.matrix([[1], [b]])
        rhs = mp.matrix([[X[i]], [Y[i] - a]])
        xs = ((A_.T * Wi * rhs)[0] / (A_.T * Wi * A_)[0])
        # whitening: Wi = Rᵀ R (Cholesky of the inverse)
        Lc = mp.cholesky(Wi)  # Wi = Lc Lcᵀ
        R = Lc.T
        # residual e = R [x − x*, y − a − b x*]; derivatives
        d = [[0, 0, -1], [-1, -xs, -b]]  # rows: dx, dy; columns: a, b, x*
        for rr in range(2):
            for cc, col in enumerate([0, 1, 2 + i]):
                J[2 * i + rr, col] += R[rr, 0] * d[0][cc] + R[rr, 1] * d[1][cc]
    V = (J.T * J) ** -1
    ua, ub, cov = mp.sqrt(V[0, 0]), mp.sqrt(V[1, 1]), V[0, 1]
    q = normal_quantile(M(1) / 2 + M(level) / 2)
    out = dict(x=[float(v) for v in x], y=[float(v) for v in y], ux=[float(v) for v in ux], uy=[float(v) for v in uy], r=[float(v) for v in r], level=level,
               intercept=float(a), slope=float(b), uIntercept=float(ua), uSlope=float(ub), covariance=float(cov), chi2=float(Smin), df=n - 2,
               p=float(chi2_upper(Smin, n - 2)) if n > 2 else None,
               lowerIntercept=float(a - q * ua), upperIntercept=float(a + q * ua), lowerSlope=float(b - q * ub), upperSlope=float(b + q * ub))
    return out


def deming(x, y, delta):
    """Deming's closed-form slope for a constant ratio δ = u_y²/u_x²."""
    n = len(x)
    X = [M(v) for v in x]
    Y = [M(v) for v in y]
    xb = mp.fsum(X) / n
    yb = mp.fsum(Y) / n
    sxx = mp.fsum((v - xb) ** 2 for v in X)
    syy = mp.fsum((v - yb) ** 2 for v in Y)
    sxy = mp.fsum((X[i] - xb) * (Y[i] - yb) for i in range(n))
    d = M(delta)
    b = (syy - d * sxx + mp.sqrt((syy - d * sxx) ** 2 + 4 * d * sxy ** 2)) / (2 * sxy)
    return float(yb - b * xb), float(b)


def orthogonal(x, y):
    """Total least squares: the line through the centroid along the first right singular vector."""
    n = len(x)
    X = [M(v) for v in x]
    Y = [M(v) for v in y]
    xb = mp.fsum(X) / n
    yb = mp.fsum(Y) / n
    A = mp.matrix([[X[i] - xb, Y[i] - yb] for i in range(n)])
    U, Sv, Vt = mp.svd_r(A)
    k = 0 if Sv[0] >= Sv[1] else 1
    b = Vt[k, 1] / Vt[k, 0]
    return float(yb - b * xb), float(b)


def linexy_cases():
    out = []
    iso = gdr_line([1.2, 1.9, 2.9, 4.0, 4.7, 5.9], [3.4, 4.4, 7.2, 8.5, 10.8, 13.5], [0.2] * 6, [0.2, 0.2, 0.2, 0.4, 0.4, 0.4])
    iso.update(name="iso28037-clause7", source="ISO/TS 28037:2010 clause 7 example")
    out.append(iso)
    # invented method comparison: two analysers measuring the same samples
    n = 12
    truth = [2 + 3 * t for t in range(n)]
    xs = [float(f"{v + 0.3 * rng.standard_normal():.3f}") for v in truth]
    ys = [float(f"{0.4 + 1.05 * v + 0.5 * rng.standard_normal():.3f}") for v in truth]
    dem = gdr_line(xs, ys, [0.3] * n, [0.5] * n)
    dem.update(name="invented-deming", source="invented (seeded); Deming slope, δ = (0.5/0.3)²")
    dem["deming"] = deming(xs, ys, (M(0.5) / M(0.3)) ** 2)
    out.append(dem)
    orth = gdr_line(xs, ys, [0.4] * n, [0.4] * n)
    orth.update(name="invented-orthogonal", source="invented (seeded); orthogonal line from the SVD of the centred data")
    orth["orthogonal"] = orthogonal(xs, ys)
    out.append(orth)
    # correlated errors, and uncertainties that differ wildly from row to row
    m = 9
    xs = [float(f"{0.5 * t + 0.05 * rng.standard_normal():.4f}") for t in range(1, m + 1)]
    ys = [float(f"{1.5 - 0.8 * v + 0.1 * rng.standard_normal():.4f}") for v in xs]
    uxs = [float(f"{v:.4g}") for v in 10 ** rng.uniform(-3, -0.5, m)]
    uys = [float(f"{v:.4g}") for v in 10 ** rng.uniform(-3, -0.5, m)]
    rs = [float(f"{v:.3f}") for v in rng.uniform(-0.8, 0.8, m)]
    c = gdr_line(xs, ys, uxs, uys, rs)
    c.update(name="invented-correlated-wild", source="invented (seeded)")
    out.append(c)
    # three rows and two rows
    c3 = gdr_line([1.0, 2.0, 3.5], [2.1, 3.9, 7.2], [0.1, 0.2, 0.1], [0.3, 0.2, 0.4])
    c3.update(name="invented-three-rows", source="invented")
    out.append(c3)
    c2 = gdr_line([1.0, 3.0], [2.0, 5.0], [0.1, 0.2], [0.3, 0.1])
    c2.update(name="invented-two-rows", source="invented")
    out.append(c2)
    return out


def nist_rows(name):
    here = os.path.dirname(os.path.abspath(__file__))
    text = open(os.path.join(here, "..", "test", "fixtures", "nist-strd", f"{name}.dat")).read()
    import re
    a, b = map(int, re.search(r"Data\s*\(lines\s+(\d+)\s+to\s+(\d+)\)", text).groups())
    return [[float(v) for v in l.split()] for l in text.splitlines()[a - 1:b] if l.strip()]


def exact_influence(name):
    """Leverage, standardized and studentized residuals and Cook's distance of a NIST dataset with
    an intercept, from the exact rational hat matrix (Python fractions; the decimal data converted
    exactly from their binary doubles), square roots in 50-digit mpmath."""
    from fractions import Fraction as Fr
    rows = nist_rows(name)
    n = len(rows)
    X = [[Fr(1)] + [Fr(v) for v in r[1:]] for r in rows]
    y = [Fr(r[0]) for r in rows]
    p = len(X[0])
    G = [[sum(X[i][a] * X[i][c] for i in range(n)) for c in range(p)] for a in range(p)]
    # exact inverse by Gauss-Jordan
    A = [G[a][:] + [Fr(int(a == c)) for c in range(p)] for a in range(p)]
    for c in range(p):
        piv = next(r for r in range(c, p) if A[r][c] != 0)
        A[c], A[piv] = A[piv], A[c]
        inv = 1 / A[c][c]
        A[c] = [v * inv for v in A[c]]
        for r in range(p):
            if r != c and A[r][c] != 0:
                f = A[r][c]
                A[r] = [A[r][t] - f * A[c][t] for t in range(2 * p)]
    Gi = [row[p:] for row in A]
    h = [sum(X[i][a] * Gi[a][c] * X[i][c] for a in range(p) for c in range(p)) for i in range(n)]
    Xty = [sum(X[i][a] * y[i] for i in range(n)) for a in range(p)]
    b = [sum(Gi[a][c] * Xty[c] for c in range(p)) for a in range(p)]
    r = [y[i] - sum(X[i][a] * b[a] for a in range(p)) for i in range(n)]
    rss = sum(v * v for v in r)
    df = n - p
    s2 = rss / df
    out = []
    for i in range(n):
        std = M(r[i].numerator) / M(r[i].denominator) / mp.sqrt(M(s2.numerator) / M(s2.denominator) * (1 - M(h[i].numerator) / M(h[i].denominator)))
        d = df - std * std
        stud = std * mp.sqrt((df - 1) / d)
        cooks = std * std * (M(h[i].numerator) / M(h[i].denominator)) / (p * (1 - M(h[i].numerator) / M(h[i].denominator)))
        out.append(dict(leverage=float(M(h[i].numerator) / M(h[i].denominator)), standardized=float(std), studentized=float(stud), cooks=float(cooks)))
    return dict(dataset=name, rows=out)


def distributions():
    return dict(
        tQuantile=[dict(p=pp, df=df, q=float(t_quantile(pp, df))) for pp, df in [(0.975, 1), (0.975, 2), (0.975, 5), (0.975, 10), (0.975, 30), (0.995, 10), (0.95, 5), (0.99, 8), (0.995, 8)]],
        fUpper=[dict(f=f, d1=a, d2=b, p=float(f_upper(M(f), a, b))) for f, a, b in [(4.965, 1, 10), (4.103, 2, 10), (3.326, 5, 10), (2.348, 10, 20), (214.7464, 18, 20)]],
        normalQuantile=[dict(p=pp, q=float(normal_quantile(pp))) for pp in [0.5, 0.9, 0.95, 0.975, 0.995, 0.9995, 1e-10]],
        chiSquareUpper=[dict(x=x, k=k, p=float(chi2_upper(M(x), k))) for x, k in [(1.665, 4), (4.131, 4), (2.743, 4), (0.01, 1), (50.0, 10), (300.0, 200), (1e3, 3)]],
    )


def main():
    cases = []
    mx = [0, 10, 20, 30, 40, 50]
    my = [4.0, 21.2, 44.6, 61.8, 78.0, 105.2]
    cases.append(case("massart", "Massart et al., Handbook of Chemometrics and Qualimetrics (1997), Part A, ch. 8", mx, my, readings=[(15,), (90,), (90, 5)]))
    ix = [1, 2, 3, 4, 5, 6]
    cases.append(case("iso28037-ex1", "ISO/TS 28037:2010 clause 6, example 1", ix, [3.3, 5.6, 7.1, 9.3, 10.7, 12.1], w=[1 / M(0.5) ** 2] * 6, known=True, readings=[(10.5, 1, 0.95, 0.5)]))
    cases.append(case("iso28037-ex2", "ISO/TS 28037:2010 clause 6, example 2", ix, [3.2, 4.3, 7.6, 8.6, 11.7, 12.8], w=[1 / M(u) ** 2 for u in [0.5, 0.5, 0.5, 1, 1, 1]], known=True, readings=[(10.5, 1, 0.95, 1.0)]))
    dx = [round(0.05 * i, 2) for i in range(1, 11)]
    dy = [3060, 3522, 3707, 4280, 5058, 5510, 5703, 6205, 7156, 7178]
    cases.append(case("din32645", "DIN 32645 example", dx, dy, limits=(0.01, 0.01, 3, 1)))
    px, py = pontius()
    cases.append(case("pontius-line", "NIST/SEMATECH e-Handbook §4.6.1 (NIST StRD Pontius data), straight line", px, py, lof=True))

    # Invented: an absorbance calibration with duplicate standards and relative weights 1/x²
    xs = [0.5, 0.5, 1, 1, 2, 2, 4, 4, 8, 8]
    ys = [0.5 * 0.121 * v * (1 + 0.02 * rng.standard_normal()) + 0.004 for v in xs]
    ys = [float(f"{v:.5f}") for v in ys]
    cases.append(case("invented-weighted-line", "invented (seeded)", xs, ys, w=[1 / v ** 2 for v in xs], readings=[(0.1,), (0.3, 3)], lof=True))
    # Invented: a curved sensor response, quadratic, with replicates
    xs = [0, 0, 5, 5, 10, 10, 15, 15, 20, 20, 25, 25]
    ys = [float(f"{2.0 + 1.8 * v - 0.021 * v * v + 0.15 * rng.standard_normal():.3f}") for v in xs]
    cases.append(case("invented-quadratic", "invented (seeded)", xs, ys, degree=2, readings=[(20.0,), (30.5, 2), (8.0, 1, 0.99)], lof=True))
    # Invented: a line through zero with replicates of the reading
    xs = [1, 2, 3, 4, 5, 6, 7, 8]
    ys = [float(f"{0.84 * v + 0.03 * rng.standard_normal():.4f}") for v in xs]
    cases.append(case("invented-no-intercept", "invented (seeded)", xs, ys, intercept=False, readings=[(3.3,), (3.3, 4)]))
    # Invented: known uncertainties that grow with the level, cubic
    xs = [0.0, 1, 2, 3, 4, 5, 6, 7, 8]
    us = [0.02 + 0.01 * v for v in xs]
    ys = [float(f"{0.1 + 0.9 * v + 0.05 * v * v - 0.003 * v ** 3 + u * rng.standard_normal():.4f}") for v, u in zip(xs, us)]
    cases.append(case("invented-known-cubic", "invented (seeded)", xs, ys, w=[1 / M(u) ** 2 for u in us], degree=3, known=True, readings=[(4.0, 1, 0.95, 0.05), (7.5, 2, 0.9, 0.04)]))
    out = dict(generator="scripts/gen-calibration.py", seed=SEED, python=sys.version.split()[0], numpy=np.__version__, mpmath=mp.__version__, precisionDigits=mp.mp.dps, cases=cases, linexy=linexy_cases(), influence=exact_influence("Longley"), distributions=distributions())
    here = os.path.dirname(os.path.abspath(__file__))
    with open(os.path.join(here, "..", "test", "fixtures", "calibration.json"), "w") as f:
        json.dump(out, f, indent=1)
    print(f"wrote {len(cases)} calibration cases (mpmath {mp.__version__})")


if __name__ == "__main__":
    main()
