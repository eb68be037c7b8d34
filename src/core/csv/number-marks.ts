// Numbers written with a comma: a decimal comma ("1,5", common in files that separate fields with ";") or
// thousands separators ("1,234" or "1.234,5"). Copse reads a dot as the decimal mark, so such cells are text and
// their column turns categorical or loses its cells; the loader counts them and says so in a note. When the
// caller names the decimal mark (LoadOptions.decimalMark), the other of comma and dot is read as a thousands
// separator and such cells are numbers.
import { parseDecimal } from './numbers';
import { q } from './wording';

export type DecimalMark = '.' | ',';

/** Digits with one decimal comma: 1,5  -3,25 */
const DECIMAL_COMMA = /^[-+]?\d+,\d+$/;
/** Digits grouped in threes by commas, with an optional decimal dot: 1,234  12,345.5 */
const COMMA_GROUPS = /^[-+]?\d{1,3}(?:,\d{3})+(?:\.\d+)?$/;
/** Digits grouped in threes by dots (or spaces), with a decimal comma: 1.234,5  1 234,5 */
const DOT_GROUPS = /^[-+]?\d{1,3}(?:[. ]\d{3})+,\d+$/;

/** Whether a cell that did not read as a number looks like one written with a comma. Cheap: most text fails at once. */
export function looksCommaNumber(s: string): boolean {
  const c = s.charCodeAt(s.length - 1);
  if (c < 48 || c > 57 || s.indexOf(',') < 0) return false;
  return DECIMAL_COMMA.test(s) || COMMA_GROUPS.test(s) || DOT_GROUPS.test(s);
}

const GROUPED_COMMA_MARK = /^[-+]?\d{1,3}(?:[. ]\d{3})+(?:,\d+)?$/;
const GROUPED_DOT_MARK = /^[-+]?\d{1,3}(?:[, ]\d{3})+(?:\.\d+)?$/;

/**
 * The number a cell holds under a named decimal mark, or NaN. With ',' the comma is the decimal mark and dots or
 * spaces may group thousands ("1.234,5"); with '.' commas or spaces may group thousands ("1,234.5"). Groups must
 * be of three digits, so "1,5" under '.' stays text rather than becoming 15.
 */
export function parseWithMark(s: string, mark: DecimalMark): number {
  const plain = parseDecimal(s);
  if (plain === plain) return mark === ',' && s.indexOf('.') >= 0 ? groupedOrNaN(s, mark) : plain;
  return groupedOrNaN(s, mark);
}

function groupedOrNaN(s: string, mark: DecimalMark): number {
  if (mark === ',') {
    if (DECIMAL_COMMA.test(s)) return parseDecimal(s.replace(',', '.'));
    if (GROUPED_COMMA_MARK.test(s)) return parseDecimal(s.replace(/[. ]/g, '').replace(',', '.'));
    return NaN;
  }
  return GROUPED_DOT_MARK.test(s) ? parseDecimal(s.replace(/[, ]/g, '')) : NaN;
}

/** The note for a column with `cells` cells that look like numbers written with a comma, `example` one of them. */
export function commaNumberNote(name: string, cells: number, example: string): string {
  return (
    `Column ${q(name)} has ${cells === 1 ? 'a cell' : `${cells.toLocaleString('en-US')} cells`} that look like numbers written with a comma (such as ${q(example)}), ` +
    `read as text because Copse takes a dot as the decimal mark; add --decimal-mark , if the comma is the decimal mark, ` +
    `or --decimal-mark . if it separates thousands, to read them as numbers (or --type ${name}=categorical if they are labels).`
  );
}

/** What the loader needs of a column builder to decide on the note. */
export interface CommaCount {
  readonly name: string;
  readonly texts: number;
  readonly commaNumbers: number;
  readonly firstCommaNumber: string;
}

/**
 * The note for a column most of whose text cells look like numbers written with a comma, else undefined. A column
 * the user forced to categorical or boolean has been decided on and gets none.
 */
export function commaNote(b: CommaCount, forced: string | undefined): string | undefined {
  if (forced === 'categorical' || forced === 'boolean' || b.commaNumbers === 0 || b.commaNumbers * 2 < b.texts) return undefined;
  return commaNumberNote(b.name, b.commaNumbers, b.firstCommaNumber);
}
