// Browser performance report (a benchmark, not a test): 200 scripted brush strokes on the plan in
// TRAYCAST_URL, reading the workbench's performance marks. Prints one JSON object.
import { chromium } from 'playwright-core';

const browser = await chromium.launch({
  executablePath: process.env.CHROMIUM || '/usr/bin/chromium',
  args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
const page = await (await browser.newContext({ viewport: { width: 1500, height: 1000 } })).newPage();
const t0 = Date.now();
await page.goto(process.env.TRAYCAST_URL);
await page.waitForFunction(() => window.traycast && window.traycast.settled() && window.traycast.evaluation() !== null, null, { timeout: 60000 });
const firstView = await page.evaluate(() => { const e = performance.getEntriesByName('tc-full-frame')[0]; return e.startTime + e.duration; });
await page.evaluate(() => performance.clearMeasures());
const box = await page.getByTestId('tray').boundingBox();
const plan = await page.evaluate(() => window.traycast.plan());
const px = box.width / plan.tray.width;
for (let k = 0; k < 200; k++) {
  await page.getByTestId(`target-swatch-${k % 2}`).click();
  const r = 2 + (k * 5) % (plan.tray.height - 4), c = 2 + (k * 7) % (plan.tray.width - 6);
  await page.mouse.move(box.x + (c + 0.5) * px, box.y + (r + 0.5) * px);
  await page.mouse.down();
  await page.mouse.move(box.x + (c + 3.5) * px, box.y + (r + 0.5) * px, { steps: 3 });
  await page.mouse.up();
}
const stats = await page.evaluate(() => {
  const q = (name) => {
    const v = performance.getEntriesByName(name).map((e) => e.duration).sort((a, b) => a - b);
    return { count: v.length, median_ms: v[Math.floor(v.length / 2)], p95_ms: v[Math.floor(v.length * 0.95)] };
  };
  return { quick: q('tc-quick'), input_to_frame: q('tc-input-to-frame'), evaluate: q('tc-solve-and-simulate'), worker: q('tc-worker-evaluate'), draw_tray: q('tc-draw-tray'), draw_maps: q('tc-draw-maps'), full_frame: q('tc-full-frame') };
});
// A constrained objective with the simulation in the loop: the hot-lunch demo's safe minimum.
const settled = () => page.waitForFunction(() => window.traycast.settled() && window.traycast.evaluation() !== null, null, { timeout: 60000 });
await page.getByTestId('demo-picker').selectOption('hot-lunch');
await settled();
await page.getByTestId('objective').selectOption('safe-minimum');
await page.waitForFunction(() => window.traycast.settled() && window.traycast.evaluation()?.planning.objective === 'safe-minimum', null, { timeout: 60000 });
const safeMinimum = await page.evaluate(() => {
  const last = (name) => { const v = performance.getEntriesByName(name); return v[v.length - 1].duration; };
  return { worker_ms: last('tc-worker-evaluate'), round_trip_ms: last('tc-solve-and-simulate'), passes: window.traycast.evaluation().loop?.passes ?? null };
});
const isolated = await page.evaluate(() => window.crossOriginIsolated === true);
console.log(JSON.stringify({ ...stats, safe_minimum: safeMinimum, isolated, first_solved_view_ms: firstView, wall_s: (Date.now() - t0) / 1000 }));
await browser.close();
