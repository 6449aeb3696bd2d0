import assert from 'node:assert/strict';
import { parse } from 'csv-parse/sync';
import { CsvTokenizer, firstInvalidUtf8, parseCsvBytes, type CsvRow } from '../../src/engine/dataset/csv';
import { SeededRandom } from '../../src/engine/util/random';

interface Parsed {
  header: string[] | null;
  rows: { fields: string[]; line: number; fieldLines: number[]; fieldColumns: number[] }[];
  problems: string[];
}

const copyRow = (row: CsvRow) => ({
  fields: [...row.fields],
  line: row.line,
  fieldLines: [...row.fieldLines],
  fieldColumns: [...row.fieldColumns],
});

function parseText(input: string | Uint8Array): Parsed {
  const bytes = typeof input === 'string' ? new TextEncoder().encode(input) : input;
  const rows: Parsed['rows'] = [];
  const result = parseCsvBytes(bytes, 'f.csv', (row) => rows.push(copyRow(row)));
  return {
    header: result.header?.fields ?? null,
    rows,
    problems: result.problems.map((p) => `${p.file}:${p.line}:${p.column}: ${p.message}`),
  };
}

/** Same input fed one byte at a time: every chunk boundary (including inside UTF-8 sequences). */
function parseByteByByte(input: string | Uint8Array): Parsed {
  const bytes = typeof input === 'string' ? new TextEncoder().encode(input) : input;
  const rows: Parsed['rows'] = [];
  const tokenizer = new CsvTokenizer('f.csv', (row) => rows.push(copyRow(row)));
  for (let i = 0; i < bytes.length; i++) tokenizer.push(bytes.subarray(i, i + 1));
  tokenizer.end();
  return {
    header: tokenizer.header?.fields ?? null,
    rows,
    problems: tokenizer.problems.map((p) => `${p.file}:${p.line}:${p.column}: ${p.message}`),
  };
}

describe('csv tokenizer', () => {
  it('reads quoted fields with embedded newlines, quotes and commas, and records where each field starts', () => {
    const text = 'id,text,n\na,"line one\nline two, with comma",1\nb,"say ""hi""",2\n';
    const parsed = parseText(text);
    assert.deepEqual(parsed.header, ['id', 'text', 'n']);
    assert.deepEqual(parsed.rows[0].fields, ['a', 'line one\nline two, with comma', '1']);
    assert.equal(parsed.rows[0].line, 2);
    assert.deepEqual(parsed.rows[0].fieldLines, [2, 2, 3]);
    assert.deepEqual(parsed.rows[0].fieldColumns, [1, 3, 23]);
    // The record after a two-line record starts on line 4.
    assert.deepEqual(parsed.rows[1], { fields: ['b', 'say "hi"', '2'], line: 4, fieldLines: [4, 4, 4], fieldColumns: [1, 3, 16] });
    assert.deepEqual(parsed.problems, []);
  });

  it('accepts CRLF, LF and a trailing empty line alike', () => {
    const lf = parseText('a,b\n1,2\n3,4\n\n');
    const crlf = parseText('a,b\r\n1,2\r\n3,4\r\n\r\n');
    const noFinalBreak = parseText('a,b\n1,2\n3,4');
    for (const p of [lf, crlf, noFinalBreak]) {
      assert.deepEqual(
        p.rows.map((r) => r.fields),
        [
          ['1', '2'],
          ['3', '4'],
        ],
      );
      assert.deepEqual(
        p.rows.map((r) => r.line),
        [2, 3],
      );
      assert.deepEqual(p.problems, []);
    }
    // A quoted CRLF stays in the field and counts as one line break.
    const quoted = parseText('a,b\r\n"x\r\ny",2\r\nz,3\r\n');
    assert.deepEqual(
      quoted.rows.map((r) => r.fields),
      [
        ['x\r\ny', '2'],
        ['z', '3'],
      ],
    );
    assert.deepEqual(
      quoted.rows.map((r) => r.line),
      [2, 4],
    );
  });

  it('drops a UTF-8 BOM and does not count it in columns', () => {
    const parsed = parseText('\uFEFFid,x\nn1,"bad\n');
    assert.deepEqual(parsed.header, ['id', 'x']);
    assert.deepEqual(parsed.problems, ['f.csv:2:4: unterminated quoted field: the closing quote (") is missing']);
  });

  it('keeps an empty last field and empty quoted fields', () => {
    const parsed = parseText('a,b,c\n1,,\n"",x,""\n');
    assert.deepEqual(
      parsed.rows.map((r) => r.fields),
      [
        ['1', '', ''],
        ['', 'x', ''],
      ],
    );
  });

  it('reports ragged rows where the extra field starts, or where a short row ends', () => {
    const parsed = parseText('a,b,c\n1,2,3,4\n1,2\n1,2,3\n');
    assert.deepEqual(parsed.problems, [
      'f.csv:2:7: ragged row: 4 fields, the header has 3',
      'f.csv:3:4: ragged row: 2 fields, the header has 3',
    ]);
    assert.deepEqual(
      parsed.rows.map((r) => r.fields),
      [['1', '2', '3']],
    );
  });

  it('reports an unterminated quote at the opening quote, even many lines earlier', () => {
    const parsed = parseText('a,b\n1,2\n3,"open\nmore\nstill more\n');
    assert.deepEqual(parsed.problems, ['f.csv:3:3: unterminated quoted field: the closing quote (") is missing']);
  });

  it('reports a character after a closing quote', () => {
    assert.deepEqual(parseText('a,b\n"x"y,2\n').problems, [
      'f.csv:2:4: unexpected character after a closing quote: a quoted field must end at a comma or line end',
    ]);
  });

  it('rejects invalid UTF-8 at the line and column of the bad byte', () => {
    const bytes = new Uint8Array([...new TextEncoder().encode('a,b\nné,x'), 0xc3, 0x28, ...new TextEncoder().encode('\n')]);
    assert.deepEqual(parseText(bytes).problems, ['f.csv:2:5: invalid UTF-8 byte sequence: save the file as UTF-8']);
    // A sequence cut off at the end of the file.
    const truncated = new Uint8Array([...new TextEncoder().encode('a\nb'), 0xe2, 0x82]);
    assert.deepEqual(parseText(truncated).problems, ['f.csv:2:2: invalid UTF-8 byte sequence: save the file as UTF-8']);
  });

  it('reports an empty file', () => {
    assert.deepEqual(parseText('').problems, ['f.csv:1:1: empty file: expected a header line']);
    assert.deepEqual(parseText('\uFEFF\n\n').problems, ['f.csv:1:1: empty file: expected a header line']);
  });

  it('gives the same rows and problems whatever the chunk boundaries', () => {
    const inputs = [
      'id,text\r\n"é1","multi\r\nline ""q"" ✓"\r\nb,😀 emoji\r\n',
      'a,b\n1,2,3\n"x"y,1\n"unterminated',
      new Uint8Array([...new TextEncoder().encode('a,b\nx,ü'), 0xff]),
    ];
    for (const input of inputs) assert.deepEqual(parseByteByByte(input), parseText(input));
  });

  it('validates UTF-8 like the WHATWG decoder (overlongs, surrogates, out of range)', () => {
    const cases: number[][] = [
      [0xc0, 0x80],
      [0xe0, 0x80, 0x80],
      [0xed, 0xa0, 0x80],
      [0xf4, 0x90, 0x80, 0x80],
      [0xf8],
      [0x80],
      [0xe2, 0x82, 0xac],
      [0xf0, 0x9f, 0x98, 0x80],
    ];
    for (const c of cases) {
      const bytes = new Uint8Array([0x41, ...c]);
      let valid = true;
      try {
        new TextDecoder('utf-8', { fatal: true }).decode(bytes);
      } catch {
        valid = false;
      }
      assert.equal(firstInvalidUtf8(bytes) === bytes.length, valid, `bytes ${c.map((b) => b.toString(16)).join(' ')}`);
    }
  });

  it('agrees with csv-parse (a general-purpose CSV library) on random well-formed files', () => {
    // Reference: csv-parse's RFC 4180 reading of the same text.
    const random = new SeededRandom(2024);
    const alphabet = ['a', 'b', ',', '"', '\n', '\r\n', ' ', 'é', '😀', '1'];
    for (let trial = 0; trial < 200; trial++) {
      const columns = 1 + random.int(4);
      const rowCount = 1 + random.int(6);
      const records: string[][] = [];
      for (let r = 0; r < rowCount; r++) {
        const record: string[] = [];
        for (let c = 0; c < columns; c++) {
          let field = '';
          const length = random.int(6);
          for (let k = 0; k < length; k++) field += alphabet[random.int(alphabet.length)];
          record.push(field);
        }
        // A record of one empty field is an empty line, which both readers skip.
        if (columns === 1 && record[0] === '') record[0] = 'x';
        records.push(record);
      }
      const quote = (f: string) => (/[",\r\n]/.test(f) || random.next() < 0.2 ? `"${f.replace(/"/g, '""')}"` : f);
      const eol = random.next() < 0.5 ? '\n' : '\r\n';
      const text = records.map((r) => r.map(quote).join(',')).join(eol) + (random.next() < 0.5 ? eol : '');
      const reference: string[][] = parse(text, { relax_column_count: true, skip_empty_lines: true });
      const ours = parseText(text);
      assert.deepEqual([ours.header, ...ours.rows.map((r) => r.fields)], reference, JSON.stringify(text));
      assert.deepEqual(reference, records);
    }
  });
});
