import type { FeatureMatrix } from '../../../../src/core/data/dataset.ts'
import { createRandom } from '../../../../src/core/statistics/random.ts'

/**
 * Friedman #1 (Friedman 1991, Annals of Statistics 19(1); as scikit-learn's make_friedman1):
 * y = 10 sin(pi x1 x2) + 20 (x3 - 0.5)^2 + 10 x4 + 5 x5 + noise, x1..x10 ~ U(0, 1).
 * Drawn from createRandom(seed) row by row: x1..x10 with next(), then noiseSd * normal().
 */
export function friedman1(rows: number, options: { seed: number; noiseSd: number }): { matrix: FeatureMatrix; y: Float64Array } {
  const random = createRandom(options.seed)
  const columns = Array.from({ length: 10 }, () => new Float64Array(rows))
  const y = new Float64Array(rows)
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < 10; j++) columns[j][i] = random.next()
    const [x1, x2, x3, x4, x5] = [0, 1, 2, 3, 4].map((j) => columns[j][i])
    y[i] = 10 * Math.sin(Math.PI * x1 * x2) + 20 * (x3 - 0.5) ** 2 + 10 * x4 + 5 * x5 + options.noiseSd * random.normal()
  }
  const features = columns.map((_, j) => ({ name: `x${j + 1}`, kind: 'numeric' as const }))
  return { matrix: { rows, features, columns }, y }
}
