import { describe, expect, it } from 'vitest'
import { formatKeyPath } from '../../../src/core/policy/format-key-path.ts'

describe('formatKeyPath(path)', () => {
  it('joins plain keys with dots and writes list items as [index]', () => {
    expect(formatKeyPath(['checks', 'leakage', 'action'])).toBe('checks.leakage.action')
    expect(formatKeyPath(['importance', 'groups', 'route', 1])).toBe('importance.groups.route[1]')
    expect(formatKeyPath([])).toBe('')
  })

  it('quotes names that are not plain words', () => {
    expect(formatKeyPath(['data', 'columns', 'order id'])).toBe("data.columns['order id']")
    expect(formatKeyPath(['data', 'columns', "driver's note"])).toBe("data.columns['driver\\'s note']")
    expect(formatKeyPath(['data', 'columns', '2019'])).toBe("data.columns['2019']")
  })
})
