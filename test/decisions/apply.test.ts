import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { parse } from 'csv-parse/sync';
import { planApply } from '../../src/engine/decisions/plan';
import { applyPlan } from '../../src/engine/decisions/apply';
import { ConflictError } from '../../src/engine/decisions/applyErrors';
import { readAppliedBatches } from '../../src/engine/decisions/recover';
import { effectiveEntries } from '../../src/engine/decisions/batchLog';
import { sha256OfText } from '../../src/engine/decisions/labelFiles';
import { validateDatasetFolder } from '../../src/engine/dataset/validate';
import type { Decision } from '../../src/engine/decisions/types';
import { copyDemo, demoDecisions, expectedLabels, hashFolder, readLabelsIndependently, removeTemporaryFolders } from './fixtures';

const lines = (text: string): string[] => text.split('\n').filter((l) => l !== '');

describe('applyPlan', () => {
  after(removeTemporaryFolders);

  it('hashes with standard SHA-256', () => {
    // FIPS 180-2, Appendix B.1: SHA-256("abc").
    assert.equal(sha256OfText('abc'), 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('changes exactly the lines of the changed nodes, registers the classes and logs one line per change', async () => {
    const folder = await copyDemo();
    const labelsPath = path.join(folder, 'labels.csv');
    const oldText = await fs.readFile(labelsPath, 'utf8');
    const original = await readLabelsIndependently(labelsPath);
    const demo = await demoDecisions(folder);
    const expected = expectedLabels(original, demo.file.decisions);
    const changed = [...expected].filter(([id, label]) => original.get(id) !== label);

    const result = await applyPlan(await planApply(folder, demo.file, { source: 'decisions.json' }), {
      now: new Date('2025-01-10T12:00:00.000Z'),
    });
    assert.deepEqual(result.written, ['labels.csv', 'classes.json']);

    const newText = await fs.readFile(labelsPath, 'utf8');
    const before = new Set(lines(oldText));
    const after = new Set(lines(newText));
    const added = lines(newText).filter((l) => !before.has(l));
    const removed = lines(oldText).filter((l) => !after.has(l));
    // Only the changed nodes' lines differ: new lines for all of them, old lines for those that had a label.
    assert.deepEqual(added.sort(), changed.map(([id, label]) => `${id},${label}`).sort());
    assert.deepEqual(
      removed.sort(),
      changed
        .filter(([id]) => original.has(id))
        .map(([id]) => `${id},${original.get(id)}`)
        .sort(),
    );
    assert.deepEqual(await readLabelsIndependently(labelsPath), expected);
    assert.ok(newText.startsWith('id,label\n') && !newText.includes('\r'));
    const ids = lines(newText)
      .slice(1)
      .map((l) => l.split(',')[0]);
    assert.deepEqual(ids, [...ids].sort());

    const classes = (
      JSON.parse(await fs.readFile(path.join(folder, 'classes.json'), 'utf8')) as {
        classes: {
          name: string;
          introducedIn: string;
          status: string;
        }[];
      }
    ).classes;
    assert.deepEqual(
      classes.slice(6).map((c) => [c.name, c.introducedIn, c.status]),
      [
        ['lightning-receptor-damage', '2024-Q4', 'active'],
        ['main-shaft-cracking', '2024-Q4', 'active'],
      ],
    );

    const logLines = lines(await fs.readFile(path.join(folder, 'label-log.jsonl'), 'utf8')).map(
      (l) => JSON.parse(l) as Record<string, string>,
    );
    assert.equal(logLines.length, changed.length + 2);
    assert.equal(logLines[0].phase, 'begin');
    assert.equal(logLines[logLines.length - 1].phase, 'commit');
    const entries = logLines.slice(1, -1);
    assert.deepEqual(entries.map((e) => e.node).sort(), changed.map(([id]) => id).sort());
    assert.ok(
      entries.every((e) => e.time === '2025-01-10T12:00:00.000Z' && e.batch === result.batch && e.newLabel === expected.get(e.node)),
    );

    const batches = await readAppliedBatches(folder);
    assert.deepEqual(
      batches.batches.map((b) => b.state),
      ['committed'],
    );
    assert.equal(effectiveEntries(batches).length, changed.length);
    // The dataset layer still reads the folder (and the log with its batch lines) without problems.
    assert.deepEqual(await validateDatasetFolder(folder), []);
  });

  it('applying the same decisions again changes nothing', async () => {
    const folder = await copyDemo();
    const demo = await demoDecisions(folder);
    await applyPlan(await planApply(folder, demo.file));
    const hashes = await hashFolder(folder);
    const again = await planApply(folder, demo.file);
    assert.equal(again.hasChanges, false);
    assert.equal(again.changes.length, 0);
    assert.ok(again.outcomes.filter((o) => !o.reviewOnly).every((o) => o.appliedBefore));
    const result = await applyPlan(again);
    assert.equal(result.batch, null);
    assert.deepEqual(await hashFolder(folder), hashes);
  });

  it('a later export of the same review (earlier decisions plus new ones) applies only the new ones', async () => {
    const folder = await copyDemo();
    const demo = await demoDecisions(folder);
    const first = demo.file.decisions.slice(0, 3);
    await applyPlan(await planApply(folder, { ...demo.file, decisions: first }));
    const plan = await planApply(folder, demo.file);
    assert.deepEqual(plan.baseConflicts, [], 'changes made by earlier applies of the same run are no conflict');
    assert.deepEqual([...new Set(plan.changes.map((c) => c.decisionId))].sort(), ['d-0004', 'd-0005']);
    await applyPlan(plan);
    const original = await readLabelsIndependently(path.join(await copyDemo(), 'labels.csv'));
    assert.deepEqual(await readLabelsIndependently(path.join(folder, 'labels.csv')), expectedLabels(original, demo.file.decisions));
  });

  it('detects a file changed between plan and apply and writes nothing', async () => {
    const folder = await copyDemo();
    const demo = await demoDecisions(folder);
    const plan = await planApply(folder, demo.file);
    // Someone edits one label meanwhile.
    const labelsPath = path.join(folder, 'labels.csv');
    await fs.writeFile(
      labelsPath,
      (await fs.readFile(labelsPath, 'utf8')).replace('R000001,yaw-drive-misalignment', 'R000001,pitch-system-fault'),
    );
    const hashes = await hashFolder(folder);
    await assert.rejects(
      applyPlan(plan),
      (error: unknown) => error instanceof ConflictError && error.files.join() === 'labels.csv' && error.conflicts[0].since === 'plan',
    );
    assert.deepEqual(await hashFolder(folder), hashes);
  });

  it('detects a file changed since the run the decisions were made on; --rebase plans on the current files', async () => {
    const folder = await copyDemo();
    const demo = await demoDecisions(folder);
    const classesPath = path.join(folder, 'classes.json');
    await fs.writeFile(classesPath, (await fs.readFile(classesPath, 'utf8')).replace('Wear or spalling', 'Wear and spalling'));
    const hashes = await hashFolder(folder);
    const plan = await planApply(folder, demo.file);
    assert.deepEqual(
      plan.baseConflicts.map((c) => [c.file, c.since]),
      [['classes.json', 'run']],
    );
    await assert.rejects(applyPlan(plan), ConflictError);
    assert.deepEqual(await hashFolder(folder), hashes);

    const rebased = await planApply(folder, demo.file, { rebase: true });
    await applyPlan(rebased);
    const classes = (JSON.parse(await fs.readFile(classesPath, 'utf8')) as { classes: { description: string }[] }).classes;
    assert.match(classes[0].description, /^Wear and spalling/);
  });

  it('a conflict found just before a rename puts back what was written and closes the batch as aborted', async () => {
    const folder = await copyDemo();
    const demo = await demoDecisions(folder);
    const labelsBefore = await fs.readFile(path.join(folder, 'labels.csv'), 'utf8');
    const plan = await planApply(folder, demo.file);
    const classesPath = path.join(folder, 'classes.json');
    const edited = (await fs.readFile(classesPath, 'utf8')).replace('Wear or spalling', 'Worn');
    await assert.rejects(
      applyPlan(plan, {
        hooks: { step: async (step) => (step === 'before-classes-rename' ? fs.writeFile(classesPath, edited) : undefined) },
      }),
      (error: unknown) => error instanceof ConflictError && error.files.join() === 'classes.json',
    );
    assert.equal(await fs.readFile(path.join(folder, 'labels.csv'), 'utf8'), labelsBefore);
    assert.equal(await fs.readFile(classesPath, 'utf8'), edited);
    const batches = await readAppliedBatches(folder);
    assert.deepEqual(
      batches.batches.map((b) => b.state),
      ['aborted'],
    );
    assert.equal(effectiveEntries(batches).length, 0);
  });

  it('writes labels.csv with RFC 4180 quoting when a class name needs it', async () => {
    const folder = await copyDemo();
    const demo = await demoDecisions(folder);
    const odd = 'cracks, "hairline"';
    const decisions: Decision[] = [
      {
        id: 'q',
        kind: 'move-members',
        madeAt: '2025-01-10T09:00:00Z',
        members: [demo.shaftMembers[0]],
        className: odd,
        description: 'odd name',
      },
    ];
    await applyPlan(await planApply(folder, { ...demo.file, decisions }));
    const text = await fs.readFile(path.join(folder, 'labels.csv'), 'utf8');
    // csv-parse, an independent RFC 4180 parser, reads the name back unchanged.
    const rows = parse<{ id: string; label: string }>(text, { columns: true });
    assert.equal(rows.find((r) => r.id === demo.shaftMembers[0])?.label, odd);
    assert.ok(text.includes(`${demo.shaftMembers[0]},"cracks, ""hairline"""\n`));
  });
});
