/**
 * Writes docs/report.schema.json, the JSON Schema of the GateReport (schema version 1), from the zod
 * schema in src/core/report/report-schema.ts. Run after changing the schema and commit the output:
 *   npm run report-schema   (node --import tsx scripts/write-report-schema.ts)
 * test/core/report/report-schema.test.ts fails when the committed file is out of date.
 */
import { writeFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'

import { gateReportJsonSchema } from '../src/core/report/report-schema.ts'

const target = join(dirname(fileURLToPath(import.meta.url)), '..', 'docs', 'report.schema.json')
writeFileSync(target, `${JSON.stringify(gateReportJsonSchema(), null, 2)}\n`)
console.log(`wrote ${target}`)
