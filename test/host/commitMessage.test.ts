// The commit message the curator edits (subject in an input box, generated body kept), checked
// against git itself: git takes the text up to the first blank line as the subject (%s) and the
// rest as the body (%b) (git-commit(1), DISCUSSION), and the route chosen for the commit.
import * as assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { joinCommitMessage, splitCommitMessage, subjectProblem } from '../../src/host/apply/commitMessage';
import { chooseCommitRoute, otherStagedPaths } from '../../src/host/apply/commitRoute';

const generated = `Labels: +1 class (bird strike), 12 nodes changed

Classes added (introduced in 2024-Q4):
  bird strike: birds hit the blades
Nodes per class (before → after):
  bird strike: 0 → 12 (+12)
Decisions: review of run r1 (3 decisions)
`;

describe('commit message for label changes', () => {
  it('splits the generated message into the subject the input box shows and the body it keeps', () => {
    const { subject, body } = splitCommitMessage(generated);
    assert.equal(subject, 'Labels: +1 class (bird strike), 12 nodes changed');
    assert.equal(body.split('\n').length, 5);
    assert.ok(body.startsWith('Classes added'));
    assert.equal(joinCommitMessage(subject, body), generated, 'unedited, the message is unchanged');
  });

  it('keeps the body when the subject is edited, and handles CRLF and a message without body', () => {
    const { body } = splitCommitMessage(generated.replace(/\n/g, '\r\n'));
    const edited = joinCommitMessage('Name the bird-strike reports', body);
    assert.ok(edited.startsWith('Name the bird-strike reports\n\nClasses added'));
    assert.deepEqual(splitCommitMessage('Only a subject\n'), { subject: 'Only a subject', body: '' });
    assert.equal(joinCommitMessage('Only a subject', ''), 'Only a subject\n');
    assert.equal(joinCommitMessage('one\nline', ''), 'one line\n', 'a pasted newline cannot start a body');
    assert.throws(() => joinCommitMessage('  ', body), /needs a subject/);
    assert.equal(subjectProblem(''), 'The commit needs a subject line.');
    assert.equal(subjectProblem('ok'), null);
  });

  it('git reads the joined message back as the edited subject and the generated body', function () {
    const repo = mkdtempSync(path.join(os.tmpdir(), 'commit-message-'));
    try {
      const env = {
        ...process.env,
        GIT_AUTHOR_NAME: 'C',
        GIT_AUTHOR_EMAIL: 'c@example.org',
        GIT_COMMITTER_NAME: 'C',
        GIT_COMMITTER_EMAIL: 'c@example.org',
      };
      const git = (...args: string[]) => execFileSync('git', args, { cwd: repo, encoding: 'utf8', env });
      git('init', '--quiet');
      writeFileSync(path.join(repo, 'labels.csv'), 'id,label\n');
      git('add', 'labels.csv');
      const { body } = splitCommitMessage(generated);
      git('commit', '--quiet', '-m', joinCommitMessage('Name the bird-strike reports', body));
      assert.equal(git('log', '-1', '--format=%s').trim(), 'Name the bird-strike reports');
      assert.equal(git('log', '-1', '--format=%b').trim(), body);
    } finally {
      rmSync(repo, { recursive: true, force: true });
    }
  });
});

describe('how the label files are committed', () => {
  const labels = ['/data/wind/labels.csv', '/data/wind/classes.json', '/data/wind/label-log.jsonl'];

  it('uses the git extension when nothing but the label files is staged', () => {
    assert.deepEqual(chooseCommitRoute({ gitExtension: 'enabled', staged: [], labelPaths: labels, gitOnPath: true }), {
      route: 'extension',
    });
    assert.deepEqual(
      chooseCommitRoute({ gitExtension: 'enabled', staged: ['/data/wind/./labels.csv'], labelPaths: labels, gitOnPath: true }),
      { route: 'extension' },
    );
  });

  it("uses git's command line (commit --only) when other changes are staged, naming them", () => {
    const staged = ['/data/wind/labels.csv', '/data/wind/notes.txt', '/src/app.ts'];
    assert.deepEqual(otherStagedPaths(staged, labels), ['/data/wind/notes.txt', '/src/app.ts']);
    const route = chooseCommitRoute({ gitExtension: 'enabled', staged, labelPaths: labels, gitOnPath: true });
    assert.equal(route.route, 'command-line');
    assert.match(route.route === 'command-line' ? route.reason : '', /2 other changes are staged \(notes\.txt, app\.ts\)/);
  });

  it("falls back to git's command line when the extension is disabled or missing, and to writing files only without git", () => {
    assert.equal(chooseCommitRoute({ gitExtension: 'disabled', staged: [], labelPaths: labels, gitOnPath: true }).route, 'command-line');
    assert.equal(chooseCommitRoute({ gitExtension: 'missing', staged: [], labelPaths: labels, gitOnPath: true }).route, 'command-line');
    const none = chooseCommitRoute({ gitExtension: 'disabled', staged: [], labelPaths: labels, gitOnPath: false });
    assert.equal(none.route, 'files-only');
  });
});
