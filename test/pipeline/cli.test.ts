import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { runCli } from '../../src/cli/run';
import { collectingIo } from '../../src/cli/io';
import { encodeNpy } from '../../src/engine/io/npy';
import { smallDataset } from './pipelineFixture';
import type { CandidatesFile } from '../../src/engine/pipeline/candidatesFile';
import type { EvaluationReport } from '../../src/engine/pipeline/evaluateSlices';
import type { RunRecord } from '../../src/engine/pipeline/runStore';

const quick = ['--epochs', '60', '--threshold-folds', '0', '--history', 'all'];

async function cli(...args: string[]): Promise<{ code: number; out: string; err: string }> {
  const io = collectingIo();
  const code = await runCli(args, io);
  return { code, out: io.out, err: io.err };
}

async function csvRows(file: string): Promise<string[][]> {
  return (await fs.readFile(file, 'utf8'))
    .trim()
    .split('\n')
    .map((line) => line.split(','));
}

describe('score, discover and evaluate from the command line', function () {
  this.timeout(600_000);

  it('scores the newest slice: one row per node of the slice, a run record and candidates', async () => {
    const { folder } = await smallDataset();
    const result = await cli('score', folder, ...quick, '--quiet');
    assert.equal(result.code, 0, result.err);
    const runFolder = result.out.trim();
    const record = JSON.parse(await fs.readFile(path.join(runFolder, 'run.json'), 'utf8')) as RunRecord;
    const nodes = await csvRows(path.join(folder, 'nodes.csv'));
    const header = nodes[0];
    const timeAt = header.indexOf('time');
    const lastQuarterNodes = nodes.slice(1).filter((row) => row[timeAt] >= '2024-10-01').length;
    const scores = await csvRows(path.join(runFolder, 'scores.csv'));
    assert.equal(record.slice, '2024-Q4');
    assert.equal(scores.length - 1, lastQuarterNodes);
    assert.equal(record.counts.scored, lastQuarterNodes);
    const rejectedColumn = scores[0].indexOf('rejected');
    assert.equal(scores.slice(1).filter((row) => row[rejectedColumn] === '1').length, record.counts.rejected);
    const candidates = JSON.parse(await fs.readFile(path.join(runFolder, 'candidates.json'), 'utf8')) as CandidatesFile;
    assert.equal(candidates.runId, record.runId);
    const members = candidates.candidates.flatMap((c) => c.members);
    assert.equal(new Set(members).size, members.length, 'a node belongs to one candidate at most');
    assert.ok(members.length + candidates.scattered.length <= record.counts.rejected);
    assert.equal(await fs.readFile(path.join(folder, 'runs', '.gitignore'), 'utf8').then((t) => t.includes('*')), true);
  });

  it('gives the same outputs for the same seed', async () => {
    const { folder } = await smallDataset();
    const first = await cli('score', folder, ...quick, '--quiet', '--seed', '11', '--slice', '2023-Q2');
    const second = await cli('score', folder, ...quick, '--quiet', '--seed', '11', '--slice', '2023-Q2');
    const a = await fs.readFile(path.join(first.out.trim(), 'scores.csv'), 'utf8');
    const b = await fs.readFile(path.join(second.out.trim(), 'scores.csv'), 'utf8');
    assert.equal(a, b);
  });

  it('says which slices exist when --slice names none, with exit code 2', async () => {
    const { folder } = await smallDataset();
    const result = await cli('score', folder, '--slice', '1999-Q1');
    assert.equal(result.code, 2);
    assert.match(result.err, /1999-Q1 is not a slice.*2019-Q1/s);
  });

  it('reports the graph model beside the MLP baseline, and the graph model is better on linked data', async () => {
    const { folder, truthFile } = await smallDataset();
    const result = await cli(
      'evaluate',
      folder,
      '--truth',
      truthFile,
      '--json',
      '--epochs',
      '60',
      '--threshold-folds',
      '0',
      '--history',
      '4',
    );
    assert.equal(result.code, 0, result.err);
    const report = JSON.parse(result.out) as EvaluationReport;
    assert.equal(report.graphModel.perSlice.length, 24);
    assert.equal(report.baseline.model, 'mlp');
    const mean = (values: (number | null)[]) => {
      const defined = values.filter((v): v is number => v !== null);
      return defined.reduce((a, b) => a + b, 0) / defined.length;
    };
    const graphAccuracy = mean(report.graphModel.perSlice.map((s) => s.accuracy));
    const baselineAccuracy = mean(report.baseline.perSlice.map((s) => s.accuracy));
    // The generator links reports mostly within a failure mode, so propagation must help.
    assert.ok(graphAccuracy > baselineAccuracy + 0.03, `graph ${graphAccuracy.toFixed(3)} vs mlp ${baselineAccuracy.toFixed(3)}`);
    // Unseen failure modes appear from 2021: their nodes are scored against known ones there.
    const withUnseen = report.graphModel.perSlice.filter((s) => s.noveltyAuroc !== null);
    assert.ok(withUnseen.length >= 6);
    assert.ok(withUnseen.every((s) => s.slice >= '2021'));
    assert.ok(mean(withUnseen.map((s) => s.noveltyAuroc)) > 0.6);
    const matrix = report.graphModel.accuracyMatrix;
    assert.equal(matrix.length, 24);
    matrix.forEach((row, i) => assert.equal(row[i], report.graphModel.perSlice[i].accuracy));
  });

  it('groups novelty scores computed elsewhere, and locates problems in them', async () => {
    const { folder } = await smallDataset();
    const nodes = (await csvRows(path.join(folder, 'nodes.csv'))).slice(1).map((row) => row[0]);
    const scoresFile = path.join(path.dirname(folder), 'external.csv');
    const dim = 4;
    const lines = ['id,score,predicted'];
    const embedding = new Float32Array(nodes.length * dim);
    nodes.forEach((id, i) => {
      const group = i % 3;
      lines.push(`${id},${group === 0 ? 0.8 : -0.5},`);
      embedding.set([group === 0 ? 5 + (i % 2) : 0, group, i % 2 ? 1 : 0, 0.01 * (i % 7)], i * dim);
    });
    await fs.writeFile(scoresFile, lines.join('\n') + '\n');
    await fs.writeFile(scoresFile.replace(/\.csv$/, '.npy'), encodeNpy(embedding, [nodes.length, dim]));
    const out = path.join(path.dirname(folder), 'external-candidates.json');
    const result = await cli('discover', folder, '--scores', scoresFile, '--out', out);
    assert.equal(result.code, 0, result.err);
    const file = JSON.parse(await fs.readFile(out, 'utf8')) as CandidatesFile;
    assert.equal(file.rejectedCount, nodes.filter((_, i) => i % 3 === 0).length);
    assert.ok(file.candidates.length >= 1);

    await fs.writeFile(scoresFile, `id,score\n${nodes[0]},0.5\nR999999,0.1\n${nodes[1]},abc\n`);
    const bad = await cli('discover', folder, '--scores', scoresFile);
    assert.equal(bad.code, 1);
    assert.match(bad.err, /external\.csv:3:1: node "R999999" is not in nodes\.csv/);
    assert.match(bad.err, /external\.csv:4:\d+: score "abc" is not a finite number/);

    await fs.writeFile(scoresFile, `id,score\n${nodes[0]},0.5\n`);
    const shape = await cli('discover', folder, '--scores', scoresFile);
    assert.equal(shape.code, 1);
    assert.match(shape.err, /external\.npy:1:1: embeddings have shape \(\d+, 4\), expected \(1, dim\)/);
  });
});
