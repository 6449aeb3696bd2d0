// The second-look queues of the review panel in Chromium against a stubbed host (panelHarness.ts):
// the queues of a real scored run (the demo generator at 300 nodes), computed from the panel's
// button; keeping a label, giving the suggested class and choosing another, by click and by key,
// with undo and redo; and screenshots in a light and a dark theme.
import * as assert from 'node:assert/strict';
import { mkdirSync, statSync } from 'node:fs';
import * as path from 'node:path';
import type { Browser } from 'playwright-core';
import { reviewInputsOf, scoreSecondLookRun, type SecondLookRun } from '../review/secondLookFixture';
import { launchBrowser, openPanel, screenshotFolder, type Panel, type PanelOptions } from './panelHarness';
import { darkTheme, lightTheme } from './themes';

describe('webview/second-look queues (Chromium)', function () {
  this.timeout(120_000);
  let browser: Browser;
  let run: SecondLookRun;
  let inputs: Awaited<ReturnType<typeof reviewInputsOf>>;
  let panel: Panel | null = null;

  before(async () => {
    run = await scoreSecondLookRun('second-look-webview-');
    inputs = await reviewInputsOf(run);
    assert.ok((inputs.queues.doubts?.doubts.length ?? 0) >= 3, 'the run has a few doubtful labels to go through');
    browser = await launchBrowser();
  });
  after(async () => {
    await browser?.close();
    await run?.remove();
  });
  afterEach(async () => {
    await panel?.close();
    panel = null;
  });

  const open = async (overrides: Partial<PanelOptions> = {}) => {
    panel = await openPanel(browser, {
      context: inputs.context,
      candidates: inputs.candidates,
      theme: lightTheme,
      loadSecondLook: (session) => {
        session.setSecondLook(inputs.queues);
        return 'Computed the queues.';
      },
      ...overrides,
    });
    return panel;
  };
  const decisionAfter = async (p: Panel, mark: number) =>
    (await p.nextPosted(mark, (m) => m.type === 'decide', 'a decision')).decision as Record<string, unknown>;
  const statusOf = (p: Panel, node: string) => p.page.locator(`.second-look-item[data-node="${node}"]`).getAttribute('data-status');
  const waitForStatus = (p: Panel, node: string, status: string) =>
    p.page.locator(`.second-look-item[data-node="${node}"][data-status="${status}"]`).waitFor();
  const loadQueues = async (p: Panel) => {
    const mark = p.posted.length;
    await p.page.locator('#second-look-load').click();
    await p.nextPosted(mark, (m) => m.type === 'loadSecondLook' && typeof m.requestId === 'number', 'loadSecondLook');
    await p.page.locator('.second-look-item').first().waitFor();
  };

  it('computes the queues from the panel, lists the doubtful labels, and keeps or changes them by click and by key', async () => {
    const p = await open();
    const { page } = p;
    const doubts = inputs.queues.doubts!.doubts;
    await page.locator('#tab-doubts').click();
    assert.match((await page.locator('#second-look-summary').textContent()) ?? '', /^Not computed yet/);
    assert.equal(await page.locator('#second-look-note').textContent(), 'Model suggestions are not decisions; you review every change.');
    await loadQueues(p);
    assert.equal(await page.locator('#status-line').textContent(), 'Computed the queues.');
    // The engine's order, with each item's node, labels and score as the report gives them.
    const rows = await page
      .locator('.second-look-item')
      .evaluateAll((items) =>
        items.map((i) => [
          i.getAttribute('data-node'),
          i.querySelector('.sl-current')?.textContent,
          i.querySelector('.sl-suggested')?.textContent,
          i.querySelector('.sl-score')?.textContent,
        ]),
      );
    assert.deepEqual(
      rows,
      doubts.map((d) => [d.node, d.curatedLabel, d.suggestedLabel, d.score.toFixed(2)]),
    );
    assert.equal(await page.locator('#tab-doubts .badge').textContent(), String(doubts.length));
    assert.equal(await page.locator('.second-look-item.current').getAttribute('data-node'), doubts[0].node);

    // Keep by click: a keep-label decision on the node in view; the next item comes into view.
    let mark = p.posted.length;
    await page.locator('#second-look-keep').click();
    const keep = await decisionAfter(p, mark);
    assert.equal(keep.kind, 'keep-label');
    assert.equal(keep.node, doubts[0].node);
    await waitForStatus(p, doubts[0].node, 'kept');
    assert.equal(await page.locator('.second-look-item.current').getAttribute('data-node'), doubts[1].node);

    // Accept the suggestion by key (A): a move-members decision of that one node.
    mark = p.posted.length;
    await page.keyboard.press('a');
    const accept = await decisionAfter(p, mark);
    assert.deepEqual([accept.kind, accept.members, accept.className], ['move-members', [doubts[1].node], doubts[1].suggestedLabel]);
    await waitForStatus(p, doubts[1].node, 'changed');
    assert.match(
      (await page.locator(`.second-look-item[data-node="${doubts[1].node}"] .sl-outcome`).textContent()) ?? '',
      new RegExp(`→ ${doubts[1].suggestedLabel} \\(d-0002\\)`),
    );
    // Keep is not offered for a label a pending decision replaces.
    await page.locator(`.second-look-item[data-node="${doubts[1].node}"]`).click();
    assert.equal(await page.locator('#second-look-keep').getAttribute('disabled'), '');

    // Undo (U) and redo (Shift+U) go through the same session history as candidate decisions.
    await page.keyboard.press('u');
    await waitForStatus(p, doubts[1].node, 'open');
    assert.equal(p.session.pendingDecisions().length, 1);
    await page.keyboard.press('Shift+U');
    await waitForStatus(p, doubts[1].node, 'changed');
    assert.deepEqual(
      p.session.pendingDecisions().map((d) => d.kind),
      ['keep-label', 'move-members'],
    );
    assert.equal(await page.locator('#pending-list li[data-decision]').count(), 2);
    assert.equal(await statusOf(p, doubts[2].node), 'open');
    assert.match((await page.locator('#help-strip').textContent()) ?? '', /Y keep the label/);
    assert.match((await page.locator('#help-strip').textContent()) ?? '', /A give the suggested class/);
    assert.deepEqual(await p.violations(), []);
  });

  it('keeps two doubtful labels pressed in quick succession (each decision names its own node)', async () => {
    const p = await open();
    const doubts = inputs.queues.doubts!.doubts;
    await p.page.locator('#tab-doubts').click();
    await loadQueues(p);
    const mark = p.posted.length;
    // Two presses in one task: the second comes before the host answers the first.
    await p.page.evaluate(() => {
      for (let k = 0; k < 2; k++) document.dispatchEvent(new KeyboardEvent('keydown', { key: 'y', code: 'KeyY', bubbles: true }));
    });
    await waitForStatus(p, doubts[0].node, 'kept');
    await waitForStatus(p, doubts[1].node, 'kept');
    const kept = p.posted
      .slice(mark)
      .filter((m) => (m as { type: string }).type === 'decide')
      .map((m) => (m as { decision: { node: string } }).decision.node);
    assert.deepEqual(kept, [doubts[0].node, doubts[1].node]);
    assert.equal(await p.page.locator('.second-look-item.current').getAttribute('data-node'), doubts[2].node);
  });

  it('gives an unlabelled node of the slice the suggested class or one chosen from the list (G), and returns to the queue it showed', async () => {
    const p = await open();
    const { page } = p;
    const suggestions = inputs.queues.labelNext!.suggestions;
    await page.keyboard.press('3');
    await loadQueues(p);
    assert.equal(await page.locator('#tab-labelNext').getAttribute('aria-selected'), 'true');
    assert.equal(await page.locator('#second-look-keep').isVisible(), false, 'an unlabelled node has no label to keep');
    assert.equal(await page.locator('.second-look-item').count(), suggestions.length);
    assert.equal(await page.locator('.second-look-item .sl-current').first().textContent(), 'unlabelled');

    let mark = p.posted.length;
    await page.locator('#second-look-accept').click();
    const accept = await decisionAfter(p, mark);
    assert.deepEqual(
      [accept.kind, accept.members, accept.className],
      ['move-members', [suggestions[0].node], suggestions[0].predictedLabel],
    );
    await waitForStatus(p, suggestions[0].node, 'changed');

    // J moves on; G opens the chooser on the item in view; another class is chosen and confirmed.
    await page.keyboard.press('j');
    assert.equal(await page.locator('.second-look-item.current').getAttribute('data-node'), suggestions[2].node);
    await page.keyboard.press('g');
    await page.locator('#second-look-class').waitFor();
    const other = inputs.context.classNames.find((name) => name !== suggestions[2].predictedLabel)!;
    await page.locator('#second-look-class').evaluate((select, value) => {
      (select as HTMLElement & { value: string }).value = value;
    }, other);
    mark = p.posted.length;
    await page.locator('#second-look-confirm').click();
    const chosen = await decisionAfter(p, mark);
    assert.deepEqual([chosen.kind, chosen.members, chosen.className], ['move-members', [suggestions[2].node], other]);
    await waitForStatus(p, suggestions[2].node, 'changed');
    const file = p.session.exportDecisions();
    assert.deepEqual(
      file.decisions.map((d) => (d.kind === 'move-members' ? [d.members[0], d.className] : null)),
      [
        [suggestions[0].node, suggestions[0].predictedLabel],
        [suggestions[2].node, other],
      ],
    );

    // The queue in view and its item are kept in the webview's state for a restored panel.
    const state = await page.evaluate<{ queueTab?: string; secondLookNode?: Record<string, string> }>('window.__state()');
    assert.equal(state.queueTab, 'labelNext');
    assert.equal(state.secondLookNode?.labelNext, await page.locator('.second-look-item.current').getAttribute('data-node'));
    await page.keyboard.press('1');
    assert.equal(await page.locator('#second-look').isVisible(), false);
    assert.equal(await page.locator('#candidate-title').isVisible(), true);
  });

  for (const [name, theme] of [
    ['light', lightTheme],
    ['dark', darkTheme],
  ] as const) {
    it(`renders the doubtful labels in the ${name} theme from the --vscode-* variables (screenshot saved)`, async () => {
      const p = await open({ theme, themeKind: name });
      const { page } = p;
      await page.keyboard.press('2');
      await loadQueues(p);
      await page.keyboard.press('y');
      await waitForStatus(p, inputs.queues.doubts!.doubts[0].node, 'kept');
      await page.keyboard.press('g');
      await page.locator('#second-look-class').waitFor();
      await page.waitForTimeout(300);
      const colour = await page.locator('#second-look-note').evaluate((note) => getComputedStyle(note).color);
      const hex = theme['--vscode-descriptionForeground'];
      assert.equal(colour, `rgb(${parseInt(hex.slice(1, 3), 16)}, ${parseInt(hex.slice(3, 5), 16)}, ${parseInt(hex.slice(5, 7), 16)})`);
      mkdirSync(screenshotFolder, { recursive: true });
      const file = path.join(screenshotFolder, `second-look-${name}.png`);
      await page.screenshot({ path: file });
      assert.ok(statSync(file).size > 20_000, 'a screenshot of the whole panel');
      assert.deepEqual(await p.violations(), []);
    });
  }
});
