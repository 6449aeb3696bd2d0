import { strict as assert } from 'node:assert';
import { execFileSync } from 'node:child_process';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { runCli } from '../../src/cli/run';
import { planApply } from '../../src/engine/decisions/plan';
import { applyPlan } from '../../src/engine/decisions/apply';
import { collectingIo } from '../../src/cli/io';
import { copyDemo, demoDecisions, GIT_TEST_ENV, hashFolder, makeTempRoot, removeTemporaryFolders } from './fixtures';

async function cli(...args: string[]) {
  const io = collectingIo();
  const code = await runCli(args, io);
  return { code, out: io.out, err: io.err };
}

describe('graph-curator apply', () => {
  let root: string;
  let folder: string;
  let decisionsPath: string;
  const savedEnv: Record<string, string | undefined> = {};

  before(() => {
    // The command runs git with the process environment: give it a test identity and no user config.
    for (const [key, value] of Object.entries(GIT_TEST_ENV)) {
      savedEnv[key] = process.env[key];
      process.env[key] = value;
    }
  });
  beforeEach(async () => {
    root = await makeTempRoot('gc-cli-apply-');
    folder = await copyDemo(root);
    decisionsPath = path.join(root, 'decisions.json');
    await fs.writeFile(decisionsPath, JSON.stringify((await demoDecisions(folder)).file, null, 2));
  });
  after(async () => {
    for (const [key, value] of Object.entries(savedEnv)) {
      if (value === undefined) delete process.env[key];
      else process.env[key] = value;
    }
    await removeTemporaryFolders();
  });

  it('exits 2 for usage errors', async () => {
    assert.equal((await cli('apply', folder)).code, 2);
    assert.equal((await cli('apply', folder, '--decisions', decisionsPath, '--message', 'x')).code, 2);
    assert.equal((await cli('apply', folder, '--decisions', decisionsPath, '--commit', '--dry-run')).code, 2);
  });

  it('--dry-run prints the plan and writes nothing', async () => {
    const hashes = await hashFolder(folder);
    const { code, out } = await cli('apply', folder, '--decisions', decisionsPath, '--dry-run');
    assert.equal(code, 0);
    assert.match(out, /Nodes changed: 45 \(2 members already had the label\)/);
    assert.match(out, /New class: lightning-receptor-damage \(introduced in 2024-Q4\)/);
    assert.match(out, /lightning-receptor-damage +0 → +29 +\+29 \(new\)/);
    assert.match(out, /Dry run: nothing written/);
    assert.deepEqual(await hashFolder(folder), hashes);
  });

  it('points at file:line:column of a broken decisions file and exits 1', async () => {
    await fs.writeFile(decisionsPath, '{\n  "format": "graph-curator-decisions",\n  "version": 1\n  "dataset": "wind-farm"\n}\n');
    const { code, err } = await cli('apply', folder, '--decisions', decisionsPath);
    assert.equal(code, 1);
    // Line 4 starts with two spaces, then the key: the parser expected a comma there.
    assert.equal(err, `${decisionsPath}:4:3: expected ',' or '}' in object, found '"'\n`);
  });

  it('applies, commits only the label files, and exits 1 on a conflict', async () => {
    execFileSync('git', ['init', '--quiet'], { cwd: root });
    execFileSync('git', ['add', '.'], { cwd: root });
    execFileSync('git', ['commit', '--quiet', '-m', 'dataset'], { cwd: root });
    const { code, out } = await cli('apply', folder, '--decisions', decisionsPath, '--commit');
    assert.equal(code, 0, out);
    assert.match(out, /Wrote labels.csv and classes.json; appended 47 lines to label-log.jsonl/);
    assert.match(out, /Committed [0-9a-f]{12}: wind-farm\/classes.json, wind-farm\/label-log.jsonl, wind-farm\/labels.csv/);
    assert.equal(execFileSync('git', ['rev-list', '--count', 'HEAD'], { cwd: root, encoding: 'utf8' }).trim(), '2');

    // Again: nothing to do.
    const again = await cli('apply', folder, '--decisions', decisionsPath, '--commit');
    assert.equal(again.code, 0);
    assert.match(again.out, /Nothing to change/);

    // Someone edits a label by hand; a later export of the same review, with one more decision,
    // was made on the files before that edit: conflict, nothing written.
    const labelsPath = path.join(folder, 'labels.csv');
    await fs.writeFile(
      labelsPath,
      (await fs.readFile(labelsPath, 'utf8')).replace('R000001,yaw-drive-misalignment', 'R000001,pitch-system-fault'),
    );
    const stale = JSON.parse(await fs.readFile(decisionsPath, 'utf8')) as { decisions: object[] };
    stale.decisions.push({
      id: 'd-0100',
      kind: 'merge-classes',
      madeAt: '2025-01-10T10:00:00Z',
      from: 'converter-fault',
      into: 'pitch-system-fault',
    });
    await fs.writeFile(decisionsPath, JSON.stringify(stale));
    const hashes = await hashFolder(folder);
    const conflict = await cli('apply', folder, '--decisions', decisionsPath);
    assert.equal(conflict.code, 1);
    assert.match(conflict.err, /^labels.csv changed since the scoring run read it; nothing was written/);
    assert.deepEqual(await hashFolder(folder), hashes);
    // With --rebase the decisions are checked against the edited file and applied.
    const rebased = await cli('apply', folder, '--decisions', decisionsPath, '--rebase');
    assert.equal(rebased.code, 0, rebased.err);
    assert.match(rebased.out, /Merged class: converter-fault → pitch-system-fault/);
  });

  it('refuses to apply over an interrupted apply; --recover settles it first', async () => {
    const decisions = (await demoDecisions(folder)).file;
    const crash = new Error('simulated crash');
    await assert.rejects(
      applyPlan(await planApply(folder, decisions), {
        hooks: {
          step: (at) => {
            if (at === 'after-labels') throw crash;
          },
        },
      }),
      (error: unknown) => error === crash,
    );
    const refused = await cli('apply', folder, '--decisions', decisionsPath);
    assert.equal(refused.code, 1);
    assert.match(refused.err, /an earlier apply was interrupted \(label-log.jsonl: batch .+\); recover it first/);
    const recovered = await cli('apply', folder, '--recover', '--decisions', decisionsPath);
    assert.equal(recovered.code, 0, recovered.err);
    assert.match(recovered.out, /had replaced labels.csv; wrote classes.json and marked it committed/);
    assert.match(recovered.out, /Nothing to change/);
  });
});
