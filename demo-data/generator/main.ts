// Entry point of the demo-data generator (bundled to dist/demo-generator.js).
// With no arguments it regenerates the bundled copy in demo-data/wind-farm.
import { USAGE, UsageError, parseDemoArgs } from './options';
import { generateDemoDataset } from './writeDataset';

async function main(): Promise<void> {
  const options = parseDemoArgs(process.argv.slice(2));
  if (options === null) {
    console.log(USAGE);
    return;
  }
  const started = performance.now();
  const summary = await generateDemoDataset(options);
  const seconds = (performance.now() - started) / 1000;
  const novel = Object.entries(summary.novelCounts)
    .map(([name, count]) => `${name} ${count}`)
    .join(', ');
  console.log(
    `Wrote ${summary.folder}: ${summary.nodes} reports, ${summary.edges} references (same failure mode: ${(100 * summary.homophily).toFixed(1)}%), ` +
      `${summary.labelled} labelled, features ${summary.featureDim > 0 ? `npy ${summary.featureDim}` : 'tfidf'}; unlabelled novel modes: ${novel}.`,
  );
  console.log(`Ground truth: ${summary.truthFile}. ${seconds.toFixed(1)} s.`);
}

main().catch((error: unknown) => {
  if (error instanceof UsageError) console.error(error.message);
  else console.error(error instanceof Error ? error.message : error);
  process.exitCode = error instanceof UsageError ? 2 : 1;
});
