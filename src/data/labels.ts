import { LIMITS } from '../limits.js';
/**
 * What makes a label (a state name, a site id) acceptable, and when two labels are probably the
 * same one typed differently. Labels become keys: two spellings that look alike on screen but differ
 * in bytes would silently become two states, splitting the counts.
 */

export const MAX_STATES = LIMITS.states;
export const MAX_LABEL_LENGTH = LIMITS.labelLength;

/**
 * NFC, the form most keyboards produce: 'é' typed as one character and as 'e' + combining accent
 * are the same label. ASCII is already NFC, so most values skip the work.
 */
export function normaliseLabel(label: string): string {
  return /^[\x20-\x7e]*$/.test(label) ? label : label.normalize('NFC');
}

/** Control and format characters (Unicode Cc, Cf): zero-width spaces and joiners, BOMs, bidi controls, tabs. */
const INVISIBLE = /[\p{Cc}\p{Cf}]/u;

const NAMES = new Map<number, string>([
  [0x00ad, 'SOFT HYPHEN'], [0x200b, 'ZERO WIDTH SPACE'], [0x200c, 'ZERO WIDTH NON-JOINER'],
  [0x200d, 'ZERO WIDTH JOINER'], [0x200e, 'LEFT-TO-RIGHT MARK'], [0x200f, 'RIGHT-TO-LEFT MARK'],
  [0x202a, 'LEFT-TO-RIGHT EMBEDDING'], [0x202b, 'RIGHT-TO-LEFT EMBEDDING'], [0x202c, 'POP DIRECTIONAL FORMATTING'],
  [0x202d, 'LEFT-TO-RIGHT OVERRIDE'], [0x202e, 'RIGHT-TO-LEFT OVERRIDE'], [0x2060, 'WORD JOINER'],
  [0x2066, 'LEFT-TO-RIGHT ISOLATE'], [0x2067, 'RIGHT-TO-LEFT ISOLATE'], [0x2068, 'FIRST STRONG ISOLATE'],
  [0x2069, 'POP DIRECTIONAL ISOLATE'], [0xfeff, 'BYTE ORDER MARK'], [0x0009, 'TAB'], [0x000d, 'CARRIAGE RETURN'],
  [0x000a, 'LINE FEED'], [0x001b, 'ESCAPE'],
]);

/** `U+200B ZERO WIDTH SPACE`, `U+0430 (Cyrillic)`: enough to find the character in an editor. */
export function describeCharacter(c: string): string {
  const code = c.codePointAt(0)!;
  const hex = `U+${code.toString(16).toUpperCase().padStart(4, '0')}`;
  const name = NAMES.get(code);
  if (name) return `${hex} ${name}`;
  if (/\p{Cc}/u.test(c)) return `${hex} (a control character)`;
  if (/\p{Cf}/u.test(c)) return `${hex} (an invisible format character)`;
  const script = ['Cyrillic', 'Greek', 'Latin'].find((s) => new RegExp(`\\p{Script=${s}}`, 'u').test(c));
  return script ? `${hex} (${script})` : hex;
}

export interface LabelProblem {
  readonly code: 'INVISIBLE_CHARACTER' | 'LABEL_TOO_LONG';
  readonly what: string;
  readonly hint: string;
}

/**
 * Why a (normalised) label cannot be used, or undefined when it can. `role` names the label in the
 * message; give a function when making it costs (a million site ids are checked on reading).
 */
export function labelProblem(label: string, role: string | (() => string)): LabelProblem | undefined {
  const invisible = INVISIBLE.exec(label);
  if (invisible === null && label.length <= MAX_LABEL_LENGTH) return undefined;
  if (typeof role === 'function') role = role();
  if (invisible) {
    const position = [...label.slice(0, invisible.index)].length + 1;
    return {
      code: 'INVISIBLE_CHARACTER',
      what: `${role} holds an invisible character, ${describeCharacter(invisible[0])}, at character ${position}`,
      hint: 'delete it (retype the value); such characters make labels that look the same differ',
    };
  }
  if (label.length > MAX_LABEL_LENGTH && [...label].length > MAX_LABEL_LENGTH) {
    return {
      code: 'LABEL_TOO_LONG',
      what: `${role} is ${[...label].length} characters long (at most ${MAX_LABEL_LENGTH})`,
      hint: 'shorten it, or check that the right column is named',
    };
  }
  return undefined;
}

/**
 * Latin letters that Cyrillic and Greek letters are commonly mistaken for (a keyboard layout left
 * switched, text pasted from another document). Not the full Unicode confusables table: the
 * letters that look the same in ordinary fonts.
 */
const LOOK_ALIKES = new Map<string, string>([
  // Cyrillic, then Greek: each pair is the look-alike and the Latin letter it passes for.
  'АA ВB ЕE ЅS ІI ЈJ КK МM НH ОO РP СC ТT УY ХX ҮY ԚQ ԜW аa еe ѕs іi јj кk оo рp сc уy хx һh ԁd ԛq ԝw ӏl үy',
  'ΑA ΒB ΕE ΖZ ΗH ΙI ΚK ΜM ΝN ΟO ΡP ΤT ΥY ΧX οo νv ιi κk ρp υu χx',
].join(' ').split(' ').map((pair) => [pair[0]!, pair[1]!] as [string, string]).concat(
  // Dashes and minus signs that NFKC leaves alone but readers take for a hyphen.
  [...'\u2010\u2011\u2012\u2013\u2014\u2015\u2212'].map((c) => [c, '-']),
));

/**
 * Two labels with the same key are probably one label typed two ways: equal after compatibility
 * normalisation (NFKC: full-width letters, ligatures, no-break spaces), look-alike letters mapped to
 * Latin, and case folding (upper- then lower-case, so 'ß' and 'SS' agree).
 */
export function lookAlikeKey(label: string): string {
  let out = '';
  for (const c of label.normalize('NFKC')) out += LOOK_ALIKES.get(c) ?? c;
  return out.toUpperCase().toLowerCase().trim();
}

/** The first character at which two look-alike labels differ, described: for the message. */
export function firstDifference(a: string, b: string): string {
  const x = [...a];
  const y = [...b];
  for (let n = 0; n < Math.max(x.length, y.length); n++) {
    // Case is reported separately; look for the character that is really different.
    if (x[n]?.toLowerCase() !== y[n]?.toLowerCase()) {
      const show = (c: string | undefined): string => (c === undefined ? 'nothing' : describeCharacter(c));
      return `character ${n + 1} is ${show(x[n])} here but ${show(y[n])} there`;
    }
  }
  return 'they are identical';
}
