import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { parseManifest } from '../../src/engine/dataset/manifest';
import { manifestJsonSchema } from '../../src/engine/dataset/manifestSpec';
import { formatProblem } from '../../src/engine/dataset/types';

const schemaPath = path.join(__dirname, '../../schemas/dataset.schema.json');
const shippedSchema = JSON.parse(readFileSync(schemaPath, 'utf8')) as SchemaNode;

interface SchemaNode {
  type: string;
  properties?: Record<string, SchemaNode>;
  required?: string[];
  enum?: string[];
  default?: unknown;
  minimum?: number;
  minLength?: number;
  items?: SchemaNode;
}

/** Every property of the schema as [dotted path, its schema]. */
function schemaLeaves(node: SchemaNode, prefix = ''): [string, SchemaNode][] {
  const out: [string, SchemaNode][] = [];
  for (const [key, child] of Object.entries(node.properties ?? {})) {
    const p = prefix ? `${prefix}.${key}` : key;
    out.push([p, child]);
    if (child.type === 'object') out.push(...schemaLeaves(child, p));
  }
  return out;
}

/** A manifest text with `value` at dotted path p (other keys minimal), pretty-printed. */
function manifestWith(p: string, value: unknown): { text: string; line: number; column: number } {
  const root: Record<string, unknown> = { name: 'x', nodeColumns: { text: ['title'] } };
  const parts = p.split('.');
  let cursor = root;
  for (const part of parts.slice(0, -1)) cursor = (cursor[part] ??= {}) as Record<string, unknown>;
  cursor[parts[parts.length - 1]] = value;
  const text = JSON.stringify(root, null, 2);
  // Locate the value: the line holding `"last": ` inside the right parent, found by a marker.
  const marker = JSON.stringify(root, (k, v: unknown) => (k === parts[parts.length - 1] && v === value ? '@@MARK@@' : v), 2);
  const index = marker.indexOf('"@@MARK@@"');
  const before = marker.slice(0, index);
  const line = before.split('\n').length;
  const column = index - before.lastIndexOf('\n');
  return { text, line, column };
}

function wrongValueFor(schema: SchemaNode): unknown {
  switch (schema.type) {
    case 'string':
      return 42;
    case 'boolean':
      return 'yes';
    case 'integer':
      return 1.5;
    case 'array':
      return 'not-an-array';
    default:
      return 7;
  }
}

describe('dataset.json manifest', () => {
  it("ships the schema generated from the code validator's field list", () => {
    // If this fails, regenerate: npx tsx -e "import { manifestJsonSchema } from './src/engine/dataset/manifestSpec'; process.stdout.write(JSON.stringify(manifestJsonSchema(), null, 2) + '\n')" > schemas/dataset.schema.json
    assert.deepEqual(shippedSchema, manifestJsonSchema());
    assert.equal(shippedSchema.type, 'object');
    assert.equal((shippedSchema as unknown as { $schema: string }).$schema, 'http://json-schema.org/draft-07/schema#');
  });

  it('rejects a wrongly typed value for every property of the schema, at that value', () => {
    const leaves = schemaLeaves(shippedSchema);
    assert.ok(leaves.length >= 25, `only ${leaves.length} properties found`);
    for (const [p, schema] of leaves) {
      const { text, line, column } = manifestWith(p, wrongValueFor(schema));
      const parsed = parseManifest(text);
      assert.equal(parsed.manifest, null, `${p} accepted a wrong value`);
      assert.ok(
        parsed.problems.some((q) => q.line === line && q.column === column && q.message.includes(`"${p}"`)),
        `${p}: expected a problem at ${line}:${column}, got ${parsed.problems.map(formatProblem).join('; ')}`,
      );
    }
  });

  it('accepts the default of every property and only the values of each enum', () => {
    for (const [p, schema] of schemaLeaves(shippedSchema)) {
      if (schema.default !== undefined) {
        const { text } = manifestWith(p, schema.default);
        // (Rules between fields may still object, e.g. an empty text list with TF-IDF features.)
        assert.deepEqual(
          parseManifest(text).problems.filter((q) => q.message.startsWith(`"${p}" must`)),
          [],
          p,
        );
      }
      if (schema.enum) {
        assert.equal(parseManifest(manifestWith(p, 'no-such-value').text).manifest, null, p);
      }
    }
  });

  it('fills the defaults and knows no field the schema lacks (and vice versa)', () => {
    const parsed = parseManifest('{ "name": "only-name", "nodeColumns": { "text": ["title"] } }');
    assert.deepEqual(parsed.problems, []);
    const manifest = parsed.manifest!;
    assert.equal(manifest.time.granularity, 'quarter');
    assert.equal(manifest.features.vocabularySize, 2000);
    assert.equal(manifest.seed, 7);
    assert.equal(manifest.files.features, undefined);
    const schemaPaths = new Set(schemaLeaves(shippedSchema).map(([p]) => p));
    const manifestPaths = (value: Record<string, unknown>, prefix = ''): string[] =>
      Object.entries(value).flatMap(([k, v]) => {
        const p = prefix ? `${prefix}.${k}` : k;
        return v && typeof v === 'object' && !Array.isArray(v) ? [p, ...manifestPaths(v as Record<string, unknown>, p)] : [p];
      });
    for (const p of manifestPaths(manifest as unknown as Record<string, unknown>))
      assert.ok(schemaPaths.has(p), `${p} is filled by the code but missing from the schema`);
    // Every schema property with a default is filled in by the code.
    for (const [p, schema] of schemaLeaves(shippedSchema)) {
      if (schema.default === undefined) continue;
      const value = p.split('.').reduce<unknown>((v, k) => (v as Record<string, unknown>)[k], manifest);
      assert.notEqual(value, undefined, `${p} has a default in the schema but not in the code`);
    }
  });

  it('locates syntax errors, unknown and duplicate keys, and missing required keys', () => {
    const problems = (text: string) => parseManifest(text).problems.map(formatProblem);
    assert.deepEqual(problems('{\n  "name": "a",\n  "seed": 7,\n}'), ["dataset.json:4:1: expected a quoted key, found '}'"]);
    assert.deepEqual(problems('{\n  "name": "a",\n  "nodeColumns": { "text": ["t"] },\n  "sed": 7\n}'), [
      'dataset.json:4:3: unknown key "sed"; expected one of $schema, name, description, directed, time, files, nodeColumns, edgeColumns, features, seed',
    ]);
    assert.deepEqual(problems('{ "name": "a", "nodeColumns": { "text": ["t"] }, "name": "b" }'), [
      'dataset.json:1:50: duplicate key "name"',
    ]);
    assert.deepEqual(problems('{\n  "description": "no name",\n  "nodeColumns": { "text": ["t"] }\n}'), [
      'dataset.json:1:1: missing required key "name"',
    ]);
    assert.deepEqual(problems('{ "name": "a", "time": { "granularity": "fortnight" }, "nodeColumns": { "text": ["t"] } }'), [
      'dataset.json:1:41: "time.granularity" must be one of "year", "quarter", "month", "week", "day", "step"; found "fortnight"',
    ]);
    assert.deepEqual(problems('"just a string"'), ['dataset.json:1:1: the manifest must be an object']);
  });

  it('checks rules between fields', () => {
    const problems = (value: unknown) => parseManifest(JSON.stringify(value, null, 2)).problems.map(formatProblem);
    assert.deepEqual(problems({ name: 'a' }), [
      'dataset.json:1:1: "features.source" is "tfidf" (the default) but "nodeColumns.text" lists no text columns: list text columns, or set "features.source" to "columns" or "npy"',
    ]);
    assert.deepEqual(problems({ name: 'a', files: { features: 'f.npy' }, nodeColumns: { text: ['t'] } }), [
      'dataset.json:4:17: "files.features" is only read when "features.source" is "npy" (it is "tfidf")',
    ]);
    assert.deepEqual(problems({ name: 'a', files: { nodes: '../elsewhere.csv' }, nodeColumns: { text: ['t'] } }), [
      'dataset.json:4:14: "files.nodes" must be a relative path inside the dataset folder; found "../elsewhere.csv"',
    ]);
    const npy = parseManifest(JSON.stringify({ name: 'a', features: { source: 'npy' } }));
    assert.equal(npy.manifest?.files.features, 'features.npy');
  });
});
