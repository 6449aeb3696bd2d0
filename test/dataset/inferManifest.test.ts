import assert from 'node:assert/strict';
import { chooseGranularity, inferManifest } from '../../src/engine/dataset/inferManifest';
import { loadDataset } from '../../src/engine/dataset/load';
import { DatasetError, type LocatedProblem } from '../../src/engine/dataset/types';
import { encodeNpy } from '../../src/engine/io/npy';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { makeTempDir, removeDir, writeFolder } from './fixtures';

const at = (values: string[]) => values.map((value, k) => ({ value, line: k + 2, column: 4 }));

describe('inferManifest', () => {
  it('chooses the granularity: integers → step, else the coarsest giving at least 6 slices', () => {
    const problems: LocatedProblem[] = [];
    assert.deepEqual(chooseGranularity(at(['3', '1', '2']), 'nodes.csv', problems), { granularity: 'step', sliceCount: 3 });
    const eightYears = Array.from({ length: 8 }, (_, k) => `${2015 + k}-03-01`);
    assert.equal(chooseGranularity(at(eightYears), 'nodes.csv', problems).granularity, 'year');
    const twoYearsMonthly = Array.from(
      { length: 24 },
      (_, k) => `${2020 + Math.floor(k / 12)}-${String((k % 12) + 1).padStart(2, '0')}-15`,
    );
    assert.equal(chooseGranularity(at(twoYearsMonthly), 'nodes.csv', problems).granularity, 'quarter');
    const sixMonths = Array.from({ length: 6 }, (_, k) => `2021-0${k + 1}`);
    assert.equal(chooseGranularity(at(sixMonths), 'nodes.csv', problems).granularity, 'month');
    // Month-precision values cannot be split into weeks or days; with too few slices the finest allowed wins.
    assert.deepEqual(chooseGranularity(at(['2021-01', '2021-02']), 'nodes.csv', problems), { granularity: 'month', sliceCount: 2 });
    assert.deepEqual(problems, []);
    const badTime: LocatedProblem[] = [];
    chooseGranularity(at(['2021-01-01', 'yesterday']), 'nodes.csv', badTime);
    assert.deepEqual(
      badTime.map((p) => `${p.line}:${p.column}`),
      ['3:4'],
    );
  });

  it('proposes a manifest that loads: text → TF-IDF, numeric → feature columns, npy preferred', async () => {
    const dir = await makeTempDir();
    try {
      await writeFolder(dir, {
        'nodes.csv': 'id,time,title,score\na,1,blade crack,0.5\nb,2,gear oil,1.5\nc,2,blade tip,\n',
        'edges.csv': 'source,target,weight\na,b,1\nb,c,2\n',
      });
      const inferred = await inferManifest(dir);
      assert.equal(inferred.manifest.name, path.basename(dir));
      assert.equal(inferred.manifest.time.granularity, 'step');
      assert.deepEqual(inferred.manifest.nodeColumns, { id: 'id', text: ['title'], features: ['score'] });
      assert.equal(inferred.manifest.features.source, 'columns');
      assert.equal(inferred.manifest.edgeColumns.weight, 'weight');
      assert.equal((inferred.fileContent.edgeColumns as Record<string, unknown>).time, undefined);
      await fs.writeFile(path.join(dir, 'dataset.json'), JSON.stringify(inferred.fileContent));
      await assert.rejects(loadDataset(dir), DatasetError); // node c has no score: located problem
      await writeFolder(dir, { 'features.npy': encodeNpy(new Float32Array(6), [3, 2]), 'dataset.json': null });
      const withNpy = await inferManifest(dir);
      assert.equal(withNpy.manifest.features.source, 'npy');
      assert.equal(withNpy.manifest.files.features, 'features.npy');
      await fs.writeFile(path.join(dir, 'dataset.json'), JSON.stringify(withNpy.fileContent));
      const ds = await loadDataset(dir);
      assert.equal(ds.featureDim, 2);
      assert.deepEqual([...ds.edges.weight!], [1, 2]);
    } finally {
      await removeDir(dir);
    }
  });

  it('explains what is missing', async () => {
    const dir = await makeTempDir();
    try {
      await assert.rejects(inferManifest(dir), (e: unknown) => e instanceof DatasetError && e.problems.length === 2);
      await writeFolder(dir, { 'nodes.csv': 'id,when\na,2021\n', 'edges.csv': 'source,target\n' });
      await assert.rejects(inferManifest(dir), /nodes\.csv:1:1: no time column/);
    } finally {
      await removeDir(dir);
    }
  });
});
