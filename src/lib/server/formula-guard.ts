/**
 * Text that a spreadsheet program would run as a formula: starting with =, +, - or @ (also after leading
 * spaces, tabs, line breaks or other white space, which spreadsheet programs skip), their full-width forms,
 * or a tab or carriage return. OWASP's "CSV injection" guidance; it applies to .xlsx cells too.
 */
const FORMULA_START = /^(?:[\s\u00a0\u2000-\u200b\u3000\ufeff]*[=+\-@\uff1d\uff0b\uff0d\uff20]|[\t\r\n])/;

/** True when `text` would run as a formula in a spreadsheet program. */
export const looksLikeFormula = (text: string) => FORMULA_START.test(text);

/** Text written to an exported cell so that no spreadsheet program runs it: a leading apostrophe keeps it text. */
export function guardFormula(text: string): string {
  return looksLikeFormula(text) ? `'${text}` : text;
}
