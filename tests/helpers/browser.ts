import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { projectRoot } from '../../server/src/config.ts';

const CHROMIUM = process.env.CARTOUCHE_CHROMIUM ?? '/usr/bin/chromium';

/** Debian's Chromium, headless, with the background networking this closed machine refuses switched off. */
export async function launchBrowser(): Promise<Browser> {
  if (!existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} is missing: run the tests through \`npm test\`, which installs Debian's chromium`);
  return chromium.launch({
    executablePath: CHROMIUM,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
}

const axeSource = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');

export interface AxeViolation {
  id: string;
  impact: string | null;
  help: string;
  nodes: Array<{ target: string[] }>;
}

/** Runs axe-core (Deque's WCAG rules engine) in the page against WCAG 2.0, 2.1 and 2.2 levels A and AA. */
export async function axeViolations(page: Page): Promise<AxeViolation[]> {
  await settle(page);
  await page.addScriptTag({ content: axeSource });
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run(ctx: Document, opts: unknown): Promise<{ violations: AxeViolation[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa'] } });
    return result.violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.map((n) => ({ target: n.target })) }));
  });
}

/**
 * Waits for the fonts and every finished CSS transition or animation of the document. A control that changes
 * its colours in place (a button turning from primary to secondary) passes through low-contrast mixtures for
 * its transition's length, and axe's color-contrast reads the colours of the moment it runs: on a loaded
 * machine that moment can fall inside the transition. Endless animations (a loading pulse) are left to run.
 */
async function settle(page: Page): Promise<void> {
  await page.evaluate(async () => {
    await document.fonts.ready;
    for (let round = 0; round < 5; round++) {
      const running = document.getAnimations().filter((a) => (a.playState === 'running' || a.pending) && a.effect?.getTiming().iterations !== Infinity);
      if (running.length === 0) break;
      await Promise.all(running.map((a) => a.finished.catch(() => undefined)));
    }
  });
}

/** Saves a screenshot under .data/screenshots/ so a person can look at what the test saw. */
export async function screenshot(page: Page, name: string): Promise<string> {
  const dir = join(projectRoot, '.data', 'screenshots');
  mkdirSync(dir, { recursive: true });
  const path = join(dir, `${name}.png`);
  await page.screenshot({ path, fullPage: true });
  return path;
}

export const clientBuildDir = process.env.CARTOUCHE_CLIENT_DIR ?? join(projectRoot, 'dist', 'client');

export function assertClientBuilt(): void {
  if (!existsSync(join(clientBuildDir, 'index.html'))) throw new Error('dist/client is missing: run `npm run build` (npm test does it for you)');
}

/** Signs in through the sign-in page the way a person would: e-mail, password, the Sign in button. */
export async function signInThroughPage(page: Page, base: string, email: string, password: string): Promise<void> {
  await page.goto(base + '/sign-in');
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
}
