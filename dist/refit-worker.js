import { createRequire as __plumblineCreateRequire } from 'node:module';
const require = __plumblineCreateRequire(import.meta.url);

// src/core/data/dataset.ts
function selectFeatures(data, names) {
  const index = new Map(data.features.map((f, j) => [f.name, j]));
  const picked = names.map((name) => {
    const j = index.get(name);
    if (j === void 0) throw new RangeError(`selectFeatures: no feature named '${name}'`);
    return j;
  });
  const result = {
    ...data,
    features: picked.map((j) => data.features[j]),
    columns: picked.map((j) => data.columns[j])
  };
  if ("missing" in data && Array.isArray(data.missing)) {
    result.missing = picked.map((j) => data.missing[j]);
  }
  return result;
}

// src/core/errors.ts
var UserError = class extends Error {
  constructor(message, fix) {
    super(message);
    this.fix = fix;
    this.name = "UserError";
  }
  fix;
};
var InternalError = class extends Error {
  constructor(message) {
    super(message);
    this.name = "InternalError";
  }
};

// node_modules/simple-statistics/dist/simple-statistics.mjs
function sum(x) {
  if (x.length === 0) {
    return 0;
  }
  var sum2 = x[0];
  var correction = 0;
  var transition;
  if (typeof sum2 !== "number") {
    return Number.NaN;
  }
  for (var i = 1; i < x.length; i++) {
    if (typeof x[i] !== "number") {
      return Number.NaN;
    }
    transition = sum2 + x[i];
    if (Math.abs(sum2) >= Math.abs(x[i])) {
      correction += sum2 - transition + x[i];
    } else {
      correction += x[i] - transition + sum2;
    }
    sum2 = transition;
  }
  return sum2 + correction;
}
function mean(x) {
  if (x.length === 0) {
    throw new Error("mean requires at least one data point");
  }
  return sum(x) / x.length;
}
function sumNthPowerDeviations(x, n) {
  var meanValue = mean(x);
  var sum2 = 0;
  var tempValue;
  var i;
  if (n === 2) {
    for (i = 0; i < x.length; i++) {
      tempValue = x[i] - meanValue;
      sum2 += tempValue * tempValue;
    }
  } else {
    for (i = 0; i < x.length; i++) {
      sum2 += Math.pow(x[i] - meanValue, n);
    }
  }
  return sum2;
}
function sampleVariance(x) {
  if (x.length < 2) {
    throw new Error("sampleVariance requires at least two data points");
  }
  var sumSquaredDeviationsValue = sumNthPowerDeviations(x, 2);
  var besselsCorrection = x.length - 1;
  return sumSquaredDeviationsValue / besselsCorrection;
}
function sampleStandardDeviation(x) {
  var sampleVarianceX = sampleVariance(x);
  return Math.sqrt(sampleVarianceX);
}
var BayesianClassifier = function BayesianClassifier2() {
  this.totalCount = 0;
  this.data = {};
};
BayesianClassifier.prototype.train = function train(item, category) {
  if (!this.data[category]) {
    this.data[category] = {};
  }
  for (var k in item) {
    var v = item[k];
    if (this.data[category][k] === void 0) {
      this.data[category][k] = {};
    }
    if (this.data[category][k][v] === void 0) {
      this.data[category][k][v] = 0;
    }
    this.data[category][k][v]++;
  }
  this.totalCount++;
};
BayesianClassifier.prototype.score = function score(item) {
  var odds = {};
  var category;
  for (var k in item) {
    var v = item[k];
    for (category in this.data) {
      if (odds[category] === void 0) {
        odds[category] = {};
      }
      if (this.data[category][k]) {
        odds[category][k + "_" + v] = (this.data[category][k][v] || 0) / this.totalCount;
      } else {
        odds[category][k + "_" + v] = 0;
      }
    }
  }
  var oddsSums = {};
  for (category in odds) {
    oddsSums[category] = 0;
    for (var combination in odds[category]) {
      oddsSums[category] += odds[category][combination];
    }
  }
  return oddsSums;
};
var COEFFICIENTS = [
  0.9999999999999971,
  57.15623566586292,
  -59.59796035547549,
  14.136097974741746,
  -0.4919138160976202,
  3399464998481189e-20,
  4652362892704858e-20,
  -9837447530487956e-20,
  1580887032249125e-19,
  -21026444172410488e-20,
  21743961811521265e-20,
  -1643181065367639e-19,
  8441822398385275e-20,
  -26190838401581408e-21,
  36899182659531625e-22
];
var g = 607 / 128;
var LOGSQRT2PI = Math.log(Math.sqrt(2 * Math.PI));
function gammaln(n) {
  if (n <= 0) {
    return Number.POSITIVE_INFINITY;
  }
  n--;
  var a = COEFFICIENTS[0];
  for (var i = 1; i < 15; i++) {
    a += COEFFICIENTS[i] / (n + i);
  }
  var tmp = g + 0.5 + n;
  return LOGSQRT2PI + Math.log(a) - tmp + (n + 0.5) * Math.log(tmp);
}
var SQRT_2PI$1 = Math.sqrt(2 * Math.PI);
function cumulativeDistribution(z2) {
  var sum2 = z2;
  var tmp = z2;
  for (var i = 1; i < 30; i++) {
    tmp *= z2 * z2 / (2 * i + 1);
    sum2 += tmp;
  }
  return Math.round((0.5 + sum2 / SQRT_2PI$1 * Math.exp(-z2 * z2 / 2)) * 1e4) / 1e4;
}
var standardNormalTable = [];
for (z = 0; z <= 3.09; z += 0.01) {
  standardNormalTable.push(cumulativeDistribution(z));
}
var z;
var SQRT_2PI = Math.sqrt(2 * Math.PI);
var PerceptronModel = function PerceptronModel2() {
  this.weights = [];
  this.bias = 0;
};
PerceptronModel.prototype.predict = function predict(features) {
  if (features.length !== this.weights.length) {
    return null;
  }
  var score2 = 0;
  for (var i = 0; i < this.weights.length; i++) {
    score2 += this.weights[i] * features[i];
  }
  score2 += this.bias;
  if (score2 > 0) {
    return 1;
  } else {
    return 0;
  }
};
PerceptronModel.prototype.train = function train2(features, label) {
  if (label !== 0 && label !== 1) {
    return null;
  }
  if (features.length !== this.weights.length) {
    this.weights = features.slice();
    this.bias = 1;
  }
  var prediction = this.predict(features);
  if (typeof prediction === "number" && prediction !== label) {
    var gradient = label - prediction;
    for (var i = 0; i < this.weights.length; i++) {
      this.weights[i] += gradient * features[i];
    }
    this.bias += gradient;
  }
  return this;
};

// src/core/statistics/continued-fraction.ts
function continuedFraction(leading, numerator, denominator, limits) {
  const tiny = 1e-300;
  let value = leading === 0 ? tiny : leading;
  let c = value;
  let d = 0;
  for (let j = 1; j <= limits.maxTerms; j++) {
    const a = numerator(j);
    const b = denominator(j);
    d = b + a * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + a / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const step = c * d;
    value *= step;
    if (Math.abs(step - 1) < 1e-15) return value;
  }
  throw new InternalError(`${limits.caller}: continued fraction did not converge in ${limits.maxTerms} terms`);
}

// src/core/statistics/regularized-incomplete-gamma.ts
function regularizedIncompleteGamma(a, x) {
  if (!(a > 0 && a < Infinity)) throw new RangeError(`regularizedIncompleteGamma needs a finite a > 0, got ${a}`);
  if (!(x >= 0)) throw new RangeError(`regularizedIncompleteGamma needs x >= 0, got ${x}`);
  if (x === 0) return { lower: 0, upper: 1 };
  if (x === Infinity) return { lower: 1, upper: 0 };
  const front = Math.exp(a * Math.log(x) - x - gammaln(a));
  const maxTerms = 200 + Math.ceil(20 * Math.sqrt(a));
  if (x < a + 1) {
    let term = 1 / a;
    let sum2 = term;
    for (let n = 1; ; n++) {
      term *= x / (a + n);
      sum2 += term;
      if (term < sum2 * 1e-16) break;
      if (n > maxTerms) throw new InternalError(`regularizedIncompleteGamma: series did not converge for a = ${a}, x = ${x}`);
    }
    const lower = front * sum2;
    return { lower, upper: 1 - lower };
  }
  const upper = front / continuedFraction(
    x + 1 - a,
    (j) => -j * (j - a),
    (j) => x + 1 - a + 2 * j,
    { maxTerms, caller: "regularizedIncompleteGamma" }
  );
  return { lower: 1 - upper, upper };
}

// src/core/statistics/normal-quantile.ts
function normalQuantile(p) {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`normalQuantile needs p in [0, 1], got ${p}`);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p === 0.5) return 0;
  const q = Math.min(p, 1 - p);
  const density = (x2) => Math.exp(-x2 * x2 / 2) / Math.sqrt(2 * Math.PI);
  let x;
  let step;
  if (q < 0.25) {
    const logQ = Math.log(q);
    x = Math.sqrt(-2 * logQ);
    step = (x2) => {
      const tail = regularizedIncompleteGamma(0.5, x2 * x2 / 2).upper / 2;
      return (Math.log(tail) - logQ) * tail / density(x2);
    };
  } else {
    const central = Math.abs(2 * p - 1);
    x = 0;
    step = (x2) => -(regularizedIncompleteGamma(0.5, x2 * x2 / 2).lower - central) / (2 * density(x2));
  }
  for (let iteration = 0; iteration < 100; iteration++) {
    const delta = step(x);
    x += delta;
    if (Math.abs(delta) <= 4e-15 * x) return p < 0.5 ? -x : x;
  }
  throw new InternalError(`normalQuantile: Newton iteration did not converge for p = ${p}`);
}

// src/core/statistics/log-beta.ts
function logBeta(a, b) {
  if (!(a > 0 && a < Infinity && b > 0 && b < Infinity)) {
    throw new RangeError(`logBeta needs finite a > 0 and b > 0, got a = ${a}, b = ${b}`);
  }
  const small = Math.min(a, b);
  const big = Math.max(a, b);
  if (big < 10) return gammaln(a) + gammaln(b) - gammaln(a + b);
  const logGammaRatio = (big - 0.5) * Math.log1p(small / big) + small * Math.log(big + small) - small + stirlingRemainder(big + small) - stirlingRemainder(big);
  return gammaln(small) - logGammaRatio;
}
function stirlingRemainder(z2) {
  const w = 1 / (z2 * z2);
  return (1 / 12 - w * (1 / 360 - w * (1 / 1260 - w * (1 / 1680 - w * (1 / 1188 - w * (691 / 360360 - w / 156)))))) / z2;
}

// src/core/statistics/regularized-incomplete-beta.ts
function regularizedIncompleteBeta(x, a, b) {
  if (!(a > 0 && a < Infinity && b > 0 && b < Infinity)) {
    throw new RangeError(`regularizedIncompleteBeta needs finite a > 0 and b > 0, got a = ${a}, b = ${b}`);
  }
  if (!(x >= 0 && x <= 1)) throw new RangeError(`regularizedIncompleteBeta needs x in [0, 1], got ${x}`);
  if (x === 0) return 0;
  if (x === 1) return 1;
  const front = Math.exp(a * Math.log(x) + b * Math.log1p(-x) - logBeta(a, b));
  if (x < (a + 1) / (a + b + 2)) return front * betaContinuedFraction(x, a, b) / a;
  return 1 - front * betaContinuedFraction(1 - x, b, a) / b;
}
function betaContinuedFraction(x, a, b) {
  const numerator = (j) => {
    const m = j >> 1;
    if (j % 2 === 1) return -(a + m) * (a + b + m) * x / ((a + 2 * m) * (a + 2 * m + 1));
    return m * (b - m) * x / ((a + 2 * m - 1) * (a + 2 * m));
  };
  const maxTerms = 2 * (200 + Math.ceil(20 * Math.sqrt(Math.max(a, b))));
  return 1 / continuedFraction(1, numerator, () => 1, { maxTerms, caller: "regularizedIncompleteBeta" });
}

// src/core/statistics/normal-cdf.ts
function normalCdf(z2) {
  if (Number.isNaN(z2)) return NaN;
  const { lower, upper } = regularizedIncompleteGamma(0.5, z2 * z2 / 2);
  return z2 < 0 ? upper / 2 : 0.5 + lower / 2;
}

// src/core/statistics/student-t-cdf.ts
function studentTCdf(t, df) {
  if (!(df > 0)) throw new RangeError(`studentTCdf needs degrees of freedom > 0, got ${df}`);
  if (Number.isNaN(t)) return NaN;
  if (df === Infinity) return normalCdf(t);
  const ratio = t * t / df;
  const x = 1 / (1 + ratio);
  let lowerTail;
  if (ratio > 1e300) {
    const logX = Math.log(df) - 2 * Math.log(Math.abs(t));
    lowerTail = Math.exp(df / 2 * logX - Math.log(df / 2) - logBeta(df / 2, 0.5)) / 2;
  } else if (x < (df / 2 + 1) / (df / 2 + 2.5)) {
    lowerTail = regularizedIncompleteBeta(x, df / 2, 0.5) / 2;
  } else {
    lowerTail = 0.5 - regularizedIncompleteBeta(ratio / (1 + ratio), 0.5, df / 2) / 2;
  }
  return t < 0 ? lowerTail : 1 - lowerTail;
}

// src/core/statistics/student-t-quantile.ts
function studentTQuantile(p, df) {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`studentTQuantile needs p in [0, 1], got ${p}`);
  if (!(df > 0)) throw new RangeError(`studentTQuantile needs degrees of freedom > 0, got ${df}`);
  if (df === Infinity) return normalQuantile(p);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p === 0.5) return 0;
  const sign = p < 0.5 ? -1 : 1;
  const q = Math.min(p, 1 - p);
  if (df === 1) return q < 0.25 ? sign / Math.tan(Math.PI * q) : Math.tan(Math.PI * (p - 0.5));
  if (df === 2) return sign * Math.abs(2 * p - 1) / Math.sqrt(2 * q * (1 - q));
  return sign * upperQuantile(q, Math.abs(2 * p - 1), df);
}
function upperQuantile(q, central, df) {
  const logDensityConstant = -0.5 * Math.log(df) - logBeta(df / 2, 0.5);
  const isTail = q < 0.25;
  const logTarget = Math.log(isTail ? q : central);
  const evaluate = (u2) => {
    const t = Math.exp(u2);
    const r = t / Math.sqrt(df);
    const logOnePlusR2 = r > 1e150 ? 2 * Math.log(r) : Math.log1p(r * r);
    const logTimesDensity = u2 + logDensityConstant - (df + 1) / 2 * logOnePlusR2;
    if (isTail) {
      const logTail = Math.log(studentTCdf(-t, df));
      return { g: logTarget - logTail, slope: Math.exp(logTimesDensity - logTail) };
    }
    const logCentral = Math.log(regularizedIncompleteBeta(1 / (1 + 1 / (r * r)), 0.5, df / 2));
    return { g: logCentral - logTarget, slope: 2 * Math.exp(logTimesDensity - logCentral) };
  };
  const z2 = normalQuantile(1 - q);
  const start = z2 + (z2 ** 3 + z2) / (4 * df) + (5 * z2 ** 5 + 16 * z2 ** 3 + 3 * z2) / (96 * df * df);
  const maxU = Math.log(Number.MAX_VALUE);
  let u = Math.min(Math.log(start), maxU);
  let { g: g2, slope } = evaluate(u);
  let lower = -Infinity;
  let upper = Infinity;
  for (let width = 1; g2 !== 0; width *= 2) {
    if (g2 < 0) {
      lower = u;
      if (upper < Infinity) break;
      if (u === maxU) return Infinity;
      u = Math.min(u + width, maxU);
    } else {
      upper = u;
      if (lower > -Infinity) break;
      u -= width;
    }
    ;
    ({ g: g2, slope } = evaluate(u));
  }
  for (let iteration = 0; iteration < 200; iteration++) {
    if (g2 === 0) return Math.exp(u);
    if (g2 < 0) lower = u;
    else upper = u;
    let next = u - g2 / slope;
    if (!(next > lower && next < upper)) next = (lower + upper) / 2;
    const change = Math.abs(next - u);
    u = next;
    if (change <= 1e-14 || upper - lower <= 1e-14) return Math.exp(u);
    ({ g: g2, slope } = evaluate(u));
  }
  throw new InternalError(`studentTQuantile: did not converge for q = ${q}, df = ${df}`);
}

// src/core/importance/replacement-units.ts
function replacementUnits(names, groups = []) {
  const position = new Map(names.map((name, j) => [name, j]));
  const units = names.map((name, j) => ({ name, members: [name], isGroup: false, columns: [j] }));
  for (const group of groups) {
    const columns = group.members.map((m) => position.get(m));
    if (columns.some((c) => c === void 0)) continue;
    units.push({ name: group.name, members: [...group.members], isGroup: true, columns });
  }
  return units;
}
function stackedCopies(data, draws, hasFastPath) {
  const rows = data.rows * draws;
  const columns = hasFastPath ? [] : data.columns.map((column) => {
    const out = new Float64Array(rows);
    for (let k = 0; k < draws; k++) out.set(column, k * data.rows);
    return out;
  });
  return { rows, features: data.features, columns };
}

// src/core/models/model.ts
function predictionWidth(model) {
  return model.classCount ?? 1;
}

// src/core/statistics/random.ts
function splitmix32(state) {
  let z2 = state + 2654435769 | 0;
  z2 = Math.imul(z2 ^ z2 >>> 16, 2246822507);
  z2 = Math.imul(z2 ^ z2 >>> 13, 3266489909);
  return (z2 ^ z2 >>> 16) >>> 0;
}
function deriveSeed(seed, ...labels) {
  let h = 2166136261 ^ seed >>> 0;
  for (const ch of labels.join("\0")) {
    h ^= ch.codePointAt(0);
    h = Math.imul(h, 16777619);
  }
  return splitmix32(h ^ Math.imul(seed >>> 0, 2654435761));
}
function createRandom(seed) {
  if (!Number.isFinite(seed)) throw new RangeError(`createRandom needs a finite seed, got ${seed}`);
  const seed32 = Math.trunc(seed) >>> 0;
  let s = seed32;
  const state = new Uint32Array(4);
  for (let i = 0; i < 4; i++) {
    s = s + 2654435769 >>> 0;
    state[i] = splitmix32(s);
  }
  if ((state[0] | state[1] | state[2] | state[3]) === 0) state[0] = 1;
  let spareNormal = NaN;
  function nextUint32() {
    const result = Math.imul(rotl(Math.imul(state[1], 5), 7), 9) >>> 0;
    const t = state[1] << 9;
    state[2] ^= state[0];
    state[3] ^= state[1];
    state[1] ^= state[2];
    state[0] ^= state[3];
    state[2] ^= t;
    state[3] = rotl(state[3], 11);
    return result;
  }
  return {
    seed: seed32,
    next: () => nextUint32() / 4294967296,
    int(n) {
      if (!(n >= 1) || n > 4294967296 || !Number.isInteger(n)) {
        throw new RangeError(`int needs a whole number from 1 to 2^32, got ${n}`);
      }
      const limit = 4294967296 - 4294967296 % n;
      let x = nextUint32();
      while (x >= limit) x = nextUint32();
      return x % n;
    },
    normal() {
      if (!Number.isNaN(spareNormal)) {
        const value = spareNormal;
        spareNormal = NaN;
        return value;
      }
      let u = 0;
      while (u === 0) u = nextUint32() / 4294967296;
      const v = nextUint32() / 4294967296;
      const radius = Math.sqrt(-2 * Math.log(u));
      spareNormal = radius * Math.sin(2 * Math.PI * v);
      return radius * Math.cos(2 * Math.PI * v);
    }
  };
}
function rotl(x, k) {
  return (x << k | x >>> 32 - k) >>> 0;
}
function shuffledIndices(n, random) {
  const order = new Uint32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  for (let i = n - 1; i > 0; i--) {
    const j = random.int(i + 1);
    const tmp = order[i];
    order[i] = order[j];
    order[j] = tmp;
  }
  return order;
}

// src/core/statistics/t-interval.ts
function tInterval(values, options = {}) {
  const level = options.level ?? 0.95;
  if (!(level > 0 && level < 1)) throw new RangeError(`tInterval needs a level in (0, 1), got ${level}`);
  const sample = Array.from(values);
  const n = sample.length;
  if (n === 0) throw new RangeError("tInterval needs at least one value, got none");
  const missing = sample.findIndex(Number.isNaN);
  if (missing >= 0) throw new RangeError(`tInterval cannot use NaN (at index ${missing}); drop missing values first`);
  const center = mean(sample);
  if (n === 1) return { mean: center, sd: NaN, n, halfWidth: NaN, lower: NaN, upper: NaN };
  const sd = sampleStandardDeviation(sample);
  const halfWidth = -studentTQuantile((1 - level) / 2, n - 1) * sd / Math.sqrt(n);
  return { mean: center, sd, n, halfWidth, lower: center - halfWidth, upper: center + halfWidth };
}

// src/core/metrics/check-paired.ts
function checkPaired(name, y, prediction, labels) {
  if (y.length !== prediction.length) {
    throw new RangeError(`${name} needs paired samples, got ${y.length} targets and ${prediction.length} predictions`);
  }
  if (labels === "binary") {
    for (let i = 0; i < y.length; i++) {
      if (y[i] !== 0 && y[i] !== 1) throw new RangeError(`${name} needs targets of 0 or 1, got ${y[i]} at index ${i}`);
    }
  }
}
function checkClassMatrix(name, y, probabilities) {
  const n = y.length;
  if (n === 0) {
    if (probabilities.length !== 0) throw new RangeError(`${name} needs paired samples, got 0 targets and ${probabilities.length} probabilities`);
    return 0;
  }
  const k = probabilities.length / n;
  if (!Number.isInteger(k) || k < 2) {
    throw new RangeError(`${name} needs an [N, K] probability matrix with K >= 2 for ${n} targets, got ${probabilities.length} values`);
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isInteger(y[i]) || y[i] < 0 || y[i] >= k) throw new RangeError(`${name} needs class indices from 0 to ${k - 1}, got ${y[i]} at index ${i}`);
  }
  return k;
}

// src/core/metrics/multiclass-accuracy.ts
function multiclassAccuracy(y, probabilities) {
  const k = checkClassMatrix("multiclassAccuracy", y, probabilities);
  if (k === 0) return NaN;
  let correct = 0;
  for (let i = 0; i < y.length; i++) {
    const predicted = argmaxRow(probabilities, i * k, k);
    if (predicted < 0) return NaN;
    if (predicted === y[i]) correct++;
  }
  return correct / y.length;
}
function argmaxRow(values, offset, k) {
  let best = 0;
  let bestValue = values[offset];
  if (bestValue !== bestValue) return -1;
  for (let c = 1; c < k; c++) {
    const v = values[offset + c];
    if (v !== v) return -1;
    if (v > bestValue) {
      best = c;
      bestValue = v;
    }
  }
  return best;
}

// src/core/metrics/multiclass-log-loss.ts
var EPSILON = 1e-15;
function multiclassLogLoss(y, probabilities) {
  const k = checkClassMatrix("multiclassLogLoss", y, probabilities);
  if (k === 0) return NaN;
  let sum2 = 0;
  for (let i = 0; i < y.length; i++) sum2 += rowLogLoss(y[i], probabilities, i * k, k, i);
  return sum2 / y.length;
}
function rowLogLoss(label, probabilities, offset, k, row = 0) {
  let total = 0;
  let own = 0;
  for (let c = 0; c < k; c++) {
    const p = probabilities[offset + c];
    if (p < 0 || p > 1) throw new RangeError(`multiclassLogLoss needs probabilities in [0, 1], got ${p} at row ${row}, class ${c}`);
    const clipped = Math.min(1 - EPSILON, Math.max(EPSILON, p));
    total += clipped;
    if (c === label) own = clipped;
  }
  return -Math.log(own / total);
}

// src/core/importance/row-contributions.ts
var EPSILON2 = 1e-15;
function rowContributions(metric, y, base, permuted, out) {
  const n = y.length;
  if (metric.task === "multiclass") return multiclassContributions(metric, y, base, permuted, out);
  switch (metric.name) {
    case "log-loss": {
      const loss = (t, p) => {
        const q = Math.min(Math.max(p, EPSILON2), 1 - EPSILON2);
        return -(t * Math.log(q) + (1 - t) * Math.log(1 - q));
      };
      for (let i = 0; i < n; i++) out[i] = loss(y[i], permuted[i]) - loss(y[i], base[i]);
      return out;
    }
    case "brier":
      for (let i = 0; i < n; i++) out[i] = (permuted[i] - y[i]) ** 2 - (base[i] - y[i]) ** 2;
      return out;
    case "accuracy":
      for (let i = 0; i < n; i++) out[i] = Number(base[i] > 0.5 === (y[i] === 1)) - Number(permuted[i] > 0.5 === (y[i] === 1));
      return out;
    case "mae":
      for (let i = 0; i < n; i++) out[i] = Math.abs(permuted[i] - y[i]) - Math.abs(base[i] - y[i]);
      return out;
    case "rmse":
    case "r2": {
      let mse = 0;
      let mean2 = 0;
      for (let i = 0; i < n; i++) {
        mse += (base[i] - y[i]) ** 2;
        mean2 += y[i];
      }
      mse /= n;
      mean2 /= n;
      let variance = 0;
      for (let i = 0; i < n; i++) variance += (y[i] - mean2) ** 2;
      variance /= n;
      const scale = metric.name === "rmse" ? 1 / (2 * Math.sqrt(mse)) : 1 / variance;
      if (!Number.isFinite(scale)) return null;
      for (let i = 0; i < n; i++) out[i] = ((permuted[i] - y[i]) ** 2 - (base[i] - y[i]) ** 2) * scale;
      return out;
    }
    default:
      return null;
  }
}
function multiclassContributions(metric, y, base, permuted, out) {
  const n = y.length;
  const k = n === 0 ? 0 : base.length / n;
  switch (metric.name) {
    case "log-loss":
      for (let i = 0; i < n; i++) out[i] = rowLogLoss(y[i], permuted, i * k, k, i) - rowLogLoss(y[i], base, i * k, k, i);
      return out;
    case "accuracy":
      for (let i = 0; i < n; i++) out[i] = Number(argmaxRow(base, i * k, k) === y[i]) - Number(argmaxRow(permuted, i * k, k) === y[i]);
      return out;
    default:
      return null;
  }
}

// src/core/importance/permutation-importance.ts
async function permutationImportance(model, evaluation, options) {
  const { metric, draws } = options;
  if (!Number.isInteger(draws) || draws < 1) {
    throw new RangeError(`permutationImportance needs a whole number of draws >= 1, got ${draws}`);
  }
  const names = model.featureNames;
  const data = selectFeatures(evaluation, names);
  const reference = options.reference ? selectFeatures(options.reference, names) : data;
  const usesOwnRows = options.reference === void 0;
  const n = data.rows;
  const width = predictionWidth(model);
  const y = evaluation.target.values;
  if (n < 2) throw new RangeError(`permutationImportance needs at least 2 evaluation rows, got ${n}`);
  if (reference.rows < 1) throw new RangeError("permutationImportance needs at least 1 reference row");
  const basePrediction = await model.predict(data);
  const score2 = metric.compute(y, basePrediction);
  const contribution = new Float64Array(n);
  const rowSum = new Float64Array(n);
  const units = replacementUnits(names, options.groups);
  const fast = model.createReplacementPredictor?.(data);
  const stackedMatrix = stackedCopies(data, draws, Boolean(fast));
  const stackedRows = stackedMatrix.rows;
  const stacked = stackedMatrix.columns;
  const importances = [];
  const drawReplacement = (unit, into) => {
    const random = createRandom(deriveSeed(options.seed, "draws", unit.isGroup ? "group" : "feature", unit.name));
    const replaced = /* @__PURE__ */ new Map();
    unit.columns.forEach((j, m) => replaced.set(names[j], into ? into[m] : new Float64Array(stackedRows)));
    for (let k = 0; k < draws; k++) {
      const rows = referenceRows(n, reference.rows, usesOwnRows, random);
      for (const j of unit.columns) {
        const source = reference.columns[j];
        const target = replaced.get(names[j]);
        const offset = k * n;
        for (let i = 0; i < n; i++) target[offset + i] = source[rows[i]];
      }
    }
    return replaced;
  };
  const batched = fast?.predictMany ? fast.predictMany(units.map((unit) => drawReplacement(unit)), draws) : void 0;
  for (const [u, unit] of units.entries()) {
    let prediction;
    if (batched) prediction = batched[u];
    else if (fast) prediction = fast.predict(drawReplacement(unit), draws);
    else {
      drawReplacement(unit, unit.columns.map((j) => stacked[j]));
      prediction = await model.predict(stackedMatrix);
    }
    const values = [];
    rowSum.fill(0);
    let decomposes = true;
    for (let k = 0; k < draws; k++) {
      const block = prediction.subarray(k * n * width, (k + 1) * n * width);
      const permuted = metric.compute(y, block);
      values.push(metric.higherIsBetter ? score2 - permuted : permuted - score2);
      if (decomposes && rowContributions(metric, y, basePrediction, block, contribution)) {
        for (let i = 0; i < n; i++) rowSum[i] += contribution[i];
      } else decomposes = false;
    }
    const rowSe = decomposes ? standardErrorOfMean(rowSum, draws) : NaN;
    if (!fast) {
      for (const j of unit.columns) {
        const column = data.columns[j];
        for (let k = 0; k < draws; k++) stacked[j].set(column, k * n);
      }
    }
    const interval = summarizeDraws(values);
    importances.push({ name: unit.name, members: unit.members, isGroup: unit.isGroup, draws: values, ...interval, rowSe });
  }
  return { score: score2, importances };
}
function referenceRows(n, available, usesOwnRows, random) {
  if (usesOwnRows || available >= n) return shuffledIndices(available, random).subarray(0, n);
  const rows = new Uint32Array(n);
  for (let i = 0; i < n; i++) rows[i] = random.int(available);
  return rows;
}
function standardErrorOfMean(sums, draws) {
  const n = sums.length;
  let mean2 = 0;
  for (let i = 0; i < n; i++) mean2 += sums[i] / draws;
  mean2 /= n;
  let squares = 0;
  for (let i = 0; i < n; i++) squares += (sums[i] / draws - mean2) ** 2;
  return Math.sqrt(squares / (n - 1) / n);
}
function summarizeDraws(values) {
  if (values.length === 1) return { mean: values[0], sd: NaN, lower: NaN, upper: NaN };
  const t = tInterval(values);
  return { mean: t.mean, sd: t.sd, lower: t.lower, upper: t.upper };
}

// src/core/importance/prediction-sensitivity.ts
async function predictionSensitivity(model, rows, options) {
  const { draws, threshold } = options;
  const argmax = options.argmax === true;
  if (!Number.isInteger(draws) || draws < 1) {
    throw new RangeError(`predictionSensitivity needs a whole number of draws >= 1, got ${draws}`);
  }
  const names = model.featureNames;
  const data = selectFeatures(rows, names);
  const reference = selectFeatures(options.reference, names);
  const n = data.rows;
  if (n < 1) throw new RangeError("predictionSensitivity needs at least 1 row");
  if (reference.rows < 1) throw new RangeError("predictionSensitivity needs at least 1 reference row");
  const original = await model.predict(data);
  const width = predictionWidth(model);
  const countsFlips = threshold !== void 0 || argmax;
  const units = replacementUnits(names, options.groups);
  const fast = model.createReplacementPredictor?.(data);
  const stackedMatrix = stackedCopies(data, draws, Boolean(fast));
  const stackedRows = stackedMatrix.rows;
  const stacked = stackedMatrix.columns;
  const estimates = [];
  for (const unit of units) {
    const random = createRandom(deriveSeed(options.seed, "sensitivity", unit.isGroup ? "group" : "feature", unit.name));
    const replaced = /* @__PURE__ */ new Map();
    for (const j of unit.columns) replaced.set(names[j], fast ? new Float64Array(stackedRows) : stacked[j]);
    for (let k = 0; k < draws; k++) {
      const picked = reference.rows >= n ? shuffledIndices(reference.rows, random).subarray(0, n) : drawWithReplacement(n, reference.rows, random);
      for (const j of unit.columns) {
        const source = reference.columns[j];
        const target = replaced.get(names[j]);
        for (let i = 0; i < n; i++) target[k * n + i] = source[picked[i]];
      }
    }
    const prediction = fast ? fast.predict(replaced, draws) : await model.predict(stackedMatrix);
    const changes = [];
    const flipShares = [];
    for (let k = 0; k < draws; k++) {
      let change = 0;
      let flipped = 0;
      if (width > 1) {
        for (let i = 0; i < n; i++) {
          const at = (k * n + i) * width;
          let total = 0;
          for (let c = 0; c < width; c++) total += Math.abs(prediction[at + c] - original[i * width + c]);
          change += total / 2;
          if (argmax && argmaxRow(original, i * width, width) !== argmaxRow(prediction, at, width)) flipped++;
        }
      } else {
        for (let i = 0; i < n; i++) {
          const before = original[i];
          const after = prediction[k * n + i];
          change += Math.abs(after - before);
          if (threshold !== void 0 && before >= threshold !== after >= threshold) flipped++;
        }
      }
      changes.push(change / n);
      flipShares.push(flipped / n);
    }
    if (!fast) {
      for (const j of unit.columns) for (let k = 0; k < draws; k++) stacked[j].set(data.columns[j], k * n);
    }
    estimates.push({
      name: unit.name,
      members: unit.members,
      isGroup: unit.isGroup,
      draws: changes,
      mean: average(changes),
      ...countsFlips ? { flipDraws: flipShares, flipShare: average(flipShares) } : {}
    });
  }
  return estimates;
}
function drawWithReplacement(n, available, random) {
  const rows = new Uint32Array(n);
  for (let i = 0; i < n; i++) rows[i] = random.int(available);
  return rows;
}
function average(values) {
  let s = 0;
  for (const v of values) s += v;
  return s / values.length;
}

// src/core/metrics/roc-auc.ts
function rocAuc(y, score2) {
  checkPaired("rocAuc", y, score2, "binary");
  const n = y.length;
  let positives = 0;
  for (let i = 0; i < n; i++) {
    if (Number.isNaN(score2[i])) return NaN;
    positives += y[i];
  }
  const negatives = n - positives;
  if (positives === 0 || negatives === 0) return NaN;
  const pos = new Float64Array(positives);
  const neg = new Float64Array(negatives);
  for (let i = 0, p = 0, q = 0; i < n; i++) {
    if (y[i] === 1) pos[p++] = score2[i];
    else neg[q++] = score2[i];
  }
  pos.sort();
  neg.sort();
  let pairs = 0;
  let below = 0;
  for (let i = 0; i < positives; ) {
    const value = pos[i];
    let runEnd = i + 1;
    while (runEnd < positives && pos[runEnd] === value) runEnd++;
    while (below < negatives && neg[below] < value) below++;
    let tied = below;
    while (tied < negatives && neg[tied] === value) tied++;
    pairs += (runEnd - i) * (below + (tied - below) / 2);
    i = runEnd;
  }
  return pairs / (positives * negatives);
}

// src/core/metrics/macro-ovr-auc.ts
function macroOvrAuc(y, probabilities) {
  const aucs = oneVsRestAucs(y, probabilities);
  if (aucs.length === 0) return NaN;
  let sum2 = 0;
  for (const a of aucs) sum2 += a;
  return sum2 / aucs.length;
}
function oneVsRestAucs(y, probabilities) {
  const k = checkClassMatrix("macroOvrAuc", y, probabilities);
  const n = y.length;
  const aucs = [];
  const isClass = new Float64Array(n);
  const column = new Float64Array(n);
  for (let c = 0; c < k; c++) {
    for (let i = 0; i < n; i++) {
      isClass[i] = y[i] === c ? 1 : 0;
      column[i] = probabilities[i * k + c];
    }
    aucs.push(rocAuc(isClass, column));
  }
  return aucs;
}

// src/core/metrics/r-squared.ts
function rSquared(y, prediction) {
  checkPaired("rSquared", y, prediction, "any");
  const n = y.length;
  let mean2 = 0;
  let isConstant = true;
  for (let i = 0; i < n; i++) {
    mean2 += y[i];
    if (y[i] !== y[0]) isConstant = false;
  }
  if (isConstant) return NaN;
  mean2 /= n;
  let residual = 0;
  let total = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - prediction[i];
    const t = y[i] - mean2;
    residual += r * r;
    total += t * t;
  }
  return 1 - residual / total;
}

// src/core/models/prediction-rows.ts
function predictionRows(predictions, rows, width) {
  const out = new Float64Array(rows.length * width);
  for (let r = 0; r < rows.length; r++) {
    const from = rows[r] * width;
    for (let c = 0; c < width; c++) out[r * width + c] = predictions[from + c];
  }
  return out;
}

// src/core/measure-side.ts
async function measureRefit(model, inputs, options, rows, refit) {
  const { holdout, train: train3 } = inputs;
  const target = holdout.target;
  if (!target) throw new RangeError("measureSide needs a holdout with a target");
  const predictions = await model.predict(selectFeatures(holdout, model.featureNames));
  const score2 = options.metric.compute(target.values, predictions);
  const separation = options.task === "binary" ? rocAuc(target.values, predictions) : options.task === "multiclass" ? macroOvrAuc(target.values, predictions) : rSquared(target.values, predictions);
  const result = await permutationImportance(model, rows.evaluation, {
    metric: options.metric,
    draws: options.draws,
    seed: deriveSeed(options.seed, "draws", refit),
    reference: rows.reference,
    groups: options.groups
  });
  const featureOrder = train3.features.map((f) => f.name);
  const slices = [];
  for (const slice of rows.slices) {
    const slicePrediction = predictionRows(predictions, slice.rows, predictionWidth(model));
    const sliced = await permutationImportance(model, slice.data, {
      metric: options.metric,
      draws: options.draws,
      seed: deriveSeed(options.seed, "slice-draws", slice.name, refit),
      reference: rows.reference,
      groups: options.groups
    });
    slices.push({
      score: options.metric.compute(slice.data.target.values, slicePrediction),
      importances: canonicalOrder(sliced.importances, featureOrder, options.groups, options.draws)
    });
  }
  let sensitivity;
  if (options.sensitivity) {
    const { threshold, argmax } = options.sensitivity;
    const settings = { draws: options.draws, seed: deriveSeed(options.seed, "sensitivity"), reference: rows.reference, groups: options.groups, threshold, argmax };
    const countsFlips = threshold !== void 0 || argmax === true;
    const order = (units) => canonicalSensitivity(units, featureOrder, options.groups, options.draws, countsFlips);
    sensitivity = {
      holdout: order(await predictionSensitivity(model, rows.evaluation, settings)),
      ...rows.unlabeled ? { unlabeled: order(await predictionSensitivity(model, rows.unlabeled, settings)) } : {}
    };
  }
  return {
    score: score2,
    separation,
    importances: canonicalOrder(result.importances, featureOrder, options.groups, options.draws),
    predictions,
    model: { kind: model.kind, featureNames: model.featureNames, engine: model.engine ?? "onnxruntime" },
    slices,
    ...model.splitStatistics ? { splitStatistics: model.splitStatistics.map((x) => ({ feature: x.feature, gain: x.gain, splits: x.splits })) } : {},
    ...sensitivity ? { sensitivity } : {}
  };
}
function canonicalSensitivity(estimates, featureOrder, groups, draws, countsFlips) {
  const byKey = new Map(estimates.map((e) => [`${e.isGroup ? "g" : "f"}:${e.name}`, e]));
  const zeros = new Array(draws).fill(0);
  const zero = (name, members, isGroup) => ({
    name,
    members,
    isGroup,
    draws: zeros,
    mean: 0,
    ...countsFlips ? { flipDraws: zeros, flipShare: 0 } : {}
  });
  const present = new Set(featureOrder);
  return [
    ...featureOrder.map((name) => byKey.get(`f:${name}`) ?? zero(name, [name], false)),
    ...groups.filter((g2) => g2.members.every((m) => present.has(m))).map((g2) => byKey.get(`g:${g2.name}`) ?? zero(g2.name, g2.members, true))
  ];
}
function canonicalOrder(estimates, featureOrder, groups, draws) {
  const byKey = new Map(estimates.map((e) => [`${e.isGroup ? "g" : "f"}:${e.name}`, e]));
  const zero = (name, members, isGroup) => ({
    name,
    members,
    isGroup,
    draws: new Array(draws).fill(0),
    mean: 0,
    sd: draws > 1 ? 0 : NaN,
    lower: draws > 1 ? 0 : NaN,
    upper: draws > 1 ? 0 : NaN,
    rowSe: 0
  });
  const present = new Set(featureOrder);
  return [
    ...featureOrder.map((name) => byKey.get(`f:${name}`) ?? zero(name, [name], false)),
    ...groups.filter((g2) => g2.members.every((m) => present.has(m))).map((g2) => byKey.get(`g:${g2.name}`) ?? zero(g2.name, g2.members, true))
  ];
}

// src/core/models/gbt/sort-float64.ts
var RADIX_FROM = 1024;
var LITTLE_ENDIAN = new Uint8Array(Uint32Array.of(1).buffer)[0] === 1;
function sortFloat64(values) {
  const n = values.length;
  if (n < RADIX_FROM || !LITTLE_ENDIAN) return values.sort();
  const bits = new Uint32Array(values.buffer, values.byteOffset, n * 2);
  let hi = new Uint32Array(n);
  let lo = new Uint32Array(n);
  for (let i = 0; i < n; i++) {
    const sign = bits[2 * i + 1] >> 31;
    hi[i] = bits[2 * i + 1] ^ (sign | 2147483648);
    lo[i] = bits[2 * i] ^ sign;
  }
  let nextHi = new Uint32Array(n);
  let nextLo = new Uint32Array(n);
  const counts = new Int32Array(2048);
  for (let pass = 0; pass < 6; pass++) {
    const word = pass < 3 ? lo : hi;
    const shift = pass % 3 * 11;
    const mask = pass % 3 === 2 ? 1023 : 2047;
    counts.fill(0);
    for (let i = 0; i < n; i++) counts[word[i] >>> shift & mask]++;
    if (counts[word[0] >>> shift & mask] === n) continue;
    let sum2 = 0;
    for (let d = 0; d <= mask; d++) {
      const c = counts[d];
      counts[d] = sum2;
      sum2 += c;
    }
    for (let i = 0; i < n; i++) {
      const at = counts[word[i] >>> shift & mask]++;
      nextHi[at] = hi[i];
      nextLo[at] = lo[i];
    }
    ;
    [hi, nextHi] = [nextHi, hi];
    [lo, nextLo] = [nextLo, lo];
  }
  for (let i = 0; i < n; i++) {
    const flip = ~(hi[i] >> 31);
    bits[2 * i + 1] = hi[i] ^ (flip | 2147483648);
    bits[2 * i] = lo[i] ^ flip;
  }
  return values;
}

// src/core/models/gbt/bin-features.ts
var MISSING_BIN = 255;
function binFeatures(matrix, options = {}) {
  const maxBins = options.maxBins ?? 255;
  if (!Number.isInteger(maxBins) || maxBins < 2 || maxBins > 255) {
    throw new RangeError(`binFeatures needs maxBins to be a whole number from 2 to 255, got ${maxBins}`);
  }
  if (matrix.columns.length !== matrix.features.length) {
    throw new RangeError(
      `binFeatures needs one column per feature, got ${matrix.columns.length} columns for ${matrix.features.length} features`
    );
  }
  const n = matrix.rows;
  const width = matrix.columns.length;
  const block = new Uint8Array(options.shared ? new SharedArrayBuffer(n * width) : new ArrayBuffer(n * width));
  const codes = [];
  const upperEdges = [];
  const binCounts = new Int32Array(matrix.columns.length);
  for (let j = 0; j < matrix.columns.length; j++) {
    const column = matrix.columns[j];
    if (column.length !== n) {
      throw new RangeError(`binFeatures: column '${matrix.features[j].name}' has ${column.length} values, expected ${n}`);
    }
    const edges = quantileEdges(column, maxBins);
    upperEdges.push(edges);
    binCounts[j] = edges.length;
    const out = block.subarray(j * n, (j + 1) * n);
    assignBins(column, edges, out);
    codes.push(out);
  }
  return { rows: n, features: matrix.features, codes, matrix: block, binCounts, upperEdges };
}
function quantileEdges(column, maxBins) {
  let present = 0;
  for (let i = 0; i < column.length; i++) if (column[i] === column[i]) present++;
  const sorted = new Float64Array(present);
  let k = 0;
  for (let i = 0; i < column.length; i++) if (column[i] === column[i]) sorted[k++] = column[i];
  sortFloat64(sorted);
  const values = new Float64Array(present);
  const counts = new Int32Array(present);
  let distinct = 0;
  for (let i = 0; i < present; i++) {
    if (distinct > 0 && sorted[i] === values[distinct - 1]) counts[distinct - 1]++;
    else {
      values[distinct] = sorted[i];
      counts[distinct] = 1;
      distinct++;
    }
  }
  const edges = [];
  let rowsLeft = present;
  let binsLeft = maxBins;
  let inBin = 0;
  for (let d = 0; d < distinct; d++) {
    inBin += counts[d];
    const isLast = d === distinct - 1;
    const closes = isLast || distinct <= maxBins || inBin * binsLeft >= rowsLeft;
    if (!closes) continue;
    edges.push(isLast ? values[d] : edgeBetween(values[d], values[d + 1]));
    rowsLeft -= inBin;
    binsLeft--;
    inBin = 0;
  }
  return Float64Array.from(edges);
}
function edgeBetween(below, above) {
  const mid = below + (above - below) / 2;
  return mid < above ? mid : below;
}
function assignBins(column, edges, out) {
  const padded = new Float64Array(256).fill(Infinity);
  padded.set(edges);
  const last = Math.max(0, edges.length - 1);
  for (let i = 0; i < column.length; i++) {
    const v = column[i];
    if (v !== v) {
      out[i] = MISSING_BIN;
      continue;
    }
    let b = padded[127] < v ? 128 : 0;
    b += padded[b + 63] < v ? 64 : 0;
    b += padded[b + 31] < v ? 32 : 0;
    b += padded[b + 15] < v ? 16 : 0;
    b += padded[b + 7] < v ? 8 : 0;
    b += padded[b + 3] < v ? 4 : 0;
    b += padded[b + 1] < v ? 2 : 0;
    b += padded[b] < v ? 1 : 0;
    out[i] = b < last ? b : last;
  }
}

// src/core/models/gbt/replacement-predictor.ts
var BLOCK_ROWS = 128;
function createTreeReplacementPredictor(ensemble, base) {
  const trees = ensemble.trees.map(compileTree);
  const position = new Map(base.features.map((f, j) => [f.name, j]));
  const names = ensemble.featureNames;
  const F = names.length;
  const n = base.rows;
  const round = ensemble.float32Inputs === true;
  const x = new Float64Array(n * F);
  names.forEach((name, f) => {
    const j = position.get(name);
    if (j === void 0) throw new RangeError(`createTreeReplacementPredictor: the matrix has no feature named '${name}'`);
    const column = base.columns[j];
    for (let i = 0, at = f; i < n; i++, at += F) x[at] = round ? Math.fround(column[i]) : column[i];
  });
  const raw = new Float64Array(n).fill(ensemble.baseScore);
  for (const tree of trees) addTree(tree, x, F, n, raw);
  const isLogistic = ensemble.link === "logistic";
  const byName = new Map(names.map((name, f) => [name, f]));
  const maxDepth = Math.max(1, ...trees.map(treeDepth));
  const predictMany = (units, draws) => {
    if (!Number.isInteger(draws) || draws < 1) throw new RangeError(`ReplacementPredictor.predict needs draws >= 1, got ${draws}`);
    const singleOf = new Int32Array(F).fill(-1);
    const groups = [];
    const singleValues = new Array(F);
    const outputs = units.map(() => {
      const out = new Float64Array(n * draws);
      for (let k = 0; k < draws; k++) out.set(raw, k * n);
      return out;
    });
    units.forEach((replaced, u) => {
      const features = [];
      const values = [];
      for (const [name, column] of replaced) {
        const f = byName.get(name);
        if (f === void 0) continue;
        if (column.length !== n * draws) {
          throw new RangeError(`ReplacementPredictor.predict: '${name}' has ${column.length} values, expected ${n * draws}`);
        }
        features.push(f);
        values.push(round ? column.map(Math.fround) : column);
      }
      if (features.length === 1 && singleOf[features[0]] < 0) {
        singleOf[features[0]] = u;
        singleValues[features[0]] = values[0];
      } else if (features.length > 0) groups.push({ unit: u, features, values });
    });
    const groupSlot = groups.map(() => new Int32Array(F).fill(-1));
    groups.forEach((g2, q) => g2.features.forEach((f, r) => groupSlot[q][f] = r));
    const pathFeature = new Int32Array(maxDepth);
    const pathNode = new Int32Array(maxDepth);
    const seen = new Uint8Array(F);
    const kept = new Float64Array(F);
    for (let start = 0; start < n; start += BLOCK_ROWS) {
      const stop = Math.min(n, start + BLOCK_ROWS);
      for (const tree of trees) {
        const { feature, threshold, left, missingRight, value } = tree;
        for (let i = start; i < stop; i++) {
          const row = i * F;
          let node = 0;
          let f = feature[0];
          let found = 0;
          while (f >= 0) {
            if (seen[f] === 0) {
              seen[f] = 1;
              pathFeature[found] = f;
              pathNode[found++] = node;
            }
            const v = x[row + f];
            node = left[node] + (+(v > threshold[node]) | +(v !== v) & missingRight[node]);
            f = feature[node];
          }
          const own = value[node];
          for (let p = 0; p < found; p++) {
            const g2 = pathFeature[p];
            seen[g2] = 0;
            const u = singleOf[g2];
            if (u >= 0) walkOne(tree, pathNode[p], x, row, g2, singleValues[g2], i, n, draws, own, outputs[u]);
          }
          for (let q = 0; q < groups.length; q++) {
            const slot = groupSlot[q];
            let from = -1;
            for (let p = 0; p < found && from < 0; p++) if (slot[pathFeature[p]] >= 0) from = pathNode[p];
            if (from < 0) continue;
            const { features, values } = groups[q];
            for (let m = 0; m < features.length; m++) kept[m] = x[row + features[m]];
            walkReplaced(tree, from, x, row, features, values, i, n, draws, own, outputs[groups[q].unit]);
            for (let m = 0; m < features.length; m++) x[row + features[m]] = kept[m];
          }
        }
      }
    }
    if (isLogistic) for (const out of outputs) for (let i = 0; i < out.length; i++) out[i] = 1 / (1 + Math.exp(-out[i]));
    return outputs;
  };
  return {
    rows: n,
    predict: (replaced, draws) => predictMany([replaced], draws)[0],
    predictMany
  };
}
function walkReplaced(tree, from, x, row, features, values, i, n, draws, own, out) {
  const { feature, threshold, left, missingRight, value } = tree;
  const members = features.length;
  for (let k = 0, at = i; k < draws; k++, at += n) {
    for (let m = 0; m < members; m++) x[row + features[m]] = values[m][at];
    let node = from;
    let f = feature[node];
    while (f >= 0) {
      const v = x[row + f];
      node = left[node] + (+(v > threshold[node]) | +(v !== v) & missingRight[node]);
      f = feature[node];
    }
    out[at] += value[node] - own;
  }
}
function walkOne(tree, from, x, row, target, values, i, n, draws, own, out) {
  const { feature, threshold, left, missingRight, value } = tree;
  for (let k = 0, at = i; k < draws; k++, at += n) {
    const replaced = values[at];
    let node = from;
    let f = feature[node];
    while (f >= 0) {
      const v = f === target ? replaced : x[row + f];
      node = left[node] + (+(v > threshold[node]) | +(v !== v) & missingRight[node]);
      f = feature[node];
    }
    out[at] += value[node] - own;
  }
}
function addTree(tree, x, F, n, score2) {
  const { feature, threshold, left, missingRight, value } = tree;
  for (let i = 0, row = 0; i < n; i++, row += F) {
    let node = 0;
    let f = feature[0];
    while (f >= 0) {
      const v = x[row + f];
      node = left[node] + (+(v > threshold[node]) | +(v !== v) & missingRight[node]);
      f = feature[node];
    }
    score2[i] += value[node];
  }
}
function compileTree(tree) {
  const m = tree.feature.length;
  const feature = new Int32Array(m);
  const threshold = new Float64Array(m);
  const left = new Int32Array(m);
  const missingRight = new Uint8Array(m);
  const value = new Float64Array(m);
  const queue = new Int32Array(m);
  queue[0] = 0;
  let head = 0;
  let tail = 1;
  while (head < tail) {
    const at = head;
    const old = queue[head++];
    feature[at] = tree.feature[old];
    if (tree.feature[old] < 0) {
      value[at] = tree.value[old];
      continue;
    }
    threshold[at] = tree.threshold[old];
    missingRight[at] = tree.missingGoesLeft[old] === 1 ? 0 : 1;
    if (tail + 2 > m) throw new RangeError("createTreeReplacementPredictor: a tree reaches more nodes than it has (a cycle)");
    left[at] = tail;
    queue[tail++] = tree.left[old];
    queue[tail++] = tree.right[old];
  }
  return { feature: feature.subarray(0, tail), threshold, left, missingRight, value };
}
function treeDepth(tree) {
  const depth = new Int32Array(tree.feature.length);
  let most = 0;
  for (let node = 0; node < tree.feature.length; node++) {
    if (tree.feature[node] < 0) continue;
    const d = depth[node] + 1;
    most = Math.max(most, d);
    depth[tree.left[node]] = d;
    depth[tree.left[node] + 1] = d;
  }
  return most;
}

// src/core/models/gbt/class-ensembles-predictor.ts
function createClassEnsemblesPredictor(model, base) {
  const predictors = model.classes.map((ensemble) => createTreeReplacementPredictor(ensemble, base));
  if (predictors.some((p) => p === void 0)) return void 0;
  const perClass = predictors;
  const rows = base.rows;
  const combine = (scores) => combineClassScores(scores, model.link);
  return {
    rows,
    predict: (replaced, draws) => combine(perClass.map((p) => p.predict(replaced, draws))),
    predictMany: (units, draws) => {
      const byClass = perClass.map((p) => p.predictMany ? p.predictMany(units, draws) : units.map((u) => p.predict(u, draws)));
      return units.map((_, u) => combine(byClass.map((outputs) => outputs[u])));
    }
  };
}
function combineClassScores(scores, link) {
  const k = scores.length;
  const n = k === 0 ? 0 : scores[0].length;
  const out = new Float64Array(n * k);
  for (let i = 0; i < n; i++) {
    if (link === "none") {
      for (let c = 0; c < k; c++) out[i * k + c] = scores[c][i];
      continue;
    }
    let max = -Infinity;
    for (let c = 0; c < k; c++) max = Math.max(max, scores[c][i]);
    let total = 0;
    for (let c = 0; c < k; c++) {
      const e = Math.exp(scores[c][i] - max);
      out[i * k + c] = e;
      total += e;
    }
    for (let c = 0; c < k; c++) out[i * k + c] /= total;
  }
  return out;
}

// src/core/models/gbt/boosted-model.ts
var BoostedModel = class {
  constructor(ensemble, splitStatistics) {
    this.ensemble = ensemble;
    this.splitStatistics = splitStatistics;
    this.task = ensemble.task;
    this.featureNames = ensemble.featureNames;
    if (ensemble.classCount !== void 0) this.classCount = ensemble.classCount;
  }
  ensemble;
  splitStatistics;
  kind = "boosted-trees";
  engine = "plumbline-trees";
  task;
  featureNames;
  /** Multiclass only: K; predict returns row-major [N, K] softmax probabilities. */
  classCount;
  /**
   * Predictions over raw values ("raw" as opposed to bins): the regression value, or for a binary
   * task the positive-class probability. Features are found by name in `matrix`, in any order; extra
   * columns are ignored. Throws RangeError naming a feature the matrix lacks. Cost O(rows x trees x depth).
   */
  /** Permutation importance's fast path: see createTreeReplacementPredictor. */
  createReplacementPredictor(base) {
    if (this.task === "multiclass") {
      const k = this.ensemble.classCount;
      const classes = Array.from({ length: k }, (_, c) => ({
        featureNames: this.featureNames,
        baseScore: this.ensemble.baseScore,
        trees: this.ensemble.trees.filter((_2, t) => t % k === c),
        link: "identity"
      }));
      return createClassEnsemblesPredictor({ classes, link: "softmax" }, base);
    }
    return createTreeReplacementPredictor({ ...this.ensemble, link: this.task === "binary" ? "logistic" : "identity" }, base);
  }
  predictRaw(matrix) {
    const position = new Map(matrix.features.map((f, j) => [f.name, j]));
    const columns = this.featureNames.map((name) => {
      const j = position.get(name);
      if (j === void 0) {
        throw new RangeError(`BoostedModel.predictRaw: the matrix has no feature named '${name}'`);
      }
      return matrix.columns[j];
    });
    const n = matrix.rows;
    if (this.task === "multiclass") return this.predictClasses(columns, n);
    const score2 = new Float64Array(n).fill(this.ensemble.baseScore);
    for (const tree of this.ensemble.trees) addTree2(tree, columns, n, score2);
    if (this.task === "binary") {
      for (let i = 0; i < n; i++) score2[i] = 1 / (1 + Math.exp(-score2[i]));
    }
    return score2;
  }
  async predict(matrix) {
    return this.predictRaw(matrix);
  }
  /** Multiclass: each class's raw score from its trees (round-major order), then the softmax of each row; row-major [N, K]. */
  predictClasses(columns, n) {
    const k = this.ensemble.classCount;
    const margins = Array.from({ length: k }, () => new Float64Array(n).fill(this.ensemble.baseScore));
    this.ensemble.trees.forEach((tree, t) => addTree2(tree, columns, n, margins[t % k]));
    return combineClassScores(margins, "softmax");
  }
};
function addTree2(tree, columns, n, score2) {
  const { feature, threshold, left, right, missingGoesLeft, value } = tree;
  for (let i = 0; i < n; i++) {
    let node = 0;
    let f = feature[0];
    while (f >= 0) {
      const v = columns[f][i];
      const goLeft = v !== v ? missingGoesLeft[node] === 1 : v <= threshold[node];
      node = goLeft ? left[node] : right[node];
      f = feature[node];
    }
    score2[i] += value[node];
  }
}

// src/core/models/resolve-training-subset.ts
function resolveTrainingSubset(caller, shape, target, task, options) {
  if (task !== "regression" && task !== "binary" && task !== "multiclass") throw new RangeError(`${caller}: unknown task '${String(task)}'`);
  if (target.length !== shape.rows) {
    throw new RangeError(`${caller} needs one target per row, got ${target.length} targets for ${shape.rows} rows`);
  }
  const { rows, features } = options;
  let positions;
  if (rows === void 0) positions = Int32Array.from({ length: shape.rows }, (_, i) => i);
  else {
    positions = new Int32Array(rows.length);
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i];
      if (!Number.isInteger(r) || r < 0 || r >= shape.rows) {
        throw new RangeError(`${caller}: rows[${i}] is ${r}, not a row index from 0 to ${shape.rows - 1}`);
      }
      positions[i] = r;
    }
  }
  if (positions.length === 0) throw new RangeError(`${caller} needs at least one training row, got none`);
  for (const j of features ?? []) {
    if (!Number.isInteger(j) || j < 0 || j >= shape.features) {
      throw new RangeError(`${caller}: features contains ${j}, not a column index from 0 to ${shape.features - 1}`);
    }
  }
  const used = features === void 0 ? Array.from({ length: shape.features }, (_, j) => j) : [...new Set(features)].sort((a, b) => a - b);
  const y = new Float64Array(positions.length);
  for (let p = 0; p < positions.length; p++) {
    const value = target[positions[p]];
    if (!Number.isFinite(value) || task === "binary" && value !== 0 && value !== 1 || task === "multiclass" && !(Number.isInteger(value) && value >= 0)) {
      const rule = task === "binary" ? "binary targets must be 0 or 1" : task === "multiclass" ? "multiclass targets must be class indices 0, 1, 2, ..." : "regression targets must be finite";
      throw new RangeError(`${caller}: target of row ${positions[p]} is ${value}; ${rule}`);
    }
    y[p] = value;
  }
  return { positions, features: used, y };
}

// src/core/models/gbt/fit-boosted.ts
var MIN_HESSIAN_PER_LEAF = 1;
function fitBoosted(binned, target, options) {
  const { task, settings } = options;
  checkSettings(settings);
  const { positions, features: allowed, y } = resolveTrainingSubset(
    "fitBoosted",
    { rows: binned.rows, features: binned.features.length },
    target,
    task,
    options
  );
  const used = leaveOut(allowed, options.excludeFeatures, binned.features.length);
  const n = positions.length;
  const featureCount = used.length;
  const rowCodes = gatherRowMajor(binned.codes, used, positions);
  const columnCodes = gatherColumns(binned.codes, used, positions);
  const binCounts = Int32Array.from(used, (j) => binned.binCounts[j]);
  const classCount = task === "multiclass" ? checkClassCount(options.classCount, y) : 1;
  let targetSum = 0;
  for (let p = 0; p < n; p++) targetSum += y[p];
  const baseScore = task === "multiclass" ? 0 : task === "regression" ? targetSum / n : logOdds(targetSum / n);
  const sampleSize = Math.max(1, Math.round(settings.rowSubsample * n));
  const treeFeatureCount = Math.min(featureCount, Math.max(1, Math.round(settings.columnSubsample * featureCount)));
  const grower = new TreeGrower(rowCodes, columnCodes, binCounts, n, settings, task === "regression");
  const scores = Array.from({ length: classCount }, () => new Float64Array(n).fill(baseScore));
  const score2 = scores[0];
  const classGradients = classCount > 1 ? scores.map(() => new Float64Array(n)) : [];
  const classHessians = classCount > 1 ? scores.map(() => new Float64Array(n)) : [];
  const random = createRandom(options.seed);
  const allFeatures = Int32Array.from({ length: featureCount }, (_, k) => k);
  const gainByFeature = new Float64Array(featureCount);
  const splitsByFeature = new Int32Array(featureCount);
  const trees = [];
  const upperEdges = used.map((j) => binned.upperEdges[j]);
  for (let t = 0; t < settings.trees; t++) {
    if (classCount > 1) {
      computeSoftmaxGradients(y, scores, classGradients, classHessians);
      for (let k = 0; k < classCount; k++) {
        grower.gradient.set(classGradients[k]);
        grower.hessian.set(classHessians[k]);
        const rowCount2 = sampleSorted(n, sampleSize, random, grower.order);
        const treeFeatures2 = treeFeatureCount === featureCount ? allFeatures : sampleFeatures(featureCount, treeFeatureCount, random);
        grower.grow(rowCount2, treeFeatures2, scores[k]);
        grower.addToScores(scores[k], rowCount2);
        grower.addSplitStatistics(gainByFeature, splitsByFeature);
        trees.push(grower.toTree(upperEdges));
      }
      continue;
    }
    computeGradients(task, y, score2, grower.gradient, grower.hessian);
    const rowCount = sampleSorted(n, sampleSize, random, grower.order);
    const treeFeatures = treeFeatureCount === featureCount ? allFeatures : sampleFeatures(featureCount, treeFeatureCount, random);
    grower.grow(rowCount, treeFeatures, score2);
    grower.addToScores(score2, rowCount);
    grower.addSplitStatistics(gainByFeature, splitsByFeature);
    trees.push(grower.toTree(upperEdges));
  }
  const featureNames = used.map((j) => binned.features[j].name);
  const splitStatistics = featureNames.map((feature, k) => ({
    feature,
    gain: gainByFeature[k],
    splits: splitsByFeature[k]
  }));
  return new BoostedModel({ task, featureNames, baseScore, trees, ...classCount > 1 ? { classCount } : {} }, splitStatistics);
}
function checkClassCount(classCount, y) {
  if (classCount === void 0 || !Number.isInteger(classCount) || classCount < 3) {
    throw new RangeError(`fitBoosted needs options.classCount >= 3 for a multiclass task, got ${classCount}`);
  }
  for (let p = 0; p < y.length; p++) {
    if (y[p] >= classCount) throw new RangeError(`fitBoosted: a target is class ${y[p]}, but options.classCount is ${classCount}`);
  }
  return classCount;
}
function computeSoftmaxGradients(y, scores, g2, h) {
  const k = scores.length;
  const n = y.length;
  const p = new Float64Array(k);
  for (let i = 0; i < n; i++) {
    let max = -Infinity;
    for (let c = 0; c < k; c++) max = Math.max(max, scores[c][i]);
    let total = 0;
    for (let c = 0; c < k; c++) {
      p[c] = Math.exp(scores[c][i] - max);
      total += p[c];
    }
    for (let c = 0; c < k; c++) {
      const q = p[c] / total;
      g2[c][i] = q - (y[i] === c ? 1 : 0);
      h[c][i] = Math.max(2 * q * (1 - q), 1e-16);
    }
  }
}
function leaveOut(allowed, excluded, width) {
  if (!excluded || excluded.length === 0) return allowed;
  for (const j of excluded) {
    if (!Number.isInteger(j) || j < 0 || j >= width) {
      throw new RangeError(`fitBoosted: excludeFeatures contains ${j}, not a column index from 0 to ${width - 1}`);
    }
  }
  const drop = new Set(excluded);
  const kept = allowed.filter((j) => !drop.has(j));
  if (kept.length === 0) throw new RangeError("fitBoosted: excludeFeatures leaves no feature to split on");
  return kept;
}
function checkSettings(s) {
  const wholeAtLeast = (name, min) => {
    if (!Number.isInteger(s[name]) || s[name] < min) {
      throw new RangeError(`fitBoosted needs settings.${name} to be a whole number >= ${min}, got ${s[name]}`);
    }
  };
  const fraction = (name) => {
    if (!(s[name] > 0 && s[name] <= 1)) throw new RangeError(`fitBoosted needs settings.${name} in (0, 1], got ${s[name]}`);
  };
  wholeAtLeast("trees", 0);
  wholeAtLeast("maxDepth", 0);
  wholeAtLeast("minRowsPerLeaf", 1);
  if (s.maxDepth > 16) throw new RangeError(`fitBoosted needs settings.maxDepth <= 16, got ${s.maxDepth}`);
  if (!(s.learningRate > 0) || !Number.isFinite(s.learningRate)) {
    throw new RangeError(`fitBoosted needs settings.learningRate > 0, got ${s.learningRate}`);
  }
  if (!(s.l2 >= 0) || !Number.isFinite(s.l2)) throw new RangeError(`fitBoosted needs settings.l2 >= 0, got ${s.l2}`);
  fraction("rowSubsample");
  fraction("columnSubsample");
}
function gatherRowMajor(codes, used, positions) {
  const width = used.length;
  const out = new Uint8Array(positions.length * width);
  for (let k = 0; k < width; k++) {
    const column = codes[used[k]];
    for (let p = 0, at = k; p < positions.length; p++, at += width) out[at] = column[positions[p]];
  }
  return out;
}
function gatherColumns(codes, used, positions) {
  return used.map((j) => {
    const column = codes[j];
    const out = new Uint8Array(positions.length);
    for (let p = 0; p < positions.length; p++) out[p] = column[positions[p]];
    return out;
  });
}
function logOdds(rate) {
  const r = Math.min(1 - 1e-6, Math.max(1e-6, rate));
  return Math.log(r / (1 - r));
}
function computeGradients(task, y, score2, g2, h) {
  const n = y.length;
  if (task === "regression") {
    for (let i = 0; i < n; i++) {
      g2[i] = score2[i] - y[i];
      h[i] = 1;
    }
    return;
  }
  for (let i = 0; i < n; i++) {
    const p = 1 / (1 + Math.exp(-score2[i]));
    g2[i] = p - y[i];
    h[i] = p * (1 - p);
  }
}
function sampleSorted(n, m, random, out) {
  if (m >= n) {
    for (let i = 0; i < n; i++) out[i] = i;
    return n;
  }
  let chosen = 0;
  for (let i = 0; i < n && chosen < m; i++) {
    if ((n - i) * random.next() < m - chosen) out[chosen++] = i;
  }
  return chosen;
}
function sampleFeatures(total, count, random) {
  const out = new Int32Array(count);
  sampleSorted(total, count, random, out);
  return out;
}
var SLOTS_PER_FEATURE = 256;
var TreeGrower = class {
  constructor(rowCodes, columnCodes, binCounts, n, settings, isUnitHessian) {
    this.rowCodes = rowCodes;
    this.columnCodes = columnCodes;
    this.binCounts = binCounts;
    this.settings = settings;
    this.isUnitHessian = isUnitHessian;
    this.gradient = new Float64Array(n);
    this.hessian = new Float64Array(n);
    this.order = new Int32Array(n);
    this.scratch = new Int32Array(n);
    this.scratchRights = new Int32Array(n);
    this.slot = isUnitHessian ? 2 : 3;
    this.featureStride = this.slot * SLOTS_PER_FEATURE;
    this.featureCount = columnCodes.length;
    this.treeBins = new Int32Array(this.featureCount);
    this.allRowCounts = new Float64Array(this.featureCount * SLOTS_PER_FEATURE);
    columnCodes.forEach((column, k) => {
      const base = k * SLOTS_PER_FEATURE;
      for (let p = 0; p < n; p++) this.allRowCounts[base + column[p]]++;
    });
    const m = 2 ** (settings.maxDepth + 1) - 1;
    this.feature = new Int32Array(m);
    this.splitBin = new Int32Array(m);
    this.missingLeft = new Uint8Array(m);
    this.left = new Int32Array(m);
    this.right = new Int32Array(m);
    this.value = new Float64Array(m);
    this.gain = new Float64Array(m);
    this.begin = new Int32Array(m);
    this.end = new Int32Array(m);
    this.sumGradient = new Float64Array(m);
    this.sumHessian = new Float64Array(m);
    this.histogramOf = new Int32Array(m);
  }
  rowCodes;
  columnCodes;
  binCounts;
  settings;
  isUnitHessian;
  gradient;
  hessian;
  /** Sampled row positions, grouped by node: node i's rows are order[begin[i]..end[i]). */
  order;
  scratch;
  scratchRights;
  /** Per bin code, 1 when the split being applied sends it left. */
  goesLeft = new Uint8Array(SLOTS_PER_FEATURE);
  /** The training scores of the fit, updated by the last level's leaves while a tree grows. */
  score = new Float64Array(0);
  /** The leaf values of the last level's two children: [right, left], indexed by goesLeft. */
  childValues = new Float64Array(2);
  nodeBeingSplit = 0;
  slot;
  featureStride;
  featureCount;
  // The current tree's features: tree feature t is fit-local feature treeFeatures[t].
  treeFeatures = new Int32Array(0);
  width = 0;
  /** Row counts per bin of every feature over all positions (the root's counts when a tree uses every row). */
  allRowCounts;
  treeBins;
  // The tree being grown, node-indexed in creation (breadth-first) order. feature is the tree feature t.
  nodeCount = 0;
  feature;
  splitBin;
  missingLeft;
  left;
  right;
  value;
  gain;
  begin;
  end;
  sumGradient;
  sumHessian;
  /** Histogram buffer of a node, -1 when it has none. */
  histogramOf;
  histograms = [];
  freeHistograms = [];
  // The best split found by findSplit.
  bestGain = 0;
  bestFeature = -1;
  bestBin = -1;
  bestMissingLeft = 0;
  bestLeftGradient = 0;
  bestLeftHessian = 0;
  bestLeftCount = 0;
  /**
   * Grows one tree on order[0..rowCount) with the given features (fit-local indices, ascending). The
   * leaves of the last level add their values to `score` as their parent is split; addToScores adds
   * the other leaves' values and those of rows left out of the sample.
   */
  grow(rowCount, treeFeatures, score2) {
    this.score = score2;
    this.useFeatures(treeFeatures);
    const { settings, gradient, hessian, order } = this;
    let g2 = 0;
    let h = 0;
    for (let i = 0; i < rowCount; i++) {
      g2 += gradient[order[i]];
      h += hessian[order[i]];
    }
    this.nodeCount = 1;
    this.begin[0] = 0;
    this.end[0] = rowCount;
    this.sumGradient[0] = g2;
    this.sumHessian[0] = h;
    this.histogramOf[0] = -1;
    if (settings.maxDepth > 0 && this.canSplit(0)) {
      this.histogramOf[0] = this.takeHistogram();
      this.buildHistogram(this.histograms[this.histogramOf[0]], 0);
    }
    let levelStart = 0;
    for (let depth = 0; depth <= settings.maxDepth; depth++) {
      const levelEnd = this.nodeCount;
      const childrenAreLeaves = depth + 1 >= settings.maxDepth;
      for (let node = levelStart; node < levelEnd; node++) {
        if (this.histogramOf[node] >= 0 && this.findSplit(node)) this.split(node, childrenAreLeaves);
        else this.makeLeaf(node);
        if (this.histogramOf[node] >= 0) {
          this.freeHistograms.push(this.histogramOf[node]);
          this.histogramOf[node] = -1;
        }
      }
      levelStart = levelEnd;
    }
  }
  /** Records this tree's features; the codes are read through treeFeatures, never copied per tree. */
  useFeatures(treeFeatures) {
    const width = treeFeatures.length;
    this.treeFeatures = treeFeatures;
    this.width = width;
    for (let t = 0; t < width; t++) this.treeBins[t] = this.binCounts[treeFeatures[t]];
  }
  canSplit(node) {
    return this.end[node] - this.begin[node] >= 2 * this.settings.minRowsPerLeaf && this.sumHessian[node] >= 2 * MIN_HESSIAN_PER_LEAF;
  }
  makeLeaf(node) {
    this.feature[node] = -1;
    this.value[node] = this.leafValue(this.sumGradient[node], this.sumHessian[node]);
  }
  leafValue(sumGradient, sumHessian) {
    return -sumGradient / (sumHessian + this.settings.l2) * this.settings.learningRate;
  }
  /**
   * The split of a node whose children are leaves, without the partition: each of its rows adds its
   * child's value (what makeLeaf will give it) to its score. Returns from + the number of rows that
   * go left, as partition would.
   */
  scoreLastLevel(from, to, column) {
    const { order, goesLeft, score: score2, childValues } = this;
    const leftGradient = this.bestLeftGradient;
    const leftHessian = this.bestLeftHessian;
    childValues[1] = this.leafValue(leftGradient, leftHessian);
    childValues[0] = this.leafValue(this.sumGradient[this.nodeBeingSplit] - leftGradient, this.sumHessian[this.nodeBeingSplit] - leftHessian);
    let lefts = 0;
    for (let i = from; i < to; i++) {
      const p = order[i];
      const left = goesLeft[column[p]];
      score2[p] += childValues[left];
      lefts += left;
    }
    return from + lefts;
  }
  takeHistogram() {
    const free = this.freeHistograms.pop();
    if (free !== void 0) return free;
    this.histograms.push(new Float64Array(this.featureCount * this.featureStride));
    return this.histograms.length - 1;
  }
  /** Best split of a node by gain; false when none has positive gain within the leaf constraints. */
  findSplit(node) {
    const hist = this.histograms[this.histogramOf[node]];
    const { l2, minRowsPerLeaf } = this.settings;
    const minHessian = MIN_HESSIAN_PER_LEAF;
    const slot = this.slot;
    const countAt = slot - 1;
    const G = this.sumGradient[node];
    const H = this.sumHessian[node];
    const C = this.end[node] - this.begin[node];
    const parentScore = G * G / (H + l2);
    let bestGain = 0;
    let bestFeature = -1;
    let bestBin = -1;
    let bestMissingLeft = 0;
    let bestLG = 0;
    let bestLH = 0;
    let bestLC = 0;
    for (let t = 0; t < this.width; t++) {
      const base = t * this.featureStride;
      const bins = this.treeBins[t];
      const missing = base + MISSING_BIN * slot;
      const mG = hist[missing];
      const mH = hist[missing + 1];
      const mC = hist[missing + countAt];
      const hasMissing = mC > 0;
      let lG = 0;
      let lH = 0;
      let lC = 0;
      for (let b = 0, s = base; b < bins; b++, s += slot) {
        lG += hist[s];
        lH += hist[s + 1];
        lC += hist[s + countAt];
        let rC = C - lC;
        if (lC >= minRowsPerLeaf && rC >= minRowsPerLeaf) {
          const rH = H - lH;
          if (lH >= minHessian && rH >= minHessian) {
            const rG = G - lG;
            const gain = 0.5 * (lG * lG / (lH + l2) + rG * rG / (rH + l2) - parentScore);
            if (gain > bestGain) {
              bestGain = gain;
              bestFeature = t;
              bestBin = b;
              bestMissingLeft = !hasMissing && lC > rC ? 1 : 0;
              bestLG = lG;
              bestLH = lH;
              bestLC = lC;
            }
          }
        }
        if (!hasMissing) continue;
        const aC = lC + mC;
        rC = C - aC;
        if (aC >= minRowsPerLeaf && rC >= minRowsPerLeaf) {
          const aH = lH + mH;
          const rH = H - aH;
          if (aH >= minHessian && rH >= minHessian) {
            const aG = lG + mG;
            const rG = G - aG;
            const gain = 0.5 * (aG * aG / (aH + l2) + rG * rG / (rH + l2) - parentScore);
            if (gain > bestGain) {
              bestGain = gain;
              bestFeature = t;
              bestBin = b;
              bestMissingLeft = 1;
              bestLG = aG;
              bestLH = aH;
              bestLC = aC;
            }
          }
        }
      }
    }
    if (bestFeature < 0) return false;
    this.bestGain = bestGain;
    this.bestFeature = bestFeature;
    this.bestBin = bestBin;
    this.bestMissingLeft = bestMissingLeft;
    this.bestLeftGradient = bestLG;
    this.bestLeftHessian = bestLH;
    this.bestLeftCount = bestLC;
    return true;
  }
  /** Applies the best split found for `node`: partitions its rows, creates children and their histograms. */
  split(node, childrenAreLeaves) {
    const t = this.bestFeature;
    this.nodeBeingSplit = node;
    this.feature[node] = t;
    this.splitBin[node] = this.bestBin;
    this.missingLeft[node] = this.bestMissingLeft;
    this.gain[node] = this.bestGain;
    const from = this.begin[node];
    const to = this.end[node];
    const goesLeft = this.goesLeft;
    goesLeft.fill(1, 0, this.bestBin + 1);
    goesLeft.fill(0, this.bestBin + 1, MISSING_BIN);
    goesLeft[MISSING_BIN] = this.bestMissingLeft;
    const column = this.columnCodes[this.treeFeatures[t]];
    const middle = childrenAreLeaves ? this.scoreLastLevel(from, to, column) : partition(this.order, this.scratch, this.scratchRights, from, to, column, goesLeft);
    if (middle - from !== this.bestLeftCount) {
      throw new InternalError("fitBoosted: the partition disagrees with the histogram");
    }
    const l = this.nodeCount;
    const r = l + 1;
    this.nodeCount += 2;
    this.left[node] = l;
    this.right[node] = r;
    this.begin[l] = from;
    this.end[l] = middle;
    this.begin[r] = middle;
    this.end[r] = to;
    this.sumGradient[l] = this.bestLeftGradient;
    this.sumHessian[l] = this.bestLeftHessian;
    this.sumGradient[r] = this.sumGradient[node] - this.bestLeftGradient;
    this.sumHessian[r] = this.sumHessian[node] - this.bestLeftHessian;
    this.histogramOf[l] = -1;
    this.histogramOf[r] = -1;
    if (childrenAreLeaves) {
      this.end[l] = from;
      this.begin[r] = to;
      return;
    }
    const leftNeeds = this.canSplit(l);
    const rightNeeds = this.canSplit(r);
    if (!leftNeeds && !rightNeeds) return;
    const leftIsSmaller = middle - from <= to - middle;
    const small = leftIsSmaller ? l : r;
    const large = leftIsSmaller ? r : l;
    const smallHist = this.takeHistogram();
    this.buildHistogram(this.histograms[smallHist], small);
    if (leftIsSmaller ? rightNeeds : leftNeeds) {
      const parentHist = this.histogramOf[node];
      this.subtractHistogram(this.histograms[parentHist], this.histograms[smallHist]);
      this.histogramOf[large] = parentHist;
      this.histogramOf[node] = -1;
    }
    if (leftIsSmaller ? leftNeeds : rightNeeds) this.histogramOf[small] = smallHist;
    else this.freeHistograms.push(smallHist);
  }
  /**
   * A node's histogram. The root of a tree grown on every row reads the codes column by column in
   * row order, four columns a pass (sequential, four features' histograms hot in cache at a time),
   * and copies the fixed row counts; every other node walks its rows once and adds each to every
   * feature (row-major codes).
   */
  buildHistogram(hist, node) {
    hist.fill(0, 0, this.width * this.featureStride);
    const from = this.begin[node];
    const to = this.end[node];
    const { rowCodes, featureCount, treeFeatures, width, order, gradient, hessian } = this;
    if (from === 0 && to === order.length) {
      this.buildFullHistogram(hist);
      return;
    }
    if (this.isUnitHessian) {
      if (width === featureCount) accumulateUnitHessian(hist, rowCodes, width, order, from, to, gradient);
      else accumulateUnitHessianSubset(hist, rowCodes, featureCount, treeFeatures, width, order, from, to, gradient);
    } else if (width === featureCount) accumulate(hist, rowCodes, width, order, from, to, gradient, hessian);
    else accumulateSubset(hist, rowCodes, featureCount, treeFeatures, width, order, from, to, gradient, hessian);
  }
  /** The histogram of every row: order is 0..n-1, so columns are read in order. */
  buildFullHistogram(hist) {
    const { slot, featureStride, treeFeatures, width, columnCodes, gradient, hessian, allRowCounts } = this;
    const countAt = slot - 1;
    let t = 0;
    for (; t + 3 < width; t += 4) {
      const c0 = columnCodes[treeFeatures[t]];
      const c1 = columnCodes[treeFeatures[t + 1]];
      const c2 = columnCodes[treeFeatures[t + 2]];
      const c3 = columnCodes[treeFeatures[t + 3]];
      const base = t * featureStride;
      if (this.isUnitHessian) accumulateFourColumnsUnitHessian(hist, base, featureStride, c0, c1, c2, c3, gradient);
      else accumulateFourColumns(hist, base, featureStride, c0, c1, c2, c3, gradient, hessian);
    }
    for (; t < width; t++) {
      const base = t * featureStride;
      if (this.isUnitHessian) accumulateColumnUnitHessian(hist, base, columnCodes[treeFeatures[t]], gradient);
      else accumulateColumn(hist, base, columnCodes[treeFeatures[t]], gradient, hessian);
    }
    for (let t2 = 0; t2 < width; t2++) {
      const base = t2 * featureStride;
      const counts = treeFeatures[t2] * SLOTS_PER_FEATURE;
      const bins = this.treeBins[t2];
      for (let b = 0; b < bins; b++) hist[base + b * slot + countAt] = allRowCounts[counts + b];
      hist[base + MISSING_BIN * slot + countAt] = allRowCounts[counts + MISSING_BIN];
    }
  }
  subtractHistogram(into, minus) {
    const slot = this.slot;
    for (let t = 0; t < this.width; t++) {
      const base = t * this.featureStride;
      const stop = base + this.treeBins[t] * slot;
      for (let s = base; s < stop; s++) into[s] -= minus[s];
      const missing = base + MISSING_BIN * slot;
      for (let s = missing; s < missing + slot; s++) into[s] -= minus[s];
    }
  }
  /** Adds this tree's leaf values to the training scores of every position (sampled or not). */
  addToScores(score2, rowCount) {
    const { order, feature, value, begin, end } = this;
    for (let node = 0; node < this.nodeCount; node++) {
      if (feature[node] >= 0) continue;
      const v = value[node];
      for (let i = begin[node]; i < end[node]; i++) score2[order[i]] += v;
    }
    if (rowCount === score2.length) return;
    const sampled = new Uint8Array(score2.length);
    for (let i = 0; i < rowCount; i++) sampled[order[i]] = 1;
    const { rowCodes, featureCount, treeFeatures, splitBin, missingLeft, left, right } = this;
    for (let p = 0; p < score2.length; p++) {
      if (sampled[p] === 1) continue;
      let node = 0;
      while (feature[node] >= 0) {
        const code = rowCodes[p * featureCount + treeFeatures[feature[node]]];
        const goLeft = code === MISSING_BIN ? missingLeft[node] === 1 : code <= splitBin[node];
        node = goLeft ? left[node] : right[node];
      }
      score2[p] += value[node];
    }
  }
  addSplitStatistics(gainByFeature, splitsByFeature) {
    for (let node = 0; node < this.nodeCount; node++) {
      const t = this.feature[node];
      if (t < 0) continue;
      gainByFeature[this.treeFeatures[t]] += this.gain[node];
      splitsByFeature[this.treeFeatures[t]]++;
    }
  }
  /** The grown tree with raw thresholds; feature indices are the fit-local (model) indices. */
  toTree(upperEdges) {
    const m = this.nodeCount;
    const tree = {
      feature: new Int32Array(m).fill(-1),
      threshold: new Float64Array(m),
      left: new Int32Array(m).fill(-1),
      right: new Int32Array(m).fill(-1),
      missingGoesLeft: new Uint8Array(m),
      value: new Float64Array(m)
    };
    for (let node = 0; node < m; node++) {
      const t = this.feature[node];
      if (t < 0) {
        tree.value[node] = this.value[node];
        continue;
      }
      const k = this.treeFeatures[t];
      tree.feature[node] = k;
      tree.threshold[node] = upperEdges[k][this.splitBin[node]];
      tree.left[node] = this.left[node];
      tree.right[node] = this.right[node];
      tree.missingGoesLeft[node] = this.missingLeft[node];
    }
    return tree;
  }
};
function accumulate(hist, codes, width, order, from, to, gradient, hessian) {
  const stride = 3 * SLOTS_PER_FEATURE;
  let i = from;
  for (; i + 3 < to; i += 4) {
    const p0 = order[i];
    const p1 = order[i + 1];
    const p2 = order[i + 2];
    const p3 = order[i + 3];
    const g0 = gradient[p0];
    const g1 = gradient[p1];
    const g2 = gradient[p2];
    const g3 = gradient[p3];
    const h0 = hessian[p0];
    const h1 = hessian[p1];
    const h2 = hessian[p2];
    const h3 = hessian[p3];
    const r0 = p0 * width;
    const r1 = p1 * width;
    const r2 = p2 * width;
    const r3 = p3 * width;
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s0 = base + codes[r0 + t] * 3;
      hist[s0] += g0;
      hist[s0 + 1] += h0;
      hist[s0 + 2] += 1;
      const s1 = base + codes[r1 + t] * 3;
      hist[s1] += g1;
      hist[s1 + 1] += h1;
      hist[s1 + 2] += 1;
      const s2 = base + codes[r2 + t] * 3;
      hist[s2] += g2;
      hist[s2 + 1] += h2;
      hist[s2 + 2] += 1;
      const s3 = base + codes[r3 + t] * 3;
      hist[s3] += g3;
      hist[s3 + 1] += h3;
      hist[s3 + 2] += 1;
    }
  }
  for (; i < to; i++) {
    const p = order[i];
    const g2 = gradient[p];
    const h = hessian[p];
    const row = p * width;
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s = base + codes[row + t] * 3;
      hist[s] += g2;
      hist[s + 1] += h;
      hist[s + 2] += 1;
    }
  }
}
function accumulateUnitHessian(hist, codes, width, order, from, to, gradient) {
  const stride = 2 * SLOTS_PER_FEATURE;
  let i = from;
  for (; i + 7 < to; i += 8) {
    const p0 = order[i];
    const p1 = order[i + 1];
    const p2 = order[i + 2];
    const p3 = order[i + 3];
    const p4 = order[i + 4];
    const p5 = order[i + 5];
    const p6 = order[i + 6];
    const p7 = order[i + 7];
    const g0 = gradient[p0];
    const g1 = gradient[p1];
    const g2 = gradient[p2];
    const g3 = gradient[p3];
    const g4 = gradient[p4];
    const g5 = gradient[p5];
    const g6 = gradient[p6];
    const g7 = gradient[p7];
    const r0 = p0 * width;
    const r1 = p1 * width;
    const r2 = p2 * width;
    const r3 = p3 * width;
    const r4 = p4 * width;
    const r5 = p5 * width;
    const r6 = p6 * width;
    const r7 = p7 * width;
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s0 = base + codes[r0 + t] * 2;
      hist[s0] += g0;
      hist[s0 + 1] += 1;
      const s1 = base + codes[r1 + t] * 2;
      hist[s1] += g1;
      hist[s1 + 1] += 1;
      const s2 = base + codes[r2 + t] * 2;
      hist[s2] += g2;
      hist[s2 + 1] += 1;
      const s3 = base + codes[r3 + t] * 2;
      hist[s3] += g3;
      hist[s3 + 1] += 1;
      const s4 = base + codes[r4 + t] * 2;
      hist[s4] += g4;
      hist[s4 + 1] += 1;
      const s5 = base + codes[r5 + t] * 2;
      hist[s5] += g5;
      hist[s5 + 1] += 1;
      const s6 = base + codes[r6 + t] * 2;
      hist[s6] += g6;
      hist[s6 + 1] += 1;
      const s7 = base + codes[r7 + t] * 2;
      hist[s7] += g7;
      hist[s7 + 1] += 1;
    }
  }
  for (; i < to; i++) {
    const p = order[i];
    const g2 = gradient[p];
    const row = p * width;
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s = base + codes[row + t] * 2;
      hist[s] += g2;
      hist[s + 1] += 1;
    }
  }
}
function partition(order, lefts, rights, from, to, column, goesLeft) {
  let l = 0;
  let r = 0;
  for (let i = from; i < to; i++) {
    const p = order[i];
    const left = goesLeft[column[p]];
    lefts[l] = p;
    rights[r] = p;
    l += left;
    r += 1 - left;
  }
  order.set(lefts.subarray(0, l), from);
  order.set(rights.subarray(0, r), from + l);
  return from + l;
}
function accumulateSubset(hist, codes, featureCount, treeFeatures, width, order, from, to, gradient, hessian) {
  const stride = 3 * SLOTS_PER_FEATURE;
  let i = from;
  for (; i + 3 < to; i += 4) {
    const p0 = order[i];
    const p1 = order[i + 1];
    const p2 = order[i + 2];
    const p3 = order[i + 3];
    const g0 = gradient[p0];
    const g1 = gradient[p1];
    const g2 = gradient[p2];
    const g3 = gradient[p3];
    const h0 = hessian[p0];
    const h1 = hessian[p1];
    const h2 = hessian[p2];
    const h3 = hessian[p3];
    const r0 = p0 * featureCount;
    const r1 = p1 * featureCount;
    const r2 = p2 * featureCount;
    const r3 = p3 * featureCount;
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const k = treeFeatures[t];
      const s0 = base + codes[r0 + k] * 3;
      hist[s0] += g0;
      hist[s0 + 1] += h0;
      hist[s0 + 2] += 1;
      const s1 = base + codes[r1 + k] * 3;
      hist[s1] += g1;
      hist[s1 + 1] += h1;
      hist[s1 + 2] += 1;
      const s2 = base + codes[r2 + k] * 3;
      hist[s2] += g2;
      hist[s2 + 1] += h2;
      hist[s2 + 2] += 1;
      const s3 = base + codes[r3 + k] * 3;
      hist[s3] += g3;
      hist[s3 + 1] += h3;
      hist[s3 + 2] += 1;
    }
  }
  for (; i < to; i++) {
    const p = order[i];
    const g2 = gradient[p];
    const h = hessian[p];
    const row = p * featureCount;
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s = base + codes[row + treeFeatures[t]] * 3;
      hist[s] += g2;
      hist[s + 1] += h;
      hist[s + 2] += 1;
    }
  }
}
function accumulateUnitHessianSubset(hist, codes, featureCount, treeFeatures, width, order, from, to, gradient) {
  const stride = 2 * SLOTS_PER_FEATURE;
  let i = from;
  for (; i + 7 < to; i += 8) {
    const p0 = order[i];
    const p1 = order[i + 1];
    const p2 = order[i + 2];
    const p3 = order[i + 3];
    const p4 = order[i + 4];
    const p5 = order[i + 5];
    const p6 = order[i + 6];
    const p7 = order[i + 7];
    const g0 = gradient[p0];
    const g1 = gradient[p1];
    const g2 = gradient[p2];
    const g3 = gradient[p3];
    const g4 = gradient[p4];
    const g5 = gradient[p5];
    const g6 = gradient[p6];
    const g7 = gradient[p7];
    const r0 = p0 * featureCount;
    const r1 = p1 * featureCount;
    const r2 = p2 * featureCount;
    const r3 = p3 * featureCount;
    const r4 = p4 * featureCount;
    const r5 = p5 * featureCount;
    const r6 = p6 * featureCount;
    const r7 = p7 * featureCount;
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const k = treeFeatures[t];
      const s0 = base + codes[r0 + k] * 2;
      hist[s0] += g0;
      hist[s0 + 1] += 1;
      const s1 = base + codes[r1 + k] * 2;
      hist[s1] += g1;
      hist[s1 + 1] += 1;
      const s2 = base + codes[r2 + k] * 2;
      hist[s2] += g2;
      hist[s2 + 1] += 1;
      const s3 = base + codes[r3 + k] * 2;
      hist[s3] += g3;
      hist[s3 + 1] += 1;
      const s4 = base + codes[r4 + k] * 2;
      hist[s4] += g4;
      hist[s4 + 1] += 1;
      const s5 = base + codes[r5 + k] * 2;
      hist[s5] += g5;
      hist[s5 + 1] += 1;
      const s6 = base + codes[r6 + k] * 2;
      hist[s6] += g6;
      hist[s6 + 1] += 1;
      const s7 = base + codes[r7 + k] * 2;
      hist[s7] += g7;
      hist[s7 + 1] += 1;
    }
  }
  for (; i < to; i++) {
    const p = order[i];
    const g2 = gradient[p];
    const row = p * featureCount;
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s = base + codes[row + treeFeatures[t]] * 2;
      hist[s] += g2;
      hist[s + 1] += 1;
    }
  }
}
function accumulateFourColumns(hist, base, stride, c0, c1, c2, c3, gradient, hessian) {
  const b1 = base + stride;
  const b2 = b1 + stride;
  const b3 = b2 + stride;
  for (let p = 0; p < c0.length; p++) {
    const g2 = gradient[p];
    const h = hessian[p];
    const s0 = base + c0[p] * 3;
    hist[s0] += g2;
    hist[s0 + 1] += h;
    const s1 = b1 + c1[p] * 3;
    hist[s1] += g2;
    hist[s1 + 1] += h;
    const s2 = b2 + c2[p] * 3;
    hist[s2] += g2;
    hist[s2 + 1] += h;
    const s3 = b3 + c3[p] * 3;
    hist[s3] += g2;
    hist[s3 + 1] += h;
  }
}
function accumulateFourColumnsUnitHessian(hist, base, stride, c0, c1, c2, c3, gradient) {
  const b1 = base + stride;
  const b2 = b1 + stride;
  const b3 = b2 + stride;
  for (let p = 0; p < c0.length; p++) {
    const g2 = gradient[p];
    hist[base + c0[p] * 2] += g2;
    hist[b1 + c1[p] * 2] += g2;
    hist[b2 + c2[p] * 2] += g2;
    hist[b3 + c3[p] * 2] += g2;
  }
}
function accumulateColumn(hist, base, column, gradient, hessian) {
  for (let p = 0; p < column.length; p++) {
    const s = base + column[p] * 3;
    hist[s] += gradient[p];
    hist[s + 1] += hessian[p];
  }
}
function accumulateColumnUnitHessian(hist, base, column, gradient) {
  for (let p = 0; p < column.length; p++) hist[base + column[p] * 2] += gradient[p];
}

// src/core/models/linear/linear-model.ts
var LinearModel = class {
  constructor(state, convergence) {
    this.state = state;
    this.convergence = convergence;
    if (state.terms.length !== state.featureNames.length) {
      throw new RangeError(
        `LinearModel needs one term per feature, got ${state.terms.length} terms for ${state.featureNames.length} features`
      );
    }
    this.task = state.task;
    this.featureNames = state.featureNames;
  }
  state;
  convergence;
  kind = "linear";
  engine = "plumbline-linear";
  task;
  featureNames;
  /**
   * Predictions over raw values: the regression value, or for a binary task the positive-class
   * probability. Throws RangeError naming a feature the matrix lacks. O(rows x features).
   */
  predictRaw(matrix) {
    const position = new Map(matrix.features.map((f, j) => [f.name, j]));
    const n = matrix.rows;
    const score2 = new Float64Array(n).fill(this.state.intercept);
    this.state.terms.forEach((term, k) => {
      const j = position.get(this.featureNames[k]);
      if (j === void 0) {
        throw new RangeError(`LinearModel.predictRaw: the matrix has no feature named '${this.featureNames[k]}'`);
      }
      const column = matrix.columns[j];
      if (term.kind === "numeric") {
        const { coefficient, fill: fill2 } = term;
        for (let i = 0; i < n; i++) score2[i] += coefficient * (column[i] !== column[i] ? fill2 : column[i]);
        return;
      }
      const { coefficients, fill } = term;
      for (let i = 0; i < n; i++) {
        const code = column[i];
        score2[i] += Number.isInteger(code) && code >= 0 && code < coefficients.length ? coefficients[code] : fill;
      }
    });
    if (this.task === "binary") {
      for (let i = 0; i < n; i++) score2[i] = 1 / (1 + Math.exp(-score2[i]));
    }
    return score2;
  }
  async predict(matrix) {
    return this.predictRaw(matrix);
  }
};

// src/core/models/linear/solve-positive-definite.ts
function solvePositiveDefinite(matrix, rhs, size) {
  if (matrix.length !== size * size || rhs.length !== size) {
    throw new RangeError(
      `solvePositiveDefinite needs a ${size} x ${size} matrix and ${size} right-hand sides, got ${matrix.length} and ${rhs.length} values`
    );
  }
  const l = new Float64Array(size * size);
  for (let i = 0; i < size; i++) {
    for (let j = 0; j <= i; j++) {
      let sum2 = matrix[i * size + j];
      for (let k = 0; k < j; k++) sum2 -= l[i * size + k] * l[j * size + k];
      if (i === j) {
        const diagonal = matrix[i * size + i];
        if (!(diagonal > 0) || !(sum2 > 1e-10 * diagonal)) return { singularAt: i };
        l[i * size + i] = Math.sqrt(sum2);
      } else {
        l[i * size + j] = sum2 / l[j * size + j];
      }
    }
  }
  const x = Float64Array.from(rhs);
  for (let i = 0; i < size; i++) {
    let sum2 = x[i];
    for (let k = 0; k < i; k++) sum2 -= l[i * size + k] * x[k];
    x[i] = sum2 / l[i * size + i];
  }
  for (let i = size - 1; i >= 0; i--) {
    let sum2 = x[i];
    for (let k = i + 1; k < size; k++) sum2 -= l[k * size + i] * x[k];
    x[i] = sum2 / l[i * size + i];
  }
  return { solution: x };
}

// src/core/models/linear/build-standardized-design.ts
function buildStandardizedDesign(caller, task, matrix, target, options) {
  const { positions, features, y } = resolveTrainingSubset(
    caller,
    { rows: matrix.rows, features: matrix.features.length },
    target,
    task,
    options
  );
  const n = positions.length;
  const specs = [];
  const columnLabels = [];
  for (const j of features) {
    const info = matrix.features[j];
    const values = matrix.columns[j];
    if (info.kind === "categorical") {
      const spec = describeCategorical(caller, info.name, values, positions, info.categories?.length, columnLabels.length);
      for (const level of spec.levels.slice(1)) columnLabels.push(`${info.name} = ${info.categories?.[level] ?? level}`);
      specs.push(spec);
    } else {
      const spec = describeNumeric(values, positions, columnLabels.length);
      if (spec.column >= 0) columnLabels.push(info.name);
      specs.push(spec);
    }
  }
  const width = columnLabels.length;
  const design = new Float64Array(n * width);
  specs.forEach((spec, s) => {
    const values = matrix.columns[features[s]];
    if (spec.kind === "numeric") {
      if (spec.column < 0) return;
      for (let p = 0, at = spec.column; p < n; p++, at += width) {
        const x = values[positions[p]];
        design[at] = x !== x ? 0 : (x - spec.mean) / spec.sd;
      }
      return;
    }
    for (let l = 1; l < spec.levels.length; l++) {
      const level = spec.levels[l];
      const frequency = spec.frequencies[l];
      for (let p = 0, at = spec.firstColumn + l - 1; p < n; p++, at += width) {
        const code = values[positions[p]];
        design[at] = code !== code ? 0 : (code === level ? 1 : 0) - frequency;
      }
    }
  });
  const featureNames = features.map((j) => matrix.features[j].name);
  function toState(intercept, coefficients) {
    let rawIntercept = intercept;
    const terms = specs.map((spec) => {
      if (spec.kind === "numeric") {
        if (spec.column < 0) return { kind: "numeric", coefficient: 0, fill: spec.mean };
        const coefficient = coefficients[spec.column] / spec.sd;
        rawIntercept -= coefficient * spec.mean;
        return { kind: "numeric", coefficient, fill: spec.mean };
      }
      if (spec.levels.length === 0) return { kind: "categorical", coefficients: [], fill: 0 };
      let fill = 0;
      const byLevel = /* @__PURE__ */ new Map([[spec.levels[0], 0]]);
      for (let l = 1; l < spec.levels.length; l++) {
        const beta = coefficients[spec.firstColumn + l - 1];
        byLevel.set(spec.levels[l], beta);
        fill += spec.frequencies[l] * beta;
      }
      rawIntercept -= fill;
      const size = Math.max(spec.dictionarySize, spec.levels[spec.levels.length - 1] + 1);
      const perCode = Array.from({ length: size }, (_, code) => byLevel.get(code) ?? fill);
      return { kind: "categorical", coefficients: perCode, fill };
    });
    return { task, featureNames, intercept: rawIntercept, terms };
  }
  return { rows: n, width, values: design, y, columnLabels, toState };
}
function describeNumeric(values, positions, column) {
  const n = positions.length;
  let sum2 = 0;
  let present = 0;
  for (let p = 0; p < n; p++) {
    const x = values[positions[p]];
    if (x === x) {
      sum2 += x;
      present++;
    }
  }
  if (present === 0) return { kind: "numeric", mean: 0, sd: 0, column: -1 };
  const mean2 = sum2 / present;
  let squares = 0;
  for (let p = 0; p < n; p++) {
    const x = values[positions[p]];
    if (x === x) squares += (x - mean2) * (x - mean2);
  }
  const sd = Math.sqrt(squares / n);
  return { kind: "numeric", mean: mean2, sd, column: sd > 0 ? column : -1 };
}
function describeCategorical(caller, name, values, positions, dictionarySize, firstColumn) {
  const counts = /* @__PURE__ */ new Map();
  let present = 0;
  for (let p = 0; p < positions.length; p++) {
    const code = values[positions[p]];
    if (code !== code) continue;
    if (!Number.isInteger(code) || code < 0) {
      throw new RangeError(`${caller}: categorical feature '${name}' has code ${code} in row ${positions[p]}; codes are whole numbers >= 0`);
    }
    counts.set(code, (counts.get(code) ?? 0) + 1);
    present++;
  }
  const levels = [...counts.keys()].sort((a, b) => a - b);
  const frequencies = levels.map((level) => counts.get(level) / present);
  return { kind: "categorical", dictionarySize: dictionarySize ?? 0, levels, frequencies, firstColumn };
}
function collinearityError(caller, label) {
  return new UserError(
    `${caller}: '${label}' is a linear combination of the features before it on the training rows, so the unpenalized fit has no unique coefficients.`,
    "Give the linear learner a positive l2 penalty, or drop one of the collinear features."
  );
}

// src/core/models/linear/fit-logistic.ts
function fitLogistic(matrix, target, options) {
  const { l2 } = options;
  const maxIterations = options.maxIterations ?? 100;
  if (!(l2 >= 0) || !Number.isFinite(l2)) throw new RangeError(`fitLogistic needs l2 >= 0, got ${l2}`);
  if (!Number.isInteger(maxIterations) || maxIterations < 1) {
    throw new RangeError(`fitLogistic needs maxIterations to be a whole number >= 1, got ${maxIterations}`);
  }
  const design = buildStandardizedDesign("fitLogistic", "binary", matrix, target, options);
  const { rows: n, width: q, y } = design;
  let positives = 0;
  for (let i = 0; i < n; i++) positives += y[i];
  const rate = Math.min(1 - 1e-6, Math.max(1e-6, positives / n));
  const theta = new Float64Array(q + 1);
  theta[0] = Math.log(rate / (1 - rate));
  const finish = (iterations, converged) => new LinearModel(design.toState(theta[0], theta.subarray(1)), { iterations, converged });
  if (positives === 0 || positives === n) return finish(0, true);
  const size = q + 1;
  const eta = new Float64Array(n);
  const candidate = new Float64Array(size);
  let objective = computeObjective(design, theta, l2, eta);
  for (let iteration = 1; iteration <= maxIterations; iteration++) {
    const { gradient, hessian } = newtonSystem(design, theta, l2, eta);
    const solved = solvePositiveDefinite(hessian, gradient, size);
    if ("singularAt" in solved) {
      if (iteration === 1) throw collinearityError("fitLogistic", design.columnLabels[solved.singularAt - 1]);
      return finish(iteration - 1, false);
    }
    const direction = solved.solution;
    let decrementSquared = 0;
    for (let k = 0; k < size; k++) decrementSquared += gradient[k] * direction[k];
    const isDone = decrementSquared / 2 <= 1e-12 * (1 + objective);
    let t = 1;
    let next = Infinity;
    for (let halvings = 0; halvings < 60; halvings++, t /= 2) {
      for (let k = 0; k < size; k++) candidate[k] = theta[k] - t * direction[k];
      next = computeObjective(design, candidate, l2, eta);
      if (next <= objective - 0.01 * t * decrementSquared) break;
    }
    if (!(next <= objective)) return finish(iteration, isDone);
    theta.set(candidate);
    objective = next;
    if (isDone) return finish(iteration, true);
  }
  return finish(maxIterations, false);
}
function computeObjective(design, theta, l2, eta) {
  const { rows: n, width: q, values: z2, y } = design;
  let sum2 = 0;
  for (let i = 0, row = 0; i < n; i++, row += q) {
    let e = theta[0];
    for (let a = 0; a < q; a++) e += z2[row + a] * theta[a + 1];
    eta[i] = e;
    sum2 += (e > 0 ? e + Math.log1p(Math.exp(-e)) : Math.log1p(Math.exp(e))) - y[i] * e;
  }
  let penalty = 0;
  for (let a = 1; a <= q; a++) penalty += theta[a] * theta[a];
  return sum2 + 0.5 * l2 * penalty;
}
function newtonSystem(design, theta, l2, eta) {
  const { rows: n, width: q, values: z2, y } = design;
  const size = q + 1;
  const gradient = new Float64Array(size);
  const hessian = new Float64Array(size * size);
  for (let i = 0, row = 0; i < n; i++, row += q) {
    const p = 1 / (1 + Math.exp(-eta[i]));
    const residual = p - y[i];
    const w = p * (1 - p);
    gradient[0] += residual;
    hessian[0] += w;
    for (let a = 0; a < q; a++) {
      const za = z2[row + a];
      if (za === 0) continue;
      const wa = w * za;
      gradient[a + 1] += residual * za;
      const at = (a + 1) * size;
      hessian[at] += wa;
      for (let b = 0; b <= a; b++) hessian[at + b + 1] += wa * z2[row + b];
    }
  }
  for (let a = 1; a <= q; a++) {
    gradient[a] += l2 * theta[a];
    hessian[a * size + a] += l2;
  }
  return { gradient, hessian };
}

// src/core/models/linear/fit-ridge.ts
function fitRidge(matrix, target, options) {
  const { l2 } = options;
  if (!(l2 >= 0) || !Number.isFinite(l2)) throw new RangeError(`fitRidge needs l2 >= 0, got ${l2}`);
  const design = buildStandardizedDesign("fitRidge", "regression", matrix, target, options);
  const { rows: n, width: q, values: z2, y } = design;
  let mean2 = 0;
  for (let i = 0; i < n; i++) mean2 += y[i];
  mean2 /= n;
  const gram = new Float64Array(q * q);
  const rhs = new Float64Array(q);
  for (let i = 0, row = 0; i < n; i++, row += q) {
    const residual = y[i] - mean2;
    for (let a = 0; a < q; a++) {
      const za = z2[row + a];
      if (za === 0) continue;
      rhs[a] += za * residual;
      for (let b = 0; b <= a; b++) gram[a * q + b] += za * z2[row + b];
    }
  }
  for (let a = 0; a < q; a++) gram[a * q + a] += l2;
  const solved = solvePositiveDefinite(gram, rhs, q);
  if ("singularAt" in solved) throw collinearityError("fitRidge", design.columnLabels[solved.singularAt]);
  return new LinearModel(design.toState(mean2, solved.solution));
}

// src/core/models/builtin-fit.ts
function createBuiltinFit(train3, task, settings, options = {}) {
  const target = train3.target?.values;
  if (!target) throw new RangeError("createBuiltinFit needs a training dataset with a target");
  let binned;
  const names = train3.features.map((f) => f.name);
  const classCount = task === "multiclass" ? train3.target?.classes?.length : void 0;
  if (task === "multiclass" && !(classCount !== void 0 && classCount >= 3)) {
    throw new RangeError("createBuiltinFit needs a multiclass target with its classes (K >= 3)");
  }
  return async (request) => {
    const leaveOut2 = new Set(request.leaveOut);
    for (const name of leaveOut2) {
      if (!names.includes(name)) throw new RangeError(`createBuiltinFit: cannot leave out unknown feature '${name}'`);
    }
    const rows = shuffledIndices(train3.rows, createRandom(deriveSeed(request.seed, "row-order")));
    const columnOrder = Array.from(shuffledIndices(names.length, createRandom(deriveSeed(request.seed, "column-order"))));
    const excluded = names.flatMap((name, j) => leaveOut2.has(name) ? [j] : []);
    if (excluded.length === names.length) throw new RangeError("createBuiltinFit: every feature was left out");
    if (settings.learner === "linear") {
      const features = columnOrder.filter((j) => !leaveOut2.has(names[j]));
      const options2 = { l2: settings.linearL2, rows, features };
      if (task === "multiclass") throw new RangeError("createBuiltinFit: the linear learner has no multiclass fit (the policy refuses it)");
      return task === "binary" ? fitLogistic(train3, target, options2) : fitRidge(train3, target, options2);
    }
    binned ??= options.binned ?? binFeatures(train3, { maxBins: settings.maxBins });
    return fitBoosted(binned, target, {
      task,
      settings: settings.boosting,
      seed: request.seed,
      rows,
      features: columnOrder,
      excludeFeatures: excluded,
      ...classCount !== void 0 ? { classCount } : {}
    });
  };
}

// src/core/metrics/accuracy.ts
function accuracy(y, p, options = {}) {
  checkPaired("accuracy", y, p, "binary");
  const threshold = options.threshold ?? 0.5;
  if (Number.isNaN(threshold)) throw new RangeError("accuracy needs a threshold that is a number, got NaN");
  let correct = 0;
  for (let i = 0; i < y.length; i++) {
    if (Number.isNaN(p[i])) return NaN;
    if ((p[i] > threshold ? 1 : 0) === y[i]) correct++;
  }
  return correct / y.length;
}

// src/core/metrics/brier-score.ts
function brierScore(y, p) {
  checkPaired("brierScore", y, p, "binary");
  let sum2 = 0;
  for (let i = 0; i < y.length; i++) {
    if (p[i] < 0 || p[i] > 1) throw new RangeError(`brierScore needs probabilities in [0, 1], got ${p[i]} at index ${i}`);
    const d = p[i] - y[i];
    sum2 += d * d;
  }
  return sum2 / y.length;
}

// src/core/metrics/log-loss.ts
var EPSILON3 = 1e-15;
function logLoss(y, p) {
  checkPaired("logLoss", y, p, "binary");
  let sum2 = 0;
  for (let i = 0; i < y.length; i++) {
    const probability = p[i];
    if (probability < 0 || probability > 1) throw new RangeError(`logLoss needs probabilities in [0, 1], got ${probability} at index ${i}`);
    const clipped = Math.min(1 - EPSILON3, Math.max(EPSILON3, probability));
    sum2 -= Math.log(y[i] === 1 ? clipped : 1 - clipped);
  }
  return sum2 / y.length;
}

// src/core/metrics/mae.ts
function mae(y, prediction) {
  checkPaired("mae", y, prediction, "any");
  let sum2 = 0;
  for (let i = 0; i < y.length; i++) sum2 += Math.abs(y[i] - prediction[i]);
  return sum2 / y.length;
}

// src/core/metrics/rmse.ts
function rmse(y, prediction) {
  checkPaired("rmse", y, prediction, "any");
  let sum2 = 0;
  for (let i = 0; i < y.length; i++) {
    const d = y[i] - prediction[i];
    sum2 += d * d;
  }
  return Math.sqrt(sum2 / y.length);
}

// src/core/metrics/metric-by-name.ts
var METRICS = [
  { name: "auc", task: "binary", higherIsBetter: true, compute: rocAuc },
  { name: "log-loss", task: "binary", higherIsBetter: false, compute: logLoss },
  { name: "accuracy", task: "binary", higherIsBetter: true, compute: (y, p) => accuracy(y, p) },
  { name: "brier", task: "binary", higherIsBetter: false, compute: brierScore },
  { name: "rmse", task: "regression", higherIsBetter: false, compute: rmse },
  { name: "mae", task: "regression", higherIsBetter: false, compute: mae },
  { name: "r2", task: "regression", higherIsBetter: true, compute: rSquared },
  // Multiclass: predictions are row-major [N, K] class probabilities, y the class index.
  { name: "log-loss", task: "multiclass", higherIsBetter: false, compute: multiclassLogLoss },
  { name: "accuracy", task: "multiclass", higherIsBetter: true, compute: multiclassAccuracy },
  { name: "auc", task: "multiclass", higherIsBetter: true, compute: macroOvrAuc }
];
var TASK_WORDS = { binary: "a binary target", regression: "a regression target", multiclass: "a multiclass target" };
function metricByName(name, task) {
  const allowed = METRICS.filter((m) => m.task === task);
  const metric = allowed.find((m) => m.name === name);
  if (metric) return metric;
  const exists = METRICS.some((m) => m.name === name);
  throw new UserError(
    `${exists ? `The metric '${name}' does not fit` : `There is no metric '${name}' for`} ${TASK_WORDS[task]}; the metrics for ${TASK_WORDS[task]} are ${allowed.map((m) => m.name).join(", ")}.`,
    `Choose one of those, or leave the metric out to use ${defaultMetric(task)}.`
  );
}
function defaultMetric(task) {
  return task === "regression" ? "rmse" : "log-loss";
}

// src/adapters/parallel/refit-worker.ts
async function runRefit(task) {
  const fit = createBuiltinFit(task.train, task.builtin.task, task.builtin.settings, { binned: task.binned });
  const model = await fit({ side: task.side, seed: task.seed, refit: task.refit, leaveOut: task.leaveOut ?? [] });
  const options = { ...task.options, metric: metricByName(task.options.metricName, task.builtin.task) };
  if (task.leaveOut) {
    const prediction = await model.predict(selectFeatures(task.holdout, model.featureNames));
    return options.metric.compute(task.holdout.target.values, prediction);
  }
  return measureRefit(model, { holdout: task.holdout, train: task.train }, options, task.rows, task.refit);
}
export {
  runRefit as default
};
