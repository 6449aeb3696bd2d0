// Committing a dataset's label files with the git command line, for the CLI and for VS Code
// windows without the git extension. git runs through execFile (no shell: paths and messages are
// passed as arguments, never parsed by a shell) with literal pathspecs, and a commit includes
// only the label files: `git commit --only -- <paths>` commits those paths and leaves anything
// else the user has staged staged, uncommitted.
import { execFile } from 'node:child_process';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';

export interface GitOptions {
  /** Extra environment for git (e.g. GIT_AUTHOR_NAME in tests); merged over process.env. */
  env?: Record<string, string>;
  /** The git executable (default "git", found on PATH). */
  git?: string;
}

export class GitError extends Error {
  constructor(
    message: string,
    readonly args: readonly string[],
    readonly exitCode: number | null,
    readonly stderr: string,
  ) {
    super(message);
    this.name = 'GitError';
  }
}

export class GitNotFoundError extends GitError {
  constructor(git: string) {
    super(`git is not installed or not on PATH (tried "${git}")`, [], null, '');
    this.name = 'GitNotFoundError';
  }
}

export class NotInRepositoryError extends Error {
  constructor(readonly folder: string) {
    super(`${folder} is not in a git repository (create one with "git init" in the folder or a parent)`);
    this.name = 'NotInRepositoryError';
  }
}

interface GitRun {
  stdout: string;
  stderr: string;
  exitCode: number;
}

/** Runs git in `cwd`; exit codes other than 0 (and those in `allowedExitCodes`) throw a GitError. */
export function runGit(
  args: readonly string[],
  cwd: string,
  options: GitOptions = {},
  allowedExitCodes: readonly number[] = [],
): Promise<GitRun> {
  const git = options.git ?? 'git';
  // No prompts, no editor: a command that would need a person fails instead of hanging.
  const env = { ...process.env, GIT_TERMINAL_PROMPT: '0', GIT_EDITOR: 'true', ...options.env };
  return new Promise((resolve, reject) => {
    execFile(git, args, { cwd, env, maxBuffer: 64 * 1024 * 1024, encoding: 'utf8', windowsHide: true }, (error, stdout, stderr) => {
      if (!error) return resolve({ stdout, stderr, exitCode: 0 });
      // execFile's error.code is the exit code (a number), or a system error name such as ENOENT.
      const code = (error as { code?: unknown }).code;
      if (code === 'ENOENT') return reject(new GitNotFoundError(git));
      const exitCode = typeof code === 'number' ? code : null;
      if (exitCode !== null && allowedExitCodes.includes(exitCode)) return resolve({ stdout, stderr, exitCode });
      reject(
        new GitError(
          `git ${args.join(' ')} failed${exitCode !== null ? ` (exit ${exitCode})` : ''}: ${stderr.trim() || error.message}`,
          args,
          exitCode,
          stderr,
        ),
      );
    });
  });
}

/** The root of the work tree holding `folder`, or null when it is in none. */
export async function findRepositoryRoot(folder: string, options: GitOptions = {}): Promise<string | null> {
  const cwd = await fs.realpath(folder);
  const inside = await runGit(['rev-parse', '--is-inside-work-tree'], cwd, options, [128]);
  if (inside.exitCode !== 0 || inside.stdout.trim() !== 'true') return null;
  const top = await runGit(['rev-parse', '--show-toplevel'], cwd, options);
  return path.resolve(top.stdout.trim());
}

/** `git init` in `folder`; returns the new repository's root. */
export async function initRepository(folder: string, options: GitOptions = {}): Promise<string> {
  await runGit(['init', '--quiet'], await fs.realpath(folder), options);
  const root = await findRepositoryRoot(folder, options);
  if (root === null) throw new GitError(`git init in ${folder} did not create a repository`, ['init'], null, '');
  return root;
}

export interface LabelCommit {
  /** Hash of the new commit. */
  commit: string;
  root: string;
  /** Paths committed, relative to the repository root, with "/" separators. */
  files: string[];
}

/** Paths of files inside the repository, relative to its root with "/" separators (git's form). */
async function repositoryPaths(root: string, files: readonly string[]): Promise<string[]> {
  const out: string[] = [];
  for (const file of files) {
    // The root is a real path; the file's folder must be too (e.g. /tmp may be a symlink).
    const real = path.join(await fs.realpath(path.dirname(file)), path.basename(file));
    const relative = path.relative(root, real);
    if (relative.startsWith('..') || path.isAbsolute(relative))
      throw new GitError(`${file} is outside the repository at ${root}`, [], null, '');
    out.push(relative.split(path.sep).join('/'));
  }
  return out;
}

const splitZ = (text: string): string[] => text.split('\0').filter((s) => s.length > 0);

/**
 * Commits exactly the given files (absolute paths) with `message`; returns null when none of them
 * differs from the last commit. Other changes, staged or not, stay as they were.
 */
export async function commitFiles(
  folder: string,
  files: readonly string[],
  message: string,
  options: GitOptions = {},
): Promise<LabelCommit | null> {
  const root = await findRepositoryRoot(folder, options);
  if (root === null) throw new NotInRepositoryError(folder);
  const wanted = await repositoryPaths(root, files);
  const git = (args: string[], allowed: number[] = []): Promise<GitRun> => runGit(['--literal-pathspecs', ...args], root, options, allowed);

  const tracked = new Set(splitZ((await git(['ls-files', '-z', '--', ...wanted])).stdout));
  const present = await Promise.all(
    files.map((f) =>
      fs.stat(f).then(
        (s) => s.isFile(),
        () => false,
      ),
    ),
  );
  const paths = wanted.filter((p, k) => present[k] || tracked.has(p));
  if (paths.length === 0) return null;
  const ignored: string[] = [];
  // check-ignore takes plain paths (it refuses the literal-pathspec flag).
  for (const p of paths.filter((p) => !tracked.has(p)))
    if ((await runGit(['check-ignore', '--quiet', '--', p], root, options, [1])).exitCode === 0) ignored.push(p);
  if (ignored.length > 0)
    throw new GitError(
      `${ignored.join(', ')} ${ignored.length === 1 ? 'is' : 'are'} ignored by git (.gitignore): label files must be committed`,
      ['check-ignore'],
      0,
      '',
    );

  await git(['add', '--', ...paths]);
  // Against HEAD, or against nothing on a branch without commits yet.
  const changed = splitZ((await git(['diff', '--cached', '--name-only', '-z', '--', ...paths])).stdout);
  if (changed.length === 0) return null;

  await git(['commit', '--only', '--quiet', '-m', message, '--', ...changed]);
  const commit = (await git(['rev-parse', 'HEAD'])).stdout.trim();
  const committed = splitZ((await git(['diff-tree', '--no-commit-id', '--name-only', '-r', '-z', '--root', commit])).stdout);
  const unexpected = committed.filter((p) => !paths.includes(p));
  // Cannot happen with --only; checked because committing someone's unrelated work would be bad.
  if (unexpected.length > 0) throw new GitError(`commit ${commit} unexpectedly includes ${unexpected.join(', ')}`, ['commit'], 0, '');
  return { commit, root, files: committed };
}
