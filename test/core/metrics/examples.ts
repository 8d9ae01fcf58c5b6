/**
 * Shared inputs of the metric tests, invented for them (20 binary rows with tied scores, 12
 * regression rows). Their reference values were computed with scikit-learn 1.2.1 (Debian
 * python3-sklearn, /usr/bin/python3) and are written beside each assertion.
 */
export const binaryY = [1, 0, 0, 1, 1, 0, 1, 0, 0, 1, 0, 1, 1, 0, 0, 0, 1, 1, 0, 1]
export const binaryP = [0.9, 0.2, 0.4, 0.4, 0.7, 0.1, 0.6, 0.4, 0.3, 0.8, 0.6, 0.5, 0.95, 0.05, 0.5, 0.2, 0.3, 0.7, 0.2, 0.4]

export const regressionY = [3.2, -1.5, 0.0, 7.75, 2.5, 4.0, -0.25, 10.0, 5.5, 1.0, 2.0, 6.25]
export const regressionPrediction = [2.9, -0.5, 0.4, 7.0, 3.1, 3.5, 0.5, 8.25, 6.0, 1.5, 1.25, 5.0]

/** 10 three-class rows (class indices) and their [10, 3] probabilities, row-major; two rows tie. */
export const multiclassY = [0, 1, 2, 2, 1, 0, 1, 2, 0, 1]
export const multiclassP = [
  0.7, 0.2, 0.1, 0.2, 0.5, 0.3, 0.1, 0.3, 0.6, 0.3, 0.4, 0.3, 0.25, 0.25, 0.5, 0.5, 0.4, 0.1, 0.1, 0.8, 0.1, 0.2, 0.2, 0.6, 0.4, 0.4, 0.2, 0.3,
  0.3, 0.4,
]
