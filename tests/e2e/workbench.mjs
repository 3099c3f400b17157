// The workbench as the browser tests see it: one page object whose locators are named by the
// page's data-testid attributes, and the moves a user makes (open, paint, pick, wait for the
// outcome). The tests say what they do; the selectors live here.

export class Workbench {
  constructor(page, url) {
    this.page = page;
    this.url = url;
  }

  by(id) { return this.page.getByTestId(id); }

  // Regions and controls.
  get tray() { return this.by('tray'); }
  get hover() { return this.by('hover'); }
  get emptyHint() { return this.by('empty-hint'); }
  get notice() { return this.by('notice'); }
  get summary() { return this.by('summary'); }
  get tools() { return this.by('tools'); }
  get demoPicker() { return this.by('demo-picker'); }
  get planName() { return this.by('plan-name'); }
  get unit() { return this.by('unit'); }
  get undo() { return this.by('undo'); }
  get redo() { return this.by('redo'); }
  get rectangle() { return this.by('tool-rectangle'); }
  get objective() { return this.by('objective'); }
  get loopReport() { return this.by('loop-report'); }
  get uniformity() { return this.by('uniformity'); }
  get safetyCards() { return this.by('safety-cards'); }
  get cards() { return this.by('safety-cards').locator('article.card'); }
  get cautions() { return this.by('cautions'); }
  get dwellBars() { return this.by('dwell-bars'); }
  get linearMap() { return this.by('map-linear'); }
  get simulatedMap() { return this.by('map-simulated'); }
  get offBandMap() { return this.by('map-off-band'); }
  get simView() { return this.by('sim-view'); }
  get simDepth() { return this.by('sim-depth'); }
  get importLibrary() { return this.by('import-library'); }
  get importRuns() { return this.by('import-runs'); }
  get importPlan() { return this.by('import-plan'); }
  get offerImport() { return this.by('offer-import'); }
  get quality() { return this.by('quality'); }
  get shortcuts() { return this.by('shortcuts'); }
  get showShortcuts() { return this.by('show-shortcuts'); }
  get compare() { return this.by('compare'); }
  get compareMode() { return this.by('compare-mode'); }
  get compareTable() { return this.by('compare-table'); }
  get pin() { return this.by('pin'); }
  get printedPlan() { return this.by('printed-plan'); }
  foodSwatch(k) { return this.by(`food-swatch-${k}`); }
  targetSwatch(k) { return this.by(`target-swatch-${k}`); }
  foodName(k) { return this.by(`food-name-${k}`); }
  targetMin(k) { return this.by(`target-min-${k}`); }
  targetMax(k) { return this.by(`target-max-${k}`); }

  // Waiting for the outcome.
  async ready() {
    await this.page.waitForFunction(() => window.traycast && window.traycast.settled() && window.traycast.evaluation() !== null, null, { timeout: 30000 });
  }
  async evaluation() { await this.ready(); return this.page.evaluate(() => window.traycast.evaluation()); }
  async plan() { await this.ready(); return this.page.evaluate(() => window.traycast.plan()); }
  async open(hash = '') { await this.page.goto(this.url + hash); await this.ready(); }

  /** Waits until the element named `id` holds `text`. */
  async waitForText(id, text) {
    await this.page.waitForFunction(([id, text]) => document.querySelector(`[data-testid="${id}"]`)?.textContent.includes(text), [id, text], { timeout: 30000 });
  }
  /** The pixels of the canvas named `id`, as a data URL (to tell drawings apart). */
  async pixels(id) {
    return this.page.evaluate((id) => document.querySelector(`[data-testid="${id}"]`).toDataURL(), id);
  }

  // Moves.
  async openDemo(name) { await this.demoPicker.selectOption(name); }
  async chooseObjective(name) { await this.objective.selectOption(name); }
  /** A cell's centre in page coordinates (the tray scrolled into view first). */
  async cellPoint(row, col) {
    await this.tray.scrollIntoViewIfNeeded();
    const box = await this.tray.boundingBox();
    const p = await this.plan();
    const px = box.width / p.tray.width;
    return { x: box.x + (col + 0.5) * px, y: box.y + (row + 0.5) * px };
  }
  /** Drags the mouse from one cell to another with the current brush. */
  async drag(from, to) {
    const a = await this.cellPoint(...from);
    const b = await this.cellPoint(...to);
    await this.page.mouse.move(a.x, a.y);
    await this.page.mouse.down();
    await this.page.mouse.move(b.x, b.y, { steps: 8 });
    await this.page.mouse.up();
  }
}

/** The cells whose food differs between two plans (the food grid is one string per row). */
export function changedCells(before, after) {
  const changed = [];
  after.food.forEach((row, r) => [...row].forEach((ch, c) => { if (ch !== before.food[r][c]) changed.push([r, c]); }));
  return changed;
}
