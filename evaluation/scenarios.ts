/**
 * Scenario generators for `npm run evaluate`: invented parcels of a fictional regional courier
 * (Northwind Parcel) that predicts late deliveries (binary: `late`) or the delay in minutes
 * (regression: `delay_minutes`), and the pull-request families the gate is measured on.
 *
 * This module knows nothing about the gate: it imports nothing from src/, so no threshold or check
 * can leak into the data. Everything is a pure function of a seed: `buildScenario(family, spec)`
 * returns the base and head feature tables (CSV text) and the same seed always returns the same
 * bytes.
 *
 * The population. Every row is one parcel. The label is drawn once from columns that are all
 * generated up front, including columns the base tables do not show (so a pull request that "adds a
 * real feature" adds one the label really depended on, and the label is the same on both sides):
 *
 *   eta = 0.9·z(log distance_km) + 0.6·z(stop_count) − 0.45·z(promised_window_h)
 *       + depot effect + driver_shift effect + 0.45·z(rain_forecast_mm) + 0.6·max(0, (traffic_index − 0.5) / 0.25 + 0.5)
 *       + 0.1·z(parcel_weight_kg) + 0.3·z(roadworks_km)         (roadworks_km is hidden in the base)
 *   van_age_years, sorting_belt and promised_by_hour have no effect of their own (promised_by_hour is
 *   9 + promised_window_h + 0, 2 or 4 hours, so it follows the window, r ≈ 0.84, in every mode).
 *
 * eta is standardized on the sample, then binary: late ~ Bernoulli(logistic(−0.9 + 2.2·eta)) (about
 * 37% late; scikit-learn 1.2.1's HistGradientBoostingClassifier reaches holdout AUC 0.85 on 10 000
 * rows); regression: delay_minutes = 20 + 12·eta + 12·0.55·N(0, 1)
 * (R² of the true mean about 0.77; the same library's regressor reaches about 0.7). With `correlated`, distance and stops share a route factor
 * (r ≈ 0.6), rain and traffic a weather factor (r ≈ 0.5), and weight follows distance (r ≈ 0.55);
 * otherwise every feature is drawn independently.
 *
 * The holdout is every row whose id hashes into one fifth (FNV-1a of the id text mod 5 = 0); it is
 * the same rows on both sides unless a family says otherwise.
 *
 * The families (see `families` for the exact construction of each):
 * - benign: no-op, reseed-only, row-order, irrelevant-added, weak-added, irrelevant-removed, and
 *   data-refresh (a fresh training sample, beyond the issue's list);
 * - leak: label-noise, post-outcome, noisy-copy, slice-leak, slice-leak-empty;
 * - shift: signal-removed, transform-halved, correlated-duplicate;
 * - score: score-drop.
 *
 * What "reseed only" means here. The gate refits each side with seeds derived from the policy seed,
 * the same on both sides, so a pull request that leaves the data byte for byte the same gives the
 * same numbers on both sides by construction (family `no-op`, a commit that touches only code). The
 * policy seed cannot be changed in the pull request without changing the policy file, which the gate
 * rightly reports. A reseed of the model and nothing else is therefore a pull request whose pipeline
 * writes the same training rows in another order (family `reseed-only`): every value is the same,
 * but every random choice of the learner (row and column subsamples) lands on other rows, so the
 * head's refits are other draws of the same training noise. Family `row-order` reorders the holdout
 * rows as well (a pipeline whose export order is not fixed).
 */

export type Task = 'binary' | 'regression'
export type FamilyKind = 'benign' | 'leak' | 'shift' | 'score' | 'legit'

export interface GeneratorSpec {
  readonly task: Task
  /** Parcels in the population (training plus holdout rows), 2 000 to 50 000. */
  readonly rows: number
  /** Features share latent factors (route, weather) instead of being independent. */
  readonly correlated: boolean
  readonly seed: number
}

/** One side of a pull request: the two files the policy names, as CSV text. */
export interface FeatureTables {
  readonly train: string
  readonly holdout: string
}

export interface Scenario {
  readonly family: string
  readonly kind: FamilyKind
  readonly spec: GeneratorSpec
  readonly target: string
  readonly idColumn: string
  readonly base: FeatureTables
  readonly head: FeatureTables
  /** The feature the change is about (added, changed, removed), or null for a change of no feature. */
  readonly focus: string | null
  /** Numbers of the construction that vary per run (flip share, noise SD, slice), for the record. */
  readonly parameters: Readonly<Record<string, number | string>>
  /** The tables carry no id column (the policy then names none). */
  readonly withoutIds: boolean
  /** Policy keys the family sets in both commits (dotted paths), beside the evaluation's own. */
  readonly policy: Readonly<Record<string, unknown>>
}

export interface Family {
  readonly name: string
  readonly kind: FamilyKind
  /** One sentence: what the pull request does. */
  readonly description: string
  /** Whether a correct gate should block, flag (warn or block) or leave it alone. */
  readonly expectation: 'pass' | 'flag' | 'block'
  readonly build: (population: Population, random: Random) => Change
  /** Policy keys (dotted paths) the family writes into both commits, e.g. a reviewed column. */
  readonly policy?: (population: Population) => Readonly<Record<string, unknown>>
}

// ---------------------------------------------------------------------------------------------
// Seeded randomness, independent of the gate's own generator.

export interface Random {
  next(): number
  normal(): number
  int(n: number): number
}

/** FNV-1a (32 bit) of a text. */
export function fnv1a(text: string): number {
  let h = 0x811c9dc5
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i)
    h = Math.imul(h, 0x01000193)
  }
  return h >>> 0
}

/**
 * sfc32 (Chris Doty-Humphrey's Small Fast Counting generator, from PractRand), seeded from the
 * FNV-1a hash of the seed and a label, with 12 discarded outputs. A different generator from the
 * gate's xoshiro128**, on purpose.
 */
export function createStream(seed: number, label: string): Random {
  let a = fnv1a(`${seed}:${label}:a`)
  let b = fnv1a(`${seed}:${label}:b`)
  let c = fnv1a(`${seed}:${label}:c`)
  let d = 1
  const next32 = () => {
    const t = (((a + b) | 0) + d) | 0
    d = (d + 1) | 0
    a = b ^ (b >>> 9)
    b = (c + (c << 3)) | 0
    c = (c << 21) | (c >>> 11)
    c = (c + t) | 0
    return t >>> 0
  }
  for (let i = 0; i < 12; i++) next32()
  const next = () => next32() / 4294967296
  return {
    next,
    normal: () => Math.sqrt(-2 * Math.log(1 - next())) * Math.cos(2 * Math.PI * next()),
    int: (n: number) => Math.floor(next() * n),
  }
}

function shuffled(n: number, random: Random): number[] {
  const order = Array.from({ length: n }, (_, i) => i)
  for (let i = n - 1; i > 0; i--) {
    const j = random.int(i + 1)
    ;[order[i], order[j]] = [order[j], order[i]]
  }
  return order
}

// ---------------------------------------------------------------------------------------------
// The population

/** A column of the population: numbers (written with `decimals`) or category labels. */
export type Column =
  | { readonly kind: 'numeric'; readonly values: Float64Array; readonly decimals: number }
  | { readonly kind: 'categorical'; readonly values: readonly string[] }

export interface Population {
  readonly spec: GeneratorSpec
  readonly rows: number
  readonly ids: readonly string[]
  readonly label: Float64Array
  readonly labelName: string
  /** Every generated column, shown or hidden. */
  readonly columns: Readonly<Record<string, Column>>
  /** The columns the base tables show, in order. */
  readonly baseFeatures: readonly string[]
  /** Holdout row indices, in population order. */
  readonly holdout: readonly number[]
  /** Training row indices, in population order. */
  readonly train: readonly number[]
}

const depotEffect: Record<string, number> = { harbour: 0.5, 'old-town': 0.3, airport: -0.2, ringway: 0, 'north-park': -0.4 }
const shiftEffect: Record<string, number> = { early: -0.3, day: 0, late: 0.45 }
const depots = Object.keys(depotEffect)
const shifts = Object.keys(shiftEffect)
const belts = ['A', 'B', 'C', 'D', 'E', 'F']

function standardized(values: ArrayLike<number>): Float64Array {
  let m = 0
  for (let i = 0; i < values.length; i++) m += values[i]
  m /= values.length
  let v = 0
  for (let i = 0; i < values.length; i++) v += (values[i] - m) ** 2
  const sd = Math.sqrt(v / Math.max(1, values.length - 1)) || 1
  return Float64Array.from(values, (x) => (x - m) / sd)
}

const numeric = (values: Float64Array, decimals: number): Column => ({ kind: 'numeric', values, decimals })

/** Draws the population for a spec (see the module comment for the model). */
export function generatePopulation(spec: GeneratorSpec): Population {
  if (!(spec.rows >= 100 && Number.isInteger(spec.rows))) throw new RangeError(`generatePopulation needs at least 100 rows, got ${spec.rows}`)
  const random = createStream(spec.seed, `population:${spec.task}:${spec.correlated}:${spec.rows}`)
  const n = spec.rows
  const rho = spec.correlated
  const distance = new Float64Array(n)
  const stops = new Float64Array(n)
  const window = new Float64Array(n)
  const promisedBy = new Float64Array(n)
  const rain = new Float64Array(n)
  const traffic = new Float64Array(n)
  const weight = new Float64Array(n)
  const vanAge = new Float64Array(n)
  const roadworks = new Float64Array(n)
  const depot: string[] = []
  const shift: string[] = []
  const belt: string[] = []
  for (let i = 0; i < n; i++) {
    const route = random.normal()
    const weather = random.normal()
    const mix = (factor: number, r: number) => (rho ? Math.sqrt(r) * factor + Math.sqrt(1 - r) * random.normal() : random.normal())
    const zDistance = mix(route, 0.6)
    distance[i] = Math.exp(2.2 + 0.5 * zDistance)
    stops[i] = Math.max(1, Math.round(14 + 5 * mix(route, 0.6)))
    window[i] = [2, 4, 8][random.int(3)]
    promisedBy[i] = 9 + window[i] + [0, 2, 4][random.int(3)]
    rain[i] = Math.max(0, 1 + 3 * mix(weather, 0.5))
    depot.push(depots[random.int(depots.length)])
    shift.push(shifts[random.int(shifts.length)])
    traffic[i] = 0.5 + 0.25 * mix(weather, 0.5) + (rho && shift[i] === 'late' ? 0.15 : 0)
    const zWeight = rho ? 0.55 * zDistance + Math.sqrt(1 - 0.3) * random.normal() : random.normal()
    weight[i] = Math.max(0.2, Math.exp(0.8 + 0.8 * zWeight))
    vanAge[i] = random.int(13)
    roadworks[i] = random.next() < 0.4 ? Math.round(random.next() * 60) / 10 : 0
    belt.push(belts[random.int(belts.length)])
  }
  const logDistance = standardized(Float64Array.from(distance, Math.log))
  const zStops = standardized(stops)
  const zWindow = standardized(window)
  const zRain = standardized(rain)
  const zWeight = standardized(weight)
  const zRoadworks = standardized(roadworks)
  const raw = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    raw[i] =
      0.9 * logDistance[i] + 0.6 * zStops[i] - 0.45 * zWindow[i] + depotEffect[depot[i]] + shiftEffect[shift[i]] +
      0.45 * zRain[i] + 0.6 * Math.max(0, (traffic[i] - 0.5) / 0.25 + 0.5) + 0.1 * zWeight[i] + 0.3 * zRoadworks[i]
  }
  const eta = standardized(raw)
  const label = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    if (spec.task === 'binary') label[i] = random.next() < 1 / (1 + Math.exp(-(-0.9 + 2.2 * eta[i]))) ? 1 : 0
    else label[i] = Math.round((20 + 12 * eta[i] + 12 * 0.55 * random.normal()) * 10) / 10
  }
  const ids = Array.from({ length: n }, (_, i) => `P${spec.seed % 1000}-${String(100000 + i)}`)
  const holdout: number[] = []
  const train: number[] = []
  ids.forEach((id, i) => (fnv1a(id) % 5 === 0 ? holdout : train).push(i))
  return {
    spec,
    rows: n,
    ids,
    label,
    labelName: spec.task === 'binary' ? 'late' : 'delay_minutes',
    columns: {
      depot: { kind: 'categorical', values: depot },
      distance_km: numeric(distance, 2),
      stop_count: numeric(stops, 0),
      promised_window_h: numeric(window, 0),
      promised_by_hour: numeric(promisedBy, 0),
      driver_shift: { kind: 'categorical', values: shift },
      rain_forecast_mm: numeric(rain, 1),
      traffic_index: numeric(traffic, 3),
      parcel_weight_kg: numeric(weight, 2),
      van_age_years: numeric(vanAge, 0),
      roadworks_km: numeric(roadworks, 1),
      sorting_belt: { kind: 'categorical', values: belt },
    },
    baseFeatures: [
      'depot', 'distance_km', 'stop_count', 'promised_window_h', 'promised_by_hour', 'driver_shift',
      'rain_forecast_mm', 'traffic_index', 'parcel_weight_kg', 'van_age_years',
    ],
    holdout,
    train,
  }
}

// ---------------------------------------------------------------------------------------------
// Changes: what a pull request does to the base tables

/** The head side, described relative to the base. */
export interface Change {
  /** The head's feature columns in order (names of population columns or of `extra`). */
  readonly headFeatures: readonly string[]
  /** Columns that exist only on the head, or replace a population column of the same name there. */
  readonly extra?: Readonly<Record<string, Column>>
  /** Head training rows (population indices) in the order written; default: the base's. */
  readonly headTrain?: readonly number[]
  /** Head holdout rows in the order written; default: the base's. */
  readonly headHoldout?: readonly number[]
  /** Head label, when the training rows are a fresh sample (the holdout label never changes). */
  readonly headLabel?: Float64Array
  /** Head columns replaced for training rows only (a fresh sample). */
  readonly headTrainColumns?: Readonly<Record<string, Column>>
  readonly focus: string | null
  readonly parameters?: Readonly<Record<string, number | string>>
  /** The label of every row on both sides, when the family draws its own world (default: the population's). */
  readonly label?: Float64Array
  /** Write the tables without the id column. */
  readonly withoutIds?: boolean
}

function numericValues(population: Population, name: string): Float64Array {
  const column = population.columns[name]
  if (column.kind !== 'numeric') throw new RangeError(`numericValues: ${name} is categorical`)
  return column.values
}

function labelSd(population: Population): number {
  const y = population.label
  let m = 0
  for (const v of y) m += v
  m /= y.length
  let s = 0
  for (const v of y) s += (v - m) ** 2
  return Math.sqrt(s / (y.length - 1))
}

const withAdded = (population: Population, name: string) => [...population.baseFeatures, name]

/**
 * A label drawn from a linear predictor `eta` (standardized here) the way the population draws its
 * own: binary late ~ Bernoulli(logistic(intercept + slope·eta)), regression 20 + 12·slope·eta + 12·noise·N(0, 1).
 */
function drawLabel(p: Population, random: Random, raw: ArrayLike<number>, shape: { slope: number; intercept: number; noise: number }): Float64Array {
  const eta = standardized(raw)
  return Float64Array.from(eta, (e) =>
    p.spec.task === 'binary'
      ? random.next() < 1 / (1 + Math.exp(-(shape.intercept + shape.slope * e))) ? 1 : 0
      : Math.round((20 + 12 * shape.slope * e + 12 * shape.noise * random.normal()) * 10) / 10,
  )
}

/** The population's own linear predictor (before standardizing), rebuilt from its columns. */
function populationEta(p: Population): Float64Array {
  const z = (name: string) => standardized(numericValues(p, name))
  const logDistance = standardized(Float64Array.from(numericValues(p, 'distance_km'), Math.log))
  const [stops, window, rain, weight, roadworks] = ['stop_count', 'promised_window_h', 'rain_forecast_mm', 'parcel_weight_kg', 'roadworks_km'].map(z)
  const traffic = numericValues(p, 'traffic_index')
  const depot = (p.columns.depot as { values: readonly string[] }).values
  const shift = (p.columns.driver_shift as { values: readonly string[] }).values
  return Float64Array.from(logDistance, (d, i) =>
    0.9 * d + 0.6 * stops[i] - 0.45 * window[i] + depotEffect[depot[i]] + shiftEffect[shift[i]] +
    0.45 * rain[i] + 0.6 * Math.max(0, (traffic[i] - 0.5) / 0.25 + 0.5) + 0.1 * weight[i] + 0.3 * roadworks[i],
  )
}

/** A copy of `label` with `share` of its values flipped (binary) or swapped with another row's (regression). */
function noisyCopy(p: Population, label: Float64Array, share: number, random: Random): Float64Array {
  const values = Float64Array.from(label)
  for (let i = 0; i < values.length; i++) {
    if (random.next() >= share) continue
    values[i] = p.spec.task === 'binary' ? 1 - values[i] : label[random.int(p.rows)]
  }
  return values
}

/** A label copy with 2–12% flipped, in a world whose label is drawn from `raw` with `shape`. */
function copyIn(p: Population, random: Random, raw: ArrayLike<number>, shape: { slope: number; intercept: number; noise: number }): Change {
  const label = drawLabel(p, random, raw, shape)
  const share = 0.02 + 0.1 * random.next()
  return {
    headFeatures: withAdded(p, 'followup_score'),
    extra: { followup_score: numeric(noisyCopy(p, label, share, random), 1) },
    label,
    focus: 'followup_score',
    parameters: { flippedShare: Number(share.toFixed(3)) },
  }
}

export const families: readonly Family[] = [
  {
    name: 'no-op',
    kind: 'benign',
    description: 'A commit that touches only code; the feature tables come out byte for byte the same.',
    expectation: 'pass',
    build: (p) => ({ headFeatures: p.baseFeatures, focus: null }),
  },
  {
    name: 'reseed-only',
    kind: 'benign',
    description: 'The pipeline writes the same training rows in another order: a reseed of the learner, nothing else.',
    expectation: 'pass',
    build: (p, random) => ({ headFeatures: p.baseFeatures, headTrain: shuffled(p.train.length, random).map((i) => p.train[i]), focus: null }),
  },
  {
    name: 'row-order',
    kind: 'benign',
    description: 'The pipeline writes training and holdout rows in another order (same rows, same values, same ids).',
    expectation: 'pass',
    build: (p, random) => ({
      headFeatures: p.baseFeatures,
      headTrain: shuffled(p.train.length, random).map((i) => p.train[i]),
      headHoldout: shuffled(p.holdout.length, random).map((i) => p.holdout[i]),
      focus: null,
    }),
  },
  {
    name: 'irrelevant-added',
    kind: 'benign',
    description: 'Adds sorting_belt, a categorical column the label does not depend on.',
    expectation: 'pass',
    build: (p) => ({ headFeatures: withAdded(p, 'sorting_belt'), focus: 'sorting_belt' }),
  },
  {
    name: 'weak-added',
    kind: 'benign',
    description: 'Adds roadworks_km, a real but weak cause of lateness (0.3 of a standardized effect) the label always depended on.',
    expectation: 'pass',
    build: (p) => ({ headFeatures: withAdded(p, 'roadworks_km'), focus: 'roadworks_km' }),
  },
  {
    name: 'irrelevant-removed',
    kind: 'benign',
    description: 'Removes van_age_years, a column the label does not depend on.',
    expectation: 'pass',
    build: (p) => ({ headFeatures: p.baseFeatures.filter((f) => f !== 'van_age_years'), focus: 'van_age_years' }),
  },
  {
    name: 'data-refresh',
    kind: 'benign',
    description:
      'The training rows are a fresh sample of the same population (same generator, new draws; the holdout is unchanged): beyond the issue\'s list, it shows what the reseed noise floor does not cover.',
    expectation: 'pass',
    build: (p) => {
      const fresh = generatePopulation({ ...p.spec, seed: (p.spec.seed ^ 0x5bd1e995) >>> 0 })
      const headTrainColumns: Record<string, Column> = {}
      for (const name of p.baseFeatures) headTrainColumns[name] = fresh.columns[name]
      return { headFeatures: p.baseFeatures, headLabel: fresh.label, headTrainColumns, focus: null }
    },
  },
  {
    name: 'label-noise',
    kind: 'leak',
    description: 'Adds recorded_delay, the label plus Gaussian noise of 0.2 label SDs (a field filled in after delivery).',
    expectation: 'block',
    build: (p, random) => {
      const sd = labelSd(p)
      const values = Float64Array.from(p.label, (y) => y + 0.2 * sd * random.normal())
      return { headFeatures: withAdded(p, 'recorded_delay'), extra: { recorded_delay: numeric(values, 3) }, focus: 'recorded_delay', parameters: { noiseInLabelSds: 0.2 } }
    },
  },
  {
    name: 'post-outcome',
    kind: 'leak',
    description:
      'Adds final_scan_hour, the hour of the last scan: promised_by_hour plus the delay (binary: after the promise exactly when late), so final_scan_hour minus promised_by_hour gives the label away.',
    expectation: 'block',
    build: (p, random) => {
      const promised = numericValues(p, 'promised_by_hour')
      const values = Float64Array.from(p.label, (y, i) =>
        p.spec.task === 'binary'
          ? promised[i] + (y === 1 ? 0.3 + 2.5 * random.next() : -(0.2 + 3 * random.next()))
          : promised[i] + y / 60 + 0.02 * random.normal(),
      )
      return { headFeatures: withAdded(p, 'final_scan_hour'), extra: { final_scan_hour: numeric(values, 2) }, focus: 'final_scan_hour' }
    },
  },
  {
    name: 'noisy-copy',
    kind: 'leak',
    description:
      'Adds exception_code, a copy of the label with 10–20% of values flipped (binary) or swapped with other rows\' labels (regression): alone about as predictive as the whole base model.',
    expectation: 'flag',
    build: (p, random) => {
      const share = 0.1 + 0.1 * random.next()
      const values = Float64Array.from(p.label)
      for (let i = 0; i < values.length; i++) {
        if (random.next() >= share) continue
        values[i] = p.spec.task === 'binary' ? 1 - values[i] : p.label[random.int(p.rows)]
      }
      return {
        headFeatures: withAdded(p, 'exception_code'),
        extra: { exception_code: numeric(values, 1) },
        focus: 'exception_code',
        parameters: { flippedShare: Number(share.toFixed(3)) },
      }
    },
  },
  {
    name: 'slice-leak',
    kind: 'leak',
    description:
      'Adds scan_gap_h: at the harbour depot (one fifth of parcels) the label plus small noise (its scanners report after delivery), elsewhere an unrelated value with the same spread.',
    expectation: 'flag',
    build: (p, random) => {
      const depot = p.columns.depot as { values: readonly string[] }
      const sd = labelSd(p)
      const values = Float64Array.from(p.label, (y, i) => {
        const leaked = y + 0.2 * sd * random.normal()
        return depot.values[i] === 'harbour' ? leaked : p.label[random.int(p.rows)] + 0.2 * sd * random.normal()
      })
      return { headFeatures: withAdded(p, 'scan_gap_h'), extra: { scan_gap_h: numeric(values, 3) }, focus: 'scan_gap_h', parameters: { slice: 'depot=harbour' } }
    },
  },
  {
    name: 'slice-leak-empty',
    kind: 'leak',
    description:
      'Adds scan_gap_h at the harbour depot only (the label plus small noise, as in slice-leak) and leaves it empty at every other depot.',
    expectation: 'flag',
    build: (p, random) => {
      const depot = p.columns.depot as { values: readonly string[] }
      const sd = labelSd(p)
      const values = Float64Array.from(p.label, (y, i) => (depot.values[i] === 'harbour' ? y + 0.2 * sd * random.normal() : NaN))
      return { headFeatures: withAdded(p, 'scan_gap_h'), extra: { scan_gap_h: numeric(values, 3) }, focus: 'scan_gap_h', parameters: { slice: 'depot=harbour' } }
    },
  },
  {
    name: 'copy-strong-features',
    kind: 'leak',
    description:
      'Adds followup_score, a copy of the label with 2–12% flipped (binary) or swapped with other rows\' (regression), in a world where distance alone nearly decides the label (one-feature AUC ≥ 0.95, R² about 0.85).',
    expectation: 'block',
    build: (p, random) => {
      const logDistance = standardized(Float64Array.from(numericValues(p, 'distance_km'), Math.log))
      const eta = standardized(populationEta(p))
      // Binary: logistic(−0.5 + 6·eta); regression: 20 + 12·eta + 12·0.35·N(0, 1), R² of eta about 0.89.
      const slope = p.spec.task === 'binary' ? 6 : 1
      return copyIn(p, random, Float64Array.from(logDistance, (d, i) => 3 * d + 0.4 * eta[i]), { slope, intercept: -0.5, noise: 0.35 })
    },
  },
  {
    name: 'copy-weak-features',
    kind: 'leak',
    description:
      'Adds followup_score, a copy of the label with 2–12% flipped or swapped, in a world where the label depends weakly on every feature (the best one alone reaches AUC about 0.6).',
    expectation: 'block',
    build: (p, random) => copyIn(p, random, populationEta(p), { slope: 0.7, intercept: -0.5, noise: 1.6 }),
  },
  {
    name: 'post-outcome-proxy',
    kind: 'leak',
    description:
      'Adds followup_score = 2·label + 0.3·z(distance) + N(0, 1) (regression: 2·z(label) + ...), a value recorded after delivery that is far from a copy (alone AUC about 0.9).',
    expectation: 'block',
    build: (p, random) => {
      const logDistance = standardized(Float64Array.from(numericValues(p, 'distance_km'), Math.log))
      const y = p.spec.task === 'binary' ? p.label : standardized(p.label)
      const values = Float64Array.from(y, (v, i) => 2 * v + 0.3 * logDistance[i] + random.normal())
      return { headFeatures: withAdded(p, 'followup_score'), extra: { followup_score: numeric(values, 3) }, focus: 'followup_score' }
    },
  },
  {
    name: 'strong-legit-added',
    kind: 'legit',
    description:
      'Adds hub_backlog, the parcels waiting at the hub at dispatch: known before delivery and a strong real cause (1.5 standardized effects beside the population\'s own predictor).',
    expectation: 'pass',
    build: (p, random) => strongLegit(p, random),
  },
  {
    name: 'strong-legit-reviewed',
    kind: 'legit',
    description: 'strong-legit-added with hub_backlog listed in checks.leakage.reviewed_columns: the acknowledgement should clear a lift block.',
    expectation: 'pass',
    build: (p, random) => strongLegit(p, random),
    policy: () => ({ 'checks.leakage.reviewed_columns': ['hub_backlog'] }),
  },
  {
    name: 'feature-removed',
    kind: 'benign',
    description: 'Removes parcel_weight_kg, a weak real cause (0.1 of a standardized effect), with a policy that lists every column\'s role as plumbline init used to.',
    expectation: 'pass',
    build: (p) => ({ headFeatures: p.baseFeatures.filter((f) => f !== 'parcel_weight_kg'), focus: 'parcel_weight_kg' }),
    policy: (p) => ({ 'data.columns': Object.fromEntries(p.baseFeatures.map((f) => [f, p.columns[f].kind])) }),
  },
  {
    name: 'row-order-no-ids',
    kind: 'benign',
    description: 'The tables have no id column, and the pipeline writes the holdout rows in another order.',
    expectation: 'pass',
    build: (p, random) => ({
      headFeatures: p.baseFeatures,
      headHoldout: shuffled(p.holdout.length, random).map((i) => p.holdout[i]),
      withoutIds: true,
      focus: null,
    }),
  },
  {
    name: 'signal-removed',
    kind: 'shift',
    description: 'distance_km, the strongest feature, loses its signal: a join bug gives every parcel another parcel\'s distance.',
    expectation: 'flag',
    build: (p, random) => {
      const d = numericValues(p, 'distance_km')
      const order = shuffled(p.rows, random)
      return { headFeatures: p.baseFeatures, extra: { distance_km: numeric(Float64Array.from(order, (j) => d[j]), 2) }, focus: 'distance_km' }
    },
  },
  {
    name: 'transform-halved',
    kind: 'shift',
    description: 'stop_count is now written in bands of 12 stops (a changed transform), which roughly halves its importance.',
    expectation: 'flag',
    build: (p) => {
      const s = numericValues(p, 'stop_count')
      return { headFeatures: p.baseFeatures, extra: { stop_count: numeric(Float64Array.from(s, (v) => Math.floor(v / 12) * 12), 0) }, focus: 'stop_count', parameters: { bandWidth: 12 } }
    },
  },
  {
    name: 'correlated-duplicate',
    kind: 'shift',
    description: 'Adds route_miles, distance_km in miles with 5% noise: a strong, correlated duplicate that splits distance_km\'s importance.',
    expectation: 'flag',
    build: (p, random) => {
      const d = numericValues(p, 'distance_km')
      const miles = Float64Array.from(d, (v) => v * 0.621371 * (1 + 0.05 * random.normal()))
      return { headFeatures: withAdded(p, 'route_miles'), extra: { route_miles: numeric(miles, 2) }, focus: 'distance_km' }
    },
  },
  {
    name: 'score-drop',
    kind: 'score',
    description:
      'A sensor change adds Gaussian noise of one feature SD to distance_km (reliability 0.5 on the log scale), which lowers the holdout score.',
    expectation: 'flag',
    build: (p, random) => {
      const d = numericValues(p, 'distance_km')
      const noisy = Float64Array.from(d, (v) => Math.exp(Math.log(v) + 0.5 * random.normal()))
      return { headFeatures: p.baseFeatures, extra: { distance_km: numeric(noisy, 2) }, focus: 'distance_km', parameters: { addedNoiseInSds: 1 } }
    },
  },
]

function strongLegit(p: Population, random: Random): Change {
  const backlog = Float64Array.from({ length: p.rows }, () => Math.exp(3 + 0.6 * random.normal()))
  const zBacklog = standardized(Float64Array.from(backlog, Math.log))
  const eta = standardized(populationEta(p))
  // The population's own shape: binary logistic(−0.9 + 2.2·eta), regression 20 + 12·eta + 12·0.55·N(0, 1).
  const slope = p.spec.task === 'binary' ? 2.2 : 1
  const label = drawLabel(p, random, Float64Array.from(eta, (e, i) => e + 1.5 * zBacklog[i]), { slope, intercept: -0.9, noise: 0.55 })
  return { headFeatures: withAdded(p, 'hub_backlog'), extra: { hub_backlog: numeric(backlog, 0) }, label, focus: 'hub_backlog' }
}

export function familyByName(name: string): Family {
  const family = families.find((f) => f.name === name)
  if (!family) throw new RangeError(`familyByName: no family '${name}'; known: ${families.map((f) => f.name).join(', ')}`)
  return family
}

// ---------------------------------------------------------------------------------------------
// Writing the tables

function cell(column: Column, row: number): string {
  if (column.kind === 'categorical') return column.values[row]
  const v = column.values[row]
  return Number.isNaN(v) ? '' : v.toFixed(column.decimals)
}

function writeCsv(
  header: readonly string[],
  rows: readonly number[],
  value: (name: string, row: number) => string,
): string {
  const lines = [header.join(',')]
  for (const r of rows) lines.push(header.map((name) => value(name, r)).join(','))
  return `${lines.join('\n')}\n`
}

/**
 * The base and head tables of one run. `spec.seed` decides the population; the family's own random
 * choices come from a stream derived from the same seed and the family name.
 */
export function buildScenario(family: Family, spec: GeneratorSpec): Scenario {
  const population = generatePopulation(spec)
  const change = family.build(population, createStream(spec.seed, `family:${family.name}`))
  const { ids, labelName } = population
  const label = change.label ?? population.label
  const id = 'parcel_id'
  const withId = (header: readonly string[]) => (change.withoutIds ? header.filter((name) => name !== id) : header)
  const side = (columns: Readonly<Record<string, Column>>) => (name: string, row: number) =>
    name === id ? ids[row] : name === labelName ? labelCell(label[row], spec.task) : cell(columns[name], row)
  const baseValue = side(population.columns)
  const headColumns = { ...population.columns, ...(change.extra ?? {}) }
  const headValue = side(headColumns)
  const baseHeader = withId([id, ...population.baseFeatures, labelName])
  const headHeader = withId([id, ...change.headFeatures, labelName])
  const base = {
    train: writeCsv(baseHeader, population.train, baseValue),
    holdout: writeCsv(baseHeader, population.holdout, baseValue),
  }
  let headTrain: string
  if (change.headLabel && change.headTrainColumns) {
    const freshColumns = { ...headColumns, ...change.headTrainColumns }
    const freshLabel = change.headLabel
    // A fresh sample: new parcels, so new ids (the holdout's ids never occur in training).
    headTrain = writeCsv(headHeader, population.train, (name, row) =>
      name === id ? `${ids[row]}-r` : name === labelName ? labelCell(freshLabel[row], spec.task) : cell(freshColumns[name], row),
    )
  } else {
    headTrain = writeCsv(headHeader, change.headTrain ?? population.train, headValue)
  }
  const head = { train: headTrain, holdout: writeCsv(headHeader, change.headHoldout ?? population.holdout, headValue) }
  return {
    family: family.name,
    kind: family.kind,
    spec,
    target: labelName,
    idColumn: id,
    base,
    head,
    focus: change.focus,
    parameters: change.parameters ?? {},
    withoutIds: change.withoutIds ?? false,
    policy: family.policy?.(population) ?? {},
  }
}

function labelCell(value: number, task: Task): string {
  return task === 'binary' ? String(value) : value.toFixed(1)
}
