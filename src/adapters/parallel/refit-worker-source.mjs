// The refit pool's worker when plumbline runs from its TypeScript sources (tests, npm run demo,
// npm run evaluate): registers tsx in this thread, then loads refit-worker.ts. 'tsx/esm/api' is
// resolved from this file, so it is found whatever the working directory (a user's checkout).
// The bundle uses refit-worker.js (built from refit-worker.ts) instead.
import { register } from 'tsx/esm/api'

register()
const { default: runRefit } = await import('./refit-worker.ts')
export default runRefit
