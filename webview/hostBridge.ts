// The webview's side of the protocol: posting typed messages, numbering requests, and keeping
// the panel's view state with the webview API so that it survives being hidden and restored.
import type { HostToWebviewMessage, ThresholdSetting, WebviewToHostMessage } from '../src/protocol/webview';

export interface ViewState {
  candidateId?: string;
  tableScroll?: number;
  search?: string;
  sortColumn?: string;
  sortDescending?: boolean;
  threshold?: ThresholdSetting;
  helpOpen?: boolean;
  /** The queue in view: candidates, doubtful labels or label next. */
  queueTab?: 'candidates' | 'doubts' | 'labelNext';
  /** The item in view in each second-look queue (node id). */
  secondLookNode?: { doubts?: string; labelNext?: string };
}

interface WebviewApi {
  postMessage(message: unknown): void;
  getState(): unknown;
  setState(state: unknown): void;
}

declare function acquireVsCodeApi(): WebviewApi;

type WithoutRequestId<T> = T extends { requestId: number } ? Omit<T, 'requestId'> : T;
export type OutgoingMessage = WithoutRequestId<WebviewToHostMessage>;

export class HostBridge {
  private readonly api: WebviewApi;
  private nextRequestId = 1;

  constructor() {
    this.api = acquireVsCodeApi();
  }

  /** Posts a message; messages that need an answer get a fresh request id, which is returned. */
  post(message: OutgoingMessage): number {
    const needsId = message.type !== 'ready' && message.type !== 'selectCandidate' && message.type !== 'openNode';
    const requestId = needsId ? this.nextRequestId++ : 0;
    this.api.postMessage(needsId ? { ...message, requestId } : message);
    return requestId;
  }

  onMessage(handler: (message: HostToWebviewMessage) => void): void {
    window.addEventListener('message', (event: MessageEvent) => {
      const data = event.data as { type?: unknown } | null;
      if (data && typeof data === 'object' && typeof data.type === 'string') {
        // Read by bench/reviewPanelScale.ts: opening a candidate is timed from here.
        if (data.type === 'snapshot') performance.mark('review:snapshot-received');
        handler(data as HostToWebviewMessage);
      }
    });
  }

  get state(): ViewState {
    const saved = this.api.getState();
    return saved && typeof saved === 'object' ? saved : {};
  }

  updateState(change: Partial<ViewState>): void {
    this.api.setState({ ...this.state, ...change });
  }
}
