/**
 * Readers for the NIST StRD linear-regression fixtures in test/fixtures/nist/ (see PROVENANCE.md
 * there): data and certified values are parsed from the files, never typed into tests.
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { DesignMatrix } from '../../src/linalg/matrix.js';

const dir = join(dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'nist');

export interface NistProblem {
  name: string;
  phi: DesignMatrix;
  y: Float64Array;
  names: string[];
  /** Certified coefficients B0, B1, ... and their standard deviations. */
  certified: number[];
  certifiedSd: number[];
  /** Certified residual standard deviation. */
  residualSd: number;
}

/** Log relative error −log10(|est − cert|/|cert|) (McCullough 1998), capped at 15.9 for exact agreement. */
export function lre(est: number, cert: number): number {
  const rel = Math.abs(est - cert) / Math.abs(cert);
  return rel === 0 ? 15.9 : Math.min(15.9, -Math.log10(rel));
}

function polynomialDesign(x: number[], degree: number): DesignMatrix {
  const n = x.length;
  const p = degree + 1;
  const data = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    let v = 1;
    for (let j = 0; j < p; j++) {
      data[i * p + j] = v;
      v *= x[i];
    }
  }
  return { rows: n, cols: p, data };
}

/** A polynomial-class NIST `.dat` file (Wampler1, Wampler2, Filip): certified block, then `Data:` y x rows. */
export function readPolynomialDat(file: string): NistProblem {
  const text = readFileSync(join(dir, file), 'utf8');
  const lines = text.split(/\r?\n/);
  const certified: number[] = [];
  const certifiedSd: number[] = [];
  let residualSd = NaN;
  let dataStart = -1;
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i];
    const b = /^\s*B(\d+)\s+(\S+)\s+(\S+)\s*$/.exec(line);
    if (b) {
      certified[Number(b[1])] = Number(b[2]);
      certifiedSd[Number(b[1])] = Number(b[3]);
    }
    const sd = /^\s*Standard Deviation\s+(\S+)\s*$/.exec(line);
    if (sd && /Residual/.test(lines[i - 1])) residualSd = Number(sd[1]);
    if (/^Data:\s+y\s+x\s*$/.test(line)) dataStart = i + 1;
  }
  if (dataStart < 0 || certified.length === 0 || Number.isNaN(residualSd)) throw new Error(`${file}: certified block or data not found`);
  const x: number[] = [];
  const y: number[] = [];
  for (const line of lines.slice(dataStart)) {
    const parts = line.trim().split(/\s+/);
    if (parts.length !== 2) continue;
    y.push(Number(parts[0]));
    x.push(Number(parts[1]));
  }
  const degree = certified.length - 1;
  return {
    name: file.replace(/\.dat$/, ''),
    phi: polynomialDesign(x, degree),
    y: Float64Array.from(y),
    names: certified.map((_, j) => (j === 0 ? '1' : `x^${j}`)),
    certified,
    certifiedSd,
    residualSd,
  };
}

/** A CSV (`y,x1,...`) plus a `*_certified.txt` with ` Bj value SD sd` lines and `Residual SD v`. An intercept column is prepended. */
export function readCsvProblem(name: string): NistProblem {
  const csv = readFileSync(join(dir, `${name}.csv`), 'utf8').trim().split(/\r?\n/);
  const header = csv[0].split(',');
  const rows = csv.slice(1).map((l) => l.split(',').map(Number));
  const n = rows.length;
  const p = header.length; // intercept + (header.length − 1) predictors
  const data = new Float64Array(n * p);
  const y = new Float64Array(n);
  rows.forEach((r, i) => {
    y[i] = r[0];
    data[i * p] = 1;
    for (let j = 1; j < p; j++) data[i * p + j] = r[j];
  });
  const cert = readFileSync(join(dir, `${name}_certified.txt`), 'utf8').split(/\r?\n/);
  const certified: number[] = [];
  const certifiedSd: number[] = [];
  let residualSd = NaN;
  for (const line of cert) {
    const b = /^\s*B(\d+)\s+(\S+)\s+SD\s+(\S+)\s*$/.exec(line);
    if (b) {
      certified[Number(b[1])] = Number(b[2]);
      certifiedSd[Number(b[1])] = Number(b[3]);
    }
    const r = /Residual SD\s+([-+0-9.Ee]+)/.exec(line);
    if (r) residualSd = Number(r[1]);
  }
  if (certified.length !== p || Number.isNaN(residualSd)) throw new Error(`${name}: certified values not found`);
  return { name, phi: { rows: n, cols: p, data }, y, names: ['1', ...header.slice(1)], certified, certifiedSd, residualSd };
}
