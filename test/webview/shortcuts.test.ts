// Which shortcut a key press means (webview/shortcuts.ts), for the key events a browser gives
// (KeyboardEvent key and code values as the UI Events KeyboardEvent specifications of the W3C define them).
import * as assert from 'node:assert/strict';
import { actionOfKey } from '../../webview/shortcuts';

const press = (key: string, code: string, modifiers: { shiftKey?: boolean; ctrlKey?: boolean } = {}) =>
  actionOfKey({ key, code, shiftKey: false, ctrlKey: false, metaKey: false, altKey: false, ...modifiers });

describe('webview/shortcuts', () => {
  it('maps letters, digits and signs to their actions', () => {
    assert.equal(press('u', 'KeyU'), 'undo');
    assert.equal(press('U', 'KeyU', { shiftKey: true }), 'redo');
    assert.equal(press('2', 'Digit2'), 'showDoubts');
    assert.equal(press('?', 'Slash', { shiftKey: true }), 'help');
    assert.equal(press('Escape', 'Escape'), 'close');
    assert.equal(press('x', 'KeyX'), null);
  });

  it('ignores Caps Lock: an upper-case letter without Shift is the lower-case shortcut', () => {
    assert.equal(press('U', 'KeyU'), 'undo');
    assert.equal(press('D', 'KeyD'), 'dismiss');
  });

  it('takes the key’s place when the layout types a non-Latin letter there', () => {
    // The Russian ЙЦУКЕН layout types "г" on the U key and "в" on the D key (from memory).
    assert.equal(press('г', 'KeyU'), 'undo');
    assert.equal(press('Г', 'KeyU', { shiftKey: true }), 'redo');
    assert.equal(press('в', 'KeyD'), 'dismiss');
  });

  it('leaves key presses with Ctrl (editor commands) alone', () => {
    assert.equal(press('u', 'KeyU', { ctrlKey: true }), null);
  });
});
