/** Every action of the desk and its key. Single keys work only while the focus is on the desk and can be turned off (WCAG 2.2 SC 2.1.4). */
export interface Shortcut {
  keys: string;
  /** aria-keyshortcuts value */
  aria: string;
  action: string;
  single: boolean;
}

export const DESK_SHORTCUTS: readonly Shortcut[] = [
  { keys: 'Ctrl + Enter', aria: 'Control+Enter', action: 'Approve the item and go to the next (works in the text fields too)', single: false },
  { keys: 'N', aria: 'n', action: 'Skip: go to the next item without deciding', single: true },
  { keys: 'J / K', aria: 'j k', action: 'Next / previous suggested subject', single: true },
  { keys: 'A', aria: 'a', action: 'Accept the current suggested subject', single: true },
  { keys: 'R', aria: 'r', action: 'Reject the current suggested subject', single: true },
  { keys: 'U', aria: 'u', action: 'Undo the decision on the current subject', single: true },
  { keys: 'S', aria: 's', action: 'Add a subject: jump to the subject search', single: true },
  { keys: 'F', aria: 'f', action: 'Jump to the form', single: true },
  { keys: 'T', aria: 't', action: 'Jump to the alt text', single: true },
  { keys: 'L', aria: 'l', action: 'Jump to the long description', single: true },
  { keys: 'G', aria: 'g', action: 'Put the composed draft into the alt text', single: true },
  { keys: 'D', aria: 'd', action: 'Mark decorative, or not', single: true },
  { keys: 'C', aria: 'c', action: 'Flag the caption for harmful language', single: true },
  { keys: 'E', aria: 'e', action: 'Make this item an example of a confirmed subject', single: true },
  { keys: 'O', aria: 'o', action: 'Read the text in the image now', single: true },
  { keys: '+ / − / 0', aria: '+ - 0', action: 'Zoom the scan in, out, back to fit', single: true },
  { keys: 'Ctrl + S', aria: 'Control+S', action: 'Save the texts without approving', single: false },
  { keys: 'Escape', aria: 'Escape', action: 'Leave a text field (back to the item heading)', single: false },
  { keys: '?', aria: '?', action: 'Show or hide this list', single: true },
];

const KEY = 'cartouche:desk-single-keys';

export function singleKeysEnabled(): boolean {
  try {
    return window.localStorage.getItem(KEY) !== 'off';
  } catch {
    return true;
  }
}

export function setSingleKeysEnabled(on: boolean): void {
  try {
    window.localStorage.setItem(KEY, on ? 'on' : 'off');
  } catch {
    // the choice lasts for this page only
  }
}

/** True when the key press goes to a field where letters are text, not commands. */
export function typingInto(target: EventTarget | null): boolean {
  if (!(target instanceof HTMLElement)) return false;
  if (target.isContentEditable) return true;
  if (target instanceof HTMLTextAreaElement) return true;
  if (target instanceof HTMLSelectElement) return true;
  return target instanceof HTMLInputElement && !['checkbox', 'radio', 'button', 'submit'].includes(target.type);
}
