// Starts and stops code-server (a real VS Code whose extension host is plain Node) for one test
// run, with its own extensions, user-data and config folders so that nothing leaks between runs.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, readdirSync, writeFileSync } from 'node:fs';
import * as net from 'node:net';
import * as path from 'node:path';
import { codeServerBin } from './paths';

export interface CodeServerFolders {
  extensionsDir: string;
  userDataDir: string;
  /** XDG config and data homes, so code-server writes no config.yaml into the user's home. */
  homeDir: string;
}

export interface RunningCodeServer {
  url: string;
  /** Stops the server and everything it started (its process group); safe to call twice. */
  stop(): Promise<void>;
}

const installTimeoutMs = 120_000;
const startTimeoutMs = 90_000;

function isolatedEnvironment(folders: CodeServerFolders): NodeJS.ProcessEnv {
  return {
    ...process.env,
    XDG_CONFIG_HOME: path.join(folders.homeDir, 'config'),
    XDG_DATA_HOME: path.join(folders.homeDir, 'data'),
  };
}

function requireCodeServer(): void {
  if (!existsSync(codeServerBin)) {
    throw new Error(`code-server is not installed at ${codeServerBin}: run scripts/e2e/setup.sh first (or set E2E_CACHE)`);
  }
}

/**
 * Installs a .vsix the way a user would, then returns the folder VS Code unpacked it into.
 * Throws with code-server's output when the install fails.
 */
export function installExtension(vsixPath: string, folders: CodeServerFolders): string {
  requireCodeServer();
  if (!existsSync(vsixPath)) throw new Error(`no .vsix at ${vsixPath}: run \`npm run package\` first`);
  const result = spawnSync(
    codeServerBin,
    ['--extensions-dir', folders.extensionsDir, '--user-data-dir', folders.userDataDir, '--install-extension', vsixPath, '--force'],
    { env: isolatedEnvironment(folders), encoding: 'utf8', timeout: installTimeoutMs },
  );
  const output = `${result.stdout ?? ''}${result.stderr ?? ''}`.trim();
  if (result.error) throw new Error(`installing ${vsixPath} failed: ${result.error.message}\n${output}`);
  if (result.status !== 0) throw new Error(`installing ${vsixPath} failed (exit ${result.status}):\n${output}`);
  const installed = existsSync(folders.extensionsDir)
    ? readdirSync(folders.extensionsDir, { withFileTypes: true }).filter((entry) => entry.isDirectory() && !entry.name.startsWith('.'))
    : [];
  if (installed.length !== 1) {
    throw new Error(
      `expected one extension folder in ${folders.extensionsDir} after installing, found: ${installed.map((e) => e.name).join(', ') || 'none'}\n${output}`,
    );
  }
  return path.join(folders.extensionsDir, installed[0].name);
}

/** A port that was free a moment ago on 127.0.0.1 (the OS picks it). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      server.close(() => (port > 0 ? resolve(port) : reject(new Error('could not find a free port'))));
    });
  });
}

async function waitUntilHealthy(url: string, child: ChildProcess, logFile: string): Promise<void> {
  const deadline = Date.now() + startTimeoutMs;
  while (Date.now() < deadline) {
    if (child.exitCode !== null || child.signalCode !== null) {
      throw new Error(`code-server exited during start-up (exit ${child.exitCode ?? child.signalCode}); see ${logFile}`);
    }
    try {
      const response = await fetch(new URL('healthz', url), { signal: AbortSignal.timeout(2_000) });
      if (response.ok) return;
    } catch {
      // Not listening yet.
    }
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`code-server did not answer on ${url} within ${startTimeoutMs / 1000} s; see ${logFile}`);
}

/** Signals the whole group, even after its leader exited: code-server's own child may outlive it. */
function killGroup(child: ChildProcess, signal: NodeJS.Signals): void {
  if (child.pid === undefined) return;
  try {
    process.kill(-child.pid, signal);
  } catch {
    // Already gone.
  }
}

/** User settings for a quiet, predictable workbench: no welcome page, tips or telemetry. */
const testUserSettings = {
  'workbench.startupEditor': 'none',
  'workbench.tips.enabled': false,
  'telemetry.telemetryLevel': 'off',
  'extensions.autoCheckUpdates': false,
  'extensions.autoUpdate': false,
};

export async function startCodeServer(folder: string, folders: CodeServerFolders, logFile: string): Promise<RunningCodeServer> {
  requireCodeServer();
  mkdirSync(path.join(folders.userDataDir, 'User'), { recursive: true });
  writeFileSync(path.join(folders.userDataDir, 'User', 'settings.json'), JSON.stringify(testUserSettings, null, 2));
  const port = await freePort();
  const url = `http://127.0.0.1:${port}/`;
  const log = openSync(logFile, 'w');
  const args = [
    '--auth', 'none',
    '--bind-addr', `127.0.0.1:${port}`,
    '--extensions-dir', folders.extensionsDir,
    '--user-data-dir', folders.userDataDir,
    '--disable-telemetry',
    '--disable-update-check',
    '--disable-workspace-trust',
    folder,
  ]; // prettier-ignore
  // Its own process group, so stop() also ends the extension host and the workers it started.
  const child = spawn(codeServerBin, args, { detached: true, stdio: ['ignore', log, log], env: isolatedEnvironment(folders) });
  closeSync(log);
  // If the driver dies without cleaning up, the server must not outlive it.
  const killOnExit = (): void => killGroup(child, 'SIGKILL');
  process.once('exit', killOnExit);

  let stopped: Promise<void> | undefined;
  const stop = (): Promise<void> => {
    stopped ??= (async () => {
      process.removeListener('exit', killOnExit);
      if (child.exitCode !== null || child.signalCode !== null) {
        killGroup(child, 'SIGKILL');
        return;
      }
      const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
      killGroup(child, 'SIGTERM');
      const graceful = await Promise.race([exited.then(() => true), new Promise<boolean>((r) => setTimeout(() => r(false), 5_000))]);
      if (!graceful) killGroup(child, 'SIGKILL');
      // Children of the group may still be exiting after the leader; one last sweep.
      killGroup(child, 'SIGKILL');
    })();
    return stopped;
  };

  try {
    await waitUntilHealthy(url, child, logFile);
  } catch (error) {
    await stop();
    throw error;
  }
  return { url, stop };
}
