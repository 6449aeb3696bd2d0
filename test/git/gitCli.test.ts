import { strict as assert } from 'node:assert';
import { execFileSync } from 'node:child_process';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { planApply } from '../../src/engine/decisions/plan';
import { applyPlan } from '../../src/engine/decisions/apply';
import { labelCommitMessage } from '../../src/engine/decisions/summary';
import { commitLabelFiles } from '../../src/engine/git/labelCommit';
import { findRepositoryRoot, GitError, initRepository, NotInRepositoryError } from '../../src/engine/git/gitCli';
import { copyDemo, demoDecisions, GIT_TEST_ENV, makeTempRoot, removeTemporaryFolders } from '../decisions/fixtures';

/** git itself, run directly by the test: the reference for what the repository holds. */
function git(cwd: string, ...args: string[]): string {
  return execFileSync('git', args, { cwd, env: { ...process.env, ...GIT_TEST_ENV }, encoding: 'utf8' });
}

async function repositoryWithDemo(): Promise<{ root: string; folder: string }> {
  const root = await makeTempRoot('gc-git-');
  const folder = await copyDemo(root);
  git(root, 'init', '--quiet');
  await fs.writeFile(path.join(root, 'notes.txt'), 'first\n');
  git(root, 'add', '.');
  git(root, 'commit', '--quiet', '-m', 'dataset');
  return { root: await fs.realpath(root), folder };
}

describe('git without VS Code', () => {
  after(removeTemporaryFolders);
  const options = { env: GIT_TEST_ENV };

  it('commits only the label files and leaves an unrelated staged change staged', async () => {
    const { root, folder } = await repositoryWithDemo();
    await fs.writeFile(path.join(root, 'notes.txt'), 'second\n');
    git(root, 'add', 'notes.txt');
    await fs.writeFile(path.join(root, 'scratch.txt'), 'untracked\n');

    const demo = await demoDecisions(folder);
    const plan = await planApply(folder, demo.file);
    const result = await applyPlan(plan);
    const headBefore = git(root, 'rev-parse', 'HEAD').trim();
    const commit = await commitLabelFiles(folder, labelCommitMessage(plan, result.batch), options);

    assert.ok(commit);
    assert.equal(commit.commit, git(root, 'rev-parse', 'HEAD').trim());
    assert.equal(git(root, 'rev-list', '--count', `${headBefore}..HEAD`).trim(), '1');
    assert.equal(git(root, 'rev-parse', 'HEAD~1').trim(), headBefore);
    assert.deepEqual(git(root, 'diff-tree', '--no-commit-id', '--name-only', '-r', 'HEAD').trim().split('\n').sort(), [
      'wind-farm/classes.json',
      'wind-farm/label-log.jsonl',
      'wind-farm/labels.csv',
    ]);
    // git's own diff of labels.csv: one added line per changed node, one removed per node that had a label.
    const [added, removed] = git(root, 'diff', '--numstat', 'HEAD~1', 'HEAD', '--', 'wind-farm/labels.csv').split('\t').map(Number);
    assert.equal(added, plan.changes.length);
    assert.equal(removed, plan.changes.filter((c) => c.oldLabel !== null).length);
    // The unrelated change is still staged and not committed; the untracked file is untouched.
    assert.equal(git(root, 'diff', '--cached', '--name-only').trim(), 'notes.txt');
    assert.equal(git(root, 'show', 'HEAD:notes.txt'), 'first\n');
    assert.equal(git(root, 'status', '--porcelain', '--', 'scratch.txt').trim(), '?? scratch.txt');
    assert.equal(git(root, 'status', '--porcelain', '--', 'wind-farm').trim(), '');
    const message = git(root, 'log', '-1', '--format=%B');
    assert.equal(message.split('\n')[0], 'Labels: +2 classes, 45 nodes changed');
    assert.match(message, /Run: 2025-01-10T09-00-00-000Z-2024-Q4-abc123\nSettings hash: f00dfeed/);
    assert.match(message, /lightning-receptor-damage: 0 → 29 \(\+29\)/);

    assert.equal(await commitLabelFiles(folder, 'again', options), null, 'nothing left to commit');
  });

  it('reports a folder outside any repository, and init makes one', async () => {
    const root = await makeTempRoot('gc-nogit-');
    // Holds unless the machine's temporary folder itself sits inside a git work tree.
    assert.equal(await findRepositoryRoot(root, options), null);
    const folder = await copyDemo(root);
    await assert.rejects(commitLabelFiles(folder, 'labels', options), NotInRepositoryError);
    const made = await initRepository(folder, options);
    assert.equal(made, await fs.realpath(folder));
    const commit = await commitLabelFiles(folder, 'first labels', options);
    assert.ok(commit);
    assert.deepEqual([...commit.files].sort(), ['classes.json', 'label-log.jsonl', 'labels.csv']);
    assert.equal(git(folder, 'ls-files').trim().split('\n').sort().join(), 'classes.json,label-log.jsonl,labels.csv');
  });

  it('refuses label files that .gitignore excludes', async () => {
    const { root, folder } = await repositoryWithDemo();
    git(root, 'rm', '--quiet', '--cached', 'wind-farm/label-log.jsonl');
    git(root, 'commit', '--quiet', '-m', 'untrack log');
    await fs.writeFile(path.join(root, '.gitignore'), '*.jsonl\n');
    await fs.appendFile(
      path.join(folder, 'label-log.jsonl'),
      '{"time":"2025-01-01T00:00:00Z","node":"R000001","oldLabel":null,"newLabel":"x","reason":"test"}\n',
    );
    await assert.rejects(
      commitLabelFiles(folder, 'labels', options),
      (error: unknown) => error instanceof GitError && /wind-farm\/label-log.jsonl is ignored by git/.test(error.message),
    );
  });
});
