/**
 * The public face, as a visitor without an account: the catalogue (search and filter), a challenge
 * page (standings sorted, the sweep plot's observable switched, the agreement matrix), an entry
 * page, and the CSV download. Screenshots of every view at desktop and phone width go to
 * test-output/screenshots/.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_PASSWORD, DESKTOP, launchBrowser, PHONE, shot, startServer, type RunningServer, openPage, closeAll } from './harness';

let server: RunningServer;
let browser: Browser;
const contexts: BrowserContext[] = [];
const SLUG = 'ring-36-correlators';

async function newPage(viewport = DESKTOP): Promise<Page> {
  return openPage(browser, server.url, contexts, viewport, { downloads: true });
}

async function shots(page: Page, name: string): Promise<void> {
  const own = page.viewportSize() ?? DESKTOP;
  await page.setViewportSize(DESKTOP);
  await page.waitForTimeout(300); // charts re-measure their box
  await shot(page, `public-${name}-desktop`);
  await page.setViewportSize(PHONE);
  await page.waitForTimeout(300);
  await shot(page, `public-${name}-phone`);
  await page.setViewportSize(own);
}

/** the demo data (references, entries, standings) is computed by background jobs after start */
async function waitForStandings(): Promise<void> {
  const deadline = Date.now() + 170_000;
  for (;;) {
    const r = await fetch(`${server.url}/api/challenges/${SLUG}/standings`).catch(() => null);
    const body = r?.ok ? ((await r.json()) as { status: string; entries: unknown[] }) : null;
    if (body?.status === 'ready' && body.entries.length >= 2) return;
    if (Date.now() > deadline) throw new Error(`standings of ${SLUG} not ready; server said:\n${server.output().slice(-3000)}`);
    await new Promise((res) => setTimeout(res, 2000));
  }
}

describe('the public pages in the browser', () => {
  beforeAll(async () => {
    server = await startServer();
    browser = await launchBrowser();
    await waitForStandings();
  }, 240_000);

  afterAll(async () => {
    await closeAll(contexts, browser, server);
  });

  it('a visitor browses, compares and downloads', async () => {
    const p = await newPage(DESKTOP);
    const errors: string[] = [];
    p.on('pageerror', (e) => errors.push(e.message));

    // the catalogue: a table at desktop, cards at phone width
    await p.goto('/challenges');
    const table = p.getByTestId('challenge-table');
    await table.waitFor();
    expect(await table.getByRole('row').count()).toBeGreaterThanOrEqual(4);
    await shots(p, '01-catalogue');

    // search and filter
    // each step waits for the table to show its own result, not merely a count the previous step
    // also produced (the search 'vacancy' and the lattice 'ring' both leave one row)
    const linkTexts = () => table.getByRole('link').allTextContents();
    await p.getByLabel('Search challenges').fill('vacancy');
    await expect.poll(linkTexts).toEqual([expect.stringMatching(/vacancy/i)]);
    await p.getByLabel('Search challenges').fill('');
    await expect.poll(() => table.getByRole('link').count()).toBeGreaterThanOrEqual(3);
    await p.getByLabel('Lattice').selectOption('ring');
    await expect.poll(linkTexts).toEqual([expect.stringMatching(/Ring of 36/)]);
    await shots(p, '02-catalogue-filtered');
    await p.getByRole('button', { name: 'clear filters' }).click();
    await expect.poll(() => table.getByRole('link').count()).toBeGreaterThanOrEqual(3);

    // a challenge: standings first
    await table.getByRole('link', { name: /Ring of 36/ }).click();
    const standings = p.getByTestId('standings-table');
    await standings.waitFor();
    const rows = standings.getByTestId('standings-row');
    expect(await rows.count()).toBeGreaterThanOrEqual(2);
    // whether it takes entries now, in the header (the demo challenges are open, both tracks)
    const status = p.getByTestId('submissions-status');
    await expect.poll(() => status.textContent()).toMatch(/Open for entries/);
    expect(await p.getByTestId('submissions-tracks').textContent()).toMatch(/hardware open.*classical open/);
    expect(await p.getByRole('link', { name: 'Submit an entry' }).getAttribute('href')).toBe(`/challenges/${SLUG}/submit`);
    await shots(p, '03-standings');

    // max error is one of the measures behind the 'All measures' switch; then sort by it (ascending, then descending)
    await p.getByRole('checkbox', { name: /all measures/i }).check();
    const maxErr = standings.getByRole('button', { name: /max error/i });
    await maxErr.click();
    const header = standings.getByRole('columnheader', { name: /max error/i });
    await expect.poll(() => header.getAttribute('aria-sort')).toMatch(/ascending|descending/);
    const firstSort = await header.getAttribute('aria-sort');
    await maxErr.click();
    await expect.poll(() => header.getAttribute('aria-sort')).not.toBe(firstSort);
    // the column really is in order
    const col = await header.evaluate((th) => (th as HTMLTableCellElement).cellIndex);
    const values = async () => (await rows.evaluateAll((trs, i) => trs.map((tr) => tr.children[i]?.textContent ?? ''), col)).map((s) => Number(s.replace('\u2212', '-'))).filter((x) => Number.isFinite(x));
    const v = await values();
    const sorted = [...v].sort((a, b) => (firstSort === 'ascending' ? b - a : a - b));
    expect(v).toEqual(sorted);
    await shots(p, '04-standings-sorted');

    // the rules behind the table: the rank column carries intervals, the score its coverage, and
    // the table links the public rules page (formulas, tolerance, rules version, worked example)
    expect(await standings.getByRole('columnheader', { name: /answered/i }).count()).toBe(1);
    expect(await rows.first().textContent()).toMatch(/\d+\/\d+/);
    await p.getByRole('link', { name: 'How scoring works' }).first().click();
    await p.getByTestId('scoring-example').waitFor();
    expect(await p.getByRole('heading', { name: 'How scoring works' }).count()).toBeGreaterThan(0);
    expect(await p.locator('body').textContent()).toMatch(/1e-10 × B/);
    await shots(p, '04b-scoring-rules');
    await p.goBack();
    await standings.waitFor();

    // the specification with the lattice and the instances
    await p.getByRole('tab', { name: 'Specification' }).click();
    await p.getByTestId('instances').waitFor();
    await p.getByTestId('checksum').waitFor();
    await shots(p, '05-specification');

    // the sweep plot, then another observable
    await p.getByRole('tab', { name: 'Sweep plot' }).click();
    await p.locator('#sweep svg').first().waitFor();
    await shots(p, '06-sweep');
    await p.getByRole('radio', { name: 'zz3', exact: true }).click();
    await expect.poll(() => new URL(p.url()).searchParams.get('observable')).toBe('zz3');
    await p.locator('#sweep svg').first().waitFor();
    await p.getByRole('button', { name: 'Show as a table' }).click();
    await p.getByTestId('sweep-table').waitFor();
    await shots(p, '07-sweep-zz3');

    // the agreement matrix, averaged and for one target
    await p.getByRole('tab', { name: 'Agreement' }).click();
    await p.getByLabel('Compare on').waitFor();
    await p.getByLabel('Compare on').selectOption('t4-h0.550000:zz3');
    await p.locator('#agreement svg').first().waitFor();
    await shots(p, '08-agreement');

    // accuracy against cost, verifiability, history and downloads
    await p.getByRole('tab', { name: 'Accuracy vs cost' }).click();
    await p.locator('#cost svg').first().waitFor();
    await shots(p, '09-cost');
    await p.getByRole('tab', { name: 'Verifiability' }).click();
    await p.getByTestId('verifiability-zz3').waitFor();
    await p.getByTestId('verifiability-zz3').getByRole('button').first().click();
    await p.getByTestId('target-detail').waitFor();
    await shots(p, '10-verifiability');
    await p.getByRole('tab', { name: 'History' }).click();
    await p.getByTestId('history').waitFor();
    await shots(p, '11-history');

    // downloads: the CSV arrives as a file
    await p.getByRole('tab', { name: 'Downloads' }).click();
    const [download] = await Promise.all([p.waitForEvent('download'), p.getByTestId('export-csv').click()]);
    expect(download.suggestedFilename()).toMatch(/\.csv$/);
    const path = await download.path();
    const { readFileSync } = await import('node:fs');
    const csv = readFileSync(path!, 'utf8');
    expect(csv.split('\n').length).toBeGreaterThan(10);
    await shots(p, '12-downloads');

    // an entry from the standings (the hardware one: it has noise-scaled data)
    await p.getByRole('tab', { name: 'Standings' }).click();
    await standings.waitFor();
    await standings.getByRole('link', { name: /ZNE/ }).first().click();
    await p.getByTestId('entry-estimates').waitFor();
    // the estimates table fits its column at desktop width (no sideways scroll)
    expect(await p.getByTestId('entry-estimates').evaluate((t) => t.parentElement!.scrollWidth - t.parentElement!.clientWidth)).toBeLessThanOrEqual(0);
    await p.getByTestId('entry-estimates').getByRole('button').nth(5).click();
    await p.getByTestId('zne').waitFor();
    await shots(p, '13-entry');

    // the team behind it
    await p.getByRole('main').getByRole('link', { name: 'Cobalt Qubit Lab' }).first().click();
    await p.getByTestId('team-entries').waitFor();
    await shots(p, '14-team');

    // a moderator opens a blind round later and closes another challenge: the pages say so
    const mod = await newPage(DESKTOP);
    const origin = { origin: server.url };
    expect((await mod.request.post('/api/auth/sign-in/email', { data: { email: 'moderator@parallax.test', password: DEMO_PASSWORD }, headers: origin })).ok()).toBe(true);
    const opensAt = new Date(Date.now() + 2 * 86_400_000).toISOString();
    const later = await mod.request.post('/api/challenges/vacancy-square-6x6/settings', { data: { submissionWindow: { opensAt }, reason: 'blind round opens later' }, headers: origin });
    expect(later.ok(), await later.text()).toBe(true);
    const closed = await mod.request.post('/api/challenges/braid-128/settings', { data: { state: 'closed', reason: 'round over' }, headers: origin });
    expect(closed.ok(), await closed.text()).toBe(true);
    await p.goto('/challenges/vacancy-square-6x6');
    await expect.poll(() => p.getByTestId('submissions-status').textContent()).toMatch(/Opens for submissions on .*drafts can be prepared now/);
    await p.getByText(/Drafts only: submissions open/).waitFor();
    await shots(p, '15-opens-later');
    await p.goto('/challenges/braid-128');
    await expect.poll(() => p.getByTestId('submissions-status').textContent()).toMatch(/Closed for entries/);
    await shots(p, '16-closed');

    // an entry hidden by the moderators: its page says so, with the reason, instead of "published"
    const listed = (await (await fetch(`${server.url}/api/challenges/${SLUG}/entries`)).json()) as { entries: { id: string; isBaseline: boolean }[] };
    const victim = listed.entries.find((e) => !e.isBaseline)!;
    const hide = await mod.request.post(`/api/entries/${victim.id}/curation`, { data: { hidden: { reason: 'values copied from another entry' } }, headers: origin });
    expect(hide.ok(), await hide.text()).toBe(true);
    await p.goto(`/entries/${victim.id}`);
    await expect.poll(() => p.getByTestId('entry-hidden').textContent()).toBe('hidden by the moderators: values copied from another entry');
    await shots(p, '16b-hidden-entry');
    expect((await mod.request.post(`/api/entries/${victim.id}/curation`, { data: { hidden: null }, headers: origin })).ok()).toBe(true);

    // the home page lists the challenges as cards
    await p.goto('/');
    await p.getByTestId('challenge-list').waitFor();
    await shots(p, '17-home');

    expect(errors).toEqual([]);
  });
});
