import { expect } from 'vitest';

/** |actual - expected| <= tol * |expected| (default 1e-6 relative). */
export function expectRel(actual: number, expected: number, tol = 1e-6): void {
  const err = Math.abs(actual - expected);
  expect(err, `actual ${actual} vs expected ${expected} (rel tol ${tol})`).toBeLessThanOrEqual(tol * Math.abs(expected));
}

/** Match a published value to the digits it is quoted with: within half a unit of its last
 * decimal place, or 1e-6 relative, whichever is looser. */
export function expectPublished(actual: number, published: string): void {
  const expected = Number(published);
  const dot = published.indexOf('.');
  const decimals = dot < 0 ? 0 : published.length - dot - 1;
  const tol = Math.max(0.5 * 10 ** -decimals, 1e-6 * Math.abs(expected));
  const err = Math.abs(actual - expected);
  expect(err, `actual ${actual} vs published ${published} (tol ${tol})`).toBeLessThanOrEqual(tol);
}

/** Match a published value to every digit it is quoted with: within half a unit of its last decimal
 * place (plus 4 ulps for the binary rounding of the quoted decimal itself). */
export function expectAllDigits(actual: number, published: string): void {
  const expected = Number(published);
  const dot = published.indexOf('.');
  const decimals = dot < 0 ? 0 : published.length - dot - 1;
  const tol = 0.5 * 10 ** -decimals + 4 * Number.EPSILON * Math.abs(expected);
  expect(Math.abs(actual - expected), `actual ${actual} vs published ${published} (tol ${tol})`).toBeLessThanOrEqual(tol);
}
