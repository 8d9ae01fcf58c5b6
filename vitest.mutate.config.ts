import { defineConfig } from 'vitest/config'

// The tests Stryker runs against each mutant of src/core/checks, report and importance: the core's
// unit tests (fast, pure). The end-to-end, Python and browser tests cover the same code from far
// away and would only slow every mutant down.
export default defineConfig({
  test: {
    include: ['test/core/**/*.test.ts'],
    exclude: ['test/core/importance/friedman.test.ts'],
    testTimeout: 60_000,
  },
})
