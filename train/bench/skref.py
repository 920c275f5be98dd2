# Reference figures for train/forest_test.go: scikit-learn RandomForestClassifier
# (200 trees, max_features="sqrt") in 5-fold StratifiedKFold on `spade features`
# of the demo history, mean of random_state 1, 2, 3.
#   go run ./cmd/spade features datasets/demo/history.csv -o /tmp/f.csv
#   /usr/bin/python3 train/bench/skref.py /tmp/f.csv
import sys, csv, numpy as np, sklearn
from sklearn.ensemble import RandomForestClassifier
from sklearn.model_selection import StratifiedKFold, cross_val_predict
from sklearn.metrics import accuracy_score, log_loss
rows = list(csv.reader(open(sys.argv[1])))[1:]
y = np.array([r[1] + "/" + r[2] for r in rows])
X = np.array([[float(v) for v in r[3:]] for r in rows])
accs, lls = [], []
for seed in (1, 2, 3):
    rf = RandomForestClassifier(n_estimators=200, max_features="sqrt", n_jobs=2, random_state=seed)
    p = cross_val_predict(rf, X, y, cv=StratifiedKFold(5, shuffle=True, random_state=seed), method="predict_proba")
    classes = np.unique(y)
    accs.append(accuracy_score(y, classes[p.argmax(1)])); lls.append(log_loss(y, p, labels=classes))
print("sklearn", sklearn.__version__, "acc", np.mean(accs), accs, "logloss", np.mean(lls), lls)
