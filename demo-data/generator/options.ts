// Command-line options of the demo-data generator. The defaults produce the bundled copy in
// demo-data/wind-farm, so `npm run demo-data` with no arguments regenerates it exactly.

export interface DemoOptions {
  /** Number of reports (nodes). */
  nodes: number;
  /** Width of Gaussian features written to features.npy; 0 = no npy, TF-IDF from the text. */
  features: number;
  /** Mean number of earlier reports each report refers to. */
  edgesPerNode: number;
  seed: number;
  /** Output folder; the truth file goes beside it as `<out>.truth.csv`. */
  out: string;
  /** Overwrite a folder whose label log already holds curated changes. */
  force: boolean;
}

export const DEFAULT_DEMO_OPTIONS: DemoOptions = {
  nodes: 3000,
  features: 0,
  edgesPerNode: 3,
  seed: 7,
  out: 'demo-data/wind-farm',
  force: false,
};

/** The smallest graph in which every failure mode, the drift and the label decline all show. */
export const MIN_NODES = 200;

export const USAGE = `Usage: demo-generator [--nodes N] [--features D] [--edges-per-node E] [--seed S] [--out DIR] [--force]
  --nodes N            number of reports (default ${DEFAULT_DEMO_OPTIONS.nodes}, at least ${MIN_NODES})
  --features D         also write D-dimensional Gaussian features to features.npy (default: none, TF-IDF)
  --edges-per-node E   mean number of earlier reports each report refers to (default ${DEFAULT_DEMO_OPTIONS.edgesPerNode})
  --seed S             random seed (default ${DEFAULT_DEMO_OPTIONS.seed})
  --out DIR            dataset folder (default ${DEFAULT_DEMO_OPTIONS.out}); ground truth goes to DIR.truth.csv
  --force              overwrite even if DIR/label-log.jsonl holds curated label changes`;

export class UsageError extends Error {
  constructor(message: string) {
    super(`${message}\n${USAGE}`);
    this.name = 'UsageError';
  }
}

function integerValue(flag: string, raw: string | undefined, min: number, max: number): number {
  if (raw === undefined || raw.startsWith('--')) throw new UsageError(`${flag} needs a value`);
  if (!/^-?\d+$/.test(raw)) throw new UsageError(`${flag} must be an integer, got "${raw}"`);
  const value = Number(raw);
  if (value < min || value > max) throw new UsageError(`${flag} must be between ${min} and ${max}, got ${value}`);
  return value;
}

/** Parses argv (without the node and script entries). Returns null when help was asked for. */
export function parseDemoArgs(argv: string[]): DemoOptions | null {
  const options: DemoOptions = { ...DEFAULT_DEMO_OPTIONS };
  for (let i = 0; i < argv.length; i++) {
    const flag = argv[i];
    const value = argv[i + 1];
    switch (flag) {
      case '--help':
      case '-h':
        return null;
      case '--nodes':
        options.nodes = integerValue(flag, value, MIN_NODES, 9_999_999);
        i++;
        break;
      case '--features':
        options.features = integerValue(flag, value, 1, 4096);
        i++;
        break;
      case '--edges-per-node':
        options.edgesPerNode = integerValue(flag, value, 1, 100);
        i++;
        break;
      case '--seed':
        options.seed = integerValue(flag, value, 0, 0xffffffff);
        i++;
        break;
      case '--out':
        if (value === undefined || value.startsWith('--') || value.trim() === '') throw new UsageError('--out needs a folder');
        options.out = value;
        i++;
        break;
      case '--force':
        options.force = true;
        break;
      default:
        throw new UsageError(`unknown argument "${flag}"`);
    }
  }
  return options;
}
