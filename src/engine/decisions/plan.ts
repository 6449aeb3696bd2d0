// planApply: from a decisions file and the dataset's current label files to the exact changes an
// apply would make (new labels.csv and classes.json text, one log line per changed node, counts
// per class before and after). Reads, validates, computes; never writes. Decisions take effect in
// file order, as they were made in the review panel.
import type { ClassRecord, ClassStatus, LabelLogEntry, LocatedProblem } from '../dataset/types';
import { compareCodeUnits, formatLabelsCsv } from '../dataset/labelsFile';
import { formatClassesJson } from '../dataset/classesFile';
import type { DecisionKind, DecisionsFile } from './types';
import {
  decisionsShapeProblems,
  describeDecision,
  InvalidDecisionsError,
  nodeReferences,
  NO_POSITIONS,
  type DecisionLocator,
  type JsonPath,
} from './decisionsFile';
import { decisionDigest } from './decisionDigest';
import { readLabelFiles, sha256OfText, type LabelFilesSnapshot } from './labelFiles';
import { readNodeIds } from './nodeIds';
import { InterruptedApplyError, type FileConflict } from './applyErrors';
import type { AppliedBatch } from './batchLog';

export interface LabelChange {
  node: string;
  oldLabel: string | null;
  newLabel: string;
  /** The decision that gave the node its new label (the last one, when several did). */
  decisionId: string;
  reason: string;
}

export interface DecisionOutcome {
  index: number;
  id: string;
  kind: DecisionKind;
  /** Nodes whose label this decision set to something new (before later decisions). */
  relabelled: number;
  /** Members that already carried the decision's class: nothing to do for them. */
  alreadyLabelled: number;
  /** The decision was applied by an earlier batch (same run, same content). */
  appliedBefore: boolean;
  /** Review-only kinds: recorded, change no label. */
  reviewOnly: boolean;
}

export interface ClassCount {
  name: string;
  before: number;
  after: number;
  /** Status after the apply; "unregistered" for labels not listed in classes.json. */
  status: ClassStatus | 'unregistered';
  /** Registered by this apply. */
  added: boolean;
}

/** One file the apply replaces, with both texts for a preview diff. */
export interface PlannedFile {
  /** Name inside the dataset folder. */
  name: string;
  path: string;
  /** null when the file does not exist yet. */
  oldText: string | null;
  newText: string;
  changed: boolean;
  oldSha256: string | null;
  newSha256: string;
}

export interface ApplyPlan {
  folder: string;
  dataset: string;
  decisions: DecisionsFile;
  /** Name of the decisions file (for messages and the log). */
  source: string;
  plannedAt: string;
  labelsFile: PlannedFile;
  classesFile: PlannedFile;
  logFile: { name: string; path: string };
  /** sha256 (null = absent) of labels.csv, classes.json and the log as this plan read them. */
  readHashes: Record<string, string | null>;
  /** Label files that differ from the decisions' baseHashes and are not explained by earlier applies of the same run. */
  baseConflicts: FileConflict[];
  /** Sorted by node id. */
  changes: LabelChange[];
  /** One per change, stamped with plannedAt; applyPlan stamps the time of writing. */
  logEntries: LabelLogEntry[];
  /** classes.json after the apply. */
  classes: ClassRecord[];
  classesAdded: ClassRecord[];
  classesMerged: { from: string; into: string }[];
  counts: ClassCount[];
  outcomes: DecisionOutcome[];
  /** How many decisions of each review-only kind were seen (they change nothing). */
  reviewOnly: Partial<Record<DecisionKind, number>>;
  /** Digests of the label-changing decisions, recorded in the log batch. */
  decisionDigests: string[];
  /** False when applying would write nothing. */
  hasChanges: boolean;
}

export interface PlanOptions {
  /** Name used for the decisions in problems and in the log (default "decisions"). */
  source?: string;
  /** Positions in the decisions file, from readDecisionsFile. */
  locate?: DecisionLocator;
  /**
   * Plan on the files as they are now even if they changed since the run the decisions were made
   * on (every decision is checked again against them). Without it such a change is a conflict.
   */
  rebase?: boolean;
  now?: Date;
}

const REVIEW_ONLY: ReadonlySet<DecisionKind> = new Set(['merge-candidates', 'split-candidate', 'dismiss', 'skip', 'keep-label']);

export async function planApply(folder: string, decisions: DecisionsFile, options: PlanOptions = {}): Promise<ApplyPlan> {
  const source = options.source ?? 'decisions';
  const locate = options.locate ?? NO_POSITIONS;
  const shapeProblems = decisionsShapeProblems(decisions, source, locate);
  if (shapeProblems.length > 0) throw new InvalidDecisionsError(shapeProblems);

  const snapshot = await readLabelFiles(folder);
  const interrupted = snapshot.log.batches.filter((b) => b.state === 'interrupted');
  if (interrupted.length > 0)
    throw new InterruptedApplyError(
      snapshot.names.log,
      interrupted.map((b) => b.begin.batch),
    );
  const nodeIds = await readNodeIds(snapshot.folder, snapshot.manifest);

  const plannedAt = (options.now ?? new Date()).toISOString();
  const outcome = evaluateDecisions(decisions, snapshot, nodeIds, { source, locate });
  if (outcome.problems.length > 0) throw new InvalidDecisionsError(outcome.problems);

  const changes: LabelChange[] = [];
  for (const [node, newLabel] of outcome.labels) {
    const oldLabel = snapshot.labels.get(node) ?? null;
    if (oldLabel === newLabel) continue;
    const why = outcome.provenance.get(node)!;
    changes.push({ node, oldLabel, newLabel, decisionId: why.decisionId, reason: why.reason });
  }
  changes.sort((a, b) => compareCodeUnits(a.node, b.node));

  const logEntries: LabelLogEntry[] = changes.map((c) => ({
    time: plannedAt,
    node: c.node,
    oldLabel: c.oldLabel,
    newLabel: c.newLabel,
    reason: c.reason,
    decisionId: c.decisionId,
    ...(decisions.runId !== null ? { runId: decisions.runId } : {}),
    ...(decisions.settingsHash !== null ? { settingsHash: decisions.settingsHash } : {}),
  }));

  const labelsChanged = changes.length > 0;
  const classesChanged = outcome.classesAdded.length > 0 || outcome.classesMerged.length > 0;
  const labelsText = labelsChanged ? formatLabelsCsv(outcome.labels) : (snapshot.labelsText ?? '');
  const classesText = classesChanged ? formatClassesJson(outcome.classes) : (snapshot.classesText ?? '');
  const planned = (name: string, filePath: string, oldText: string | null, newText: string, changed: boolean): PlannedFile => ({
    name,
    path: filePath,
    oldText,
    newText,
    changed,
    oldSha256: snapshot.hashes[name],
    newSha256: changed ? sha256OfText(newText) : (snapshot.hashes[name] ?? sha256OfText(newText)),
  });

  return {
    folder: snapshot.folder,
    dataset: snapshot.manifest.name,
    decisions,
    source,
    plannedAt,
    labelsFile: planned(snapshot.names.labels, snapshot.paths.labels, snapshot.labelsText, labelsText, labelsChanged),
    classesFile: planned(snapshot.names.classes, snapshot.paths.classes, snapshot.classesText, classesText, classesChanged),
    logFile: { name: snapshot.names.log, path: snapshot.paths.log },
    readHashes: { ...snapshot.hashes },
    baseConflicts: options.rebase ? [] : baseConflictsOf(decisions, snapshot),
    changes,
    logEntries,
    classes: outcome.classes,
    classesAdded: outcome.classesAdded,
    classesMerged: outcome.classesMerged,
    counts: classCounts(snapshot, outcome),
    outcomes: outcome.outcomes,
    reviewOnly: outcome.reviewOnly,
    decisionDigests: decisions.decisions.filter((d) => !REVIEW_ONLY.has(d.kind)).map((d) => decisionDigest(decisions, d)),
    hasChanges: labelsChanged || classesChanged,
  };
}

/**
 * Label files whose hash differs from the one recorded when the run started. A difference made
 * by earlier committed applies of the same run (a review exported and applied in parts) is not a
 * conflict: the chain of their before → after hashes leads from the recorded hash to today's.
 */
function baseConflictsOf(decisions: DecisionsFile, snapshot: LabelFilesSnapshot): FileConflict[] {
  if (Object.keys(decisions.baseHashes).length === 0) return [];
  const ownBatches = snapshot.log.batches.filter(
    (b) =>
      b.state === 'committed' && decisions.runId !== null && b.begin.runId === decisions.runId && b.begin.dataset === decisions.dataset,
  );
  const conflicts: FileConflict[] = [];
  for (const name of [snapshot.names.labels, snapshot.names.classes]) {
    const expected = decisions.baseHashes[name] ?? null;
    const found = snapshot.hashes[name];
    if (followOwnBatches(expected, name, ownBatches) !== found) conflicts.push({ file: name, expected, found, since: 'run' });
  }
  return conflicts;
}

function followOwnBatches(start: string | null, name: string, batches: AppliedBatch[]): string | null {
  let hash = start;
  for (const batch of batches) {
    const transition = batch.begin.files?.[name];
    if (transition && transition.before === hash) hash = transition.after;
  }
  return hash;
}

interface Evaluation {
  labels: Map<string, string>;
  provenance: Map<string, { decisionId: string; reason: string }>;
  classes: ClassRecord[];
  classesAdded: ClassRecord[];
  classesMerged: { from: string; into: string }[];
  outcomes: DecisionOutcome[];
  reviewOnly: Partial<Record<DecisionKind, number>>;
  problems: LocatedProblem[];
}

/** Runs the decisions in order over a copy of the labels and classes, collecting every problem. */
function evaluateDecisions(
  decisions: DecisionsFile,
  snapshot: LabelFilesSnapshot,
  nodeIds: Set<string>,
  where: { source: string; locate: DecisionLocator },
): Evaluation {
  const problems: LocatedProblem[] = [];
  const labels = new Map(snapshot.labels);
  const classes = snapshot.classes.map((c) => ({ ...c }));
  const classByName = new Map(classes.map((c) => [c.name, c]));
  const unregistered = new Set([...snapshot.labels.values()].filter((label) => !classByName.has(label)));
  const introducedBy = new Map<string, number>();
  const assignedBy = new Map<string, { index: number; className: string }>();
  const provenance = new Map<string, { decisionId: string; reason: string }>();
  const classesAdded: ClassRecord[] = [];
  const classesMerged: { from: string; into: string }[] = [];
  const outcomes: DecisionOutcome[] = [];
  const reviewOnly: Partial<Record<DecisionKind, number>> = {};
  const firstIndexOfId = new Map<string, number>();
  const appliedDigests = new Set(snapshot.log.batches.filter((b) => b.state === 'committed').flatMap((b) => b.begin.decisionDigests ?? []));

  if (decisions.dataset !== snapshot.manifest.name) {
    problems.push({
      file: where.source,
      ...where.locate(['dataset']),
      message: `the decisions are for dataset "${decisions.dataset}", but ${snapshot.folder} holds "${snapshot.manifest.name}"`,
    });
  }

  decisions.decisions.forEach((decision, index) => {
    const who = describeDecision(index, decision);
    const problem = (at: JsonPath, message: string): void => {
      problems.push({ file: where.source, ...where.locate(['decisions', index, ...at]), message: `${who}: ${message}` });
    };
    const outcome: DecisionOutcome = {
      index,
      id: decision.id,
      kind: decision.kind,
      relabelled: 0,
      alreadyLabelled: 0,
      appliedBefore: appliedDigests.has(decisionDigest(decisions, decision)),
      reviewOnly: REVIEW_ONLY.has(decision.kind),
    };
    outcomes.push(outcome);

    const earlier = firstIndexOfId.get(decision.id);
    if (earlier !== undefined) problem(['id'], `id "${decision.id}" is used by decision #${earlier + 1} too`);
    else firstIndexOfId.set(decision.id, index);

    for (const { node, at } of nodeReferences(decision)) {
      if (!nodeIds.has(node)) problem(at, `unknown node "${node}" (not in ${snapshot.manifest.files.nodes})`);
    }

    const whereClassIs = (name: string): string => {
      const by = introducedBy.get(name);
      if (by !== undefined) return `named by decision #${by + 1}`;
      return classByName.has(name) ? `in ${snapshot.names.classes}` : `used in ${snapshot.names.labels}`;
    };
    const classExists = (name: string): boolean => classByName.has(name) || unregistered.has(name);
    /** A class nodes may be given: registered and active, or a label not yet registered. */
    const checkTarget = (name: string, at: JsonPath): boolean => {
      const record = classByName.get(name);
      if (record?.status === 'merged') problem(at, `class "${name}" is merged into "${record.mergedInto}": use "${record.mergedInto}"`);
      else if (record?.status === 'retired') problem(at, `class "${name}" is retired`);
      else if (!classExists(name))
        problem(
          at,
          `no class "${name}" (not in ${snapshot.names.classes}, not used in ${snapshot.names.labels}, not named by an earlier decision)`,
        );
      else return true;
      return false;
    };
    const registerClass = (name: string, description: string, at: JsonPath): boolean => {
      if (name !== name.trim()) {
        problem(at, `class name "${name}" has leading or trailing spaces`);
        return false;
      }
      if (classExists(name)) {
        // The same decision applied before by this run: the class is its own doing.
        if (outcome.appliedBefore && classByName.get(name)?.status === 'active') return true;
        problem(at, `class "${name}" exists already (${whereClassIs(name)}): merge into it instead`);
        return false;
      }
      const record: ClassRecord = { name, description, introducedIn: decisions.slice, status: 'active' };
      classes.push(record);
      classByName.set(name, record);
      classesAdded.push(record);
      introducedBy.set(name, index);
      return true;
    };
    const labelMembers = (members: string[], className: string, reason: string, overrides: boolean): void => {
      const seen = new Set<string>();
      members.forEach((node, k) => {
        if (seen.has(node) || !nodeIds.has(node)) return;
        seen.add(node);
        const previous = assignedBy.get(node);
        if (previous && previous.className !== className && !overrides) {
          problem(
            ['members', k],
            `node "${node}" is given "${previous.className}" by decision #${previous.index + 1} (${decisions.decisions[previous.index].id}) and "${className}" here`,
          );
          return;
        }
        assignedBy.set(node, { index, className });
        if (labels.get(node) === className) {
          outcome.alreadyLabelled++;
          return;
        }
        labels.set(node, className);
        provenance.set(node, { decisionId: decision.id, reason });
        outcome.relabelled++;
      });
    };

    const reasonOr = (generated: string): string =>
      decision.note !== undefined && decision.note.trim() !== '' ? decision.note : generated;
    switch (decision.kind) {
      case 'name-new-class':
        if (registerClass(decision.className, decision.description, ['className']))
          labelMembers(
            decision.members,
            decision.className,
            reasonOr(`new class "${decision.className}" named from candidate ${decision.candidateId}`),
            false,
          );
        break;
      case 'merge-into-class':
        if (checkTarget(decision.className, ['className']))
          labelMembers(
            decision.members,
            decision.className,
            reasonOr(`candidate ${decision.candidateId} merged into class "${decision.className}"`),
            false,
          );
        break;
      case 'move-members': {
        // As in the review panel: a description creates the class, none moves into an existing one.
        const isNew = decision.description !== undefined;
        const ok = isNew
          ? registerClass(decision.className, decision.description ?? '', ['className'])
          : checkTarget(decision.className, ['className']);
        // A move is how the panel records a correction of an earlier decision: it may override it.
        if (ok)
          labelMembers(
            decision.members,
            decision.className,
            reasonOr(`moved to ${isNew ? 'new ' : ''}class "${decision.className}"`),
            true,
          );
        break;
      }
      case 'merge-classes': {
        if (decision.from === decision.into) {
          problem(['into'], `cannot merge class "${decision.from}" into itself`);
          break;
        }
        const fromRecord = classByName.get(decision.from);
        const alreadyMerged = fromRecord?.status === 'merged' && fromRecord.mergedInto === decision.into;
        if (!alreadyMerged && !checkTarget(decision.from, ['from'])) break;
        if (!checkTarget(decision.into, ['into'])) break;
        const reason = reasonOr(`class "${decision.from}" merged into "${decision.into}"`);
        for (const [node, label] of labels) {
          if (label !== decision.from) continue;
          labels.set(node, decision.into);
          provenance.set(node, { decisionId: decision.id, reason });
          outcome.relabelled++;
        }
        if (fromRecord && !alreadyMerged) {
          fromRecord.status = 'merged';
          fromRecord.mergedInto = decision.into;
          classesMerged.push({ from: decision.from, into: decision.into });
        }
        unregistered.delete(decision.from);
        break;
      }
      default:
        reviewOnly[decision.kind] = (reviewOnly[decision.kind] ?? 0) + 1;
    }
  });
  return { labels, provenance, classes, classesAdded, classesMerged, outcomes, reviewOnly, problems };
}

function classCounts(snapshot: LabelFilesSnapshot, outcome: Evaluation): ClassCount[] {
  const tally = (labels: Map<string, string>): Map<string, number> => {
    const counts = new Map<string, number>();
    for (const label of labels.values()) counts.set(label, (counts.get(label) ?? 0) + 1);
    return counts;
  };
  const before = tally(snapshot.labels);
  const after = tally(outcome.labels);
  const added = new Set(outcome.classesAdded.map((c) => c.name));
  const registered = new Set(outcome.classes.map((c) => c.name));
  const unregistered = [...new Set([...before.keys(), ...after.keys()])].filter((name) => !registered.has(name)).sort(compareCodeUnits);
  return [
    ...outcome.classes.map((c) => ({
      name: c.name,
      before: before.get(c.name) ?? 0,
      after: after.get(c.name) ?? 0,
      status: c.status,
      added: added.has(c.name),
    })),
    ...unregistered.map((name) => ({
      name,
      before: before.get(name) ?? 0,
      after: after.get(name) ?? 0,
      status: 'unregistered' as const,
      added: false,
    })),
  ];
}
