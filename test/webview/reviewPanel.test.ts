// The review panel in Chromium against a stubbed host (see panelHarness.ts): every decision by
// click and by key, the messages the webview posts, the virtualised table, the no-WebGL path,
// restoring view state, threshold previews, and screenshots in a light and a dark theme.
import * as assert from 'node:assert/strict';
import { mkdirSync, statSync } from 'node:fs';
import * as path from 'node:path';
import type { Browser } from 'playwright-core';
import type { ThresholdPreviewResult, ThresholdSetting } from '../../src/protocol/webview';
import { createThresholdPreviewer } from '../../src/review/thresholdPreview';
import { buildScenario, largeScenario, scenarioCandidates, type ReviewScenario } from '../review/reviewScenario';
import { classColour } from '../../webview/classPalette';
import { launchBrowser, openPanel, screenshotFolder, type Panel, type PanelOptions } from './panelHarness';
import { blobsOfColour, decodePng } from './pngPixels';
import { darkTheme, highContrastTheme, lightTheme } from './themes';

describe('webview/review panel (Chromium)', function () {
  this.timeout(120_000);
  let browser: Browser;
  let scenario: ReviewScenario;
  let panel: Panel | null = null;

  before(async () => {
    browser = await launchBrowser();
    scenario = buildScenario();
  });
  after(async () => {
    await browser?.close();
  });
  afterEach(async () => {
    await panel?.close();
    panel = null;
  });

  const open = async (overrides: Partial<PanelOptions> = {}) => {
    panel = await openPanel(browser, {
      context: scenario.context,
      candidates: scenarioCandidates(scenario),
      theme: lightTheme,
      ...overrides,
    });
    return panel;
  };
  const openIds = (p: Panel) =>
    p.session
      .queue()
      .filter((q) => q.status === 'open')
      .map((q) => q.candidate.id);
  const decisionAfter = async (p: Panel, mark: number) =>
    (await p.nextPosted(mark, (m) => m.type === 'decide', 'a decision')).decision as Record<string, unknown>;
  /** The panel with its first candidate's graph drawn, and the graph's area. */
  const openWithGraph = async () => {
    const p = await open();
    await p.page.waitForTimeout(300);
    return { p, page: p.page, stage: p.page.locator('#graph-stage') };
  };
  /** The scenario run's own setting and counts, as a host without a previewer reports them. */
  const runOwnSetting = (): ThresholdPreviewResult => ({
    setting: { mode: 'alpha', alpha: 3, quantile: 0.1, lambda: 0.5 },
    rejected: 38,
    scored: 148,
    candidatesKept: 3,
    ungroupedRejected: 0,
  });
  /** Uncaught errors and console errors of the page, without software WebGL's driver notices. */
  const pageErrors = (p: Panel) => p.pageErrors.filter((e) => !e.includes('GL Driver'));
  const settled = async (p: Panel, count: number) => {
    await p.page
      .locator('#pending-list li[data-decision]')
      .nth(count - 1)
      .waitFor();
  };

  it('loads under the panel’s Content-Security-Policy and shows the queue, summary, graph and table', async () => {
    const p = await open();
    assert.deepEqual(p.posted[0], { type: 'ready' });
    const queue = await p.page
      .locator('#queue-list .queue-item')
      .evaluateAll((items) => items.map((i) => i.getAttribute('data-candidate')));
    assert.deepEqual(queue, openIds(p));
    assert.equal(await p.page.locator('#candidate-title').textContent(), openIds(p)[0]);
    assert.equal(await p.page.locator('#candidate-size').textContent(), '18 members');
    assert.equal(await p.page.locator('#emergence-chart rect').count(), 4, 'one bar per slice');
    assert.equal(await p.page.locator('#nearest-members li').count(), 5);
    assert.equal((await p.page.locator('#graph-stage canvas').count()) > 0, true, 'sigma drew into the graph area');
    assert.equal(await p.page.locator('#graph-unavailable').count(), 0);
    assert.equal(await p.page.locator('.member-rows .member-row').count(), 18);
    // The worker layout (ForceAtlas2 from a blob: URL) runs under the same policy.
    await p.page.locator('#run-layout').click();
    await p.page.waitForTimeout(500);
    assert.deepEqual(await p.violations(), []);
    assert.deepEqual(pageErrors(p), []);
  });

  it('hovering, clicking and double-clicking a drawn node shows, pins and opens that node', async () => {
    const { p, page, stage } = await openWithGraph();
    // Where the screen shows a node in the first class's colour, the pointer must find a node of
    // that class: what is drawn and what is picked agree.
    const shot = decodePng(await stage.screenshot());
    const className = scenario.context.classNames[0];
    const blobs = blobsOfColour(shot, classColour(0));
    assert.ok(blobs.length > 0 && blobs[0].size >= 9, `a disc in ${classColour(0)} is drawn (${blobs.length} found)`);
    // The key names that class beside a swatch of the colour drawn, and the nodes without a class.
    const key = page.locator(`#graph-legend li[data-class="0"]`);
    assert.match((await key.textContent()) ?? '', new RegExp(`^${className} \\d+$`));
    const swatch = await key.locator('.legend-swatch').evaluate((e) => getComputedStyle(e).backgroundColor);
    const hex = parseInt(classColour(0).slice(1), 16);
    assert.equal(swatch, `rgb(${(hex >> 16) & 255}, ${(hex >> 8) & 255}, ${hex & 255})`);
    assert.match((await page.locator('#graph-legend li.legend-none').textContent()) ?? '', /^no class \d+$/);
    const box = await stage.boundingBox();
    if (!box) throw new Error('the graph stage has no box');
    // The lowest such disc: where a box at the bottom of the graph would cover it.
    const lowest = blobs.filter((b) => b.size >= 9).sort((a, b) => b.y - a.y)[0];
    const target = { x: box.x + lowest.x, y: box.y + lowest.y };
    await page.mouse.move(target.x, target.y);
    const tooltip = page.locator('#graph-tooltip');
    await tooltip.waitFor({ state: 'visible' });
    assert.match((await tooltip.locator('.tooltip-meta').textContent()) ?? '', new RegExp(`(label|predicted|pending) ${className}\\b`));
    const title = (await tooltip.locator('.tooltip-title').textContent()) ?? '';
    const nodeId = title.split(' · ')[0];
    assert.ok(scenario.context.nodeIds.includes(nodeId), `the tooltip names a node of the scenario (${title})`);
    assert.equal(await page.locator('#tooltip-open').count(), 0, 'hovering does not pin');
    const tipBox = await tooltip.boundingBox();
    if (!tipBox) throw new Error('the hover box has no box');
    const covers =
      target.x >= tipBox.x && target.x <= tipBox.x + tipBox.width && target.y >= tipBox.y && target.y <= tipBox.y + tipBox.height;
    assert.equal(covers, false, 'the hover box does not cover the node it describes');
    // An empty corner of the graph: nothing under the pointer, the hover box goes.
    const corner = { x: box.x + 3, y: box.y + 3 };
    assert.equal(shot.rgba[4 * (3 * shot.width + 3) + 3], 255);
    await page.mouse.move(corner.x, corner.y);
    await tooltip.waitFor({ state: 'hidden' });
    // A click pins it, with a button to open the node.
    await page.mouse.click(target.x, target.y);
    await page.locator('#tooltip-open').waitFor();
    await page.mouse.move(corner.x, corner.y);
    await page.waitForTimeout(100);
    assert.equal(await tooltip.isVisible(), true, 'a pinned box stays while the pointer moves away');
    await page.mouse.dblclick(target.x, target.y);
    const deadline = Date.now() + 5000;
    while (!p.opened.includes(nodeId) && Date.now() < deadline) await page.waitForTimeout(50);
    assert.deepEqual(p.opened, [nodeId], 'a double click opens the node under the pointer');
    assert.deepEqual(pageErrors(p), []);
  });

  it('recolours the graph when the theme changes in place', async () => {
    const { page, stage } = await openWithGraph();
    // The candidate's members have no class: they are drawn in the theme's foreground.
    const neutralDiscs = async (hex: string) => blobsOfColour(decodePng(await stage.screenshot()), hex).filter((b) => b.size >= 9).length;
    assert.ok((await neutralDiscs(lightTheme['--vscode-foreground'])) > 0, 'members in the light foreground');
    // As VS Code does: new variables on <html>, the theme kind on <body>.
    await page.evaluate((theme) => {
      for (const [name, value] of Object.entries(theme)) document.documentElement.style.setProperty(name, value);
      document.body.classList.replace('vscode-light', 'vscode-dark');
    }, darkTheme);
    await page.waitForTimeout(300);
    assert.ok((await neutralDiscs(darkTheme['--vscode-foreground'])) > 0, 'members in the dark foreground');
    assert.equal(await neutralDiscs(lightTheme['--vscode-foreground']), 0, 'none left in the light one');
  });

  it('records each decision made by clicking, with the fields the host needs', async () => {
    const p = await open();
    const [first, second, third] = openIds(p);
    const page = p.page;

    let mark = p.posted.length;
    await page.locator('#decide-name').click();
    await page.locator('#new-class-name input').fill('rotor icing');
    await page.locator('#new-class-description input').fill('ice on blades and sensors');
    await page.locator('#confirm-name').click();
    assert.deepEqual(await decisionAfter(p, mark), {
      kind: 'name-new-class',
      candidateId: first,
      className: 'rotor icing',
      description: 'ice on blades and sensors',
    });
    await settled(p, 1);
    assert.equal(await page.locator('#candidate-title').textContent(), second, 'the panel moves to the next candidate');

    mark = p.posted.length;
    await page.locator('#decide-skip').click();
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'skip', candidateId: second });
    await settled(p, 2);

    mark = p.posted.length;
    await page.locator('#decide-merge-with').click();
    await page.locator('#confirm-mergeWith').click();
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'merge-candidates', candidateIds: [third, second] });
    await settled(p, 3);
    const merged = `${third}+${second}`;
    assert.equal(await page.locator('#candidate-title').textContent(), merged);

    mark = p.posted.length;
    await page.locator('#decide-split').click();
    await page.locator('#split-parts').evaluate((select) => {
      (select as HTMLElement & { value: string }).value = '3';
    });
    await page.locator('#confirm-split').click();
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'split-candidate', candidateId: merged, parts: 3 });
    await settled(p, 4);
    assert.equal(await page.locator('#candidate-title').textContent(), `${merged}.1`);

    // Move: select two rows (the second with shift for a range of 2), choose a class, confirm.
    mark = p.posted.length;
    const rows = page.locator('.member-rows .member-row');
    const picked = [await rows.nth(0).getAttribute('data-node'), await rows.nth(1).getAttribute('data-node')];
    await rows.nth(0).locator('input[type=checkbox]').click();
    await rows
      .nth(1)
      .locator('input[type=checkbox]')
      .click({ modifiers: ['Shift'] });
    assert.match((await page.locator('#member-count').textContent()) ?? '', /2 selected/);
    await page.locator('#decide-move').click();
    await page.locator('#confirm-move').click();
    const move = await decisionAfter(p, mark);
    assert.equal(move.kind, 'move-members');
    assert.deepEqual([...(move.members as string[])].sort(), [...picked].sort());
    assert.equal(move.className, 'blade-crack', 'the first class is chosen by default');
    await settled(p, 5);
    // The moved members left the candidate: nothing stays selected (row positions now hold others).
    await page.waitForFunction(() => /· 0 selected$/.test(document.querySelector('#member-count')?.textContent ?? ''));
    assert.equal(await page.locator('.member-rows input[type=checkbox]:checked').count(), 0);

    mark = p.posted.length;
    await page.locator('#decide-merge-into').click();
    await page.locator('#confirm-mergeInto').click();
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'merge-into-class', candidateId: `${merged}.1`, className: 'blade-crack' });
    await settled(p, 6);

    mark = p.posted.length;
    const current = await page.locator('#candidate-title').textContent();
    await page.locator('#decide-dismiss').click();
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'dismiss', candidateId: current });
    await settled(p, 7);

    mark = p.posted.length;
    await page.locator('#undo').click();
    await p.nextPosted(mark, (m) => m.type === 'undo', 'undo');
    await page.locator('#pending-list li[data-decision]').nth(6).waitFor({ state: 'detached' });
    assert.equal(p.session.pendingDecisions().length, 6);
    mark = p.posted.length;
    await page.locator('#redo').click();
    await p.nextPosted(mark, (m) => m.type === 'redo', 'redo');
    await settled(p, 7);
    assert.deepEqual(
      p.session.pendingDecisions().map((d) => d.kind),
      ['name-new-class', 'skip', 'merge-candidates', 'split-candidate', 'move-members', 'merge-into-class', 'dismiss'],
    );
    assert.deepEqual(await p.violations(), []);
  });

  it('works the member table from the keyboard: move, select, extend, show, then move the selection to a class', async () => {
    const p = await open();
    const page = p.page;
    await page.locator('#member-viewport').focus();
    const ids = await page.locator('.member-rows .member-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-node')));
    await page.keyboard.press('ArrowDown');
    await page.keyboard.press('ArrowDown');
    assert.equal(await page.locator('.member-row.active').getAttribute('data-node'), ids[1]);
    assert.equal(await page.locator('#member-viewport').getAttribute('aria-activedescendant'), 'member-row-1');
    await page.keyboard.press(' ');
    await page.keyboard.press('Shift+ArrowDown');
    await page.waitForFunction(() => /· 2 selected$/.test(document.querySelector('#member-count')?.textContent ?? ''));
    const checked = await page.locator('.member-row.selected').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-node')));
    assert.deepEqual(checked, [ids[1], ids[2]]);
    await page.keyboard.press('Enter');
    await page.locator('#graph-tooltip .tooltip-title', { hasText: ids[2] ?? '' }).waitFor();
    // Space on a row's own checkbox ticks that row, not the active one.
    await page.locator('.member-rows .member-row').nth(4).locator('input').focus();
    await page.keyboard.press(' ');
    await page.waitForFunction(() => /· 3 selected$/.test(document.querySelector('#member-count')?.textContent ?? ''));
    await page.locator('#member-viewport').focus();
    await page.keyboard.press('End');
    assert.equal(await page.locator('.member-row.active').getAttribute('aria-rowindex'), '18');
    const mark = p.posted.length;
    await page.keyboard.press('v');
    await page.locator('#move-class').waitFor();
    await page.keyboard.press('Enter');
    const move = await decisionAfter(p, mark);
    assert.equal(move.kind, 'move-members');
    assert.deepEqual([...(move.members as string[])].sort(), [ids[1], ids[2], ids[4]].sort());
  });

  it('records one decision for a double press made before the host answers', async () => {
    const p = await open();
    const [first, second] = openIds(p);
    const mark = p.posted.length;
    // Two presses in one task: the second comes before any answer can.
    await p.page.evaluate(() => {
      for (let k = 0; k < 2; k++) document.dispatchEvent(new KeyboardEvent('keydown', { key: 'l', code: 'KeyL', bubbles: true }));
    });
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'skip', candidateId: first });
    await settled(p, 1);
    await p.page.locator('#candidate-title', { hasText: second }).waitFor();
    await p.page.waitForTimeout(300);
    assert.equal(p.posted.slice(mark).filter((m) => (m as { type: string }).type === 'decide').length, 1);
    // Once answered, the next press counts again.
    const again = p.posted.length;
    await p.page.keyboard.press('l');
    assert.deepEqual(await decisionAfter(p, again), { kind: 'skip', candidateId: second });
  });

  it('records each decision made with the keyboard, and lists the shortcuts', async () => {
    const p = await open();
    const page = p.page;
    const [first, second, third] = openIds(p);
    assert.match((await page.locator('#help-strip').textContent()) ?? '', /J next candidate/);
    await page.locator('body').click({ position: { x: 5, y: 5 } });

    let mark = p.posted.length;
    await page.keyboard.press('j');
    assert.deepEqual(await p.nextPosted(mark, (m) => m.type === 'selectCandidate', 'selectCandidate'), {
      type: 'selectCandidate',
      candidateId: second,
    });
    await page.locator('#candidate-title', { hasText: second }).waitFor();
    mark = p.posted.length;
    await page.keyboard.press('k');
    assert.deepEqual(await p.nextPosted(mark, (m) => m.type === 'selectCandidate', 'selectCandidate'), {
      type: 'selectCandidate',
      candidateId: first,
    });
    await page.locator('#candidate-title', { hasText: first }).waitFor();

    mark = p.posted.length;
    await page.keyboard.press('n');
    await page.locator('#new-class-name input').waitFor();
    await page.waitForFunction(() => document.querySelector('#new-class-name')?.matches(':focus-within'));
    await page.keyboard.type('frost');
    await page.keyboard.press('Enter');
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'name-new-class', candidateId: first, className: 'frost', description: '' });
    await settled(p, 1);

    mark = p.posted.length;
    await page.keyboard.press('c');
    await page.locator('#merge-candidate').waitFor();
    await page.locator('#decision-form .form-title').click();
    await page.keyboard.press('Escape');
    await page.locator('#decision-form').waitFor({ state: 'hidden' });
    await page.keyboard.press('c');
    await page.locator('#confirm-mergeWith').click();
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'merge-candidates', candidateIds: [second, third] });
    await settled(p, 2);
    const merged = `${second}+${third}`;

    mark = p.posted.length;
    await page.locator('body').click({ position: { x: 5, y: 5 } });
    await page.keyboard.press('s');
    await page.locator('#split-parts').waitFor();
    await page.keyboard.press('Enter');
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'split-candidate', candidateId: merged, parts: 2 });
    await settled(p, 3);

    mark = p.posted.length;
    // A ticked checkbox keeps the focus, and the shortcut still works.
    await page.locator('#select-shown').click();
    await page.keyboard.press('v');
    await page.locator('#move-class').waitFor();
    await page.locator('#confirm-move').click();
    const move = await decisionAfter(p, mark);
    assert.equal(move.kind, 'move-members');
    assert.equal((move.members as string[]).length, p.session.candidate(`${merged}.1`)!.candidate.members.length);
    await settled(p, 4);

    mark = p.posted.length;
    await page.locator('body').click({ position: { x: 5, y: 5 } });
    const current = await page.locator('#candidate-title').textContent();
    await page.keyboard.press('m');
    await page.locator('#merge-class').waitFor();
    await page.keyboard.press('Enter');
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'merge-into-class', candidateId: current, className: 'blade-crack' });
    await settled(p, 5);

    // Nothing is open any more: dismiss and skip have nothing to act on; undo brings one back.
    mark = p.posted.length;
    await page.locator('body').click({ position: { x: 5, y: 5 } });
    await page.keyboard.press('u');
    await p.nextPosted(mark, (m) => m.type === 'undo', 'undo');
    await page.locator('#pending-list li[data-decision]').nth(4).waitFor({ state: 'detached' });
    mark = p.posted.length;
    await page.keyboard.press('l');
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'skip', candidateId: current });
    await settled(p, 5);
    mark = p.posted.length;
    await page.keyboard.press('d');
    assert.deepEqual(await decisionAfter(p, mark), { kind: 'dismiss', candidateId: current });
    await settled(p, 6);
    mark = p.posted.length;
    await page.keyboard.press('u');
    await p.nextPosted(mark, (m) => m.type === 'undo', 'undo');
    await page.locator('#redo:not([disabled])').waitFor();
    mark = p.posted.length;
    await page.keyboard.press('Shift+U');
    await p.nextPosted(mark, (m) => m.type === 'redo', 'redo');
    await settled(p, 6);

    await page.keyboard.press('?');
    await page.locator('#help-overlay').waitFor({ state: 'visible' });
    assert.match((await page.locator('#help-overlay').textContent()) ?? '', /merge with a candidate/);
    await page.keyboard.press('Escape');
    await page.locator('#help-overlay').waitFor({ state: 'hidden' });
    await page.keyboard.press('/');
    await page.waitForFunction(() => document.querySelector('#member-search')?.matches(':focus-within'));
  });

  it('keeps the DOM small for a candidate of 5,000 members, and scrolls, searches and sorts it', async () => {
    const { scenario: large, candidates } = largeScenario(5000);
    const p = await open({ context: large.context, candidates });
    const page = p.page;
    assert.equal(await page.locator('#candidate-size').textContent(), '5000 members');
    assert.match((await page.locator('#member-count').textContent()) ?? '', /^5000 of 5000 members/);
    const domRows = await page.locator('.member-rows .member-row').count();
    assert.ok(domRows > 5 && domRows < 80, `${domRows} rows in the DOM for 5,000 members`);
    await page.locator('#member-viewport').evaluate((viewport) => {
      viewport.scrollTop = viewport.scrollHeight;
    });
    await page.waitForFunction(
      () => Number(document.querySelector('.member-rows .member-row:last-child')?.getAttribute('aria-rowindex')) === 5000,
    );
    assert.ok((await page.locator('.member-rows .member-row').count()) < 80);
    await page.locator('#member-search input').fill('n0070');
    await page.waitForFunction(() => /^10 of 5000/.test(document.querySelector('#member-count')?.textContent ?? ''));
    await page.locator('.sort-button[data-column=id]').click();
    const ids = await page.locator('.member-rows .member-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-node')));
    assert.deepEqual(ids, [...ids].sort());
    assert.equal(ids.length, 10);
  });

  it('opens a candidate of 5,000 members and 20,000 links: graph drawn and refined, table scrolls to the last member', async () => {
    const { scenario: large, candidates } = largeScenario(5000, 2);
    const p = await open({ context: large.context, candidates });
    const page = p.page;
    assert.equal(await page.locator('#candidate-size').textContent(), '5000 members');
    assert.match(
      (await page.locator('#graph-caption').textContent()) ?? '',
      /^5000 members, \d+ neighbours, 20000 links \(20,000 of [\d,]+ links shown\)$/,
    );
    assert.equal(await page.locator('#graph-unavailable').count(), 0);
    assert.ok((await page.locator('#graph-stage canvas').count()) > 0, 'sigma drew into the graph area');
    // Too large to lay out at once: drawn from its placement, then ForceAtlas2 in its worker.
    const rounds = async () =>
      page.evaluate<number[]>(`performance.getEntriesByName('review:layout-settled').map((m) => m.detail?.rounds ?? -1)`);
    const deadline = Date.now() + 60_000;
    while ((await rounds()).length === 0 && Date.now() < deadline) await page.waitForTimeout(200);
    const settled = await rounds();
    assert.equal(settled.length, 1, 'the refinement stopped once');
    assert.ok(settled[0] >= 1, `ForceAtlas2 ran in its worker (${settled[0]} rounds)`);
    await page.locator('#member-viewport').evaluate((viewport) => {
      viewport.scrollTop = viewport.scrollHeight;
    });
    await page.waitForFunction(
      () => Number(document.querySelector('.member-rows .member-row:last-child')?.getAttribute('aria-rowindex')) === 5000,
    );
    const lastShown = await page.locator('.member-rows .member-row:last-child').getAttribute('data-node');
    // Ties keep member order, so the last row is the least novel member that comes last.
    const members = [...candidates[0].members];
    const leastNovel = members.reduce((best, node) => (large.context.novelty[node] <= large.context.novelty[best] ? node : best));
    const expectedLast = large.context.nodeIds[leastNovel];
    assert.equal(lastShown, expectedLast, 'sorted by novelty, highest first: the least novel member is last');
    assert.deepEqual(await p.violations(), []);
  });

  it('says so when WebGL is missing, and the table still works', async () => {
    const p = await open({ withoutWebgl: true });
    const page = p.page;
    await page.locator('#graph-unavailable').waitFor();
    assert.match((await page.locator('#graph-unavailable').textContent()) ?? '', /WebGL is not available/);
    assert.equal(await page.locator('#graph-stage canvas').count(), 0);
    assert.equal(await page.locator('.member-rows .member-row').count(), 18);
    await page.locator('#member-search input').fill('n0011');
    await page.waitForFunction(
      () =>
        /^\d+ of 18 members/.test(document.querySelector('#member-count')?.textContent ?? '') &&
        !/^18 of/.test(document.querySelector('#member-count')?.textContent ?? ''),
    );
    const mark = p.posted.length;
    await page.locator('#decide-dismiss').click();
    assert.equal((await decisionAfter(p, mark)).kind, 'dismiss');
  });

  it('asks the host for threshold previews and shows the answer; the UI computes no scores', async () => {
    const { context } = scenario;
    const previewer = createThresholdPreviewer({
      novelty: { kind: 'fixed', noveltyRaw: context.novelty },
      noveltyMethod: 'msp',
      adjacency: context.adjacency,
      smoothingRounds: 2,
      scoredNodes: Int32Array.from(context.nodeIds.keys()),
      candidates: scenarioCandidates(scenario).map((c) => c.members),
      candidateIds: scenarioCandidates(scenario).map((c) => c.id),
    });
    const setting: ThresholdSetting = { mode: 'quantile', alpha: 3, quantile: 0.1, lambda: 0.5 };
    const p = await open({ previewThreshold: previewer, baseline: previewer(setting) });
    const page = p.page;
    assert.match((await page.locator('#threshold-result').textContent()) ?? '', /^This run: 15 of 148 nodes/);
    const mark = p.posted.length;
    await page.locator('#threshold-quantile').fill('0.25');
    const request = await p.nextPosted(mark, (m) => m.type === 'previewThreshold', 'previewThreshold');
    assert.deepEqual(request.setting, { ...setting, quantile: 0.25 });
    const expected = previewer({ ...setting, quantile: 0.25 });
    assert.equal(expected.rejected, 37, 'round(0.25 × 148)');
    await page.locator('#threshold-result', { hasText: `Would reject ${expected.rejected} of 148` }).waitFor();
    // Each open candidate says how many of its members the previewed setting still rejects.
    assert.equal(await page.locator('#queue-list .queue-preview').count(), expected.candidates!.length);
    for (const c of expected.candidates!) {
      const mark = page.locator(`#queue-list .queue-item[data-candidate="${c.id}"] .queue-preview`);
      assert.equal(await mark.textContent(), `→ ${c.stillRejected} of ${c.members} still rejected${c.kept ? '' : ': would go'}`);
    }
    // A quantile that rejects almost nothing drops candidates, and says so.
    await page.locator('#threshold-quantile').fill('0.01');
    const few = previewer({ ...setting, quantile: 0.01 });
    assert.ok(
      few.candidates!.some((c) => !c.kept),
      'some candidate would go at 1%',
    );
    await page.locator('#queue-list .queue-preview.drops').first().waitFor();
    assert.equal(await page.locator('#queue-list .queue-preview.drops').count(), few.candidates!.filter((c) => !c.kept).length);
    // Back to the run's own setting: the marks go.
    await page.locator('#threshold-reset').click();
    await page.locator('#queue-list .queue-preview').first().waitFor({ state: 'detached' });
  });

  it('gives a run scored with a wide α a slider that reaches it', async () => {
    const baseline = {
      setting: { mode: 'alpha', alpha: 24, quantile: 0.1, lambda: 0.5 },
      rejected: 3,
      scored: 148,
      candidatesKept: 1,
      ungroupedRejected: 0,
    } as const;
    const p = await open({ baseline: { ...baseline, setting: { ...baseline.setting } } });
    const alpha = p.page.locator('#threshold-alpha');
    assert.equal(await alpha.getAttribute('max'), '24');
    assert.equal(await alpha.inputValue(), '24');
    assert.equal(await p.page.locator('#threshold-alpha-value').textContent(), '24.0');
  });

  it('shows why previews are off and keeps the controls still, rather than failing on every move', async () => {
    const p = await open({
      baseline: runOwnSetting(),
    });
    const off = p.page.locator('#threshold-off');
    await off.waitFor();
    assert.equal(await off.textContent(), '· Threshold previews need the run’s scores; score the slice again to use them');
    assert.equal(await p.page.locator('#threshold-alpha').isDisabled(), true);
    assert.equal(await p.page.locator('#threshold-lambda').isDisabled(), true);
    assert.match((await p.page.locator('#threshold-result').textContent()) ?? '', /^This run: 38 of 148 nodes/);
  });

  it('returns to the candidate, search and rejection setting it had before being hidden', async () => {
    const second = scenarioCandidates(scenario)[1].id;
    const p = await open({ savedState: { candidateId: second, search: 'feathers', sortColumn: 'id', sortDescending: false } });
    assert.deepEqual(await p.nextPosted(0, (m) => m.type === 'selectCandidate', 'selectCandidate'), {
      type: 'selectCandidate',
      candidateId: second,
    });
    await p.page.locator('#candidate-title', { hasText: second }).waitFor();
    assert.equal(await p.page.locator('#member-search').evaluate((f) => (f as HTMLElement & { value: string }).value), 'feathers');
    assert.equal(await p.page.locator('.sort-button[data-column=id]').getAttribute('aria-sort'), 'ascending');
    const state = await p.page.evaluate<{ candidateId?: string }>('window.__state()');
    assert.equal(state.candidateId, second);
  });

  for (const [name, theme] of [
    ['light', lightTheme],
    ['dark', darkTheme],
    ['high-contrast', highContrastTheme],
  ] as const) {
    it(`renders in the ${name} theme from the --vscode-* variables (screenshot saved)`, async () => {
      const p = await open({
        theme,
        themeKind: name === 'light' ? 'light' : 'dark',
        baseline: runOwnSetting(),
      });
      const page = p.page;
      const background = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
      const hex = theme['--vscode-editor-background'];
      const rgb = `rgb(${parseInt(hex.slice(1, 3), 16)}, ${parseInt(hex.slice(3, 5), 16)}, ${parseInt(hex.slice(5, 7), 16)})`;
      assert.equal(background, rgb);
      await page.locator('.member-rows .member-row').nth(2).locator('input').click();
      await page.locator('#decide-name').click();
      await page.locator('#new-class-name input').fill('rotor icing');
      await page.waitForTimeout(300);
      mkdirSync(screenshotFolder, { recursive: true });
      const file = path.join(screenshotFolder, `review-panel-${name}.png`);
      await page.screenshot({ path: file });
      assert.ok(statSync(file).size > 20_000, 'a screenshot of the whole panel');
      if (name === 'high-contrast') {
        // No selection backgrounds here: the current candidate and a selected row show by outline.
        const outline = (selector: string) =>
          page
            .locator(selector)
            .first()
            .evaluate((e) => `${getComputedStyle(e).outlineStyle} ${getComputedStyle(e).outlineColor}`);
        assert.equal(await outline('.queue-item.current'), 'solid rgb(243, 133, 24)');
        assert.equal(await outline('.member-row.selected'), 'dashed rgb(243, 133, 24)');
      }
      assert.deepEqual(await p.violations(), []);
    });
  }
});
