"""The reference side of test/python/multiclass-onnx.test.ts: three-class models fitted by scikit-learn
1.2.1 and XGBoost 1.7.4 (Debian python3-sklearn, python3-xgboost), written as ONNX graphs with
python3-onnx 1.12's helper (no converter package), with the libraries' own predictions and
sklearn.inspection.permutation_importance.

Usage: /usr/bin/python3 -B multiclass-onnx.py OUTPUT_DIRECTORY

Data: the wine table (178 rows, 13 features, cultivar 0, 1, 2) and the iris table (150 rows, 4
features, species 0, 1, 2) bundled with python3-sklearn, read with load_wine / load_iris
(return_X_y, no pandas). Rows i with i % 4 == 0 are the holdout, the others train.

Writes into OUTPUT_DIRECTORY:
- forest.onnx: RandomForestClassifier(60 trees, depth 5) on wine as a TreeEnsembleClassifier with
  post_transform NONE (each leaf's class fractions divided by the number of trees, float32; each
  threshold the largest float32 at or below scikit-learn's, so float32 inputs split as they do), labels
  classlabels_strings class_0, class_1, class_2, float input [N, 13].
- boosted.onnx: xgboost.XGBClassifier(objective multi:softprob, 40 rounds, depth 3) on iris as a
  TreeEnsembleClassifier with post_transform SOFTMAX (tree t holds the weights of class t % 3, XGBoost's
  'x < split_condition' as BRANCH_LT, its missing direction as nodes_missing_value_tracks_true), base
  value 0.5 per class, labels classlabels_int64s 0, 1, 2, float input [N, 4].
- linear.onnx: StandardScaler + LogisticRegression (multinomial, lbfgs) on wine folded into one
  MatMul + Add + Softmax graph in double precision, no labels.
- reference.json: per model the rows scored and the library's predict_proba on them (the iris rows
  with a tenth of the holdout cells set to NaN, to exercise XGBoost's missing directions), and
  permutation_importance(model, holdout X, holdout y, scoring='neg_log_loss', n_repeats=200,
  random_state=5) of the linear and the boosted model: per feature the mean, SD (ddof 1) and SE.
"""
import json
import os
import sys

import numpy as np
import xgboost as xgb
from onnx import TensorProto, helper, numpy_helper, save
from sklearn.datasets import load_iris, load_wine
from sklearn.ensemble import RandomForestClassifier
from sklearn.inspection import permutation_importance
from sklearn.linear_model import LogisticRegression
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import StandardScaler

REPEATS = 200
out = sys.argv[1]


def split(y):
    rows = np.arange(len(y))
    return rows[rows % 4 != 0], rows[rows % 4 == 0]


def save_model(name, nodes, inputs, outputs, initializers=()):
    graph = helper.make_graph(nodes, name, inputs, outputs, initializer=list(initializers))
    model = helper.make_model(graph, opset_imports=[helper.make_opsetid('', 15), helper.make_opsetid('ai.onnx.ml', 3)])
    model.ir_version = 8
    save(model, os.path.join(out, name + '.onnx'))


def importance(model, x, y):
    result = permutation_importance(model, x, y, scoring='neg_log_loss', n_repeats=REPEATS, random_state=5)
    draws = result.importances  # features x repeats: baseline score minus permuted score
    sd = draws.std(axis=1, ddof=1)
    return {'mean': draws.mean(axis=1).tolist(), 'sd': sd.tolist(), 'se': (sd / np.sqrt(REPEATS)).tolist()}


def float32_at_or_below(threshold):
    """The largest float32 <= threshold: for a float32 x, x <= threshold exactly when x <= this value
    (scikit-learn's trees compare float32 inputs with float64 thresholds)."""
    rounded = np.float32(threshold)
    return float(np.nextafter(rounded, np.float32(-np.inf)) if rounded > threshold else rounded)


def tree_attributes():
    return {k: [] for k in ['nodes_treeids', 'nodes_nodeids', 'nodes_featureids', 'nodes_values', 'nodes_modes',
                            'nodes_truenodeids', 'nodes_falsenodeids', 'nodes_missing_value_tracks_true',
                            'class_treeids', 'class_nodeids', 'class_ids', 'class_weights']}


def add_node(attrs, tree, node, feature=0, value=0.0, mode='LEAF', true=0, false=0, missing_true=0):
    for key, v in [('nodes_treeids', tree), ('nodes_nodeids', node), ('nodes_featureids', feature), ('nodes_values', value),
                   ('nodes_modes', mode), ('nodes_truenodeids', true), ('nodes_falsenodeids', false),
                   ('nodes_missing_value_tracks_true', missing_true)]:
        attrs[key].append(v)


def add_leaf_weight(attrs, tree, node, class_id, weight):
    attrs['class_treeids'].append(tree)
    attrs['class_nodeids'].append(node)
    attrs['class_ids'].append(class_id)
    attrs['class_weights'].append(weight)


reference = {}

# ---- wine: random forest, post_transform NONE ------------------------------------------------
wx, wy = load_wine(return_X_y=True)
w_train, w_holdout = split(wy)
forest = RandomForestClassifier(n_estimators=60, max_depth=5, random_state=0).fit(wx[w_train], wy[w_train])
attrs = tree_attributes()
for t, estimator in enumerate(forest.estimators_):
    tree = estimator.tree_
    for n in range(tree.node_count):
        if tree.children_left[n] == -1:
            add_node(attrs, t, n)
            fractions = tree.value[n][0] / tree.value[n][0].sum()
            for c in range(3):
                add_leaf_weight(attrs, t, n, c, float(fractions[c]) / len(forest.estimators_))
        else:
            add_node(attrs, t, n, int(tree.feature[n]), float32_at_or_below(tree.threshold[n]), 'BRANCH_LEQ', int(tree.children_left[n]), int(tree.children_right[n]))
save_model('forest', [helper.make_node('TreeEnsembleClassifier', ['input'], ['label', 'probabilities'], domain='ai.onnx.ml',
                                       classlabels_strings=['class_0', 'class_1', 'class_2'], post_transform='NONE', **attrs)],
           [helper.make_tensor_value_info('input', TensorProto.FLOAT, [None, 13])],
           [helper.make_tensor_value_info('label', TensorProto.STRING, [None]),
            helper.make_tensor_value_info('probabilities', TensorProto.FLOAT, [None, 3])])
reference['forest'] = {'rows': w_holdout.tolist(), 'proba': forest.predict_proba(wx[w_holdout].astype(np.float32)).tolist()}

# ---- wine: scaled multinomial logistic regression as MatMul + Add + Softmax --------------------
linear = make_pipeline(StandardScaler(), LogisticRegression(max_iter=5000)).fit(wx[w_train], wy[w_train])
scaler, logistic = linear[0], linear[1]
weights = (logistic.coef_ / scaler.scale_).T  # [13, 3]: (x - mean) / scale @ coef.T + b
bias = logistic.intercept_ - (scaler.mean_ / scaler.scale_) @ logistic.coef_.T
save_model('linear', [helper.make_node('MatMul', ['input', 'W'], ['scores']), helper.make_node('Add', ['scores', 'b'], ['logits']),
                      helper.make_node('Softmax', ['logits'], ['probabilities'], axis=1)],
           [helper.make_tensor_value_info('input', TensorProto.DOUBLE, [None, 13])],
           [helper.make_tensor_value_info('probabilities', TensorProto.DOUBLE, [None, 3])],
           [numpy_helper.from_array(weights.astype(np.float64), 'W'), numpy_helper.from_array(bias.astype(np.float64), 'b')])
reference['linear'] = {'rows': w_holdout.tolist(), 'proba': linear.predict_proba(wx[w_holdout]).tolist(),
                       'importance': importance(linear, wx[w_holdout], wy[w_holdout])}

# ---- iris: XGBoost multi:softprob, post_transform SOFTMAX --------------------------------------
ix, iy = load_iris(return_X_y=True)
i_train, i_holdout = split(iy)
boosted = xgb.XGBClassifier(n_estimators=40, max_depth=3, learning_rate=0.3, objective='multi:softprob', random_state=0,
                            tree_method='exact', base_score=0.5).fit(ix[i_train], iy[i_train])
attrs = tree_attributes()
for t, dump in enumerate(boosted.get_booster().get_dump(dump_format='json')):
    stack = [json.loads(dump)]
    while stack:
        node = stack.pop()
        if 'leaf' in node:
            add_node(attrs, t, node['nodeid'])
            add_leaf_weight(attrs, t, node['nodeid'], t % 3, float(node['leaf']))
            continue
        add_node(attrs, t, node['nodeid'], int(node['split'][1:]), float(node['split_condition']), 'BRANCH_LT',
                 node['yes'], node['no'], 1 if node['missing'] == node['yes'] else 0)
        stack.extend(node['children'])
save_model('boosted', [helper.make_node('TreeEnsembleClassifier', ['input'], ['label', 'probabilities'], domain='ai.onnx.ml',
                                        classlabels_int64s=[0, 1, 2], post_transform='SOFTMAX', base_values=[0.5, 0.5, 0.5], **attrs)],
           [helper.make_tensor_value_info('input', TensorProto.FLOAT, [None, 4])],
           [helper.make_tensor_value_info('label', TensorProto.INT64, [None]),
            helper.make_tensor_value_info('probabilities', TensorProto.FLOAT, [None, 3])])
holes = ix[i_holdout].copy()
holes[np.random.RandomState(3).rand(*holes.shape) < 0.1] = np.nan
reference['boosted'] = {'rows': i_holdout.tolist(), 'x': [[None if np.isnan(v) else v for v in row] for row in holes.tolist()],
                        'proba': boosted.predict_proba(holes).tolist(),
                        'importance': importance(boosted, ix[i_holdout], iy[i_holdout])}
reference['repeats'] = REPEATS
json.dump(reference, open(os.path.join(out, 'reference.json'), 'w'))
