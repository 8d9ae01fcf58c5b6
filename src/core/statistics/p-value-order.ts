/**
 * The indices that sort p-values ascending, after checking that each is a probability; shared by
 * the step-up and step-down multiple-testing adjustments (benjaminiHochberg, holm).
 *
 * Edges: a value outside [0, 1] or NaN is a RangeError that starts with `caller` and names the
 * index. Cost: O(m log m).
 */
export function pValueOrder(pValues: ArrayLike<number>, caller: string): Uint32Array {
  const order = new Uint32Array(pValues.length)
  for (let i = 0; i < pValues.length; i++) {
    if (!(pValues[i] >= 0 && pValues[i] <= 1)) {
      throw new RangeError(`${caller} needs p-values in [0, 1], got ${pValues[i]} at index ${i}`)
    }
    order[i] = i
  }
  return order.sort((i, j) => pValues[i] - pValues[j])
}
