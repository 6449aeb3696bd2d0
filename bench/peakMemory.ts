// Peak resident memory of this process, per stage: Linux keeps the high-water mark in
// /proc/self/status (VmHWM) and resets it when 5 is written to /proc/self/clear_refs.
import { readFileSync, writeFileSync } from 'node:fs';

export function resetPeakMemory(): boolean {
  try {
    writeFileSync('/proc/self/clear_refs', '5');
    return true;
  } catch {
    return false;
  }
}

/** Peak resident set size in bytes since the last reset (falls back to the current RSS). */
export function peakMemoryBytes(): number {
  try {
    const match = /VmHWM:\s+(\d+) kB/.exec(readFileSync('/proc/self/status', 'utf8'));
    if (match) return Number(match[1]) * 1024;
  } catch {
    // not Linux
  }
  return process.memoryUsage().rss;
}

export function formatBytes(bytes: number): string {
  return bytes >= 1 << 30 ? `${(bytes / (1 << 30)).toFixed(2)} GiB` : `${(bytes / (1 << 20)).toFixed(0)} MiB`;
}
