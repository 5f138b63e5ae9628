/**
 * Text from users (paths, arguments, audit names) made safe to print on a terminal: control
 * characters (C0, DEL, C1) are shown as `\xNN` escapes, so a crafted name cannot move the
 * cursor, recolour or rewrite what the terminal shows. Everything else is left as it is.
 */
export function printable(text: string): string {
  // eslint-disable-next-line no-control-regex
  return text.replace(/[\u0000-\u001f\u007f-\u009f]/g, (c) => `\\x${c.charCodeAt(0).toString(16).padStart(2, '0')}`);
}
