// Distribution functions the interval methods need. Written here rather than taken from a package so
// the server carries no statistics dependency; the tests check them against closed forms and against
// simple-statistics.

const LANCZOS_G = 7;
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
  -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6,
  1.5056327351493116e-7,
];

/** ln Γ(x) for x > 0 (Lanczos approximation, g = 7, n = 9; relative error about 1e-15). */
export function lnGamma(x: number): number {
  if (!(x > 0)) throw new RangeError(`lnGamma needs x > 0, got ${x}`);
  if (x < 0.5) {
    // Reflection keeps accuracy near zero.
    return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
  }
  const z = x - 1;
  let series = LANCZOS[0] ?? 1;
  for (let i = 1; i < LANCZOS.length; i++) series += (LANCZOS[i] ?? 0) / (z + i);
  const t = z + LANCZOS_G + 0.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(series);
}

/** Continued fraction for the incomplete beta function (modified Lentz). */
function betaContinuedFraction(a: number, b: number, x: number): number {
  const tiny = 1e-300;
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 500; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-15) return h;
  }
  return h;
}

/**
 * Regularised incomplete beta I_x(a, b). `y` is 1 − x when the caller knows it more precisely than
 * the subtraction would give it.
 */
export function regularizedBeta(x: number, a: number, b: number, y: number = 1 - x): number {
  if (x <= 0) return 0;
  if (y <= 0) return 1;
  const front = Math.exp(lnGamma(a + b) - lnGamma(a) - lnGamma(b) + a * Math.log(x) + b * Math.log(y));
  return x < (a + 1) / (a + b + 2)
    ? (front * betaContinuedFraction(a, b, x)) / a
    : 1 - (front * betaContinuedFraction(b, a, y)) / b;
}

/** P(T ≤ t) for Student's t with df degrees of freedom. */
export function studentTCdf(t: number, df: number): number {
  if (!(df > 0)) throw new RangeError(`df must be positive, got ${df}`);
  if (t === 0) return 0.5;
  // P(|T| ≤ |t|) = I_{t²/(df+t²)}(1/2, df/2); both arguments computed directly keep precision near
  // t = 0 and far in the tails.
  const t2 = t * t;
  const inside = regularizedBeta(t2 / (df + t2), 0.5, df / 2, df / (df + t2));
  return t > 0 ? 0.5 + inside / 2 : 0.5 - inside / 2;
}

/** Quantile of Student's t: the t with P(T ≤ t) = p, by bisection to full double precision. */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`p must lie in (0, 1), got ${p}`);
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentTQuantile(1 - p, df);
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, df) < p) {
    lo = hi;
    hi *= 2;
    if (hi > 1e12) throw new RangeError('t quantile out of range');
  }
  for (let i = 0; i < 200 && hi - lo > 1e-13 * Math.max(1, hi); i++) {
    const mid = (lo + hi) / 2;
    if (studentTCdf(mid, df) < p) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Cumulative probabilities of X ~ Binomial(n, p): element k is P(X ≤ k), for k = 0 … upTo.
 * Summed in log space so large n does not underflow (1 − p)^n.
 */
export function binomialCdfTable(n: number, p: number, upTo: number = n): number[] {
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`n must be a whole number, got ${n}`);
  if (!(p > 0 && p < 1)) throw new RangeError(`p must lie in (0, 1), got ${p}`);
  const last = Math.min(n, upTo);
  const logOdds = Math.log(p) - Math.log1p(-p);
  let logPmf = n * Math.log1p(-p);
  let cumulative = 0;
  const table: number[] = [];
  for (let k = 0; k <= last; k++) {
    if (k > 0) logPmf += Math.log(n - k + 1) - Math.log(k) + logOdds;
    cumulative += Math.exp(logPmf);
    table.push(Math.min(1, cumulative));
  }
  return table;
}
