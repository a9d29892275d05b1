// Text from uploads, the database or the command line may carry bytes that a terminal obeys: escape
// sequences (clear the screen, move the cursor, set the window title), bell, carriage return, and the
// Unicode bidirectional controls that reorder what is shown. They are written as \uXXXX instead, which
// also keeps JSON output valid JSON with the same values.

/**
 * C0 controls except newline and tab, DEL, C1 controls (U+0080–U+009F, e.g. CSI U+009B), and the
 * bidirectional marks, embeddings, overrides and isolates (Unicode Standard Annex #9: U+061C,
 * U+200E–U+200F, U+202A–U+202E, U+2066–U+2069). With `inline`, newline and tab too.
 */
const UNSAFE = /[\u0000-\u0008\u000B-\u001F\u007F-\u009F\u061C\u200E\u200F\u202A-\u202E\u2066-\u2069]/g;
const UNSAFE_INLINE = /[\u0000-\u001F\u007F-\u009F\u061C\u200E\u200F\u202A-\u202E\u2066-\u2069]/g;

const escape = (c: string) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`;

/**
 * Text safe to write to a terminal: every control character that is not layout becomes a visible \uXXXX.
 * `inline: true` for one value inside a line or a tab-separated row (its newlines and tabs escaped too).
 */
export function terminalSafe(text: string, options: { inline?: boolean } = {}): string {
  return text.replace(options.inline ? UNSAFE_INLINE : UNSAFE, escape);
}
