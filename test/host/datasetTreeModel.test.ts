// The Datasets tree and the dataset.json overview built from a dataset summary and run records.
// The summary is of Zachary's karate club (graphology-generators); its per-class label counts are
// checked against the club attribute of graphology's own copy of the graph.
import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import Graph from 'graphology';
import { karateClub } from 'graphology-generators/social';
import { loadDataset } from '../../src/engine/dataset/load';
import { summarizeDataset } from '../../src/engine/dataset/summary';
import { defaultRunSettings } from '../../src/engine/pipeline/runSettings';
import type { RunRecord } from '../../src/engine/pipeline/runStore';
import {
  datasetChildren,
  datasetDescription,
  listedCandidates,
  openCandidateCommandId,
  type TreeNodeModel,
} from '../../src/host/datasetTreeModel';
import { commandUri, escapeHtml, overviewHtml } from '../../src/host/overviewHtml';
import type { DatasetOverview } from '../../src/protocol/worker';
import { writeKarateDataset } from './fixtures/karateDataset';

function run(runId: string, slice: string, createdAt: string, withCandidates: boolean): RunRecord {
  return {
    runId,
    createdAt,
    dataset: 'karate-club',
    datasetHashes: {},
    settings: defaultRunSettings,
    settingsHash: '0123456789abcdef',
    slice,
    modelClasses: [],
    counts: { scored: 17, rejected: 3, trainingNodes: 30 },
    rejectionRate: 3 / 17,
    timings: {},
    files: { scores: 'scores.csv', embeddings: 'embeddings.npy', ...(withCandidates ? { candidates: 'candidates.json' } : {}) },
  };
}

const group = (nodes: TreeNodeModel[], label: string) => {
  const found = nodes.find((n) => n.kind === 'group' && n.label === label);
  assert.ok(found, `group ${label}`);
  return found;
};

describe('dataset tree and overview', () => {
  let root: string;
  let folder: string;
  let overview: DatasetOverview;

  before(async () => {
    root = await fs.mkdtemp(path.join(os.tmpdir(), 'dataset-tree-'));
    folder = (await writeKarateDataset(path.join(root, 'karate'))).folder;
    const summary = summarizeDataset(await loadDataset(folder));
    overview = {
      summary,
      runs: [run('r2', '1', '2026-12-01T10:00:00.000Z', true), run('r1', '0', '2026-11-30T10:00:00.000Z', false)],
      latestCandidates: {
        runId: 'r2',
        slice: '1',
        candidates: [
          { id: 'c1', size: 5, topTerms: ['officer', 'club', 'member', 'karate'], looksLikeDrift: false },
          { id: 'c2', size: 3, topTerms: [], looksLikeDrift: true },
        ],
      },
    };
  });

  after(() => fs.rm(root, { recursive: true, force: true }));

  it('lists classes with the label counts of the club attribute in graphology-generators', () => {
    const graph = karateClub(Graph);
    const expected = new Map<string, number>();
    graph.forEachNode((_node, attributes) => expected.set(String(attributes.club), (expected.get(String(attributes.club)) ?? 0) + 1));
    const classes = group(datasetChildren(folder, overview), 'Classes').children ?? [];
    assert.deepEqual(classes.map((c) => c.label).sort(), [...expected.keys()].sort());
    for (const node of classes) assert.equal(node.description, `${expected.get(node.label)} labels`, node.label);
  });

  it('lists slices newest first with node counts summing to the 34 members (Zachary 1977, via graphology-generators)', () => {
    const slices = group(datasetChildren(folder, overview), 'Slices').children ?? [];
    assert.deepEqual(
      slices.map((s) => s.label),
      ['1', '0'],
    );
    const total = slices.reduce((sum, s) => sum + Number(/^(\d+) nodes/.exec(s.description ?? '')?.[1]), 0);
    assert.equal(total, 34);
    assert.equal(datasetDescription(overview), '34 nodes, 2 slices');
  });

  it('lists runs that open the review panel, and candidates that open it at the candidate', () => {
    const children = datasetChildren(folder, overview);
    const runs = group(children, 'Runs').children ?? [];
    assert.deepEqual(
      runs.map((r) => r.command?.arguments),
      [[{ folder, runId: 'r2' }], [{ folder, runId: 'r1' }]],
    );
    const candidates = group(children, 'Candidates');
    assert.equal(candidates.description, '2 in 1');
    const [first, second] = candidates.children ?? [];
    assert.equal(first.label, 'officer, club, member');
    assert.equal(first.description, '5 nodes');
    assert.deepEqual(first.command, {
      command: openCandidateCommandId,
      title: 'Review Candidate',
      arguments: [{ folder, runId: 'r2', candidateId: 'c1' }],
    });
    assert.equal(second.label, 'c2', 'a candidate without terms shows its id');
    assert.equal(second.description, '3 nodes · drift?');
    const ids = [...children, ...children.flatMap((c) => c.children ?? [])].map((n) => n.id);
    assert.equal(new Set(ids).size, ids.length, 'tree ids are unique');
  });

  it('caps the candidates listed, and says when there is no run yet', () => {
    const many = Array.from({ length: listedCandidates + 7 }, (_, k) => ({ id: `c${k}`, size: 3, topTerms: ['t'], looksLikeDrift: false }));
    const capped =
      group(datasetChildren(folder, { ...overview, latestCandidates: { runId: 'r2', slice: '1', candidates: many } }), 'Candidates')
        .children ?? [];
    assert.equal(capped.length, listedCandidates + 1);
    assert.equal(capped[capped.length - 1].label, '… 7 more in the review panel');
    const empty = datasetChildren(folder, { ...overview, runs: [], latestCandidates: null });
    assert.deepEqual(
      empty.map((n) => n.kind),
      ['group', 'group', 'message'],
    );
  });

  it('renders the overview with escaped text, no script, and command links that carry the folder', () => {
    const hostile = {
      ...overview,
      summary: {
        ...overview.summary,
        name: '<img src=x onerror=alert(1)>',
        classes: [{ name: '"><script>x</script>', status: 'active', labelled: 1 }],
      },
    };
    const html = overviewHtml(folder, hostile, { cspSource: 'vscode-resource:', nonce: 'abcdefghijklmnopqrstuvwxyz012345' });
    assert.doesNotMatch(html, /<script/i);
    assert.doesNotMatch(html, /<img/i);
    assert.match(html, /&lt;img src=x onerror=alert\(1\)&gt;/);
    assert.match(html, /Content-Security-Policy" content="default-src &#39;none&#39;;/);
    const links = [...html.matchAll(/href="command:([\w.]+)\?([^"]*)"/g)].map((m) => ({
      command: m[1],
      args: JSON.parse(decodeURIComponent(m[2].replace(/&amp;/g, '&'))) as unknown[],
    }));
    assert.deepEqual(links.find((l) => l.command === 'graphCurator.scoreSlice')?.args, [{ folder }]);
    assert.deepEqual(
      links.filter((l) => l.command === 'graphCurator.openCandidate').map((l) => l.args),
      [[{ folder, runId: 'r2', candidateId: 'c1' }], [{ folder, runId: 'r2', candidateId: 'c2' }]],
    );
    assert.equal(
      commandUri('graphCurator.scoreSlice', { folder: '/a b' }),
      `command:graphCurator.scoreSlice?${encodeURIComponent('[{"folder":"/a b"}]')}`,
    );
    assert.equal(escapeHtml(`<a href="x">'&'</a>`), '&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;');
  });
});
