// Keyboard shortcuts of the panel: one table drives both the key handling and the help shown.

export type Action =
  | 'next'
  | 'previous'
  | 'name'
  | 'mergeInto'
  | 'mergeWith'
  | 'split'
  | 'move'
  | 'dismiss'
  | 'skip'
  | 'undo'
  | 'redo'
  | 'fit'
  | 'search'
  | 'help'
  | 'close'
  | 'keepLabel'
  | 'acceptSuggestion'
  | 'chooseClass'
  | 'showCandidates'
  | 'showDoubts'
  | 'showLabelNext';

export interface Shortcut {
  action: Action;
  /** KeyboardEvent.key values that trigger it. */
  keys: string[];
  label: string;
  description: string;
}

export const shortcuts: Shortcut[] = [
  { action: 'next', keys: ['j'], label: 'J', description: 'next candidate or item' },
  { action: 'previous', keys: ['k'], label: 'K', description: 'previous candidate or item' },
  { action: 'name', keys: ['n'], label: 'N', description: 'name as new class' },
  { action: 'mergeInto', keys: ['m'], label: 'M', description: 'merge into a class' },
  { action: 'mergeWith', keys: ['c'], label: 'C', description: 'merge with a candidate' },
  { action: 'split', keys: ['s'], label: 'S', description: 'split (re-group) into parts' },
  { action: 'move', keys: ['v'], label: 'V', description: 'move selected members' },
  { action: 'dismiss', keys: ['d'], label: 'D', description: 'dismiss as noise' },
  { action: 'skip', keys: ['l'], label: 'L', description: 'skip (later)' },
  { action: 'keepLabel', keys: ['y'], label: 'Y', description: 'keep the label (doubtful labels)' },
  { action: 'acceptSuggestion', keys: ['a'], label: 'A', description: 'give the suggested class' },
  { action: 'chooseClass', keys: ['g'], label: 'G', description: 'give another class…' },
  { action: 'showCandidates', keys: ['1'], label: '1', description: 'show candidates' },
  { action: 'showDoubts', keys: ['2'], label: '2', description: 'show doubtful labels' },
  { action: 'showLabelNext', keys: ['3'], label: '3', description: 'show label next' },
  { action: 'undo', keys: ['u'], label: 'U', description: 'undo' },
  { action: 'redo', keys: ['U'], label: 'Shift+U', description: 'redo' },
  { action: 'fit', keys: ['f'], label: 'F', description: 'zoom graph to fit' },
  { action: 'search', keys: ['/'], label: '/', description: 'search members' },
  { action: 'help', keys: ['?'], label: '?', description: 'show or hide this help' },
  { action: 'close', keys: ['Escape'], label: 'Esc', description: 'close form or help' },
];

/**
 * The shortcut of a key press. Letters go by the key pressed with Shift, not with Caps Lock (so
 * Caps Lock does not turn undo into redo), and by the key's place on the keyboard where the
 * layout types no Latin letter there.
 */
export function actionOfKey(event: Pick<KeyboardEvent, 'key' | 'code' | 'shiftKey' | 'ctrlKey' | 'metaKey' | 'altKey'>): Action | null {
  if (event.ctrlKey || event.metaKey || event.altKey) return null;
  let key = event.key;
  if (key.length === 1 && key.toLowerCase() !== key.toUpperCase()) {
    const placed = /^Key([A-Z])$/.exec(event.code)?.[1];
    const letter = /^[a-z]$/i.test(key) ? key : (placed ?? key);
    key = event.shiftKey ? letter.toUpperCase() : letter.toLowerCase();
  }
  return shortcuts.find((s) => s.keys.includes(key))?.action ?? null;
}

export function shortcutLabel(action: Action): string {
  return shortcuts.find((s) => s.action === action)?.label ?? '';
}
