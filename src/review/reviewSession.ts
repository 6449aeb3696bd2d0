// The review session: a queue of candidates (largest first), the one in view, and the curator's
// pending decisions with undo and redo. vscode-free; the host feeds it messages and persists
// toJSON() in the run folder and in the webview's state.
//
// The state is always "the initial candidates with the pending decisions replayed in order":
// undo drops the last decision and replays the rest, and a saved session is restored the same
// way. Decisions carry everything needed to replay them (a split records its parts), so replay
// needs no randomness and gives the same queue every time.
import type { Decision, DecisionsFile } from '../engine/decisions/types';
import type { CandidateStatus, DecisionRequest } from '../protocol/webview';
import { decisionProblem } from './decisionShape';
import { splitMembers, summariseMembers, type ReviewCandidate } from './reviewCandidate';
import type { ReviewContext } from './reviewContext';
import { cloneQueues, secondLookQueuesProblem, type SecondLookQueues } from './secondLookQueues';

export const reviewSessionFormat = 'graph-curator-review-session';
export const reviewSessionVersion = 1;
export const defaultSplitParts = 2;

export interface ReviewSessionJson {
  format: typeof reviewSessionFormat;
  version: typeof reviewSessionVersion;
  dataset: string;
  runId: string | null;
  slice: string;
  currentCandidateId: string | null;
  decisions: Decision[];
  /** Candidate in view before each decision, so that undo returns to it. */
  currentBefore: (string | null)[];
  redo: { decision: Decision; currentBefore: string | null }[];
  /** The second-look queues last computed for this review (absent until computed). */
  secondLook?: SecondLookQueues;
  /** How many of the first decisions are applied (in the label files); absent when none. */
  applied?: number;
}

export interface QueueItem {
  candidate: ReviewCandidate;
  status: CandidateStatus;
  skips: number;
}

export interface ClassEntry {
  name: string;
  status: 'known' | 'pending' | 'merged';
  description?: string;
}

/** A decision that does not fit the session's state; the message is meant for the curator. */
export class ReviewError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ReviewError';
  }
}

interface Entry extends QueueItem {
  /** Creation order, the last tie-break of the queue order. */
  sequence: number;
}

const compareText = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

export class ReviewSession {
  private entries = new Map<string, Entry>();
  private sequence = 0;
  private decisions: Decision[] = [];
  private currentBefore: (string | null)[] = [];
  private redoStack: { decision: Decision; currentBefore: string | null }[] = [];
  private currentId: string | null = null;
  private pendingClasses: { name: string; description: string }[] = [];
  private mergedClasses = new Set<string>();
  private pendingLabels = new Map<number, string>();
  private secondLook: SecondLookQueues | null = null;
  /** The first `appliedCount` decisions are applied: kept for the state they leave, never undone or exported again. */
  private appliedCount = 0;
  /** True while applied decisions are replayed on a context that already holds their classes. */
  private replayingApplied = false;
  private readonly indexOfId: Map<string, number>;

  constructor(
    readonly context: ReviewContext,
    private readonly initialCandidates: readonly ReviewCandidate[],
    private readonly clock: () => Date = () => new Date(),
  ) {
    this.indexOfId = new Map(context.nodeIds.map((id, index) => [id, index]));
    this.reset();
    this.currentId = this.openIds()[0] ?? null;
  }

  /** Restores a saved session on the same run: replays its decisions onto the initial candidates. */
  static fromJSON(json: unknown, context: ReviewContext, initialCandidates: readonly ReviewCandidate[], clock?: () => Date): ReviewSession {
    const saved = checkSessionJson(json, context);
    const session = new ReviewSession(context, initialCandidates, clock);
    const applied = saved.applied ?? 0;
    saved.decisions.forEach((decision, k) => {
      try {
        session.replayingApplied = k < applied;
        session.apply(decision);
      } catch (error) {
        throw new ReviewError(
          `saved review session: decision ${decision.id} no longer fits run ${context.runId ?? '(none)'}: ${(error as Error).message}`,
        );
      }
      session.decisions.push(decision);
      session.currentBefore.push(saved.currentBefore[k] ?? null);
    });
    session.replayingApplied = false;
    session.appliedCount = applied;
    session.redoStack = saved.redo.map((r) => ({ decision: r.decision, currentBefore: r.currentBefore }));
    if (saved.secondLook !== undefined) session.secondLook = cloneQueues(saved.secondLook);
    session.currentId =
      saved.currentCandidateId !== null && session.isOpen(saved.currentCandidateId)
        ? saved.currentCandidateId
        : (session.openIds()[0] ?? null);
    return session;
  }

  toJSON(): ReviewSessionJson {
    return {
      format: reviewSessionFormat,
      version: reviewSessionVersion,
      dataset: this.context.dataset,
      runId: this.context.runId,
      slice: this.context.slice,
      currentCandidateId: this.currentId,
      decisions: this.decisions.map(cloneDecision),
      currentBefore: [...this.currentBefore],
      redo: this.redoStack.map((r) => ({ decision: cloneDecision(r.decision), currentBefore: r.currentBefore })),
      ...(this.secondLook ? { secondLook: cloneQueues(this.secondLook) } : {}),
      ...(this.appliedCount > 0 ? { applied: this.appliedCount } : {}),
    };
  }

  // ---- reading ----

  get current(): ReviewCandidate | null {
    return this.currentId === null ? null : (this.entries.get(this.currentId)?.candidate ?? null);
  }

  get currentStatus(): CandidateStatus | null {
    return this.currentId === null ? null : (this.entries.get(this.currentId)?.status ?? null);
  }

  /** Open candidates in review order (fewest skips, then largest, then id), then the closed ones in creation order. */
  queue(): QueueItem[] {
    const all = [...this.entries.values()];
    const open = all
      .filter((e) => e.status === 'open')
      .sort(
        (a, b) =>
          a.skips - b.skips || b.candidate.members.length - a.candidate.members.length || compareText(a.candidate.id, b.candidate.id),
      );
    const closed = all.filter((e) => e.status !== 'open').sort((a, b) => a.sequence - b.sequence);
    return [...open, ...closed].map(({ candidate, status, skips }) => ({ candidate, status, skips }));
  }

  candidate(id: string): QueueItem | undefined {
    const entry = this.entries.get(id);
    return entry && { candidate: entry.candidate, status: entry.status, skips: entry.skips };
  }

  /** Decisions not applied yet (the ones export and apply take). */
  pendingDecisions(): readonly Decision[] {
    return this.decisions.slice(this.appliedCount);
  }

  /** Decisions already in the label files, in the order they were made. */
  appliedDecisions(): readonly Decision[] {
    return this.decisions.slice(0, this.appliedCount);
  }

  /** Whether an applied decision closed this candidate (named, merged, dismissed, split…). */
  isApplied(candidateId: string): boolean {
    if (this.entries.get(candidateId)?.status === 'open') return false;
    return this.appliedDecisions().some((d) => decidedCandidateIds(d).includes(candidateId));
  }

  /** The pending decisions were applied: they stay (their candidates stay closed) but are no longer pending or undoable. */
  markApplied(): void {
    this.appliedCount = this.decisions.length;
    this.redoStack = [];
  }

  get canUndo(): boolean {
    return this.decisions.length > this.appliedCount;
  }

  get canRedo(): boolean {
    return this.redoStack.length > 0;
  }

  /** Known classes (merged ones marked), then classes created by pending decisions. */
  classes(): ClassEntry[] {
    const known: ClassEntry[] = this.context.classNames.map((name) => ({
      name,
      status: this.mergedClasses.has(name) ? 'merged' : 'known',
    }));
    return [...known, ...this.pendingClasses.map(({ name, description }) => ({ name, status: 'pending' as const, description }))];
  }

  /** Class a pending decision gives a node, if any. */
  pendingLabelOf(node: number): string | undefined {
    return this.pendingLabels.get(node);
  }

  /** Global index of a node id, undefined for an id the dataset lacks. */
  nodeIndexOf(id: string): number | undefined {
    return this.indexOfId.get(id);
  }

  /** Doubtful labels and label-next suggestions to go through; not part of the decision history. */
  get secondLookQueues(): SecondLookQueues | null {
    return this.secondLook;
  }

  /** Replaces the second-look queues (a new computation); the pending decisions stay as they are. */
  setSecondLook(queues: SecondLookQueues | null): void {
    const problem = queues === null ? null : secondLookQueuesProblem(queues);
    if (problem) throw new ReviewError(`second-look queues ${problem}`);
    this.secondLook = queues === null ? null : cloneQueues(queues);
  }

  // ---- navigation ----

  select(candidateId: string): void {
    if (!this.entries.has(candidateId)) throw new ReviewError(`no candidate "${candidateId}" in this review`);
    this.currentId = candidateId;
  }

  /** Moves to the next (or previous) open candidate in queue order, wrapping around. */
  step(direction: 1 | -1): void {
    const open = this.openIds();
    if (open.length === 0) return;
    const at = this.currentId === null ? -1 : open.indexOf(this.currentId);
    if (at < 0) this.currentId = open[direction === 1 ? 0 : open.length - 1];
    else this.currentId = open[(at + direction + open.length) % open.length];
  }

  // ---- deciding ----

  /** Records a decision made in the panel; throws ReviewError (state unchanged) when it does not fit. */
  decide(request: DecisionRequest): Decision {
    const decision = this.complete(request);
    const before = this.currentId;
    this.apply(decision);
    this.decisions.push(decision);
    this.currentBefore.push(before);
    this.redoStack = [];
    return decision;
  }

  undo(): Decision | null {
    if (this.decisions.length <= this.appliedCount) return null;
    const decision = this.decisions.pop();
    if (!decision) return null;
    const before = this.currentBefore.pop() ?? null;
    this.redoStack.push({ decision, currentBefore: before });
    this.reset();
    for (const d of this.decisions) this.apply(d);
    this.currentId = before !== null && this.isOpen(before) ? before : (this.openIds()[0] ?? null);
    return decision;
  }

  redo(): Decision | null {
    const next = this.redoStack.pop();
    if (!next) return null;
    this.currentId = next.currentBefore !== null && this.entries.has(next.currentBefore) ? next.currentBefore : this.currentId;
    this.apply(next.decision);
    this.decisions.push(next.decision);
    this.currentBefore.push(next.currentBefore);
    return next.decision;
  }

  exportDecisions(): DecisionsFile {
    return {
      format: 'graph-curator-decisions',
      version: 1,
      dataset: this.context.dataset,
      runId: this.context.runId,
      settingsHash: this.context.settingsHash,
      slice: this.context.slice,
      baseHashes: { ...this.context.baseHashes },
      decisions: this.pendingDecisions().map(cloneDecision),
    };
  }

  // ---- internals ----

  private reset(): void {
    this.entries = new Map();
    this.sequence = 0;
    this.pendingClasses = [];
    this.mergedClasses = new Set();
    this.pendingLabels = new Map();
    for (const candidate of this.initialCandidates) {
      if (this.entries.has(candidate.id)) throw new ReviewError(`two candidates share the id "${candidate.id}"`);
      this.addEntry(candidate);
    }
  }

  private addEntry(candidate: ReviewCandidate): void {
    this.entries.set(candidate.id, { candidate, status: 'open', skips: 0, sequence: this.sequence++ });
  }

  private openIds(): string[] {
    return this.queue()
      .filter((item) => item.status === 'open')
      .map((item) => item.candidate.id);
  }

  private isOpen(id: string): boolean {
    return this.entries.get(id)?.status === 'open';
  }

  private openEntry(id: string): Entry {
    const entry = this.entries.get(id);
    if (!entry) throw new ReviewError(`no candidate "${id}" in this review`);
    if (entry.status !== 'open') throw new ReviewError(`candidate "${id}" is already decided (${entry.status})`);
    return entry;
  }

  private nodeOf(id: string): number {
    const node = this.indexOfId.get(id);
    if (node === undefined) throw new ReviewError(`no node "${id}" in dataset ${this.context.dataset}`);
    return node;
  }

  private classExists(name: string): boolean {
    return this.context.classNames.includes(name) || this.pendingClasses.some((c) => c.name === name);
  }

  private checkTargetClass(name: string): void {
    if (!this.classExists(name)) throw new ReviewError(`no class "${name}": name it as a new class first`);
    if (this.mergedClasses.has(name)) throw new ReviewError(`class "${name}" is merged into another by a pending decision`);
  }

  private nextDecisionId(): string {
    const taken = new Set(this.decisions.map((d) => d.id));
    let n = this.decisions.length + 1;
    while (taken.has(`d-${String(n).padStart(4, '0')}`)) n++;
    return `d-${String(n).padStart(4, '0')}`;
  }

  private memberIds(members: Int32Array): string[] {
    return Array.from(members, (node) => this.context.nodeIds[node]);
  }

  /** Fills in what the panel does not choose: id, time, members of whole candidates, split parts. */
  private complete(request: DecisionRequest): Decision {
    const base = { id: this.nextDecisionId(), madeAt: this.clock().toISOString(), ...(request.note ? { note: request.note } : {}) };
    switch (request.kind) {
      case 'name-new-class':
        return {
          ...base,
          kind: request.kind,
          candidateId: request.candidateId,
          members: this.memberIds(this.openEntry(request.candidateId).candidate.members),
          className: request.className.trim(),
          description: request.description.trim(),
        };
      case 'merge-into-class':
        return {
          ...base,
          kind: request.kind,
          candidateId: request.candidateId,
          members: this.memberIds(this.openEntry(request.candidateId).candidate.members),
          className: request.className,
        };
      case 'move-members': {
        const description = request.description?.trim();
        return {
          ...base,
          kind: request.kind,
          members: [...request.members],
          className: request.className.trim(),
          ...(description ? { description } : {}),
        };
      }
      case 'merge-classes':
        return { ...base, kind: request.kind, from: request.from, into: request.into };
      case 'merge-candidates': {
        for (const id of request.candidateIds) this.openEntry(id);
        let resultId = request.candidateIds.join('+');
        for (let k = 2; this.entries.has(resultId); k++) resultId = `${request.candidateIds.join('+')}~${k}`;
        return { ...base, kind: request.kind, candidateIds: [...request.candidateIds], resultId };
      }
      case 'split-candidate': {
        const entry = this.openEntry(request.candidateId);
        const parts = splitMembers(this.context, request.candidateId, entry.candidate.members, request.parts ?? defaultSplitParts);
        if (parts.length < 2) throw new ReviewError(`candidate "${request.candidateId}" does not split: its members' embeddings coincide`);
        return { ...base, kind: request.kind, candidateId: request.candidateId, parts: parts.map((p) => this.memberIds(p)) };
      }
      case 'dismiss':
      case 'skip':
        return { ...base, kind: request.kind, candidateId: request.candidateId };
      case 'keep-label':
        return { ...base, kind: request.kind, node: request.node };
    }
  }

  /** Checks a decision against the state, then applies it; on failure nothing has changed. */
  private apply(decision: Decision): void {
    const current = this.currentId;
    const openBefore = this.openIds();
    switch (decision.kind) {
      case 'name-new-class': {
        const entry = this.openEntry(decision.candidateId);
        // An applied decision made the class: it is in the label files (and the context) now.
        const madeByApplied = this.replayingApplied && this.context.classNames.includes(decision.className);
        if (this.classExists(decision.className) && !madeByApplied)
          throw new ReviewError(`class "${decision.className}" exists already: merge into it instead`);
        this.checkSameMembers(entry, decision.members);
        if (!madeByApplied) this.pendingClasses.push({ name: decision.className, description: decision.description });
        this.labelNodes(entry.candidate.members, decision.className);
        entry.status = 'named';
        break;
      }
      case 'merge-into-class': {
        const entry = this.openEntry(decision.candidateId);
        this.checkTargetClass(decision.className);
        this.checkSameMembers(entry, decision.members);
        this.labelNodes(entry.candidate.members, decision.className);
        entry.status = 'merged-into-class';
        break;
      }
      case 'move-members': {
        const nodes = decision.members.map((id) => this.nodeOf(id));
        const isNew = !this.classExists(decision.className);
        if (isNew && decision.description === undefined)
          throw new ReviewError(`no class "${decision.className}": give a description to create it`);
        if (!isNew && decision.description !== undefined && !this.replayingApplied)
          throw new ReviewError(`class "${decision.className}" exists already: leave the description empty to move into it`);
        if (!isNew) this.checkTargetClass(decision.className);
        if (isNew) this.pendingClasses.push({ name: decision.className, description: decision.description ?? '' });
        this.labelNodes(nodes, decision.className);
        this.removeFromCandidates(new Set(nodes));
        break;
      }
      case 'merge-classes': {
        if (decision.from === decision.into) throw new ReviewError(`cannot merge class "${decision.from}" into itself`);
        this.checkTargetClass(decision.from);
        this.checkTargetClass(decision.into);
        this.mergedClasses.add(decision.from);
        for (const [node, name] of this.pendingLabels) if (name === decision.from) this.pendingLabels.set(node, decision.into);
        break;
      }
      case 'merge-candidates': {
        if (new Set(decision.candidateIds).size !== decision.candidateIds.length) throw new ReviewError('merge lists a candidate twice');
        const sources = decision.candidateIds.map((id) => this.openEntry(id));
        if (this.entries.has(decision.resultId)) throw new ReviewError(`a candidate "${decision.resultId}" exists already`);
        const members = new Set<number>();
        for (const entry of sources) for (const node of entry.candidate.members) members.add(node);
        for (const entry of sources) entry.status = 'merged';
        this.addEntry(summariseMembers(this.context, decision.resultId, [...members]));
        this.currentId = decision.resultId;
        return;
      }
      case 'split-candidate': {
        const entry = this.openEntry(decision.candidateId);
        const parts = decision.parts.map((part) => part.map((id) => this.nodeOf(id)));
        const covered = new Set<number>();
        for (const part of parts) for (const node of part) covered.add(node);
        const total = parts.reduce((sum, part) => sum + part.length, 0);
        if (
          total !== covered.size ||
          covered.size !== entry.candidate.members.length ||
          !Array.from(entry.candidate.members).every((node) => covered.has(node))
        ) {
          throw new ReviewError(
            `split of "${decision.candidateId}" does not divide its ${entry.candidate.members.length} members into disjoint parts`,
          );
        }
        const ids = parts.map((_, k) => `${decision.candidateId}.${k + 1}`);
        for (const id of ids) if (this.entries.has(id)) throw new ReviewError(`a candidate "${id}" exists already`);
        entry.status = 'split';
        parts.forEach((part, k) => this.addEntry(summariseMembers(this.context, ids[k], part)));
        this.currentId = ids[0];
        return;
      }
      case 'dismiss':
        this.openEntry(decision.candidateId).status = 'dismissed';
        break;
      case 'skip':
        this.openEntry(decision.candidateId).skips++;
        if (current === decision.candidateId) this.currentId = this.following(openBefore, decision.candidateId);
        return;
      case 'keep-label': {
        const given = this.pendingLabels.get(this.nodeOf(decision.node));
        // Keeping a label a pending decision replaces would record two opposite intentions.
        if (given !== undefined)
          throw new ReviewError(`node "${decision.node}" is given "${given}" by a pending decision: undo that decision to keep its label`);
        return;
      }
    }
    if (current !== null && !this.isOpen(current)) this.currentId = this.following(openBefore, current);
  }

  /** The first open candidate after `id` in an earlier queue order, else the first open one. */
  private following(openBefore: string[], id: string): string | null {
    const at = openBefore.indexOf(id);
    for (let k = 1; k < openBefore.length; k++) {
      const candidate = openBefore[(at + k) % openBefore.length];
      if (candidate !== id && this.isOpen(candidate)) return candidate;
    }
    return this.openIds().find((open) => open !== id) ?? (this.isOpen(id) ? id : null);
  }

  private checkSameMembers(entry: Entry, members: string[]): void {
    const expected = this.memberIds(entry.candidate.members);
    const given = new Set(members);
    if (given.size !== expected.length || !expected.every((id) => given.has(id))) {
      throw new ReviewError(
        `decision lists ${members.length} member(s) but candidate "${entry.candidate.id}" has ${expected.length} others`,
      );
    }
  }

  private labelNodes(nodes: ArrayLike<number>, className: string): void {
    for (let i = 0; i < nodes.length; i++) this.pendingLabels.set(nodes[i], className);
  }

  /** Moved members leave every open candidate; a candidate left empty is closed. */
  private removeFromCandidates(moved: Set<number>): void {
    for (const entry of this.entries.values()) {
      if (entry.status !== 'open') continue;
      const members = entry.candidate.members;
      if (!members.some((node) => moved.has(node))) continue;
      const kept = members.filter((node) => !moved.has(node));
      if (kept.length === 0) entry.status = 'emptied';
      else entry.candidate = summariseMembers(this.context, entry.candidate.id, kept);
    }
  }
}

/** Candidates a decision closes or takes apart. */
function decidedCandidateIds(decision: Decision): string[] {
  if ('candidateIds' in decision) return decision.candidateIds;
  if ('candidateId' in decision && decision.kind !== 'skip') return [decision.candidateId];
  return [];
}

function cloneDecision(decision: Decision): Decision {
  return JSON.parse(JSON.stringify(decision)) as Decision;
}

function checkSessionJson(json: unknown, context: ReviewContext): ReviewSessionJson {
  const fail = (why: string) => new ReviewError(`saved review session ${why}`);
  if (typeof json !== 'object' || json === null) throw fail('is not a JSON object');
  const saved = json as Partial<ReviewSessionJson>;
  if (saved.format !== reviewSessionFormat) throw fail(`has format ${JSON.stringify(saved.format)}, expected "${reviewSessionFormat}"`);
  if (saved.version !== reviewSessionVersion)
    throw fail(`has version ${JSON.stringify(saved.version)}; this version reads ${reviewSessionVersion}`);
  if (saved.dataset !== context.dataset) throw fail(`is for dataset "${String(saved.dataset)}", not "${context.dataset}"`);
  if (saved.runId !== context.runId) throw fail(`is for run ${String(saved.runId)}, not ${String(context.runId)}`);
  if (saved.slice !== context.slice) throw fail(`is for slice ${String(saved.slice)}, not ${context.slice}`);
  if (!Array.isArray(saved.decisions) || !Array.isArray(saved.currentBefore) || !Array.isArray(saved.redo))
    throw fail('lacks its decisions, currentBefore or redo lists');
  if (saved.currentBefore.length !== saved.decisions.length)
    throw fail(`has ${saved.currentBefore.length} currentBefore entries for ${saved.decisions.length} decisions`);
  saved.decisions.forEach((decision, k) => {
    const problem = decisionProblem(decision);
    if (problem) throw fail(`decision ${k + 1} ${problem}`);
  });
  saved.redo.forEach((entry, k) => {
    const problem = decisionProblem((entry as { decision?: unknown } | null)?.decision);
    if (problem) throw fail(`redo entry ${k + 1} ${problem}`);
  });
  if (saved.currentCandidateId !== null && typeof saved.currentCandidateId !== 'string')
    throw fail('has a current candidate id that is not text');
  if (saved.secondLook !== undefined) {
    const problem = secondLookQueuesProblem(saved.secondLook);
    if (problem) throw fail(`has damaged second-look queues: they ${problem}`);
  }
  if (saved.applied !== undefined && (!Number.isInteger(saved.applied) || saved.applied < 0 || saved.applied > saved.decisions.length))
    throw fail(`says ${JSON.stringify(saved.applied)} decisions are applied, of ${saved.decisions.length}`);
  return saved as ReviewSessionJson;
}
