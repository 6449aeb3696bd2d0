// Drives the second-look queues of the review panel (tabs Doubtful labels and Label next) inside
// the workbench: the same ids and keys the stub-host webview test uses, here against the real
// extension host, whose worker computes the queues.
import type { FrameLocator, Page } from 'playwright-core';
import { notificationTexts } from './workbench';

export type SecondLookTab = 'doubts' | 'labelNext';

/** The keys that bring each queue into view (1 is the candidates). */
const tabKeys: Record<SecondLookTab, string> = { doubts: '2', labelNext: '3' };

/** The title of the progress notification the host shows while the worker computes the queues. */
export const secondLookProgressTitle = 'Checking labels and ranking what to label next';

/** The worker's summary line, as the panel's status line shows it once the queues are in. */
const computedSummary = /doubtful labels? of \d+ checked; \d+ suggestions? among \d+ unlabelled nodes? of /;

export interface SecondLookItem {
  node: string;
  status: string;
  currentLabel: string;
  suggestedLabel: string;
  outcome: string;
}

export interface ComputedQueues {
  /** The status line after the computation: the worker's summary of both reports. */
  summary: string;
  /** Progress notification texts seen while waiting (empty when it came and went between polls). */
  progressSeen: string[];
}

/**
 * Waits for a second-look computation started by the command: its progress notification shows,
 * the panel's status line gives the worker's summary of both queues, and the notification is gone.
 * Fails with the notifications and the status line seen when the queues do not come.
 */
export async function waitForSecondLookQueues(page: Page, frame: FrameLocator, timeoutMs: number): Promise<ComputedQueues> {
  const deadline = Date.now() + timeoutMs;
  const statusLine = frame.locator('#status-line');
  const progressSeen = new Set<string>();
  const seen = new Set<string>();
  let summary = '';
  let progressShowing = true;
  while (Date.now() < deadline) {
    const texts = await notificationTexts(page);
    texts.forEach((text) => seen.add(text));
    const progress = texts.filter((text) => text.startsWith(secondLookProgressTitle));
    progress.forEach((text) => progressSeen.add(text));
    progressShowing = progress.length > 0;
    summary = ((await statusLine.textContent({ timeout: 5_000 }).catch(() => '')) ?? '').trim();
    if (computedSummary.test(summary) && !progressShowing) return { summary, progressSeen: [...progressSeen] };
    const failure = texts.find((text) => /error|failed|cannot/i.test(text) && !text.startsWith(secondLookProgressTitle));
    if (failure) throw new Error(`computing the second-look queues failed: "${failure}"; status line: "${summary}"`);
    await page.waitForTimeout(1_000);
  }
  throw new Error(
    `no second-look queues within ${timeoutMs / 1000} s: status line "${summary}", progress ${progressShowing ? 'still showing' : 'gone'}; ` +
      `notifications seen: ${[...seen].join(' | ') || '(none)'}`,
  );
}

/**
 * Brings a queue into view with its key. Keys reach the panel only while its document has the
 * focus, so the panel title (which does nothing when clicked) is clicked first.
 */
export async function showQueueByKey(page: Page, frame: FrameLocator, tab: SecondLookTab): Promise<void> {
  await frame.locator('#panel-title').click();
  await page.keyboard.press(tabKeys[tab]);
  await frame.locator(`#tab-${tab}[aria-selected="true"]`).waitFor({ state: 'attached', timeout: 10_000 });
  await frame.locator('#second-look').waitFor({ state: 'visible', timeout: 10_000 });
}

async function itemOf(frame: FrameLocator, selector: string): Promise<SecondLookItem> {
  const item = frame.locator(selector).first();
  await item.waitFor({ state: 'visible', timeout: 10_000 });
  const text = async (part: string) => ((await item.locator(part).textContent()) ?? '').trim();
  return {
    node: (await item.getAttribute('data-node')) ?? '',
    status: (await item.getAttribute('data-status')) ?? '',
    currentLabel: await text('.sl-current'),
    suggestedLabel: await text('.sl-suggested'),
    outcome: await text('.sl-outcome'),
  };
}

/** The item in view in the shown queue. */
export function currentSecondLookItem(frame: FrameLocator): Promise<SecondLookItem> {
  return itemOf(frame, '.second-look-item.current');
}

/** Item counts of the shown queue: all items and the open ones. */
export async function queueCounts(frame: FrameLocator): Promise<{ items: number; open: number }> {
  return {
    items: await frame.locator('.second-look-item').count(),
    open: await frame.locator('.second-look-item[data-status="open"]').count(),
  };
}

/**
 * Presses a decision key (Y keep, A give the suggested class) for the item in view and waits until
 * the panel shows that item with the expected status, which it reads from the session's pending
 * decisions; returns the item as then shown (its outcome names the decision's id).
 */
export async function decideByKey(page: Page, frame: FrameLocator, key: 'y' | 'a', node: string, status: string): Promise<SecondLookItem> {
  await page.keyboard.press(key);
  const selector = `.second-look-item[data-node="${node}"][data-status="${status}"]`;
  await frame.locator(selector).waitFor({ state: 'attached', timeout: 30_000 });
  return itemOf(frame, selector);
}
