// The review panel at the scale the issue asks for: a candidate of 5,000 members whose
// neighbourhood reaches the 20,000-link cap, opened in Debian's headless Chromium against the
// stubbed host of the webview tests. Prints how long opening takes (snapshot message → first
// graph render, → table rows in the DOM, → first frame), how the frames go while the layout is
// refined, and frame times of a mouse-drag pan and an animated zoom to fit. Figures, never pass/fail.
// Chromium here draws WebGL in software (--disable-gpu, SwiftShader): the frame's commit reads the
// canvas back and so waits for the GPU process to run that frame's draws. The scene layer
// (webview/sceneLayer.ts) draws every link in one gl.LINES call and every node in one gl.POINTS
// call, so a frame costs what its pixels cost there: about 30 ms for 10,000 nodes and 160 ms more
// for 20,000 links, which wait while the view moves. Figures are an upper bound of what a GPU gives.
// Run alone: npx tsx bench/reviewPanelScale.ts
import { mkdirSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import * as path from 'node:path';
import type { Page } from 'playwright-core';
import { summariseMembers } from '../src/review/reviewCandidate';
import { buildScenario } from '../test/review/reviewScenario';
import { launchBrowser, openPanel, projectRoot } from '../test/webview/panelHarness';
import { lightTheme } from '../test/webview/themes';

const memberCount = 5000;
const outputFolder = path.join(projectRoot, 'test-output', 'bench');

/** Two candidates of 5,000 members cut from one unknown group of 10,000 (three links per node inside the group). */
function scaleScenario() {
  const scenario = buildScenario(5, [
    { size: 300, className: 'blade-crack', words: ['blade', 'crack', 'leading', 'edge', 'erosion'] },
    { size: 300, className: 'gearbox-wear', words: ['gearbox', 'bearing', 'oil', 'vibration', 'wear'] },
    { size: 2 * memberCount, words: ['icing', 'frost', 'sensor', 'anemometer', 'cold', 'heater', 'rime'] },
  ]);
  const group = scenario.groups[2];
  const candidates = [
    summariseMembers(scenario.context, 'c-first', group.subarray(0, memberCount)),
    summariseMembers(scenario.context, 'c-second', group.subarray(memberCount)),
  ];
  return { scenario, candidates };
}

interface FrameStats {
  frames: number;
  median: number;
  p95: number;
  max: number;
}

function frameStats(intervals: number[]): FrameStats {
  const sorted = [...intervals].sort((a, b) => a - b);
  const at = (q: number) => sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] ?? NaN;
  return { frames: sorted.length, median: at(0.5), p95: at(0.95), max: sorted[sorted.length - 1] ?? NaN };
}

const formatFrames = (s: FrameStats) =>
  `${s.frames} frames, median ${s.median.toFixed(1)} ms, p95 ${s.p95.toFixed(1)} ms, max ${s.max.toFixed(1)} ms`;

// Page-side helpers as script strings: tsx would wrap functions passed to evaluate in a helper
// that does not exist in the page.
const startFrameRecorder = `(() => {
  window.__frames = [];
  window.__recording = true;
  const tick = (t) => { window.__frames.push(t); if (window.__recording) requestAnimationFrame(tick); };
  requestAnimationFrame(tick);
})()`;
const stopFrameRecorder = `(() => {
  window.__recording = false;
  const f = window.__frames;
  return f.slice(1).map((t, i) => t - f[i]);
})()`;

/** Polls an expression from Node: waitForFunction would evaluate a string in the page, which the panel's policy forbids. */
async function waitUntil(page: Page, expression: string, timeoutMs = 10_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await page.evaluate<boolean>(expression))) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${expression}`);
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
}

async function recordFrames(page: Page, during: () => Promise<void>): Promise<FrameStats> {
  await page.evaluate(startFrameRecorder);
  await during();
  return frameStats(await page.evaluate<number[]>(stopFrameRecorder));
}

async function main(): Promise<void> {
  const print = (line: string) => console.log(line);
  print(
    `Load average ${loadavg()
      .map((l) => l.toFixed(1))
      .join(' ')} on ${cpus().length} cores (figures scale with it).`,
  );
  const { scenario, candidates } = scaleScenario();
  const browser = await launchBrowser();
  try {
    const panel = await openPanel(browser, { context: scenario.context, candidates, theme: lightTheme });
    const page = panel.page;
    // Let the first candidate's layout finish, so that opening the second one is measured alone.
    await page.waitForTimeout(3000);
    // Marks made from here on belong to opening the second candidate.
    await page.evaluate(`(() => {
      window.__longTasks = [];
      new PerformanceObserver((list) => { for (const e of list.getEntries()) window.__longTasks.push([Math.round(e.startTime), Math.round(e.duration)]); }).observe({ type: 'longtask' });
      window.__since = performance.now();
      window.__snapshotAt = () => performance.getEntriesByName('review:snapshot-received').filter((m) => m.startTime >= window.__since)[0]?.startTime ?? -1;
      window.__firstFrameAt = -1;
      window.__clickedAt = -1;
      document.addEventListener('pointerdown', () => { if (window.__clickedAt < 0) window.__clickedAt = performance.now(); }, true);
      // The frame after the one that drew the new candidate starts once that one is presented.
      window.__waitFrame = () => { if (window.__snapshotAt() >= 0) requestAnimationFrame(() => { window.__firstFrameAt = performance.now(); }); else requestAnimationFrame(window.__waitFrame); };
      requestAnimationFrame(window.__waitFrame);
    })()`);
    await page.evaluate(startFrameRecorder);
    await page.locator('#queue-list .queue-item[data-candidate="c-second"]').click();
    await page.locator('#candidate-title', { hasText: 'c-second' }).waitFor();
    await waitUntil(page, `window.__firstFrameAt > 0`);
    const caption = (await page.locator('#graph-caption').textContent()) ?? '';
    const marks = await page.evaluate<{ name: string; at: number }[]>(
      `performance.getEntriesByType('mark').filter((m) => m.startTime >= window.__snapshotAt()).map((m) => ({ name: m.name, at: m.startTime - window.__snapshotAt() }))`,
    );
    const firstFrame = await page.evaluate<number>(`window.__firstFrameAt - window.__snapshotAt()`);
    const clickToSnapshot = await page.evaluate<number>(`window.__snapshotAt() - window.__clickedAt`);
    const firstMark = (name: string) => marks.find((m) => m.name === name)?.at ?? NaN;
    // The layout refines after the first frame; its marks say when it was last drawn and stopped.
    await waitUntil(page, `performance.getEntriesByName('review:layout-settled').some((m) => m.startTime >= window.__snapshotAt())`);
    const duringLayout = frameStats(await page.evaluate<number[]>(stopFrameRecorder));
    const { settled, rounds } = await page.evaluate<{ settled: number; rounds: number }>(`(() => {
      const mark = performance.getEntriesByName('review:layout-settled').filter((m) => m.startTime >= window.__snapshotAt())[0];
      return { settled: mark.startTime - window.__snapshotAt(), rounds: mark.detail?.rounds ?? 0 };
    })()`);

    print(`Review panel, one candidate of ${memberCount.toLocaleString()} members: ${caption}`);
    print(
      `  click on the queue → snapshot message:                      ${clickToSnapshot.toFixed(0)} ms (the stub host builds the candidate's snapshot and posts it as JSON)`,
    );
    print(`  snapshot message → first graph render (sigma afterRender): ${firstMark('review:graph-rendered').toFixed(0)} ms`);
    print(`  snapshot message → member table rows in the DOM:            ${firstMark('review:table-ready').toFixed(0)} ms`);
    print(`  snapshot message → first frame presented:                    ${firstFrame.toFixed(0)} ms`);
    print(`  click on the queue → first frame presented:                  ${(clickToSnapshot + firstFrame).toFixed(0)} ms`);
    print(`  snapshot message → layout settled:                           ${settled.toFixed(0)} ms (${rounds} ForceAtlas2 rounds)`);
    print(`  frames while the layout refines: ${formatFrames(duringLayout)}`);
    const longTasks = await page.evaluate<number[][]>('window.__longTasks.map(([s, d]) => [Math.round(s - window.__snapshotAt()), d])');
    print(
      `  main-thread tasks over 50 ms after the snapshot [start ms, duration ms]: ${JSON.stringify(longTasks.filter(([start]) => start >= 0))}`,
    );

    mkdirSync(outputFolder, { recursive: true });
    await page.locator('#graph-stage').screenshot({ path: path.join(outputFolder, 'review-panel-scale-graph.png') });
    print(`  graph after the layout: ${path.join(outputFolder, 'review-panel-scale-graph.png')}`);
    const box = await page.locator('#graph-stage').boundingBox();
    if (!box) throw new Error('the graph stage has no box');
    const centre = { x: box.x + box.width / 2, y: box.y + box.height / 2 };
    const pan = await recordFrames(page, async () => {
      await page.mouse.move(centre.x, centre.y);
      await page.mouse.down();
      for (let step = 1; step <= 60; step++) {
        await page.mouse.move(centre.x + step * 4, centre.y + step * 2);
        await page.waitForTimeout(16);
      }
      await page.mouse.up();
      await page.waitForTimeout(100);
    });
    print(`  mouse-drag pan (60 moves over about 1 s): ${formatFrames(pan)}`);
    const fit = await recordFrames(page, async () => {
      await page.locator('#zoom-fit').click();
      await page.waitForTimeout(400);
    });
    print(`  animated zoom to fit (200 ms camera animation): ${formatFrames(fit)}`);
    const errors = panel.pageErrors.filter((e) => !e.includes('GL Driver'));
    if (errors.length) print(`  page errors: ${errors.join('; ')}`);
    await panel.close();
  } finally {
    await browser.close();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
