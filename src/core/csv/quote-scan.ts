// Where an unclosed quote opened. csv-parse only notices at the end of the input and reports the last line,
// which is not where the user has to look.

export interface OpenQuote {
  readonly line: number;
  /** 0-based field index within its record. */
  readonly field: number;
}

/**
 * Re-reads from `offset` (the start of a record, on physical line `line`) with the same rules the parser uses:
 * RFC 4180 quoting ("" inside quotes is one quote), a quote opens a field only at its start after spaces,
 * and any other quote inside a quoted field closes it. Returns the last quote still open at the end, if any.
 */
export async function findOpenQuote(
  chunks: AsyncIterable<Uint8Array>,
  line: number,
  delimiter: number,
  skipBom: boolean,
): Promise<OpenQuote | undefined> {
  let quoting = false;
  let quoteSeen = false; // inside quotes, the previous byte was a quote that may start "" or close
  let fieldStart = true;
  let field = 0;
  let previous = 0;
  let open: OpenQuote | undefined;
  let first = skipBom;
  for await (const chunk of chunks) {
    let i = 0;
    if (first) {
      first = false;
      if (chunk.length >= 3 && chunk[0] === 0xef && chunk[1] === 0xbb && chunk[2] === 0xbf) i = 3;
    }
    for (; i < chunk.length; i++) {
      const c = chunk[i];
      const newline = c === 0x0a ? previous !== 0x0d : c === 0x0d;
      previous = c;
      if (newline) line++;
      if (quoting) {
        if (quoteSeen) {
          quoteSeen = false;
          if (c === 0x22) continue; // "" is an escaped quote
          quoting = false;
          fieldStart = false;
          // fall through: this byte is read outside the quotes
        } else {
          if (c === 0x22) quoteSeen = true;
          continue;
        }
      }
      if (c === delimiter) {
        field++;
        fieldStart = true;
      } else if (c === 0x0a || c === 0x0d) {
        field = 0;
        fieldStart = true;
      } else if (fieldStart && (c === 0x20 || c === 0x09)) {
        // leading blanks are trimmed, so a quote after them still opens the field
      } else {
        if (fieldStart && c === 0x22) {
          quoting = true;
          open = { line, field };
        }
        fieldStart = false;
      }
    }
  }
  return quoting && !quoteSeen ? open : undefined;
}
