import { defineConfig } from 'vitest/config'

// The JSON report is what .ci/run reads to print its closing "N passed, N failed" line.
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: 'forks',
    maxWorkers: 2,
    reporters: ['default', ['json', { outputFile: 'test-results.json' }]],
  },
})
