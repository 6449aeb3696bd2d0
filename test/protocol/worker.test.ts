import * as assert from 'node:assert/strict';
import { defaultRunSettings } from '../../src/engine/pipeline/runSettings';
import {
  runSettingsProblem,
  isCancelMessage,
  isEngineRequest,
  isErrorMessage,
  isHostToWorkerMessage,
  isLocatedProblem,
  isProgressMessage,
  isResultMessage,
  isWorkerToHostMessage,
  requestTypes,
} from '../../src/protocol/worker';

const problem = { file: 'nodes.csv', line: 4, column: 1, message: 'duplicate node id "a"' };

describe('protocol/worker guards', () => {
  it('lists exactly the request kinds the worker serves', () => {
    assert.deepEqual([...requestTypes].sort(), [
      'applyPlan',
      'closeReview',
      'commitLabels',
      'exportDecisions',
      'openReview',
      'overview',
      'planApply',
      'report',
      'reviewDecisions',
      'reviewMessage',
      'score',
      'secondLook',
      'summary',
      'validate',
    ]);
  });

  it('accepts well-formed requests and the cancel message', () => {
    const good = [
      { type: 'validate', id: 1, params: { folder: '/data/wind-farm' } },
      { type: 'summary', id: 2, params: { folder: 'relative/folder' } },
    ];
    for (const message of good) {
      assert.equal(isEngineRequest(message), true, JSON.stringify(message));
      assert.equal(isHostToWorkerMessage(message), true, JSON.stringify(message));
    }
    assert.equal(isCancelMessage({ type: 'cancel', id: 7 }), true);
    assert.equal(isHostToWorkerMessage({ type: 'cancel', id: 7 }), true);
  });

  it('rejects malformed host-to-worker messages', () => {
    const bad: unknown[] = [
      null,
      undefined,
      'validate',
      42,
      [],
      {},
      { type: 'validate', params: { folder: '/x' } }, // no id
      { type: 'validate', id: -1, params: { folder: '/x' } },
      { type: 'validate', id: 1.5, params: { folder: '/x' } },
      { type: 'validate', id: '1', params: { folder: '/x' } },
      { type: 'validate', id: Number.NaN, params: { folder: '/x' } },
      { type: 'validate', id: 1 }, // no params
      { type: 'validate', id: 1, params: {} },
      { type: 'validate', id: 1, params: { folder: '' } },
      { type: 'validate', id: 1, params: { folder: 3 } },
      { type: 'summary', id: 1, params: [] },
      { type: 'train', id: 1, params: { folder: '/x' } }, // unknown kind
      { type: 'toString', id: 1, params: { folder: '/x' } }, // inherited property names are not kinds
      { type: 'cancel' },
      { type: 'cancel', id: 'x' },
    ];
    for (const message of bad) {
      assert.equal(isHostToWorkerMessage(message), false, JSON.stringify(message));
    }
  });

  it('accepts well-formed worker-to-host messages', () => {
    const good = [
      { type: 'progress', id: 1, stage: 'load', fraction: 0 },
      { type: 'progress', id: 1, stage: 'load', fraction: 1 },
      { type: 'result', id: 1, request: 'validate', value: [] },
      { type: 'result', id: 1, request: 'validate', value: [problem, { ...problem, line: 0, column: 0 }] },
      { type: 'result', id: 2, request: 'summary', value: { nodeCount: 34 } },
      { type: 'error', id: 3, error: { kind: 'dataset', message: 'bad', problems: [problem] } },
      { type: 'error', id: 3, error: { kind: 'cancelled', message: 'cancelled' } },
      { type: 'error', id: 3, error: { kind: 'internal', message: 'boom', stack: 'Error: boom\n    at x' } },
      { type: 'error', id: 3, error: { kind: 'internal', message: 'boom' } },
    ];
    for (const message of good) assert.equal(isWorkerToHostMessage(message), true, JSON.stringify(message));
    assert.equal(isProgressMessage(good[0]), true);
    assert.equal(isResultMessage(good[2]), true);
    assert.equal(isErrorMessage(good[5]), true);
  });

  it('rejects malformed worker-to-host messages', () => {
    const bad: unknown[] = [
      { type: 'progress', id: 1, stage: 'load', fraction: 1.5 },
      { type: 'progress', id: 1, stage: 'load', fraction: -0.1 },
      { type: 'progress', id: 1, stage: 'load', fraction: Number.NaN },
      { type: 'progress', id: 1, fraction: 0.5 },
      { type: 'result', id: 1, value: [] }, // which request it answers is missing
      { type: 'result', id: 1, request: 'validate', value: {} },
      { type: 'result', id: 1, request: 'validate', value: [{ file: 'nodes.csv', line: 1, message: 'no column' }] },
      { type: 'result', id: 1, request: 'validate', value: [{ ...problem, line: -1 }] },
      { type: 'result', id: 1, request: 'validate', value: [{ ...problem, column: 2.5 }] },
      { type: 'result', id: 1, request: 'summary', value: null },
      { type: 'result', id: 1, request: 'summary', value: [1, 2] },
      { type: 'result', id: 1, request: 'score', value: {} },
      { type: 'error', id: 3, error: { kind: 'dataset', message: 'bad' } }, // dataset errors carry problems
      { type: 'error', id: 3, error: { kind: 'dataset', message: 'bad', problems: [{}] } },
      { type: 'error', id: 3, error: { kind: 'exploded', message: 'x' } },
      { type: 'error', id: 3, error: { kind: 'internal' } },
      { type: 'error', id: 3, error: { kind: 'internal', message: 'x', stack: 5 } },
      { type: 'error', error: { kind: 'cancelled', message: 'x' } },
      { type: 'validate', id: 1, params: { folder: '/x' } }, // a request is not a reply
    ];
    for (const message of bad) assert.equal(isWorkerToHostMessage(message), false, JSON.stringify(message));
  });

  it('checks located problems field by field', () => {
    assert.equal(isLocatedProblem(problem), true);
    assert.equal(isLocatedProblem({ ...problem, file: undefined }), false);
    assert.equal(isLocatedProblem({ ...problem, message: 3 }), false);
    assert.equal(isLocatedProblem([problem]), false);
  });

  it('checks score parameters, with every run setting in range', () => {
    const settings = { ...defaultRunSettings };
    assert.equal(runSettingsProblem(settings), null);
    assert.equal(isEngineRequest({ type: 'score', id: 4, params: { folder: '/d', settings } }), true);
    assert.equal(isEngineRequest({ type: 'score', id: 4, params: { folder: '/d', slice: '2024-Q3', settings, discover: false } }), true);
    assert.equal(
      isEngineRequest({ type: 'score', id: 4, params: { folder: '/d', settings: { ...settings, historyWindow: 'all' } } }),
      true,
    );
    const bad: [string, unknown][] = [
      ['model', 'transformer'],
      ['historyWindow', -1],
      ['historyWindow', 'some'],
      ['alpha', Number.NaN],
      ['thresholdFolds', 1],
      ['smoothingWeight', 1.5],
      ['smoothingRounds', 0.5],
      ['noveltyMethod', 'vibes'],
      ['rejectQuantile', 1],
      ['epochs', 0],
      ['seed', '7'],
      ['warmStart', 'yes'],
    ];
    for (const [key, value] of bad) {
      const wrong = { ...settings, [key]: value };
      assert.match(runSettingsProblem(wrong) ?? '', new RegExp(key), `${key}: ${String(value)}`);
      assert.equal(isEngineRequest({ type: 'score', id: 4, params: { folder: '/d', settings: wrong } }), false, `${key}: ${String(value)}`);
    }
    const { epochs: _dropped, ...missing } = settings;
    assert.match(runSettingsProblem(missing) ?? '', /epochs/);
    assert.equal(isEngineRequest({ type: 'score', id: 4, params: { folder: '/d', settings, slice: 3 } }), false);
  });

  it('accepts only run ids that stay inside runs/, and review ids that are request ids', () => {
    const open = (runId: string) => ({ type: 'openReview', id: 5, params: { folder: '/d', runId, persistPath: null } });
    assert.equal(isEngineRequest(open('2026-12-01T22-00-00-000Z-2024-Q3-a1b2c3')), true);
    for (const runId of ['../x', 'a/b', '', 'a\\b']) assert.equal(isEngineRequest(open(runId)), false, runId);
    assert.equal(isEngineRequest({ type: 'reviewMessage', id: 6, params: { reviewId: 2, message: { type: 'ready' } } }), true);
    assert.equal(isEngineRequest({ type: 'reviewMessage', id: 6, params: { reviewId: -2, message: {} } }), false);
    assert.equal(isEngineRequest({ type: 'reviewMessage', id: 6, params: { reviewId: 2 } }), false);
    assert.equal(isEngineRequest({ type: 'commitLabels', id: 7, params: { folder: '/d', message: '   ' } }), false);
  });

  it('carries a label-file conflict with the files it names', () => {
    assert.equal(
      isErrorMessage({ type: 'error', id: 8, error: { kind: 'conflict', message: 'labels.csv changed', files: ['labels.csv'] } }),
      true,
    );
    assert.equal(isErrorMessage({ type: 'error', id: 8, error: { kind: 'conflict', message: 'labels.csv changed' } }), false);
    assert.equal(
      isResultMessage({
        type: 'result',
        id: 9,
        request: 'commitLabels',
        value: { outcome: 'committed', commit: 'abc', root: '/r', files: ['labels.csv'] },
      }),
      true,
    );
    assert.equal(isResultMessage({ type: 'result', id: 9, request: 'commitLabels', value: { outcome: 'pushed' } }), false);
  });

  it('checks report parameters: settings in range, an optional truth file, quick, and a nonce fit for an HTML attribute', () => {
    const settings = { ...defaultRunSettings };
    const nonce = 'AbCdEfGh0123456789xyzXYZ98765432';
    const report = (params: Record<string, unknown>) => ({
      type: 'report',
      id: 10,
      params: { folder: '/d', settings, quick: true, nonce, ...params },
    });
    const good = [
      report({}),
      report({ truthFile: null }),
      report({ truthFile: '/d/truth.csv', quick: false }),
      report({ useCache: false }),
    ];
    for (const message of good) assert.equal(isEngineRequest(message), true, JSON.stringify(message));
    const bad = [
      report({ quick: undefined }),
      report({ quick: 'yes' }),
      report({ truthFile: '' }),
      report({ truthFile: 3 }),
      report({ nonce: undefined }),
      report({ nonce: 'short' }),
      report({ nonce: 'AbCdEfGh0123"><script>' }),
      report({ useCache: 1 }),
      report({ settings: { ...settings, epochs: 0 } }),
      report({ folder: '' }),
    ];
    for (const message of bad) assert.equal(isEngineRequest(message), false, JSON.stringify(message));
  });

  it('checks a report result: head, body and a summary with a whole slice count', () => {
    const summary = { dataset: 'wind-farm', slices: 3, fromCache: false, createdAt: '2026-12-01T00:00:00.000Z', computeSeconds: 1.5 };
    const result = (value: unknown) => ({ type: 'result', id: 11, request: 'report', value });
    assert.equal(isResultMessage(result({ head: '<style></style>', body: '<main></main>', summary })), true);
    assert.equal(isResultMessage(result({ head: '<style></style>', summary })), false);
    assert.equal(isResultMessage(result({ head: '<style></style>', body: '<main></main>' })), false);
    assert.equal(isResultMessage(result({ head: '', body: '', summary: { ...summary, slices: 2.5 } })), false);
    assert.equal(isResultMessage(result({ head: '', body: '', summary: { ...summary, fromCache: 'no' } })), false);
  });
});
