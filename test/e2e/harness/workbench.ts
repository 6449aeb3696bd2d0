// Drives the VS Code workbench in Chromium the way a user does: command palette, quick picks,
// notifications, the Problems panel. Every wait is bounded and fails with what was on screen.
import { chromium, type Browser, type Locator, type Page } from 'playwright-core';
import { chromiumPath } from './paths';
import { chromiumFlags } from '../../chromiumFlags';

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({ executablePath: chromiumPath, args: [...chromiumFlags], headless: true, timeout: 60_000 });
}

export async function openWorkbench(browser: Browser, url: string, folder: string): Promise<Page> {
  const page = await browser.newPage({ viewport: { width: 1440, height: 900 } });
  page.setDefaultTimeout(30_000);
  await page.goto(`${url}?folder=${encodeURIComponent(folder)}`, { waitUntil: 'domcontentloaded', timeout: 60_000 });
  await page.locator('.monaco-workbench').waitFor({ state: 'visible', timeout: 90_000 });
  return page;
}

const quickInput = (page: Page): Locator => page.locator('.quick-input-widget');
const quickInputBox = (page: Page): Locator => quickInput(page).locator('.quick-input-box input');
const quickInputRows = (page: Page): Locator => quickInput(page).locator('.monaco-list-row');

async function rowTexts(rows: Locator): Promise<string[]> {
  const texts = await rows.evaluateAll((elements) =>
    elements.map((element) => (element as HTMLElement).innerText.replace(/\s+/g, ' ').trim()),
  );
  return texts.filter((text) => text !== '');
}

async function openPalette(page: Page, query: string): Promise<void> {
  // Dismiss whatever quick input may still be open, so F1 opens a fresh palette.
  if (await quickInput(page).isVisible()) await page.keyboard.press('Escape');
  await page.keyboard.press('F1');
  await quickInputBox(page).waitFor({ state: 'visible', timeout: 10_000 });
  await quickInputBox(page).fill(`>${query}`);
}

/** The command palette's entries whose text matches `query` (the palette's own fuzzy filter). */
export async function paletteEntries(page: Page, query: string): Promise<string[]> {
  await openPalette(page, query);
  // The list filters asynchronously; give it a moment to settle before reading.
  await page.waitForTimeout(1_000);
  const entries = await rowTexts(quickInputRows(page));
  await page.keyboard.press('Escape');
  return entries;
}

/** Runs a command by its palette title ("Category: Title"); fails listing what the palette offered. */
export async function runCommand(page: Page, title: string): Promise<void> {
  await openPalette(page, title);
  const row = quickInputRows(page).filter({ hasText: title }).first();
  try {
    await row.waitFor({ state: 'visible', timeout: 15_000 });
  } catch {
    const offered = await rowTexts(quickInputRows(page));
    await page.keyboard.press('Escape');
    throw new Error(
      `the command palette has no "${title}"; for that query it offered: ${offered.length > 0 ? offered.join(' | ') : '(nothing)'}`,
    );
  }
  await row.click();
}

/** Picks an item in an open quick pick (not the command palette) by typing part of its label. */
export async function chooseQuickPickItem(page: Page, text: string): Promise<void> {
  await quickInputBox(page).waitFor({ state: 'visible', timeout: 30_000 });
  await quickInputBox(page).fill(text);
  const row = quickInputRows(page).filter({ hasText: text }).first();
  try {
    await row.waitFor({ state: 'visible', timeout: 10_000 });
  } catch {
    const offered = await rowTexts(quickInputRows(page));
    throw new Error(`the quick pick has no item "${text}"; it offered: ${offered.join(' | ') || '(nothing)'}`);
  }
  await row.click();
}

/** Texts of the notifications on screen (toasts) and in the notification center. */
export async function notificationTexts(page: Page): Promise<string[]> {
  return rowTexts(page.locator('.notification-list-item-message'));
}

/** Waits for a notification whose text matches; fails listing the notifications that did show. */
export async function waitForNotification(page: Page, expected: RegExp, timeoutMs: number): Promise<string> {
  const deadline = Date.now() + timeoutMs;
  let seen = new Set<string>();
  while (Date.now() < deadline) {
    const texts = await notificationTexts(page);
    const match = texts.find((text) => expected.test(text));
    if (match !== undefined) return match;
    seen = new Set([...seen, ...texts]);
    await page.waitForTimeout(250);
  }
  throw new Error(
    `no notification matching ${expected} within ${timeoutMs / 1000} s; notifications seen: ${[...seen].join(' | ') || '(none)'}`,
  );
}

export async function clearNotifications(page: Page): Promise<void> {
  await runCommand(page, 'Notifications: Clear All Notifications');
}

/** Opens the Problems panel and returns its rows' texts once at least one row matches `expected`. */
export async function waitForProblemRows(page: Page, expected: RegExp, timeoutMs: number): Promise<string[]> {
  const rows = await problemRowsUntil(page, (texts) => texts.some((row) => expected.test(row)), timeoutMs);
  if (rows.ok) return rows.texts;
  throw new Error(`the Problems panel shows no row matching ${expected}; its rows: ${rows.texts.join(' | ') || '(none)'}`);
}

/** Waits until no row of the Problems panel matches `gone`. */
export async function waitForNoProblemRows(page: Page, gone: RegExp, timeoutMs: number): Promise<void> {
  const rows = await problemRowsUntil(page, (texts) => !texts.some((row) => gone.test(row)), timeoutMs);
  if (!rows.ok) throw new Error(`the Problems panel still shows rows matching ${gone}: ${rows.texts.join(' | ')}`);
}

/** Focuses the Problems panel and polls its rows until `done` holds or the time is up. */
async function problemRowsUntil(
  page: Page,
  done: (texts: string[]) => boolean,
  timeoutMs: number,
): Promise<{ ok: boolean; texts: string[] }> {
  await runCommand(page, 'View: Focus Problems (Errors, Warnings, Infos)');
  const panel = page.locator('.markers-panel');
  await panel.waitFor({ state: 'visible', timeout: 10_000 });
  const deadline = Date.now() + timeoutMs;
  let texts: string[] = [];
  while (Date.now() < deadline) {
    texts = await rowTexts(panel.locator('.monaco-list-row'));
    if (done(texts)) return { ok: true, texts };
    await page.waitForTimeout(250);
  }
  return { ok: false, texts };
}

/** The cursor position the status bar shows for the active editor, e.g. "Ln 3, Col 1". */
export async function statusBarCursor(page: Page): Promise<string> {
  const item = page.locator('#status\\.editor\\.selection');
  await item.waitFor({ state: 'visible', timeout: 10_000 });
  return (await item.innerText()).trim();
}

export async function activeEditorTabTitle(page: Page): Promise<string> {
  const tab = page.locator('.tabs-container .tab.active');
  await tab.waitFor({ state: 'visible', timeout: 10_000 });
  return (await tab.innerText()).replace(/\s+/g, ' ').trim();
}

/** Waits for a quick pick (not the palette) whose placeholder reads `placeholder`; fails naming the one shown. */
export async function waitForQuickPick(page: Page, placeholder: string, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  let shown = '';
  while (Date.now() < deadline) {
    if (await quickInputBox(page).isVisible()) {
      shown =
        (await quickInputBox(page)
          .getAttribute('placeholder')
          .catch(() => null)) ?? '';
      if (shown === placeholder) return;
    }
    await page.waitForTimeout(250);
  }
  throw new Error(`no quick pick "${placeholder}" within ${timeoutMs / 1000} s; last quick input shown: "${shown || '(none)'}"`);
}

/** The text of the focused row of the open quick pick. */
export async function focusedQuickPickRow(page: Page): Promise<string> {
  const texts = await rowTexts(quickInput(page).locator('.monaco-list-row.focused'));
  return texts[0] ?? '';
}

/** Waits for a quick input (input box) and accepts its current value with Enter; returns that value. */
export async function acceptInputBox(page: Page, title: string, timeoutMs: number): Promise<string> {
  const titleLocator = quickInput(page).locator('.quick-input-title', { hasText: title });
  await titleLocator.waitFor({ state: 'visible', timeout: timeoutMs });
  const value = await quickInputBox(page).inputValue();
  await quickInputBox(page).press('Enter');
  await quickInput(page).waitFor({ state: 'hidden', timeout: 10_000 });
  return value;
}

/** Clicks a button of the modal dialog once it shows; fails listing the dialog's text and buttons. */
export async function clickDialogButton(page: Page, message: RegExp, button: string, timeoutMs: number): Promise<string> {
  const dialog = page.locator('.monaco-dialog-box');
  await dialog.waitFor({ state: 'visible', timeout: timeoutMs });
  const text = (await dialog.innerText()).replace(/\s+/g, ' ').trim();
  if (!message.test(text)) throw new Error(`the dialog reads "${text}", expected ${message}`);
  const target = dialog.locator('.dialog-buttons .monaco-button', { hasText: button });
  if ((await target.count()) === 0) throw new Error(`the dialog "${text}" has no button "${button}"`);
  await target.first().click();
  await dialog.waitFor({ state: 'hidden', timeout: 10_000 });
  return text;
}
