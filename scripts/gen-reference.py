#!/usr/bin/python3
"""Reference fixtures for the least-squares engine, from independent libraries.

Run with Debian's interpreter:  /usr/bin/python3 scripts/gen-reference.py
(needs python3-numpy and python3-mpmath). Writes test/fixtures/reference.json.

Problems are drawn with numpy's seeded generator (PCG64, seed below), so the file is
reproducible. Each problem is solved in 60-digit arithmetic with mpmath (weighted normal
equations on the kept columns, which is exact enough at this precision for scaled condition
numbers up to ~1e11), and the reference t and F tail probabilities and t quantiles come from
mpmath's regularized incomplete beta function and root finding.

Kinds: plain, weights (some zero), rank-deficient (a later column an exact combination of
earlier ones; the engine keeps the earlier columns), nearly collinear (scaled condition
1e3..1e11), skipped rows (missing y or x), no intercept, weighted polynomials of degree 2–6 in x
on [2, 6] (exact powers in mpmath, as the engine forms them in double-double).
"""
import json
import sys

import mpmath as mp
import numpy as np

SEED = 20261201
mp.mp.dps = 60
rng = np.random.Generator(np.random.PCG64(SEED))


def design(x, intercept, degree=1):
    """Design matrix as mpmath-exact values: powers of x are formed in mpmath (exactly) and kept
    as Python objects so the reference sees the exact powers, as the engine's double-double does."""
    m = x.shape[0]
    cols = ([np.ones(m)] if intercept else []) + [x[:, j] for j in range(x.shape[1])]
    if degree >= 2:
        base = x[:, 0]
        cols = ([np.ones(m)] if intercept else []) + [base ** e for e in range(1, degree + 1)]
    return np.column_stack(cols) if cols else np.zeros((m, 0))


def exact_entry(X, x, i, j, intercept, degree):
    """One design entry in mpmath: exact power for polynomial designs."""
    if degree >= 2:
        e = j if intercept else j + 1
        return mp.mpf(1) if e == 0 else mp.mpf(float(x[i, 0])) ** e
    return mp.mpf(float(X[i, j]))


def solve(X, y, w, kept, entry=None):
    """Weighted least squares on the kept columns in 60-digit arithmetic."""
    entry = entry or (lambda i, j: mp.mpf(float(X[i, j])))
    used = [i for i in range(len(y)) if not np.isnan(y[i]) and not np.isnan(X[i]).any() and w[i] > 0]
    n = len(used)
    p = X.shape[1]
    k = len(kept)
    A = mp.matrix(n, k)
    b = mp.matrix(n, 1)
    ww = [mp.mpf(float(w[i])) for i in used]
    for r, i in enumerate(used):
        for c, j in enumerate(kept):
            A[r, c] = entry(i, j)
        b[r] = mp.mpf(float(y[i]))
    G = mp.matrix(k, k)
    h = mp.matrix(k, 1)
    for a in range(k):
        for c in range(k):
            G[a, c] = mp.fsum(ww[r] * A[r, a] * A[r, c] for r in range(n))
        h[a] = mp.fsum(ww[r] * A[r, a] * b[r] for r in range(n))
    Ginv = G ** -1
    beta = Ginv * h
    fitted_all = []
    resid_all = []
    for i in range(len(y)):
        if np.isnan(X[i]).any() or np.isnan(y[i]):
            fitted_all.append(None)
            resid_all.append(None)
            continue
        f = mp.fsum(entry(i, j) * beta[c] for c, j in enumerate(kept))
        fitted_all.append(f)
        resid_all.append(mp.mpf(float(y[i])) - f)
    rss = mp.fsum(ww[r] * resid_all[i] ** 2 for r, i in enumerate(used))
    df = n - k
    sigma2 = rss / df if df > 0 else None
    coef = [None] * p
    se = [None] * p
    for c, j in enumerate(kept):
        coef[j] = beta[c]
        if sigma2 is not None:
            se[j] = mp.sqrt(sigma2 * Ginv[c, c])
    lev = [None] * len(y)
    for r, i in enumerate(used):
        xi = mp.matrix([[A[r, c] for c in range(k)]])
        lev[i] = ww[r] * (xi * Ginv * xi.T)[0, 0]
    return dict(n=n, df=df, coef=coef, se=se, rss=rss, sigma=mp.sqrt(sigma2) if sigma2 is not None else None,
                fitted=fitted_all, resid=resid_all, leverage=lev, used=used, ww=ww, b=[mp.mpf(float(y[i])) for i in used])


def rsquared(sol, intercept):
    ww = sol["ww"]
    b = sol["b"]
    if intercept:
        ybar = mp.fsum(w * v for w, v in zip(ww, b)) / mp.fsum(ww)
        tss = mp.fsum(w * (v - ybar) ** 2 for w, v in zip(ww, b))
    else:
        tss = mp.fsum(w * v ** 2 for w, v in zip(ww, b))
    return 1 - sol["rss"] / tss


def t_two_sided(t, df):
    df = mp.mpf(df)
    return mp.betainc(df / 2, mp.mpf(1) / 2, 0, df / (df + t * t), regularized=True)


def f_upper(f, d1, d2):
    d1 = mp.mpf(d1)
    d2 = mp.mpf(d2)
    return mp.betainc(d2 / 2, d1 / 2, 0, d2 / (d2 + d1 * f), regularized=True)


def t_quantile(p, df):
    # P(T <= q) = p for p > 1/2: two-sided tail 2(1 - p).
    target = 2 * (1 - mp.mpf(p))
    return mp.findroot(lambda q: t_two_sided(q, df) - target, mp.mpf(2))


def fl(v):
    return None if v is None else float(v)


def problem(kind, idx):
    m = int(rng.integers(8, 61))
    k = int(rng.integers(1, 6))
    intercept = kind != "no-intercept"
    scale = 2.0 ** rng.integers(-10, 11, size=k)  # columns of very different sizes
    x = np.round(rng.normal(size=(m, k)) * 64) / 64 * scale  # few bits: exact combinations stay exact
    beta = rng.normal(size=k + 1)
    y = (beta[0] if intercept else 0) + x @ beta[1:] + rng.normal(size=m) * 0.1
    w = np.ones(m)
    weights_given = False
    if kind == "weights":
        w = rng.uniform(0.1, 5.0, size=m)
        w[rng.integers(0, m, size=2)] = 0.0
        weights_given = True
    if kind == "rank-deficient":
        k += 1
        comb = rng.integers(-3, 4, size=k - 1)
        comb[0] = comb[0] if comb[0] != 0 else 2
        newcol = x @ comb.astype(float)
        x = np.column_stack([x, newcol])
    cond = None
    if kind == "nearly-collinear":
        cond = float(10.0 ** rng.integers(3, 12))
        base = x[:, 0]
        bump = rng.normal(size=m)
        bump -= bump.mean()
        newcol = base * 1.5 + 0.25 + bump * (np.linalg.norm(base) / np.linalg.norm(bump)) / cond
        x = np.column_stack([x, newcol])
        k += 1
    degree = 1
    if kind == "weighted-polynomial":
        degree = int(rng.integers(2, 7))
        k = 1
        x = (np.round(rng.uniform(2.0, 6.0, size=(m, 1)) * 256) / 256)  # away from 0: powers are ill-conditioned
        y = np.polyval(rng.normal(size=degree + 1), x[:, 0]) + rng.normal(size=m) * 0.05
        w = rng.uniform(0.2, 3.0, size=m)
        weights_given = True
    if kind == "skipped":
        for i in rng.integers(0, m, size=3):
            if rng.random() < 0.5:
                y[i] = np.nan
            else:
                x[i, int(rng.integers(0, k))] = np.nan
    X = design(x, intercept, degree)
    p = X.shape[1]
    kept = list(range(p))
    if kind == "rank-deficient":
        kept = kept[:-1]
    entry = lambda i, j: exact_entry(X, x, i, j, intercept, degree)
    sol = solve(X, y, w, kept, entry)
    r2 = rsquared(sol, intercept)
    tvals = []
    pvals = []
    for j in range(p):
        if sol["coef"][j] is not None and sol["se"][j] is not None and sol["se"][j] != 0:
            t = sol["coef"][j] / sol["se"][j]
            tvals.append(fl(t))
            pvals.append(fl(t_two_sided(t, sol["df"])))
        else:
            tvals.append(None)
            pvals.append(None)
    # prediction at a new row (the mean of the used rows, shifted), weight 1 for a new observation
    used = sol["used"]
    # (rank-deficient problems: a data row, which satisfies the exact dependency between columns)
    if kind == "rank-deficient":
        x0 = [mp.mpf(float(v)) for v in X[used[0]]]
    elif degree >= 2:
        xv = mp.mpf(float(np.mean(x[used, 0]) + 0.25))
        x0 = ([mp.mpf(1)] if intercept else []) + [xv ** e for e in range(1, degree + 1)]
    else:
        x0 = [mp.mpf(float(np.mean(X[used][:, j]) + (0.25 if (j > 0 or not intercept) else 0.0))) for j in range(p)]
        if intercept:
            x0[0] = mp.mpf(1)
    pred = None
    if sol["sigma"] is not None:
        k_ = len(kept)
        A = mp.matrix(len(used), k_)
        for r_, i in enumerate(used):
            for c, j in enumerate(kept):
                A[r_, c] = entry(i, j)
        G = mp.matrix(k_, k_)
        for a in range(k_):
            for c in range(k_):
                G[a, c] = mp.fsum(sol["ww"][r_] * A[r_, a] * A[r_, c] for r_ in range(len(used)))
        Ginv = G ** -1
        xk = mp.matrix([[x0[j] for j in kept]])
        q = (xk * Ginv * xk.T)[0, 0]
        yhat = mp.fsum(x0[j] * sol["coef"][j] for j in kept)
        xs = [float(x0[1 if intercept else 0])] if degree >= 2 else ([float(v) for v in x0[1:]] if intercept else [float(v) for v in x0])
        pred = dict(x=xs, value=fl(yhat), seMean=fl(sol["sigma"] * mp.sqrt(q)), seNew=fl(sol["sigma"] * mp.sqrt(1 + q)))
    # studentized (deleted) residuals and Cook's distance for the used rows
    stud = [None] * len(y)
    cooks = [None] * len(y)
    if sol["sigma"] is not None and sol["df"] > 1:
        s2 = sol["sigma"] ** 2
        for r_, i in enumerate(used):
            h = sol["leverage"][i]
            e = mp.sqrt(sol["ww"][r_]) * sol["resid"][i]
            if 1 - h > mp.mpf(10) ** -12:
                st = e / (sol["sigma"] * mp.sqrt(1 - h))
                df = sol["df"]
                stud[i] = fl(st * mp.sqrt((df - 1) / (df - st * st)))
                cooks[i] = fl(st * st * h / (len(kept) * (1 - h)))
    # numpy's own least-squares solution as a second, double-precision opinion
    sw = np.sqrt(w[used])
    np_coef = np.linalg.lstsq(X[used][:, kept] * sw[:, None], y[used] * sw, rcond=None)[0]
    return dict(
        name=f"{kind}-{idx}",
        kind=kind,
        intercept=intercept,
        rows=m,
        cols=k,
        degree=degree,
        x=[[None if np.isnan(v) else float(v) for v in row] for row in x],
        y=[None if np.isnan(v) else float(v) for v in y],
        weights=[float(v) for v in w] if weights_given else None,
        targetCondition=cond,
        rank=len(kept),
        nonIdentifiable=[j for j in range(p) if j not in kept],
        coefficients=[fl(v) for v in sol["coef"]],
        standardErrors=[fl(v) for v in sol["se"]],
        tStatistics=tvals,
        pValues=pvals,
        sigma=fl(sol["sigma"]),
        rss=fl(sol["rss"]),
        rSquared=fl(r2),
        residualDf=sol["df"],
        fitted=[fl(v) for v in sol["fitted"]],
        residuals=[fl(v) for v in sol["resid"]],
        leverage=[fl(v) for v in sol["leverage"]],
        numpyCoefficients=[float(v) for v in np_coef],
        prediction=pred,
        studentized=stud,
        cooks=cooks,
    )


def main():
    problems = []
    for kind in ["plain", "weights", "rank-deficient", "nearly-collinear", "skipped", "no-intercept", "weighted-polynomial"]:
        for i in range(8):
            problems.append(problem(kind, i))
    dist = dict(
        tTwoSided=[dict(t=t, df=df, p=fl(t_two_sided(mp.mpf(t), df))) for t, df in [(0.5, 3), (1.96, 10), (2.5, 7), (4.0, 30), (12.0, 5), (40.0, 20), (0.01, 1), (3.3, 200)]],
        fUpper=[dict(f=f, d1=a, d2=b, p=fl(f_upper(mp.mpf(f), a, b))) for f, a, b in [(1.0, 2, 10), (3.7, 3, 10), (10.0, 5, 30), (250.0, 4, 12), (0.3, 1, 1), (2162.4, 10, 71)]],
        tQuantile=[dict(p=pp, df=df, q=fl(t_quantile(pp, df))) for pp, df in [(0.975, 1), (0.975, 10), (0.995, 5), (0.95, 30), (0.9, 3), (0.975, 1000)]],
    )
    out = dict(
        generator="scripts/gen-reference.py",
        seed=SEED,
        python=sys.version.split()[0],
        numpy=np.__version__,
        mpmath=mp.__version__,
        precisionDigits=mp.mp.dps,
        problems=problems,
        distributions=dist,
    )
    with open("test/fixtures/reference.json", "w") as f:
        json.dump(out, f, indent=1)
    print(f"wrote {len(problems)} problems (numpy {np.__version__}, mpmath {mp.__version__})")


if __name__ == "__main__":
    main()
