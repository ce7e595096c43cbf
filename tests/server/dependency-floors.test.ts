/**
 * Dependency floors (RELIABILITY.md 23 and its notes on better-auth, multer and ajv): the versions
 * actually installed (node_modules, what runs) are at or above the floors given there, and
 * package.json cannot resolve below them. `npm audit --omit=dev` itself runs in scripts/audit.sh,
 * which exits 2 ("NOT CHECKED") when the registry's advisory endpoint cannot be reached.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';

const FLOORS: Record<string, string> = { 'better-auth': '1.7.16', multer: '2.0.2', ajv: '8.18.0' };

const parse = (v: string) => v.replace(/^[^\d]*/, '').split(/[.+-]/).slice(0, 3).map((x) => Number.parseInt(x, 10) || 0);
const atLeast = (v: string, floor: string) => {
  const a = parse(v);
  const b = parse(floor);
  for (let i = 0; i < 3; i++) if (a[i] !== b[i]) return a[i] > b[i];
  return true;
};

describe('dependency floors', () => {
  it('compares versions numerically, not as text', () => {
    expect(atLeast('1.10.0', '1.7.16')).toBe(true);
    expect(atLeast('1.7.9', '1.7.16')).toBe(false);
    expect(atLeast('2.0.2', '2.0.2')).toBe(true);
    expect(atLeast('^8.20.0', '8.18.0')).toBe(true);
  });
  for (const [name, floor] of Object.entries(FLOORS)) {
    it(`${name} installed and declared at >= ${floor}`, () => {
      // node_modules/<name>/package.json directly: some packages do not export their package.json
      const installed = JSON.parse(readFileSync(new URL(`../../node_modules/${name}/package.json`, import.meta.url), 'utf8')).version as string;
      expect(atLeast(installed, floor), `${name} ${installed} is below the floor ${floor}`).toBe(true);
      const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8'));
      const declared = (pkg.dependencies?.[name] ?? pkg.devDependencies?.[name]) as string;
      expect(declared, `${name} is not declared in package.json`).toBeTruthy();
      // the lowest version the range admits is its first number: it must not be below the floor
      expect(atLeast(declared, floor), `package.json admits ${name} ${declared}, below ${floor}`).toBe(true);
    });
  }
});
