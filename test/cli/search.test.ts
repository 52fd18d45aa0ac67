import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync, existsSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../src/cli/main.js';
import { parseResult } from './result.js';
import { capture } from './in-process.js';
import { readModelFile } from '../../src/store/model-file.js';
import { structureFromSpec } from '../../src/models/registry.js';
import { noise, simulateArx } from '../models/arx-fixtures.js';

/** A monthly CSV: sales_t = 5 + 0.5 sales_{t−1} + 1.5 price_{t−2} + e_t, 2015-01 … 2022-12 (seeded). */
function writeCsv(dir: string): string {
  const n = 96;
  const price = noise(n + 50, 1, 91);
  const y = simulateArx({ n, c: 5, a: [0.5], b: [1.5], delay: 2, u: price, e: noise(n + 50, 0.3, 92) });
  const lines = ['month,sales,price'];
  for (let t = 0; t < n; t++) {
    const m = new Date(Date.UTC(2015, t, 1));
    lines.push(`${m.getUTCFullYear()}-${String(m.getUTCMonth() + 1).padStart(2, '0')},${(y[t] + 20).toFixed(4)},${price[t + 50].toFixed(4)}`);
  }
  const file = join(dir, 'shop.csv');
  writeFileSync(file, `${lines.join('\n')}\n`);
  return file;
}

describe('certa search', () => {
  it('prints the ranking, writes candidates.csv (every candidate) and a model.json that reads back', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'certa-search-'));
    const file = writeCsv(dir);
    const out = join(dir, 'out');
    const c = capture();
    const code = await main(['node', 'certa', 'search', file, '--inputs', 'price', '--families', 'arx', '--max-delay', '3', '--top', '5', '--out', out], c.io);
    expect(c.err()).toBe('');
    expect(code).toBe(0);
    const text = c.out();
    expect(text).toMatch(/rank\s+AICc\s+ΔAICc\s+weight/);
    expect(text).toMatch(/winner: .*price/);
    expect(text).toMatch(/term\s+estimate\s+std\. error\s+90 % interval/);
    const rankingLines = text.split('\n').filter((l) => /^\s+\d+\s+-?\d/.test(l));
    expect(rankingLines.length).toBe(5);
    const csv = readFileSync(join(out, 'candidates.csv'), 'utf8').trim().split(/\r\n/);
    expect(csv[0]).toBe('rank,status,key,family,structure,criterion,score,delta,weight,aicc,aic,bic,loglik,rss,k,n,first,last,reason');
    const total = Number(/of (\d+) candidates fitted/.exec(text)?.[1]);
    expect(csv.length - 1).toBe(total);
    const body = await readModelFile(join(out, 'model.json'));
    const structure = structureFromSpec(body.structure);
    expect(body.terms).toEqual(structure.terms);
    expect(body.theta.length).toBe(structure.terms.length);
    expect(body.series.name).toBe('sales');
    expect(body.criterion.name).toBe('aicc');
    expect((structure.spec as unknown as { inputs: { delay: number }[] }).inputs[0].delay).toBe(2);
    // No temporary files left behind by the atomic writes.
    expect(readdirSync(out).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it('--json prints one parseable document with the ranking and the winner', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'certa-search-'));
    const file = writeCsv(dir);
    const c = capture();
    const code = await main(['node', 'certa', 'search', file, '--inputs', 'price', '--families', 'arx', '--json', '--criterion', 'bic', '--trend', 'off', '--out', join(dir, 'o')], c.io);
    expect(code).toBe(0);
    const doc = parseResult(c.out()).results[0].detail;
    expect(doc.criterion).toBe('bic');
    expect(doc.ranking.length).toBe(10);
    expect(doc.ranking[0].rank).toBe(1);
    expect(doc.ranking[0].delta).toBe(0);
    expect(doc.winner.terms.length).toBe(doc.winner.theta.length);
    // the interval bounds of the printed coefficient table: estimate ∓ Φ⁻¹(0.95)·se at 90 %
    expect(doc.winner.coefficient_level).toBe(90);
    doc.winner.theta.forEach((theta: number, j: number) => {
      expect(doc.winner.lower[j]).toBeCloseTo(theta - 1.6448536269514722 * doc.winner.se[j], 9);
      expect(doc.winner.upper[j]).toBeCloseTo(theta + 1.6448536269514722 * doc.winner.se[j], 9);
    });
    expect(doc.winner.whiteness.dof).toBeGreaterThan(0);
    expect(existsSync(doc.files.model)).toBe(true);
  });

  it('refuses a bad bound with one certa: line and exit code 2', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'certa-search-'));
    const file = writeCsv(dir);
    const c = capture();
    const code = await main(['node', 'certa', 'search', file, '--max-ar', 'three'], c.io);
    expect(code).toBe(2);
    expect(c.err()).toMatch(/^certa: option --max-ar has an unusable value \(found "three", expected a whole number ≥ 0\)\n$/);
    const c2 = capture();
    expect(await main(['node', 'certa', 'search', file, '--trend', 'maybe'], c2.io)).toBe(2);
    expect(c2.err()).toMatch(/--trend.*on, off or auto/);
  });

  it('reports a constant series as a user error, not a crash', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'certa-search-'));
    const file = join(dir, 'flat.csv');
    writeFileSync(file, `month,sales\n${Array.from({ length: 30 }, (_, t) => `20${10 + Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, '0')},7`).join('\n')}\n`);
    const c = capture();
    const code = await main(['node', 'certa', 'search', file, '--out', join(dir, 'o')], c.io);
    expect(code).toBe(2);
    expect(c.err()).toMatch(/certa: .*constant/);
  });
});
