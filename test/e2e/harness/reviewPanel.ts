// Drives the review panel webview inside the workbench: the same controls (ids) the webview test
// drives against a stub host, here against the real extension host and worker.
import type { FrameLocator, Page } from 'playwright-core';
import { classPalette } from '../../../webview/classPalette';
import { blobsOfColour, decodePng } from '../../webview/pngPixels';

/** The review panel's document: VS Code nests a webview's content in an inner frame. */
export function reviewFrame(page: Page): FrameLocator {
  return page.frameLocator('iframe.webview.ready').frameLocator('#active-frame');
}

/** The id of the candidate the panel shows, once it shows one. */
export async function currentCandidate(frame: FrameLocator, timeoutMs: number): Promise<string> {
  const title = frame.locator('#candidate-title');
  await title.waitFor({ state: 'visible', timeout: timeoutMs });
  return ((await title.textContent()) ?? '').trim();
}

async function waitForPendingCount(frame: FrameLocator, count: number, timeoutMs: number): Promise<void> {
  await frame
    .locator('#pending-list li[data-decision]')
    .nth(count - 1)
    .waitFor({ state: 'attached', timeout: timeoutMs });
}

/** Names the shown candidate as a new class; resolves once the decision is pending. */
export async function nameAsNewClass(frame: FrameLocator, className: string, description: string, pendingAfter: number): Promise<void> {
  await frame.locator('#decide-name:not([disabled])').click();
  await frame.locator('#new-class-name input').fill(className);
  await frame.locator('#new-class-description input').fill(description);
  await frame.locator('#confirm-name').click();
  await waitForPendingCount(frame, pendingAfter, 30_000);
}

/** Merges the shown candidate into the class the choice offers first; returns that class. */
export async function mergeIntoFirstClass(frame: FrameLocator, pendingAfter: number): Promise<string> {
  await frame.locator('#decide-merge-into:not([disabled])').click();
  const firstOption = frame.locator('#merge-class vscode-option').first();
  await firstOption.waitFor({ state: 'attached', timeout: 10_000 });
  const className = ((await firstOption.getAttribute('value')) ?? '').trim();
  await frame.locator('#confirm-mergeInto').click();
  await waitForPendingCount(frame, pendingAfter, 30_000);
  return className;
}

export async function pendingDecisionTexts(frame: FrameLocator): Promise<string[]> {
  return (await frame.locator('#pending-list li[data-decision]').allInnerTexts()).map((t) => t.replace(/\s+/g, ' ').trim());
}

/**
 * Brings the neighbourhood graph into view, finds the largest disc drawn in a class colour on a
 * screenshot of it, and hovers there; returns the caption and the hover box's text. What is drawn
 * and what the pointer picks must agree in the real webview as in the stub-host test.
 */
export async function hoverDrawnNode(page: Page, frame: FrameLocator): Promise<{ caption: string; colour: string; tooltip: string }> {
  const stage = frame.locator('#graph-stage');
  await stage.scrollIntoViewIfNeeded();
  const caption = ((await frame.locator('#graph-caption').textContent()) ?? '').trim();
  // The first frame, and the layout of a small neighbourhood, are drawn right away; allow a moment.
  await page.waitForTimeout(500);
  const shot = decodePng(await stage.screenshot());
  const found = classPalette
    .map((colour) => ({ colour, blob: blobsOfColour(shot, colour)[0] }))
    .filter((f) => f.blob && f.blob.size >= 9)
    .sort((a, b) => b.blob.size - a.blob.size)[0];
  if (!found) throw new Error(`no disc in a class colour on the graph (${caption})`);
  const box = await stage.boundingBox();
  if (!box) throw new Error('the graph area has no box');
  await page.mouse.move(box.x + found.blob.x, box.y + found.blob.y);
  const tooltip = frame.locator('#graph-tooltip');
  await tooltip.waitFor({ state: 'visible', timeout: 10_000 });
  return { caption, colour: found.colour, tooltip: ((await tooltip.innerText()) ?? '').replace(/\s+/g, ' ').trim() };
}
