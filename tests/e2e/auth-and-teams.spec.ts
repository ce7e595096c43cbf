/**
 * The first browser journey: a new user signs up, is verified through the admin's outbox, signs
 * in, creates a team and invites a second (new) user, who signs up, is verified the same way,
 * opens the invitation link, accepts it, and the team page then lists both members.
 * Screenshots of every step at desktop and phone width go to test-output/screenshots/.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_PASSWORD, DESKTOP, launchBrowser, PHONE, shot, startServer, type RunningServer, shots, openPage, closeAll } from './harness';

let server: RunningServer;
let browser: Browser;
const contexts: BrowserContext[] = [];

const stamp = Date.now().toString(36);
const alice = { name: 'Alma Reyes', email: `alma.${stamp}@example.test`, password: 'correct horse battery' };
const bruno = { name: 'Bruno Tamm', email: `bruno.${stamp}@example.test`, password: 'staple gun lantern' };
const teamName = `Falcon Tensor Group ${stamp}`;

async function newPage(viewport = DESKTOP): Promise<Page> {
  return openPage(browser, server.url, contexts, viewport, { timeoutMs: 15_000 });
}


async function signUp(page: Page, who: typeof alice, path = '/sign-up'): Promise<void> {
  await page.goto(path);
  await page.getByLabel('Name', { exact: true }).fill(who.name);
  await page.getByLabel('E-mail', { exact: true }).fill(who.email);
  await page.getByLabel('Password', { exact: true }).fill(who.password);
  await page.getByLabel('Confirm password', { exact: true }).fill(who.password);
  await page.getByRole('button', { name: 'Create account' }).click();
  await page.getByTestId('sign-up-done').waitFor();
}

async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

/** the admin opens the newest mail to `to` whose subject contains `subject`; returns its first link */
async function linkFromOutbox(admin: Page, to: string, subject: string, shotName?: string): Promise<string> {
  await admin.goto('/admin/outbox');
  await admin.getByLabel('Filter by recipient').fill(to);
  const item = admin.getByTestId('outbox-list').getByRole('link').filter({ hasText: subject }).first();
  // the mail server and the list both take a moment (the server may be busy computing references)
  const deadline = Date.now() + 45_000;
  for (;;) {
    try {
      await item.waitFor({ timeout: 6_000 });
      break;
    } catch {
      if (Date.now() > deadline) {
        await shot(admin, 'failed-outbox');
        throw new Error(`no mail "${subject}" to ${to} in the outbox; server said:\n${server.output().slice(-3000)}`);
      }
      await admin.reload();
      await admin.getByLabel('Filter by recipient').fill(to);
    }
  }
  if (shotName) await shots(admin, `${shotName}-outbox`);
  await item.click();
  const link = admin.getByTestId('mail-link').first();
  await link.waitFor();
  if (shotName) await shots(admin, `${shotName}-message`);
  const href = await link.getAttribute('href');
  expect(href).toBeTruthy();
  return href!;
}

describe('sign-up, verification, teams and invitations in the browser', () => {
  beforeAll(async () => {
    server = await startServer();
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await closeAll(contexts, browser, server);
  });

  it('takes two new people from sign-up to one team', async () => {
    // the public home page
    const a = await newPage(DESKTOP);
    await a.goto('/');
    await a.getByTestId('challenge-list').waitFor();
    await shots(a, '01-home');

    // 1. Alma signs up
    await signUp(a, alice);
    await shots(a, '02-sign-up-done');

    // signing in before confirming says so, with a resend button
    await a.goto('/sign-in');
    await signIn(a, alice.email, alice.password);
    await a.getByTestId('not-verified').waitFor();
    await expect(a.getByRole('button', { name: /send the confirmation mail again/i }).isVisible()).resolves.toBe(true);
    await shots(a, '03-sign-in-not-verified');

    // 2. the admin, in a separate browser context, finds the confirmation mail
    const admin = await newPage(DESKTOP);
    await admin.goto('/sign-in');
    await signIn(admin, 'admin@parallax.test', DEMO_PASSWORD);
    await admin.getByTestId('user-menu-button').waitFor();
    await admin.goto('/admin');
    await admin.getByTestId('users-table').waitFor();
    await shots(admin, '04-admin-users');
    const verifyLink = await linkFromOutbox(admin, alice.email, 'Confirm your e-mail', '05-verify-alma');
    expect(verifyLink).toContain('/api/auth/verify-email?token=');

    // 3. Alma follows the link, lands on /verified, signs in
    await a.goto(verifyLink);
    await a.getByTestId('verified').waitFor();
    expect(new URL(a.url()).pathname).toBe('/verified');
    await shots(a, '06-verified');
    await a.getByRole('main').getByRole('link', { name: 'Sign in' }).click();
    await signIn(a, alice.email, alice.password);
    await a.getByTestId('user-menu-button').waitFor();

    // 4. she creates a team
    await a.goto('/teams');
    await a.getByLabel('Team name').fill(teamName);
    expect(await a.getByLabel('Slug').inputValue()).toBe(`falcon-tensor-group-${stamp}`);
    await a.getByText('Classical simulation').first().click();
    await a.getByLabel('Description (optional)').fill('Invented for the browser test: MPS and belief-propagation PEPS.');
    await shots(a, '07-create-team');
    await a.getByRole('button', { name: 'Create the team' }).click();
    await a.getByRole('heading', { level: 1, name: teamName }).waitFor();
    expect(a.url()).toMatch(/\/teams\/[^/]+$/);
    const teamPath = new URL(a.url()).pathname;

    // 5. and invites Bruno as a member
    await a.getByLabel('E-mail', { exact: true }).fill(bruno.email);
    await a.getByRole('button', { name: 'Send invitation' }).click();
    await a.getByText(`Invitation sent to ${bruno.email}`).waitFor();
    await a.getByTestId('invitations').getByText(bruno.email).waitFor();
    await shots(a, '08-team-invited');

    // 6. Bruno (on a phone) signs up and is verified the same way
    const b = await newPage(PHONE);
    await signUp(b, bruno);
    const verifyBruno = await linkFromOutbox(admin, bruno.email, 'Confirm your e-mail');
    await b.goto(verifyBruno);
    await b.getByTestId('verified').waitFor();

    // 7. he opens the invitation link from the outbox: signed out, he is asked to sign in first
    const inviteLink = await linkFromOutbox(admin, bruno.email, 'Join the team', '09-invitation-mail');
    expect(new URL(inviteLink).pathname).toMatch(/^\/invitations\//);
    await b.goto(inviteLink);
    await b.getByTestId('invitation-signed-out').waitFor();
    await shots(b, '10-invitation-signed-out');
    await b.getByRole('main').getByRole('link', { name: 'Sign in' }).click();
    expect(new URL(b.url()).searchParams.get('next')).toBe(new URL(inviteLink).pathname);
    await signIn(b, bruno.email, bruno.password);

    // 8. back on the invitation, he accepts
    await b.getByTestId('invitation-team').waitFor();
    expect(await b.getByTestId('invitation-team').textContent()).toBe(teamName);
    await shots(b, '11-invitation');
    await b.getByRole('button', { name: 'Accept and join the team' }).click();
    await b.waitForURL((u) => u.pathname === teamPath);

    // 9. the team page lists both members (names only)
    const members = b.getByTestId('members');
    await members.getByText(alice.name).waitFor();
    await members.getByText(bruno.name).waitFor();
    expect(await b.locator('main').textContent()).not.toContain(alice.email);
    await shots(b, '12-team-both-members');

    // and the lead sees the invitation accepted
    await a.reload();
    await a.getByTestId('members').getByText(bruno.name).waitFor();
    await a.getByTestId('invitations').getByText('accepted').waitFor();
    await shots(a, '13-team-lead-view');
  });
});
