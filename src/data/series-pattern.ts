/**
 * `--series`: which series of a file to keep. The value is a comma-separated list of names and
 * glob patterns (`*` any run of characters, `?` one character, `[abc]` / `[a-z]` one of a set,
 * `\` before a character takes it literally, e.g. `\,` for a comma in a name). A value that is
 * exactly the name of a series selects that series alone, commas and all.
 *
 * The kept series stay in the order of the file. A plain name that is not in the file, or a
 * pattern that matches nothing, is an error naming it (no silent empty run).
 */

export interface SeriesPatternMiss {
  /** The list item that selected nothing. */
  item: string;
  glob: boolean;
}

/** The list items of `--series` (split at unescaped commas, surrounding spaces dropped). */
export function splitSeriesList(value: string): string[] {
  const items: string[] = [];
  let current = '';
  for (let i = 0; i < value.length; i++) {
    const ch = value[i];
    if (ch === '\\' && i + 1 < value.length) {
      current += ch + value[i + 1];
      i++;
    } else if (ch === ',') {
      items.push(current);
      current = '';
    } else current += ch;
  }
  items.push(current);
  return items.map((s) => s.trim()).filter((s) => s.length > 0);
}

/** True when the item has an unescaped glob character. */
export function isGlob(item: string): boolean {
  for (let i = 0; i < item.length; i++) {
    if (item[i] === '\\') i++;
    else if (item[i] === '*' || item[i] === '?' || item[i] === '[') return true;
  }
  return false;
}

/** The item with its escapes removed (for a plain name). */
export function unescapeItem(item: string): string {
  return item.replace(/\\(.)/gsu, '$1');
}

const escapeRegex = (s: string): string => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** A glob item as an anchored regular expression. */
export function globRegex(item: string): RegExp {
  let src = '';
  for (let i = 0; i < item.length; i++) {
    const ch = item[i];
    if (ch === '\\' && i + 1 < item.length) src += escapeRegex(item[++i]);
    else if (ch === '*') src += '[\\s\\S]*';
    else if (ch === '?') src += '[\\s\\S]';
    else if (ch === '[') {
      const close = item.indexOf(']', i + 2);
      if (close < 0) {
        src += '\\[';
        continue;
      }
      let body = item.slice(i + 1, close);
      const negate = body.startsWith('!') || body.startsWith('^');
      if (negate) body = body.slice(1);
      src += `[${negate ? '^' : ''}${body.replace(/[\]\\^]/g, '\\$&')}]`;
      i = close;
    } else src += escapeRegex(ch);
  }
  return new RegExp(`^${src}$`, 'u');
}

/**
 * The indices (in file order) of the names `value` selects, or the first list item that selects
 * nothing.
 */
export function selectSeries(value: string, names: readonly string[]): { indices: number[] } | { miss: SeriesPatternMiss } {
  const exact = names.indexOf(value);
  if (exact >= 0) return { indices: [exact] };
  const chosen = new Set<number>();
  for (const item of splitSeriesList(value)) {
    if (isGlob(item)) {
      const re = globRegex(item);
      let hit = false;
      names.forEach((n, i) => {
        if (re.test(n)) {
          chosen.add(i);
          hit = true;
        }
      });
      if (!hit) return { miss: { item, glob: true } };
    } else {
      const name = unescapeItem(item);
      const i = names.indexOf(name);
      if (i < 0) return { miss: { item: name, glob: false } };
      chosen.add(i);
    }
  }
  if (chosen.size === 0) return { miss: { item: value, glob: false } };
  return { indices: [...chosen].sort((a, b) => a - b) };
}
