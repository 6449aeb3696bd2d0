import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { problemPosition } from '../../src/host/problemLocation';

// LocatedProblem lines and columns are 1-based (0 = not applicable), as src/engine/dataset/types.ts
// states; VS Code positions are zero-based ("The zero-based line value", "The zero-based character
// value": the Position class in @types/vscode index.d.ts).
describe('host/problemLocation', () => {
  const folder = path.resolve('/data/wind-farm');

  it('moves 1-based line and column to 0-based', () => {
    const position = problemPosition(folder, { file: 'nodes.csv', line: 4, column: 7, message: 'bad time' });
    assert.deepEqual(position, { filePath: path.join(folder, 'nodes.csv'), line: 3, column: 6, wholeLine: false });
  });

  it('marks the whole line when the problem names no column', () => {
    const position = problemPosition(folder, { file: 'edges.csv', line: 12, column: 0, message: 'unknown node' });
    assert.deepEqual(position, { filePath: path.join(folder, 'edges.csv'), line: 11, column: 0, wholeLine: true });
  });

  it('puts a problem about a whole file at its start', () => {
    const position = problemPosition(folder, { file: 'dataset.json', line: 0, column: 0, message: 'name is required' });
    assert.deepEqual(position, { filePath: path.join(folder, 'dataset.json'), line: 0, column: 0, wholeLine: false });
  });

  it('keeps absolute file paths and resolves nested relative ones', () => {
    const elsewhere = path.resolve('/elsewhere/features.npy');
    assert.equal(problemPosition(folder, { file: elsewhere, line: 0, column: 0, message: 'x' }).filePath, elsewhere);
    assert.equal(
      problemPosition(folder, { file: 'extra/nodes.csv', line: 1, column: 1, message: 'x' }).filePath,
      path.join(folder, 'extra', 'nodes.csv'),
    );
  });
});
