import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import type { ClassRecord, DatasetManifest } from '../../src/engine/dataset/types';
import { generateInTemp, quarterOf, readCsv, readJson, removeTemporaryFolders, type Generated } from './demoFixture';

const NOVEL = ['lightning-receptor-damage', 'main-shaft-cracking'];

async function filesOf(folder: string): Promise<string[]> {
  return (await fs.readdir(folder)).sort();
}

describe('demo generator output', () => {
  let small: Generated;
  let nodes: Record<string, string>[];
  let edges: Record<string, string>[];
  let labels: Record<string, string>[];
  let truth: Map<string, string>;

  before(async () => {
    small = await generateInTemp({ nodes: 2000, seed: 11 });
    nodes = await readCsv(path.join(small.folder, 'nodes.csv'));
    edges = await readCsv(path.join(small.folder, 'edges.csv'));
    labels = await readCsv(path.join(small.folder, 'labels.csv'));
    truth = new Map((await readCsv(small.truthFile)).map((r) => [r.id, r.label]));
  });
  after(removeTemporaryFolders);

  it('is byte-identical for the same seed and differs for another seed', async () => {
    const again = await generateInTemp({ nodes: 2000, seed: 11 });
    const other = await generateInTemp({ nodes: 2000, seed: 12 });
    const files = await filesOf(small.folder);
    assert.deepEqual(await filesOf(again.folder), files);
    for (const file of files) {
      const a = await fs.readFile(path.join(small.folder, file));
      assert.ok(a.equals(await fs.readFile(path.join(again.folder, file))), `${file} differs between two runs with the same seed`);
    }
    assert.ok((await fs.readFile(small.truthFile)).equals(await fs.readFile(again.truthFile)));
    for (const file of ['nodes.csv', 'edges.csv', 'labels.csv']) {
      const a = await fs.readFile(path.join(small.folder, file));
      assert.ok(!a.equals(await fs.readFile(path.join(other.folder, file))), `${file} is the same for seeds 11 and 12`);
    }
  });

  it('writes the requested number of reports and about edgesPerNode references each', async () => {
    assert.equal(nodes.length, 2000);
    assert.equal(truth.size, 2000);
    // Mean 3 references per report; the first few reports have fewer earlier ones to cite.
    assert.ok(edges.length > 2000 * 3 * 0.93 && edges.length <= 2000 * 3 * 1.03, `edges ${edges.length}`);
    const dense = await generateInTemp({ nodes: 600, edgesPerNode: 10, seed: 3 });
    const denseEdges = await readCsv(path.join(dense.folder, 'edges.csv'));
    assert.ok(denseEdges.length > 600 * 10 * 0.9 && denseEdges.length <= 600 * 10 * 1.03, `edges ${denseEdges.length}`);
  });

  it('writes a manifest for TF-IDF text features and an empty label log', async () => {
    const manifest = await readJson<DatasetManifest>(path.join(small.folder, 'dataset.json'));
    assert.equal(manifest.name, 'wind-farm');
    assert.equal(manifest.features.source, 'tfidf');
    assert.deepEqual(manifest.nodeColumns.text, ['title', 'text']);
    assert.equal(manifest.time.granularity, 'quarter');
    assert.equal(manifest.files.features, undefined);
    assert.deepEqual(await filesOf(small.folder), [
      'classes.json',
      'dataset.json',
      'edges.csv',
      'label-log.jsonl',
      'labels.csv',
      'nodes.csv',
    ]);
    assert.equal((await fs.stat(path.join(small.folder, 'label-log.jsonl'))).size, 0);
  });

  it('numbers reports in time order, 24 quarters from 2019-Q1 to 2024-Q4', () => {
    const quarters = new Set<string>();
    for (let i = 0; i < nodes.length; i++) {
      assert.match(nodes[i].id, /^R\d{6}$/);
      assert.match(nodes[i].time, /^\d{4}-\d{2}-\d{2}$/);
      if (i > 0) {
        assert.ok(nodes[i - 1].id < nodes[i].id, `ids out of order at ${nodes[i].id}`);
        assert.ok(nodes[i - 1].time <= nodes[i].time, `dates out of order at ${nodes[i].id}`);
      }
      quarters.add(quarterOf(nodes[i].time));
    }
    assert.equal(quarters.size, 24);
    assert.equal(quarterOf(nodes[0].time), '2019-Q1');
    assert.equal(quarterOf(nodes[nodes.length - 1].time), '2024-Q4');
  });

  it('quotes texts with commas and quotes so an independent RFC 4180 parser reads them back', async () => {
    // csv-parse is a general-purpose RFC 4180 parser; a quoting mistake would shift or split columns.
    const raw = await fs.readFile(path.join(small.folder, 'nodes.csv'), 'utf8');
    assert.ok(raw.includes('""'), 'no escaped double quote in nodes.csv');
    assert.ok(
      nodes.some((n) => n.text.includes('"')),
      'no text with a double quote',
    );
    assert.ok(
      nodes.every((n) => n.title.includes(',')),
      'titles should carry a comma',
    );
    for (const n of nodes) {
      assert.deepEqual(Object.keys(n), ['id', 'time', 'turbine', 'site', 'title', 'text']);
      assert.match(n.turbine, /^T-\d{3}$/);
      assert.ok(n.title.endsWith(`, ${n.turbine}`), n.title);
      const sentences = n.text.split(/(?<=[.!?]"?)\s+(?=[A-Z])/).length;
      assert.ok(sentences >= 1 && sentences <= 3, `${n.id} has ${sentences} sentences: ${n.text}`);
    }
    assert.ok(!raw.includes('\r'), 'line endings must be LF');
  });

  it('links every report only to earlier-or-same-date reports, with the later date on the edge', () => {
    const timeOf = new Map(nodes.map((n) => [n.id, n.time]));
    const seen = new Set<string>();
    for (const e of edges) {
      assert.ok(timeOf.has(e.source) && timeOf.has(e.target), `unknown id in ${JSON.stringify(e)}`);
      assert.notEqual(e.source, e.target);
      assert.ok(e.target < e.source, `edge ${e.source} → ${e.target} points forward`);
      assert.ok(timeOf.get(e.target)! <= timeOf.get(e.source)!);
      assert.equal(e.time, timeOf.get(e.source));
      const key = `${e.source} ${e.target}`;
      assert.ok(!seen.has(key), `duplicate edge ${key}`);
      seen.add(key);
    }
  });

  it('links mostly within a failure mode; novel reports link to their own mode or their turbine', () => {
    const turbineOf = new Map(nodes.map((n) => [n.id, n.turbine]));
    let same = 0;
    let novelEdges = 0;
    let novelOwnOrTurbine = 0;
    for (const e of edges) {
      const a = truth.get(e.source)!;
      if (a === truth.get(e.target)) same++;
      if (NOVEL.includes(a)) {
        novelEdges++;
        if (a === truth.get(e.target) || turbineOf.get(e.source) === turbineOf.get(e.target)) novelOwnOrTurbine++;
      }
    }
    assert.ok(same / edges.length > 0.65, `homophily ${same / edges.length}`);
    assert.ok(novelOwnOrTurbine / novelEdges > 0.75, `novel own-or-turbine share ${novelOwnOrTurbine / novelEdges}`);
  });

  it('labels only known classes, sorted by id, agreeing with the truth', async () => {
    const raw = await fs.readFile(path.join(small.folder, 'labels.csv'), 'utf8');
    assert.ok(raw.startsWith('id,label\n') && raw.endsWith('\n') && !raw.includes('\r'));
    const { classes } = await readJson<{ classes: ClassRecord[] }>(path.join(small.folder, 'classes.json'));
    const known = new Set(classes.map((c) => c.name));
    assert.ok(classes.length >= 5 && classes.length <= 7);
    for (const c of classes) {
      assert.equal(c.status, 'active');
      assert.equal(c.introducedIn, '2019-Q1');
      assert.ok(c.description.length > 20);
    }
    for (const name of NOVEL) assert.ok(!known.has(name), `${name} must not be in classes.json`);
    for (let i = 0; i < labels.length; i++) {
      assert.ok(known.has(labels[i].label), `label ${labels[i].label} not in classes.json`);
      assert.equal(labels[i].label, truth.get(labels[i].id));
      if (i > 0) assert.ok(labels[i - 1].id < labels[i].id);
    }
  });

  it('labels about 60% of old reports and 5-10% of the newest quarter', () => {
    const labelled = new Set(labels.map((l) => l.id));
    const share = (filter: (time: string) => boolean) => {
      const inRange = nodes.filter((n) => filter(n.time));
      return inRange.filter((n) => labelled.has(n.id)).length / inRange.length;
    };
    const old = share((t) => t < '2021');
    const newest = share((t) => quarterOf(t) === '2024-Q4');
    assert.ok(Math.abs(old - 0.6) < 0.03, `2019-2020 labelled share ${old}`);
    assert.ok(newest >= 0.05 && newest <= 0.1, `2024-Q4 labelled share ${newest}`);
  });

  it('brings in one novel failure mode in 2021 and another in 2023, never labelled', () => {
    const firstSeen = new Map<string, string>();
    for (const n of nodes) {
      const label = truth.get(n.id)!;
      if (!firstSeen.has(label)) firstSeen.set(label, n.time);
    }
    assert.equal(firstSeen.get(NOVEL[0])!.slice(0, 4), '2021');
    assert.equal(firstSeen.get(NOVEL[1])!.slice(0, 4), '2023');
    assert.equal(firstSeen.size, 8);
    for (const [label, time] of firstSeen) if (!NOVEL.includes(label)) assert.equal(quarterOf(time), '2019-Q1', label);
    assert.ok(labels.every((l) => !NOVEL.includes(l.label)));
    assert.ok(
      small.summary.novelCounts[NOVEL[0]] > 60 && small.summary.novelCounts[NOVEL[1]] > 30,
      JSON.stringify(small.summary.novelCounts),
    );
  });

  it('gives novel reports words of the known modes they resemble', () => {
    // Words that belong to the look-alike known modes and to none of the novel modes' own lists.
    const lookAlikeWords: Record<string, RegExp> = {
      'lightning-receptor-damage': /erosion|eroded|leading edge|coating|delamina|converter|IGBT|DC link|capacitor/i,
      'main-shaft-cracking': /gearbox|spalling|oil|generator|winding|insulation|cooling/i,
    };
    for (const name of NOVEL) {
      const reports = nodes.filter((n) => truth.get(n.id) === name);
      const borrowing = reports.filter((n) => lookAlikeWords[name].test(n.text)).length / reports.length;
      assert.ok(borrowing > 0.5, `${name}: only ${borrowing} of its reports use a look-alike's words`);
    }
  });

  it('drifts the blade class from "erosion" to "delamination" wording', () => {
    const usage = (year: string) => {
      const reports = nodes.filter((n) => n.time.startsWith(year) && truth.get(n.id) === 'blade-surface-erosion');
      const count = (word: RegExp) => reports.filter((n) => word.test(`${n.title} ${n.text}`)).length / reports.length;
      return { erosion: count(/erosion|eroded/i), delamination: count(/delamina|coating/i) };
    };
    const early = usage('2019');
    const late = usage('2024');
    assert.ok(early.erosion > 0.6 && early.delamination < 0.1, JSON.stringify(early));
    assert.ok(late.delamination > 0.6 && late.erosion < 0.15, JSON.stringify(late));
  });
});
