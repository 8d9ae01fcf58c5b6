import type { Finding } from '../report/report.ts'

/** The pull request edits the policy file: the head's copy governs both sides, so say so. */
export function policyChangedFinding(policySource: string): Finding {
  return {
    kind: 'policy-changed',
    severity: 'warn',
    title: `This pull request changes the policy file ${policySource}.`,
    message: `The head's policy governs both sides of this comparison. Review the policy change itself: a loosened threshold or a check turned off changes what this gate can see.`,
    evidence: { policySource },
  }
}

/** A side whose model was loaded (one "refit"): its noise floor covers permutation draws only. */
export function noiseModelFinding(baseNoise: string, headNoise: string): Finding {
  return {
    kind: 'noise-model',
    severity: 'info',
    title: 'The model was loaded, not retrained: the noise floor covers permutation draws only.',
    message:
      'A loaded model cannot be reseeded, so the spread a retrain with another seed would cause is unknown. Rank shifts are tested on ' +
      'per-draw values and the score on a paired bootstrap of holdout rows; both understate training noise. Use model.train to refit.',
    evidence: { baseNoise, headNoise },
  }
}

/** The findings that describe the circumstances of the comparison rather than the models. */
export function contextFindings(input: {
  readonly policyChanged: boolean
  readonly policySource: string
  readonly baseNoise: 'refits-and-draws' | 'draws-only'
  readonly headNoise: 'refits-and-draws' | 'draws-only'
}): Finding[] {
  return [
    ...(input.policyChanged ? [policyChangedFinding(input.policySource)] : []),
    ...(input.baseNoise === 'draws-only' || input.headNoise === 'draws-only' ? [noiseModelFinding(input.baseNoise, input.headNoise)] : []),
  ]
}
