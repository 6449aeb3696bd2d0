import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { planApply } from '../../src/engine/decisions/plan';
import { InvalidDecisionsError, parseDecisionsText } from '../../src/engine/decisions/decisionsFile';
import { InterruptedApplyError } from '../../src/engine/decisions/applyErrors';
import type { Decision, DecisionsFile } from '../../src/engine/decisions/types';
import { copyDemo, demoDecisions, expectedLabels, readLabelsIndependently, removeTemporaryFolders } from './fixtures';

async function problemsOf(promise: Promise<unknown>): Promise<InvalidDecisionsError> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof InvalidDecisionsError) return error;
    throw error;
  }
  assert.fail('expected InvalidDecisionsError');
}

describe('planApply', () => {
  let folder: string;
  before(async () => {
    folder = await copyDemo();
  });
  after(removeTemporaryFolders);

  it('computes the label changes the decisions imply, and nothing else', async () => {
    const demo = await demoDecisions(folder);
    const original = await readLabelsIndependently(path.join(folder, 'labels.csv'));
    const expected = expectedLabels(original, demo.file.decisions);
    const plan = await planApply(folder, demo.file, { source: 'decisions.json' });

    const expectedChanges = [...expected]
      .filter(([id, label]) => original.get(id) !== label)
      .map(([id]) => id)
      .sort();
    assert.deepEqual(
      plan.changes.map((c) => c.node),
      expectedChanges,
    );
    for (const change of plan.changes) {
      assert.equal(change.newLabel, expected.get(change.node));
      assert.equal(change.oldLabel, original.get(change.node) ?? null);
    }
    // 30 + 10 + 5 new labels; the corrected node moves within the set; two members already had theirs.
    assert.equal(plan.changes.length, 45);
    assert.equal(plan.changes.find((c) => c.node === demo.correctedNode)?.decisionId, 'd-0005');
    assert.equal(plan.changes.find((c) => c.node === demo.erosionMembers[0])?.reason, 'coating delamination is erosion');
    assert.equal(plan.outcomes.find((o) => o.id === 'd-0003')?.alreadyLabelled, 2);
    assert.deepEqual(plan.reviewOnly, { skip: 1, dismiss: 1, 'keep-label': 1, 'split-candidate': 1 });
    assert.deepEqual(
      plan.classesAdded.map((c) => [c.name, c.introducedIn, c.status]),
      [
        ['lightning-receptor-damage', '2024-Q4', 'active'],
        ['main-shaft-cracking', '2024-Q4', 'active'],
      ],
    );
    // One log line per changed node, carrying the run and decision.
    assert.equal(plan.logEntries.length, 45);
    assert.ok(
      plan.logEntries.every((e) => e.runId === demo.file.runId && e.settingsHash === 'f00dfeed' && e.decisionId?.startsWith('d-000')),
    );
    const count = (name: string) => plan.counts.find((c) => c.name === name)!;
    assert.deepEqual([count('lightning-receptor-damage').before, count('lightning-receptor-damage').after], [0, 29]);
    assert.deepEqual([count('blade-surface-erosion').before, count('blade-surface-erosion').after], [256, 256 + 10 + 1]);
    assert.equal(plan.baseConflicts.length, 0);
    assert.ok(plan.hasChanges);
  });

  it('merge-classes relabels every node of the class and marks it merged', async () => {
    const demo = await demoDecisions(folder);
    const merge: Decision = {
      id: 'd-0100',
      kind: 'merge-classes',
      madeAt: '2025-01-10T10:00:00Z',
      from: 'yaw-drive-misalignment',
      into: 'pitch-system-fault',
    };
    const plan = await planApply(folder, { ...demo.file, decisions: [merge] });
    const original = await readLabelsIndependently(path.join(folder, 'labels.csv'));
    const yaw = [...original].filter(([, l]) => l === 'yaw-drive-misalignment').length;
    assert.equal(plan.changes.length, yaw);
    assert.ok(plan.changes.every((c) => c.oldLabel === 'yaw-drive-misalignment' && c.newLabel === 'pitch-system-fault'));
    assert.deepEqual(
      plan.classes.find((c) => c.name === 'yaw-drive-misalignment'),
      {
        name: 'yaw-drive-misalignment',
        description: plan.classes.find((c) => c.name === 'yaw-drive-misalignment')!.description,
        introducedIn: '2019-Q1',
        status: 'merged',
        mergedInto: 'pitch-system-fault',
      },
    );
    assert.deepEqual(plan.classesMerged, [{ from: 'yaw-drive-misalignment', into: 'pitch-system-fault' }]);
  });

  it('review-only decisions change nothing', async () => {
    const demo = await demoDecisions(folder);
    const plan = await planApply(folder, {
      ...demo.file,
      decisions: demo.file.decisions.filter((d) => ['skip', 'dismiss', 'keep-label', 'split-candidate'].includes(d.kind)),
    });
    assert.equal(plan.hasChanges, false);
    assert.equal(plan.changes.length, 0);
    assert.equal(plan.labelsFile.changed, false);
    assert.equal(plan.classesFile.changed, false);
  });

  it('names the decisions file, line and column of each invalid decision', async () => {
    const demo = await demoDecisions(folder);
    const decisions: Decision[] = [
      {
        id: 'd-1',
        kind: 'name-new-class',
        madeAt: '2025-01-10T09:00:00Z',
        candidateId: 'c1',
        members: ['R000002', 'NO-SUCH-NODE'],
        className: 'gearbox-bearing-wear',
        description: 'clash',
      },
      {
        id: 'd-2',
        kind: 'merge-into-class',
        madeAt: '2025-01-10T09:00:00Z',
        candidateId: 'c2',
        members: ['R000003'],
        className: 'no-such-class',
      },
      {
        id: 'd-3',
        kind: 'merge-into-class',
        madeAt: '2025-01-10T09:00:00Z',
        candidateId: 'c3',
        members: ['R000005'],
        className: 'converter-fault',
      },
      {
        id: 'd-4',
        kind: 'merge-into-class',
        madeAt: '2025-01-10T09:00:00Z',
        candidateId: 'c4',
        members: ['R000005'],
        className: 'pitch-system-fault',
      },
      { id: 'd-1', kind: 'keep-label', madeAt: '2025-01-10T09:00:00Z', node: 'ALSO-MISSING' },
    ];
    const text = JSON.stringify({ ...demo.file, decisions }, null, 2);
    const read = parseDecisionsText(text, 'review.json');
    assert.ok(read.decisions);
    const error = await problemsOf(planApply(folder, read.decisions, { source: 'review.json', locate: read.locate }));
    const lines = text.split('\n');
    // Position of the n-th occurrence of a JSON string in the text (1-based line and column), found by search.
    const positionOf = (needle: string, nth = 1) => {
      let seen = 0;
      for (let k = 0; k < lines.length; k++) {
        const column = lines[k].indexOf(needle);
        if (column >= 0 && ++seen === nth) return { line: k + 1, column: column + 1 };
      }
      throw new Error(`not found: ${needle}`);
    };
    const byMessage = (part: string) => error.problems.find((p) => p.message.includes(part));
    assert.ok(error.problems.every((p) => p.file === 'review.json'));
    assert.deepEqual(
      { ...byMessage('unknown node "NO-SUCH-NODE"') },
      {
        file: 'review.json',
        ...positionOf('"NO-SUCH-NODE"'),
        message: 'decision #1 (d-1, name-new-class): unknown node "NO-SUCH-NODE" (not in nodes.csv)',
      },
    );
    assert.deepEqual(positionOf('"gearbox-bearing-wear"', 1), {
      line: byMessage('exists already')!.line,
      column: byMessage('exists already')!.column,
    });
    assert.match(byMessage('exists already')!.message, /decision #1 .*class "gearbox-bearing-wear" exists already \(in classes.json\)/);
    assert.match(byMessage('no class "no-such-class"')!.message, /^decision #2 \(d-2, merge-into-class\)/);
    assert.match(
      byMessage('node "R000005" is given')!.message,
      /^decision #4 .*"converter-fault" by decision #3 \(d-3\) and "pitch-system-fault" here/,
    );
    assert.match(byMessage('id "d-1" is used')!.message, /^decision #5/);
    assert.ok(byMessage('unknown node "ALSO-MISSING"'));
    assert.equal(error.problems.length, 6);
  });

  it('refuses a target class that is merged, and a dataset of another name', async () => {
    const demo = await demoDecisions(folder);
    const decisions: Decision[] = [
      { id: 'm', kind: 'merge-classes', madeAt: '2025-01-10T09:00:00Z', from: 'converter-fault', into: 'yaw-drive-misalignment' },
      { id: 'n', kind: 'move-members', madeAt: '2025-01-10T09:00:00Z', members: ['R000002'], className: 'converter-fault' },
    ];
    const error = await problemsOf(planApply(folder, { ...demo.file, dataset: 'other-farm', decisions }));
    assert.deepEqual(
      error.problems.map((p) => p.message),
      [
        `the decisions are for dataset "other-farm", but ${folder} holds "wind-farm"`,
        'decision #2 (n, move-members): class "converter-fault" is merged into "yaw-drive-misalignment": use "yaw-drive-misalignment"',
      ],
    );
  });

  it('checks the shape of decisions handed over in memory', async () => {
    const demo = await demoDecisions(folder);
    const broken = { ...demo.file, decisions: [{ id: 'x', kind: 'rename-everything', madeAt: 'yesterday' }] } as unknown as DecisionsFile;
    const error = await problemsOf(planApply(folder, broken));
    assert.deepEqual(
      error.problems.map((p) => p.message),
      [
        'decision #1 (x, rename-everything): "madeAt" must be an ISO-8601 time',
        'decision #1 (x, rename-everything): "kind" must be one of "name-new-class", "merge-into-class", "move-members", "merge-classes", "merge-candidates", "split-candidate", "dismiss", "skip", "keep-label"',
      ],
    );
  });

  it('refuses to plan while an earlier apply is interrupted', async () => {
    const other = await copyDemo();
    await fs.appendFile(
      path.join(other, 'label-log.jsonl'),
      JSON.stringify({ batch: 'b-1', phase: 'begin', time: '2025-01-01T00:00:00Z', files: {} }) + '\n',
    );
    const demo = await demoDecisions(other);
    await assert.rejects(
      planApply(other, demo.file),
      (error: unknown) => error instanceof InterruptedApplyError && error.batches[0] === 'b-1',
    );
  });
});
