"""Trains Northwind Parcel's late-delivery model with scikit-learn and writes it as ONNX.

Run with Debian's python (python3-sklearn, python3-onnx):

    PLUMBLINE_TRAIN=data/train.csv PLUMBLINE_OUTPUT=model.onnx /usr/bin/python3 python/train.py

plumbline runs it as the policy's training command (python/plumbline.yml) once per refit, with:
  PLUMBLINE_TRAIN       the training table (CSV with a header row)               required
  PLUMBLINE_OUTPUT      where to write the ONNX model                            required
  PLUMBLINE_SEED        random_state of the learner, 0 to 4294967295             default 0
  PLUMBLINE_LEAVE_OUT   comma-separated columns to train without                 default none
  PLUMBLINE_HOLDOUT     the holdout table; read only with --holdout-predictions
(PLUMBLINE_SIDE and PLUMBLINE_REFIT are not needed: the seed already differs per refit.)

Every column except the target and the --id columns is a feature: numeric when every non-missing
cell is a number (missing cells get the training mean), else categorical (one-hot). The binary
target's positive class follows plumbline's rule: for 0/1, false/true and no/yes the second, else
the larger value. The model is written by onnx_export.py, one input per column.

--model chooses the learner (or the variable NORTHWIND_MODEL; the flag wins):
  gradient-boosting  GradientBoostingClassifier(n_estimators=--trees, max_depth=--max-depth,
                     learning_rate=--learning-rate, subsample=0.8), the default
  random-forest      RandomForestClassifier(n_estimators=--trees, max_depth=--max-depth,
                     min_samples_leaf=5)
  logistic           StandardScaler + LogisticRegression(C=1.0)
--holdout-predictions FILE writes scikit-learn's own positive-class probability for every
PLUMBLINE_HOLDOUT row, one per line, so the ONNX model can be compared with it.
Exit status 2 with a message on stderr for a problem with the inputs.
"""
import argparse
import csv
import os
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

import numpy as np  # noqa: E402
import onnx  # noqa: E402
from sklearn.ensemble import GradientBoostingClassifier, RandomForestClassifier  # noqa: E402
from sklearn.linear_model import LogisticRegression  # noqa: E402
from sklearn.pipeline import make_pipeline  # noqa: E402
from sklearn.preprocessing import StandardScaler  # noqa: E402

from onnx_export import describe_columns, design_matrix, export_onnx, is_missing, parse_number  # noqa: E402

MODELS = ('gradient-boosting', 'random-forest', 'logistic')
SECOND_IS_POSITIVE = [('0', '1'), ('false', 'true'), ('no', 'yes')]


class InputProblem(Exception):
    pass


def read_table(path, what):
    try:
        with open(path, newline='', encoding='utf-8-sig') as f:
            rows = list(csv.reader(f))
    except OSError as error:
        raise InputProblem(f'cannot read {what} {path}: {error.strerror}')
    rows = [r for r in rows if r]
    if not rows:
        raise InputProblem(f'{what} {path} is empty')
    header = [h.strip() for h in rows[0]]
    for line, row in enumerate(rows[1:], start=2):
        if len(row) != len(header):
            raise InputProblem(f'{what} {path}, line {line}: {len(row)} cells, the header has {len(header)}')
    return {name: [row[j] for row in rows[1:]] for j, name in enumerate(header)}


def positive_class(values, path, target):
    """plumbline's rule for the binary target's positive class (see the module comment)."""
    distinct = sorted({v.strip() for v in values if not is_missing(v)})
    if len(distinct) != 2:
        raise InputProblem(f"{path}: the target '{target}' must have two classes, found {len(distinct)}")
    lower = tuple(v.lower() for v in distinct)
    for pair in SECOND_IS_POSITIVE:
        if lower == pair:
            return distinct[1]
    numbers = [parse_number(v) for v in distinct]
    if all(n is not None for n in numbers):
        return distinct[int(numbers[1] > numbers[0])]
    return max(distinct, key=lambda v: v.encode('utf-16-be'))  # UTF-16 code-unit order


def make_model(name, seed, args):
    if name == 'gradient-boosting':
        return GradientBoostingClassifier(n_estimators=args.trees, max_depth=args.max_depth,
                                          learning_rate=args.learning_rate, subsample=0.8, random_state=seed)
    if name == 'random-forest':
        return RandomForestClassifier(n_estimators=args.trees, max_depth=args.max_depth, min_samples_leaf=5,
                                      random_state=seed, n_jobs=1)
    return make_pipeline(StandardScaler(), LogisticRegression(C=1.0, max_iter=1000))


def main(argv):
    parser = argparse.ArgumentParser(description='Train the late-delivery model and write it as ONNX.')
    parser.add_argument('--model', choices=MODELS, default=os.environ.get('NORTHWIND_MODEL', 'gradient-boosting'))
    parser.add_argument('--target', default='late')
    parser.add_argument('--id', action='append', default=None, help='a column that is not a feature (repeatable; default parcel_id)')
    parser.add_argument('--trees', type=int, default=100)
    parser.add_argument('--max-depth', type=int, default=3)
    parser.add_argument('--learning-rate', type=float, default=0.1)
    parser.add_argument('--holdout-predictions', metavar='FILE')
    args = parser.parse_args(argv)
    if args.model not in MODELS:
        raise InputProblem(f"NORTHWIND_MODEL must be one of {', '.join(MODELS)}, got '{args.model}'")

    env = os.environ
    for name in ('PLUMBLINE_TRAIN', 'PLUMBLINE_OUTPUT'):
        if not env.get(name):
            raise InputProblem(f'{name} is not set (see the top of python/train.py)')
    seed_text = env.get('PLUMBLINE_SEED', '0')
    if not seed_text.isdigit() or int(seed_text) > 2**32 - 1:
        raise InputProblem(f"PLUMBLINE_SEED must be a whole number from 0 to 4294967295, got '{seed_text}'")
    train_path = env['PLUMBLINE_TRAIN']
    table = read_table(train_path, 'the training table')
    ids = set(args.id or ['parcel_id'])
    if args.target not in table:
        raise InputProblem(f"{train_path} has no target column '{args.target}'; it has {', '.join(table)}")
    leave_out = [name for name in env.get('PLUMBLINE_LEAVE_OUT', '').split(',') if name]
    unknown = [name for name in leave_out if name not in table]
    if unknown:
        raise InputProblem(f"PLUMBLINE_LEAVE_OUT names {', '.join(unknown)}, which {train_path} does not have")
    names = [n for n in table if n != args.target and n not in ids and n not in leave_out]
    if not names:
        raise InputProblem(f'{train_path}: no feature columns are left to train on')

    target = [v.strip() for v in table[args.target]]
    labelled = [i for i, v in enumerate(target) if not is_missing(v)]
    table = {name: [cells[i] for i in labelled] for name, cells in table.items()}
    positive = positive_class(table[args.target], train_path, args.target)
    y = np.array([int(v.strip() == positive) for v in table[args.target]])

    columns = describe_columns(table, names)
    x = design_matrix(table, columns)
    model = make_model(args.model, int(seed_text), args).fit(x, y)
    onnx.save(export_onnx(model, columns, doc=f'Northwind Parcel late-delivery model ({args.model}, seed {seed_text})'), env['PLUMBLINE_OUTPUT'])

    if args.holdout_predictions:
        if not env.get('PLUMBLINE_HOLDOUT'):
            raise InputProblem('--holdout-predictions needs PLUMBLINE_HOLDOUT')
        holdout = read_table(env['PLUMBLINE_HOLDOUT'], 'the holdout table')
        missing = [c.name for c in columns if c.name not in holdout]
        if missing:
            raise InputProblem(f"the holdout table lacks {', '.join(missing)}")
        probabilities = model.predict_proba(design_matrix(holdout, columns))[:, 1]
        with open(args.holdout_predictions, 'w') as f:
            f.writelines(f'{p!r}\n' for p in probabilities)
    print(f'train.py: {args.model} on {len(y)} rows, {len(columns)} columns ({x.shape[1]} design columns), '
          f'seed {seed_text}, left out: {", ".join(leave_out) or "none"}')
    return 0


if __name__ == '__main__':
    try:
        sys.exit(main(sys.argv[1:]))
    except (InputProblem, ValueError) as error:
        print(f'train.py: {error}', file=sys.stderr)
        sys.exit(2)
