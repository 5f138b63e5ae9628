/**
 * Text for a terminal, with every control character made visible.
 *
 * File names, dataset ids and cell contents come from anyone, and a terminal obeys escape
 * sequences in what it prints: `ESC ]` … can set the window title or write a link, `ESC [2J`
 * clears the screen, a carriage return overwrites the line, bidirectional overrides reorder what
 * is shown. So before any message or progress line is printed, these are replaced by a visible
 * escape: C0 controls (U+0000–U+001F) and DEL as `\xNN` (tab stays a tab; line feed stays a line
 * break only with `keepNewlines`, the default, and is `\n` otherwise), C1 controls (U+0080–U+009F)
 * as `\xNN`, and the Unicode bidirectional controls (U+061C, U+200E, U+200F, U+202A–U+202E,
 * U+2066–U+2069; the "Trojan Source" characters, Boucher & Anderson 2021) as `\u{NNNN}`.
 * Everything else (accents, CJK, emoji) is printed as it is. Cost: linear in the text.
 */

// eslint-disable-next-line no-control-regex
const UNSAFE = /[\x00-\x08\x0a-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;

function visible(ch: string, keepNewlines: boolean): string {
  if (ch === '\n') return keepNewlines ? '\n' : '\\n';
  if (ch === '\r') return '\\r';
  const code = ch.charCodeAt(0);
  if (code <= 0x9f) return `\\x${code.toString(16).padStart(2, '0')}`;
  return `\\u{${code.toString(16).padStart(4, '0')}}`;
}

/** `s` with control and bidirectional-control characters replaced by visible escapes. */
export function safeTerminal(s: string, options: { keepNewlines?: boolean } = {}): string {
  const keep = options.keepNewlines ?? true;
  return s.replace(UNSAFE, (ch) => visible(ch, keep));
}

/** `safeTerminal` for one line: a line break inside (a file name with one) is shown as `\n`. */
export function safeTerminalLine(s: string): string {
  return safeTerminal(s, { keepNewlines: false });
}
