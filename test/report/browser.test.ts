/**
 * The demo's report in a real browser (Debian's Chromium, driven headless through playwright-core):
 * it loads with no console error and no request besides its own file, every plot has rendered
 * geometry, and the methods paragraph names the seed, the split version and the data hash. A
 * screenshot is saved to results/report-screenshot.png (a CI artifact).
 */
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import t from 'tap';
import { cli, root, tempDir } from '../helpers.js';

const CHROMIUM = '/usr/bin/chromium';
const skip = existsSync(CHROMIUM) ? false : `Chromium is not installed (apt-get install chromium puts it at ${CHROMIUM})`;

t.test('the demo report in Chromium', { skip, timeout: 120_000 }, async (t) => {
  const out = join(tempDir(), 'demo');
  const run = await cli(['run', 'protocols/demo.yaml', '--out', out, '--report'], root);
  t.equal(run.code, 0, run.stderr);
  const results = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8'));
  const { chromium } = await import('playwright-core');
  const browser = await chromium.launch({ executablePath: CHROMIUM, args: ['--no-sandbox'] });
  t.teardown(() => browser.close());
  const page = await browser.newPage({ viewport: { width: 1100, height: 900 } });
  const url = pathToFileURL(join(out, 'report.html')).href;
  const requests: string[] = [];
  const errors: string[] = [];
  page.on('request', (r) => requests.push(r.url()));
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') errors.push(m.text());
  });
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(url, { waitUntil: 'load' });
  t.same(errors, [], 'no console error or warning');
  t.same(requests, [url], 'no request besides the page itself');
  const figures = await page.$$eval('figure', (list) =>
    list.map((f) => {
      const svg = f.querySelector('svg')!;
      const box = svg.getBoundingClientRect();
      const marks = [...svg.querySelectorAll('path')]
        .map((p) => (p as SVGGraphicsElement).getBBox())
        .filter((b) => b.width > 0 || b.height > 0);
      return { id: f.id, label: f.getAttribute('aria-label') ?? '', width: box.width, height: box.height, marks: marks.length };
    }),
  );
  t.same(
    figures.map((f) => f.id),
    ['fig-roc', 'fig-pr', 'fig-calibration'],
  );
  for (const f of figures) {
    t.ok(f.width > 100 && f.height > 100, `${f.id} is drawn (${f.width}×${f.height})`);
    t.ok(f.marks > 3, `${f.id} has ${f.marks} marks with geometry`);
    t.ok(f.label.length > 40, `${f.id} has a text alternative`);
  }
  const methods = await page.textContent('#methods-text');
  t.match(methods, `seed ${results.split.seed}`);
  t.match(methods, results.split.version);
  t.match(methods, results.data.sha256);
  const printed = await page.pdf({ format: 'A4' });
  t.ok(printed.length > 10_000 && printed.subarray(0, 5).toString() === '%PDF-', 'prints to PDF through the print style');
  const pdf = await cli(['report', out, '--pdf', join(out, 'report.pdf'), '--out', join(out, 'again.html')], root);
  t.equal(pdf.code, 0, pdf.stderr);
  t.equal(readFileSync(join(out, 'report.pdf')).subarray(0, 5).toString(), '%PDF-', 'report --pdf prints through Chromium');
  const nobrowser = await cli(
    ['report', out, '--pdf', join(out, 'x.pdf'), '--out', join(out, 'x.html'), '--browser', '/nonexistent/chromium'],
    root,
  );
  t.equal(nobrowser.code, 2);
  t.match(nobrowser.stderr, '--pdf needs a Chromium binary; /nonexistent/chromium does not exist');
  t.notOk(existsSync(join(out, 'x.html')), 'nothing written when the PDF cannot be made');
  mkdirSync(join(root, 'results'), { recursive: true });
  await page.screenshot({ path: join(root, 'results', 'report-screenshot.png'), fullPage: true });
  t.ok(existsSync(join(root, 'results', 'report-screenshot.png')), 'screenshot saved under results/');
});
