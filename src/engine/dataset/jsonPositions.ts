// A small JSON parser that remembers where every key and value starts, so that problems in
// dataset.json and classes.json can name a line and column (JSON.parse gives no positions).
import { DatasetError } from './types';

interface Position {
  line: number;
  column: number;
}

export interface JsonEntry {
  key: string;
  keyAt: Position;
  value: JsonNode;
}

export type JsonNode = Position &
  (
    | { kind: 'object'; entries: JsonEntry[] }
    | { kind: 'array'; items: JsonNode[] }
    | { kind: 'string'; value: string }
    | { kind: 'number'; value: number }
    | { kind: 'boolean'; value: boolean }
    | { kind: 'null'; value: null }
  );

/** Parses JSON text; a syntax error throws a DatasetError located in `file`. */
export function parseJsonWithPositions(input: string, file: string): JsonNode {
  const text = input.charCodeAt(0) === 0xfeff ? input.slice(1) : input;
  let i = 0;
  let line = 1;
  let lineStart = 0;

  const here = (): Position => ({ line, column: i - lineStart + 1 });
  const fail = (message: string, at: Position = here()): never => {
    throw new DatasetError([{ file, line: at.line, column: at.column, message }]);
  };
  const describe = (): string => (i >= text.length ? 'end of file' : `'${text[i]}'`);

  function skipSpace(): void {
    while (i < text.length) {
      const c = text.charCodeAt(i);
      if (c === 0x0a) {
        i++;
        line++;
        lineStart = i;
      } else if (c === 0x20 || c === 0x09 || c === 0x0d) i++;
      else break;
    }
  }

  function parseValue(depth: number): JsonNode {
    if (depth > 200) fail('JSON nested too deeply');
    skipSpace();
    const at = here();
    const c = text[i];
    if (c === '{') return parseObject(at, depth);
    if (c === '[') return parseArray(at, depth);
    if (c === '"') return { ...at, kind: 'string', value: parseString() };
    if (c === '-' || (c >= '0' && c <= '9')) return { ...at, kind: 'number', value: parseNumber() };
    for (const [word, value] of [
      ['true', true],
      ['false', false],
      ['null', null],
    ] as const) {
      if (text.startsWith(word, i)) {
        i += word.length;
        return value === null ? { ...at, kind: 'null', value } : { ...at, kind: 'boolean', value };
      }
    }
    return fail(`expected a JSON value, found ${describe()}`);
  }

  function parseObject(at: Position, depth: number): JsonNode {
    i++;
    const entries: JsonEntry[] = [];
    skipSpace();
    if (text[i] === '}') {
      i++;
      return { ...at, kind: 'object', entries };
    }
    for (;;) {
      skipSpace();
      const keyAt = here();
      if (text[i] !== '"') fail(`expected a quoted key, found ${describe()}`);
      const key = parseString();
      skipSpace();
      if (text[i] !== ':') fail(`expected ':' after key "${key}", found ${describe()}`);
      i++;
      const value = parseValue(depth + 1);
      entries.push({ key, keyAt, value });
      skipSpace();
      if (text[i] === ',') {
        i++;
        continue;
      }
      if (text[i] === '}') {
        i++;
        return { ...at, kind: 'object', entries };
      }
      fail(`expected ',' or '}' in object, found ${describe()}`);
    }
  }

  function parseArray(at: Position, depth: number): JsonNode {
    i++;
    const items: JsonNode[] = [];
    skipSpace();
    if (text[i] === ']') {
      i++;
      return { ...at, kind: 'array', items };
    }
    for (;;) {
      items.push(parseValue(depth + 1));
      skipSpace();
      if (text[i] === ',') {
        i++;
        continue;
      }
      if (text[i] === ']') {
        i++;
        return { ...at, kind: 'array', items };
      }
      fail(`expected ',' or ']' in array, found ${describe()}`);
    }
  }

  function parseString(): string {
    const start = here();
    i++;
    let out = '';
    let segment = i;
    for (;;) {
      if (i >= text.length) fail('unterminated string', start);
      const c = text.charCodeAt(i);
      if (c === 0x22) {
        out += text.slice(segment, i);
        i++;
        return out;
      }
      if (c < 0x20) fail('control character in string: escape it (e.g. \\n)');
      if (c === 0x5c) {
        out += text.slice(segment, i);
        const e = text[i + 1];
        const simple: Record<string, string> = { '"': '"', '\\': '\\', '/': '/', b: '\b', f: '\f', n: '\n', r: '\r', t: '\t' };
        if (e !== undefined && e in simple) {
          out += simple[e];
          i += 2;
        } else if (e === 'u' && /^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) {
          out += String.fromCharCode(parseInt(text.slice(i + 2, i + 6), 16));
          i += 6;
        } else fail('invalid escape sequence in string');
        segment = i;
        continue;
      }
      i++;
    }
  }

  function parseNumber(): number {
    const m = /^-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?/.exec(text.slice(i, i + 400));
    if (!m) return fail('invalid number');
    i += m[0].length;
    return Number(m[0]);
  }

  const root = parseValue(0);
  skipSpace();
  if (i < text.length) fail(`unexpected ${describe()} after the JSON value`);
  return root;
}

/** The plain JavaScript value of a node (later duplicate keys win, as with JSON.parse). */
export function plainValue(node: JsonNode): unknown {
  switch (node.kind) {
    case 'object': {
      const out: Record<string, unknown> = {};
      // defineProperty: a key named "__proto__" stays a plain key.
      for (const e of node.entries)
        Object.defineProperty(out, e.key, { value: plainValue(e.value), enumerable: true, writable: true, configurable: true });
      return out;
    }
    case 'array':
      return node.items.map(plainValue);
    default:
      return node.value;
  }
}
