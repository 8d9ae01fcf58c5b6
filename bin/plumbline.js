#!/usr/bin/env node
// The installed command: the bundled CLI (built by npm run build from src/adapters/cli/index.ts).
import '../dist/cli/index.js'
