// Turns a LocatedProblem (1-based line and column, 0 = not applicable) into a 0-based position in
// an absolute file path, the form editors use.
import * as path from 'node:path';
import type { LocatedProblem } from '../engine/dataset/types';

export interface ProblemPosition {
  /** Absolute path of the file the problem is in. */
  filePath: string;
  /** 0-based line. */
  line: number;
  /** 0-based column where the problem starts. */
  column: number;
  /** True when the problem names no column: the whole line is meant. */
  wholeLine: boolean;
}

export function problemPosition(datasetFolder: string, problem: LocatedProblem): ProblemPosition {
  const filePath = path.resolve(datasetFolder, problem.file === '' ? '.' : problem.file);
  const line = Math.max(0, problem.line - 1);
  if (problem.column <= 0) return { filePath, line, column: 0, wholeLine: problem.line > 0 };
  return { filePath, line, column: problem.column - 1, wholeLine: false };
}
