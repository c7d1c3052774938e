"""NumPy/pandas/SciPy reference for `npm run bench`: computes the same summary as the engine
(methods.md §1-§5) for a CSV with numeric features, a label column and a shard column, the way a
data scientist would write it with vectorized NumPy. Prints the summary as JSON on stdout and the
per-stage times on stderr as one JSON line.

usage: /usr/bin/python3 reference_summary.py DATA.csv LABEL SHARD [LAMBDA]
"""
import json
import sys
import time

import numpy as np
import pandas as pd
from scipy.optimize import minimize, minimize_scalar
from scipy.special import gammaln, logsumexp, softmax
from threadpoolctl import threadpool_info


def main():
    path, label, shard = sys.argv[1:4]
    lam = float(sys.argv[4]) if len(sys.argv) > 4 else 1e-3
    # Which BLAS kernels NumPy runs, so the bench can say what it compared against.
    blas = [{key: pool.get(key) for key in ("internal_api", "version", "architecture", "num_threads")}
            for pool in threadpool_info() if pool.get("user_api") == "blas"]
    print("blas " + json.dumps(blas), file=sys.stderr)
    times = {}
    start = time.perf_counter()

    frame = pd.read_csv(path, na_values=["NA", "N/A", "NaN", "null", "None"], keep_default_na=False)
    frame = frame[frame[label].notna()]
    times["parse"] = time.perf_counter() - start
    start = time.perf_counter()

    classes = sorted(frame[label].astype(str).unique())
    y = pd.Categorical(frame[label].astype(str), categories=classes).codes.astype(np.int64)
    shard_ids = sorted(frame[shard].astype(str).unique())
    s = pd.Categorical(frame[shard].astype(str), categories=shard_ids).codes.astype(np.int64)
    X = frame.drop(columns=[label, shard]).to_numpy(np.float64)
    del frame
    X = np.nan_to_num(X - np.nanmean(X, axis=0), nan=0.0)
    std = X.std(axis=0)
    X = X[:, std >= 1e-12] / std[std >= 1e-12]
    n, d = X.shape
    Xt = np.hstack([X, np.ones((n, 1))])
    del X
    p = d + 1
    C = len(classes)
    Y = np.zeros((n, C))
    Y[np.arange(n), y] = 1.0
    gram = Xt.T @ Xt / n
    H = 0.5 * np.linalg.eigvalsh(gram)[-1] + lam
    times["encode"] = time.perf_counter() - start
    start = time.perf_counter()

    mask = np.ones((C, p))
    mask[:, -1] = 0.0

    def objective(w):
        W = w.reshape(C, p)
        Z = Xt @ W.T
        lse = logsumexp(Z, axis=1)
        loss = np.mean(lse - Z[np.arange(n), y]) + 0.5 * lam * np.sum((W * mask) ** 2)
        P = np.exp(Z - lse[:, None])
        G = (P - Y).T @ Xt / n + lam * W * mask
        return loss, G.ravel()

    g0 = objective(np.zeros(C * p))[1]
    tol = 1e-8 * max(1.0, np.linalg.norm(g0))
    result = minimize(objective, np.zeros(C * p), jac=True, method="L-BFGS-B",
                      options={"gtol": tol / np.sqrt(C * p), "ftol": 0.0, "maxiter": 20000, "maxcor": 10})
    W = result.x.reshape(C, p)
    W[:, -1] -= W[:, -1].mean()
    times["fit"] = time.perf_counter() - start
    start = time.perf_counter()

    weights = np.bincount(s, minlength=len(shard_ids)) / n

    def measure(W, with_noise):
        Z = Xt @ W.T
        P = softmax(Z, axis=1)
        R = P - Y
        reg = lam * W * mask
        loss_rows = logsumexp(Z, axis=1) - Z[np.arange(n), y]
        g, noise, losses = [], [], []
        row_norms = np.einsum("ij,ij->i", Xt, Xt) if with_noise else None
        resid_norms = np.einsum("ic,ic->i", R, R) if with_noise else None
        for m in range(len(shard_ids)):
            rows = s == m
            data_grad = R[rows].T @ Xt[rows] / rows.sum()
            g.append(data_grad + reg)
            losses.append(loss_rows[rows].mean() + 0.5 * lam * np.sum((W * mask) ** 2))
            if with_noise:
                noise.append(np.mean(resid_norms[rows] * row_norms[rows]) - np.sum(data_grad ** 2))
        g = np.array(g)
        grad = np.tensordot(weights, g, axes=1)
        zeta2 = float(np.sum(weights * np.sum((g - grad) ** 2, axis=(1, 2))))
        out = {"loss": float(np.dot(weights, losses)), "gradNorm": float(np.linalg.norm(grad)), "zeta2": zeta2,
               "zeta2Uniform": float(np.mean(np.sum((g - g.mean(0)) ** 2, axis=(1, 2)))), "g": g}
        if with_noise:
            out["shardSigma2"] = noise
            out["sigma2"] = float(np.dot(weights, noise))
            data_grad = R.T @ Xt / n
            out["sigma2Pooled"] = float(np.mean(resid_norms * row_norms) - np.sum(data_grad ** 2))
        return out

    at_ref = measure(W, True)
    path = [measure(t * W, False) for t in (0.0, 0.25, 0.5, 0.75)] + [at_ref]
    zeta2_max = max(point["zeta2"] for point in path)
    counts = np.array([np.bincount(y[s == m], minlength=C) for m in range(len(shard_ids))])
    pooled = counts.sum(0) / n
    q = counts / counts.sum(1, keepdims=True)
    with np.errstate(divide="ignore", invalid="ignore"):
        kl = np.where(q > 0, q * np.log(q / pooled), 0.0).sum(1)
        mid = (q + pooled) / 2
        js = 0.5 * (np.where(q > 0, q * np.log(q / mid), 0.0).sum(1) + (pooled * np.log(pooled / mid)).sum(1))
    tv = 0.5 * np.abs(q - pooled).sum(1)
    hellinger = np.sqrt(np.maximum(0.0, 1 - np.sqrt(q * pooled).sum(1)))

    def neg_log_likelihood(log_alpha):
        a = np.exp(log_alpha) * pooled
        return -np.sum(gammaln(a.sum()) - gammaln(counts.sum(1) + a.sum()) + np.sum(gammaln(counts + a) - gammaln(a), 1))

    alpha = float(np.exp(minimize_scalar(neg_log_likelihood, bounds=(np.log(1e-3), np.log(1e6)),
                                         method="bounded", options={"xatol": 1e-6}).x))
    sizes = np.sort(counts.sum(1))
    M = len(sizes)
    gini = float(np.sum((2 * np.arange(1, M + 1) - M - 1) * sizes) / (M * sizes.sum()))
    times["statistics"] = time.perf_counter() - start
    start = time.perf_counter()

    B = float(np.linalg.norm(W))
    K, R, b, participants = 10, 100, 32, M
    sb = np.sqrt(at_ref["sigma2"] / b)
    stat = sb * B / np.sqrt(participants * K * R)
    minibatch = H * B ** 2 / R + stat
    local = (H * B ** 2 / (K * R) + stat + np.cbrt(H * sb ** 2 * B ** 4) / (np.cbrt(K) * R ** (2 / 3))
             + np.cbrt(H * zeta2_max * B ** 4) / R ** (2 / 3))
    ratio = local / minibatch
    times["advice"] = time.perf_counter() - start

    summary = {
        "dataset": {"rows": int(n), "features": int(d), "classes": int(C), "task": "classification"},
        "shards": [{"id": shard_ids[m], "rows": int(counts[m].sum()), "tv": float(tv[m]), "hellinger": float(hellinger[m]),
                    "js": float(js[m]), "kl": float(kl[m]), "gradNorm2": float(np.sum(at_ref["g"][m] ** 2)),
                    "sigma2": float(at_ref["shardSigma2"][m])} for m in range(M)],
        "labelSkew": {"tv": float(weights @ tv), "hellinger": float(weights @ hellinger), "js": float(weights @ js),
                      "kl": float(weights @ kl), "dirichletAlpha": alpha},
        "quantitySkew": {"gini": gini, "cv": float(sizes.std() / sizes.mean())},
        "model": {"lambda": lam, "loss": at_ref["loss"], "gradNorm": at_ref["gradNorm"], "distance": B,
                  "iterations": int(result.nit), "evaluations": int(result.nfev)},
        "heterogeneity": {"zeta2": at_ref["zeta2"], "zeta2Uniform": at_ref["zeta2Uniform"], "zeta2Max": zeta2_max,
                          "sigma2": at_ref["sigma2"], "sigma2Pooled": at_ref["sigma2Pooled"], "smoothness": float(H)},
        "advice": {"participants": participants, "localSteps": K, "rounds": R, "batchSize": b,
                   "minibatch": float(minibatch), "acceleratedMinibatch": float(H * B ** 2 / R ** 2 + stat),
                   "local": float(local),
                   "verdict": "local-updates" if ratio <= 0.5 else "large-minibatch" if ratio >= 2 else "no-clear-winner",
                   "heterogeneityBarrier": bool(path[-1]["zeta2"] >= H ** 2 * B ** 2 / R)},
    }
    print(json.dumps(summary))
    print(json.dumps(times), file=sys.stderr)


if __name__ == "__main__":
    main()
