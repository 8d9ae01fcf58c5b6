"""The scikit-learn side of test/python/sklearn-cross-check.test.ts.

Usage: /usr/bin/python3 -B diabetes-permutation-importance.py OUTPUT_DIRECTORY

On the diabetes data bundled with Debian's python3-sklearn 1.2.1 (442 rows, 10 raw, unscaled
features; the target a disease-progression score), with a fixed seed: split the rows into train and
holdout, fit a GradientBoostingRegressor on train, export it with sample-repo/python/onnx_export.py
to OUTPUT_DIRECTORY/model.onnx, and write OUTPUT_DIRECTORY/sklearn.json with the holdout row
numbers, the model's holdout predictions and MSE, and sklearn.inspection.permutation_importance of
the same fitted model on the holdout rows (200 repeats) for scoring='neg_mean_squared_error' and
'neg_root_mean_squared_error': per feature the mean, the sample SD (ddof 1) of the 200 repeats and
the standard error of the mean, SD / sqrt(200).
"""
import json
import os
import sys

import numpy as np
from sklearn.ensemble import GradientBoostingRegressor
from sklearn.inspection import permutation_importance
from sklearn.metrics import mean_squared_error

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, '..', '..', 'sample-repo', 'python'))
from onnx_export import Column, export_onnx  # noqa: E402

DATA = '/usr/lib/python3/dist-packages/sklearn/datasets/data'
# The names sklearn.datasets.load_diabetes gives the columns of diabetes_data_raw.csv.gz.
FEATURES = ['age', 'sex', 'bmi', 'bp', 's1', 's2', 's3', 's4', 's5', 's6']
SPLIT_SEED = 20240601
SKLEARN_SEED = 7
REPEATS = 200
HOLDOUT_FRACTION = 0.3

out = sys.argv[1]
x = np.loadtxt(os.path.join(DATA, 'diabetes_data_raw.csv.gz'))
y = np.loadtxt(os.path.join(DATA, 'diabetes_target.csv.gz'))
order = np.random.RandomState(SPLIT_SEED).permutation(len(y))
n_holdout = round(HOLDOUT_FRACTION * len(y))
holdout, train = np.sort(order[:n_holdout]), np.sort(order[n_holdout:])

model = GradientBoostingRegressor(n_estimators=100, max_depth=3, learning_rate=0.1, random_state=0).fit(x[train], y[train])
columns = [Column(name, 'numeric', fill=float(x[train, j].mean())) for j, name in enumerate(FEATURES)]
with open(os.path.join(out, 'model.onnx'), 'wb') as f:
    f.write(export_onnx(model, columns, doc='GradientBoostingRegressor on the diabetes data').SerializeToString())

prediction = model.predict(x[holdout])
scorings = ['neg_mean_squared_error', 'neg_root_mean_squared_error']
results = permutation_importance(model, x[holdout], y[holdout], scoring=scorings, n_repeats=REPEATS, random_state=SKLEARN_SEED)
summary = {}
for scoring in scorings:
    draws = results[scoring].importances  # features x repeats; baseline score minus permuted score
    sd = draws.std(axis=1, ddof=1)
    summary[scoring] = {'mean': draws.mean(axis=1).tolist(), 'sd': sd.tolist(), 'se': (sd / np.sqrt(REPEATS)).tolist()}
json.dump({
    'features': FEATURES,
    'rows': len(y),
    'holdout': holdout.tolist(),
    'prediction': prediction.tolist(),
    'mse': mean_squared_error(y[holdout], prediction),
    'repeats': REPEATS,
    'importance': summary,
}, open(os.path.join(out, 'sklearn.json'), 'w'))
