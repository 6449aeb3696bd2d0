// The `graphCurator.*` settings → the engine's RunSettings. vscode-free: the caller passes a
// getter over the configuration section, so the mapping is tested without VS Code. A value of the
// wrong type or out of range is reported and replaced by the default, never passed to the engine.
import type { NoveltyMethod, RunSettings } from '../engine/pipeline/runSettings';
import type { ModelKind } from '../engine/models/types';

/** The engine's defaults (src/engine/pipeline/runSettings.ts), repeated because the host may not load engine code; a test keeps them equal. */
export const hostDefaultRunSettings: RunSettings = {
  model: 'sign',
  historyWindow: 4,
  alpha: 3,
  thresholdFolds: 3,
  thresholdScale: 'mad',
  smoothingWeight: 0.5,
  smoothingRounds: 2,
  noveltyMethod: 'doc',
  rejectQuantile: null,
  temperature: 1,
  labelRate: 1,
  warmStart: false,
  epochs: 200,
  batchRows: 8192,
  hiddenUnits: 64,
  learningRate: 0.01,
  seed: 7,
};

/** Setting key (after "graphCurator.") → the RunSettings field it sets. */
export const settingKeys = {
  model: 'model',
  historyWindow: 'historyWindow',
  alpha: 'alpha',
  thresholdFolds: 'thresholdFolds',
  smoothingWeight: 'smoothingWeight',
  smoothingRounds: 'smoothingRounds',
  seed: 'seed',
  noveltyMethod: 'noveltyMethod',
  epochs: 'epochs',
} as const satisfies Record<string, keyof RunSettings>;

export type SettingKey = keyof typeof settingKeys;

const models: readonly ModelKind[] = ['mlp', 'gcn', 'sage', 'sign'];
const noveltyMethods: readonly NoveltyMethod[] = ['doc', 'msp', 'energy'];
const isWhole = (v: unknown, min: number): v is number => typeof v === 'number' && Number.isInteger(v) && v >= min;
const isIn = (v: unknown, low: number, high: number): v is number => typeof v === 'number' && Number.isFinite(v) && v >= low && v <= high;

interface Rule {
  accepts(value: unknown): boolean;
  expectation: string;
  convert?(value: unknown): unknown;
}

const rules: { [K in SettingKey]: Rule } = {
  model: { accepts: (v) => models.includes(v as ModelKind), expectation: models.join(', ') },
  historyWindow: {
    // "all" or a whole number; the settings UI may hand a number as text.
    accepts: (v) => v === 'all' || isWhole(v, 0) || (typeof v === 'string' && /^\d+$/.test(v)),
    expectation: '"all" or a whole number ≥ 0',
    convert: (v) => (v === 'all' ? 'all' : Number(v)),
  },
  alpha: { accepts: (v) => isIn(v, 0, 100), expectation: 'a number in [0, 100]' },
  thresholdFolds: { accepts: (v) => v === 0 || isWhole(v, 2), expectation: '0 or a whole number ≥ 2' },
  smoothingWeight: { accepts: (v) => isIn(v, 0, 1), expectation: 'a number in [0, 1]' },
  smoothingRounds: { accepts: (v) => isWhole(v, 0), expectation: 'a whole number ≥ 0' },
  seed: { accepts: (v) => isWhole(v, Number.MIN_SAFE_INTEGER), expectation: 'a whole number' },
  noveltyMethod: { accepts: (v) => noveltyMethods.includes(v as NoveltyMethod), expectation: noveltyMethods.join(', ') },
  epochs: { accepts: (v) => isWhole(v, 1), expectation: 'a whole number ≥ 1' },
};

export interface SettingsRead {
  settings: RunSettings;
  /** One line per setting that was ignored, naming it and what it should be. */
  problems: string[];
}

/**
 * Reads the run settings. `get(key)` returns the configured value (VS Code gives the contributed
 * default when the user set none). Settings without a VS Code setting keep the engine's default,
 * so the same choices give the same settings hash as the CLI's flags.
 */
export function runSettingsFromConfiguration(
  get: (key: SettingKey) => unknown,
  defaults: RunSettings = hostDefaultRunSettings,
): SettingsRead {
  const settings: RunSettings = { ...defaults };
  const problems: string[] = [];
  for (const key of Object.keys(settingKeys) as SettingKey[]) {
    const value = get(key);
    if (value === undefined || value === null) continue;
    const rule = rules[key];
    if (!rule.accepts(value)) {
      problems.push(
        `graphCurator.${key} must be ${rule.expectation}, got ${JSON.stringify(value)}; using ${JSON.stringify(defaults[settingKeys[key]])}`,
      );
      continue;
    }
    (settings as unknown as Record<string, unknown>)[settingKeys[key]] = rule.convert ? rule.convert(value) : value;
  }
  return { settings, problems };
}

/** One line for a progress title or a log: the settings a curator tunes most. */
export function describeRunSettings(settings: RunSettings): string {
  const window = settings.historyWindow === 'all' ? 'all history' : `history ${settings.historyWindow}`;
  return `${settings.model}, ${window}, α ${settings.alpha}, λ ${settings.smoothingWeight} × ${settings.smoothingRounds}, ${settings.noveltyMethod}, ${settings.epochs} epochs, seed ${settings.seed}`;
}
