// labels.csv (and truth files of the same layout): `id,label`, one line per labelled node.
// Written sorted by id in JavaScript string (code-unit) order with LF endings and a header, so
// that changing one label changes one line of the diff.
import * as path from 'node:path';
import type { LocatedProblem } from './types';
import { checkDuplicateHeaderNames, readCsvFile, requireColumns } from './csv';
import { writeFileAtomic, type AtomicWriteHooks } from '../io/atomicWrite';

export interface LabelEntry {
  id: string;
  label: string;
  line: number;
  idColumn: number;
  labelColumn: number;
}

export interface LabelsRead {
  /** In file order, without rejected rows. */
  entries: LabelEntry[];
  /** id → label. */
  labels: Map<string, string>;
  problems: LocatedProblem[];
  sha256: string;
}

/** Reads an `id,label` file; `file` is the name used in problems (e.g. "labels.csv"). */
export async function readLabelsCsv(filePath: string, file: string = path.basename(filePath)): Promise<LabelsRead> {
  const entries: LabelEntry[] = [];
  const labels = new Map<string, string>();
  const problems: LocatedProblem[] = [];
  let idIndex = -1;
  let labelIndex = -1;
  const result = await readCsvFile(
    filePath,
    file,
    (row) => {
      if (idIndex < 0 || labelIndex < 0) return;
      const id = row.fields[idIndex];
      const label = row.fields[labelIndex];
      const idAt = { line: row.fieldLines[idIndex], column: row.fieldColumns[idIndex] };
      if (id === '') {
        problems.push({ file, ...idAt, message: 'empty node id' });
      } else if (label.trim() === '') {
        problems.push({
          file,
          line: row.fieldLines[labelIndex],
          column: row.fieldColumns[labelIndex],
          message: `empty label for node "${id}": leave unlabelled nodes out of the file`,
        });
      } else if (labels.has(id)) {
        problems.push({ file, ...idAt, message: `duplicate id "${id}": a node has at most one label` });
      } else {
        labels.set(id, label);
        entries.push({ id, label, line: idAt.line, idColumn: idAt.column, labelColumn: row.fieldColumns[labelIndex] });
      }
    },
    {
      onHeader: (header) => {
        checkDuplicateHeaderNames(header, file, problems);
        [idIndex, labelIndex] = requireColumns(
          header,
          file,
          [
            { name: 'id', role: 'node id' },
            { name: 'label', role: 'class name' },
          ],
          problems,
        );
      },
    },
  );
  return { entries, labels, problems: sortProblems([...result.problems, ...problems]), sha256: result.sha256 };
}

function sortProblems(problems: LocatedProblem[]): LocatedProblem[] {
  return problems.sort((a, b) => a.line - b.line || a.column - b.column);
}

/** Compares strings by UTF-16 code units (JavaScript's default order), independent of locale. */
export function compareCodeUnits(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** labels.csv text: header, rows sorted by id, LF endings. */
export function formatLabelsCsv(labels: Iterable<readonly [string, string]>): string {
  const rows = [...labels].sort((a, b) => compareCodeUnits(a[0], b[0]));
  let out = 'id,label\n';
  for (const [id, label] of rows) out += `${csvField(id)},${csvField(label)}\n`;
  return out;
}

/** Quotes a field only when RFC 4180 requires it (comma, quote, line break). */
export function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

export async function writeLabelsCsv(
  filePath: string,
  labels: Iterable<readonly [string, string]>,
  hooks?: AtomicWriteHooks,
): Promise<void> {
  await writeFileAtomic(filePath, formatLabelsCsv(labels), hooks);
}
