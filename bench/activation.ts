// Activation time of the bundled extension (dist/extension.js): loading the bundle and running
// activate() against a stand-in `vscode` module that accepts every call. This measures our own
// work at activation (module loading, registrations), not VS Code's; the target is under 100 ms.
import Module from 'node:module';
import * as path from 'node:path';

/** A stand-in object: every property is another stand-in, every call returns one. */
function standIn(): unknown {
  const target = function () {
    return undefined;
  };
  const proxy: unknown = new Proxy(target, {
    get: (_t, key) => {
      if (key === 'then') return undefined; // not a promise
      if (key === Symbol.toPrimitive) return () => '';
      if (key === 'fsPath' || key === 'path') return '/tmp/graph-curator-activation';
      return proxy;
    },
    apply: () => proxy,
    construct: () => proxy as object,
  });
  return proxy;
}

/** The `vscode` namespaces and classes the host uses, each a stand-in (a bundle copies own properties). */
const vscodeNames = [
  'CancellationTokenSource',
  'Diagnostic',
  'DiagnosticSeverity',
  'Disposable',
  'EventEmitter',
  'FileType',
  'Position',
  'ProgressLocation',
  'Range',
  'ThemeIcon',
  'TreeItem',
  'TreeItemCollapsibleState',
  'Uri',
  'ViewColumn',
  'commands',
  'extensions',
  'languages',
  'window',
  'workspace',
];

export function measureActivation(extensionBundle = path.resolve(__dirname, '..', 'dist', 'extension.js')): {
  loadMs: number;
  activateMs: number;
} {
  const vscodeStandIn = Object.fromEntries(vscodeNames.map((name) => [name, standIn()]));
  const anything = standIn();
  const moduleWithLoad = Module as unknown as { _load: (request: string, parent: unknown, isMain: boolean) => unknown };
  const originalLoad = moduleWithLoad._load;
  moduleWithLoad._load = (request, parent, isMain) => (request === 'vscode' ? vscodeStandIn : originalLoad(request, parent, isMain));
  try {
    const loadStarted = performance.now();
    const extension = Module.createRequire(__filename)(extensionBundle) as { activate: (context: unknown) => void };
    const loadMs = performance.now() - loadStarted;
    const context = { subscriptions: [] as unknown[], extensionUri: anything, workspaceState: anything, globalState: anything };
    const activateStarted = performance.now();
    extension.activate(context);
    return { loadMs, activateMs: performance.now() - activateStarted };
  } finally {
    moduleWithLoad._load = originalLoad;
  }
}

export function runActivationBenchmark(print: (line: string) => void): void {
  const { loadMs, activateMs } = measureActivation();
  print(
    `activation: load dist/extension.js ${loadMs.toFixed(1)} ms + activate() ${activateMs.toFixed(1)} ms = ${(loadMs + activateMs).toFixed(1)} ms (target under 100 ms; VS Code's own work not included)`,
  );
}

if (process.argv[1] && /bench[\\/]activation\.ts$/.test(process.argv[1])) runActivationBenchmark((line) => console.log(line));
