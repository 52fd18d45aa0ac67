/**
 * The model file (`model.json`): everything needed to forecast with a fitted model and to keep
 * updating it online, in a versioned, checksummed envelope.
 *
 *   { "format": "certa-model", "version": 3, "checksum": "sha256:<hex>", "body": { … } }
 *
 * Version 3 added the optional `effects` (each input's role, delay, lags and gain) and structure
 * specs of the new kinds (ARX inputs each with its own delay and lag count, ODE inputs scaling
 * the law, growth paths); version 2 added the optional `combination` (the members of the
 * delivered point forecast). Version 1 and 2 files, which have neither, read as they are.
 *
 * `checksum` is the SHA-256 (FIPS 180-4) of `canonicalJson(body)` (sorted keys, shortest
 * round-trip numbers; see canonical-json.ts), so it does not depend on the indentation or member
 * order of the file and is the same on every platform. The body layout is `modelBodySchema`.
 *
 * Reading refuses, each with a StoreError naming the file:
 * - `truncated` / `invalid-json`: the text is not complete JSON (a cut-short or damaged file);
 * - `not-a-model`: valid JSON but not a certa model envelope;
 * - `newer-version`: written by a newer certa (names both versions; upgrade certa to read it);
 * - `checksum-mismatch`: the body was changed after certa wrote it (tampered or damaged);
 * - `invalid-body`: the body does not match the layout (names the first failing path).
 * Writing validates the body first, so a file certa writes always reads back; it replaces the
 * file atomically (atomic.ts) and first keeps the previous valid file as `model.prev.json`.
 *
 * Clocks: `created`, `updated` and log times are supplied by the caller; nothing here reads the
 * clock.
 */
import { promises as fsp, readFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { z } from 'zod';
import { FREQUENCIES } from '../data/calendar.js';
import { StoreError } from '../data/errors.js';
import { driftAlarmSchema, driftStateSchema } from '../forecast/drift.js';
import { writeFileAtomic } from './atomic.js';
import { bothTexts, canonicalJson } from './canonical-json.js';

export const MODEL_FORMAT = 'certa-model';
export const MODEL_VERSION = 3;

const finite = z.number();
const isoTime = z.iso.datetime({ offset: true });

/** One online update, appended to `log`. */
export const updateEntrySchema = z.strictObject({
  /** When the update ran (ISO 8601, from the caller's clock). */
  time: isoTime,
  rowsAdded: z.int().nonnegative(),
  /** Euclidean norm of θ_after − θ_before. */
  parameterChange: finite.nonnegative(),
  alarms: z.array(driftAlarmSchema),
  /** What the update did on drift, e.g. 'continue', 'refit', 'reset-covariance'. */
  policy: z.string(),
  note: z.string(),
});

const numberArray = z.array(finite);

/** One input's effect under the asserted structure (models/input-effects.ts), as a model file keeps it. */
const effectSchema = z.strictObject({
  input: z.string(),
  role: z.enum(['lags', 'level', 'rate', 'forcing', 'unused']),
  delay: z.int().nonnegative().nullable(),
  lags: z.int().nonnegative().nullable(),
  gain: finite.nullable(),
  rateEffect: finite.nullable(),
  unit: z.string().nullable(),
});

/** The body of a model file (versions 1, 2 and 3). */
export const modelBodySchema = z
  .strictObject({
    /** What the structure registry needs to rebuild the structure (StructureSpec). */
    structure: z.looseObject({ family: z.string().min(1) }),
    /** Regressor names in θ order (length p; 0 for a structure without coefficients, e.g. a random walk). */
    terms: z.array(z.string().min(1)),
    /** Coefficients θ (length p). */
    theta: numberArray,
    /** Standard errors of θ (length p). */
    se: z.array(finite.nonnegative()),
    /** RLS matrix P (p×p, rows of length p): covariance of θ divided by σ². */
    P: z.array(numberArray),
    /** Forgetting factor λ, 0 < λ ≤ 1. */
    lambda: finite.gt(0).lte(1),
    /** Noise variance σ² on the scoring scale. */
    sigma2: finite.nonnegative(),
    transform: z.enum(['none', 'log']),
    series: z.strictObject({
      name: z.string(),
      frequency: z.enum(FREQUENCIES as [string, ...string[]]),
      /** Periods of the frequency between observations, when more than one (absent: 1). */
      step: z.int().min(2).optional(),
      season: z.int().positive().nullable(),
      /** Time stamp of the last observation the model has seen (calendar.ts units). */
      lastTime: finite,
      /** The same, as people write it (formatTime). */
      lastTimeLabel: z.string(),
      /** Input names, in the order the structure uses them. */
      inputs: z.array(z.string()),
    }),
    /** What stepping the model forward needs beyond the window: named numbers or arrays (raw values). */
    state: z.record(z.string(), z.union([finite, numberArray])),
    /** Bounded history of raw observations, oldest first (window.ts). */
    window: z.strictObject({
      capacity: z.int().positive(),
      time: numberArray,
      values: numberArray,
      inputs: z.record(z.string(), numberArray),
    }),
    /** Running hash over all rows seen (fingerprint.ts). */
    fingerprint: z.strictObject({
      hash: z.string().regex(/^sha256:[0-9a-f]{64}$/),
      rows: z.int().nonnegative(),
    }),
    /** The criterion the structure was selected by, and its value. */
    criterion: z.looseObject({ name: z.string().min(1), value: finite }),
    created: isoTime,
    updated: isoTime,
    log: z.array(updateEntrySchema),
    drift: driftStateSchema,
    /** Free-form extra information (any JSON). */
    meta: z.record(z.string(), z.unknown()),
    /** Each series input's role, delay, lags and gain under the structure and θ (version 3; recomputed by every update). */
    effects: z.array(effectSchema).optional(),
    /**
     * The members of the point forecast (combine.ts), when it combines candidates: each with its
     * structure spec, the coefficients its forecast uses, its group, its Akaike weight there and
     * its group's weight across groups (absent: 1, the equal weights of files written before
     * groups were weighted by their evidence). The asserted structure's member (same key)
     * forecasts with the learnt θ instead. Absent: the point is the asserted equation's own.
     */
    combination: z
      .strictObject({
        members: z
          .array(
            z.strictObject({
              key: z.string().min(1),
              structure: z.looseObject({ family: z.string().min(1) }),
              theta: numberArray,
              group: z.string().min(1),
              weight: finite.nonnegative(),
              groupWeight: finite.positive().optional(),
            }),
          )
          .min(1),
      })
      .optional(),
  })
  .superRefine((body, ctx) => {
    const p = body.terms.length;
    const issue = (path: (string | number)[], message: string) => ctx.addIssue({ code: 'custom', path, message });
    if (body.theta.length !== p) issue(['theta'], `expected ${p} coefficients (one per term), found ${body.theta.length}`);
    if (body.se.length !== p) issue(['se'], `expected ${p} standard errors (one per term), found ${body.se.length}`);
    if (body.P.length !== p) issue(['P'], `expected ${p} rows, found ${body.P.length}`);
    body.P.forEach((row, i) => {
      if (row.length !== p) issue(['P', i], `expected ${p} numbers, found ${row.length}`);
    });
    const w = body.window;
    if (w.time.length !== w.values.length) issue(['window', 'time'], `expected ${w.values.length} time stamps (one per value), found ${w.time.length}`);
    if (w.values.length > w.capacity) issue(['window', 'values'], `expected at most ${w.capacity} values (the capacity), found ${w.values.length}`);
    for (let i = 1; i < w.time.length; i++) {
      if (!(w.time[i] > w.time[i - 1])) {
        issue(['window', 'time', i], 'expected time stamps in increasing order');
        break;
      }
    }
    const names = body.series.inputs;
    const windowNames = Object.keys(w.inputs);
    for (const name of names) {
      const values = w.inputs[name];
      if (values === undefined) issue(['window', 'inputs', name], `expected the values of input "${name}"`);
      else if (values.length !== w.values.length) issue(['window', 'inputs', name], `expected ${w.values.length} values, found ${values.length}`);
    }
    for (const name of windowNames) {
      if (!names.includes(name)) issue(['window', 'inputs', name], `input "${name}" is not one of the series inputs`);
    }
  });

/** The body of a model file (version 3). */
export type ModelBody = z.infer<typeof modelBodySchema>;
export type UpdateEntry = z.infer<typeof updateEntrySchema>;

/** SHA-256 of the canonical JSON of a body, as written in the envelope. */
export function bodyChecksum(body: unknown): string {
  return `sha256:${createHash('sha256').update(canonicalJson(body), 'utf8').digest('hex')}`;
}

/** The text of a model file for `body` (validated first; StoreError `invalid-body` if it does not match). */
export function serializeModel(body: ModelBody): string {
  const valid = validateBody(body, undefined);
  // one walk gives the canonical text (hashed) and the pretty text (written), nested one level
  const { canonical, pretty } = bothTexts(valid, '  ', '  ');
  const checksum = `sha256:${createHash('sha256').update(canonical, 'utf8').digest('hex')}`;
  return `{\n  "format": ${JSON.stringify(MODEL_FORMAT)},\n  "version": ${MODEL_VERSION},\n  "checksum": ${JSON.stringify(checksum)},\n  "body": ${pretty}\n}\n`;
}

/** Reads a model file's text; `file` names it in errors. Refusals as in the module comment. */
export function parseModel(text: string, file: string): ModelBody {
  const restore = `restore ${previousPath(file)} (the version kept before the last write) or fit the model again`;
  if (text.trim() === '') {
    throw new StoreError('truncated', 'the model file is empty', { file, expected: 'a certa model file', hint: restore });
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (e) {
    const detail = e instanceof Error ? e.message : String(e);
    const cut = looksCutShort(text, detail);
    throw new StoreError(
      cut ? 'truncated' : 'invalid-json',
      cut ? `the model file is cut short (${detail})` : `the model file is not valid JSON (${detail})`,
      { file, expected: 'a complete certa model file', hint: restore },
    );
  }
  if (parsed === null || typeof parsed !== 'object' || Array.isArray(parsed) || (parsed as { format?: unknown }).format !== MODEL_FORMAT) {
    const format = parsed !== null && typeof parsed === 'object' ? (parsed as { format?: unknown }).format : undefined;
    throw new StoreError('not-a-model', 'the file is not a certa model file', {
      file,
      found: format === undefined ? describeJson(parsed) : `format ${JSON.stringify(format)}`,
      expected: `an object with "format": "${MODEL_FORMAT}"`,
      hint: 'pass the model.json that certa wrote',
    });
  }
  const envelope = parsed as { version?: unknown; checksum?: unknown; body?: unknown };
  const version = envelope.version;
  if (typeof version !== 'number' || !Number.isInteger(version) || version < 1) {
    throw new StoreError('not-a-model', 'the model file has no valid format version', {
      file,
      found: JSON.stringify(version) ?? 'nothing',
      expected: 'a whole version number from 1',
      hint: restore,
    });
  }
  if (version > MODEL_VERSION) {
    throw new StoreError('newer-version', `the model file is format version ${version}, written by a newer certa; this certa reads version ${MODEL_VERSION}`, {
      file,
      found: `version ${version}`,
      expected: `version ${MODEL_VERSION} or older`,
      hint: 'upgrade certa to read this model',
    });
  }
  if (typeof envelope.checksum !== 'string' || envelope.body === null || typeof envelope.body !== 'object' || Array.isArray(envelope.body)) {
    throw new StoreError('not-a-model', 'the model file lacks its checksum or body', {
      file,
      expected: 'an envelope with "checksum" and an object "body"',
      hint: restore,
    });
  }
  const actual = bodyChecksum(envelope.body);
  if (actual !== envelope.checksum) {
    throw new StoreError('checksum-mismatch', 'the model file was changed after certa wrote it: its checksum does not match its body (tampered or damaged)', {
      file,
      found: actual,
      expected: envelope.checksum,
      hint: `${restore}; certa refuses edited model files so a scheduled update never continues from a damaged state`,
    });
  }
  return validateBody(envelope.body, file);
}

/** Reads and parses a model file (StoreError `not-found` / `read-failed` when it cannot be read). */
export async function readModelFile(path: string): Promise<ModelBody> {
  let text: string;
  try {
    text = await fsp.readFile(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') {
      throw new StoreError('not-found', 'the model file does not exist', { file: path, hint: 'check the path, or fit and save a model first' });
    }
    const error = new StoreError('read-failed', `could not read the model file (${code ?? 'unknown'}: ${(e as Error).message})`, {
      file: path,
      hint: 'check the permissions of the file',
    });
    (error as { cause?: unknown }).cause = e;
    throw error;
  }
  const body = parseModel(text, path);
  rememberValid(path, text);
  return body;
}

/**
 * The texts of the model files this process last read and found valid, by path (a few: the
 * updates in flight in one thread). Keeping the previous version of a model that was just read
 * under its lock then compares the file with that text instead of parsing it a second time.
 */
const validTexts = new Map<string, string>();
const VALID_TEXTS_KEPT = 8;

function rememberValid(path: string, text: string): void {
  validTexts.delete(path);
  validTexts.set(path, text);
  if (validTexts.size > VALID_TEXTS_KEPT) validTexts.delete(validTexts.keys().next().value as string);
}

export interface WriteModelOptions {
  /** Copy the existing file (if it is a valid model file) to `previousPath(path)` first. Default true. */
  keepPrevious?: boolean;
  /** Create the folder if missing. Default false. */
  mkdir?: boolean;
}

export interface WriteModelResult {
  /** Where the previous version was kept, or null. */
  previous: string | null;
  /** Why no previous version was kept although asked, or null. */
  note: string | null;
}

/**
 * Writes `body` to `path` atomically. With `keepPrevious` (default) the current file, when it is
 * a valid model file, is first copied atomically to `model.prev.json`; an existing file that
 * does not read as a model is not copied (so a damaged file never replaces a good previous one)
 * and the result says so. Hold the model's lock (lock.ts) around read-update-write.
 */
export async function writeModelFile(path: string, body: ModelBody, options: WriteModelOptions = {}): Promise<WriteModelResult> {
  const text = serializeModel(body);
  const kept: WriteModelResult = options.keepPrevious ?? true ? await keepPreviousModel(path) : { previous: null, note: null };
  await writeFileAtomic(path, text, { mkdir: options.mkdir ?? false });
  return kept;
}

/**
 * The first step of `writeModelFile` with `keepPrevious`, for a caller that writes the new text
 * itself (after this has finished): the current file at `path`, when it is a valid model file,
 * is copied atomically (and durably) to `previousPath(path)`; a missing file keeps nothing, a
 * file that does not read as a model is not copied and the note says why.
 */
export async function keepPreviousModel(path: string): Promise<WriteModelResult> {
  let previous: string | null = null;
  let note: string | null = null;
  // a local read of one small file (most often none is there), made in this thread
  let existing: string | null;
  try {
    existing = readFileSync(path, 'utf8');
  } catch (error) {
    const e = error as NodeJS.ErrnoException;
    if (e.code !== 'ENOENT') throw new StoreError('read-failed', `could not read the current model file to keep it (${e.code ?? 'unknown'}: ${e.message})`, { file: path });
    existing = null;
  }
  if (existing !== null) {
    let valid = true;
    try {
      if (validTexts.get(path) !== existing) parseModel(existing, path);
    } catch (e) {
      if (!(e instanceof StoreError)) throw e;
      valid = false;
      note = `the current file was not kept as ${previousPath(path)}: ${e.message}`;
    }
    if (valid) {
      previous = previousPath(path);
      await writeFileAtomic(previous, existing);
    }
  }
  return { previous, note };
}

/** `model.json` → `model.prev.json`; a name not ending in `.json` gets `.prev` appended. */
export function previousPath(path: string): string {
  return path.endsWith('.json') ? `${path.slice(0, -5)}.prev.json` : `${path}.prev`;
}

function validateBody(body: unknown, file: string | undefined): ModelBody {
  const result = modelBodySchema.safeParse(body);
  if (result.success) return result.data;
  const first = result.error.issues[0];
  const where = formatPath(first.path);
  throw new StoreError('invalid-body', `the model body is not valid at ${where}: ${first.message}`, {
    ...(file !== undefined ? { file } : {}),
    expected: `a model body of format version ${MODEL_VERSION}`,
    hint: file !== undefined ? `restore ${previousPath(file)} or fit the model again` : 'this is a bug in the code that built the model',
  });
}

function formatPath(path: readonly PropertyKey[]): string {
  let out = 'body';
  for (const part of path) out += typeof part === 'number' ? `[${part}]` : /^[A-Za-z_$][\w$]*$/.test(String(part)) ? `.${String(part)}` : `[${JSON.stringify(String(part))}]`;
  return out;
}

/**
 * A parse failure at the very end of the text (after trailing whitespace is set aside) means the
 * text stopped in the middle of a value: a file cut short rather than one with a wrong character.
 * Read from the parser's message ("Unexpected end of JSON input", "... at position N").
 */
function looksCutShort(text: string, message: string): boolean {
  if (/end of (JSON )?input/i.test(message)) return true;
  const at = /position (\d+)/.exec(message);
  return at !== null && Number(at[1]) >= text.trimEnd().length;
}

function describeJson(v: unknown): string {
  if (Array.isArray(v)) return 'an array';
  if (v === null) return 'null';
  return typeof v === 'object' ? 'an object without "format"' : `a ${typeof v}`;
}
