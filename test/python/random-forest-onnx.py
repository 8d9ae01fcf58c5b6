"""A scikit-learn random forest exported to ONNX the usual way (ai.onnx.ml TreeEnsembleClassifier,
post_transform NONE, each leaf's class fractions divided by the number of trees, in float32), on
the breast-cancer data bundled with Debian's python3-sklearn 1.2.1; written with python3-onnx 1.12's
helper. Prints the model path, then scikit-learn's predict_proba of class 1 for every row, one a line.
Usage: random-forest-onnx.py OUT.onnx [TREES]
       random-forest-onnx.py OUT.onnx leaf P  (one tree, one leaf with class weights [0, P] in float32:
                                               the probability P exactly as the operator emits it)"""
import sys

import numpy as np
from onnx import TensorProto, helper, save
from sklearn.datasets import load_breast_cancer
from sklearn.ensemble import RandomForestClassifier

X, y = load_breast_cancer(return_X_y=True)
attrs = {k: [] for k in ['nodes_treeids', 'nodes_nodeids', 'nodes_featureids', 'nodes_values', 'nodes_modes',
                         'nodes_truenodeids', 'nodes_falsenodeids', 'class_treeids', 'class_nodeids', 'class_ids', 'class_weights']}
if len(sys.argv) > 3 and sys.argv[2] == 'leaf':
    for k, v in [('nodes_treeids', 0), ('nodes_nodeids', 0), ('nodes_featureids', 0), ('nodes_values', 0.0), ('nodes_modes', 'LEAF'),
                 ('nodes_truenodeids', 0), ('nodes_falsenodeids', 0)]:
        attrs[k].append(v)
    for c, w in [(0, 0.0), (1, float(sys.argv[3]))]:
        attrs['class_treeids'].append(0)
        attrs['class_nodeids'].append(0)
        attrs['class_ids'].append(c)
        attrs['class_weights'].append(w)
    forest = None
else:
    forest = RandomForestClassifier(n_estimators=int(sys.argv[2]) if len(sys.argv) > 2 else 50, max_depth=6, random_state=0).fit(X, y)
for t, estimator in enumerate(forest.estimators_ if forest else []):
    tree = estimator.tree_
    for n in range(tree.node_count):
        leaf = tree.children_left[n] == -1
        attrs['nodes_treeids'].append(t)
        attrs['nodes_nodeids'].append(n)
        attrs['nodes_featureids'].append(0 if leaf else int(tree.feature[n]))
        attrs['nodes_values'].append(0.0 if leaf else float(tree.threshold[n]))
        attrs['nodes_modes'].append('LEAF' if leaf else 'BRANCH_LEQ')
        attrs['nodes_truenodeids'].append(0 if leaf else int(tree.children_left[n]))
        attrs['nodes_falsenodeids'].append(0 if leaf else int(tree.children_right[n]))
        if leaf:
            fractions = tree.value[n][0] / tree.value[n][0].sum()
            for c in (0, 1):
                attrs['class_treeids'].append(t)
                attrs['class_nodeids'].append(n)
                attrs['class_ids'].append(c)
                attrs['class_weights'].append(float(fractions[c]) / len(forest.estimators_))
node = helper.make_node('TreeEnsembleClassifier', ['input'], ['label', 'probabilities'], domain='ai.onnx.ml',
                        classlabels_int64s=[0, 1], post_transform='NONE', **attrs)
graph = helper.make_graph([node], 'forest',
                          [helper.make_tensor_value_info('input', TensorProto.FLOAT, [None, X.shape[1] if forest else 1])],
                          [helper.make_tensor_value_info('label', TensorProto.INT64, [None]),
                           helper.make_tensor_value_info('probabilities', TensorProto.FLOAT, [None, 2])])
model = helper.make_model(graph, opset_imports=[helper.make_opsetid('', 15), helper.make_opsetid('ai.onnx.ml', 3)])
model.ir_version = 8
save(model, sys.argv[1])
print(sys.argv[1])
for p in (forest.predict_proba(X.astype(np.float32))[:, 1] if forest else []):
    print(repr(float(p)))
