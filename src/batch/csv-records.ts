/**
 * Records of a CSV file certa wrote (RFC 4180: fields in double quotes may hold commas, quotes
 * doubled, and line breaks), kept as the exact text they were written as. Merging shard outputs
 * moves records whole, so the merged file has the same bytes as one run would have written,
 * without reading and re-writing a single field.
 */

export interface RawRecord {
  /** The record's text including its line ending. */
  text: string;
  /** Its fields as written (quotes kept), to compare with fields of other files certa wrote. */
  fields: string[];
}

/** The records of `text` in order; a final record without a line ending is kept as it is. */
export function rawRecords(text: string): RawRecord[] {
  const out: RawRecord[] = [];
  let start = 0;
  let fieldStart = 0;
  let fields: string[] = [];
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"') {
        if (text[i + 1] === '"') i++;
        else quoted = false;
      }
      continue;
    }
    if (ch === '"') quoted = true;
    else if (ch === ',') {
      fields.push(text.slice(fieldStart, i));
      fieldStart = i + 1;
    } else if (ch === '\n' || ch === '\r') {
      const end = ch === '\r' && text[i + 1] === '\n' ? i + 2 : i + 1;
      fields.push(text.slice(fieldStart, i));
      out.push({ text: text.slice(start, end), fields });
      fields = [];
      start = end;
      fieldStart = end;
      i = end - 1;
    }
  }
  if (start < text.length) {
    fields.push(text.slice(fieldStart));
    out.push({ text: text.slice(start), fields });
  }
  return out;
}

/**
 * Records grouped by their first field as written (the series of a forecasts.csv record), each
 * group in the order met; added to `groups` when given (the tables of several shards).
 */
export function byFirstField(records: readonly RawRecord[], groups: Map<string, RawRecord[]> = new Map()): Map<string, RawRecord[]> {
  for (const r of records) {
    const list = groups.get(r.fields[0]);
    if (list) list.push(r);
    else groups.set(r.fields[0], [r]);
  }
  return groups;
}
