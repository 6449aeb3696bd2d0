// writeChunksAtomic writes the large demo files; a failure part-way must leave the previous
// file untouched and no temporary file behind.
import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { writeChunksAtomic } from '../../src/engine/io/atomicWrite';

describe('writeChunksAtomic', () => {
  let folder: string;
  beforeEach(async () => {
    folder = await fs.mkdtemp(path.join(os.tmpdir(), 'chunked-write-'));
  });
  afterEach(async () => {
    await fs.rm(folder, { recursive: true, force: true });
  });

  it('joins string and byte chunks in order', async () => {
    const target = path.join(folder, 'out.csv');
    await writeChunksAtomic(target, ['id,label\n', new TextEncoder().encode('R1,é\n'), 'R2,b\n']);
    assert.equal(await fs.readFile(target, 'utf8'), 'id,label\nR1,é\nR2,b\n');
  });

  it('keeps the old file and leaves no temporary file when a chunk fails', async () => {
    const target = path.join(folder, 'out.csv');
    await fs.writeFile(target, 'old content\n');
    function* failing(): Generator<string> {
      yield 'new first chunk\n';
      throw new Error('generator broke');
    }
    await assert.rejects(writeChunksAtomic(target, failing()), /generator broke/);
    assert.equal(await fs.readFile(target, 'utf8'), 'old content\n');
    assert.deepEqual(await fs.readdir(folder), ['out.csv']);
  });
});
