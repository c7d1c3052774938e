"""Independent reference for the engine tests: methods.md §1-§4 written with pandas, NumPy, SciPy
and scikit-learn (Debian's python3-sklearn). Reads a JSON request on stdin:
  {"csv": path, "label": col, "shard": col, "lam": λ, "features": [cols] | null}
and prints the reference quantities as JSON. The optimum comes from scikit-learn's
LogisticRegression(C = 1/(λN), solver='newton-cg', multinomial) on the standardized features, with
intercepts re-centred to sum to zero (methods.md §2); per-sample gradients are formed explicitly here
(the engine never forms them) so the factorized noise formula is checked against the definition.
"""
import json
import sys
import warnings

import numpy as np
import pandas as pd
from scipy.optimize import minimize_scalar
from scipy.spatial.distance import jensenshannon
from scipy.special import gammaln, logsumexp, softmax
from scipy.stats import entropy
from sklearn.linear_model import LogisticRegression

MISSING_LOWER = ["", "na", "n/a", "nan", "null", "none"]  # methods.md §1, case-insensitive


def code_point_sorted(values):
    return sorted(values)  # Python compares str by code point


def encode(request):
    frame = pd.read_csv(request["csv"], dtype=str, keep_default_na=False)
    frame = frame.apply(lambda column: column.str.strip())
    label, shard = request["label"], request["shard"]
    find_missing = lambda table: table.apply(lambda column: column.str.lower().isin(MISSING_LOWER))
    frame = frame[~find_missing(frame)[label]].reset_index(drop=True)  # rows without a label are dropped
    is_missing = find_missing(frame)
    features = request.get("features") or [c for c in frame.columns if c not in (label, shard, request.get("id"))]
    columns, names = [], []
    for name in features:
        present = frame[name][~is_missing[name]]
        numbers = pd.to_numeric(present, errors="coerce")
        if numbers.notna().all():
            values = pd.to_numeric(frame[name].where(~is_missing[name]), errors="coerce")
            values = values.fillna(values.mean()).to_numpy(float)
            columns.append(values)
            names.append(name)
        else:
            levels = code_point_sorted(present.unique())
            if len(levels) > 32:
                continue
            for level in levels:
                columns.append((frame[name] == level).to_numpy(float))
                names.append(f"{name}={level}")
    raw = np.column_stack(columns)
    mean, std = raw.mean(axis=0), raw.std(axis=0)
    keep = std >= 1e-12
    x = (raw[:, keep] - mean[keep]) / std[keep]
    names = [n for n, k in zip(names, keep) if k]
    classes = code_point_sorted(frame[label].unique())
    y = np.array([classes.index(v) for v in frame[label]])
    shard_ids = code_point_sorted(frame[shard].unique())
    shards = np.array([shard_ids.index(v) for v in frame[shard]])
    return x, y, shards, classes, shard_ids, names


def main():
    # newton-cg may warn that it stopped at max_iter near tol=1e-11; the gradient is checked below.
    warnings.simplefilter("ignore")
    request = json.load(sys.stdin)
    lam = request["lam"]
    x, y, shards, classes, shard_ids, names = encode(request)
    n, d = x.shape
    C = len(classes)
    xt = np.hstack([x, np.ones((n, 1))])

    model = LogisticRegression(C=1.0 / (lam * n), solver="newton-cg", multi_class="multinomial",
                               tol=1e-11, max_iter=1000)
    model.fit(x, y)
    intercept = model.intercept_ - model.intercept_.mean()
    W = np.hstack([model.coef_, intercept[:, None]])

    def objective_parts(W, rows):
        scores = xt[rows] @ W.T
        p = softmax(scores, axis=1)
        onehot = np.eye(C)[y[rows]]
        loss = np.mean(logsumexp(scores, axis=1) - scores[np.arange(len(scores)), y[rows]])
        penalty = 0.5 * lam * np.sum(W[:, :-1] ** 2)
        reg = np.hstack([lam * W[:, :-1], np.zeros((C, 1))])
        per_sample = np.einsum("ic,ij->icj", p - onehot, xt[rows])  # explicit per-sample gradients
        data_gradient = per_sample.mean(axis=0)
        noise = np.mean(np.sum((per_sample - data_gradient) ** 2, axis=(1, 2)))
        return loss + penalty, data_gradient + reg, noise

    def at_point(W):
        all_rows = np.arange(n)
        F, grad, sigma2_pooled = objective_parts(W, all_rows)
        shard_values = [objective_parts(W, np.where(shards == m)[0]) for m in range(len(shard_ids))]
        weights = np.array([np.sum(shards == m) / n for m in range(len(shard_ids))])
        g = np.array([v[1] for v in shard_values])
        zeta2 = float(np.sum(weights * np.sum((g - grad) ** 2, axis=(1, 2))))
        gbar = g.mean(axis=0)
        zeta2_uniform = float(np.mean(np.sum((g - gbar) ** 2, axis=(1, 2))))
        return {
            "loss": float(F),
            "gradNorm": float(np.linalg.norm(grad)),
            "shardLoss": [float(v[0]) for v in shard_values],
            "shardGradients": [v[1].ravel().tolist() for v in shard_values],
            "shardSigma2": [float(v[2]) for v in shard_values],
            "sigma2": float(np.sum(weights * np.array([v[2] for v in shard_values]))),
            "sigma2Pooled": float(sigma2_pooled),
            "zeta2": zeta2,
            "zeta2Uniform": zeta2_uniform,
            "dissimilarity": float(np.sqrt(np.sum(weights * np.sum(g ** 2, axis=(1, 2)))) / np.linalg.norm(grad)),
        }

    gram = xt.T @ xt / n
    counts = np.array([[np.sum((shards == m) & (y == c)) for c in range(C)] for m in range(len(shard_ids))])
    pooled = counts.sum(axis=0) / n
    q = counts / counts.sum(axis=1, keepdims=True)

    def neg_log_likelihood(log_alpha):
        a = np.exp(log_alpha) * pooled
        total = 0.0
        for row in counts:
            total += gammaln(a.sum()) - gammaln(row.sum() + a.sum()) + np.sum(gammaln(row + a) - gammaln(a))
        return -total

    alpha = minimize_scalar(neg_log_likelihood, bounds=(np.log(1e-3), np.log(1e6)), method="bounded",
                            options={"xatol": 1e-9}).x

    sizes = counts.sum(axis=1) / n
    divergences = {
        "tv": np.array([0.5 * np.abs(qm - pooled).sum() for qm in q]),
        "hellinger": np.array([np.sqrt(1 - np.sqrt(qm * pooled).sum()) for qm in q]),
        "js": np.array([jensenshannon(qm, pooled) ** 2 for qm in q]),
        "kl": np.array([entropy(qm, pooled) for qm in q]),
    }
    # Gradient agreement (methods.md §3): cosines of the shard gradients at the start W0 = 0.
    start = np.array(at_point(np.zeros_like(W))["shardGradients"])
    unit = start / np.linalg.norm(start, axis=1, keepdims=True)

    print(json.dumps({
        "features": names,
        "classes": classes,
        "shardIds": shard_ids,
        "weights": W.ravel().tolist(),
        "smoothness": float(0.5 * np.linalg.eigvalsh(gram)[-1] + lam),
        "optimum": at_point(W),
        "zero": at_point(np.zeros_like(W)),
        "labelSkew": {
            "tv": [float(0.5 * np.abs(qm - pooled).sum()) for qm in q],
            "hellinger": [float(np.sqrt(1 - np.sqrt(qm * pooled).sum())) for qm in q],
            "js": [float(jensenshannon(qm, pooled) ** 2) for qm in q],
            "kl": [float(entropy(qm, pooled)) for qm in q],
            "dirichletAlpha": float(np.exp(alpha)),
            # methods.md §4: the report's label skew is the wm-weighted mean of each divergence
            # (wm = nm/N), and its maximum over the shards.
            "weightedMean": {k: float(np.sum(sizes * v)) for k, v in divergences.items()},
            "max": {k: float(np.max(v)) for k, v in divergences.items()},
        },
        "agreementAtZero": (unit @ unit.T).tolist(),
    }))


if __name__ == "__main__":
    main()
