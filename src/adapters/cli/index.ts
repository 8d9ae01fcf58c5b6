#!/usr/bin/env node
import { main } from './main.ts'

const code = await main(process.argv.slice(2), {
  cwd: process.cwd(),
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
  isTty: Boolean(process.stderr.isTTY),
})
process.exitCode = code
