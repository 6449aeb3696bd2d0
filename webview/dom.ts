// A few DOM helpers: the panel is built with plain elements (no framework) and never with
// innerHTML, so node texts from the dataset can never become markup.

type Attributes = Record<string, string | number | boolean | undefined>;
type Child = Node | string | null | undefined | false;

export function el<K extends keyof HTMLElementTagNameMap>(tag: K, attributes?: Attributes, ...children: Child[]): HTMLElementTagNameMap[K];
export function el(tag: string, attributes?: Attributes, ...children: Child[]): HTMLElement;
export function el(tag: string, attributes: Attributes = {}, ...children: Child[]): HTMLElement {
  const element = document.createElement(tag);
  setAttributes(element, attributes);
  append(element, children);
  return element;
}

export function svg(tag: string, attributes: Attributes = {}, ...children: Child[]): SVGElement {
  const element = document.createElementNS('http://www.w3.org/2000/svg', tag);
  setAttributes(element, attributes);
  append(element, children);
  return element;
}

function setAttributes(element: Element, attributes: Attributes): void {
  for (const [name, value] of Object.entries(attributes)) {
    if (value === undefined || value === false) continue;
    element.setAttribute(name, value === true ? '' : String(value));
  }
}

function append(element: Element, children: Child[]): void {
  for (const child of children) {
    if (child === null || child === undefined || child === false) continue;
    element.append(child);
  }
}

export function replaceChildren(element: Element, ...children: Child[]): void {
  element.replaceChildren();
  append(element, children);
}

/** True when a key press is typing into a field (so it is not a panel shortcut). */
/** Enter confirms and Escape closes a small decision form. */
export function onFormKeys(form: HTMLElement, confirm: () => void, close: () => void): void {
  form.addEventListener('keydown', (event) => {
    if (event.key === 'Enter') {
      event.preventDefault();
      confirm();
    } else if (event.key === 'Escape') {
      event.preventDefault();
      close();
    }
  });
}

/** Inputs that take no text: a shortcut pressed while one has focus is still a shortcut. */
const keylessInputTypes = new Set(['checkbox', 'radio', 'range', 'button', 'submit', 'reset', 'color', 'file']);

export function isTyping(event: Event): boolean {
  return event.composedPath().some((target) => {
    if (!(target instanceof HTMLElement)) return false;
    const tag = target.tagName.toLowerCase();
    return (
      (target instanceof HTMLInputElement && !keylessInputTypes.has(target.type)) ||
      tag === 'textarea' ||
      tag === 'vscode-textfield' ||
      tag === 'vscode-textarea' ||
      tag === 'vscode-single-select' ||
      target.isContentEditable
    );
  });
}
