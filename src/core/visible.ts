// Text from the data (cells, header names, levels, file names) can hold control characters. Printed to a terminal,
// an escape sequence recolours the screen, retitles the window or hides what follows, and a bidirectional override
// makes text read differently from what it holds. Everything printed for a person goes through visible(), which
// writes such characters as escapes a person can read (ESC as \x1b); JSON and CSV outputs keep the data as it is.

/** C0 controls but tab and line feed, DEL, C1 controls, and the Unicode bidirectional controls. */
const UNSAFE = /[\x00-\x08\x0b-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;

function escape(ch: string): string {
  const code = ch.charCodeAt(0);
  return code < 0x100 ? `\\x${code.toString(16).padStart(2, '0')}` : `\\u${code.toString(16).padStart(4, '0')}`;
}

/** `text` with every control character but tab and line feed written as a visible escape. */
export function visible(text: string): string {
  return text.replace(UNSAFE, escape);
}

/** The same for one value set inside a line: line feeds and tabs are escaped too, so a value cannot start a line. */
export function visibleValue(text: string): string {
  return visible(text).replace(/\n/g, '\\n').replace(/\t/g, '\\t');
}
