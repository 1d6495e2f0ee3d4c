/**
 * Labels, names and serials are read aloud, printed on QR tags and picked from lists, so two
 * that look the same must not name two things. Three pure steps, used by the zod schemas (what is
 * stored) and by the server's "already taken" check (what counts as the same):
 *
 * - `labelProblem`: invisible characters (zero-width, soft hyphen, BOM, …) and text-direction
 *   controls (U+202A–202E, U+2066–2069, U+200E/F) are refused: they hide in a label and make it
 *   read, sort or match differently from what the screen shows.
 * - `normaliseLabel`: Unicode NFKC (full-width letters, ligatures and the like become their plain
 *   form), whitespace runs become one space, ends trimmed. This is what is stored.
 * - `labelSkeleton`: what a label looks like, for comparison only: case folded, dashes and hyphens
 *   made one hyphen, and the Cyrillic and Greek letters that are drawn like Latin ones mapped to
 *   them (a small table of the common ones, after Unicode's confusables list, UTS #39). `МH-1`
 *   (Cyrillic М) and `MH‑1` (non-breaking hyphen) have the skeleton of `MH-1`.
 *   Digits are left alone (`B-10` and `B-1O` are not merged): serials mix them on purpose.
 */

// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
const DIRECTION = /[\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/;
const INVISIBLE = /[\u00ad\u034f\u115f\u1160\u17b4\u17b5\u180b-\u180f\u200b-\u200d\u2060-\u2064\u206a-\u206f\u3164\ufe00-\ufe0f\ufeff\uffa0]/;
const DASHES = /[\u2010-\u2015\u2043\u2212\u2e3a\u2e3b\ufe58\ufe63\uff0d]/g;

/** Cyrillic and Greek letters (lower case, after case folding) drawn like a Latin letter. */
const CONFUSABLE: Record<string, string> = {
  // Cyrillic
  а: 'a', в: 'b', е: 'e', һ: 'h', н: 'h', і: 'i', ј: 'j', к: 'k', ӏ: 'l', м: 'm', о: 'o', р: 'p', ԛ: 'q', с: 'c', ѕ: 's', т: 't', у: 'y', ү: 'y', х: 'x', ԁ: 'd', ԝ: 'w', ѵ: 'v', ɡ: 'g',
  // Greek
  α: 'a', β: 'b', ε: 'e', ζ: 'z', η: 'h', ι: 'i', κ: 'k', μ: 'm', ν: 'n', ο: 'o', ρ: 'p', τ: 't', υ: 'y', χ: 'x', ϲ: 'c', ϳ: 'j',
};

/** Why a label cannot be taken as typed, in words for the field; null when it can. */
export function labelProblem(text: string): string | null {
  if (DIRECTION.test(text)) return 'Remove the hidden text-direction mark: it makes the text read differently from how it looks';
  if (INVISIBLE.test(text)) return 'Remove the invisible character (a zero-width space, soft hyphen or similar)';
  if (CONTROL.test(text)) return 'Remove the control character';
  return null;
}

/** What is stored: NFKC, one space between words, no spaces at the ends. */
export function normaliseLabel(text: string): string {
  return text.normalize('NFKC').replace(/\s+/gu, ' ').trim();
}

/** What a label looks like, for telling whether two are the same to a reader. */
export function labelSkeleton(text: string): string {
  const folded = normaliseLabel(text).replace(DASHES, '-').toLowerCase();
  let out = '';
  for (const ch of folded) out += CONFUSABLE[ch] ?? ch;
  return out;
}

/** The message for a value already taken, by itself or by a look-alike: it names the existing one. */
export function takenMessage(what: string, value: string, existing: string): string {
  return existing === value ? `${what} “${existing}” already exists.` : `“${value}” looks the same as the existing ${what.toLowerCase()} “${existing}”; choose one that reads differently.`;
}
