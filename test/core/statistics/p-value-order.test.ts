import { describe, expect, it } from 'vitest'
import { pValueOrder } from '../../../src/core/statistics/p-value-order.ts'

describe('pValueOrder(pValues, caller)', () => {
  it('returns the indices that sort the p-values ascending', () => {
    expect(Array.from(pValueOrder([0.3, 0.01, 1, 0.2], 'caller'))).toEqual([1, 3, 0, 2])
  })
  it('names the caller and the index of a value that is not a probability', () => {
    expect(() => pValueOrder([0.5, Infinity], 'someTest')).toThrow(
      new RangeError('someTest needs p-values in [0, 1], got Infinity at index 1'),
    )
  })
})
