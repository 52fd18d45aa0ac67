/**
 * resultDocumentText (src/report/result-json.ts): the --json document assembled from details
 * already written as summary.json texts must be the bytes toJson(resultDocument(...)) writes.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { resultDocument, resultDocumentText, summaryDocument, type ResultCommand } from '../../src/report/result-json.js';
import { toJson } from '../../src/report/tables.js';

describe('resultDocumentText', () => {
  it('equals toJson(resultDocument(...)) for ok and failed entries, with and without a file', () => {
    const summary = { seriesName: 'north "depot"', rows: [{ lower_50: 1.5, pValue: -0 }], typed: new Float64Array([1, Number.NaN]), note: 'a\nb', empty: {} };
    const detail = summaryDocument('forecast', summary);
    const entries = [
      { series: 'a,b', status: 'ok' as const, folder: 'a_b', reason: null, detail },
      { series: 'c', status: 'failed' as const, folder: null, reason: 'series "c": 4 points', detail: null },
    ];
    const written = entries.map(({ detail: d, ...e }) => ({ ...e, detailJson: d === null ? null : toJson(d) }));
    for (const command of ['forecast', 'search'] as ResultCommand[]) {
      expect(resultDocumentText(command, written)).toBe(toJson(resultDocument(command, entries)));
      expect(resultDocumentText(command, written, { file: { sourcePath: 'x.csv' } })).toBe(toJson(resultDocument(command, entries, { file: { sourcePath: 'x.csv' } })));
      expect(resultDocumentText(command, [])).toBe(toJson(resultDocument(command, [])));
    }
  });

  it('property: equals toJson(resultDocument(...)) for any JSON details and names (fast-check, seed 23)', () => {
    const detail = fc.dictionary(fc.string(), fc.jsonValue()).map((v) => JSON.parse(JSON.stringify(v)) as Record<string, unknown>);
    const entry = fc.record({ series: fc.string(), ok: fc.boolean(), folder: fc.option(fc.string()), reason: fc.option(fc.string()), detail });
    fc.assert(
      fc.property(fc.array(entry, { maxLength: 4 }), (list) => {
        const entries = list.map((e) => ({ series: e.series, status: e.ok ? ('ok' as const) : ('failed' as const), folder: e.folder, reason: e.reason, detail: e.ok ? e.detail : null }));
        const written = entries.map(({ detail: d, ...e }) => ({ ...e, detailJson: d === null ? null : toJson(summaryDocument('update', d)) }));
        const expected = entries.map((e) => ({ ...e, detail: e.detail === null ? null : summaryDocument('update', e.detail) }));
        expect(resultDocumentText('update', written)).toBe(toJson(resultDocument('update', expected)));
      }),
      { seed: 23, numRuns: 200 },
    );
  });
});
