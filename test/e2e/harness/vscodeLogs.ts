// Reads what VS Code logged in a run's user-data folder: an extension's output channel is also
// written to a file there, which is easier to check in full than the panel's visible lines.
import { cpSync, existsSync, readdirSync, readFileSync } from 'node:fs';
import * as path from 'node:path';

function filesUnder(folder: string): string[] {
  if (!existsSync(folder)) return [];
  return readdirSync(folder, { withFileTypes: true, recursive: true })
    .filter((entry) => entry.isFile())
    .map((entry) => path.join(entry.parentPath, entry.name));
}

/** The text of every output channel named `channelName` that VS Code logged in this run. */
export function outputChannelText(userDataDir: string, channelName: string): string {
  const suffix = `-${channelName}.log`;
  return filesUnder(path.join(userDataDir, 'logs'))
    .filter((file) => path.basename(file).endsWith(suffix))
    .map((file) => readFileSync(file, 'utf8'))
    .join('\n');
}

/** Copies VS Code's logs (window, extension host, output channels) next to the screenshots. */
export function keepVscodeLogs(userDataDir: string, destination: string): void {
  const logs = path.join(userDataDir, 'logs');
  if (existsSync(logs)) cpSync(logs, destination, { recursive: true });
}
