import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';

describe('generated SIMD module', () => {
  it('is what scripts/build-kernels.mjs compiles from assembly/kernels.ts today', function () {
    // asc takes a few seconds of CPU; more on a loaded machine.
    this.timeout(180_000);
    const root = join(__dirname, '..', '..');
    const result = spawnSync(process.execPath, [join(root, 'scripts', 'build-kernels.mjs'), '--check'], { cwd: root, encoding: 'utf8' });
    assert.equal(result.status, 0, `${result.stdout}${result.stderr}`);
    assert.match(result.stdout, /is up to date/);
  });
});
