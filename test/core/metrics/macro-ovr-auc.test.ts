import { describe, expect, it } from 'vitest'
import { macroOvrAuc, oneVsRestAucs } from '../../../src/core/metrics/macro-ovr-auc.ts'
import { multiclassP, multiclassY } from './examples.ts'

describe('macroOvrAuc(y, probabilities)', () => {
  it("matches scikit-learn's roc_auc_score(multi_class='ovr', average='macro')", () => {
    // computed with scikit-learn 1.2.1: roc_auc_score(multiclassY, P, multi_class='ovr', average='macro')
    // -> 0.8561507936507936; per class roc_auc_score(y == k, P[:, k]) -> 1.0, 0.6875, 0.8809523809523809.
    expect(macroOvrAuc(multiclassY, multiclassP)).toBeCloseTo(0.8561507936507936, 12)
    const perClass = oneVsRestAucs(multiclassY, multiclassP)
    expect(perClass[0]).toBe(1)
    expect(perClass[1]).toBeCloseTo(0.6875, 12)
    expect(perClass[2]).toBeCloseTo(0.8809523809523809, 12)
  })

  it('is NaN when a class has no rows (scikit-learn raises there) or for no rows', () => {
    expect(macroOvrAuc([0, 1, 0, 1], [0.6, 0.3, 0.1, 0.2, 0.7, 0.1, 0.5, 0.4, 0.1, 0.3, 0.3, 0.4])).toBeNaN()
    expect(macroOvrAuc([], [])).toBeNaN()
  })
})
