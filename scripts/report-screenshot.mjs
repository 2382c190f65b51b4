// Regenerates docs/report-screenshot.png, the README's picture of the demo report (INVENTED data):
// runs the demo with --report into a temporary folder and photographs the figures section in
// Debian's Chromium (apt-get install chromium) through playwright-core. Run after `npm run build`.
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const out = join(mkdtempSync(join(tmpdir(), 'foldseal-shot-')), 'demo');
const run = spawnSync(process.execPath, [join(root, 'bin', 'foldseal.cjs'), 'run', 'protocols/demo.yaml', '--out', out, '--report'], {
  cwd: root,
  stdio: 'inherit',
});
if (run.status !== 0) process.exit(1);
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox'] });
const page = await browser.newPage({ viewport: { width: 960, height: 900 } });
await page.goto(pathToFileURL(join(out, 'report.html')).href);
const figures = await page.$('#figures');
const box = await figures.boundingBox();
await page.screenshot({
  path: join(root, 'docs', 'report-screenshot.png'),
  fullPage: true,
  clip: { x: 0, y: box.y - 10, width: 960, height: 560 },
});
await browser.close();
console.log('wrote docs/report-screenshot.png');
