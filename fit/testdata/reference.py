"""reference.py: second, independent reference numbers for fit's tests.

numpy computes the ridge closed form on the standardised scale (the same
definition as reference.R, written again from scratch), and statsmodels
computes OLS/WLS heteroskedasticity-consistent standard errors with
cov_type='HC0'..'HC3'. Run from fit/testdata with Debian's Python:
    /usr/bin/python3 reference.py
Writes ref_python.csv (columns case,quantity,term,value; 17 significant
digits).
"""
import csv
import numpy as np
import statsmodels
import statsmodels.api as sm


def read(name):
    with open(name) as f:
        rows = [r for r in csv.reader(f) if r and not r[0].startswith("#")]
    head, body = rows[0], rows[1:]
    return {h: np.array([float(r[i]) for r in body]) for i, h in enumerate(head)}


out = []


def put(case, quantity, terms, values):
    if np.isscalar(values):
        terms, values = [terms], [values]
    for t, v in zip(terms, values):
        out.append((case, quantity, t, "%.17g" % v))


# ridge closed form: Z = (X - mean_w) / sd_w with divisor sum(w),
# b = (Z1' W Z1 + lambda D)^{-1} Z1' W y, D = diag(0, 1, ..., 1).
def ridge(case, X, names, y, w, lam, intercept=True):
    sw = w.sum()
    m = (w[:, None] * X).sum(0) / sw if intercept else np.zeros(X.shape[1])
    s = np.sqrt((w[:, None] * (X - m) ** 2).sum(0) / sw)
    Z = (X - m) / s
    if intercept:
        Z1 = np.column_stack([np.ones(len(y)), Z])
        D = np.diag([0.0] + [1.0] * X.shape[1])
    else:
        Z1, D = Z, np.eye(X.shape[1])
    A = Z1.T @ (w[:, None] * Z1) + lam * D
    b = np.linalg.solve(A, Z1.T @ (w * y))
    # effective degrees of freedom: trace of the hat matrix
    put(case, "edf", "", np.trace(np.linalg.solve(A, Z1.T @ (w[:, None] * Z1))))
    if intercept:
        beta = b[1:] / s
        beta = np.concatenate([[b[0] - (beta * m).sum()], beta])
        terms = ["intercept"] + names
    else:
        beta, terms = b / s, names
    put(case, "coef_std", terms, b)
    put(case, "coef", terms, beta)


r = read("ridge.csv")
names = ["a", "b", "c", "d"]
RX = np.column_stack([r[k] for k in names])
for lam in (0, 0.5, 3, 25):
    ridge("ridge_w_%g" % lam, RX, names, r["y"], r["w"], lam)
ridge("ridge_unw_3", RX, names, r["y"], np.ones(len(r["y"])), 3)
ridge("ridge_noint_3", RX, names, r["y"], r["w"], 3, intercept=False)

# HC0-HC3 from statsmodels (WLS whitens by sqrt(w) before the sandwich).
d = read("wls.csv")
X = np.column_stack([np.ones(len(d["y"])), d["lamp"], d["drift"], d["fest"]])
terms = ["intercept", "lamp", "drift", "fest"]
for case, model in (("ols", sm.OLS(d["y"], X)), ("wls", sm.WLS(d["y"], X, weights=d["w"]))):
    for k in ("HC0", "HC1", "HC2", "HC3"):
        res = model.fit(cov_type=k)
        put(case, "se_" + k, terms, res.bse)
    res = model.fit()
    put(case, "coef", terms, res.params)
    put(case, "se", terms, res.bse)

with open("ref_python.csv", "w", newline="") as f:
    f.write("# tool: statsmodels %s, numpy %s (Debian python3-statsmodels, python3-numpy)\n"
            % (statsmodels.__version__, np.__version__))
    f.write("# made by reference.py from the CSV files beside it\n")
    wr = csv.writer(f, lineterminator="\n")
    wr.writerow(["case", "quantity", "term", "value"])
    wr.writerows(out)
