// Gathers located problems from every file, keeping at most a fixed number per file (a file
// with a million bad rows should not use a gigabyte of messages) and counting the rest.
import type { LocatedProblem } from './types';

export const MAX_PROBLEMS_PER_FILE = 10_000;

export class ProblemCollector {
  private readonly listed: LocatedProblem[] = [];
  private readonly perFile = new Map<string, number>();
  private readonly unlisted = new Map<string, number>();

  get count(): number {
    return this.listed.length;
  }

  add(problem: LocatedProblem): void {
    const n = this.perFile.get(problem.file) ?? 0;
    if (n >= MAX_PROBLEMS_PER_FILE) {
      this.addUnlisted(problem.file, 1);
      return;
    }
    this.perFile.set(problem.file, n + 1);
    this.listed.push(problem);
  }

  addAll(problems: Iterable<LocatedProblem>): void {
    for (const p of problems) this.add(p);
  }

  addUnlisted(file: string, count: number): void {
    if (count > 0) this.unlisted.set(file, (this.unlisted.get(file) ?? 0) + count);
  }

  hasProblemsIn(file: string): boolean {
    return (this.perFile.get(file) ?? 0) > 0;
  }

  /** Problems grouped by file (in the order files were first reported), then by line and column. */
  result(): LocatedProblem[] {
    const fileOrder = new Map<string, number>();
    for (const p of this.listed) if (!fileOrder.has(p.file)) fileOrder.set(p.file, fileOrder.size);
    const sorted = [...this.listed].sort(
      (a, b) => fileOrder.get(a.file)! - fileOrder.get(b.file)! || a.line - b.line || a.column - b.column,
    );
    for (const [file, count] of this.unlisted)
      sorted.push({ file, line: 0, column: 0, message: `${count} more problem${count === 1 ? '' : 's'} in this file not listed` });
    return sorted;
  }
}
