import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { planApply, type ApplyPlan } from '../../src/engine/decisions/plan';
import { applyPlan, APPLY_STEPS, type ApplyStep } from '../../src/engine/decisions/apply';
import { readAppliedBatches, recoverInterruptedApply, type RecoveryOutcome } from '../../src/engine/decisions/recover';
import { effectiveEntries } from '../../src/engine/decisions/batchLog';
import { copyDemo, demoDecisions, makeTempRoot, removeTemporaryFolders, sha256OfFile } from './fixtures';

class SimulatedCrash extends Error {}

/** What recovery must find after a crash at each step (null: no batch was left open). */
const EXPECTED: Record<ApplyStep, { outcome: RecoveryOutcome | null; labels: 'old' | 'new'; classes: 'old' | 'new' }> = {
  'before-log-begin': { outcome: null, labels: 'old', classes: 'old' },
  'after-log-begin': { outcome: 'had-not-been-applied', labels: 'old', classes: 'old' },
  'before-labels-rename': { outcome: 'had-not-been-applied', labels: 'old', classes: 'old' },
  'after-labels': { outcome: 'completed', labels: 'new', classes: 'old' },
  'before-classes-rename': { outcome: 'completed', labels: 'new', classes: 'old' },
  'after-classes': { outcome: 'had-been-applied', labels: 'new', classes: 'new' },
  'before-log-commit': { outcome: 'had-been-applied', labels: 'new', classes: 'new' },
  'after-log-commit': { outcome: null, labels: 'new', classes: 'new' },
};

describe('an apply interrupted at each step', () => {
  after(removeTemporaryFolders);

  it('covers every step of applyPlan', () => {
    assert.deepEqual(Object.keys(EXPECTED).sort(), [...APPLY_STEPS].sort());
  });

  for (const step of APPLY_STEPS) {
    it(`crash at ${step}: each file is old or new, and recovery settles the batch`, async () => {
      const folder = await copyDemo(await makeTempRoot());
      const demo = await demoDecisions(folder);
      const plan: ApplyPlan = await planApply(folder, demo.file);
      const state = async (planned: ApplyPlan['labelsFile']) => {
        const found = await sha256OfFile(planned.path);
        return found === planned.oldSha256 ? 'old' : found === planned.newSha256 ? 'new' : 'other';
      };
      await assert.rejects(
        applyPlan(plan, {
          hooks: {
            step: (at) => {
              if (at === step) throw new SimulatedCrash(at);
            },
          },
        }),
        SimulatedCrash,
      );
      const expected = EXPECTED[step];
      assert.equal(await state(plan.labelsFile), expected.labels);
      assert.equal(await state(plan.classesFile), expected.classes);

      const logged = await readAppliedBatches(folder);
      assert.deepEqual(
        logged.batches.map((b) => b.state),
        expected.outcome === null ? (step === 'after-log-commit' ? ['committed'] : []) : ['interrupted'],
      );

      // A killed process (unlike a thrown hook) leaves its temporary file behind.
      if (step === 'before-labels-rename') await fs.writeFile(path.join(folder, '.labels.csv.0123456789ab.tmp'), 'partial');
      const dry = await recoverInterruptedApply(folder, { dryRun: true });
      assert.deepEqual(
        dry.batches.map((b) => b.outcome),
        expected.outcome ? [expected.outcome] : [],
      );
      if (expected.outcome) assert.deepEqual(dry.batches[0].files, { 'labels.csv': expected.labels, 'classes.json': expected.classes });
      assert.equal(await state(plan.labelsFile), expected.labels, 'a dry run writes nothing');

      const report = await recoverInterruptedApply(folder);
      assert.deepEqual(
        report.batches.map((b) => b.outcome),
        expected.outcome ? [expected.outcome] : [],
      );
      const applied = expected.outcome !== 'had-not-been-applied' && step !== 'before-log-begin';
      assert.equal(await state(plan.labelsFile), applied ? 'new' : 'old');
      assert.equal(await state(plan.classesFile), applied ? 'new' : 'old');
      const settled = await readAppliedBatches(folder);
      assert.ok(settled.batches.every((b) => b.state !== 'interrupted'));
      assert.equal(effectiveEntries(settled).length, applied ? plan.changes.length : 0);
      assert.deepEqual(
        (await fs.readdir(folder)).filter((n) => n.endsWith('.tmp')),
        [],
      );
      assert.deepEqual(report.removedTemporaryFiles, step === 'before-labels-rename' ? ['.labels.csv.0123456789ab.tmp'] : []);

      // Afterwards the decisions apply (again) cleanly: to the new state when recovery found the
      // batch undone, as a no-op when it had taken effect.
      const again = await planApply(folder, demo.file);
      assert.equal(again.hasChanges, !applied);
      await applyPlan(again);
      assert.equal(await state(plan.labelsFile), 'new');
      assert.equal(await state(plan.classesFile), 'new');
    });
  }

  it('leaves a batch unresolved when a file matches neither its old nor its new content', async () => {
    const folder = await copyDemo();
    const demo = await demoDecisions(folder);
    const plan = await planApply(folder, demo.file);
    await assert.rejects(
      applyPlan(plan, {
        hooks: {
          step: (at) => {
            if (at === 'after-labels') throw new SimulatedCrash(at);
          },
        },
      }),
      SimulatedCrash,
    );
    await fs.appendFile(path.join(folder, 'labels.csv'), 'R002999,converter-fault\n');
    const report = await recoverInterruptedApply(folder);
    assert.deepEqual(
      report.batches.map((b) => [b.outcome, b.files]),
      [['unresolved', { 'labels.csv': 'other', 'classes.json': 'old' }]],
    );
    assert.deepEqual(
      (await readAppliedBatches(folder)).batches.map((b) => b.state),
      ['interrupted'],
    );
    const abandoned = await recoverInterruptedApply(folder, { abandonUnresolved: true });
    assert.deepEqual(
      abandoned.batches.map((b) => b.outcome),
      ['abandoned'],
    );
    assert.deepEqual(
      (await readAppliedBatches(folder)).batches.map((b) => b.state),
      ['aborted'],
    );
  });
});
