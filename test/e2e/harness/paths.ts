// Where the end-to-end harness finds its tools and writes its output. The cache folder default
// must match scripts/e2e/setup.sh, which installs code-server there.
import { readFileSync } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';

export const repoRoot = path.resolve(__dirname, '..', '..', '..');

export const e2eCacheDir = process.env.E2E_CACHE ?? path.join(os.homedir(), '.cache', 'graph-curator-e2e');

export const codeServerBin = path.join(e2eCacheDir, 'node_modules', '.bin', 'code-server');

export const chromiumPath = process.env.E2E_CHROMIUM ?? '/usr/bin/chromium';

export const demoDatasetFolder = path.join(repoRoot, 'demo-data', 'wind-farm');

/** Screenshots of every step, named in step order; the README points readers here. */
export const screenshotsDir = path.join(repoRoot, 'test-output', 'e2e-screenshots');

/** code-server's own log and, after a failure, VS Code's logs (extension host, output channels). */
export const logsDir = path.join(repoRoot, 'test-output', 'e2e-logs');

interface ExtensionManifest {
  name: string;
  publisher: string;
  version: string;
}

export function readManifest(): ExtensionManifest {
  const manifest = JSON.parse(readFileSync(path.join(repoRoot, 'package.json'), 'utf8')) as ExtensionManifest;
  return { name: manifest.name, publisher: manifest.publisher, version: manifest.version };
}

/** The file `vsce package` writes by default: <name>-<version>.vsix in the project folder. */
export function defaultVsixPath(): string {
  const { name, version } = readManifest();
  return path.join(repoRoot, `${name}-${version}.vsix`);
}

/** The folder VS Code unpacks the extension into: <publisher>.<name>-<version>. */
export function installedExtensionFolderName(): string {
  const { name, publisher, version } = readManifest();
  return `${publisher}.${name}-${version}`.toLowerCase();
}
