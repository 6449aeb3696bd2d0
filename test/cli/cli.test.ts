import assert from 'node:assert/strict';
import { execFile } from 'node:child_process';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { promisify } from 'node:util';
import { runCli } from '../../src/cli/run';
import { collectingIo } from '../../src/cli/io';
import { parseArgs, UsageError, type CommandSpec } from '../../src/cli/args';
import { COMMANDS } from '../../src/cli/commands/index';
import { hashFolder, makeTempDir, removeDir, VALID_FILES, writeValidDataset } from '../dataset/fixtures';

async function cli(...argv: string[]) {
  const io = collectingIo();
  const code = await runCli(argv, io);
  return { code, out: io.out, err: io.err };
}

describe('graph-curator CLI', () => {
  let dir: string;
  beforeEach(async () => {
    dir = await makeTempDir('gc-cli-');
  });
  afterEach(async () => {
    await removeDir(dir);
  });

  it('validate: one OK line and exit 0 for a valid dataset', async () => {
    await writeValidDataset(dir);
    const result = await cli('validate', dir);
    assert.equal(result.code, 0);
    assert.equal(result.out, `OK: ${dir} is a valid dataset\n`);
    assert.equal(result.err, '');
  });

  it('validate: one line per problem, path:line:column, exit 1, and writes nothing', async () => {
    await writeValidDataset(dir, { 'edges.csv': 'source,target\nn1,zz\n' });
    const before = await hashFolder(dir);
    const result = await cli('validate', dir);
    assert.equal(result.code, 1);
    assert.equal(result.out, `${path.join(dir, 'edges.csv')}:2:4: edge to unknown node "zz" (not in nodes.csv)\n`);
    assert.deepEqual(await hashFolder(dir), before);
    const json = await cli('validate', dir, '--json');
    assert.equal(json.code, 1);
    assert.deepEqual(JSON.parse(json.out), [
      { file: 'edges.csv', line: 2, column: 4, message: 'edge to unknown node "zz" (not in nodes.csv)' },
    ]);
  });

  it('validate: at most 50 problem lines, then how many more', async () => {
    const edges = 'source,target\n' + Array.from({ length: 70 }, (_, k) => `n1,ghost${k}\n`).join('');
    await writeValidDataset(dir, { 'edges.csv': edges });
    const result = await cli('validate', dir);
    const lines = result.out.trimEnd().split('\n');
    assert.equal(result.code, 1);
    assert.equal(lines.length, 51);
    assert.equal(lines[49], `${path.join(dir, 'edges.csv')}:51:4: edge to unknown node "ghost49" (not in nodes.csv)`);
    assert.equal(lines[50], '… and 20 more problems');
  });

  it("usage errors exit 2 and print the command's usage", async () => {
    for (const argv of [
      ['validate'],
      ['validate', dir, 'extra'],
      ['validate', dir, '--bogus'],
      ['summary', dir, '--json=1'],
      ['frobnicate'],
      [],
    ]) {
      const result = await cli(...argv);
      assert.equal(result.code, 2, argv.join(' '));
      assert.match(result.err, /Usage: graph-curator/);
      assert.equal(result.out, '');
    }
  });

  it('summary: text and --json', async () => {
    await writeValidDataset(dir);
    const text = await cli('summary', dir);
    assert.equal(text.code, 0);
    assert.match(text.out, /5 nodes, 4 undirected edges, 3 slices by quarter/);
    assert.match(text.out, /^gearbox\s+active\s+2$/m);
    const json = await cli('summary', dir, '--json');
    assert.equal(json.code, 0);
    const summary = JSON.parse(json.out) as { nodeCount: number; slices: { edges: number }[] };
    assert.equal(summary.nodeCount, 5);
    assert.deepEqual(
      summary.slices.map((s) => s.edges),
      [1, 1, 2],
    );
    const broken = await cli('summary', path.join(dir, 'missing'));
    assert.equal(broken.code, 1);
    assert.match(broken.err, /folder not found/);
  });

  it('init: writes a dataset.json that validates, and refuses to overwrite it', async () => {
    await fs.writeFile(path.join(dir, 'nodes.csv'), VALID_FILES['nodes.csv']);
    await fs.writeFile(path.join(dir, 'edges.csv'), VALID_FILES['edges.csv']);
    const first = await cli('init', dir);
    assert.equal(first.code, 0, first.err);
    assert.match(first.out, /wrote .*dataset\.json/);
    const manifest = JSON.parse(await fs.readFile(path.join(dir, 'dataset.json'), 'utf8')) as { nodeColumns: unknown };
    assert.deepEqual(manifest.nodeColumns, { id: 'id', text: ['title'], features: ['x', 'y'] });
    assert.equal((await cli('validate', dir)).code, 0);
    const written = await fs.readFile(path.join(dir, 'dataset.json'), 'utf8');
    const second = await cli('init', dir);
    assert.equal(second.code, 1);
    assert.match(second.err, /already exists; not overwriting/);
    assert.equal(await fs.readFile(path.join(dir, 'dataset.json'), 'utf8'), written);
  });

  it('help lists every command in the table and explains each one', async () => {
    const general = await cli('--help');
    assert.equal(general.code, 0);
    for (const name of Object.keys(COMMANDS)) assert.match(general.out, new RegExp(`^  ${name}\\b`, 'm'));
    const one = await cli('help', 'validate');
    assert.equal(one.code, 0);
    assert.match(one.out, /^Usage: graph-curator validate <folder> \[--json\]/);
    assert.equal((await cli('validate', '--help')).code, 0);
    assert.equal((await cli('help', 'nope')).code, 2);
  });

  it('parses flags with values, booleans and "--"', () => {
    const spec: CommandSpec = {
      name: 't',
      summary: '',
      positionals: [{ name: 'a' }, { name: 'b', optional: true }],
      flags: [
        { name: 'out', value: 'FILE', description: '' },
        { name: 'json', description: '' },
        { name: 'slice', value: 'T', description: '' },
      ],
    };
    const parsed = parseArgs(['x', '--out', 'o.json', '--slice=2021-Q3', '--json'], spec);
    assert.deepEqual(parsed.positionals, ['x']);
    assert.equal(parsed.value('out'), 'o.json');
    assert.equal(parsed.value('slice'), '2021-Q3');
    assert.equal(parsed.has('json'), true);
    assert.deepEqual(parseArgs(['--', '--weird-folder'], spec).positionals, ['--weird-folder']);
    for (const bad of [['x', '--out'], ['x', '--json=yes'], ['x', '--json', '--json'], ['x', '-j'], []])
      assert.throws(() => parseArgs(bad, spec), UsageError, bad.join(' '));
  });

  it('sets the process exit code when run as a program', async () => {
    await writeValidDataset(dir, { 'nodes.csv': 'id,time,title,x,y\n' });
    const root = path.join(__dirname, '../..');
    const run = promisify(execFile);
    await assert.rejects(
      run(process.execPath, ['--import', 'tsx', path.join(root, 'src/cli/main.ts'), 'validate', dir], { cwd: root }),
      (error: { code: number; stdout: string }) => {
        assert.equal(error.code, 1);
        assert.match(error.stdout, /nodes\.csv:2:1: no nodes/);
        return true;
      },
    );
  });
});
