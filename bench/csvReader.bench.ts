// Rows per second for our streaming CSV tokenizer and for csv-parse on a generated
// 1,000,000-row `source,target,time` file. Prints figures; never passes or fails.
// Run: npx tsx bench/csvReader.bench.ts
import { createReadStream, promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { parse } from 'csv-parse';
import { readCsvFile } from '../src/engine/dataset/csv';
import { SeededRandom } from '../src/engine/util/random';

async function main(): Promise<void> {
  const rowCount = 1_000_000;
  const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'csv-bench-'));
  const file = path.join(dir, 'edges.csv');
  const random = new SeededRandom(1);
  const parts: string[] = ['source,target,time\n'];
  for (let i = 0; i < rowCount; i++)
    parts.push(`n${random.int(100_000)},n${random.int(100_000)},2021-0${1 + random.int(9)}-1${random.int(10)}\n`);
  await fs.writeFile(file, parts.join(''));
  const size = (await fs.stat(file)).size;
  console.log(`file: ${rowCount.toLocaleString('en')} rows, ${(size / 1e6).toFixed(1)} MB`);

  for (let round = 0; round < 2; round++) {
    let checksum = 0;
    let start = performance.now();
    const result = await readCsvFile(file, 'edges.csv', (row) => {
      checksum += row.fields[0].length;
    });
    let seconds = (performance.now() - start) / 1000;
    console.log(
      `ours:      ${Math.round(result.rowCount / seconds).toLocaleString('en')} rows/s (${seconds.toFixed(2)} s, includes SHA-256)`,
    );

    checksum = 0;
    let rows = 0;
    start = performance.now();
    const parser = createReadStream(file, { highWaterMark: 1 << 20 }).pipe(parse({ from_line: 2 }));
    for await (const record of parser as AsyncIterable<string[]>) {
      checksum += record[0].length;
      rows++;
    }
    seconds = (performance.now() - start) / 1000;
    console.log(`csv-parse: ${Math.round(rows / seconds).toLocaleString('en')} rows/s (${seconds.toFixed(2)} s)`);

    rows = 0;
    start = performance.now();
    const parser2 = createReadStream(file, { highWaterMark: 1 << 20 }).pipe(parse({ from_line: 2, info: true }));
    for await (const record of parser2 as AsyncIterable<{ record: string[] }>) {
      checksum += record.record[0].length;
      rows++;
    }
    seconds = (performance.now() - start) / 1000;
    console.log(`csv-parse with info (line numbers): ${Math.round(rows / seconds).toLocaleString('en')} rows/s (${seconds.toFixed(2)} s)`);
    console.log(`(checksum ${checksum})`);
  }
  await fs.rm(dir, { recursive: true, force: true });
}

void main();
