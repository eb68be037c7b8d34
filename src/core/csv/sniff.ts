// Delimiter detection from the first bytes of a file.

export const DELIMITER_CANDIDATES: readonly string[] = [',', ';', '\t', '|'];

/** How many bytes are enough to tell the delimiter; beyond this more rows rarely change the answer. */
export const SNIFF_BYTES = 64 * 1024;
const SNIFF_RECORDS = 100;

const QUOTE = 0x22;
const CR = 0x0d;
const LF = 0x0a;
const SPACE = 0x20;
const TAB = 0x09;

/**
 * Field counts of the first records when `delimiter` separates fields, following RFC 4180 quoting
 * (a field that starts with a double quote runs to the matching quote; "" inside it is one quote), so a
 * delimiter or line break inside quotes does not count. Blank lines are skipped. The last record is left
 * out when the sample may have cut it short.
 */
export function fieldCounts(sample: Uint8Array, delimiter: number, complete: boolean): number[] {
  const counts: number[] = [];
  let i = sample.length >= 3 && sample[0] === 0xef && sample[1] === 0xbb && sample[2] === 0xbf ? 3 : 0;
  let fields = 1;
  let fieldStart = true;
  let recordEmpty = true;
  let quoting = false;
  const n = sample.length;
  for (; i < n && counts.length < SNIFF_RECORDS; i++) {
    const c = sample[i];
    if (quoting) {
      if (c === QUOTE) {
        if (i + 1 < n && sample[i + 1] === QUOTE) i++;
        else quoting = false;
      }
      continue;
    }
    if (c === CR || c === LF) {
      if (c === CR && i + 1 < n && sample[i + 1] === LF) i++;
      if (!recordEmpty) counts.push(fields);
      fields = 1;
      fieldStart = true;
      recordEmpty = true;
      continue;
    }
    if (c === delimiter) {
      fields++;
      fieldStart = true;
      recordEmpty = false;
      continue;
    }
    if (fieldStart && (c === SPACE || (c === TAB && delimiter !== TAB))) continue;
    recordEmpty = false;
    if (fieldStart && c === QUOTE) quoting = true;
    fieldStart = false;
  }
  if (complete && i >= n && !recordEmpty && !quoting) counts.push(fields);
  return counts;
}

/**
 * The candidate that splits the header into the most fields while splitting the following records into the
 * same number as the header. Among candidates that split nothing the answer is a comma (a one-column file).
 */
export function sniffDelimiter(sample: Uint8Array, complete: boolean): string {
  let best = ',';
  let bestConsistency = -1;
  let bestFields = 1;
  for (const candidate of DELIMITER_CANDIDATES) {
    const counts = fieldCounts(sample, candidate.charCodeAt(0), complete);
    if (counts.length === 0 || counts[0] < 2) continue;
    const header = counts[0];
    let same = 0;
    for (let r = 1; r < counts.length; r++) if (counts[r] === header) same++;
    const consistency = counts.length > 1 ? same / (counts.length - 1) : 1;
    if (consistency > bestConsistency || (consistency === bestConsistency && header > bestFields)) {
      best = candidate;
      bestConsistency = consistency;
      bestFields = header;
    }
  }
  return best;
}
