import { defineConfig } from 'vitest/config'

// The tests `npm run mutate:checks` runs against each mutant of src/core/checks: the checks' own unit
// tests (test/core/checks/**), which call each check with hand-built side results and evidence and
// fit no model. The gate-level tests (test/core/gate, test/core/run-gate-*.test.ts) are left out:
// they reach every check through whole runGate calls with model fits, so they cost seconds per mutant
// and cannot say which rule a mutant broke; a check's rule belongs in its own unit test.
export default defineConfig({
  test: {
    include: ['test/core/checks/**/*.test.ts'],
    testTimeout: 60_000,
  },
})
