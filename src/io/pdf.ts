/**
 * The report printed to PDF by a headless Chromium, through playwright-core (an optional
 * dependency: PDF export is the only part of foldseal that needs a browser). The page is opened
 * with every network request refused.
 */
import { existsSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { error, FoldsealError } from '../problems/problem.js';
import { importPackage } from './import-package.js';

/** Refuses before anything is written when --pdf cannot work. */
export function checkBrowser(browserPath: string): void {
  if (!existsSync(browserPath))
    throw new FoldsealError(
      error('bad-option', `--pdf needs a Chromium binary; ${browserPath} does not exist`, {
        hint: 'install Chromium (Debian: apt-get install chromium) or name it with --browser PATH',
      }),
      2,
    );
}

export async function printPdf(htmlPath: string, browserPath: string): Promise<Uint8Array> {
  checkBrowser(browserPath);
  let chromium: { launch(o: object): Promise<any> };
  try {
    ({ chromium } = await importPackage<any>('playwright-core'));
  } catch {
    throw new FoldsealError(
      error('bad-option', '--pdf needs the playwright-core package, which is not installed', { hint: 'npm install playwright-core' }),
      2,
    );
  }
  const browser = await chromium.launch({ executablePath: browserPath, args: ['--no-sandbox'] });
  try {
    const page = await browser.newPage();
    const self = pathToFileURL(htmlPath).href;
    await page.route('**/*', (route: any) => (route.request().url() === self ? route.continue() : route.abort()));
    await page.goto(self, { waitUntil: 'load' });
    return await page.pdf({ format: 'A4', printBackground: true, margin: { top: '15mm', bottom: '15mm', left: '14mm', right: '14mm' } });
  } finally {
    await browser.close();
  }
}
