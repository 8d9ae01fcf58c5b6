"""A repository's own training command for a three-or-more-class target, for the end-to-end tests of
`task: multiclass` with `model.train` (test/python/multiclass-train-command.test.ts). NumPy and
python3-onnx 1.12 only: multinomial logistic regression on standardized columns, fitted by 300 steps
of full-batch gradient descent on the mean cross-entropy, on a seeded 90% subsample of the rows
(PLUMBLINE_SEED), written as Sub, Div, MatMul, Add, Softmax over one double input [N, F], with the
column order in the metadata 'plumbline.features' and no class labels: column k of the output is
the k-th class in sorted text order, the order plumbline gives text classes.

Usage: softmax-train.py TARGET [--output softmax|sigmoid|shifted|two]
  softmax  class probabilities (the contract)
  sigmoid  one sigmoid per class (one-vs-rest scores: rows do not sum to 1)
  shifted  the probabilities plus (-0.2, 0.1, 0.1, ...): rows still sum to 1, but the first class
           goes negative wherever its probability is below 0.2
  two      the probabilities of the first two classes only ([N, 2])
"""
import csv
import os
import sys

import numpy as np
from onnx import TensorProto, helper, numpy_helper, save

target, output = sys.argv[1], 'softmax'
if len(sys.argv) > 3 and sys.argv[2] == '--output':
    output = sys.argv[3]
leave_out = {c for c in os.environ.get('PLUMBLINE_LEAVE_OUT', '').split(',') if c}
with open(os.environ['PLUMBLINE_TRAIN'], newline='') as f:
    rows = list(csv.DictReader(f))
features = [c for c in rows[0].keys() if c != target and c not in leave_out]
classes = sorted({r[target] for r in rows})
x = np.array([[float(r[c]) for c in features] for r in rows])
y = np.array([classes.index(r[target]) for r in rows])

keep = np.random.RandomState(int(os.environ.get('PLUMBLINE_SEED', '0'))).rand(len(y)) < 0.9
x, y = x[keep], y[keep]
mean, scale = x.mean(axis=0), x.std(axis=0) + 1e-12
z = (x - mean) / scale
onehot = np.eye(len(classes))[y]
w, b = np.zeros((len(features), len(classes))), np.zeros(len(classes))
for _ in range(300):
    logits = z @ w + b
    p = np.exp(logits - logits.max(axis=1, keepdims=True))
    p /= p.sum(axis=1, keepdims=True)
    w -= 0.5 * (z.T @ (p - onehot) / len(y) + 1e-3 * w)
    b -= 0.5 * (p - onehot).mean(axis=0)

k = 2 if output == 'two' else len(classes)
nodes = [helper.make_node('Sub', ['input', 'mean'], ['centred']), helper.make_node('Div', ['centred', 'scale'], ['z']),
         helper.make_node('MatMul', ['z', 'W'], ['scores']), helper.make_node('Add', ['scores', 'b'], ['logits'])]
shift = np.array([-0.2] + [0.2 / (len(classes) - 1)] * (len(classes) - 1))
if output == 'shifted':
    nodes += [helper.make_node('Softmax', ['logits'], ['softmax'], axis=1), helper.make_node('Add', ['softmax', 'shift'], ['probabilities'])]
elif output == 'sigmoid':
    nodes.append(helper.make_node('Sigmoid', ['logits'], ['probabilities']))
else:
    nodes.append(helper.make_node('Softmax', ['logits'], ['probabilities'], axis=1))
initializers = [numpy_helper.from_array(a.astype(np.float64), name) for a, name in
                [(mean, 'mean'), (scale, 'scale'), (w[:, :k], 'W'), (b[:k], 'b')] + ([(shift, 'shift')] if output == 'shifted' else [])]
graph = helper.make_graph(nodes, 'softmax-regression', [helper.make_tensor_value_info('input', TensorProto.DOUBLE, [None, len(features)])],
                          [helper.make_tensor_value_info('probabilities', TensorProto.DOUBLE, [None, k])], initializer=initializers)
model = helper.make_model(graph, opset_imports=[helper.make_opsetid('', 15)])
model.ir_version = 8
helper.set_model_props(model, {'plumbline.features': '[' + ','.join('"%s"' % c for c in features) + ']'})
save(model, os.environ['PLUMBLINE_OUTPUT'])
print('trained on %d rows, %d features, %d classes' % (len(y), len(features), len(classes)))
