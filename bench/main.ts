// `npm run bench`: figures, never pass/fail. `--quick` keeps to the smaller sizes.
import { cpus } from 'node:os';
import { runActivationBenchmark } from './activation';
import { runDiscoveryBenchmarks } from './discovery';
import { KERNEL_BENCHMARK_SHAPES, runKernelBenchmarks } from './kernels';
import { runPipelineBenchmark } from './pipeline';
import { runTrainingBenchmarks } from './training';

async function main(): Promise<void> {
  const quick = process.argv.includes('--quick');
  const print = (line: string) => console.log(line);
  print(`Evolving Graph Curator benchmark — ${new Date().toISOString()}, node ${process.version}, ${cpus().length} cores`);
  print('Figures are medians on a shared machine: compare ratios against the reference run printed beside them.');
  print('\n## Extension activation');
  runActivationBenchmark(print);
  print('\n## Graph kernels');
  await runKernelBenchmarks(print, quick ? KERNEL_BENCHMARK_SHAPES.slice(0, 1) : KERNEL_BENCHMARK_SHAPES);
  print('\n## Training step');
  await runTrainingBenchmarks(print, { full: !quick });
  print('\n## Discovery');
  runDiscoveryBenchmarks(print);
  print('\n## Whole scoring pipeline');
  for (const nodes of quick ? [10_000] : [10_000, 100_000]) {
    await runPipelineBenchmark(nodes, print);
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
