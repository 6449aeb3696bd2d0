import * as assert from 'node:assert/strict';
import { decisionRequestKinds, describeRefusedMessage, isWebviewToHostMessage, webviewToHostTypes } from '../../src/protocol/webview';
import { ReviewController } from '../../src/review/reviewController';
import { ReviewSession } from '../../src/review/reviewSession';
import { contentSecurityPolicy, newNonce, reviewPanelHtml } from '../../src/review/webviewHtml';
import type { HostToWebviewMessage } from '../../src/protocol/webview';
import { buildScenario, scenarioCandidates } from './reviewScenario';

const setting = { mode: 'alpha', alpha: 3, quantile: 0.1, lambda: 0.5 };

const good: Record<string, unknown>[] = [
  { type: 'ready' },
  { type: 'selectCandidate', candidateId: 'cand-1' },
  { type: 'decide', requestId: 1, decision: { kind: 'name-new-class', candidateId: 'c', className: 'icing', description: '' } },
  { type: 'decide', requestId: 2, decision: { kind: 'merge-into-class', candidateId: 'c', className: 'grid', note: 'same thing' } },
  { type: 'decide', requestId: 3, decision: { kind: 'move-members', members: ['a', 'b'], className: 'x' } },
  { type: 'decide', requestId: 4, decision: { kind: 'move-members', members: ['a'], className: 'new', description: 'd' } },
  { type: 'decide', requestId: 5, decision: { kind: 'merge-classes', from: 'a', into: 'b' } },
  { type: 'decide', requestId: 6, decision: { kind: 'merge-candidates', candidateIds: ['c1', 'c2'] } },
  { type: 'decide', requestId: 7, decision: { kind: 'split-candidate', candidateId: 'c' } },
  { type: 'decide', requestId: 8, decision: { kind: 'split-candidate', candidateId: 'c', parts: 3 } },
  { type: 'decide', requestId: 9, decision: { kind: 'dismiss', candidateId: 'c' } },
  { type: 'decide', requestId: 10, decision: { kind: 'skip', candidateId: 'c' } },
  { type: 'decide', requestId: 11, decision: { kind: 'keep-label', node: 'n1' } },
  { type: 'undo', requestId: 12 },
  { type: 'redo', requestId: 13 },
  { type: 'previewThreshold', requestId: 14, setting },
  { type: 'previewThreshold', requestId: 15, setting: { ...setting, mode: 'quantile', quantile: 1, lambda: 0 } },
  { type: 'exportDecisions', requestId: 16 },
  { type: 'applyDecisions', requestId: 17 },
  { type: 'openNode', nodeId: 'n1' },
  { type: 'loadSecondLook', requestId: 18 },
];

const bad: unknown[] = [
  null,
  undefined,
  'ready',
  [],
  {},
  { type: 'toString' },
  { type: 'explode' },
  { type: 'selectCandidate' },
  { type: 'selectCandidate', candidateId: '' },
  { type: 'selectCandidate', candidateId: '   ' },
  { type: 'selectCandidate', candidateId: 7 },
  { type: 'decide', decision: { kind: 'dismiss', candidateId: 'c' } }, // no request id
  { type: 'decide', requestId: -1, decision: { kind: 'dismiss', candidateId: 'c' } },
  { type: 'decide', requestId: 1.5, decision: { kind: 'dismiss', candidateId: 'c' } },
  { type: 'decide', requestId: 1 },
  { type: 'decide', requestId: 1, decision: { kind: 'burn', candidateId: 'c' } },
  { type: 'decide', requestId: 1, decision: { kind: 'hasOwnProperty', candidateId: 'c' } },
  { type: 'decide', requestId: 1, decision: { kind: 'name-new-class', candidateId: 'c', className: '', description: '' } },
  { type: 'decide', requestId: 1, decision: { kind: 'name-new-class', candidateId: 'c', className: 'x' } },
  { type: 'decide', requestId: 1, decision: { kind: 'name-new-class', candidateId: 'c', className: 'x'.repeat(10_001), description: '' } },
  { type: 'decide', requestId: 1, decision: { kind: 'merge-into-class', candidateId: 'c' } },
  { type: 'decide', requestId: 1, decision: { kind: 'move-members', members: [], className: 'x' } },
  { type: 'decide', requestId: 1, decision: { kind: 'move-members', members: ['a', 'a'], className: 'x' } },
  { type: 'decide', requestId: 1, decision: { kind: 'move-members', members: 'a', className: 'x' } },
  { type: 'decide', requestId: 1, decision: { kind: 'move-members', members: ['a'], className: 'x', description: 3 } },
  { type: 'decide', requestId: 1, decision: { kind: 'merge-classes', from: 'a', into: 'a' } },
  { type: 'decide', requestId: 1, decision: { kind: 'merge-candidates', candidateIds: ['c1'] } },
  { type: 'decide', requestId: 1, decision: { kind: 'merge-candidates', candidateIds: ['c1', 'c1'] } },
  { type: 'decide', requestId: 1, decision: { kind: 'split-candidate', candidateId: 'c', parts: 1 } },
  { type: 'decide', requestId: 1, decision: { kind: 'split-candidate', candidateId: 'c', parts: 2.5 } },
  { type: 'decide', requestId: 1, decision: { kind: 'dismiss' } },
  { type: 'decide', requestId: 1, decision: { kind: 'skip', candidateId: 'c', note: 5 } },
  { type: 'decide', requestId: 1, decision: { kind: 'keep-label' } },
  { type: 'undo' },
  { type: 'redo', requestId: '1' },
  { type: 'previewThreshold', requestId: 1 },
  { type: 'previewThreshold', requestId: 1, setting: { ...setting, mode: 'other' } },
  { type: 'previewThreshold', requestId: 1, setting: { ...setting, alpha: -1 } },
  { type: 'previewThreshold', requestId: 1, setting: { ...setting, alpha: Number.NaN } },
  { type: 'previewThreshold', requestId: 1, setting: { ...setting, quantile: 1.5 } },
  { type: 'previewThreshold', requestId: 1, setting: { ...setting, lambda: -0.1 } },
  { type: 'exportDecisions' },
  { type: 'applyDecisions', requestId: null },
  { type: 'openNode' },
  { type: 'openNode', nodeId: '' },
  { type: 'loadSecondLook' },
  { type: 'loadSecondLook', requestId: -2 },
];

describe('protocol/webview guards and the review controller', () => {
  it('accepts a well-formed message of every type and every decision kind', () => {
    for (const message of good) assert.equal(isWebviewToHostMessage(message), true, JSON.stringify(message));
    assert.deepEqual(new Set(good.map((m) => m.type)), new Set(webviewToHostTypes));
    const kinds = new Set(good.filter((m) => m.type === 'decide').map((m) => (m.decision as { kind: string }).kind));
    assert.deepEqual(kinds, new Set(decisionRequestKinds));
  });

  it('rejects malformed messages of every type', () => {
    for (const message of bad) assert.equal(isWebviewToHostMessage(message), false, JSON.stringify(message));
    const refusedTypes = new Set(
      bad.filter((m): m is { type: string } => typeof m === 'object' && m !== null && 'type' in m).map((m) => m.type),
    );
    for (const type of webviewToHostTypes.filter((t) => t !== 'ready'))
      assert.ok(refusedTypes.has(type), `a malformed "${type}" is tested`);
    assert.equal(describeRefusedMessage({ type: 'explode' }), 'refused a webview message of unknown type "explode"');
    assert.equal(
      describeRefusedMessage({ type: 'decide', requestId: 1, decision: { kind: 'dismiss' } }),
      'refused a malformed "dismiss" decision from the webview',
    );
  });

  it('the controller answers ready with a snapshot, refuses bad messages, and reports failed decisions with the request id', async () => {
    const scenario = buildScenario();
    const session = new ReviewSession(scenario.context, scenarioCandidates(scenario));
    const posted: HostToWebviewMessage[] = [];
    const persisted: unknown[] = [];
    const controller = new ReviewController(session, {
      post: (m) => posted.push(m),
      persist: (json) => persisted.push(json),
      exportDecisions: (file) => Promise.resolve(`wrote ${file.decisions.length}`),
      applyDecisions: () => Promise.resolve('applied'),
      openNode: () => undefined,
    });
    await controller.receive({ type: 'ready' });
    assert.equal(posted[0].type, 'snapshot');
    const snapshot = posted[0].type === 'snapshot' ? posted[0].snapshot : null;
    assert.equal(snapshot?.queue.length, 3);
    assert.equal(snapshot?.current?.graph.memberCount, 18);
    assert.equal(snapshot?.current?.graph.source.length, snapshot?.current?.graph.totalEdges);
    await controller.receive({ type: 'decide', requestId: 4, decision: { kind: 'burn' } });
    assert.deepEqual(posted.at(-1), { type: 'error', message: 'refused a malformed "burn" decision from the webview' });
    await controller.receive({
      type: 'decide',
      requestId: 5,
      decision: { kind: 'merge-into-class', candidateId: snapshot.queue[0].id, className: 'nope' },
    });
    assert.deepEqual(posted.at(-1), { type: 'error', requestId: 5, message: 'no class "nope": name it as a new class first' });
    await controller.receive({ type: 'previewThreshold', requestId: 6, setting });
    assert.equal(posted.at(-1)?.type, 'error');
    await controller.receive({ type: 'decide', requestId: 7, decision: { kind: 'dismiss', candidateId: snapshot.queue[0].id } });
    assert.equal(posted.at(-1)?.type, 'snapshot');
    assert.equal(persisted.length, 1);
    await controller.receive({ type: 'exportDecisions', requestId: 8 });
    assert.deepEqual(posted.at(-1), { type: 'done', requestId: 8, message: 'wrote 1' });
  });

  it('builds the panel HTML with a nonce-only script policy and blob: workers', () => {
    const nonce = newNonce();
    assert.match(nonce, /^[A-Za-z0-9]{32}$/);
    assert.notEqual(newNonce(), nonce);
    const policy = contentSecurityPolicy('https://x.vscode-cdn.net', nonce);
    assert.equal(
      policy,
      `default-src 'none'; img-src https://x.vscode-cdn.net data:; style-src https://x.vscode-cdn.net; font-src https://x.vscode-cdn.net; script-src 'nonce-${nonce}'; worker-src blob:`,
    );
    const html = reviewPanelHtml({
      scriptUri: 'https://x/dist/webview.js',
      styleUri: 'https://x/media/review.css',
      cspSource: 'https://x.vscode-cdn.net',
      nonce,
      title: 'a "b" <c>',
    });
    assert.ok(html.includes(`<script nonce="${nonce}" src="https://x/dist/webview.js"></script>`));
    assert.ok(html.includes('<title>a &quot;b&quot; &lt;c&gt;</title>'));
    assert.ok(!/style="/.test(html), 'no inline styles');
    assert.throws(() => reviewPanelHtml({ scriptUri: 'a', styleUri: 'b', cspSource: 'c', nonce: 'short' }), /nonce/);
  });
});
