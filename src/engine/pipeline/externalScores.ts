// Novelty scores and embeddings computed elsewhere (a team's own cluster): a CSV of
// `id,score,predicted` (optional `rejected` 0/1) and a .npy of embeddings with one row per CSV
// row, validated like every other input and turned into a discovery space over the full graph.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { readCsvFile, requireColumns } from '../dataset/csv';
import { DatasetError, type Dataset, type LocatedProblem } from '../dataset/types';
import { buildAdjacency } from '../graph/csr';
import { parseNpy } from '../io/npy';
import type { DiscoverySpace } from './discoverSlice';

export interface ExternalScoresOptions {
  /** Rejected when score > threshold, unless the CSV has a `rejected` column. */
  threshold: number;
  /** Only nodes of this slice are candidates for rejection (all listed nodes when null). */
  slice: number | null;
}

export async function readExternalScores(
  dataset: Dataset,
  csvPath: string,
  npyPath: string,
  options: ExternalScoresOptions,
): Promise<DiscoverySpace> {
  const csvFile = path.basename(csvPath);
  const npyFile = path.basename(npyPath);
  const problems: LocatedProblem[] = [];
  const rows: { node: number; score: number; predicted: number; rejected: number | null }[] = [];
  let idAt = -1;
  let scoreAt = -1;
  let predictedAt = -1;
  let rejectedAt = -1;
  const classIndex = new Map(dataset.classNames.map((name, i) => [name, i]));
  const seen = new Set<number>();
  const read = await readCsvFile(
    csvPath,
    csvFile,
    (row) => {
      if (idAt < 0 || scoreAt < 0) return;
      const at = (k: number) => ({ file: csvFile, line: row.fieldLines[k], column: row.fieldColumns[k] });
      const node = dataset.indexOfId.get(row.fields[idAt]);
      if (node === undefined)
        return void problems.push({ ...at(idAt), message: `node "${row.fields[idAt]}" is not in ${dataset.manifest.files.nodes}` });
      if (seen.has(node)) return void problems.push({ ...at(idAt), message: `node "${row.fields[idAt]}" is listed twice` });
      seen.add(node);
      const score = Number(row.fields[scoreAt]);
      if (row.fields[scoreAt].trim() === '' || !Number.isFinite(score))
        return void problems.push({ ...at(scoreAt), message: `score "${row.fields[scoreAt]}" is not a finite number` });
      const predictedName = predictedAt >= 0 ? row.fields[predictedAt] : '';
      const predicted = predictedName === '' ? -1 : (classIndex.get(predictedName) ?? -1);
      if (predictedName !== '' && predicted < 0)
        return void problems.push({ ...at(predictedAt), message: `predicted class "${predictedName}" is not a class of this dataset` });
      let rejected: number | null = null;
      if (rejectedAt >= 0) {
        const raw = row.fields[rejectedAt];
        if (raw !== '0' && raw !== '1') return void problems.push({ ...at(rejectedAt), message: `rejected must be 0 or 1, got "${raw}"` });
        rejected = Number(raw);
      }
      rows.push({ node, score, predicted, rejected });
    },
    {
      onHeader: (header) => {
        [idAt, scoreAt] = requireColumns(
          header,
          csvFile,
          [
            { name: 'id', role: 'node id' },
            { name: 'score', role: 'novelty score (higher = more novel)' },
          ],
          problems,
        );
        predictedAt = header.fields.indexOf('predicted');
        rejectedAt = header.fields.indexOf('rejected');
      },
    },
  );
  problems.unshift(...read.problems);
  if (problems.length === 0 && rows.length === 0) problems.push({ file: csvFile, line: 1, column: 1, message: 'no scored nodes' });
  if (problems.length > 0) throw new DatasetError(problems);

  const matrix = parseNpy(new Uint8Array(await fs.readFile(npyPath)), npyFile);
  if (matrix.shape.length !== 2 || matrix.shape[0] !== rows.length) {
    throw new DatasetError([
      {
        file: npyFile,
        line: 1,
        column: 1,
        message: `embeddings have shape (${matrix.shape.join(', ')}), expected (${rows.length}, dim): one row per row of ${csvFile}`,
      },
    ]);
  }
  for (let i = 0; i < matrix.data.length; i++) {
    if (!Number.isFinite(matrix.data[i])) {
      throw new DatasetError([
        { file: npyFile, line: 1, column: 1, message: `embedding row ${Math.floor(i / matrix.shape[1]) + 1} has a non-finite value` },
      ]);
    }
  }
  const dim = matrix.shape[1];
  const n = dataset.nodeIds.length;
  const embeddings = new Float32Array(n * dim);
  const predictedClass = new Int32Array(n).fill(-1);
  const noveltyScore = new Float32Array(n);
  const rejected: number[] = [];
  rows.forEach((r, i) => {
    embeddings.set(matrix.data.subarray(i * dim, (i + 1) * dim), r.node * dim);
    predictedClass[r.node] = r.predicted;
    noveltyScore[r.node] = r.score;
    const inSlice = options.slice === null || dataset.nodeSlice[r.node] === options.slice;
    if (inSlice && (r.rejected ?? (r.score > options.threshold ? 1 : 0))) rejected.push(r.node);
  });
  return {
    globalIndex: Int32Array.from(dataset.nodeIds.keys()),
    adjacency: buildAdjacency(n, dataset.edges, true),
    embeddings,
    embeddingDim: dim,
    predictedClass,
    noveltyScore,
    rejected: Int32Array.from(rejected).sort(),
  };
}
