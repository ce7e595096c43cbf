/**
 * Submitting an entry in the browser: a team lead (demo account ines@cobalt.test) drops a file
 * with two errors (an unknown target id and a negative uncertainty) for ring-36-correlators, sees
 * both beside the cells they name, fixes them in the table, checks (the score preview against
 * the public references) and submits for review. Screenshots at desktop and phone width.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_PASSWORD, DESKTOP, launchBrowser, startServer, type RunningServer, shots, openPage, closeAll } from './harness';

let server: RunningServer;
let browser: Browser;
const contexts: BrowserContext[] = [];
const SLUG = 'ring-36-correlators';

async function newPage(viewport = DESKTOP): Promise<Page> {
  return openPage(browser, server.url, contexts, viewport);
}


async function getJson<T>(path: string): Promise<T> {
  const r = await fetch(server.url + path);
  if (!r.ok) throw new Error(`${path}: ${r.status} ${await r.text()}`);
  return (await r.json()) as T;
}

/** the demo computes references in the background during its first minute: poll until some are exact */
async function exactTargets(): Promise<{ key: string; value: number }[]> {
  const deadline = Date.now() + 120_000;
  for (;;) {
    const t = await getJson<{ targets: { key: string; reference: { status: string; value?: number } }[] }>(`/api/challenges/${SLUG}/targets`);
    const exact = t.targets.filter((x) => x.reference.status === 'exact' && Math.abs(x.reference.value!) < 0.9).map((x) => ({ key: x.key, value: x.reference.value! }));
    if (exact.length >= 3) return exact;
    // (values inside the physical bound, so that the small offsets below stay inside it too)
    if (Date.now() > deadline) throw new Error('no exact references after 2 minutes');
    await new Promise((r) => setTimeout(r, 2000));
  }
}

describe('submitting an entry in the browser', () => {
  beforeAll(async () => {
    server = await startServer();
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await closeAll(contexts, browser, server);
  });

  it('shows two errors beside their cells, takes the fixes, previews the scores and submits', async () => {
    const ch = await getJson<{ version: { version: number; checksum: string } }>(`/api/challenges/${SLUG}`);
    const refs = await exactTargets();
    const [a, b, c] = refs;
    const label = `Browser-test MPS χ=256 ${Date.now().toString(36)}`;
    const doc = {
      challenge: { id: SLUG, version: ch.version.version, checksum: `sha256:${ch.version.checksum}` },
      track: 'classical',
      label,
      method: { family: 'tensor-network', description: 'MPS with TEBD, invented for the browser test.', settings: { bondDimension: 256, truncation: 1e-10 } },
      resources: { wallTimeSeconds: 420, cpuCoreHours: 3.5 },
      license: 'CC-BY-4.0',
      estimates: [
        { target: a.key, value: Number((a.value + 0.004).toFixed(6)), uncertainty: 0.01, uncertaintyKind: 'systematic' },
        { target: 't99-h0.123456:z0', value: 0.5, uncertainty: 0.01, uncertaintyKind: 'systematic' }, // no such target
        { target: c.key, value: Number((c.value - 0.003).toFixed(6)), uncertainty: -0.02, uncertaintyKind: 'systematic' }, // negative uncertainty
      ],
    };

    const page = await newPage(DESKTOP);
    await page.goto('/sign-in');
    await page.getByLabel('E-mail', { exact: true }).fill('ines@cobalt.test');
    await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await page.getByTestId('user-menu-button').waitFor();

    // the menu leads to My entries, and from there to a new entry for the challenge
    await page.getByTestId('user-menu-button').click();
    await page.getByRole('menuitem', { name: 'My entries' }).click();
    await page.getByRole('heading', { level: 1, name: 'My entries' }).waitFor();
    await page.getByLabel('Challenge for a new entry').selectOption(SLUG);
    await page.getByRole('button', { name: 'New entry' }).click();
    await page.waitForURL((u) => u.pathname === `/challenges/${SLUG}/submit`);
    await page.getByTestId('estimates-table').waitFor();
    await shots(page, 'submit-01-empty');

    // 1. the file goes to the dry run as it is: both errors, listed with their pointers and beside their cells
    await page.getByTestId('file-input').setInputFiles({ name: 'cobalt-mps.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(doc, null, 2)) });
    const errors = page.getByTestId('error-list');
    await errors.waitFor();
    await errors.getByText('/estimates/1/target').waitFor();
    await errors.getByText('/estimates/2/uncertainty').waitFor();
    await page.getByTestId('cell-error-1-target').waitFor();
    await page.getByTestId('cell-error-2-uncertainty').waitFor();
    expect(await page.getByTestId('cell-error-2-uncertainty').textContent()).toMatch(/>= 0/);
    expect(await page.locator('#est-2-uncertainty').getAttribute('aria-invalid')).toBe('true');
    expect(await page.locator('#est-1-target').inputValue()).toBe('t99-h0.123456:z0');
    expect(await page.getByLabel('Label').inputValue()).toBe(label);
    await shots(page, 'submit-02-file-errors');

    // 2. fixes in the table: the marks go as each cell is corrected
    await page.locator('#est-1-target').selectOption(b.key);
    await page.getByTestId('cell-error-1-target').waitFor({ state: 'detached' });
    await page.locator('#est-1-value').fill((b.value + 0.002).toFixed(6));
    await page.locator('#est-2-uncertainty').fill('0.02');
    await page.getByTestId('cell-error-2-uncertainty').waitFor({ state: 'detached' });

    // 3. the check passes: warnings apart (a partial sweep), and the score preview
    await page.getByRole('button', { name: 'Check', exact: true }).click();
    await page.getByTestId('score-preview').waitFor();
    await page.getByTestId('warning-list').getByText('/estimates', { exact: true }).waitFor();
    expect(await page.getByTestId('error-list').count()).toBe(0);
    const rmse = Number((await page.getByTestId('preview-rmse').textContent())!.replace('\u2212', '-'));
    expect(rmse).toBeGreaterThan(0);
    expect(rmse).toBeLessThan(0.01);
    await shots(page, 'submit-03-preview');

    // 4. submit for review: it is saved as a draft, then sent to review
    await page.getByRole('button', { name: 'Submit for review' }).click();
    await page.waitForURL((u) => u.pathname === '/my-entries');
    const id = new URL(page.url()).searchParams.get('submitted')!;
    await page.getByTestId(`entry-${id}`).getByText('in review').waitFor();
    await shots(page, 'submit-04-my-entries');

    const stored = await (await page.request.get(`/api/entries/${id}`)).json() as { state: string; label: string; document: { estimates: { target: string; uncertainty: number }[] } };
    expect(stored.state).toBe('in-review');
    expect(stored.label).toBe(label);
    expect(stored.document.estimates.map((e) => e.target)).toEqual([a.key, b.key, c.key]);
    expect(stored.document.estimates[2].uncertainty).toBe(0.02);
  });
});
