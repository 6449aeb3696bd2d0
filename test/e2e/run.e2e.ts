// End-to-end run in a real VS Code (code-server) with the packaged extension installed from its
// .vsix, as a user would have it. Run through `npm run test:e2e` (scripts/e2e/run.sh), which sets
// up code-server and builds the .vsix first; or directly: node --import tsx test/e2e/run.e2e.ts [--vsix FILE] [--keep]
//
// Each step leaves a screenshot in test-output/e2e-screenshots/. The process exits 0 when every
// check passed and 1 otherwise, and never leaves code-server or Chromium running.
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import type { Browser } from 'playwright-core';
import { installExtension, startCodeServer, type CodeServerFolders, type RunningCodeServer } from './harness/codeServer';
import { probePackagedRuntime } from './harness/packagedRuntime';
import { defaultVsixPath, demoDatasetFolder, logsDir, screenshotsDir } from './harness/paths';
import { changedLabelIds, git, labelsById, logGrowth, runCandidates, snapshotLabelFiles } from './harness/labelChanges';
import {
  currentCandidate,
  hoverDrawnNode,
  mergeIntoFirstClass,
  nameAsNewClass,
  pendingDecisionTexts,
  reviewFrame,
} from './harness/reviewPanel';
import { currentSecondLookItem, decideByKey, queueCounts, showQueueByKey, waitForSecondLookQueues } from './harness/secondLook';
import { StepRecorder } from './harness/steps';
import { keepVscodeLogs, outputChannelText } from './harness/vscodeLogs';
import {
  acceptInputBox,
  activeEditorTabTitle,
  chooseQuickPickItem,
  clearNotifications,
  clickDialogButton,
  focusedQuickPickRow,
  launchBrowser,
  openWorkbench,
  paletteEntries,
  runCommand,
  statusBarCursor,
  waitForNoProblemRows,
  waitForNotification,
  waitForProblemRows,
  waitForQuickPick,
} from './harness/workbench';
import { copyWithDuplicateNodeId, countCsvRecords, createWorkspace } from './harness/workspace';

const commandTitles = {
  validate: 'Graph Curator: Validate Dataset Folder',
  summary: 'Graph Curator: Show Dataset Summary',
  score: 'Graph Curator: Score Slice…',
  openReview: 'Graph Curator: Open Review Panel',
  secondLook: 'Graph Curator: Review Doubtful Labels and Suggestions',
  apply: 'Graph Curator: Apply Decisions…',
};

/** The class the review loop names; not in the demo dataset's classes.json. */
const newClassName = 'storm-damage-test';
/** The files an apply may commit, relative to the dataset folder. */
const labelFiles = ['labels.csv', 'classes.json', 'label-log.jsonl'];

/** Whole-run limit: a hung workbench must end the run, not the CI job's patience. */
const runTimeoutMs = Number(process.env.E2E_TIMEOUT_SECONDS ?? 1200) * 1000;
/** Worker start-up plus a full validation of the demo dataset on a busy 2-core machine. */
const engineRequestTimeoutMs = 120_000;
/** Scoring the newest demo slice with default settings: 30-90 s on a loaded 2-core machine. */
const scoreTimeoutMs = 300_000;
/** Both second-look reports of the demo run (the doubts cross-fit 5 models): generous on a loaded 2-core machine. */
const secondLookTimeoutMs = 600_000;

interface Options {
  vsixPath: string;
  keepTemp: boolean;
}

function parseArguments(argv: string[]): Options {
  const options: Options = { vsixPath: defaultVsixPath(), keepTemp: false };
  for (let i = 0; i < argv.length; i++) {
    if (argv[i] === '--vsix' && argv[i + 1]) options.vsixPath = path.resolve(argv[++i]);
    else if (argv[i] === '--keep') options.keepTemp = true;
    else throw new Error(`unknown argument "${argv[i]}"; usage: run.e2e.ts [--vsix FILE] [--keep]`);
  }
  return options;
}

function assert(condition: boolean, message: string): asserts condition {
  if (!condition) throw new Error(message);
}

const escapeRegExp = (text: string): string => text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

async function scenario(options: Options, resources: { server?: RunningCodeServer; browser?: Browser }, tempRoot: string): Promise<void> {
  const steps = new StepRecorder(screenshotsDir);
  const folders: CodeServerFolders = {
    extensionsDir: path.join(tempRoot, 'extensions'),
    userDataDir: path.join(tempRoot, 'user-data'),
    homeDir: path.join(tempRoot, 'home'),
  };
  const failureLogs = path.join(logsDir, 'vscode');
  rmSync(logsDir, { recursive: true, force: true });
  mkdirSync(logsDir, { recursive: true });

  try {
    const extensionFolder = await steps.step('install-vsix', 180_000, () => Promise.resolve(installExtension(options.vsixPath, folders)));
    console.log(`       installed into ${extensionFolder}`);

    await steps.step('packaged-tfjs-runs-on-wasm', 90_000, () => {
      const runtime = probePackagedRuntime(extensionFolder);
      // [[1,2],[3,4]]·[[5,6],[7,8]] = [[19,22],[43,50]], computed by hand (1·5+2·7, 1·6+2·8, 3·5+4·7, 3·6+4·8).
      assert(runtime.product.join(',') === '19,22,43,50', `wasm matMul gave ${runtime.product.join(',')}, expected 19,22,43,50`);
      return Promise.resolve();
    });

    const workspace = createWorkspace(path.join(tempRoot, 'workspace'), demoDatasetFolder);
    const datasetName = path.basename(workspace.datasetFolder);

    resources.server = await steps.step('start-code-server', 120_000, () =>
      startCodeServer(workspace.root, folders, path.join(logsDir, 'code-server.log')),
    );
    resources.browser = await launchBrowser();
    const browser = resources.browser;
    const server = resources.server;

    const page = await steps.step('open-workspace', 150_000, async () => {
      const page = await openWorkbench(browser, server.url, workspace.root);
      steps.page = page;
      // The explorer lists the dataset folder once the workspace is really open.
      await page.locator('.explorer-folders-view .monaco-list-row', { hasText: datasetName }).first().waitFor({ timeout: 60_000 });
      return page;
    });

    await steps.step('commands-in-palette', 90_000, async () => {
      // Contributed commands appear once the extension host has scanned the installed extensions,
      // a few seconds after the workbench shows: ask again until they are there.
      const deadline = Date.now() + 60_000;
      let entries: string[] = [];
      let missing: string[] = [];
      do {
        entries = await paletteEntries(page, 'Graph Curator');
        missing = Object.values(commandTitles).filter((title) => !entries.some((entry) => entry.includes(title)));
      } while (missing.length > 0 && Date.now() < deadline);
      console.log(`       palette entries for "Graph Curator": ${entries.join(' | ') || '(none)'}`);
      assert(
        missing.length === 0,
        `missing from the command palette: ${missing.join(', ')}; it listed: ${entries.join(' | ') || '(none)'}`,
      );
    });

    await steps.step('validate-demo-dataset', engineRequestTimeoutMs + 30_000, async () => {
      await runCommand(page, commandTitles.validate);
      // With one dataset.json in the workspace the command asks nothing and reports the result.
      await waitForNotification(page, new RegExp(`Dataset '${escapeRegExp(datasetName)}' is valid`), engineRequestTimeoutMs);
    });

    await steps.step('show-summary', engineRequestTimeoutMs + 30_000, async () => {
      // Counted here from the files themselves, so the check does not depend on the engine's
      // own counting or on the summary's layout: the folder and both counts must appear.
      const nodeCount = countCsvRecords(path.join(workspace.datasetFolder, 'nodes.csv'));
      const labelCount = countCsvRecords(path.join(workspace.datasetFolder, 'labels.csv'));
      const expected = [
        workspace.datasetFolder,
        ...[nodeCount, labelCount].map((count) => new RegExp(`\\b${count.toLocaleString('en-US').replaceAll(',', ',?')}\\b`)),
      ];
      await runCommand(page, commandTitles.summary);
      const deadline = Date.now() + engineRequestTimeoutMs;
      let text = '';
      const missing = (): (string | RegExp)[] =>
        expected.filter((item) => (typeof item === 'string' ? !text.includes(item) : !item.test(text)));
      while ((text = outputChannelText(folders.userDataDir, 'Graph Curator')) === '' || missing().length > 0) {
        assert(
          Date.now() < deadline,
          `the "Graph Curator" output channel lacks ${missing().join(', ')}; it reads:\n${text.slice(0, 2000)}`,
        );
        await page.waitForTimeout(500);
      }
      await page
        .locator('.part.panel .output-view, .part.panel [id="workbench.panel.output"]')
        .first()
        .waitFor({ state: 'visible', timeout: 10_000 });
    });

    const brokenFolder = path.join(workspace.root, `${datasetName}-broken`);
    const defect = copyWithDuplicateNodeId(workspace.datasetFolder, brokenFolder);
    console.log(`       planted duplicate id "${defect.id}" at ${path.basename(brokenFolder)}/${defect.file}:${defect.line}`);

    await steps.step('validate-broken-copy', engineRequestTimeoutMs + 60_000, async () => {
      await clearNotifications(page);
      await runCommand(page, commandTitles.validate);
      // Two dataset.json files now: the command asks which folder.
      await chooseQuickPickItem(page, path.basename(brokenFolder));
      await waitForNotification(
        page,
        new RegExp(`Dataset '${escapeRegExp(path.basename(brokenFolder))}' has \\d+ problems?`),
        engineRequestTimeoutMs,
      );
    });

    await steps.step('problem-in-problems-panel', 60_000, async () => {
      // A marker row reads like: `duplicate node id "R000001" (first on line 2) Graph Curator [Ln 3, Col 1]`.
      const problemRow = new RegExp(`duplicate.*${escapeRegExp(defect.id)}.*\\[Ln ${defect.line}, Col \\d+\\]`, 'i');
      const rows = await waitForProblemRows(page, problemRow, 30_000);
      const fileRowIndex = rows.findIndex((row) => row.startsWith(defect.file) && row.includes(path.basename(brokenFolder)));
      const problemIndex = rows.findIndex((row) => problemRow.test(row));
      assert(
        fileRowIndex >= 0,
        `the Problems panel has no "${defect.file}" entry under ${path.basename(brokenFolder)}; rows: ${rows.join(' | ')}`,
      );
      assert(fileRowIndex < problemIndex, `the problem is not listed under ${defect.file}; rows: ${rows.join(' | ')}`);
    });

    await steps.step('problem-opens-file-at-line', 60_000, async () => {
      const problemRow = page.locator('.markers-panel .monaco-list-row', { hasText: defect.id }).filter({ hasText: `[Ln ${defect.line},` });
      await problemRow.first().dblclick();
      const deadline = Date.now() + 20_000;
      let tab = '';
      let cursor = '';
      do {
        await page.waitForTimeout(250);
        tab = await activeEditorTabTitle(page).catch(() => '');
        cursor = await statusBarCursor(page).catch(() => '');
      } while (!(tab.startsWith(defect.file) && cursor.startsWith(`Ln ${defect.line},`)) && Date.now() < deadline);
      assert(tab.startsWith(defect.file), `opening the problem showed the tab "${tab}", expected ${defect.file}`);
      assert(cursor.startsWith(`Ln ${defect.line},`), `opening the problem put the cursor at "${cursor}", expected line ${defect.line}`);
    });

    await steps.step('remove-broken-copy', 60_000, async () => {
      // The review loop works on the demo copy: with the broken copy's nodes.csv active (or two
      // dataset.json files), the dataset commands would pick or ask for the broken one.
      await runCommand(page, 'View: Close All Editors');
      rmSync(brokenFolder, { recursive: true, force: true });
      await clearNotifications(page);
      // The deleted folder's problems leave the Problems panel with it.
      await waitForNoProblemRows(page, new RegExp(escapeRegExp(path.basename(brokenFolder))), 30_000);
    });

    const before = snapshotLabelFiles(workspace.datasetFolder);

    const candidateCount = await steps.step('score-newest-slice', scoreTimeoutMs + engineRequestTimeoutMs, async () => {
      await runCommand(page, commandTitles.score);
      await waitForQuickPick(page, 'Slice to score (newest first)', engineRequestTimeoutMs);
      const focused = await focusedQuickPickRow(page);
      assert(focused.includes('(newest)'), `the slice pick preselects "${focused}", expected the newest slice`);
      await page.keyboard.press('Enter');
      const scored = await waitForNotification(page, new RegExp(`^Scored \\S+ of ${escapeRegExp(datasetName)}:`), scoreTimeoutMs);
      console.log(`       ${scored}`);
      const count = Number(/(\d+) candidate class/.exec(scored)?.[1] ?? 0);
      assert(count >= 2, `scoring found ${count} candidate classes; the review loop needs two: "${scored}"`);
      return count;
    });

    const frame = reviewFrame(page);
    const firstCandidate = await steps.step('open-review-panel', engineRequestTimeoutMs, async () => {
      await clearNotifications(page);
      await runCommand(page, commandTitles.openReview);
      const shown = await currentCandidate(frame, engineRequestTimeoutMs - 15_000);
      const queued = await frame.locator('#queue-list .queue-item').count();
      assert(queued === candidateCount, `the queue lists ${queued} candidates, the scoring reported ${candidateCount}`);
      return shown;
    });

    await steps.step('graph-drawn-and-picked', 60_000, async () => {
      const { caption, colour, tooltip } = await hoverDrawnNode(page, frame);
      console.log(`       graph: ${caption}; hovered a ${colour} disc: ${tooltip}`);
      assert(/^\d+ members, \d+ neighbours, \d+ links/.test(caption), `graph caption "${caption}"`);
      // A class colour is a neighbour's known or predicted class: the box names a node and its class.
      assert(/^\S+ · neighbour .*(label|predicted) \S+/.test(tooltip), `the hover box says "${tooltip}"`);
    });

    const secondCandidate = await steps.step('name-first-candidate', 60_000, async () => {
      await nameAsNewClass(frame, newClassName, 'Blade and nacelle damage after storms (end-to-end test).', 1);
      const next = await currentCandidate(frame, 15_000);
      assert(next !== firstCandidate, `the panel still shows ${firstCandidate} after naming it`);
      return next;
    });

    const mergeTarget = await steps.step('merge-second-candidate', 60_000, async () => {
      const target = await mergeIntoFirstClass(frame, 2);
      const pending = await pendingDecisionTexts(frame);
      console.log(`       pending: ${pending.join(' | ')}`);
      assert(target !== '' && target !== newClassName, `the class choice offered "${target}" first, expected an existing class`);
      return target;
    });

    await steps.step('compute-second-look-queues', secondLookTimeoutMs + 30_000, async () => {
      await clearNotifications(page);
      await runCommand(page, commandTitles.secondLook);
      const computed = await waitForSecondLookQueues(page, frame, secondLookTimeoutMs);
      console.log(`       ${computed.summary}`);
      console.log(`       progress seen: ${computed.progressSeen.slice(-3).join(' | ') || '(between polls)'}`);
      // Queues computed while the candidates are in view bring the doubtful labels into view.
      await frame.locator('#tab-doubts[aria-selected="true"]').waitFor({ state: 'attached', timeout: 10_000 });
      const note = ((await frame.locator('#second-look-note').textContent()) ?? '').trim();
      assert(note === 'Model suggestions are not decisions; you review every change.', `the second-look note reads "${note}"`);
    });

    const keptItem = await steps.step('keep-doubtful-label', 60_000, async () => {
      await showQueueByKey(page, frame, 'doubts');
      const counts = await queueCounts(frame);
      const badge = ((await frame.locator('#tab-doubts .badge').textContent()) ?? '').trim();
      console.log(`       doubtful labels: ${counts.items} listed, ${counts.open} open, tab badge ${badge}`);
      assert(counts.open > 0, `the doubtful labels queue has no open item (${counts.items} listed)`);
      assert(badge === String(counts.open), `the Doubtful labels tab counts ${badge} open, the list shows ${counts.open}`);
      const item = await currentSecondLookItem(frame);
      // The panel's label is the one labels.csv holds now; the model suggests another class.
      const fileLabel = labelsById(before.labelLines).get(item.node);
      assert(item.status === 'open', `the doubtful label in view, ${item.node}, is ${item.status}, expected open`);
      assert(
        item.currentLabel === fileLabel,
        `the panel shows ${item.node} labelled "${item.currentLabel}", labels.csv has "${fileLabel}"`,
      );
      assert(
        item.suggestedLabel !== '' && item.suggestedLabel !== item.currentLabel,
        `${item.node} is doubted with suggestion "${item.suggestedLabel}"`,
      );
      const kept = await decideByKey(page, frame, 'y', item.node, 'kept');
      console.log(`       kept ${kept.node} "${kept.currentLabel}" (suggested "${kept.suggestedLabel}"): ${kept.outcome}`);
      const next = await currentSecondLookItem(frame);
      assert(next.node !== item.node, `the panel still shows ${item.node} after keeping its label`);
      return kept;
    });

    const labelNextItem = await steps.step('give-suggested-class', 60_000, async () => {
      await showQueueByKey(page, frame, 'labelNext');
      const keepShown = await frame.locator('#second-look-keep').isVisible();
      assert(!keepShown, 'the Label next queue offers "Keep label" for unlabelled nodes');
      const counts = await queueCounts(frame);
      console.log(`       label next: ${counts.items} listed, ${counts.open} open`);
      const item = await currentSecondLookItem(frame);
      assert(item.status === 'open', `the suggestion in view, ${item.node}, is ${item.status}, expected open`);
      assert(item.currentLabel === 'unlabelled', `the suggestion in view, ${item.node}, shows the label "${item.currentLabel}"`);
      assert(!labelsById(before.labelLines).has(item.node), `${item.node} is suggested to label next but labels.csv labels it`);
      const given = await decideByKey(page, frame, 'a', item.node, 'changed');
      console.log(`       gave ${given.node} "${given.suggestedLabel}": ${given.outcome}`);
      assert(given.outcome.startsWith(`→ ${given.suggestedLabel} (`), `${given.node} shows the outcome "${given.outcome}"`);
      return given;
    });

    await steps.step('second-look-decisions-pending', 30_000, async () => {
      const pending = await pendingDecisionTexts(frame);
      console.log(`       pending: ${pending.join(' | ')}`);
      const keptId = /\((d-\d+)\)/.exec(keptItem.outcome)?.[1];
      const givenId = /\((d-\d+)\)/.exec(labelNextItem.outcome)?.[1];
      assert(pending.length === 4, `${pending.length} decisions are pending, expected 4 (name, merge, keep, give)`);
      assert(
        pending.some((text) => text === `${keptId} keep the label of ${keptItem.node}`),
        `no pending "${keptId} keep the label of ${keptItem.node}"`,
      );
      assert(
        pending.some((text) => text === `${givenId} move 1 node to "${labelNextItem.suggestedLabel}"`),
        `no pending "${givenId} move 1 node to "${labelNextItem.suggestedLabel}""`,
      );
      // Back on the candidates: the panel shows them again.
      await frame.locator('#panel-title').click();
      await page.keyboard.press('1');
      await frame.locator('#second-look').waitFor({ state: 'hidden', timeout: 10_000 });
    });

    const applyDialog = await steps.step('apply-and-commit', engineRequestTimeoutMs * 2, async () => {
      await runCommand(page, commandTitles.apply);
      const dialog = await clickDialogButton(
        page,
        new RegExp(`Apply \\d+ label changes? to ${escapeRegExp(datasetName)}\\?`),
        'Apply and Commit…',
        engineRequestTimeoutMs,
      );
      console.log(`       dialog: ${dialog.slice(0, 200)}`);
      const subject = await acceptInputBox(page, 'Commit the label files', engineRequestTimeoutMs);
      console.log(`       commit subject: ${subject}`);
      const applied = await waitForNotification(page, /^Applied \d+ label changes?/, engineRequestTimeoutMs);
      console.log(`       ${applied}`);
      assert(/Committed [0-9a-f]{12}/.test(applied), `the apply did not commit: "${applied}"`);
      return dialog;
    });

    await steps.step('label-files-on-disk', 30_000, () => {
      const after = snapshotLabelFiles(workspace.datasetFolder);
      const { members } = runCandidates(workspace.datasetFolder);
      const named = members.get(firstCandidate);
      const merged = members.get(secondCandidate);
      assert(named !== undefined && merged !== undefined, `candidates.json lacks ${firstCandidate} or ${secondCandidate}`);
      const oldLabels = labelsById(before.labelLines);
      const newLabels = labelsById(after.labelLines);
      // Every member now carries its decision's class; the nodes whose label differed before are
      // exactly the ones whose labels.csv line may change.
      const expected = new Set<string>();
      for (const [ids, label] of [
        [named, newClassName],
        [merged, mergeTarget],
        [[labelNextItem.node], labelNextItem.suggestedLabel],
      ] as const) {
        for (const id of ids) {
          assert(newLabels.get(id) === label, `node ${id} is labelled "${newLabels.get(id)}" after the apply, expected "${label}"`);
          if (oldLabels.get(id) !== label) expected.add(id);
        }
      }
      const changed = changedLabelIds(before.labelLines, after.labelLines);
      const unexpected = [...changed.ids].filter((id) => !expected.has(id));
      const unchanged = [...expected].filter((id) => !changed.ids.has(id));
      assert(
        unexpected.length === 0,
        `labels.csv changed on lines of nodes outside both candidates and the label-next node: ${unexpected.slice(0, 10).join(', ')}`,
      );
      assert(unchanged.length === 0, `labels.csv did not change for members: ${unchanged.slice(0, 10).join(', ')}`);
      assert(expected.size > 0, 'the decisions changed no label');
      // The kept label is untouched; the label-next node is one line added with the suggested class.
      assert(
        newLabels.get(keptItem.node) === keptItem.currentLabel && oldLabels.get(keptItem.node) === keptItem.currentLabel,
        `the kept node ${keptItem.node} is labelled "${newLabels.get(keptItem.node)}" after the apply, expected "${keptItem.currentLabel}" as before`,
      );
      assert(
        changed.added.includes(`${labelNextItem.node},${labelNextItem.suggestedLabel}`) &&
          !changed.removed.some((line) => line.startsWith(`${labelNextItem.node},`)),
        `labels.csv did not gain the line "${labelNextItem.node},${labelNextItem.suggestedLabel}"`,
      );
      // The dialog counts exactly the changed nodes and names the kept label as review-only.
      const dialogCount = Number(/Apply (\d+) label changes?/.exec(applyDialog)?.[1]);
      assert(
        dialogCount === changed.ids.size,
        `the apply dialog announced ${dialogCount} label changes; labels.csv changed for ${changed.ids.size}`,
      );
      assert(
        /review-only, no label change: 1 keep-label/.test(applyDialog),
        `the apply dialog does not count the kept label as review-only: ${applyDialog.slice(0, 400)}`,
      );
      console.log(`       labels.csv: ${changed.removed.length} lines removed, ${changed.added.length} added, ${changed.ids.size} nodes`);

      const growth = logGrowth(before.logText, after.logText);
      const loggedNodes = new Set(growth.nodeLines.map((line) => line.node));
      assert(
        growth.nodeLines.length === changed.ids.size && [...changed.ids].every((id) => loggedNodes.has(id)),
        `label-log.jsonl gained ${growth.nodeLines.length} node lines for ${loggedNodes.size} nodes; labels.csv changed for ${changed.ids.size}`,
      );
      // The label-next node's log line carries the second-look note; a kept label changes nothing
      // and is logged nowhere (docs/decisions-format.md: keep-label is review-only, no log lines).
      const labelNextLines = growth.nodeLines.filter((line) => line.node === labelNextItem.node);
      const givenId = /\((d-\d+)\)/.exec(labelNextItem.outcome)?.[1];
      assert(
        labelNextLines.length === 1 &&
          labelNextLines[0].oldLabel === null &&
          labelNextLines[0].newLabel === labelNextItem.suggestedLabel &&
          labelNextLines[0].decisionId === givenId &&
          /^second look: suggested to label next/.test(labelNextLines[0].reason ?? ''),
        `label-log.jsonl logs ${labelNextItem.node} as ${JSON.stringify(labelNextLines)}; expected one line null → "${labelNextItem.suggestedLabel}" of ${givenId} with the second-look note`,
      );
      assert(!loggedNodes.has(keptItem.node), `label-log.jsonl logs a change of the kept node ${keptItem.node}`);
      const phases = growth.markerLines.map((marker) => marker.phase).join(',');
      const batches = new Set([...growth.markerLines, ...growth.nodeLines].map((line) => line.batch));
      assert(
        phases === 'begin,commit' && batches.size === 1,
        `label-log.jsonl gained batch markers "${phases}" over batches ${[...batches].join(', ')}`,
      );

      const classes = JSON.parse(after.classesText) as { classes: { name: string; status: string }[] };
      assert(
        classes.classes.some((c) => c.name === newClassName && c.status === 'active'),
        `classes.json has no active class "${newClassName}"`,
      );
      return Promise.resolve();
    });

    await steps.step('one-git-commit', 30_000, () => {
      const datasetPath = path.relative(workspace.root, workspace.datasetFolder);
      const count = git(workspace.root, 'rev-list', '--count', 'HEAD');
      assert(count === '2', `git has ${count} commits, expected the initial one and the apply's`);
      const files = git(workspace.root, 'show', '--name-only', '--format=', 'HEAD').split('\n').filter(Boolean).sort();
      const expectedFiles = labelFiles.map((file) => `${datasetPath}/${file}`).sort();
      assert(
        files.join(',') === expectedFiles.join(','),
        `the new commit touches ${files.join(', ')}; expected ${expectedFiles.join(', ')}`,
      );
      const dirty = git(workspace.root, 'status', '--porcelain', '--', ...expectedFiles);
      assert(dirty === '', `the label files differ from the commit: ${dirty}`);
      // The commit message counts every decision, the review-only keep-label among them.
      const body = git(workspace.root, 'log', '-1', '--format=%b');
      assert(/\(4 decisions\)/.test(body), `the commit message does not count the 4 decisions:\n${body}`);
      console.log(`       ${git(workspace.root, 'log', '-1', '--format=%h %s')}`);
      return Promise.resolve();
    });
  } catch (error) {
    keepVscodeLogs(folders.userDataDir, failureLogs);
    throw error;
  }
}

async function main(): Promise<number> {
  const options = parseArguments(process.argv.slice(2));
  const tempRoot = mkdtempSync(path.join(os.tmpdir(), 'graph-curator-e2e-'));
  const resources: { server?: RunningCodeServer; browser?: Browser } = {};
  let cleaningUp: Promise<void> | undefined;
  const cleanUp = (keepTemp: boolean): Promise<void> => {
    cleaningUp ??= (async () => {
      await resources.browser?.close().catch(() => undefined);
      await resources.server?.stop();
      if (keepTemp) console.log(`temporary folder kept: ${tempRoot}`);
      else rmSync(tempRoot, { recursive: true, force: true });
    })();
    return cleaningUp;
  };
  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    process.once(signal, () => {
      console.error(`\nend-to-end run interrupted (${signal}); stopping code-server and the browser`);
      void cleanUp(false).finally(() => process.exit(signal === 'SIGINT' ? 130 : 143));
    });
  }
  const started = Date.now();
  console.log(`end-to-end run: ${options.vsixPath}`);
  let watchdog: NodeJS.Timeout | undefined;
  try {
    await Promise.race([
      scenario(options, resources, tempRoot),
      new Promise<never>((_, reject) => {
        watchdog = setTimeout(
          () => reject(new Error(`the whole run took longer than ${runTimeoutMs / 1000} s (E2E_TIMEOUT_SECONDS)`)),
          runTimeoutMs,
        );
      }),
    ]);
    await cleanUp(options.keepTemp);
    console.log(`end-to-end run passed in ${((Date.now() - started) / 1000).toFixed(1)} s; screenshots in ${screenshotsDir}`);
    return 0;
  } catch (error) {
    console.error(
      `\nend-to-end run FAILED after ${((Date.now() - started) / 1000).toFixed(1)} s: ${error instanceof Error ? error.message : String(error)}`,
    );
    console.error(`screenshots: ${screenshotsDir}; logs: ${logsDir}`);
    await cleanUp(true);
    return 1;
  } finally {
    clearTimeout(watchdog);
  }
}

main().then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(error);
    process.exit(1);
  },
);
