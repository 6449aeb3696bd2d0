// Runs the scenario as named, numbered steps: each has a time limit, prints how long it took and
// leaves a screenshot (NN-name.png, or NN-name-FAILED.png) in the screenshots folder.
import { mkdirSync, readdirSync, rmSync } from 'node:fs';
import * as path from 'node:path';
import type { Page } from 'playwright-core';

export class StepFailure extends Error {
  constructor(
    readonly step: string,
    cause: unknown,
  ) {
    super(`step "${step}" failed: ${cause instanceof Error ? cause.message : String(cause)}`);
    this.name = 'StepFailure';
  }
}

function withTimeout<T>(work: Promise<T>, timeoutMs: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const limit = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} took longer than ${timeoutMs / 1000} s`)), timeoutMs);
  });
  return Promise.race([work, limit]).finally(() => clearTimeout(timer));
}

export class StepRecorder {
  private stepNumber = 0;
  /** Set once the browser shows the workbench; steps before that have nothing to screenshot. */
  page: Page | undefined;

  constructor(private readonly screenshotsDir: string) {
    mkdirSync(screenshotsDir, { recursive: true });
    // Screenshots of an earlier run would mix with this run's; only PNGs are ours to remove.
    for (const file of readdirSync(screenshotsDir)) if (file.endsWith('.png')) rmSync(path.join(screenshotsDir, file));
  }

  async step<T>(name: string, timeoutMs: number, work: () => Promise<T>): Promise<T> {
    const label = `${String(++this.stepNumber).padStart(2, '0')}-${name}`;
    const started = Date.now();
    try {
      const result = await withTimeout(work(), timeoutMs, `step "${name}"`);
      await this.screenshot(label);
      console.log(`  ok   ${label} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
      return result;
    } catch (error) {
      await this.screenshot(`${label}-FAILED`);
      console.log(`  FAIL ${label} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
      throw new StepFailure(name, error);
    }
  }

  private async screenshot(label: string): Promise<void> {
    if (!this.page) return;
    try {
      await this.page.screenshot({ path: path.join(this.screenshotsDir, `${label}.png`), timeout: 15_000 });
    } catch (error) {
      // A missing screenshot must not hide the step's own result.
      console.log(`  (no screenshot for ${label}: ${error instanceof Error ? error.message.split('\n')[0] : String(error)})`);
    }
  }
}
