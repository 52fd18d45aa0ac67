/**
 * --series lists and globs (src/data/series-pattern.ts): expected selections worked out by hand
 * from the rule in the module comment.
 */
import { describe, expect, it } from 'vitest';
import { globRegex, selectSeries, splitSeriesList } from '../../src/data/series-pattern.js';

const names = ['north-1', 'north-2', 'south-1', 'a,b', 'east', 'a*b'];

describe('selectSeries', () => {
  it('keeps file order for a list given in another order', () => {
    expect(selectSeries('east,north-1', names)).toEqual({ indices: [0, 4] });
  });
  it('matches globs with *, ? and [set], and merges overlaps', () => {
    expect(selectSeries('north*', names)).toEqual({ indices: [0, 1] });
    expect(selectSeries('*-1,north-?', names)).toEqual({ indices: [0, 1, 2] });
    expect(selectSeries('[ns]*-2', names)).toEqual({ indices: [1] });
    expect(selectSeries('[!n]*-1', names)).toEqual({ indices: [2] });
  });
  it('takes a value that is exactly a name as that name, commas and all; \\, and \\* escape', () => {
    expect(selectSeries('a,b', names)).toEqual({ indices: [3] });
    expect(selectSeries('east,a\\,b', names)).toEqual({ indices: [3, 4] });
    expect(selectSeries('a\\*b', names)).toEqual({ indices: [5] });
  });
  it('names the item that selects nothing', () => {
    expect(selectSeries('east,west', names)).toEqual({ miss: { item: 'west', glob: false } });
    expect(selectSeries('west*', names)).toEqual({ miss: { item: 'west*', glob: true } });
  });
  it('splitSeriesList drops blanks and spaces around items; globRegex is anchored', () => {
    expect(splitSeriesList(' a , ,b ')).toEqual(['a', 'b']);
    expect(globRegex('no*').test('xnorth')).toBe(false);
  });
});
