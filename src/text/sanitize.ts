/**
 * The one text sanitiser for text that came from a user (notes, ids, file
 * and column names, values echoed in messages) on its way to a screen or a
 * file. Notes are stored as entered; every renderer passes user text through
 * here, so a note holding `ESC [2J` shows as `␛[2J` instead of clearing the
 * terminal, and no raw control byte reaches a CSV, HTML, Markdown or SVG file.
 *
 * What is replaced (Unicode's control characters, category Cc):
 * - C0 controls U+0000–U+001F → the matching Control Picture U+2400–U+241F
 *   (`␀`, `␇`, `␛`…), so the reader still sees which byte was there;
 * - DEL U+007F → `␡` (U+2421);
 * - C1 controls U+0080–U+009F (U+009B is a one-character CSI on many
 *   terminals) → U+FFFD, Unicode's replacement character (C1 has no pictures);
 * - the bidirectional embedding, override and isolate controls (U+202A–U+202E,
 *   U+2066–U+2069; Unicode UAX #9 §2.1–2.4), which make a terminal, a browser
 *   or a spreadsheet show the characters after them in another order than
 *   stored (the "Trojan Source" trick, CVE-2021-42574) → U+FFFD. They are
 *   format characters (category Cf), not controls, but in an id, a note or a
 *   file name they can only mislead. The marks U+200E and U+200F, which do not
 *   reorder a run, are kept.
 * Tab, line feed and carriage return are kept when the caller's format
 * handles them itself (`keepWhitespace`: CSV quotes line breaks, HTML and
 * XML treat them as spaces); otherwise they are replaced too.
 *
 * Pure and cheap: text without control characters (nearly all) is returned
 * as it is after one regular-expression test. The CSV formula guard is a
 * separate step that composes with this one (sanitise, then guard).
 */

export interface SanitizeOptions {
  /** Keep tab, LF and CR as they are (for formats that handle them). Default false. */
  keepWhitespace?: boolean;
}

/**
 * What is replaced besides C0, as the body of a regular-expression character
 * class: DEL, the C1 controls and the bidirectional controls. JSON output
 * escapes the same characters (render/json.ts), since JSON.stringify leaves
 * them raw.
 */
export const BEYOND_C0_CLASS = '\\u007f-\\u009f\\u202a-\\u202e\\u2066-\\u2069';
const ALL_CONTROLS = new RegExp(`[\\u0000-\\u001f${BEYOND_C0_CLASS}]`);
const ALL_CONTROLS_G = new RegExp(ALL_CONTROLS.source, 'g');
const CONTROLS_BUT_WHITESPACE = new RegExp(`[\\u0000-\\u0008\\u000b\\u000c\\u000e-\\u001f${BEYOND_C0_CLASS}]`);
const CONTROLS_BUT_WHITESPACE_G = new RegExp(CONTROLS_BUT_WHITESPACE.source, 'g');

/** The visible stand-in for one control character. */
export function controlPicture(c: string): string {
  const code = c.charCodeAt(0);
  if (code < 0x20) return String.fromCharCode(0x2400 + code);
  if (code === 0x7f) return '\u2421';
  return '\ufffd';
}

/** `text` with its control characters replaced by visible stand-ins (see the module doc). */
export function sanitizeText(text: string, options: SanitizeOptions = {}): string {
  const test = options.keepWhitespace ? CONTROLS_BUT_WHITESPACE : ALL_CONTROLS;
  if (!test.test(text)) return text;
  return text.replace(options.keepWhitespace ? CONTROLS_BUT_WHITESPACE_G : ALL_CONTROLS_G, controlPicture);
}

/**
 * Text for HTML or SVG (XML) content and attribute values: control characters
 * replaced (XML 1.0 forbids most of them outright), then `& < > "` escaped.
 */
export function escapeMarkup(text: string): string {
  return sanitizeText(text, { keepWhitespace: true })
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;');
}

/**
 * Text for one line of Markdown (a paragraph or a table cell): every line
 * break (CRLF, LF, or a lone CR, which CommonMark also ends a line with)
 * and every tab becomes a space, so a note cannot start a heading, a list or a code block;
 * other control characters are replaced; Markdown's own marks are escaped.
 */
export function escapeMarkdownInline(text: string): string {
  return sanitizeText(text.replace(/\r\n|[\r\n\t]/g, ' '))
    .replace(/\\/g, '\\\\')
    .replace(/\|/g, '\\|')
    .replace(/([*_`[\]<>#])/g, '\\$1');
}
