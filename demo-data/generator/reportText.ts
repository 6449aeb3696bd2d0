// The title and text of one report: templates filled with the failure mode's words, shared
// maintenance words and remarks. Novel modes borrow many words from the known modes they
// resemble, and every report sometimes uses another mode's word, so text alone is not enough
// to tell the modes apart.
import type { SeededRandom } from '../../src/engine/util/random';
import { DRIFTING_MODE, FAILURE_MODES, SHARED_WORDS, driftProgress, type FailureVocabulary } from './scenario';

export interface ReportText {
  title: string;
  text: string;
}

/** Chance that one informative word comes from a random other known mode. */
const CROSS_TALK = 0.1;
/**
 * Chance that a report dwells on a misleading symptom (a converter trip caused by an overheating
 * generator, say): most of its informative words then come from that one other mode. Only the
 * reports it is linked to give such a report away.
 */
const MISLEADING_REPORT = 0.2;
const MISLEADING_WORD = 0.7;
/** Where a novel mode's informative words come from: its own, the primary look-alike, the secondary. */
const NOVEL_WORD_SOURCES = [0.45, 0.35, 0.2];

const modeIndex = new Map(FAILURE_MODES.map((mode, m) => [mode.name, m]));
const knownModes = FAILURE_MODES.flatMap((mode, m) => (mode.novel ? [] : [m]));

function pick<T>(items: readonly T[], random: SeededRandom): T {
  return items[random.int(items.length)];
}

function capitalise(phrase: string): string {
  return phrase.charAt(0).toUpperCase() + phrase.slice(1);
}

/** The wording of a known mode in a given quarter (the drifting mode shifts its words). */
function knownVocabulary(m: number, slice: number, random: SeededRandom): FailureVocabulary {
  const mode = FAILURE_MODES[m];
  if (mode.name === DRIFTING_MODE && mode.laterVocabulary && random.next() < driftProgress(slice)) return mode.laterVocabulary;
  return mode.vocabulary;
}

/** Vocabulary for one informative word of a report of mode m (misleadingMode: -1 when none). */
function vocabularyFor(m: number, misleadingMode: number, slice: number, random: SeededRandom): FailureVocabulary {
  if (misleadingMode >= 0 && random.next() < MISLEADING_WORD) return knownVocabulary(misleadingMode, slice, random);
  if (random.next() < CROSS_TALK) {
    const others = knownModes.filter((k) => k !== m);
    return knownVocabulary(pick(others, random), slice, random);
  }
  const mode = FAILURE_MODES[m];
  if (!mode.novel || !mode.resembles) return knownVocabulary(m, slice, random);
  const source = random.weightedIndex(NOVEL_WORD_SOURCES);
  if (source === 0) return mode.vocabulary;
  const lookAlike = source === 1 ? mode.resembles.primary : mode.resembles.secondary;
  return knownVocabulary(modeIndex.get(lookAlike)!, slice, random);
}

function fillNumber(phrase: string, random: SeededRandom): string {
  if (!phrase.includes('{n}')) return phrase;
  const value = phrase.includes('°C') ? 85 + random.int(60) : 2 + random.int(28);
  return phrase.replace('{n}', String(value));
}

function informativeSentence(m: number, misleadingMode: number, slice: number, turbineName: string, random: SeededRandom): string {
  const component = pick(vocabularyFor(m, misleadingMode, slice, random).components, random);
  const finding = fillNumber(pick(vocabularyFor(m, misleadingMode, slice, random).findings, random), random);
  const action = pick(vocabularyFor(m, misleadingMode, slice, random).actions, random);
  switch (random.int(5)) {
    case 0:
      return `${capitalise(finding)} found on the ${component}.`;
    case 1:
      return `${capitalise(pick(SHARED_WORDS.crews, random))} reported ${finding} at the ${component} during ${pick(SHARED_WORDS.visits, random)}.`;
    case 2:
      return `SCADA alarm: ${finding}; ${action}.`;
    case 3:
      return `${capitalise(action)} after ${finding} on the ${component}.`;
    default:
      return `Follow-up visit to ${turbineName}: ${finding} ${pick(SHARED_WORDS.trends, random)}, ${action}.`;
  }
}

function remarkSentence(random: SeededRandom): string {
  switch (random.int(3)) {
    case 0:
      return `Weather ${pick(SHARED_WORDS.weather, random)}, ${pick(SHARED_WORDS.access, random)}.`;
    case 1:
      return `Technician note: "${pick(SHARED_WORDS.remarks, random)}".`;
    default:
      return `Work order ${10000 + random.int(90000)} closed, ${pick(SHARED_WORDS.remarks, random)}.`;
  }
}

export function writeReportText(m: number, slice: number, turbineName: string, random: SeededRandom): ReportText {
  const misleadingMode =
    random.next() < MISLEADING_REPORT
      ? pick(
          knownModes.filter((k) => k !== m),
          random,
        )
      : -1;
  const heading =
    random.next() < 0.2 ? pick(SHARED_WORDS.genericTitles, random) : pick(vocabularyFor(m, misleadingMode, slice, random).titles, random);
  const sentences = [informativeSentence(m, misleadingMode, slice, turbineName, random)];
  const sentenceCount = 1 + random.int(3);
  if (sentenceCount >= 2)
    sentences.push(random.next() < 0.6 ? informativeSentence(m, misleadingMode, slice, turbineName, random) : remarkSentence(random));
  if (sentenceCount === 3) sentences.push(remarkSentence(random));
  return { title: `${heading}, ${turbineName}`, text: sentences.join(' ') };
}
