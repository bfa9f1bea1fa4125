"""Whole-process reference for `npm run bench`: what an analyst would run in Python on the same CSV.

  python3 pandas_whole.py sklearn CSV      pandas.read_csv + scikit-learn LogisticRegression(penalty=None,
                                           solver="newton-cholesky", tol=1e-10): estimates only
  python3 pandas_whole.py statsmodels CSV  pandas.read_csv + statsmodels Logit(...).fit(method="newton") and its
                                           summary (Wald SEs, z tests, Wald 95 % intervals; no profile limits, no
                                           likelihood-ratio test per term)

The outcome is the column "y"; every other column is a numeric predictor (the synthetic files of src/cli/bench).
Prints one line: the library versions and the first slope, so the run is seen to have fitted.
"""
import sys
import warnings

import pandas as pd


def main():
    mode, csv = sys.argv[1], sys.argv[2]
    d = pd.read_csv(csv)
    y = d["y"].to_numpy()
    X = d.drop(columns=["y"]).to_numpy()
    if mode == "sklearn":
        import sklearn
        from sklearn.linear_model import LogisticRegression

        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            m = LogisticRegression(penalty=None, solver="newton-cholesky", tol=1e-10, max_iter=100).fit(X, y)
        print(f"pandas {pd.__version__}, scikit-learn {sklearn.__version__}: first slope {m.coef_[0][0]:.6f}")
    elif mode == "statsmodels":
        import statsmodels
        import statsmodels.api as sm

        r = sm.Logit(y, sm.add_constant(X)).fit(method="newton", disp=0, tol=1e-10, maxiter=100)
        r.summary()  # the table an analyst reads: Wald SEs, z, p, Wald intervals
        print(f"pandas {pd.__version__}, statsmodels {statsmodels.__version__}: first slope {r.params[1]:.6f}")
    else:
        sys.exit(f"unknown mode {mode}")


if __name__ == "__main__":
    main()
