// `npm run bench`: figures, never pass/fail. Sizes can be narrowed with --quick (10,000 nodes only).
import { runPipelineBenchmark } from './pipeline';

async function main(): Promise<void> {
  const quick = process.argv.includes('--quick');
  const print = (line: string) => console.log(line);
  print(`Evolving Graph Curator benchmark — ${new Date().toISOString()}, node ${process.version}, ${require('node:os').cpus().length} cores`);
  for (const nodes of quick ? [10_000] : [10_000, 100_000]) {
    await runPipelineBenchmark(nodes, print);
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
