"""Writes the scikit-learn models of this repository as ONNX, built node by node with onnx.helper.

Northwind Parcel's own small exporter, for exactly the model types we train (anything else is
refused with a ValueError):

- GradientBoostingClassifier (two classes, loss 'log_loss') and GradientBoostingRegressor,
- RandomForestClassifier (two classes),
- LogisticRegression (two classes), alone or after a StandardScaler in a Pipeline (the scaling is
  folded into the coefficients).

Inputs: one input per data column, named after the column, shape [N, 1]: tensor(double) for a
numeric column, tensor(string) for a categorical one. Per-column inputs were chosen over a single
[N, F] matrix so that the model takes the rows as they are in the table (category names, not codes)
and so that a refit without some columns simply has fewer inputs. The preprocessing is part of the
graph and matches `design_matrix` below, which is what scikit-learn is trained on:
- a numeric column: a missing value (NaN) becomes the column's `fill` (IsNaN, Where);
- a categorical column: one-hot over `categories` in that order: an ai.onnx.ml LabelEncoder maps
  category k to k and anything else to K = len(categories), and OneHot (depth K) writes all zeros
  for that out-of-range index, so a category not seen in training, or the empty string that
  plumbline sends for a missing value, is all zeros, as in `design_matrix` and in scikit-learn's
  OneHotEncoder(handle_unknown='ignore'). (ai.onnx.ml OneHotEncoder would do it in one node, but
  onnx 1.12 infers no output type for it, so the graph would fail onnx.checker's full check.)
- the blocks are concatenated in column order into the design matrix D [N, width], double.
The column names are also stored as metadata `plumbline.features` (a JSON array).

Models on D:
- Trees (both ensembles). scikit-learn casts X to float32 before walking its trees and tests
  float32(x) <= threshold with a float64 threshold. The graph does the same: Cast D to float and
  back to double, and thresholds, leaf values and base values are stored as doubles (the
  `*_as_tensor` attributes of ai.onnx.ml opset 3), so every split goes the same way as in
  scikit-learn. Nodes are BRANCH_LEQ, true = left child.
- Gradient boosting: one TreeEnsembleRegressor (aggregate SUM) whose base value is the initial raw
  prediction and whose leaf values are learning_rate * leaf value, i.e.
  raw = init + learning_rate * sum over trees. For the classifier, init is the training log-odds
  log(p / (1 - p)) of the class prior p (clipped to [eps, 1 - eps], eps = float32 epsilon, as
  scikit-learn does) and probability = Sigmoid(raw); for the regressor, init is the constant of
  its DummyRegressor (the mean for squared error), and raw is the prediction. init='zero' is 0.
- Random forest classifier: one TreeEnsembleClassifier; each leaf votes for both classes with its
  class fractions divided by the number of trees, so the sum is scikit-learn's average of the trees'
  predict_proba.
- Logistic regression: MatMul + Add + Sigmoid, in double.
Outputs: a classifier writes `probabilities` [N, 2] = [P(classes_[0]), P(classes_[1])] (float for
trees, double for logistic regression; the random forest also has `label`); a regressor writes
`prediction` [N, 1]. The tree operators output float32, so tree models carry float32 rounding
(about 6e-8 relative) and nothing else.

Opsets: ai.onnx 15, ai.onnx.ml 3 (the newest ml opset onnx 1.12 knows). Cost: O(total tree nodes).
"""
import json
import math
import re
from dataclasses import dataclass, field

import numpy as np
import onnx
from onnx import TensorProto, helper, numpy_helper

ML = 'ai.onnx.ml'
OPSETS = [helper.make_opsetid('', 15), helper.make_opsetid(ML, 3)]
FEATURES_METADATA_KEY = 'plumbline.features'

# The same missing-value tokens and number syntax as plumbline's CSV reader, so that a column is
# numeric here exactly when it is numeric there (a mismatch would make the model's inputs disagree
# with the data's columns).
MISSING = {'', 'na', 'nan', 'null'}
NUMBER = re.compile(r'[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?')


@dataclass(frozen=True)
class Column:
    """One data column as the model reads it."""
    name: str
    kind: str  # 'numeric' or 'categorical'
    fill: float = 0.0  # numeric: stands in for a missing value
    categories: tuple = field(default=())  # categorical: one design column each, in this order

    @property
    def width(self):
        return 1 if self.kind == 'numeric' else len(self.categories)


def is_missing(text):
    return text.strip().lower() in MISSING


def parse_number(text):
    """A decimal number as plumbline reads one (no inf, nan, hex or '1_000'), else None."""
    text = text.strip()
    return float(text) if NUMBER.fullmatch(text) else None


def describe_columns(table, names):
    """Columns of `table` (name -> list of cell strings) for the given names: numeric when every
    non-missing cell is a number (fill = mean of those, 0 when there are none), else categorical
    (categories = the distinct non-missing values, sorted)."""
    columns = []
    for name in names:
        cells = [c.strip() for c in table[name]]
        present = [c for c in cells if not is_missing(c)]
        numbers = [parse_number(c) for c in present]
        if all(v is not None for v in numbers):
            fill = float(np.mean(numbers)) if numbers else 0.0
            columns.append(Column(name, 'numeric', fill=fill))
        else:
            columns.append(Column(name, 'categorical', categories=tuple(sorted(set(present)))))
    return columns


def design_matrix(table, columns):
    """The float64 matrix scikit-learn is trained on, the same as the graph's design matrix D."""
    rows = len(table[columns[0].name]) if columns else 0
    blocks = []
    for column in columns:
        cells = [c.strip() for c in table[column.name]]
        if column.kind == 'numeric':
            values = np.empty((rows, 1))
            for i, cell in enumerate(cells):
                if is_missing(cell):
                    values[i, 0] = column.fill
                else:
                    number = parse_number(cell)
                    if number is None:
                        raise ValueError(f"column '{column.name}' is numeric in the training data, but row {i + 1} has '{cell}'")
                    values[i, 0] = number
            blocks.append(values)
        else:
            index = {c: k for k, c in enumerate(column.categories)}
            values = np.zeros((rows, column.width))
            for i, cell in enumerate(cells):
                k = index.get(cell)
                if k is not None:
                    values[i, k] = 1.0
            blocks.append(values)
    return np.hstack(blocks) if blocks else np.zeros((rows, 0))


def export_onnx(model, columns, doc=''):
    """An onnx.ModelProto computing `model`'s predict_proba (classifiers) or predict (regressors)
    from one input per column (see the module comment). Checked with onnx.checker."""
    columns = list(columns)
    width = sum(c.width for c in columns)
    g = _Graph()
    design = _design_nodes(g, columns)
    estimator, scaling = _unwrap(model)
    if getattr(estimator, 'n_features_in_', width) != width:
        raise ValueError(f'export_onnx: the model was fitted on {estimator.n_features_in_} design columns, but the columns give {width}')
    kind = type(estimator).__name__
    if kind != 'LogisticRegression' and scaling is not None:
        raise ValueError(f'export_onnx: a StandardScaler before {kind} is not supported (trees need no scaling)')
    if kind == 'GradientBoostingClassifier':
        outputs = _boosting(g, design, estimator, classifier=True)
    elif kind == 'GradientBoostingRegressor':
        outputs = _boosting(g, design, estimator, classifier=False)
    elif kind == 'RandomForestClassifier':
        outputs = _forest_classifier(g, design, estimator)
    elif kind == 'LogisticRegression':
        outputs = _logistic(g, design, estimator, scaling)
    else:
        raise ValueError(f'export_onnx: cannot export a {kind}; supported: GradientBoostingClassifier, '
                         'GradientBoostingRegressor, RandomForestClassifier, LogisticRegression')
    inputs = [helper.make_tensor_value_info(c.name, TensorProto.DOUBLE if c.kind == 'numeric' else TensorProto.STRING, ['N', 1])
              for c in columns]
    graph = helper.make_graph(g.nodes, 'northwind_parcel_' + kind, inputs, outputs, initializer=g.initializers)
    onnx_model = helper.make_model(graph, opset_imports=OPSETS, producer_name='northwind-parcel onnx_export.py',
                                   doc_string=doc or f'{kind} exported by onnx_export.py')
    helper.set_model_props(onnx_model, {FEATURES_METADATA_KEY: json.dumps([c.name for c in columns])})
    onnx.checker.check_model(onnx_model, full_check=True)
    return onnx_model


# ---- graph building ------------------------------------------------------------------------------

class _Graph:
    def __init__(self):
        self.nodes, self.initializers, self._count = [], [], 0

    def name(self, stem):
        self._count += 1
        return f'{stem}_{self._count}'

    def const(self, stem, array):
        name = self.name(stem)
        self.initializers.append(numpy_helper.from_array(np.asarray(array), name))
        return name

    def op(self, op_type, inputs, stem, outputs=None, domain='', **attributes):
        outputs = outputs or [self.name(stem)]
        self.nodes.append(helper.make_node(op_type, inputs, outputs, name=self.name(op_type), domain=domain, **attributes))
        return outputs[0] if len(outputs) == 1 else outputs


def _design_nodes(g, columns):
    blocks = []
    for column in columns:
        if column.kind == 'numeric':
            missing = g.op('IsNaN', [column.name], 'missing')
            blocks.append(g.op('Where', [missing, g.const('fill', np.array([[column.fill]])), column.name], 'filled'))
        elif column.width > 0:
            # Category k -> index k; anything else -> width, which OneHot turns into all zeros.
            index = g.op('LabelEncoder', [column.name], 'category_index', domain=ML, keys_strings=list(column.categories),
                         values_int64s=list(range(column.width)), default_int64=column.width)
            hot = g.op('OneHot', [index, g.const('depth', np.array(column.width, dtype=np.int64)),
                                  g.const('off_on', np.array([0.0, 1.0], dtype=np.float32))], 'onehot', axis=-1)
            flat = g.op('Reshape', [hot, g.const('shape', np.array([-1, column.width], dtype=np.int64))], 'onehot_2d')
            blocks.append(g.op('Cast', [flat], 'onehot_double', to=TensorProto.DOUBLE))
    if not blocks:
        raise ValueError('export_onnx: the model reads no columns')
    return g.op('Concat', blocks, 'design', axis=1)


def _unwrap(model):
    """(estimator, (mean, scale) or None) for an estimator or a Pipeline(StandardScaler, LogisticRegression)."""
    if type(model).__name__ != 'Pipeline':
        return model, None
    steps = [step for _, step in model.steps if step not in (None, 'passthrough')]
    if len(steps) != 2 or type(steps[0]).__name__ != 'StandardScaler':
        raise ValueError('export_onnx: a Pipeline must be StandardScaler followed by LogisticRegression')
    scaler = steps[0]
    width = scaler.n_features_in_
    mean = scaler.mean_ if scaler.with_mean else np.zeros(width)
    scale = scaler.scale_ if scaler.with_std else np.ones(width)
    return steps[1], (np.asarray(mean, dtype=np.float64), np.asarray(scale, dtype=np.float64))


def _two_classes(estimator):
    if len(estimator.classes_) != 2:
        raise ValueError(f'export_onnx: only two classes are supported, the model has {len(estimator.classes_)}')


def _probability_pair(g, p, output_type):
    """[1 - p, p] as the output `probabilities`."""
    q = g.op('Sub', [g.const('one', np.array([[1.0]], dtype=np.float32 if output_type == TensorProto.FLOAT else np.float64)), p], 'q')
    g.op('Concat', [q, p], 'probabilities', outputs=['probabilities'], axis=1)
    return [helper.make_tensor_value_info('probabilities', output_type, ['N', 2])]


def _as_sklearn_float32(g, design):
    # scikit-learn's trees read X as float32; the double thresholds then compare exactly as there.
    single = g.op('Cast', [design], 'design_float32', to=TensorProto.FLOAT)
    return g.op('Cast', [single], 'design_float32_as_double', to=TensorProto.DOUBLE)


def _tree_attributes(trees, leaf_weights, prefix):
    """nodes_* and <prefix>_* attributes of TreeEnsembleRegressor/Classifier for sklearn trees.
    leaf_weights(tree_index, tree, node) -> [(target or class id, weight), ...]."""
    a = {k: [] for k in ['nodes_treeids', 'nodes_nodeids', 'nodes_featureids', 'nodes_modes',
                         'nodes_truenodeids', 'nodes_falsenodeids', 'nodes_missing_value_tracks_true']}
    thresholds, weights = [], []
    votes = {prefix + '_treeids': [], prefix + '_nodeids': [], prefix + '_ids': []}
    for t, tree in enumerate(trees):
        structure = tree.tree_
        for node in range(structure.node_count):
            is_leaf = structure.children_left[node] == -1
            a['nodes_treeids'].append(t)
            a['nodes_nodeids'].append(node)
            a['nodes_featureids'].append(0 if is_leaf else int(structure.feature[node]))
            a['nodes_modes'].append('LEAF' if is_leaf else 'BRANCH_LEQ')
            a['nodes_truenodeids'].append(0 if is_leaf else int(structure.children_left[node]))
            a['nodes_falsenodeids'].append(0 if is_leaf else int(structure.children_right[node]))
            a['nodes_missing_value_tracks_true'].append(0)
            thresholds.append(0.0 if is_leaf else float(structure.threshold[node]))
            if is_leaf:
                for target, weight in leaf_weights(t, structure, node):
                    votes[prefix + '_treeids'].append(t)
                    votes[prefix + '_nodeids'].append(node)
                    votes[prefix + '_ids'].append(target)
                    weights.append(weight)
    a.update(votes)
    a['nodes_values_as_tensor'] = numpy_helper.from_array(np.array(thresholds, dtype=np.float64))
    a[prefix + '_weights_as_tensor'] = numpy_helper.from_array(np.array(weights, dtype=np.float64))
    return a


def _boosting(g, design, model, classifier):
    trees = model.estimators_
    if trees.shape[1] != 1:
        raise ValueError(f'export_onnx: only two classes are supported, the model has {trees.shape[1]} trees per stage')
    if classifier:
        _two_classes(model)
        if model.loss not in ('log_loss', 'deviance'):
            raise ValueError(f"export_onnx: only loss='log_loss' is supported for GradientBoostingClassifier, got '{model.loss}'")
    if isinstance(model.init_, str) and model.init_ == 'zero':
        init = 0.0
    elif type(model.init_).__name__ == 'DummyClassifier' and classifier:
        eps = np.finfo(np.float32).eps
        p = float(np.clip(model.init_.class_prior_[1], eps, 1 - eps))
        init = math.log(p / (1 - p))
    elif type(model.init_).__name__ == 'DummyRegressor' and not classifier:
        init = float(np.ravel(model.init_.constant_)[0])
    else:
        raise ValueError(f'export_onnx: only the default init or init="zero" is supported, got {model.init_!r}')
    rate = model.learning_rate
    attributes = _tree_attributes([row[0] for row in trees], lambda t, s, node: [(0, rate * float(s.value[node, 0, 0]))], 'target')
    raw = g.op('TreeEnsembleRegressor', [_as_sklearn_float32(g, design)], 'raw_score', domain=ML,
               n_targets=1, aggregate_function='SUM', post_transform='NONE',
               base_values_as_tensor=numpy_helper.from_array(np.array([init], dtype=np.float64)), **attributes)
    if not classifier:
        g.op('Identity', [raw], 'prediction', outputs=['prediction'])
        return [helper.make_tensor_value_info('prediction', TensorProto.FLOAT, ['N', 1])]
    return _probability_pair(g, g.op('Sigmoid', [raw], 'p'), TensorProto.FLOAT)


def _forest_classifier(g, design, model):
    _two_classes(model)
    count = len(model.estimators_)

    def leaf(t, structure, node):
        value = structure.value[node, 0, :]
        total = float(value.sum())
        return [(c, float(value[c]) / total / count) for c in range(2)]

    labels = model.classes_
    if np.issubdtype(np.asarray(labels).dtype, np.integer):
        label_attribute, label_type = {'classlabels_int64s': [int(v) for v in labels]}, TensorProto.INT64
    else:
        label_attribute, label_type = {'classlabels_strings': [str(v) for v in labels]}, TensorProto.STRING
    g.op('TreeEnsembleClassifier', [_as_sklearn_float32(g, design)], 'forest', outputs=['label', 'probabilities'], domain=ML,
         post_transform='NONE', **label_attribute, **_tree_attributes(model.estimators_, leaf, 'class'))
    return [helper.make_tensor_value_info('label', label_type, ['N']),
            helper.make_tensor_value_info('probabilities', TensorProto.FLOAT, ['N', 2])]


def _logistic(g, design, model, scaling):
    _two_classes(model)
    coef = np.asarray(model.coef_, dtype=np.float64).reshape(-1)
    intercept = float(np.ravel(model.intercept_)[0])
    if scaling is not None:
        # ((x - mean) / scale) . coef + b  =  x . (coef / scale) + (b - sum(mean * coef / scale))
        mean, scale = scaling
        coef = coef / scale
        intercept = intercept - float(np.dot(mean, coef))
    score = g.op('Add', [g.op('MatMul', [design, g.const('coef', coef.reshape(-1, 1))], 'xw'),
                         g.const('intercept', np.array([intercept]))], 'score')
    return _probability_pair(g, g.op('Sigmoid', [score], 'p'), TensorProto.DOUBLE)
