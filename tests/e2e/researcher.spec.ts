/**
 * The researcher's pages (issue 13), as a visitor: the printable specification (observables written
 * out, circuit, qubit numbers), a target page (reference or consensus, forest plot and its table,
 * zero-noise data), a comparison of two entries reached from the entry page, and the depth view.
 * Screenshots at desktop (1280) and phone (390) width go to test-output/screenshots/researcher-*.
 * The demo challenge and its targets are chosen from the API, not hard-coded: a heavy-hex challenge
 * when there is one, and a target that a hardware entry answered with noise-scaled data.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DESKTOP, launchBrowser, PHONE, shot, startServer, type RunningServer, openPage, closeAll } from './harness';

let server: RunningServer;
let browser: Browser;
const contexts: BrowserContext[] = [];
let slug = '';

interface Est { entries: { id: string; label: string; track: string; isBaseline: boolean }[]; estimates: { entryId: string; target: string; raw?: { noiseScaled?: unknown[] } | null }[] }

const api = async <T,>(p: string): Promise<T> => {
  const r = await fetch(`${server.url}/api${p}`);
  if (!r.ok) throw new Error(`${p}: ${r.status}`);
  return (await r.json()) as T;
};

async function shots(page: Page, name: string): Promise<void> {
  const own = page.viewportSize() ?? DESKTOP;
  await page.setViewportSize(DESKTOP);
  await page.waitForTimeout(400); // charts re-measure their box
  await shot(page, `researcher-${name}-desktop`);
  await page.setViewportSize(PHONE);
  await page.waitForTimeout(400);
  await shot(page, `researcher-${name}-phone`);
  await page.setViewportSize(own);
}

describe("the researcher's pages in the browser", () => {
  beforeAll(async () => {
    server = await startServer();
    browser = await launchBrowser();
    const list = await api<{ challenges: { slug: string; lattice?: { kind: string } }[] }>('/challenges');
    slug = (list.challenges.find((c) => c.lattice?.kind === 'heavy-hex') ?? list.challenges[0]).slug;
    const deadline = Date.now() + 200_000;
    for (;;) {
      const s = await api<{ status: string; entries: unknown[] }>(`/challenges/${slug}/standings`).catch(() => null);
      if (s?.status === 'ready' && s.entries.length >= 2) break;
      if (Date.now() > deadline) throw new Error(`standings of ${slug} not ready:\n${server.output().slice(-3000)}`);
      await new Promise((r) => setTimeout(r, 2000));
    }
  }, 260_000);

  afterAll(async () => { await closeAll(contexts, browser, server); });

  it('reads the specification: every observable written out, the circuit, the qubit numbering', async () => {
    const p = await openPage(browser, server.url, contexts, DESKTOP);
    const errors: string[] = [];
    p.on('pageerror', (e) => errors.push(e.message));
    await p.goto(`/challenges/${slug}/specification`);
    await p.getByTestId('specification').waitFor();
    expect(await p.title()).toContain('Specification of');
    const obs = p.getByTestId('observables');
    // a Pauli string is written with its qubits as subscripts, never as its bare id only
    expect(await obs.locator('sub').count()).toBeGreaterThan(0);
    expect(await p.getByTestId('circuit-formula').textContent()).toMatch(/exp\(−iθX\/2\)/);
    expect(await p.getByTestId('numbering').locator('li').count()).toBeGreaterThanOrEqual(1);
    // the printable lattice carries the qubit numbers
    const labels = await p.getByTestId('lattice-drawing').locator('text').count();
    expect(labels).toBeGreaterThan(10);
    await shots(p, 'specification');
    // on the challenge page the numbers are a toggle
    await p.goto(`/challenges/${slug}?view=spec`);
    await p.getByTestId('lattice-drawing').waitFor();
    expect(await p.getByTestId('lattice-drawing').locator('text').count()).toBe(0);
    await p.getByLabel('Show qubit numbers').check();
    expect(await p.getByTestId('lattice-drawing').locator('text').count()).toBeGreaterThan(10);
    await shots(p, 'challenge-spec');
    expect(errors).toEqual([]);
  });

  it('opens a target: reference or consensus, the forest plot with its table, the zero-noise data', async () => {
    const est = await api<Est>(`/challenges/${slug}/estimates`);
    const hw = new Set(est.entries.filter((e) => e.track === 'hardware').map((e) => e.id));
    // a hardware target with noise-scaled data, away from the Clifford angles and the first step
    const zneTargets = est.estimates.filter((m) => hw.has(m.entryId) && m.raw?.noiseScaled?.length);
    const withZne = zneTargets.find((m) => !/^t1-|h0\.000000|h1\.570796/.test(m.target)) ?? zneTargets[0];
    const key = (withZne ?? est.estimates[0]).target;
    const p = await openPage(browser, server.url, contexts, DESKTOP);
    const errors: string[] = [];
    p.on('pageerror', (e) => errors.push(e.message));
    await p.goto(`/challenges/${slug}/targets/${encodeURIComponent(key)}`);
    await p.getByTestId('doe-table').waitFor();
    expect(await p.title()).toBe(`Target ${key} – Parallax`);
    const fp = p.getByTestId('forest-plot');
    await fp.waitFor();
    expect(await fp.getAttribute('aria-label')).toMatch(/^Forest plot of \d+ estimates/);
    const rows = await p.getByTestId('doe-table').locator('tbody tr').count();
    expect(rows).toBeGreaterThanOrEqual(2);
    // the table alternative is reachable from the keyboard
    expect(await p.getByTestId('doe-table').getAttribute('tabindex')).toBe('0');
    if (withZne) expect(await p.getByTestId('zne-block').count()).toBeGreaterThanOrEqual(1);
    expect(await p.getByTestId('neighbours').locator('a').count()).toBeGreaterThan(0);
    // no programmer notation on the page
    const text = await p.locator('main').innerText();
    expect(text).not.toMatch(/\d\.\d+e-\d/);
    expect(text).not.toMatch(/random-effects-dl|rmse-verifiable|X2\/N/);
    await shots(p, 'target');
    await fp.screenshot({ path: 'test-output/screenshots/researcher-forest-plot.png' });
    expect(errors).toEqual([]);
  });

  it('compares two entries, reached from the entry page', async () => {
    const est = await api<Est>(`/challenges/${slug}/estimates?raw=0`);
    const a = est.entries.find((e) => e.track === 'hardware') ?? est.entries[0];
    const b = est.entries.find((e) => e.id !== a.id && !e.isBaseline) ?? est.entries.find((e) => e.id !== a.id)!;
    const p = await openPage(browser, server.url, contexts, DESKTOP);
    const errors: string[] = [];
    p.on('pageerror', (e) => errors.push(e.message));
    await p.goto(`/entries/${a.id}`);
    const sel = p.getByTestId('compare-with');
    await sel.locator(`option[value="${b.id}"]`).waitFor({ state: 'attached' });
    await sel.selectOption(b.id);
    await p.waitForURL(/\/compare\?a=/);
    await p.getByTestId('compare-table').waitFor();
    const sum = await p.getByTestId('compare-summary').innerText();
    expect(sum).toMatch(/χ² of the differences per degree of freedom\s*\n?\s*[\d.]+\/\d+/);
    expect(await p.getByTestId('compare-table').locator('tbody tr').count()).toBeGreaterThan(0);
    await shots(p, 'compare');
    // and against the consensus
    await p.goto(`/compare?a=${a.id}&b=consensus`);
    await p.getByTestId('compare-table').waitFor();
    await shots(p, 'compare-consensus');
    expect(errors).toEqual([]);
  });

  it('shows the depth view: value and error against steps, and where each method breaks', async () => {
    const p = await openPage(browser, server.url, contexts, DESKTOP);
    const errors: string[] = [];
    p.on('pageerror', (e) => errors.push(e.message));
    await p.goto(`/challenges/${slug}/depth`);
    await p.getByTestId('break-maps').waitFor();
    expect(await p.title()).toContain('Depth view of');
    const maps = await p.getByTestId('break-maps').locator('table').count();
    expect(maps).toBeGreaterThanOrEqual(3); // the reference map and at least two entries
    // the chart loads lazily: wait for its accessible name
    await expect.poll(() => p.locator('#depth-value [aria-label^="Value of"]').count(), { timeout: 20_000 }).toBe(1);
    await p.getByRole('button', { name: 'Show as a table' }).click();
    await p.locator('#depth-table table').waitFor();
    await shots(p, 'depth');
    expect(errors).toEqual([]);
  });
});
