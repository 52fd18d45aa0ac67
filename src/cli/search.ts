/**
 * `certa search <file>`: the structure search on each series of a file. Prints the ranking (the
 * best `--top` candidates) with the winner's equation, derived quantities and whiteness check,
 * or the same as one JSON document with `--json`; writes `candidates.csv` (every candidate, the
 * failed ones with their reason) and the winner as `model.json` into the output folder.
 *
 * Output folder: `--out` (default `output/<series name>`). When the file holds several series
 * each gets `<out>/<series name>` (default `output/<series name>`). Files are replaced
 * atomically (store/atomic.ts, store/model-file.ts).
 *
 * Several series are searched by the batch pool (batch/pool.ts, `--workers`, one per core by
 * default; the worker entry is batch/search-worker.ts). What is printed is assembled in file
 * order, so the files, standard output, the failure lines on standard error and the exit code
 * are the same whatever the number of workers. One series is searched in this thread.
 */
import { coefficientLines, coefficientRows, coefficientTerms, COEFFICIENT_LEVEL } from '../report/coefficients.js';
import { formatTableNumber } from '../report/table-numbers.js';
import type { Command } from 'commander';
import { join } from 'node:path';
import { UsageError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import type { CandidateResult, SearchOptions, SearchResult } from '../select/search.js';
import { searchSeasons, type SeasonEvidence } from '../select/seasons.js';
import { cadenceName, type Frequency } from '../data/calendar.js';
import { candidatesCsv } from '../report/candidates.js';
import { criterionLabel } from '../select/criteria.js';
import { writeFileAtomic } from '../store/atomic.js';
import { writeModelFile, MODEL_FORMAT, MODEL_VERSION } from '../store/model-file.js';
import { modelBody } from '../store/asserted.js';
import { Learner } from '../forecast/online.js';
import { addDataOptions, loadSeriesFromCli } from './data-options.js';
import { addSearchOptions, parseSearchOptions } from './search-options.js';
import { outputFolders, runClock } from './output.js';
import { ExitRequest, type CliIO } from './main.js';
import { CertaError } from '../data/errors.js';
import { resultDocument, type ResultEntry } from '../report/result-json.js';
import { addBatchOptions, batchReporter, EXIT_SOME_FAILED, parseBatchOptions, type CliBatchOptions } from './batch.js';
import { failureText, jobError, type JobError } from '../batch/series-job.js';
import { runJobPool, type PoolJob } from '../batch/pool.js';

interface CliSearchOptions {
  search: SearchOptions;
  top: number;
  out?: string;
  json: boolean;
}

/** The search options plus this command's own (--top, --out, --json); UsageError naming the option. */
function parseCommandOptions(opts: Record<string, unknown>): CliSearchOptions {
  const search = parseSearchOptions(opts);
  let top = 10;
  if (opts.top !== undefined) {
    if (!/^[1-9]\d*$/.test(String(opts.top))) {
      throw new UsageError('option-invalid', 'option --top has an unusable value', { found: String(opts.top), expected: 'a whole number ≥ 1' });
    }
    top = Number(opts.top);
  }
  return { search, top, ...(opts.out !== undefined ? { out: String(opts.out) } : {}), json: Boolean(opts.json) };
}

export function register(program: Command, io: CliIO): void {
  const command = program
    .command('search')
    .description('search model structures for each series of a file, rank them and save the winner')
    .argument('<file>', 'CSV, TSV, XLSX or JSON file, or - for standard input')
    .option('--top <n>', 'how many candidates to show (default 10)')
    .option('--out <folder>', 'where to write candidates.csv and model.json (default output/<series>)')
    .option('--json', 'print a JSON document instead of text');
  addSearchOptions(command);
  addDataOptions(command);
  addBatchOptions(command, { shard: false, verb: 'searched' });
  command.action(async (file: string, opts: Record<string, unknown>) => {
    const cli = parseCommandOptions(opts);
    const batch = parseBatchOptions(opts);
    const { series } = await loadSeriesFromCli(file, opts, io);
    const folders = outputFolders(series, cli.out);
    // One series: in this thread, its error is the command's. Several: the pool (exit code 4 when some failed).
    const outcomes = series.length === 1 ? [await searchOne(series[0], cli, folders[0])] : await searchSeveral(series, folders, opts, batch, io);
    const entries = outcomes.map((o) => o.entry);
    if (cli.json) io.out(`${JSON.stringify(resultDocument('search', entries), null, 2)}\n`);
    else if (!batch.quiet) io.out(outcomes.map((o) => o.text).join('\n'));
    if (entries.some((e) => e.status === 'failed')) throw new ExitRequest(EXIT_SOME_FAILED);
  });
  program.addHelpText('after', '\nFind the equation behind a series:\n  certa search datasets/demo/vallmark-heatpumps.csv --inputs subsidy,frost_index\n');
}

/** One series of a search over several, as a task of the pool. */
export interface SearchTask {
  position: number;
  series: Series;
  /** Where its candidates.csv and model.json go. */
  folder: string;
}

/** The command's parsed commander options (each worker parses them again). */
export interface SearchSettings {
  opts: Record<string, unknown>;
}

/** What a series' search gives the command: its result entry and text, or its failure. */
export interface SearchOutcome {
  position: number;
  entry: ResultEntry;
  /** The series' part of the text output: its ranking, or the line of its failure. */
  text: string;
  error: JobError | null;
  /** The stack of a bug, for --debug. */
  stack: string | null;
}

/** The search of one series, writing its files; throws what the search or the writes throw. */
async function searchOne(s: Series, cli: CliSearchOptions, folder: string, position = 1): Promise<SearchOutcome> {
  const result = searchSeasons(s, cli.search);
  const written = await writeOutputs(result, s, folder);
  const doc = searchDocument(result, cli.top, written);
  return { position, entry: { series: s.name, status: 'ok', folder, reason: null, detail: doc }, text: renderText(doc), error: null, stack: null };
}

/** A pool task (in a worker or in this thread): a failure is an outcome, not an exception. */
export async function searchJob(task: SearchTask, settings: SearchSettings): Promise<SearchOutcome> {
  try {
    return await searchOne(task.series, parseCommandOptions(settings.opts), task.folder, task.position);
  } catch (e) {
    const error = jobError(e);
    const name = task.series.name;
    return {
      position: task.position,
      entry: { series: name, status: 'failed', folder: null, reason: failureText(name, error.line), detail: null },
      text: `series "${name}": failed: ${error.line}\n`,
      error,
      stack: error.internal && e instanceof Error ? (e.stack ?? null) : null,
    };
  }
}

const SEARCH_JOB: PoolJob<SearchTask, SearchSettings, SearchOutcome> = { run: searchJob, entry: 'search-worker' };

/**
 * Several series by the pool, outcomes in file order. Each failure's line goes to standard error
 * as soon as every series before it is done, so the lines come in file order. A bug stops the
 * command with its error after the failure lines of the series before it; so does any failure
 * with --fail-fast (series after it may already have been searched and written by then).
 */
async function searchSeveral(series: readonly Series[], folders: readonly string[], opts: Record<string, unknown>, batch: CliBatchOptions, io: CliIO): Promise<SearchOutcome[]> {
  const tasks: SearchTask[] = series.map((s, i) => ({ position: i + 1, series: s, folder: folders[i] }));
  const outcomes: (SearchOutcome | undefined)[] = new Array(tasks.length).fill(undefined);
  const progress = batchReporter(io, batch.quiet);
  progress.start(tasks.length);
  let shown = 0;
  let stopper: SearchOutcome | null = null;
  const show = (): void => {
    while (!stopper && shown < outcomes.length && outcomes[shown]) {
      const o = outcomes[shown]!;
      if (o.error && (o.error.internal || batch.failFast)) stopper = o;
      else {
        if (o.error) progress.fail(o.entry.reason ?? o.error.line);
        shown++;
      }
    }
  };
  await runJobPool(SEARCH_JOB, tasks, { opts }, {
    workers: batch.workers,
    failFast: batch.failFast,
    onOutcome: (o, done) => {
      outcomes[o.position - 1] = o;
      show();
      progress.outcome(null, done);
    },
  });
  progress.stop();
  if (stopper) throw commandError(stopper);
  return outcomes as SearchOutcome[];
}

/** A series' failure as the error of the command. */
function commandError(o: SearchOutcome): Error {
  const e = o.error!;
  if (e.internal) {
    const err = new Error(e.message);
    if (o.stack) err.stack = o.stack;
    return err;
  }
  return new CertaError(e.code, o.entry.reason ?? e.line, e.hint ? { hint: e.hint } : {}, e.exitCode);
}

interface Written {
  candidates: string;
  model: string;
}

async function writeOutputs(result: SearchResult, series: Series, folder: string): Promise<Written> {
  const candidates = join(folder, 'candidates.csv');
  const model = join(folder, 'model.json');
  await writeFileAtomic(candidates, candidatesCsv(result), { mkdir: true });
  const w = result.winner;
  const learner = Learner.start(w.structure, w.estimate.active, series, result.sample.from, result.sample.to);
  const body = modelBody({ structure: w.structure, learner, se: w.estimate.se }, series, {
    criterion: result.criterion,
    criterionValue: w.result.score,
    now: runClock(),
    meta: {
      search: {
        label: w.result.label,
        key: w.result.key,
        equation: w.equation,
        sample: result.sample,
        cov: Array.from(w.estimate.cov),
        rank: w.estimate.rank,
        condition: w.estimate.condition,
        derived: w.derived,
        whiteness: { q: w.whiteness.q, dof: w.whiteness.dof, lags: w.whiteness.lags, p: w.whiteness.pValue, white: w.whiteness.white },
        candidates: { fitted: result.fitted, failed: result.failed },
      },
    },
  });
  await writeModelFile(model, body, { mkdir: true });
  return { candidates, model };
}

interface RankingRow {
  rank: number | null;
  structure: string;
  key: string;
  family: string;
  score: number | null;
  delta: number | null;
  weight: number;
  aicc: number | null;
  aic: number | null;
  bic: number | null;
  rss: number | null;
  k: number;
  n: number;
}

/** What `certa search --json` prints for one series, keys in the order they are printed. */
export interface SearchDocument {
  series: SearchResult['series'];
  criterion: string;
  sample: SearchResult['sample'];
  seasons: SeasonEvidence | null;
  candidates: { total: number; fitted: number; failed: number };
  ranking: RankingRow[];
  winner: {
    structure: string;
    key: string;
    spec: unknown;
    terms: string[];
    theta: number[];
    se: number[];
    /** Level (percent) of the coefficient intervals below, the one the text table prints. */
    coefficientLevel: number;
    /** Interval bounds of each coefficient, aligned with `terms` (null where the se is not finite). */
    lower: (number | null)[];
    upper: (number | null)[];
    sigma2: number;
    equation: string;
    derived: { name: string; value: number | string | boolean; unit: string | null }[];
    whiteness: { q: number; dof: number; lags: number; p: number; white: boolean };
  };
  failed: { structure: string; key: string; reason: string }[];
  warnings: string[];
  files: { candidates: string; model: string; format: string; version: number };
}

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

function rankingRow(c: CandidateResult): RankingRow {
  return {
    rank: c.rank,
    structure: c.label,
    key: c.key,
    family: c.family,
    score: finiteOrNull(c.score),
    delta: finiteOrNull(c.delta),
    weight: c.weight,
    aicc: finiteOrNull(c.aicc),
    aic: finiteOrNull(c.aic),
    bic: finiteOrNull(c.bic),
    rss: finiteOrNull(c.rss),
    k: c.k,
    n: c.n,
  };
}

export function searchDocument(result: SearchResult, top: number, files: Written): SearchDocument {
  const w = result.winner;
  const coefficients = coefficientTerms(coefficientRows(w.structure.terms, w.estimate.theta, w.estimate.se, w.structure.terms.map(() => true), COEFFICIENT_LEVEL));
  return {
    series: result.series,
    criterion: result.criterion,
    sample: result.sample,
    seasons: result.seasons ?? null,
    candidates: { total: result.ranking.length, fitted: result.fitted, failed: result.failed },
    ranking: result.ranking.slice(0, Math.min(top, result.fitted)).map(rankingRow),
    winner: {
      structure: w.result.label,
      key: w.result.key,
      spec: w.structure.spec,
      terms: [...w.structure.terms],
      theta: Array.from(w.estimate.theta),
      se: Array.from(w.estimate.se),
      coefficientLevel: COEFFICIENT_LEVEL,
      lower: coefficients.map((c) => c.lower),
      upper: coefficients.map((c) => c.upper),
      sigma2: w.estimate.sigma2,
      equation: w.equation,
      derived: w.derived.map((d) => ({ name: d.name, value: typeof d.value === 'number' ? (finiteOrNull(d.value) ?? String(d.value)) : d.value, unit: d.unit ?? null })),
      whiteness: { q: w.whiteness.q, dof: w.whiteness.dof, lags: w.whiteness.lags, p: w.whiteness.pValue, white: w.whiteness.white },
    },
    failed: result.ranking.filter((c) => c.status === 'failed').map((c) => ({ structure: c.label, key: c.key, reason: c.reason ?? '' })),
    warnings: result.warnings,
    files: { ...files, format: MODEL_FORMAT, version: MODEL_VERSION },
  };
}

/** Numbers for people: up to 4 significant digits (6 for large magnitudes), no exponent below 1e6. */
function num(v: number | null, digits = 4): string {
  if (v === null) return '—';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-4) return v.toExponential(2);
  if (a >= 10 ** digits) return v.toFixed(0);
  return String(Number(v.toPrecision(digits)));
}

function fixed(v: number | null, places: number): string {
  return v === null ? '—' : v.toFixed(places);
}


export function renderText(doc: SearchDocument): string {
  const out: string[] = [];
  const s = doc.series;
  const crit = criterionLabel(doc.criterion);
  out.push(`series "${s.name}" (${cadenceName(s.frequency as Frequency, s.step)}, ${s.length} points${s.inputs.length > 0 ? `; inputs ${s.inputs.join(', ')}` : ''})`);
  out.push(`sample ${doc.sample.start} to ${doc.sample.end}: ${doc.sample.n} one-step errors, the same for every candidate`);
  if (doc.seasons) out.push(`season: ${doc.seasons.text}`);
  out.push(`${doc.candidates.fitted} of ${doc.candidates.total} candidates fitted${doc.candidates.failed > 0 ? ` (${doc.candidates.failed} could not be: reasons in candidates.csv)` : ''}`);
  out.push('');
  const header = ['rank', crit, `Δ${crit}`, 'weight', 'k', 'RSS', 'structure'];
  const rows = doc.ranking.map((r) => [String(r.rank), fixed(r.score, 2), fixed(r.delta, 2), fixed(r.weight, 3), String(r.k), num(r.rss), r.structure]);
  const widths = header.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]) =>
    cells
      .map((c, j) => (j === cells.length - 1 ? c : c.padStart(widths[j])))
      .join('  ')
      .trimEnd();
  out.push(line(header));
  for (const r of rows) out.push(line(r));
  out.push('');
  const w = doc.winner;
  out.push(`winner: ${w.structure}`);
  out.push(`  ${w.equation}`);
  out.push(...coefficientLines(coefficientRows(w.terms, w.theta, w.se, w.terms.map(() => true)), COEFFICIENT_LEVEL, formatTableNumber));
  for (const d of w.derived) {
    const value = typeof d.value === 'boolean' ? (d.value ? 'yes' : 'no') : typeof d.value === 'number' ? num(d.value) : d.value;
    out.push(`  ${d.name}: ${value}${d.unit ? ` ${d.unit}` : ''}`);
  }
  const wh = w.whiteness;
  out.push(`  residuals: Ljung–Box Q = ${num(wh.q)} on ${wh.dof} dof (${wh.lags} lags), p = ${num(wh.p, 2)}: ${wh.white ? 'no evidence against white noise' : 'NOT white'}`);
  if (doc.warnings.length > 0) {
    out.push('');
    out.push('warnings');
    for (const x of doc.warnings) out.push(`  - ${x}`);
  }
  out.push('');
  out.push(`wrote ${doc.files.candidates}`);
  out.push(`wrote ${doc.files.model}`);
  return `${out.join('\n')}\n`;
}
