/**
 * Text from a user's file made safe to print on a terminal: every control
 * character (C0 but line feed and tab, DEL and C1; e.g. ESC, which starts
 * terminal escape sequences, or a carriage return that would overwrite the
 * line) is written as `\xHH`, so an ID or label can neither move the cursor
 * nor recolour or hide what follows. Everything else is kept as it is, so a
 * whole message of several lines can pass through it too.
 */
export function printable(text: string): string {
  return text.replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g, (c) => `\\x${c.charCodeAt(0).toString(16).padStart(2, "0")}`);
}
