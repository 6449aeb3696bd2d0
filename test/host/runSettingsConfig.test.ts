// The graphCurator.* settings as the Score Slice command reads them.
import * as assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { defaultRunSettings } from '../../src/engine/pipeline/runSettings';
import {
  describeRunSettings,
  hostDefaultRunSettings,
  runSettingsFromConfiguration,
  settingKeys,
  type SettingKey,
} from '../../src/host/runSettingsConfig';
import { runSettingsProblem } from '../../src/protocol/worker';
import { projectRoot } from './fixtures/buildBundle';

interface ConfigurationProperty {
  default: unknown;
  enum?: unknown[];
  minimum?: number;
  maximum?: number;
}

const manifest = JSON.parse(readFileSync(path.join(projectRoot, 'package.json'), 'utf8')) as {
  contributes: { configuration: { properties: Record<string, ConfigurationProperty> } };
};
const contributed = manifest.contributes.configuration.properties;

const from = (values: Partial<Record<SettingKey, unknown>>) => runSettingsFromConfiguration((key) => values[key]);

describe('run settings from the VS Code configuration', () => {
  it("repeats the engine's defaults exactly (the host may not load engine code)", () => {
    assert.deepEqual(hostDefaultRunSettings, defaultRunSettings);
  });

  it('contributes one setting per mapped key, each defaulting to the engine default', () => {
    const names = Object.keys(contributed).map((name) => name.replace(/^graphCurator\./, ''));
    assert.deepEqual(names.sort(), Object.keys(settingKeys).sort());
    for (const key of Object.keys(settingKeys) as SettingKey[]) {
      assert.deepEqual(contributed[`graphCurator.${key}`].default, defaultRunSettings[settingKeys[key]], key);
    }
    assert.deepEqual([...(contributed['graphCurator.model'].enum ?? [])].sort(), ['gcn', 'mlp', 'sage', 'sign']);
    assert.deepEqual(contributed['graphCurator.noveltyMethod'].enum, ['doc', 'msp', 'energy']);
  });

  it('the contributed defaults, read back as VS Code hands them over, give the engine defaults and no problems', () => {
    const read = runSettingsFromConfiguration((key) => contributed[`graphCurator.${key}`].default);
    assert.deepEqual(read, { settings: defaultRunSettings, problems: [] });
  });

  it('maps each setting onto its RunSettings field', () => {
    const { settings, problems } = from({
      model: 'gcn',
      historyWindow: 'all',
      alpha: 2.5,
      thresholdFolds: 0,
      smoothingWeight: 0.2,
      smoothingRounds: 4,
      seed: 11,
      noveltyMethod: 'energy',
      epochs: 50,
    });
    assert.deepEqual(problems, []);
    assert.deepEqual(settings, {
      ...defaultRunSettings,
      model: 'gcn',
      historyWindow: 'all',
      alpha: 2.5,
      thresholdFolds: 0,
      smoothingWeight: 0.2,
      smoothingRounds: 4,
      seed: 11,
      noveltyMethod: 'energy',
      epochs: 50,
    });
    // msp and energy keep rejectQuantile null: the engine rejects its default fraction, as the CLI does.
    assert.equal(settings.rejectQuantile, null);
    assert.equal(runSettingsProblem(settings), null, 'the worker accepts what the host sends');
  });

  it('takes a history window typed as text in the settings editor', () => {
    assert.equal(from({ historyWindow: '6' }).settings.historyWindow, 6);
  });

  it('reports a wrong value by name and keeps the default for it', () => {
    const { settings, problems } = from({
      alpha: -1,
      thresholdFolds: 1,
      smoothingWeight: 2,
      model: 'transformer',
      epochs: 2.5,
      historyWindow: 'recent',
      seed: 'x',
    });
    assert.deepEqual(settings, defaultRunSettings);
    assert.equal(problems.length, 7);
    for (const key of ['alpha', 'thresholdFolds', 'smoothingWeight', 'model', 'epochs', 'historyWindow', 'seed']) {
      assert.ok(
        problems.some((p) => p.startsWith(`graphCurator.${key} must be`)),
        key,
      );
    }
    assert.match(
      problems.find((p) => p.startsWith('graphCurator.thresholdFolds'))!,
      /0 or a whole number ≥ 2, got 1; using 3$/,
    );
  });

  it('describes the settings in one line', () => {
    assert.equal(describeRunSettings(defaultRunSettings), 'sign, history 4, α 3, λ 0.5 × 2, doc, 200 epochs, seed 7');
  });
});
