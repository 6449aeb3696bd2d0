// Shared by the decisions and git tests: a temporary copy of the bundled demo dataset, a decisions
// file built from the demo's truth file, and helpers that read files back independently of the
// code under test (csv-parse for CSV, node:crypto for hashes).
import { promises as fs } from 'node:fs';
import { createHash } from 'node:crypto';
import * as os from 'node:os';
import * as path from 'node:path';
import { parse } from 'csv-parse/sync';
import type { Decision, DecisionsFile } from '../../src/engine/decisions/types';

export const DEMO_FOLDER = path.resolve(__dirname, '../../demo-data/wind-farm');
export const DEMO_TRUTH = path.resolve(__dirname, '../../demo-data/wind-farm.truth.csv');
export const LABEL_FILES = ['labels.csv', 'classes.json', 'label-log.jsonl'];

const made: string[] = [];

/** A fresh copy of demo-data/wind-farm in a temporary folder; returns the dataset folder. */
export async function copyDemo(parent?: string): Promise<string> {
  const root = parent ?? (await fs.mkdtemp(path.join(os.tmpdir(), 'gc-apply-')));
  if (!parent) made.push(root);
  const folder = path.join(root, 'wind-farm');
  await fs.cp(DEMO_FOLDER, folder, { recursive: true });
  return folder;
}

export async function makeTempRoot(prefix = 'gc-apply-'): Promise<string> {
  const root = await fs.mkdtemp(path.join(os.tmpdir(), prefix));
  made.push(root);
  return root;
}

export async function removeTemporaryFolders(): Promise<void> {
  while (made.length > 0) await fs.rm(made.pop()!, { recursive: true, force: true });
}

/** id → label, read with csv-parse (an independent RFC 4180 parser). */
export async function readLabelsIndependently(file: string): Promise<Map<string, string>> {
  const rows = parse<{ id: string; label: string }>(await fs.readFile(file), { columns: true, bom: true });
  return new Map(rows.map((r) => [r.id, r.label]));
}

export async function sha256OfFile(file: string): Promise<string | null> {
  try {
    return createHash('sha256')
      .update(await fs.readFile(file))
      .digest('hex');
  } catch {
    return null;
  }
}

/** sha256 of every file in a folder (recursively), by relative path: "nothing was written" checks. */
export async function hashFolder(folder: string): Promise<Record<string, string>> {
  const out: Record<string, string> = {};
  for (const entry of await fs.readdir(folder, { recursive: true, withFileTypes: true })) {
    if (!entry.isFile()) continue;
    const full = path.join(entry.parentPath, entry.name);
    out[path.relative(folder, full)] = (await sha256OfFile(full))!;
  }
  return out;
}

export interface DemoDecisions {
  file: DecisionsFile;
  lightningMembers: string[];
  shaftMembers: string[];
  erosionMembers: string[];
  alreadyErosion: string[];
  /** A lightning member that a later move puts into blade-surface-erosion. */
  correctedNode: string;
}

/**
 * Decisions a curator could make on the demo: name one novel mode, move a few reports into the
 * other as a new class, merge a group into an existing class (two of its members already carry
 * that label), correct one node, and several review-only decisions.
 */
export async function demoDecisions(folder: string, overrides: Partial<DecisionsFile> = {}): Promise<DemoDecisions> {
  const truth = parse<{ id: string; label: string }>(await fs.readFile(DEMO_TRUTH), { columns: true });
  const labels = await readLabelsIndependently(path.join(folder, 'labels.csv'));
  const unlabelledOf = (cls: string): string[] => truth.filter((r) => r.label === cls && !labels.has(r.id)).map((r) => r.id);
  const lightningMembers = unlabelledOf('lightning-receptor-damage').slice(0, 30);
  const shaftMembers = unlabelledOf('main-shaft-cracking').slice(0, 5);
  const alreadyErosion = [...labels]
    .filter(([, l]) => l === 'blade-surface-erosion')
    .map(([id]) => id)
    .slice(0, 2);
  const erosionMembers = [...unlabelledOf('blade-surface-erosion').slice(0, 10), ...alreadyErosion];
  const correctedNode = lightningMembers[3];
  const madeAt = (minute: number): string => `2025-01-10T09:${String(minute).padStart(2, '0')}:00.000Z`;
  const decisions: Decision[] = [
    {
      id: 'd-0001',
      kind: 'name-new-class',
      madeAt: madeAt(1),
      candidateId: 'c-2024-Q4-1',
      members: lightningMembers,
      className: 'lightning-receptor-damage',
      description: 'Receptor and blade tip damage after lightning strikes.',
    },
    { id: 'd-0002', kind: 'skip', madeAt: madeAt(2), candidateId: 'c-2024-Q4-2' },
    {
      id: 'd-0003',
      kind: 'merge-into-class',
      madeAt: madeAt(3),
      candidateId: 'c-2024-Q4-3',
      members: erosionMembers,
      className: 'blade-surface-erosion',
      note: 'coating delamination is erosion',
    },
    {
      id: 'd-0004',
      kind: 'move-members',
      madeAt: madeAt(4),
      members: shaftMembers,
      className: 'main-shaft-cracking',
      description: 'Cracks in the main shaft.',
    },
    { id: 'd-0005', kind: 'move-members', madeAt: madeAt(5), members: [correctedNode], className: 'blade-surface-erosion' },
    { id: 'd-0006', kind: 'dismiss', madeAt: madeAt(6), candidateId: 'c-2024-Q4-4' },
    { id: 'd-0007', kind: 'keep-label', madeAt: madeAt(7), node: alreadyErosion[0] },
    { id: 'd-0008', kind: 'split-candidate', madeAt: madeAt(8), candidateId: 'c-2024-Q4-5', parts: [[shaftMembers[0]], [shaftMembers[1]]] },
  ];
  const file: DecisionsFile = {
    format: 'graph-curator-decisions',
    version: 1,
    dataset: 'wind-farm',
    runId: '2025-01-10T09-00-00-000Z-2024-Q4-abc123',
    settingsHash: 'f00dfeed',
    slice: '2024-Q4',
    baseHashes: {
      'labels.csv': (await sha256OfFile(path.join(folder, 'labels.csv')))!,
      'classes.json': (await sha256OfFile(path.join(folder, 'classes.json')))!,
    },
    decisions,
    ...overrides,
  };
  return { file, lightningMembers, shaftMembers, erosionMembers, alreadyErosion, correctedNode };
}

/**
 * The labels the decisions should produce, computed here from the decisions and the original
 * file without the planner: each labelling decision in order sets its members' label;
 * merge-classes relabels every node of `from`.
 */
export function expectedLabels(original: Map<string, string>, decisions: Decision[]): Map<string, string> {
  const labels = new Map(original);
  for (const d of decisions) {
    if (d.kind === 'name-new-class' || d.kind === 'merge-into-class' || d.kind === 'move-members')
      for (const m of d.members) labels.set(m, d.className);
    if (d.kind === 'merge-classes') for (const [id, l] of labels) if (l === d.from) labels.set(id, d.into);
  }
  return labels;
}

/** Environment for git in tests: a fixed identity and no user or system configuration. */
export const GIT_TEST_ENV: Record<string, string> = {
  GIT_AUTHOR_NAME: 'Test Curator',
  GIT_AUTHOR_EMAIL: 'curator@example.invalid',
  GIT_COMMITTER_NAME: 'Test Curator',
  GIT_COMMITTER_EMAIL: 'curator@example.invalid',
  GIT_CONFIG_GLOBAL: os.devNull,
  GIT_CONFIG_NOSYSTEM: '1',
};
