/**
 * The one text sanitiser. What is a control character comes from Unicode
 * (The Unicode Standard, ch. 23.1, general category Cc: U+0000–U+001F,
 * U+007F, U+0080–U+009F); the stand-ins are Unicode's Control Pictures block
 * (U+2400–U+2421: U+241B SYMBOL FOR ESCAPE, U+2421 SYMBOL FOR DELETE) and
 * U+FFFD REPLACEMENT CHARACTER. Markdown line endings per CommonMark 0.31
 * §2.1: "a line ending is a line feed (U+000A), a carriage return (U+000D) not
 * followed by a line feed, or a carriage return and a following line feed".
 * The checks also hold the sanitiser against Node's own reading of category
 * Cc (the \p{Cc} property escape of the regular-expression engine, ICU's data).
 * The bidirectional controls replaced besides are those of Unicode UAX #9
 * (§2.1 LRE, RLE, PDF, LRO, RLO; §2.4 LRI, RLI, FSI, PDI), the nine that
 * CVE-2021-42574 ("Trojan Source", Boucher and Anderson 2021) names, each
 * checked by its Unicode name below.
 */
import { describe, expect, it } from 'vitest';
import { escapeMarkdownInline, escapeMarkup, sanitizeText } from '../../src/text/sanitize.js';

/** The nine bidirectional controls of UAX #9, by name: LRE, RLE, PDF, LRO, RLO, LRI, RLI, FSI, PDI. */
const BIDI_CONTROLS = ['\u202a', '\u202b', '\u202c', '\u202d', '\u202e', '\u2066', '\u2067', '\u2068', '\u2069'];

const every = Array.from({ length: 0x2500 }, (_, i) => String.fromCharCode(i)).filter((c) => !/[\ud800-\udfff]/.test(c));

describe('sanitizeText', () => {
  it('replaces exactly the characters of Unicode category Cc (as the regex engine\'s \\p{Cc} says) and the bidirectional embedding, override and isolate controls, nothing else', () => {
    for (const c of every) {
      const out = sanitizeText(`a${c}b`);
      if (/\p{Cc}/u.test(c) || BIDI_CONTROLS.includes(c)) {
        expect(out, `U+${c.charCodeAt(0).toString(16)}`).not.toContain(c);
        expect(out).not.toMatch(/\p{Cc}/u);
      } else {
        expect(out).toBe(`a${c}b`);
      }
    }
  });

  it('shows a bidirectional control as U+FFFD, so text after it shows in the order it is stored; the marks LRM and RLM stay', () => {
    // An id that would show as "S-0042.csv" with its tail reversed by RIGHT-TO-LEFT OVERRIDE.
    expect(sanitizeText('S-\u202evsc.2400')).toBe('S-\ufffdvsc.2400');
    expect(sanitizeText('a\u2067b\u2069c', { keepWhitespace: true })).toBe('a\ufffdb\ufffdc');
    expect(sanitizeText('a\u200eb\u200fc')).toBe('a\u200eb\u200fc');
  });

  it('shows C0 as its Control Picture, DEL as ␡ and C1 as U+FFFD', () => {
    expect(sanitizeText('\u001b[2J')).toBe('\u241b[2J');
    expect(sanitizeText('\u0000\u0007\u001f')).toBe('\u2400\u2407\u241f');
    expect(sanitizeText('\u007f')).toBe('\u2421');
    expect(sanitizeText('\u009b31m\u0085')).toBe('\ufffd31m\ufffd');
  });

  it('keeps tab, LF and CR only when asked (formats that carry them)', () => {
    expect(sanitizeText('a\tb\nc\rd')).toBe('a\u2409b\u240ac\u240dd');
    expect(sanitizeText('a\tb\nc\rd\u001be', { keepWhitespace: true })).toBe('a\tb\nc\rd\u241be');
  });

  it('returns text without controls unchanged, including non-Latin text and emoji', () => {
    const text = 'Ees 2,1 mmHg/mL · 心 · ❤️ · é';
    expect(sanitizeText(text)).toBe(text);
  });
});

describe('escapeMarkup (HTML and SVG)', () => {
  it('escapes & < > " and replaces controls that XML 1.0 forbids (§2.2 Char production)', () => {
    expect(escapeMarkup('<b a="1">&\u001b\u0001</b>\n')).toBe('&lt;b a=&quot;1&quot;&gt;&amp;\u241b\u2401&lt;/b&gt;\n');
  });
});

describe('escapeMarkdownInline', () => {
  it('turns CRLF, LF and a lone CR each into one space (CommonMark line endings), so no heading, code block or list can start', () => {
    expect(escapeMarkdownInline('one\r# two\r\n    three\n- four')).toBe('one \\# two     three - four');
    expect(escapeMarkdownInline('a\rb')).not.toContain('\r');
  });

  it('escapes table pipes, backslashes and emphasis marks, and replaces other controls', () => {
    expect(escapeMarkdownInline('a|b\\c*d_e\u001b')).toBe('a\\|b\\\\c\\*d\\_e\u241b');
  });
});
