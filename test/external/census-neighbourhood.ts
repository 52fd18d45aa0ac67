/**
 * The published neighbourhood of the logistic law on the U.S. decennial census: Pearl & Reed
 * (1920, PNAS 6:275–288) fitted capacity ≈ 197.27 million and rate ≈ 0.03134 per year to
 * 1790–1910. The ODE family fits the integral regression on the decennial increments rather
 * than their curve, so its K and r are checked to lie in K ∈ (170, 240) million and
 * r ∈ (0.027, 0.035) per year.
 */
import { expect } from 'vitest';

export const CAPACITY_RANGE = [170e6, 240e6] as const;
export const RATE_RANGE = [0.027, 0.035] as const;

/** Asserts K and r (per year) lie in the neighbourhood above. */
export function expectPearlReedNeighbourhood(K: number, r: number): void {
  expect(K).toBeGreaterThan(CAPACITY_RANGE[0]);
  expect(K).toBeLessThan(CAPACITY_RANGE[1]);
  expect(r).toBeGreaterThan(RATE_RANGE[0]);
  expect(r).toBeLessThan(RATE_RANGE[1]);
}
