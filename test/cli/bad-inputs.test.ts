/**
 * The catalogue of bad inputs: each runs the built CLI as a child process and must end with
 * exit code 2, one `certa: …` line on stderr (and at most one `hint: …` line), no stack trace,
 * and a message naming the file, row and column where they apply.
 *
 * Every hint must work when followed: a second test takes each case that prints a hint and does
 * what the hint says — passes the option it names (`pass --gaps carry`), drops the one it says
 * to drop, deletes the row it says to remove, runs the help it names, or, where the hint asks
 * for an edit of the file, applies that edit (`fix`) — and repeats with the next hint until
 * certa reads the file (exit 0), each step a new outcome.
 */
import { cpSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, runCli } from './run-cli.js';

interface Case {
  name: string;
  files?: Record<string, string | Buffer>;
  args: string[];
  stdin?: string | Buffer;
  /** Every pattern must match the `certa:` line. */
  says: RegExp[];
  /** The files after the edit the hint asks for, where it asks for one. */
  fix?: Record<string, string | Buffer>;
}

const monthly = (n: number, from = 0) =>
  Array.from({ length: n }, (_, i) => `${2020 + Math.floor((from + i) / 12)}-${String(((from + i) % 12) + 1).padStart(2, '0')},${i + 1}`).join('\n');

// Deterministic "garbage": bytes of a fixed linear congruential sequence, with a NUL.
const garbage = Buffer.from(Array.from({ length: 256 }, (_, i) => (i * 167 + 13) % 256));

const cases: Case[] = [
  { name: 'empty file', files: { 'empty.csv': '' }, args: ['empty.csv'], says: [/^certa: empty\.csv: the file is empty/] },
  { name: 'header only', files: { 'head.csv': 'date,sales\n' }, args: ['head.csv'], says: [/head\.csv/, /header but no data rows/] },
  { name: 'unknown column name', files: { 'a.csv': `month,sales\n${monthly(3)}\n` }, args: ['a.csv', '--time', 'when'], says: [/a\.csv/, /no column named "when"/, /"month", "sales"/] },
  { name: 'text in a value column', files: { 't.csv': 'month,sales\n2020-01,5\n2020-02,abc\n2020-03,6\n' }, args: ['t.csv'], says: [/t\.csv:3: column "sales"/, /found "abc"/] },
  { name: 'mixed frequencies', files: { 'm.csv': 'date,x\n2020-01-01,1\n2020-02-01,2\n2020-03-01,3\n2020-03-15,4\n2020-04-01,5\n' }, args: ['m.csv'], says: [/m\.csv:5: column "date"/, /mix frequencies/] },
  { name: 'ambiguous day/month order', files: { 'amb.csv': 'date,x\n03/04/2020,1\n04/04/2020,2\n' }, args: ['amb.csv'], says: [/amb\.csv:2: column "date"/, /ambiguous/] },
  { name: 'duplicate time stamps', files: { 'dup.csv': 'month,x\n2020-01,1\n2020-02,2\n2020-02,3\n' }, args: ['dup.csv'], says: [/dup\.csv:4: column "month"/, /rows 3, 4/] },
  { name: 'row with too many fields', files: { 'wide.csv': 'month,x\n2020-01,1\n2020-02,2,7\n' }, args: ['wide.csv'], says: [/wide\.csv:3/, /more fields/], fix: { 'wide.csv': 'month,x\n2020-01,1\n2020-02,"2,7"\n' } },
  { name: 'row with too few fields', files: { 'few.csv': 'month,x,y\n2020-01,1,2\n2020-02,2\n' }, args: ['few.csv'], says: [/few\.csv:3/, /2 fields/] },
  { name: 'all values missing', files: { 'na.csv': 'month,x\n2020-01,NA\n2020-02,\n2020-03,-\n' }, args: ['na.csv'], says: [/na\.csv: column "x"/, /no values/] },
  { name: 'a 3-period gap with --gaps error', files: { 'g3.csv': `month,x\n${monthly(2)}\n${monthly(2, 5)}\n` }, args: ['g3.csv', '--gaps', 'error'], says: [/g3\.csv:4: column "x"/, /2020-03 to 2020-05 \(3 months\)/] },
  { name: 'a 4-period gap under the default', files: { 'g4.csv': `month,x\n${monthly(2)}\n${monthly(2, 6)}\n` }, args: ['g4.csv'], says: [/g4\.csv:4: column "x"/, /longer than 3 months/, /2020-03 to 2020-06/] },
  { name: 'binary garbage', files: { 'junk.csv': garbage }, args: ['junk.csv'], says: [/junk\.csv/, /not text/] },
  { name: 'corrupt XLSX', files: { 'broken.xlsx': Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), garbage]) }, args: ['broken.xlsx'], says: [/broken\.xlsx/, /workbook cannot be read/] },
  { name: 'invalid JSON', files: { 'bad.json': '[{"month": "2020-01", "x": 1},' }, args: ['bad.json'], says: [/bad\.json/, /not valid JSON/] },
  { name: 'JSON not an array of records', files: { 'obj.json': '{"month": "2020-01", "x": 1}' }, args: ['obj.json'], says: [/obj\.json/, /not an array of records/] },
  { name: 'JSON array of non-records', files: { 'nums.json': '[1, 2, 3]' }, args: ['nums.json'], says: [/nums\.json:1/, /not a record/] },
  { name: 'nonexistent file', args: ['no-such-file.csv'], says: [/no-such-file\.csv: no such file/] },
  { name: 'unknown --series', files: { 's.csv': `month,x\n${monthly(3)}\n` }, args: ['s.csv', '--series', 'y'], says: [/s\.csv/, /no series named "y"/, /"x"/] },
  { name: 'a date-time that does not parse', files: { 'dt.csv': 'time,x\n2020-01-05T10:00,1\n2020-01-05T25:00,2\n' }, args: ['dt.csv'], says: [/dt\.csv:3: column "time"/, /found "2020-01-05T25:00"/] },
  { name: 'unsorted rows with a duplicate', files: { 'uns.csv': 'month,x\n2020-03,3\n2020-01,1\n2020-03,4\n2020-02,2\n' }, args: ['uns.csv'], says: [/uns\.csv:4/, /rows 2, 4/] },
  { name: '--freq finer than the data', files: { 'f.csv': `month,x\n${monthly(3)}\n` }, args: ['f.csv', '--freq', 'daily'], says: [/f\.csv: column "month"/, /finer than the data, which are monthly/] },
  { name: 'unknown option', args: ['x.csv', '--frobnicate'], says: [/^certa: unknown option '--frobnicate'$/] },
  { name: 'missing argument', args: [], says: [/^certa: missing required argument 'file'$/] },
  { name: 'bad --gaps value', files: { 'o.csv': `month,x\n${monthly(3)}\n` }, args: ['o.csv', '--gaps', 'guess'], says: [/--gaps/, /found "guess"/, /interpolate, zero, carry, error/] },
  { name: 'unterminated quote', files: { 'q.csv': 'month,x\n2020-01,"1\n2020-02,2\n' }, args: ['q.csv'], says: [/q\.csv:2/, /never closed/], fix: { 'q.csv': 'month,x\n2020-01,"1"\n2020-02,2\n' } },
  {
    name: 'not UTF-8',
    files: { 'latin.csv': Buffer.concat([Buffer.from('month,caf'), Buffer.from([0xe9]), Buffer.from('\n2020-01,1\n')]) },
    args: ['latin.csv'],
    says: [/latin\.csv:1/, /not UTF-8/],
    fix: { 'latin.csv': Buffer.from('month,café\n2020-01,1\n', 'utf8') },
  },
  { name: 'ISO week 53 of a 52-week year', files: { 'w.csv': 'week,x\n2021-W52,1\n2021-W53,2\n' }, args: ['w.csv'], says: [/w\.csv:3: column "week"/, /2021-W53/] },
  { name: 'Excel serial 60 read with --date-format excel', files: { 'ser.csv': 'day,x\n59,1\n60,2\n' }, args: ['ser.csv', '--date-format', 'excel'], says: [/ser\.csv:3: column "day"/, /found "60"/], fix: { 'ser.csv': 'day,x\n59,1\n61,2\n' } },
  { name: 'long layout with several numeric columns', files: { 'long.csv': 'shop,month,a,b\nn,2020-01,1,2\ns,2020-01,3,4\nn,2020-02,5,6\n' }, args: ['long.csv'], says: [/long\.csv/, /several numeric columns/] },
  { name: '--sheet on a CSV file', files: { 'c.csv': `month,x\n${monthly(2)}\n` }, args: ['c.csv', '--sheet', 'S1'], says: [/c\.csv/, /--sheet applies only/] },
  { name: 'ambiguous thousands separator', files: { 'th.csv': 'month;x\n2020-01;1,234\n2020-02;5\n' }, args: ['th.csv'], says: [/th\.csv:2: column "x"/, /thousands or a decimal comma/] },
  { name: 'no time column', files: { 'nt.csv': 'name,score\nann,1\nbob,2\n' }, args: ['nt.csv'], says: [/nt\.csv/, /no time column/], fix: { 'nt.csv': 'date,name,score\n2020-01-01,ann,1\n2020-01-02,bob,2\n' } },
  { name: 'repeated column name', files: { 'rep.csv': 'month,x,x\n2020-01,1,2\n' }, args: ['rep.csv'], says: [/rep\.csv:1: column "x"/, /appears twice/] },
  { name: 'index mixed with dates', files: { 'mix.csv': 'time,x\n2020-01-01,1\n17,2\n' }, args: ['mix.csv'], says: [/mix\.csv:3: column "time"/, /mixes integer indices with dates/] },
  { name: 'a row with values but no time', files: { 'nat.csv': 'month,x\n2020-01,1\n,2\n' }, args: ['nat.csv'], says: [/nat\.csv:3: column "month"/, /no time/] },
  { name: 'empty standard input', args: ['-'], stdin: '', says: [/^certa: -: the file is empty/] },
  {
    name: 'a decennial series with a stray 5-year step',
    files: { 'cen.csv': 'year,x\n1900,1\n1910,2\n1920,3\n1925,4\n1930,5\n1940,6\n' },
    args: ['cen.csv'],
    says: [/cen\.csv:5: column "year"/, /come every 10 years, but this step is 5 years/],
  },
  { name: '--freq yearly on decennial data', files: { 'dec.csv': 'year,x\n1900,1\n1910,2\n1920,3\n' }, args: ['dec.csv', '--freq', 'yearly'], says: [/dec\.csv: column "year"/, /which are every 10 years/] },
  { name: 'decimal commas in a tab-delimited file', files: { 'dc.tsv': 'month\tx\n2020-01\t3,5\n2020-02\t4,25\n' }, args: ['dc.tsv'], says: [/dc\.tsv:2: column "x"/, /decimal commas/] },
  { name: 'decimal commas beside whole numbers (not detected)', files: { 'dc2.csv': 'month;x\n2020-01;3,5\n2020-02;4\n' }, args: ['dc2.csv'], says: [/dc2\.csv:2: column "x"/, /found "3,5"/] },
  { name: 'a year column over monthly rows', files: { 'yr.csv': 'year,sales\n2020,1\n2020,2\n2021,3\n' }, args: ['yr.csv'], says: [/yr\.csv:3: column "year"/, /more than one row for 2020/] },
  { name: 'bad --decimal value', files: { 'o2.csv': `month,x\n${monthly(3)}\n` }, args: ['o2.csv', '--decimal', ';'], says: [/--decimal/, /found ";"/] },
  { name: 'bad --partial value', files: { 'o3.csv': `month,x\n${monthly(3)}\n` }, args: ['o3.csv', '--partial', 'maybe'], says: [/--partial/, /drop, keep/] },
];

let dir = '';

beforeAll(async () => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'certa-bad-'));
  for (const c of cases) for (const [name, content] of Object.entries(c.files ?? {})) writeFileSync(join(dir, name), content);
  const noSheets = new ExcelJS.Workbook();
  writeFileSync(join(dir, 'nosheets.xlsx'), Buffer.from(await noSheets.xlsx.writeBuffer()));
  const two = new ExcelJS.Workbook();
  two.addWorksheet('Sales').addRows([['month', 'x'], ['2020-01', 1]]);
  writeFileSync(join(dir, 'book.xlsx'), Buffer.from(await two.xlsx.writeBuffer()));
  const cover = new ExcelJS.Workbook();
  cover.addWorksheet('Cover').addRows([['Invented figures for a test']]);
  cover.addWorksheet('Data').addRows([['month', 'x'], ['2020-01', 1], ['2020-02', 2]]);
  writeFileSync(join(dir, 'cover.xlsx'), Buffer.from(await cover.xlsx.writeBuffer()));
  const blank = new ExcelJS.Workbook();
  blank.addWorksheet('Empty');
  blank.addWorksheet('Data').addRows([['month', 'x'], ['2020-01', 1]]);
  writeFileSync(join(dir, 'blank.xlsx'), Buffer.from(await blank.xlsx.writeBuffer()));
});

cases.push(
  { name: 'an XLSX with no sheets', args: ['nosheets.xlsx'], says: [/nosheets\.xlsx/, /no sheets/] },
  { name: 'unknown --sheet', args: ['book.xlsx', '--sheet', 'Costs'], says: [/book\.xlsx/, /no sheet named "Costs"/, /"Sales" \(1 data row\)/] },
  { name: 'a workbook whose first sheet has no data rows', args: ['cover.xlsx'], says: [/cover\.xlsx/, /sheet "Cover" has a header but no data rows; the other sheets: "Data" \(2 data rows\)/] },
  { name: 'a workbook whose first sheet is empty', args: ['blank.xlsx'], says: [/blank\.xlsx/, /sheet "Empty" is empty; the other sheets: "Data" \(1 data row\)/] },
);

/** What a hint asks for: an option to pass or drop, a row to remove, the help to read; null if none. */
type Step = { pass: string; value?: string } | { drop: string } | { removeRow: number } | { help: string };

function stepOf(hint: string): Step | null {
  const pass = /\bpass (--[a-z-]+)(?: ("[^"]*"|[^\s()]+))?/.exec(hint);
  if (pass) {
    let value = pass[2];
    if (value !== undefined && value.length > 1) value = value.replace(/[,;.]$/, '');
    if (value !== undefined && value.startsWith('"')) value = JSON.parse(value) as string;
    return value === undefined || value.startsWith('--') ? { pass: pass[1] } : { pass: pass[1], value };
  }
  const drop = /\bdrop (--[a-z-]+)/.exec(hint);
  if (drop) return { drop: drop[1] };
  const row = /\bremove the time stamp at row (\d+)/.exec(hint);
  if (row) return { removeRow: Number(row[1]) };
  const help = /\brun certa ([a-z]+ )?--help\b/.exec(hint);
  if (help) return { help: (help[1] ?? '').trim() };
  return null;
}

/** The arguments after passing or dropping an option (a value replaces the option's old one). */
function withOption(args: string[], step: { pass: string; value?: string } | { drop: string }): string[] {
  const name = 'pass' in step ? step.pass : step.drop;
  const out: string[] = [];
  for (let i = 0; i < args.length; i++) {
    if (args[i] === name) {
      if (i + 1 < args.length && !args[i + 1].startsWith('--')) i++;
      continue;
    }
    out.push(args[i]);
  }
  if ('pass' in step) out.push(step.pass, ...(step.value !== undefined ? [step.value] : []));
  return out;
}

describe('certa inspect on bad input', () => {
  it('has at least 25 cases', () => {
    expect(cases.length).toBeGreaterThanOrEqual(25);
  });
  it.each(cases.map((c) => [c.name, c] as const))('%s: exit 2 and one certa: line', (_name, c) => {
    const r = runCli(['inspect', ...c.args], { cwd: dir, stdin: c.stdin });
    expect(r.code, r.stderr).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.split('\n').filter((l) => l.length > 0);
    expect(lines.length, r.stderr).toBeGreaterThanOrEqual(1);
    expect(lines.length, r.stderr).toBeLessThanOrEqual(2);
    expect(lines[0]).toMatch(/^certa: /);
    if (lines.length === 2) expect(lines[1]).toMatch(/^hint: /);
    expect(r.stderr).not.toMatch(/\n\s+at |Error:|internal error/);
    for (const p of c.says) expect(lines[0]).toMatch(p);
  });
});

describe('following the hints of the catalogue', () => {
  const hintOf = (r: { stderr: string }): string | null => r.stderr.split('\n').find((l) => l.startsWith('hint: '))?.slice(6) ?? null;

  it.each(cases.map((c) => [c.name, c] as const))('%s: doing what each hint says ends in a file certa reads', (_name, c) => {
    const work = join(dir, `follow-${cases.indexOf(c)}`);
    mkdirSync(work, { recursive: true });
    for (const name of Object.keys(c.files ?? {})) cpSync(join(dir, name), join(work, name));
    for (const name of ['nosheets.xlsx', 'book.xlsx', 'cover.xlsx', 'blank.xlsx']) cpSync(join(dir, name), join(work, name));
    let args = [...c.args];
    let r = runCli(['inspect', ...args], { cwd: work, stdin: c.stdin });
    const first = hintOf(r);
    if (first === null) {
      // No hint printed: nothing to follow, and the one line stands alone.
      expect(r.stderr.split('\n').filter((l) => l.length > 0)).toHaveLength(1);
      return;
    }
    const seen = new Set<string>([r.stderr]);
    let fixed = false;
    for (let round = 0; round < 4 && r.code !== 0; round++) {
      const hint = hintOf(r);
      expect(hint, `round ${round}: ${r.stderr}`).not.toBeNull();
      const step = stepOf(hint!);
      if (step === null) {
        // A hint that asks for an edit of the file: the case says what the edited file is.
        expect(c.fix, `hint without a followable step and no fix: ${hint}`).toBeDefined();
        expect(fixed, `the fix did not settle it: ${r.stderr}`).toBe(false);
        for (const [name, content] of Object.entries(c.fix!)) writeFileSync(join(work, name), content);
        fixed = true;
      } else if ('removeRow' in step) {
        const target = join(work, args[0]);
        const lines = readFileSync(target, 'utf8').split('\n');
        lines.splice(step.removeRow - 1, 1);
        writeFileSync(target, lines.join('\n'));
      } else if ('help' in step) {
        args = ['--help']; // runCli adds the command the hint names (inspect)
        expect(step.help).toBe('inspect');
      } else args = withOption(args, step);
      r = runCli(['inspect', ...args], { cwd: work, stdin: c.stdin });
      expect(r.stderr).not.toMatch(/internal error/);
      expect(seen.has(r.stderr) && r.code !== 0, `following "${hint}" changed nothing: ${r.stderr}`).toBe(false);
      seen.add(r.stderr);
    }
    expect(r.code, `after following the hints: ${r.stderr}`).toBe(0);
  });
});
