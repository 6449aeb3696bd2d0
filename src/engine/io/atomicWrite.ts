// Writes that never leave a half-written file: write a temporary file beside the target,
// flush it to disk, then rename it over the target (rename is atomic within a file system).
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { randomBytes } from 'node:crypto';

export interface AtomicWriteHooks {
  /** Test hook: called after the temporary file is written and before the rename. */
  beforeRename?: (temporaryPath: string) => Promise<void> | void;
}

export async function writeFileAtomic(target: string, data: string | Uint8Array, hooks: AtomicWriteHooks = {}): Promise<void> {
  const dir = path.dirname(target);
  const temporaryPath = path.join(dir, `.${path.basename(target)}.${randomBytes(6).toString('hex')}.tmp`);
  let handle: fs.FileHandle | undefined;
  try {
    handle = await fs.open(temporaryPath, 'wx');
    await handle.writeFile(data);
    await handle.sync();
    await handle.close();
    handle = undefined;
    await hooks.beforeRename?.(temporaryPath);
    await fs.rename(temporaryPath, target);
  } catch (error) {
    if (handle) await handle.close().catch(() => undefined);
    await fs.rm(temporaryPath, { force: true }).catch(() => undefined);
    throw error;
  }
}

/** Appends complete lines to a file opened in append mode, flushed before returning. */
export async function appendLines(target: string, lines: string[]): Promise<void> {
  if (lines.length === 0) return;
  const handle = await fs.open(target, 'a');
  try {
    await handle.writeFile(lines.map((l) => l + '\n').join(''));
    await handle.sync();
  } finally {
    await handle.close();
  }
}

/**
 * Like writeFileAtomic, for content too large to hold as one string: the chunks are written
 * one after another into the temporary file, which is renamed over the target only at the end.
 */
export async function writeChunksAtomic(
  target: string,
  chunks: Iterable<string | Uint8Array> | AsyncIterable<string | Uint8Array>,
): Promise<void> {
  const dir = path.dirname(target);
  const temporaryPath = path.join(dir, `.${path.basename(target)}.${randomBytes(6).toString('hex')}.tmp`);
  let handle: fs.FileHandle | undefined;
  try {
    handle = await fs.open(temporaryPath, 'wx');
    for await (const chunk of chunks) {
      const bytes = typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : chunk;
      // A single write may be partial; keep going until the whole chunk is on disk.
      let offset = 0;
      while (offset < bytes.length) {
        const { bytesWritten } = await handle.write(bytes, offset, bytes.length - offset);
        offset += bytesWritten;
      }
    }
    await handle.sync();
    await handle.close();
    handle = undefined;
    await fs.rename(temporaryPath, target);
  } catch (error) {
    if (handle) await handle.close().catch(() => undefined);
    await fs.rm(temporaryPath, { force: true }).catch(() => undefined);
    throw error;
  }
}
