import fc from 'fast-check';
import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  binomialCdfTable,
  lnGamma,
  studentTCdf,
  studentTQuantile,
} from '../../../../server/domain/reference-stats/distributions';

describe('lnGamma', () => {
  it('matches simple-statistics gammaln', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 500, noNaN: true }), (x) => {
        expect(lnGamma(x)).toBeCloseTo(ss.gammaln(x), 8);
      }),
    );
  });

  it('gives ln((n − 1)!) at whole numbers [derived]', () => {
    expect(lnGamma(6)).toBeCloseTo(Math.log(120), 12);
    expect(lnGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 12); // Γ(1/2) = √π
  });
});

describe('studentTCdf', () => {
  it('with 1 degree of freedom equals the Cauchy CDF 1/2 + atan(t)/π [derived, closed form]', () => {
    fc.assert(
      fc.property(fc.double({ min: -50, max: 50, noNaN: true }), (t) => {
        expect(studentTCdf(t, 1)).toBeCloseTo(0.5 + Math.atan(t) / Math.PI, 10);
      }),
    );
  });

  it('with 2 degrees of freedom equals 1/2 + t / (2√(2 + t²)) [derived, closed form]', () => {
    fc.assert(
      fc.property(fc.double({ min: -50, max: 50, noNaN: true }), (t) => {
        expect(studentTCdf(t, 2)).toBeCloseTo(0.5 + t / (2 * Math.sqrt(2 + t * t)), 10);
      }),
    );
  });

  it('approaches the standard normal CDF for large df (simple-statistics table, 4 decimals)', () => {
    for (const z of [-2.5, -1, 0, 0.5, 1.96, 3]) {
      expect(studentTCdf(z, 1e6)).toBeCloseTo(ss.cumulativeStdNormalProbability(z), 3);
    }
  });
});

describe('studentTQuantile', () => {
  it('reproduces the closed forms for df = 1 and df = 2 [derived]', () => {
    // df = 1: tan(π(p − 1/2)); df = 2: (2p − 1)/√(2p(1 − p)).
    for (const p of [0.6, 0.9, 0.975, 0.995]) {
      expect(studentTQuantile(p, 1)).toBeCloseTo(Math.tan(Math.PI * (p - 0.5)), 8);
      expect(studentTQuantile(p, 2)).toBeCloseTo((2 * p - 1) / Math.sqrt(2 * p * (1 - p)), 8);
    }
  });

  it('matches printed two-sided 95% t-table values [from memory: standard Student t table]', () => {
    expect(studentTQuantile(0.975, 9)).toBeCloseTo(2.262, 3);
    expect(studentTQuantile(0.975, 19)).toBeCloseTo(2.093, 3);
    expect(studentTQuantile(0.975, 29)).toBeCloseTo(2.045, 3);
    expect(studentTQuantile(0.025, 19)).toBeCloseTo(-2.093, 3);
  });
});

describe('binomialCdfTable', () => {
  it('matches cumulative sums of simple-statistics binomialDistribution', () => {
    for (const [n, p] of [
      [120, 0.025],
      [20, 0.05],
      [500, 0.025],
    ] as const) {
      const pmf = ss.binomialDistribution(n, p) ?? [];
      const ours = binomialCdfTable(n, p, pmf.length - 1);
      let running = 0;
      pmf.forEach((mass, k) => {
        running += mass;
        expect(ours[k]).toBeCloseTo(running, 10);
      });
    }
  });

  it('gives P(X = 0) = (1 − p)^n [derived]', () => {
    expect(binomialCdfTable(120, 0.025, 0)[0]).toBeCloseTo(0.975 ** 120, 14);
  });
});
