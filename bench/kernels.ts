// Graph kernel timings (medians of 5 runs after a warm-up) beside PyTorch on the same shapes:
// timed here when Debian's python3-torch is installed, otherwise the FIELD-NOTES figures.
// Prints figures only; run alone with `npx tsx bench/kernels.ts` (add --quick for 20k only).
import { spawnSync } from 'node:child_process';
import { availableParallelism, loadavg } from 'node:os';
import * as tf from '@tensorflow/tfjs';
import type { EdgeList } from '../src/engine/dataset/types';
import { buildAdjacency, type CsrMatrix } from '../src/engine/graph/csr';
import { symmetricNormalized } from '../src/engine/graph/normalize';
import { SpmmPool } from '../src/engine/graph/parallelSpmm';
import { spmm, spmmTransposed } from '../src/engine/graph/spmm';
import { setSimdEnabled, simdAvailable } from '../src/engine/simd/kernels';
import { initTensorflow } from '../src/engine/tf/backend';
import { sparseMatMul } from '../src/engine/tf/sparseMatMul';
import { SeededRandom } from '../src/engine/util/random';

export interface KernelBenchmarkShape {
  nodes: number;
  edges: number;
  columns: number;
}

export const KERNEL_BENCHMARK_SHAPES: KernelBenchmarkShape[] = [
  { nodes: 20_000, edges: 200_000, columns: 64 },
  { nodes: 100_000, edges: 1_000_000, columns: 128 },
];
const RUNS = 5;

type KernelName = 'normalize' | 'spmm' | 'spmmTransposed' | 'forwardBackward' | 'propagate';

// PyTorch 1.13 on this kind of machine, 2 threads (FIELD-NOTES): the CSR product at 20k and the
// propagate stage (coalesce + normalise + two products) of the pipeline at 100k. The naive JS
// loop's 125 ms beside the 47 ms suggests about 200,000 stored entries there, half of Â's here
// (each edge stored twice, plus self-loops): the torch column timed on this shape is the fairer one.
const FIELD_NOTES_MS: Record<string, number> = { 'spmm 20000': 47, 'propagate 100000': 1800 };

// Same shapes in PyTorch: a uniform random graph, the normalisation of
// shared/reference/torch_pipeline.py, then the products. Prints one JSON object of medians (ms).
const TORCH_SCRIPT = `
import json, sys, time
import numpy as np, torch
torch.set_num_threads(2)
n, m, cols, runs = (int(v) for v in sys.argv[1:5])
rng = np.random.default_rng(1)
E = rng.integers(0, n, size=(m, 2))
X = torch.from_numpy(rng.standard_normal((n, cols)).astype(np.float32))
def normalised():
    src = np.concatenate([E[:, 0], E[:, 1], np.arange(n)]); dst = np.concatenate([E[:, 1], E[:, 0], np.arange(n)])
    deg = np.bincount(dst, minlength=n).astype(np.float32)
    w = (deg[src] ** -0.5) * (deg[dst] ** -0.5)
    return torch.sparse_coo_tensor(torch.from_numpy(np.stack([dst, src])), torch.from_numpy(w.astype(np.float32)), (n, n)).coalesce()
def median(f):
    f(); wall = []; cpu = []
    for _ in range(runs):
        t = time.perf_counter(); c = time.process_time(); f()
        wall.append((time.perf_counter() - t) * 1000); cpu.append((time.process_time() - c) * 1000)
    return [sorted(wall)[len(wall) // 2], sorted(cpu)[len(cpu) // 2]]
coo = normalised(); A = coo.to_sparse_csr()
def fb():
    H = X.clone().requires_grad_(True)
    torch.sparse.mm(coo, H).sum().backward()
def propagate():
    A2 = normalised().to_sparse_csr(); AX = A2 @ X; A2X = A2 @ AX; return torch.cat([X, AX, A2X], 1)
out = {
  'normalize': median(lambda: normalised().to_sparse_csr()),
  'spmm': median(lambda: A @ X),
  'spmmTransposed': median(lambda: A.t() @ X),
  'forwardBackward': median(fb),
  'propagate': median(propagate),
}
print(json.dumps(out))
`;

function randomEdges(shape: KernelBenchmarkShape, seed: number): EdgeList {
  const random = new SeededRandom(seed);
  const source = new Int32Array(shape.edges);
  const target = new Int32Array(shape.edges);
  for (let e = 0; e < shape.edges; e++) {
    source[e] = random.int(shape.nodes);
    target[e] = random.int(shape.nodes);
  }
  return { source, target, weight: null, count: shape.edges };
}

function randomFeatures(length: number, seed: number): Float32Array {
  const random = new SeededRandom(seed);
  const out = new Float32Array(length);
  for (let i = 0; i < length; i++) out[i] = random.normal();
  return out;
}

/** Wall and CPU time in ms. CPU time is the whole process's (all threads), user + system. */
type Timing = [wall: number, cpu: number];

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
}

async function medianMs(run: () => unknown): Promise<Timing> {
  await run();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const startCpu = process.cpuUsage();
    const start = performance.now();
    await run();
    wall.push(performance.now() - start);
    const used = process.cpuUsage(startCpu);
    cpu.push((used.user + used.system) / 1000);
  }
  return [median(wall), median(cpu)];
}

/** Runs with the SIMD kernels switched off, so that the JavaScript loops are timed. */
async function jsOnly<T>(run: () => Promise<T>): Promise<T> {
  const previous = setSimdEnabled(false);
  try {
    return await run();
  } finally {
    setSimdEnabled(previous);
  }
}

function findPython(): string | undefined {
  // pyenv or venv interpreters often lack Debian's torch; /usr/bin/python3 is where apt puts it.
  for (const python of ['python3', '/usr/bin/python3']) {
    const probe = spawnSync(python, ['-c', 'import torch'], { stdio: 'ignore' });
    if (probe.status === 0) return python;
  }
  return undefined;
}

function torchTimings(python: string, shape: KernelBenchmarkShape): Partial<Record<KernelName, Timing>> | undefined {
  const result = spawnSync(python, ['-c', TORCH_SCRIPT, String(shape.nodes), String(shape.edges), String(shape.columns), String(RUNS)], {
    encoding: 'utf8',
    maxBuffer: 1 << 20,
  });
  if (result.status !== 0) return undefined;
  const lastLine = result.stdout.trim().split('\n').pop() ?? '';
  try {
    return JSON.parse(lastLine) as Partial<Record<KernelName, Timing>>;
  } catch {
    return undefined;
  }
}

function formatMs(ms: number | undefined): string {
  if (ms === undefined) return '—';
  return ms >= 100 ? ms.toFixed(0) : ms.toFixed(1);
}

function row(cells: string[], widths: number[]): string {
  return cells.map((cell, i) => (i === 0 ? cell.padEnd(widths[i]) : cell.padStart(widths[i]))).join('  ');
}

async function benchmarkShape(
  shape: KernelBenchmarkShape,
  pool: SpmmPool,
  print: (line: string) => void,
  torch: Partial<Record<KernelName, Timing>> | undefined,
): Promise<void> {
  const edges = randomEdges(shape, 1);
  const features = randomFeatures(shape.nodes * shape.columns, 2);
  let normalized: CsrMatrix = symmetricNormalized(buildAdjacency(shape.nodes, edges, true));
  const ours: Array<[string, KernelName | undefined, Timing]> = [];

  ours.push([
    'buildAdjacency + symmetricNormalized',
    'normalize',
    await medianMs(() => (normalized = symmetricNormalized(buildAdjacency(shape.nodes, edges, true)))),
  ]);
  const out = new Float32Array(shape.nodes * shape.columns);
  const simd = simdAvailable() ? 'WebAssembly SIMD' : 'JS (no SIMD here)';
  ours.push(['spmm, 1 thread, JS loop', 'spmm', await jsOnly(() => medianMs(() => spmm(normalized, features, shape.columns, out)))]);
  ours.push([`spmm, 1 thread, ${simd}`, 'spmm', await medianMs(() => spmm(normalized, features, shape.columns, out))]);
  ours.push([`SpmmPool, ${pool.threadCount} threads`, 'spmm', await medianMs(() => pool.multiply(normalized, features, shape.columns))]);
  ours.push([
    'spmmTransposed, 1 thread, JS loop',
    'spmmTransposed',
    await jsOnly(() => medianMs(() => spmmTransposed(normalized, features, shape.columns, out))),
  ]);
  ours.push([
    `spmmTransposed, 1 thread, ${simd}`,
    'spmmTransposed',
    await medianMs(() => spmmTransposed(normalized, features, shape.columns, out)),
  ]);

  const h = tf.tensor2d(features, [shape.nodes, shape.columns]);
  // Â is symmetric, so it is its own transpose: the gradient gathers rows like the forward pass.
  const forwardBackward = tf.grad((x: tf.Tensor) => tf.sum(sparseMatMul(normalized, x as tf.Tensor2D, normalized)));
  ours.push([
    `sparseMatMul forward + backward (${tf.getBackend()})`,
    'forwardBackward',
    await medianMs(() => {
      // Nothing is returned from tidy: it would walk every element of a returned typed array.
      tf.tidy(() => {
        forwardBackward(h).dataSync();
      });
    }),
  ]);
  h.dispose();

  const propagate = (multiply: (a: CsrMatrix, dense: Float32Array) => Float32Array | Promise<Float32Array>) => async () => {
    const a = symmetricNormalized(buildAdjacency(shape.nodes, edges, true));
    const once = await multiply(a, features);
    return [features, once, await multiply(a, once)];
  };
  ours.push([
    'propagate [X, ÂX, Â²X], 1 thread, JS loop',
    'propagate',
    await jsOnly(() => medianMs(propagate((a, dense) => spmm(a, dense, shape.columns)))),
  ]);
  ours.push([
    `propagate [X, ÂX, Â²X], 1 thread, ${simd}`,
    'propagate',
    await medianMs(propagate((a, dense) => spmm(a, dense, shape.columns))),
  ]);
  ours.push([
    `propagate [X, ÂX, Â²X], ${pool.threadCount} threads`,
    'propagate',
    await medianMs(propagate((a, dense) => pool.multiply(a, dense, shape.columns))),
  ]);

  const widths = [52, 9, 9, 10, 10, 8, 8];
  print('');
  print(
    `${shape.nodes.toLocaleString('en')} nodes, ${shape.edges.toLocaleString('en')} edges (${normalized.rowPtr[shape.nodes].toLocaleString('en')} entries in Â), ${shape.columns} columns`,
  );
  print(row(['kernel', 'ours ms', 'ours cpu', 'torch ms', 'torch cpu', 'notes', 'ratio'], widths));
  for (const [label, kernel, [wall, cpu]] of ours) {
    const here = kernel ? torch?.[kernel] : undefined;
    const noted = kernel ? FIELD_NOTES_MS[`${kernel} ${shape.nodes}`] : undefined;
    const reference = here ? here[0] : noted;
    const ratio = reference ? `${(wall / reference).toFixed(2)}×` : '—';
    print(row([label, formatMs(wall), formatMs(cpu), formatMs(here?.[0]), formatMs(here?.[1]), formatMs(noted), ratio], widths));
  }
}

/** Prints the kernel table for both shapes. */
export async function runKernelBenchmarks(
  print: (line: string) => void,
  shapes: KernelBenchmarkShape[] = KERNEL_BENCHMARK_SHAPES,
): Promise<void> {
  const backend = await initTensorflow('wasm');
  const python = findPython();
  print(
    `Graph kernels — medians of ${RUNS} runs after a warm-up; tfjs backend ${backend}; load average ${loadavg()[0].toFixed(1)} on ${availableParallelism()} cores.`,
  );
  print("ms = wall time; cpu = process CPU time over all threads (on a busy machine, the better guide to one thread's own cost).");
  print(
    python
      ? `PyTorch timed here (${python}, 2 threads, same shapes, its own random graph); ratio = ours / torch wall time here.`
      : 'PyTorch not installed (apt-get install -y python3-torch): ratio against the FIELD-NOTES figures (notes) only.',
  );
  const pool = await SpmmPool.create(2);
  try {
    for (const shape of shapes) {
      const torch = python ? torchTimings(python, shape) : undefined;
      if (python && !torch) print(`(PyTorch run failed for ${shape.nodes} nodes; using FIELD-NOTES figures)`);
      await benchmarkShape(shape, pool, print, torch);
    }
  } finally {
    await pool.dispose();
  }
}

if (/kernels\.[cm]?[jt]s$/.test(process.argv[1] ?? '')) {
  const shapes = process.argv.includes('--quick') ? KERNEL_BENCHMARK_SHAPES.slice(0, 1) : KERNEL_BENCHMARK_SHAPES;
  runKernelBenchmarks((line) => console.log(line), shapes).catch((error) => {
    console.error(error);
    process.exit(1);
  });
}
