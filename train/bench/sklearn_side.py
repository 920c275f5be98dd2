"""scikit-learn's side of train/bench/compare.sh: on one `spade features`
table, 5-fold stratified CV accuracy and log-loss, the wall time of fit()
alone on all rows, the time to predict_proba 10,000 readings, and the
process's peak memory. RandomForestClassifier with 200 trees, max_features
"sqrt" (features per split), n_jobs=2, as issue 8 asks."""
import csv, json, resource, sys, time

import numpy as np
import sklearn
from sklearn.ensemble import RandomForestClassifier
from sklearn.metrics import accuracy_score, log_loss
from sklearn.model_selection import StratifiedKFold, cross_val_predict


def load(path):
    rows = list(csv.reader(open(path)))[1:]
    y = np.array([r[1] + "/" + r[2] for r in rows])
    X = np.array([[float(v) for v in r[3:]] for r in rows])
    return X, y


X, y = load(sys.argv[1])
Xnew, _ = load(sys.argv[2])
forest = lambda: RandomForestClassifier(n_estimators=200, max_features="sqrt", n_jobs=2, random_state=1)
classes = np.unique(y)
p = cross_val_predict(forest(), X, y, cv=StratifiedKFold(5, shuffle=True, random_state=1), method="predict_proba")
rf = forest()
t = time.perf_counter()
rf.fit(X, y)
fit = time.perf_counter() - t
t = time.perf_counter()
rf.predict_proba(Xnew)
pred = time.perf_counter() - t
print(json.dumps({
    "version": sklearn.__version__,
    "accuracy": accuracy_score(y, classes[p.argmax(1)]),
    "log_loss": log_loss(y, p, labels=classes),
    "fit_s": fit,
    "predict_s": pred,
    "peak_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
}))
