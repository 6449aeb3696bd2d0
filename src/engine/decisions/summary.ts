// Human-readable accounts of an apply plan: the summary the CLI prints before writing, and the
// commit message for the label files.
import type { ApplyPlan, ClassCount } from './plan';

function plural(n: number, word: string, many = `${word}s`): string {
  return `${n} ${n === 1 ? word : many}`;
}

function signed(n: number): string {
  return n > 0 ? `+${n}` : n < 0 ? `−${-n}` : '±0';
}

/** Classes whose count changes, or that are added or merged. */
function touchedCounts(plan: ApplyPlan): ClassCount[] {
  const merged = new Set(plan.classesMerged.map((m) => m.from));
  return plan.counts.filter((c) => c.before !== c.after || c.added || merged.has(c.name));
}

export function formatPlanSummary(plan: ApplyPlan): string {
  const lines: string[] = [];
  const labelling = plan.outcomes.filter((o) => !o.reviewOnly).length;
  const reviewOnly = Object.entries(plan.reviewOnly).map(([kind, n]) => `${n} ${kind}`);
  lines.push(
    `Decisions: ${plan.outcomes.length} from ${plan.source} (${labelling} labelling${reviewOnly.length ? `; review-only, no label change: ${reviewOnly.join(', ')}` : ''})`,
  );
  const alreadyLabelled = plan.outcomes.reduce((sum, o) => sum + o.alreadyLabelled, 0);
  lines.push(
    `Nodes changed: ${plan.changes.length}${alreadyLabelled ? ` (${plural(alreadyLabelled, 'member')} already had the label)` : ''}`,
  );
  for (const c of plan.classesAdded)
    lines.push(`New class: ${c.name} (introduced in ${c.introducedIn})${c.description ? ` — ${c.description}` : ''}`);
  for (const m of plan.classesMerged) lines.push(`Merged class: ${m.from} → ${m.into}`);
  lines.push('', 'Labels per class (before → after):');
  const width = Math.max(...plan.counts.map((c) => c.name.length), 5);
  for (const c of plan.counts) {
    const note = c.added ? ' (new)' : c.status === 'merged' ? ' (merged)' : c.status === 'unregistered' ? ' (not in classes.json)' : '';
    const change = c.after !== c.before ? `  ${signed(c.after - c.before)}` : '';
    lines.push(`  ${c.name.padEnd(width)}  ${String(c.before).padStart(6)} → ${String(c.after).padStart(6)}${change}${note}`);
  }
  const total = (key: 'before' | 'after'): number => plan.counts.reduce((sum, c) => sum + c[key], 0);
  lines.push(`  ${'total'.padEnd(width)}  ${String(total('before')).padStart(6)} → ${String(total('after')).padStart(6)}`);
  if (!plan.hasChanges) lines.push('', 'Nothing to change: every decision is already in the label files.');
  return lines.join('\n') + '\n';
}

/** First line at most this long (the usual limit for a commit subject). */
const SUBJECT_LIMIT = 72;

export function labelCommitMessage(plan: ApplyPlan, batch: string | null = null): string {
  const parts: string[] = [];
  if (plan.classesAdded.length > 0)
    parts.push(`+${plural(plan.classesAdded.length, 'class', 'classes')} (${plan.classesAdded.map((c) => c.name).join(', ')})`);
  if (plan.classesMerged.length > 0)
    parts.push(`${plan.classesMerged.length} merged (${plan.classesMerged.map((m) => `${m.from} → ${m.into}`).join(', ')})`);
  parts.push(`${plural(plan.changes.length, 'node')} changed`);
  let subject = `Labels: ${parts.join(', ')}`;
  if (subject.length > SUBJECT_LIMIT) {
    const short = [
      plan.classesAdded.length ? `+${plural(plan.classesAdded.length, 'class', 'classes')}` : '',
      plan.classesMerged.length ? `${plan.classesMerged.length} merged` : '',
      `${plural(plan.changes.length, 'node')} changed`,
    ].filter(Boolean);
    subject = `Labels: ${short.join(', ')}`;
  }
  const body: string[] = [];
  if (plan.classesAdded.length > 0) {
    body.push(`Classes added (introduced in ${plan.decisions.slice}):`);
    for (const c of plan.classesAdded) body.push(`  ${c.name}${c.description ? `: ${c.description}` : ''}`);
  }
  if (plan.classesMerged.length > 0) {
    body.push('Classes merged:');
    for (const m of plan.classesMerged) body.push(`  ${m.from} → ${m.into}`);
  }
  const touched = touchedCounts(plan);
  if (touched.length > 0) {
    body.push('Nodes per class (before → after):');
    for (const c of touched) body.push(`  ${c.name}: ${c.before} → ${c.after} (${signed(c.after - c.before)})`);
  }
  body.push(`Decisions: ${plan.source} (${plural(plan.outcomes.length, 'decision')})`);
  body.push(`Run: ${plan.decisions.runId ?? 'none'}`);
  body.push(`Settings hash: ${plan.decisions.settingsHash ?? 'none'}`);
  if (batch) body.push(`Label log batch: ${batch}`);
  return `${subject}\n\n${body.join('\n')}\n`;
}
