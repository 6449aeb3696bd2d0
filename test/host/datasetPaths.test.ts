import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { findDatasetFolder, isSameOrInside } from '../../src/host/datasetPaths';

describe('host/datasetPaths', () => {
  let root: string;

  before(async () => {
    // root/workspace/data/wind/{dataset.json, nodes.csv, notes/today.md}; root/workspace/loose.txt
    root = await fs.mkdtemp(path.join(os.tmpdir(), 'dataset-paths-'));
    await fs.mkdir(path.join(root, 'workspace', 'data', 'wind', 'notes'), { recursive: true });
    await fs.writeFile(path.join(root, 'workspace', 'data', 'wind', 'dataset.json'), '{"name":"wind"}');
    await fs.writeFile(path.join(root, 'workspace', 'data', 'wind', 'nodes.csv'), 'id,time\n');
    await fs.writeFile(path.join(root, 'workspace', 'data', 'wind', 'notes', 'today.md'), '');
    await fs.writeFile(path.join(root, 'workspace', 'loose.txt'), '');
    // A dataset.json above the workspace must not be found from inside it.
    await fs.writeFile(path.join(root, 'dataset.json'), '{"name":"outside"}');
  });

  after(async () => {
    await fs.rm(root, { recursive: true, force: true });
  });

  it('finds the folder of a dataset file and of dataset.json itself', async () => {
    const wind = path.join(root, 'workspace', 'data', 'wind');
    const workspace = path.join(root, 'workspace');
    assert.equal(await findDatasetFolder(path.join(wind, 'nodes.csv'), workspace), wind);
    assert.equal(await findDatasetFolder(path.join(wind, 'dataset.json'), workspace), wind);
  });

  it('walks up from nested files to the nearest dataset.json', async () => {
    const wind = path.join(root, 'workspace', 'data', 'wind');
    assert.equal(await findDatasetFolder(path.join(wind, 'notes', 'today.md'), path.join(root, 'workspace')), wind);
  });

  it('stops at the given folder', async () => {
    assert.equal(await findDatasetFolder(path.join(root, 'workspace', 'loose.txt'), path.join(root, 'workspace')), undefined);
    // Without a stop folder the search goes on upwards and finds the outer dataset.
    assert.equal(await findDatasetFolder(path.join(root, 'workspace', 'loose.txt')), root);
  });

  it('ignores a folder named dataset.json', async () => {
    const odd = path.join(root, 'workspace', 'odd');
    await fs.mkdir(path.join(odd, 'dataset.json'), { recursive: true });
    assert.equal(await findDatasetFolder(path.join(odd, 'file.csv'), path.join(root, 'workspace')), undefined);
  });

  it('tells whether a path lies inside a folder', () => {
    assert.equal(isSameOrInside('/a/b/c', '/a/b'), true);
    assert.equal(isSameOrInside('/a/b', '/a/b'), true);
    assert.equal(isSameOrInside('/a/bc', '/a/b'), false);
    assert.equal(isSameOrInside('/a', '/a/b'), false);
    // A child whose name merely starts with two dots is still inside.
    assert.equal(isSameOrInside('/a/b/..hidden', '/a/b'), true);
  });
});
