/**
 * Browser-test harness: a real server process (prebuilt once per run, see tests/e2e/global-setup.ts)
 * on a fresh copy of the demo data directory that the global setup seeded and computed once, and
 * Debian's chromium driven by playwright-core. Screenshots go to test-output/screenshots/.
 */
import { spawn, execFileSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { inject } from 'vitest';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { freePort } from '../support/free-port';

const root = fileURLToPath(new URL('../..', import.meta.url));
export const SHOTS = path.join(root, 'test-output', 'screenshots');
export const DEMO_PASSWORD = 'parallax-demo-2026';

export { freePort };

export interface RunningServer { url: string; dataDir: string; output: () => string; stop(): Promise<void> }

/**
 * Waits until the demo data directory that tests/e2e/global-setup.ts prepares in the background is
 * ready (its process exited 0); throws with that process's output if it failed.
 */
export async function waitForDemo(timeoutMs = 1_680_000): Promise<string> {
  const demo = inject('demoDataDir');
  const work = path.dirname(demo);
  const deadline = Date.now() + timeoutMs;
  while (!existsSync(path.join(work, 'exit.txt'))) {
    if (Date.now() > deadline) throw new Error(`the demo data directory was not prepared in ${timeoutMs / 1000} s`);
    await new Promise((r) => setTimeout(r, 250));
  }
  const status = readFileSync(path.join(work, 'exit.txt'), 'utf8');
  if (status !== '0') throw new Error(`preparing the demo data directory failed (${status}):\n${readFileSync(path.join(work, 'prepare.log'), 'utf8').slice(-4000)}`);
  return demo;
}

/**
 * A real server on a fresh data directory (a copy of the prepared demo one unless SEED_DEMO=0);
 * retried on a new port if the chosen one was taken meanwhile.
 */
export async function startServer(env: Record<string, string> = {}): Promise<RunningServer> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await startServerOnce(env);
    } catch (e) {
      if (attempt >= 5 || !String((e as Error).message).includes('EADDRINUSE')) throw e;
    }
  }
}

async function startServerOnce(env: Record<string, string>): Promise<RunningServer> {
  const port = await freePort();
  const dataDir = mkdtempSync(path.join(os.tmpdir(), 'parallax-e2e-'));
  if (env.SEED_DEMO !== '0') cpSync(await waitForDemo(), dataDir, { recursive: true });
  const url = `http://127.0.0.1:${port}`;
  const child = spawn(process.execPath, [inject('serverBundle')], {
    cwd: root,
    env: { ...process.env, DATA_DIR: dataDir, PORT: String(port), HOST: '127.0.0.1', BASE_URL: url, FAKE_SMTP_PORT: '0', LOG_LEVEL: 'warn', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout.on('data', (d) => { out += d; });
  child.stderr.on('data', (d) => { out += d; });
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`server did not start in 60 s:\n${out}`)), 60_000);
    const check = () => { if (out.includes('Parallax is running at')) { clearTimeout(timer); resolve(); } };
    child.stdout.on('data', check);
    child.once('exit', (code) => { clearTimeout(timer); reject(new Error(`server exited ${code}:\n${out}`)); });
  });
  return {
    url,
    dataDir,
    output: () => out,
    stop: async () => {
      if (child.exitCode === null) {
        child.kill('SIGTERM');
        await new Promise((r) => child.once('exit', r));
      }
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export function chromiumPath(): string {
  return execFileSync('bash', ['-c', 'command -v chromium'], { encoding: 'utf8' }).trim();
}

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: chromiumPath(),
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
}

/**
 * A page in a fresh browser context (own cookies) on the test server; the context is remembered in
 * `contexts` so that closeAll can close it.
 */
export async function openPage(browser: Browser, baseURL: string, contexts: BrowserContext[], viewport: { width: number; height: number }, opts: { timeoutMs?: number; downloads?: boolean } = {}): Promise<Page> {
  const ctx = await browser.newContext({ viewport, baseURL, acceptDownloads: opts.downloads ?? false });
  contexts.push(ctx);
  const page = await ctx.newPage();
  page.setDefaultTimeout(opts.timeoutMs ?? 20_000);
  return page;
}

/** Closes every context, the browser and the server (each step tolerant of an earlier failure). */
export async function closeAll(contexts: BrowserContext[], browser: Browser | undefined, server: RunningServer | undefined): Promise<void> {
  for (const c of contexts) await c.close().catch(() => undefined);
  await browser?.close().catch(() => undefined);
  await server?.stop();
}

export const DESKTOP = { width: 1280, height: 800 };
export const PHONE = { width: 390, height: 844 };

export async function shot(page: Page, name: string): Promise<void> {
  mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: true });
}

/** A full-page screenshot at desktop and at phone width, then back to the page's own width. */
export async function shots(page: Page, name: string): Promise<void> {
  const own = page.viewportSize() ?? DESKTOP;
  await page.setViewportSize(DESKTOP);
  await shot(page, `${name}-desktop`);
  await page.setViewportSize(PHONE);
  await shot(page, `${name}-phone`);
  await page.setViewportSize(own);
}
