import { describe, expect, it } from 'vitest';
import { regularizedBeta, studentTCdf, studentTQuantile } from '../../src/forecast/student-t.js';
import { normalQuantile } from '../../src/forecast/normal.js';

describe('studentTCdf / studentTQuantile', () => {
  it('matches the closed forms for ν = 1 (Cauchy) and ν = 2', () => {
    // ν = 1: F(t) = ½ + atan(t)/π; ν = 2: F(t) = ½ + t / (2√(2 + t²)) (analytic identities).
    for (const t of [-7, -1.5, -0.2, 0.3, 1, 4, 30]) {
      expect(studentTCdf(t, 1)).toBeCloseTo(0.5 + Math.atan(t) / Math.PI, 12);
      expect(studentTCdf(t, 2)).toBeCloseTo(0.5 + t / (2 * Math.sqrt(2 + t * t)), 12);
    }
    for (const p of [0.6, 0.9, 0.975, 0.995]) {
      expect(studentTQuantile(p, 1)).toBeCloseTo(Math.tan(Math.PI * (p - 0.5)), 9);
      expect(studentTQuantile(p, 2)).toBeCloseTo((2 * p - 1) / Math.sqrt(2 * p * (1 - p)), 9);
      expect(studentTQuantile(1 - p, 2)).toBeCloseTo(-studentTQuantile(p, 2), 12);
    }
  });

  it('gives the printed table values (A&S Table 26.10, recalled from memory to 3 decimals)', () => {
    expect(studentTQuantile(0.975, 10)).toBeCloseTo(2.228, 3);
    expect(studentTQuantile(0.95, 5)).toBeCloseTo(2.015, 3);
    expect(studentTQuantile(0.9, 30)).toBeCloseTo(1.31, 2);
  });

  it('tends to the normal quantile as ν grows', () => {
    expect(studentTQuantile(0.975, 1e6)).toBeCloseTo(normalQuantile(0.975), 5);
    expect(studentTQuantile(0.8, 1e9)).toBe(normalQuantile(0.8));
  });

  it('regularizedBeta satisfies I_x(a, b) = 1 − I_{1−x}(b, a) and I_x(1, 1) = x', () => {
    expect(regularizedBeta(0.3, 1, 1)).toBeCloseTo(0.3, 13);
    expect(regularizedBeta(0.2, 2.5, 0.5) + regularizedBeta(0.8, 0.5, 2.5)).toBeCloseTo(1, 12);
    // I_x(a, 1) = x^a.
    expect(regularizedBeta(0.7, 3.2, 1)).toBeCloseTo(Math.pow(0.7, 3.2), 12);
  });
});
