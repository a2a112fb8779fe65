// Real-browser test of report.html (issue 17): Debian's chromium driven by playwright-core.
//   node report_test.mjs SHOTS_DIR PAGE.html[:OUT_DIR] ...
// For each page, at 1400 px and 800 px wide: no console error, nothing fetched, no table clipped
// (each table's content fits its box, and its box the window), no plot wider than the window,
// the traces as wide as the page. On the first page with traces: dragging across one trace
// zooms every trace of that track; the cursor reads out every config on every trace, and the
// speed it reads matches the lap's trace CSV (OUT_DIR, the compare's --out) at that distance;
// clicking a corner's number zooms to that corner. With scripts off and in print the static
// plots show. Screenshots of every page at both widths go to SHOTS_DIR.
import { chromium } from 'playwright-core';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const [shots, ...pages] = process.argv.slice(2);
fs.mkdirSync(shots, { recursive: true });
let passed = 0, failed = 0;
const ok = (what) => { passed++; };
const bad = (what) => { failed++; console.log('FAIL: ' + what); };
const check = (cond, what) => (cond ? ok(what) : bad(what));

const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'lapwing-chromium-'));
const context = await chromium.launchPersistentContext(profile, {
  executablePath: '/usr/bin/chromium',
  headless: true,
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
         '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  viewport: { width: 1400, height: 900 },
});

// A trace CSV as columns of numbers (header names -> arrays).
function readCsv(file) {
  const lines = fs.readFileSync(file, 'utf8').trim().split('\n');
  const head = lines[0].split(',');
  const cols = Object.fromEntries(head.map((h) => [h, []]));
  for (const line of lines.slice(1)) {
    const f = line.split(',');
    head.forEach((h, i) => cols[h].push(Number(f[i])));
  }
  return cols;
}
function interp(x, y, v) {
  let i = x.findIndex((d) => d >= v);
  if (i <= 0) i = 1;
  const w = (v - x[i - 1]) / (x[i] - x[i - 1]);
  return y[i - 1] + w * (y[i] - y[i - 1]);
}

async function open(page, file, width) {
  const errors = [], fetched = [];
  page.removeAllListeners();
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
  page.on('pageerror', (e) => errors.push(String(e)));
  page.on('request', (r) => {
    const u = r.url();
    if (!u.startsWith('file://') && !u.startsWith('data:')) fetched.push(u);
  });
  await page.setViewportSize({ width, height: 900 });
  await page.goto('file://' + path.resolve(file));
  await page.waitForLoadState('load');
  return { errors, fetched };
}

async function layout(page, name, width) {
  const r = await page.evaluate(() => {
    const m = document.querySelector('main'), ms = getComputedStyle(m);
    const out = { tables: [], plots: [], pageWidth: document.documentElement.scrollWidth,
                  inner: window.innerWidth,
                  main: m.clientWidth - parseFloat(ms.paddingLeft) - parseFloat(ms.paddingRight) };
    document.querySelectorAll('table').forEach((t, i) => {
      const b = t.getBoundingClientRect();
      out.tables.push({ i, head: t.querySelector('th') ? t.innerText.slice(0, 40) : '',
                        scroll: t.scrollWidth, client: t.clientWidth, right: b.right });
    });
    document.querySelectorAll('svg.plot').forEach((s) => {
      const b = s.getBoundingClientRect();
      if (b.width > 0) out.plots.push({ id: s.id || s.getAttribute('aria-label'), right: b.right,
                                        width: b.width, live: s.classList.contains('live-plot') });
    });
    return out;
  });
  for (const t of r.tables)
    check(t.scroll <= t.client + 1 && t.right <= r.inner + 1,
          `${name} at ${width} px: table ${t.i} (${JSON.stringify(t.head)}) clipped: content ` +
          `${t.scroll} px in a ${t.client} px box ending at ${t.right.toFixed(0)} of ${r.inner}`);
  check(r.pageWidth <= r.inner, `${name} at ${width} px: the page scrolls sideways (${r.pageWidth} px)`);
  for (const p of r.plots)
    check(p.right <= r.inner + 1, `${name} at ${width} px: plot ${p.id} ends at ${p.right} px`);
  const live = r.plots.filter((p) => p.live);
  for (const p of live)
    check(p.width >= 0.95 * r.main, `${name} at ${width} px: trace ${p.id} is ${p.width.toFixed(0)} ` +
          `px in a ${r.main} px page`);
  return r;
}

// Drag across the speed trace, move the pointer, click a corner: the first traces group.
async function interact(page, name, outDir) {
  const group = page.locator('div.traces').first();
  const trackId = (await group.getAttribute('id')).replace(/^traces-/, '');
  const plots = group.locator('svg.live-plot');
  const n = await plots.count();
  check(n >= 2, `${name}: ${n} live traces on ${trackId} (want speed, delta, front share)`);
  const whole = [Number(await group.getAttribute('data-x0')), Number(await group.getAttribute('data-x1'))];
  const speed = plots.first();
  await speed.scrollIntoViewIfNeeded();
  const box = await speed.boundingBox();
  // The plot area runs from 64 px in to 24 px from the right (traces.js margins).
  const ax = (f) => box.x + 64 + f * (box.width - 88);
  const ay = box.y + box.height * 0.55;
  await page.mouse.move(ax(0.30), ay);
  await page.mouse.down();
  await page.mouse.move(ax(0.38), ay, { steps: 4 });
  await page.mouse.move(ax(0.45), ay, { steps: 4 });
  await page.mouse.up();
  const ranges = await plots.evaluateAll((ss) => ss.map((s) => [Number(s.getAttribute('data-x0')),
                                                                Number(s.getAttribute('data-x1'))]));
  const span = whole[1] - whole[0];
  const want = [whole[0] + 0.30 * span, whole[0] + 0.45 * span];
  for (let k = 0; k < ranges.length; k++)
    check(Math.abs(ranges[k][0] - want[0]) < 0.01 * span && Math.abs(ranges[k][1] - want[1]) < 0.01 * span,
          `${name}: after a drag on the speed trace over ${want.map((v) => v.toFixed(0))} m, trace ${k} ` +
          `shows ${ranges[k].map((v) => v.toFixed(0))} m`);
  // The other traces' distance ticks follow: every tick label lies within the zoomed range.
  const ticks = await plots.nth(1).evaluate((s) =>
    [...s.querySelectorAll('.grid text[text-anchor="middle"]')].map((t) => Number(t.textContent)));
  check(ticks.length >= 2 && ticks.every((v) => v >= want[0] - 0.02 * span && v <= want[1] + 0.02 * span),
        `${name}: the second trace's distance ticks ${ticks} lie outside the zoom`);

  // The cursor: every plot of the track reads out every one of its series.
  const front = plots.nth(n - 1);
  await front.scrollIntoViewIfNeeded();
  const fb = await front.boundingBox();
  await page.mouse.move(fb.x + 64 + 0.5 * (fb.width - 88), fb.y + fb.height * 0.5);
  const cursor = Number(await group.getAttribute('data-cursor'));
  const readouts = await group.locator('.readout').evaluateAll((rs) => rs.map((r) => ({
    hidden: r.hidden,
    rows: [...r.querySelectorAll('.readout-row')].map((row) => ({
      config: row.getAttribute('data-config'),
      value: row.querySelector('.readout-value').textContent })),
  })));
  check(readouts.length === n, `${name}: ${readouts.length} readouts for ${n} traces`);
  for (let k = 0; k < readouts.length; k++) {
    check(!readouts[k].hidden, `${name}: readout ${k} is hidden under the cursor`);
    check(readouts[k].rows.length >= 1 &&
          readouts[k].rows.every((r) => Number.isFinite(parseFloat(r.value))),
          `${name}: readout ${k} lacks numbers: ${JSON.stringify(readouts[k].rows)}`);
  }
  // Speed readouts against the lap's trace CSV at the cursor's distance. Tolerance 0.3 km/h:
  // the page holds every other mesh point or so (4000 per trace) at 0.01 km/h and shows 0.1 km/h;
  // a straight line between kept points differs from the solved speed by at most about
  // (dv/ds) x spacing / 2 near an apex, a few tenths at most.
  if (outDir) {
    for (const r of readouts[0].rows) {
      const csv = readCsv(path.join(outDir, `trace-${trackId}-${r.config}.csv`));
      const v = interp(csv.distance_m, csv.speed_kph, cursor);
      check(Math.abs(parseFloat(r.value) - v) <= 0.3,
            `${name}: speed readout of ${r.config} at ${cursor.toFixed(1)} m is ${r.value}, ` +
            `the trace CSV has ${v.toFixed(2)} km/h`);
    }
    ok('readout checked');
  }
  // A corner's number zooms to the corner (its span from summary.json, the best config's).
  const corner = group.locator('svg.live-plot').first().locator('text.corner-link').first();
  if (await corner.count()) {
    await page.evaluate(() => document.querySelector('div.traces').lapwingZoom(0, 1e12));
    const id = Number(await group.locator('svg.live-plot').first().locator('text.corner-link').first().getAttribute('data-corner'));
    await group.locator('svg.live-plot').first().locator('text.corner-link').first().click();
    const r = [Number(await group.getAttribute('data-x0')), Number(await group.getAttribute('data-x1'))];
    let span = null;
    if (outDir) {
      // The first track's best config (compare.json), or the run's one lap.
      const all = JSON.parse(fs.readFileSync(path.join(outDir, 'summary.json'), 'utf8')).results;
      const cmpFile = path.join(outDir, 'compare.json');
      let res = all[0];
      if (fs.existsSync(cmpFile)) {
        const first = JSON.parse(fs.readFileSync(cmpFile, 'utf8')).tracks[0];
        res = all.find((x) => x.track === first.track && x.config === first.best);
      }
      const c = res.corners.find((x) => x.id === id);
      span = [c.start_m, c.end_m];
    }
    check(r[1] - r[0] < 0.5 * (whole[1] - whole[0]) && (!span || (r[0] <= span[0] && r[1] >= span[1])),
          `${name}: clicking corner ${id} shows ${r.map((v) => v.toFixed(0))} m, the corner spans ` +
          `${span ? span.map((v) => v.toFixed(0)) : '?'} m`);
  }
}

let interacted = false;
for (const arg of pages) {
  const [file, outDir] = arg.split(':');
  const name = path.basename(path.dirname(file)) + '/' + path.basename(file);
  const page = await context.newPage();
  for (const width of [1400, 800]) {
    const { errors, fetched } = await open(page, file, width);
    const hasTraces = (await page.locator('div.traces').count()) > 0;
    if (hasTraces) await page.waitForSelector('svg.live-plot');
    await layout(page, name, width);
    if (hasTraces && outDir && width === 1400) {
      await interact(page, name, outDir);
      interacted = true;
    }
    const shot = path.join(shots, `${name.replace(/[\/.]/g, '-')}-${width}.png`);
    if (hasTraces) await page.evaluate(() => document.querySelector('div.traces').lapwingZoom(0, 1e12));
    await page.mouse.move(0, 0);
    await page.screenshot({ path: shot, fullPage: true });
    check(fs.statSync(shot).size > 10000, `${name}: screenshot ${shot} is empty`);
    check(errors.length === 0, `${name} at ${width} px: console errors: ${errors.join(' | ')}`);
    check(fetched.length === 0, `${name} at ${width} px: fetched ${fetched.join(', ')}`);
  }
  // In print the static plots show and the live ones do not.
  await page.emulateMedia({ media: 'print' });
  const print = await page.evaluate(() => ({
    statics: [...document.querySelectorAll('.static svg')].filter((s) => s.getBoundingClientRect().width > 0).length,
    all: document.querySelectorAll('.static svg').length,
    live: [...document.querySelectorAll('.live')].filter((s) => s.getBoundingClientRect().width > 0).length,
  }));
  check(print.statics === print.all && print.live === 0,
        `${name} in print: ${print.statics} of ${print.all} static plots shown, ${print.live} live`);
  await page.emulateMedia({ media: 'screen' });
  await page.close();
}
if (!interacted) bad('no page with traces to zoom');

// With scripts off: the static plots, no live ones.
const noScript = await context.browser()?.newContext?.({ javaScriptEnabled: false });
{
  const [file] = pages[0].split(':');
  const ctx2 = await chromium.launchPersistentContext(fs.mkdtempSync(path.join(os.tmpdir(), 'lapwing-chromium-')), {
    executablePath: '/usr/bin/chromium', headless: true, javaScriptEnabled: false,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
           '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    viewport: { width: 1400, height: 900 },
  });
  const page = await ctx2.newPage();
  await page.goto('file://' + path.resolve(file));
  const r = await page.evaluate(() => ({
    statics: [...document.querySelectorAll('.static svg')].filter((s) => s.getBoundingClientRect().width > 0).length,
    all: document.querySelectorAll('.static svg').length,
    live: document.querySelectorAll('svg.live-plot').length,
  }));
  check(r.all > 0 && r.statics === r.all && r.live === 0,
        `scripts off: ${r.statics} of ${r.all} static plots shown, ${r.live} live`);
  await ctx2.close();
}
await context.close();
console.log(`browser report: ${passed} passed, ${failed} failed`);
process.exit(failed ? 1 : 0);
