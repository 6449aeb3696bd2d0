// Rejection setting controls. Every move asks the host for a preview (the webview never scores
// anything itself); one request is in flight at a time and only the latest setting is sent next.
import type { ThresholdPreviewResult, ThresholdSetting } from '../src/protocol/webview';
import { el } from './dom';

type Select = HTMLElement & { value: string };

interface Slider {
  input: HTMLInputElement;
  value: HTMLElement;
  row: HTMLElement;
}

function slider(id: string, label: string, min: number, max: number, step: number, hint: string): Slider {
  const input = el('input', { type: 'range', id, min, max, step, 'aria-label': label, title: hint });
  const value = el('output', { for: id, class: 'slider-value', id: `${id}-value` });
  return { input, value, row: el('label', { class: 'slider-row' }, el('span', { class: 'slider-label' }, label), input, value) };
}

export class ThresholdControls {
  readonly element: HTMLElement;
  private readonly mode: Select;
  private readonly alpha = slider(
    'threshold-alpha',
    'α',
    0,
    10,
    0.1,
    'DOC threshold width: threshold = max(0.5, 1 − α·σ); larger α rejects fewer nodes',
  );
  private readonly quantile = slider(
    'threshold-quantile',
    'reject',
    0,
    0.5,
    0.005,
    'Fraction of the slice’s nodes to reject, highest novelty first',
  );
  private readonly lambda = slider('threshold-lambda', 'λ', 0, 1, 0.05, 'Neighbour smoothing weight of the novelty scores');
  private readonly result = el('output', { class: 'threshold-result', id: 'threshold-result', 'aria-live': 'polite' });
  private readonly off = el('span', { class: 'threshold-off', id: 'threshold-off', hidden: true });
  private readonly reset: HTMLElement;
  private setting: ThresholdSetting | null = null;
  private baseline: ThresholdPreviewResult | null = null;
  private inFlight: number | null = null;
  private queued = false;

  constructor(
    private readonly request: (setting: ThresholdSetting) => number,
    private readonly changed: (setting: ThresholdSetting) => void,
    /** The preview on show (null: the run's own setting). */
    private readonly previewShown: (preview: ThresholdPreviewResult | null) => void = () => undefined,
  ) {
    this.mode = el(
      'vscode-single-select',
      { id: 'threshold-mode', 'aria-label': 'Rejection rule' },
      el('vscode-option', { value: 'alpha' }, 'DOC threshold (α)'),
      el('vscode-option', { value: 'quantile' }, 'Top fraction'),
    );
    this.mode.addEventListener('change', () => this.update({ mode: this.mode.value === 'quantile' ? 'quantile' : 'alpha' }));
    this.alpha.input.addEventListener('input', () => this.update({ alpha: Number(this.alpha.input.value) }));
    this.quantile.input.addEventListener('input', () => this.update({ quantile: Number(this.quantile.input.value) }));
    this.lambda.input.addEventListener('input', () => this.update({ lambda: Number(this.lambda.input.value) }));
    const reset = el('vscode-button', { id: 'threshold-reset', secondary: true, title: 'Back to the run’s own setting' }, 'Reset');
    this.reset = reset;
    reset.addEventListener('click', () => {
      if (this.baseline) this.update(this.baseline.setting);
    });
    this.element = el(
      'section',
      { class: 'threshold', 'aria-label': 'Rejection setting' },
      this.mode,
      this.alpha.row,
      this.quantile.row,
      this.lambda.row,
      reset,
      this.result,
      this.off,
    );
  }

  /**
   * The run's own setting from a snapshot; `saved` (view state) wins when the curator had moved the
   * controls. With `previewsOff` (the host's reason) the controls show the run and stay still.
   */
  setBaseline(baseline: ThresholdPreviewResult | null, saved?: ThresholdSetting, previewsOff?: string): void {
    const first = this.baseline === null;
    this.baseline = baseline;
    const still = baseline === null || previewsOff !== undefined;
    this.element.classList.toggle('disabled', still);
    for (const s of [this.alpha, this.quantile, this.lambda]) s.input.disabled = still;
    this.mode.toggleAttribute('disabled', still);
    this.reset.toggleAttribute('disabled', still);
    this.off.hidden = previewsOff === undefined;
    this.off.textContent = previewsOff ? `· ${previewsOff.charAt(0).toUpperCase()}${previewsOff.slice(1)}` : '';
    this.off.title = previewsOff ?? '';
    // A run scored with a wider α than the slider's usual range gets a slider that reaches it.
    if (baseline) this.alpha.input.max = String(Math.max(10, Math.ceil(baseline.setting.alpha), Math.ceil(saved?.alpha ?? 0)));
    if (baseline && previewsOff) {
      this.setting = { ...baseline.setting };
      this.syncInputs();
      this.showResult(baseline, true);
      return;
    }
    if (!baseline) {
      this.result.textContent = 'Previews need the run’s scores.';
      return;
    }
    if (first) {
      this.setting = { ...(saved ?? baseline.setting) };
      this.syncInputs();
      if (saved && JSON.stringify(saved) !== JSON.stringify(baseline.setting)) this.send();
      else this.showResult(baseline, true);
    }
  }

  receive(requestId: number, preview: ThresholdPreviewResult): void {
    if (requestId !== this.inFlight) return;
    this.inFlight = null;
    if (this.queued) {
      this.queued = false;
      this.send();
    }
    this.showResult(preview, false);
  }

  failed(requestId: number): boolean {
    if (requestId !== this.inFlight) return false;
    this.inFlight = null;
    // The setting moved on while this one failed: ask for the newest one.
    if (this.queued) {
      this.queued = false;
      this.send();
    }
    return true;
  }

  private update(change: Partial<ThresholdSetting>): void {
    if (!this.setting) return;
    this.setting = { ...this.setting, ...change };
    this.syncInputs();
    this.changed(this.setting);
    this.send();
  }

  private send(): void {
    if (!this.setting) return;
    if (this.inFlight !== null) {
      this.queued = true;
      return;
    }
    this.inFlight = this.request(this.setting);
  }

  private syncInputs(): void {
    const setting = this.setting;
    if (!setting) return;
    if (this.mode.value !== setting.mode) this.mode.value = setting.mode;
    this.alpha.input.value = String(setting.alpha);
    this.quantile.input.value = String(setting.quantile);
    this.lambda.input.value = String(setting.lambda);
    this.alpha.value.textContent = setting.alpha.toFixed(1);
    this.quantile.value.textContent = `${(setting.quantile * 100).toFixed(1)}%`;
    this.lambda.value.textContent = setting.lambda.toFixed(2);
    this.alpha.row.hidden = setting.mode !== 'alpha';
    this.quantile.row.hidden = setting.mode !== 'quantile';
  }

  private showResult(preview: ThresholdPreviewResult, isRun: boolean): void {
    const own = isRun || (this.baseline !== null && JSON.stringify(preview.setting) === JSON.stringify(this.baseline.setting));
    this.previewShown(own ? null : preview);
    const share = preview.scored ? ((100 * preview.rejected) / preview.scored).toFixed(1) : '0';
    this.result.textContent = `${isRun ? 'This run: ' : 'Would reject '}${preview.rejected.toLocaleString()} of ${preview.scored.toLocaleString()} nodes (${share}%) · ${preview.candidatesKept} candidate${preview.candidatesKept === 1 ? '' : 's'} kept · ${preview.ungroupedRejected.toLocaleString()} ungrouped`;
  }
}
