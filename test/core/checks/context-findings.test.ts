import { describe, expect, it } from 'vitest'
import { contextFindings } from '../../../src/core/checks/context-findings.ts'

describe('contextFindings(input): the circumstances of the comparison', () => {
  const refitted = { policyChanged: false, policySource: '.plumbline.yml', baseNoise: 'refits-and-draws', headNoise: 'refits-and-draws' } as const

  it('says nothing when the policy is unchanged and both sides were refitted', () => {
    expect(contextFindings(refitted)).toEqual([])
  })

  it('warns that a changed policy governs both sides, in these words', () => {
    expect(contextFindings({ ...refitted, policyChanged: true })).toEqual([
      {
        kind: 'policy-changed',
        severity: 'warn',
        title: 'This pull request changes the policy file .plumbline.yml.',
        message:
          "The head's policy governs both sides of this comparison. Review the policy change itself: a loosened threshold or a check turned off changes what this gate can see.",
        evidence: { policySource: '.plumbline.yml' },
      },
    ])
  })

  it('notes, as info, that a loaded model on either side leaves training noise out', () => {
    const note = {
      kind: 'noise-model',
      severity: 'info',
      title: 'The model was loaded, not retrained: the noise floor covers permutation draws only.',
      message:
        'A loaded model cannot be reseeded, so the spread a retrain with another seed would cause is unknown. Rank shifts are tested on ' +
        'per-draw values and the score on a paired bootstrap of holdout rows; both understate training noise. Use model.train to refit.',
    }
    expect(contextFindings({ ...refitted, baseNoise: 'draws-only' })).toEqual([{ ...note, evidence: { baseNoise: 'draws-only', headNoise: 'refits-and-draws' } }])
    expect(contextFindings({ ...refitted, headNoise: 'draws-only' })).toEqual([{ ...note, evidence: { baseNoise: 'refits-and-draws', headNoise: 'draws-only' } }])
    // Both at once: the policy first, then the noise note.
    expect(contextFindings({ ...refitted, policyChanged: true, baseNoise: 'draws-only', headNoise: 'draws-only' }).map((f) => f.kind)).toEqual(['policy-changed', 'noise-model'])
  })
})
