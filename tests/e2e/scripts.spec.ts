/**
 * Issue 13, for scripts and followers, in the browser against a real server with the demo: a team
 * lead downloads the sample entry file and sends it unchanged through the dry run (the page's check
 * and POST /api/entries/validate); the API reference page; the README's Python example run against
 * the server; a reader follows a challenge, a moderator publishes an entry, the mail arrives in the
 * fake mail server (read in the admin's outbox) and its unfollow link works; the Atom feed parses.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { PYTHON_EXAMPLE } from '../../src/features/api-docs/examples';
import { DEMO_PASSWORD, DESKTOP, closeAll, launchBrowser, openPage, shots, startServer, type RunningServer } from './harness';

let server: RunningServer;
let browser: Browser;
const contexts: BrowserContext[] = [];
const SLUG = 'ring-36-correlators';

async function signedIn(email: string, opts: { downloads?: boolean } = {}): Promise<Page> {
  const page = await openPage(browser, server.url, contexts, DESKTOP, opts);
  await page.goto('/sign-in');
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.getByTestId('user-menu-button').waitFor();
  return page;
}

const hasPython = (() => { try { execFileSync('python3', ['--version']); return true; } catch { return false; } })();

describe('scripts, the API reference, following and the feed', () => {
  beforeAll(async () => {
    server = await startServer();
    browser = await launchBrowser();
  }, 180_000);
  afterAll(async () => { await closeAll(contexts, browser, server); });

  it('the downloaded sample file goes unchanged through the dry run, on the page and by the API', async () => {
    const lead = await signedIn('ines@cobalt.test', { downloads: true });
    await lead.goto(`/challenges/${SLUG}/submit`);
    await lead.getByTestId('estimates-table').waitFor();
    // Cobalt Qubit Lab is a hardware team: its new entry starts in the hardware track
    expect(await lead.getByLabel('Track').inputValue()).toBe('hardware');
    const [download] = await Promise.all([lead.waitForEvent('download'), lead.getByTestId('sample-entry').click()]);
    expect(download.suggestedFilename()).toBe(`${SLUG}-v1-sample-entry.json`);
    const bytes = readFileSync((await download.path())!);
    // by the API: the bytes as downloaded
    const r = await fetch(`${server.url}/api/entries/validate`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: bytes });
    const body = await r.json() as { valid: boolean; coverage: { fraction: number }; error?: unknown };
    expect(r.status, JSON.stringify(body)).toBe(200);
    expect(body.valid).toBe(true);
    expect(body.coverage.fraction).toBe(1);
    // on the page: the file dropped as it is
    await lead.getByTestId('file-input').setInputFiles({ name: download.suggestedFilename(), mimeType: 'application/json', buffer: bytes });
    await lead.getByTestId('check-results').getByText(/The entry is valid/).waitFor();
    expect(await lead.getByTestId('error-list').count()).toBe(0);
    await shots(lead, 'scripts-01-sample-checked');
  });

  it('the API reference page lists the routes and shows the Python example; the README example runs against the server', async () => {
    const p = await openPage(browser, server.url, contexts, DESKTOP);
    await p.goto('/');
    await p.getByRole('link', { name: 'API reference' }).click();
    await p.getByRole('heading', { level: 1, name: 'API reference' }).waitFor();
    await p.getByTestId('api-operations').first().waitFor();
    await p.getByText('/api/challenges/{slug}/sample-entry.json', { exact: true }).waitFor();
    await p.getByText('/api/entries/{entryId}', { exact: true }).first().waitFor();
    expect(await p.getByTestId('python-example').textContent()).toBe(PYTHON_EXAMPLE);
    expect(await p.getByTestId('entry-fields').getByText('estimates[].uncertaintyKind').count()).toBe(1);
    await shots(p, 'scripts-02-api-reference');

    if (!hasPython) { console.warn('python3 not found: the README example was not run'); return; }
    const lead = await signedIn('ines@cobalt.test');
    const teamId = ((await (await lead.request.get('/api/me')).json()) as { teams: { id: string }[] }).teams[0].id;
    const k = await lead.request.post(`/api/teams/${teamId}/api-keys`, { data: { name: 'python example' }, headers: { origin: server.url } });
    expect(k.ok(), await k.text()).toBe(true);
    const run = spawnSync('python3', ['-'], { input: PYTHON_EXAMPLE, encoding: 'utf8', timeout: 60_000, env: { ...process.env, PARALLAX_URL: server.url, PARALLAX_KEY: (await k.json()).key, PARALLAX_CHALLENGE: SLUG } });
    expect(run.status, run.stdout + run.stderr).toBe(0);
    expect(run.stdout).toMatch(/draft [0-9a-f-]{36} \(created\)/);
    expect(run.stdout).toMatch(/is in-review/);
  });

  it('a reader follows a challenge, a publication is mailed through the fake mail server, the unfollow link works; the Atom feed parses', async () => {
    const reader = await signedIn('jonas@sprint.test');
    await reader.goto(`/challenges/${SLUG}`);
    await reader.getByTestId('follow').getByRole('button', { name: 'Follow' }).click();
    await reader.getByTestId('follow').getByRole('button', { name: /Following/ }).waitFor();
    await shots(reader, 'scripts-03-following');

    // a moderator publishes the demo entry waiting in review for this challenge
    const mod = await signedIn('moderator@parallax.test');
    let entry: { id: string; label: string } | undefined;
    for (const deadline = Date.now() + 150_000; !entry; await new Promise((r) => setTimeout(r, 2000))) {
      const q = (await (await mod.request.get('/api/moderation/queue')).json()) as { entries: { id: string; label: string; challenge: { slug: string } }[] };
      entry = q.entries.find((e) => e.challenge.slug === SLUG && /MPS/.test(e.label));
      if (!entry && Date.now() > deadline) throw new Error(`no entry in review for ${SLUG}:\n${server.output().slice(-2000)}`);
    }
    const d = await mod.request.post(`/api/entries/${entry.id}/decision`, { data: { decision: 'publish', reason: 'checked against the references' }, headers: { origin: server.url } });
    expect(d.ok(), await d.text()).toBe(true);

    // the mail, in the admin's outbox
    const admin = await signedIn('admin@parallax.test');
    const subject = `new entry on ${SLUG}`;
    for (const deadline = Date.now() + 30_000; ;) {
      await admin.goto('/admin/outbox');
      await admin.getByLabel('Filter by recipient').fill('jonas@sprint.test');
      const item = admin.getByTestId('outbox-list').getByRole('link').filter({ hasText: subject }).first();
      try { await item.waitFor({ timeout: 5_000 }); await item.click(); break; } catch { if (Date.now() > deadline) throw new Error('no follow mail'); }
    }
    const text = (await admin.getByTestId('mail-text').textContent())!;
    expect(text).toContain(entry.label);
    expect(text).toContain(`${server.url}/entries/${entry.id}`);
    const unfollow = (await admin.getByTestId('mail-link').allTextContents()).find((l) => l.includes('/unfollow/'))!;
    expect(unfollow).toBeTruthy();
    await shots(admin, 'scripts-04-follow-mail');

    // the unfollow link needs no sign-in
    const visitor = await openPage(browser, server.url, contexts, DESKTOP);
    await visitor.goto(new URL(unfollow).pathname);
    await visitor.getByRole('button', { name: 'Stop following' }).click();
    await visitor.getByText(/You no longer follow/).waitFor();
    await reader.goto(`/challenges/${SLUG}`);
    await reader.getByTestId('follow').getByRole('button', { name: 'Follow' }).waitFor();

    // the Atom feed, parsed by the browser's XML parser
    const feed = await visitor.request.get(`/api/challenges/${SLUG}/feed.atom`);
    expect(feed.headers()['content-type']).toContain('application/atom+xml');
    const xml = await feed.text();
    const parsed = await visitor.evaluate((x) => {
      const doc = new DOMParser().parseFromString(x, 'application/xml');
      const ns = 'http://www.w3.org/2005/Atom';
      const root = doc.documentElement;
      const kid = (el: Element, n: string) => [...el.children].find((c) => c.namespaceURI === ns && c.localName === n);
      return {
        error: doc.getElementsByTagName('parsererror').length,
        root: root.localName, ns: root.namespaceURI,
        id: kid(root, 'id')?.textContent, title: kid(root, 'title')?.textContent, updated: kid(root, 'updated')?.textContent,
        entries: [...root.children].filter((c) => c.localName === 'entry').map((e) => ({ id: kid(e, 'id')?.textContent, title: kid(e, 'title')?.textContent, updated: kid(e, 'updated')?.textContent, href: kid(e, 'link')?.getAttribute('href') })),
      };
    }, xml);
    expect(parsed).toMatchObject({ error: 0, root: 'feed', ns: 'http://www.w3.org/2005/Atom', id: `${server.url}/challenges/${SLUG}` });
    expect(parsed.title).toContain('Ring of 36');
    expect(Number.isFinite(Date.parse(parsed.updated!))).toBe(true);
    const mine = parsed.entries.find((e) => e.title?.includes(entry!.label));
    expect(mine).toMatchObject({ id: `${server.url}/entries/${entry.id}`, href: `${server.url}/entries/${entry.id}` });
    for (const e of parsed.entries) expect(Number.isFinite(Date.parse(e.updated!))).toBe(true);
  });
});
