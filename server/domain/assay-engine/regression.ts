import type { TracePoint } from '@/schemas/assay';

/** Ordinary least squares of y on x with an intercept. Slope is per unit of x. */
export interface LinearFit {
  slope: number;
  intercept: number;
  /** 1 − SSE/SST; 0 when y does not vary (r² is undefined there and must not pass a threshold). */
  r2: number;
  /** √(SSE/(n − 2)); null below 3 points. */
  residualSd: number | null;
  n: number;
}

function finishFit(n: number, syy: number, sse: number, slope: number, intercept: number): LinearFit {
  return {
    slope,
    intercept,
    r2: syy > 0 ? Math.max(0, 1 - sse / syy) : 0,
    residualSd: n > 2 ? Math.sqrt(sse / (n - 2)) : null,
    n,
  };
}

/**
 * Fits a against t over trace[lo..hi] (inclusive) without copying the trace. Centred sums keep the
 * arithmetic stable for times in the hundreds of seconds. Needs hi − lo ≥ 1 and distinct times.
 */
export function fitTraceRange(trace: readonly TracePoint[], lo: number, hi: number): LinearFit {
  const n = hi - lo + 1;
  let st = 0;
  let sa = 0;
  for (let i = lo; i <= hi; i += 1) {
    const p = trace[i]!;
    st += p.t;
    sa += p.a;
  }
  const mt = st / n;
  const ma = sa / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = lo; i <= hi; i += 1) {
    const p = trace[i]!;
    const dx = p.t - mt;
    const dy = p.a - ma;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const slope = sxy / sxx;
  const intercept = ma - slope * mt;
  let sse = 0;
  for (let i = lo; i <= hi; i += 1) {
    const p = trace[i]!;
    const r = p.a - (intercept + slope * p.t);
    sse += r * r;
  }
  return finishFit(n, syy, sse, slope, intercept);
}

/** Same fit over two parallel arrays (standard curves, transformed traces). */
export function fitArrays(xs: ArrayLike<number>, ys: ArrayLike<number>, n = xs.length): LinearFit {
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < n; i += 1) {
    sx += xs[i]!;
    sy += ys[i]!;
  }
  const mx = sx / n;
  const my = sy / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i += 1) {
    const dx = xs[i]! - mx;
    const dy = ys[i]! - my;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  let sse = 0;
  for (let i = 0; i < n; i += 1) {
    const r = ys[i]! - (intercept + slope * xs[i]!);
    sse += r * r;
  }
  return finishFit(n, syy, sse, slope, intercept);
}

/** y = c0 + c1·x + c2·x², least squares. */
export interface QuadraticFit {
  c0: number;
  c1: number;
  c2: number;
  r2: number;
  n: number;
}

/** Solves the 3×3 normal equations on centred x, then maps the coefficients back to raw x. */
export function fitQuadratic(xs: ArrayLike<number>, ys: ArrayLike<number>): QuadraticFit | null {
  const n = xs.length;
  if (n < 3) return null;
  let mx = 0;
  for (let i = 0; i < n; i += 1) mx += xs[i]!;
  mx /= n;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let s4 = 0;
  let sy = 0;
  let sxy = 0;
  let sx2y = 0;
  for (let i = 0; i < n; i += 1) {
    const x = xs[i]! - mx;
    const y = ys[i]!;
    const x2 = x * x;
    s1 += x;
    s2 += x2;
    s3 += x2 * x;
    s4 += x2 * x2;
    sy += y;
    sxy += x * y;
    sx2y += x2 * y;
  }
  const m = [
    [n, s1, s2, sy],
    [s1, s2, s3, sxy],
    [s2, s3, s4, sx2y],
  ];
  const b = solve3(m);
  if (!b) return null;
  const [b0, b1, b2] = b;
  const c0 = b0 - b1 * mx + b2 * mx * mx;
  const c1 = b1 - 2 * b2 * mx;
  const c2 = b2;
  const my = sy / n;
  let sse = 0;
  let sst = 0;
  for (let i = 0; i < n; i += 1) {
    const x = xs[i]!;
    const y = ys[i]!;
    const r = y - (c0 + c1 * x + c2 * x * x);
    sse += r * r;
    sst += (y - my) * (y - my);
  }
  return { c0, c1, c2, r2: sst > 0 ? Math.max(0, 1 - sse / sst) : 0, n };
}

/** Gaussian elimination with partial pivoting on an augmented 3×4 matrix. */
function solve3(m: number[][]): [number, number, number] | null {
  const scale = Math.abs(m[0]![0]!) + Math.abs(m[1]![1]!) + Math.abs(m[2]![2]!);
  for (let col = 0; col < 3; col += 1) {
    let pivot = col;
    for (let r = col + 1; r < 3; r += 1) {
      if (Math.abs(m[r]![col]!) > Math.abs(m[pivot]![col]!)) pivot = r;
    }
    if (!(Math.abs(m[pivot]![col]!) > 1e-12 * scale)) return null;
    const tmp = m[col]!;
    m[col] = m[pivot]!;
    m[pivot] = tmp;
    const row = m[col]!;
    for (let r = col + 1; r < 3; r += 1) {
      const other = m[r]!;
      const f = other[col]! / row[col]!;
      for (let c = col; c < 4; c += 1) other[c] = other[c]! - f * row[c]!;
    }
  }
  const x2 = m[2]![3]! / m[2]![2]!;
  const x1 = (m[1]![3]! - m[1]![2]! * x2) / m[1]![1]!;
  const x0 = (m[0]![3]! - m[0]![1]! * x1 - m[0]![2]! * x2) / m[0]![0]!;
  if (![x0, x1, x2].every(Number.isFinite)) return null;
  return [x0, x1, x2];
}
