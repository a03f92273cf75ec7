/**
 * Browser tests on real parts: the client built by Vite and served by the real server, Debian's
 * Chromium driven by playwright-core (never a downloaded browser), sign-in typed into the local
 * identity provider's page, axe-core for accessibility, and screenshots for people to look at.
 */
import { execFile } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { promisify } from 'node:util';
import { chromium, type Browser, type Page } from 'playwright-core';
import * as fontkit from 'fontkit';

const run = promisify(execFile);
const require = createRequire(import.meta.url);
export const ROOT = path.resolve(import.meta.dirname, '../..');
export const ARTIFACTS = path.join(ROOT, 'test-artifacts');

export const CHROMIUM = '/usr/bin/chromium';
const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];

/**
 * Builds the client into a folder of its own (never dist/client, which `npm start` and other
 * checks use), so concurrent builds cannot trample each other. Returns the folder.
 */
export async function buildClient(): Promise<string> {
  const outDir = mkdtempSync(path.join(tmpdir(), 'orrery-client-'));
  await run(path.join(ROOT, 'node_modules/.bin/vite'), ['build', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'warn'], {
    cwd: ROOT,
    maxBuffer: 16 * 1024 * 1024,
  });
  return outDir;
}

/** The JavaScript a first visit downloads: the entry scripts named in index.html and the chunks they preload, gzipped. */
export function initialJavaScript(outDir: string): { files: string[]; bytes: number; gzipBytes: number } {
  const html = readFileSync(path.join(outDir, 'index.html'), 'utf8');
  const files = [...html.matchAll(/(?:src|href)="\/?(assets\/[^"]+\.js)"/g)].map((m) => m[1]);
  let bytes = 0;
  let gzipBytes = 0;
  for (const file of files) {
    const content = readFileSync(path.join(outDir, file));
    bytes += content.length;
    gzipBytes += gzipSync(content, { level: 9 }).length;
  }
  return { files, bytes, gzipBytes };
}

/** Every JavaScript file of the build, for comparison with the initial set (charts load on demand). */
export function allJavaScript(outDir: string): { files: number; bytes: number } {
  const assets = path.join(outDir, 'assets');
  const js = readdirSync(assets).filter((f) => f.endsWith('.js'));
  return { files: js.length, bytes: js.reduce((sum, f) => sum + statSync(path.join(assets, f)).size, 0) };
}

export function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true });
}

/** Signs in the way a person does: the app's sign-in button, then e-mail and password typed into the identity provider's page. */
export async function signInThroughPages(page: Page, appUrl: string, email: string, password = 'demo'): Promise<void> {
  await page.goto(appUrl);
  await page.getByRole('link', { name: /sign in with your organisation account/i }).click();
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => url.origin === new URL(appUrl).origin);
  await page.getByRole('navigation', { name: 'Main' }).waitFor();
}

/** Confirms identity again at the identity provider (before a signature), when the page sends us there. */
export async function confirmIdentity(page: Page, appUrl: string, email: string, password = 'demo'): Promise<void> {
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => url.origin === new URL(appUrl).origin);
}

export type AxeViolation = { id: string; impact: string; help: string; nodes: string[] };

/** axe-core on the page as it stands; only serious and critical findings are returned. */
export async function seriousAccessibilityProblems(page: Page): Promise<AxeViolation[]> {
  // Evaluated through the debugging protocol: the app's CSP (rightly) refuses an injected inline script tag.
  if (!(await page.evaluate(() => 'axe' in window))) await page.evaluate(readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8'));
  const violations = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (context: Document, options: object) => Promise<{ violations: Array<{ id: string; impact: string; help: string; nodes: Array<{ target: string[] }> }> }> } }).axe;
    const result = await axe.run(document, { resultTypes: ['violations'] });
    return result.violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.slice(0, 5).map((n) => n.target.join(' ')) }));
  });
  return violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
}

export async function screenshot(page: Page, name: string): Promise<void> {
  const dir = path.join(ARTIFACTS, 'screens');
  mkdirSync(dir, { recursive: true });
  await page.screenshot({ path: path.join(dir, `${name.replace(/[^a-z0-9-]+/gi, '-').toLowerCase()}.png`), fullPage: true });
}

/** Uncaught page errors and Content-Security-Policy refusals (a strict CSP must not break the app). */
export function watchConsole(page: Page): string[] {
  const problems: string[] = [];
  page.on('console', (message) => {
    if (message.type() === 'error' && /Content Security Policy|Refused to/i.test(message.text())) problems.push(message.text());
  });
  page.on('pageerror', (error) => problems.push(error.message));
  return problems;
}

/** The whole Inter the client falls back to for the signs its Latin subsets leave out: a character it lacks would be an empty box. */
const wholeInter = fontkit.create(readFileSync(require.resolve('inter-ui/variable/InterVariable.woff2'))) as fontkit.Font;

type DomNode = { nodeId: number; nodeType: number; nodeName: string; nodeValue: string; children?: DomNode[] };
type PlatformFont = { familyName: string; isCustomFont: boolean; glyphCount: number };

/**
 * Every text on the page that the shipped Inter does not draw: Chromium reports, for each element
 * with text of its own, the fonts it used (a glyph Inter lacks falls back to a system font), and
 * each character is looked up in Inter's character map (a character no font has would be drawn as
 * Inter's empty box, which Chromium still reports as Inter). `selector` narrows the check.
 */
export async function textNotDrawnByInter(page: Page, selector = 'body', attempt = 1): Promise<string[]> {
  const problems: string[] = [];
  // A glyph outside the Latin subsets loads the whole Inter on first use: let the page lay out and
  // finish loading the fonts it asked for, or the check would see the system font drawn meanwhile.
  await page.evaluate(async () => {
    await new Promise((resolve) => requestAnimationFrame(resolve));
    await document.fonts.ready;
  });
  const cdp = await page.context().newCDPSession(page);
  try {
    await cdp.send('DOM.enable');
    await cdp.send('CSS.enable');
    const { root } = (await cdp.send('DOM.getDocument', { depth: -1 })) as { root: DomNode };
    const { nodeIds } = await cdp.send('DOM.querySelectorAll', { nodeId: root.nodeId, selector });
    const scopes = new Set(nodeIds);
    // Collect first, then ask for every element's fonts at once: one round trip each, in parallel.
    const texts: Array<{ nodeId: number; text: string }> = [];
    const visit = (node: DomNode, inside: boolean) => {
      const within = inside || scopes.has(node.nodeId);
      if (['SCRIPT', 'STYLE', 'NOSCRIPT', 'TEMPLATE', 'HEAD'].includes(node.nodeName)) return;
      const own = (node.children ?? []).filter((c) => c.nodeType === 3 && c.nodeValue.trim() !== '').map((c) => c.nodeValue.trim());
      if (within && own.length > 0) texts.push({ nodeId: node.nodeId, text: own.join(' ') });
      for (const child of node.children ?? []) if (child.nodeType === 1) visit(child, within);
    };
    visit(root, false);
    const reports = await Promise.all(
      texts.map(async ({ nodeId }) => ((await cdp.send('CSS.getPlatformFontsForNode', { nodeId })) as { fonts: PlatformFont[] }).fonts),
    ).catch((error: Error) => {
      // The page re-rendered between the snapshot and the questions (a query settling late): look again.
      if (attempt < 3 && /Could not find node with given id/.test(error.message)) return undefined;
      throw error;
    });
    if (!reports) {
      await page.waitForTimeout(250);
      return textNotDrawnByInter(page, selector, attempt + 1);
    }
    texts.forEach(({ text }, i) => {
      const missing = [...new Set(Array.from(text))].filter((c) => !/\s/.test(c) && !wholeInter.hasGlyphForCodePoint(c.codePointAt(0) as number));
      if (missing.length > 0) problems.push(`no Inter glyph for ${missing.join(' ')} in “${text.slice(0, 60)}”`);
      const others = reports[i].filter((f) => f.glyphCount > 0 && !/^Inter/i.test(f.familyName));
      if (others.length > 0) problems.push(`“${text.slice(0, 60)}” drawn with ${others.map((f) => f.familyName).join(', ')}`);
    });
  } finally {
    await cdp.detach();
  }
  return problems;
}

/**
 * What a person reads on the page: its text, the labels that stand for text (aria-label, title)
 * and the options of its lists, less the literals of a file format it marks as code.
 */
export async function readableText(page: Page): Promise<string> {
  return page.evaluate(() => {
    const body = document.body.cloneNode(true) as HTMLElement;
    for (const literal of body.querySelectorAll('code, kbd, samp')) literal.remove();
    const labels = [...document.querySelectorAll('[aria-label], [title]')].flatMap((el) => [el.getAttribute('aria-label') ?? '', el.getAttribute('title') ?? '']);
    const options = [...document.querySelectorAll('option')].map((o) => o.textContent ?? '');
    return [body.innerText, ...labels, ...options].join('\n');
  });
}
