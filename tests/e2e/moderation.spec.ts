/**
 * Moderation in the browser: the moderator publishes a new challenge from an uploaded spec and
 * watches its reference job; a team lead (ines@cobalt.test) submits an entry to it; the moderator
 * returns it with a reason; the lead sees the reason on My entries and resubmits; the moderator
 * publishes it, and it appears in the standings. Screenshots at desktop and phone width.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_PASSWORD, DESKTOP, launchBrowser, PHONE, shot, startServer, type RunningServer, shots, openPage, closeAll } from './harness';

let server: RunningServer;
let browser: Browser;
const contexts: BrowserContext[] = [];
let failing: Page | null = null;
const stamp = Date.now().toString(36);
const SLUG = `e2e-chain-${stamp}`;
const spec = {
  id: SLUG,
  version: 1,
  title: `Test chain ${stamp}, 12 sites`,
  description: 'A small kicked Ising chain, invented for the moderation browser test.',
  license: 'CC-BY-4.0',
  tags: ['chain'],
  lattice: { kind: 'chain', n: 12 },
  circuit: { family: 'kicked-ising', steps: [1, 2, 4], thetaH: [0.25, 0.5], thetaJ: -Math.PI / 2 },
  observables: [{ id: 'z0', pauli: 'Z0' }, { id: 'z6', pauli: 'Z6' }, { id: 'zz5', pauli: 'Z5 Z6' }],
};

async function newPage(viewport = DESKTOP): Promise<Page> {
  return openPage(browser, server.url, contexts, viewport);
}


async function signIn(page: Page, email: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.getByTestId('user-menu-button').waitFor();
}

async function poll<T>(what: string, fn: () => Promise<T | null | undefined | false>, ms = 120_000): Promise<T> {
  const deadline = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}\n${server.output().slice(-2000)}`);
    await new Promise((r) => setTimeout(r, 1000));
  }
}

describe('moderation in the browser', () => {
  beforeAll(async () => {
    server = await startServer();
    browser = await launchBrowser();
  });
  afterEach(async (ctx) => {
    if (ctx.task.result?.state === 'fail' && failing) await shot(failing, 'failed-moderation').catch(() => undefined);
  });
  afterAll(async () => {
    await closeAll(contexts, browser, server);
  });

  it('publishes a challenge, returns an entry with a reason, and publishes the resubmission', async () => {
    const mod = await newPage(DESKTOP);
    failing = mod;
    await signIn(mod, 'moderator@parallax.test');

    // the demo computes its data in the background first: wait for its queue
    await poll('the demo review queue', async () => {
      const r = await mod.request.get('/api/moderation/queue');
      return r.ok() && ((await r.json()) as { count: number }).count > 0;
    });
    await mod.getByTestId('user-menu-button').click();
    await mod.getByRole('menuitem', { name: 'Moderation' }).click();
    // (the queue's checks are computed on the fly; the server is busy with the demo's references)
    await mod.getByTestId('review-queue').waitFor({ timeout: 60_000 });
    await shots(mod, 'moderation-01-queue');

    // 1. the challenge: upload → preview → draft → publish → the reference job's progress
    await mod.getByRole('navigation', { name: 'Moderation' }).getByRole('link', { name: 'Challenges' }).click();
    await mod.getByTestId('file-input').setInputFiles({ name: `${SLUG}.json`, mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(spec, null, 2)) });
    await mod.getByTestId('spec-preview').waitFor();
    await mod.getByTestId('lattice-drawing').waitFor();
    expect(await mod.getByTestId('lattice-drawing').locator('circle').count()).toBe(12);
    expect(await mod.getByTestId('instance-grid').locator('tbody tr').count()).toBe(3);
    await mod.getByTestId('plan-summary').getByText('free-fermion').waitFor();
    await shots(mod, 'moderation-02-spec-preview');
    await mod.getByRole('button', { name: 'Store the draft' }).click();
    await mod.getByTestId('draft-stored').waitFor();
    await mod.getByRole('button', { name: 'Publish', exact: true }).click();
    await mod.getByTestId('reference-job').getByRole('progressbar').waitFor();
    await shots(mod, 'moderation-03-reference-job');
    await mod.getByTestId('job-state').getByText('job done').waitFor({ timeout: 120_000 });
    await shots(mod, 'moderation-04-reference-job-done');

    const ch = (await (await mod.request.get(`/api/challenges/${SLUG}`)).json()) as { state: string; version: { version: number; checksum: string } };
    expect(ch.state).toBe('open');
    const targets = (await (await mod.request.get(`/api/challenges/${SLUG}/targets`)).json()) as { targets: { key: string; reference: { status: string; value?: number } }[] };
    expect(targets.targets.length).toBe(18);

    // 2. the team lead submits an entry to it (through the API, as a script would)
    const lead = await newPage(PHONE);
    await signIn(lead, 'ines@cobalt.test');
    const origin = { Origin: server.url };
    const doc = {
      challenge: { id: SLUG, version: ch.version.version, checksum: `sha256:${ch.version.checksum}` },
      track: 'classical', label: `Cobalt MPS ${stamp}`, method: { family: 'tensor-network', settings: { bondDimension: 64 } },
      estimates: targets.targets.map((t) => ({ target: t.key, value: Number(((t.reference.value ?? 0) + 0.001).toFixed(6)), uncertainty: 0.005, uncertaintyKind: 'systematic' })),
    };
    const created = await lead.request.post(`/api/challenges/${SLUG}/entries`, { data: doc, headers: origin });
    expect(created.status(), await created.text()).toBe(201);
    const entryId = ((await created.json()) as { id: string }).id;
    const sub = await lead.request.post(`/api/entries/${entryId}/submit`, { data: {}, headers: origin });
    expect(sub.ok(), await sub.text()).toBe(true);

    // 3. the moderator reviews it and returns it with a reason
    await mod.getByRole('navigation', { name: 'Moderation' }).getByRole('link', { name: 'Review queue' }).click();
    await mod.getByTestId(`queue-item-${entryId}`).click();
    await mod.getByTestId('entry-review').waitFor();
    await mod.getByTestId('entry-review').getByTestId('check-badges').first().waitFor();
    await mod.getByRole('radio', { name: 'Return to the team' }).click();
    await mod.getByRole('button', { name: 'Return to the team' }).click();
    await mod.getByText('Give a reason: the team reads it.').waitFor();
    const reason = 'Please state the truncation threshold and the wall time in the resources.';
    await mod.getByLabel('Reason').fill(reason);
    await shots(mod, 'moderation-05-review');
    await mod.getByRole('button', { name: 'Return to the team' }).click();
    await mod.getByText(/returned to the team/).waitFor();
    await expect.poll(() => mod.getByTestId(`queue-item-${entryId}`).count()).toBe(0);

    // 4. the lead sees the reason on My entries, opens the entry, and resubmits
    await lead.goto('/my-entries');
    const row = lead.getByTestId(`entry-${entryId}`);
    await row.getByTestId('returned-reason').getByText(reason, { exact: false }).waitFor();
    await shots(lead, 'moderation-06-returned-my-entries');
    await row.getByRole('link', { name: 'Edit' }).click();
    await lead.getByText(reason, { exact: false }).waitFor();
    await lead.getByRole('button', { name: 'Add a setting' }).click();
    await lead.getByLabel('Setting 2 name').fill('truncation');
    await lead.getByLabel('Setting 2 value').fill('1e-9');
    await lead.getByLabel('Wall time (s)').fill('95');
    await shots(lead, 'moderation-07-returned-edit');
    await lead.getByRole('button', { name: 'Submit for review' }).click();
    await lead.waitForURL((u) => u.pathname === '/my-entries');
    await lead.getByTestId(`entry-${entryId}`).getByText('in review').waitFor();

    // 5. the moderator publishes the resubmission
    await mod.reload();
    await mod.getByTestId(`queue-item-${entryId}`).click();
    await mod.getByTestId('entry-review').getByText('Earlier decisions').waitFor();
    await mod.getByLabel('Reason').fill('Resources complete; checks clear.');
    await mod.getByRole('button', { name: 'Publish', exact: true }).click();
    await mod.getByText(/published\./).waitFor();
    await shots(mod, 'moderation-08-published');

    // 6. it reaches the standings once they are recomputed
    await poll('the entry in the standings', async () => {
      const r = await fetch(`${server.url}/api/challenges/${SLUG}/standings`);
      if (!r.ok) return false;
      const s = (await r.json()) as { entries: { id: string }[] };
      return s.entries.some((e) => e.id === entryId);
    });
    const stored = (await (await lead.request.get(`/api/entries/${entryId}`)).json()) as { state: string; document: { method: { settings: Record<string, unknown> }; resources: { wallTimeSeconds: number } } };
    expect(stored.state).toBe('published');
    expect(stored.document.method.settings.truncation).toBe(1e-9);
    expect(stored.document.resources.wallTimeSeconds).toBe(95);

    // 7. two moderators at once: the admin decides a demo entry while the moderator has it open
    await mod.goto('/moderation');
    const demo = ((await (await mod.request.get('/api/moderation/queue')).json()) as { entries: { id: string }[] }).entries[0];
    await mod.getByTestId(`queue-item-${demo.id}`).click();
    await mod.getByTestId('decision-form').waitFor();
    const admin = await browser.newContext({ baseURL: server.url });
    contexts.push(admin);
    const signedIn = await admin.request.post('/api/auth/sign-in/email', { data: { email: 'admin@parallax.test', password: DEMO_PASSWORD }, headers: origin });
    expect(signedIn.ok()).toBe(true);
    const first = await admin.request.post(`/api/entries/${demo.id}/decision`, { data: { decision: 'reject', reason: 'Identical values to a published entry.' }, headers: origin });
    expect(first.ok(), await first.text()).toBe(true);
    await mod.getByLabel('Reason').fill('Looks fine to me.');
    await mod.getByRole('button', { name: 'Publish', exact: true }).click();
    await mod.getByText(/already decided \(rejected by Ada Quist/).waitFor();
    await expect.poll(() => mod.getByTestId(`queue-item-${demo.id}`).count()).toBe(0);
    await shots(mod, 'moderation-09-conflict');

    // the audit log lists both decisions
    await mod.goto(`/moderation/audit?subjectId=${entryId}`);
    await mod.getByTestId('audit-table').getByText(`return: “${reason}”`).waitFor();
    await shots(mod, 'moderation-10-audit');
    await mod.goto(`/moderation/challenges/${SLUG}`);
    await mod.getByRole('heading', { name: 'Settings' }).waitFor();
    await mod.getByText(`Cobalt MPS ${stamp}`).waitFor();
    await shots(mod, 'moderation-11-challenge-tools');
  }, 420_000); // the reference job shares the worker with the demo's first minute of computing
});
