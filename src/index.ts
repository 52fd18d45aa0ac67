/**
 * certa as a library: load a series, search structures, assert and forecast, keep a model
 * learning. The CLI is a thin shell over these functions; they never print or exit, they throw
 * the typed errors of `data/errors.ts`.
 */
export { loadSeries, loadTable, seriesFromTable, type LoadOptions, type LoadReport } from './data/load.js';
export type { Series, SeriesInput } from './data/series.js';
export { seriesStep, sliceSeries, timesAfter } from './data/series.js';
export { cadenceName, formatTime, stepTime, seasonPeriod, type Frequency } from './data/calendar.js';
export { CertaError, DataError, UsageError, ModelError, StoreError, isCertaError } from './data/errors.js';

export { lstsq, type LstsqResult } from './linalg/lstsq.js';
export { Rls } from './linalg/rls.js';
export { sparseRegression } from './linalg/sparse.js';
export { createRng } from './linalg/random.js';
export { criteria, akaikeWeights, type Criterion } from './select/criteria.js';

export type { Structure, StructureSpec, Estimate, Derived } from './models/structure.js';
export { structureFromSpec, FAMILIES } from './models/registry.js';
export { search, type SearchOptions, type SearchResult } from './select/search.js';
export { searchSeasons, type SeasonEvidence } from './select/seasons.js';

export { forecastSeries, type ForecastOptions, type ForecastRun } from './forecast/pipeline.js';
export { combineRanking, groupOf, COMBINE_DEFAULTS, type CombineOptions, type Combination } from './forecast/combine.js';
export { forecastWithIntervals } from './forecast/intervals.js';
export { Learner } from './forecast/online.js';
export { createDriftState, stepDrift, type DriftAlarm, type DriftState } from './forecast/drift.js';
export {
  update,
  ADAPT,
  DRIFT_POLICIES,
  type DriftPolicy,
  type UpdateOptions,
  type UpdateResult,
  type UpdateStep,
  type UpdateForecast,
  type PolicyOutcome,
  type Revision,
} from './forecast/update.js';
export { backtest } from './evaluate/backtest.js';
export * as metrics from './evaluate/metrics.js';
export { BASELINES } from './evaluate/baselines.js';

export { readModelFile, writeModelFile, parseModel, serializeModel, type ModelBody } from './store/model-file.js';
export { modelBody, assertedFromBody, windowSeries } from './store/asserted.js';
export { withLock, acquireLock, type LockHandle } from './store/lock.js';
export { runUpdate, parseUpdateOptions, type CliUpdateOptions, type UpdateRun } from './cli/update.js';
export { updateSummary, updateText, updateTable } from './report/update-report.js';

export { runBatch, batchTasks, type BatchOptions, type BatchResult } from './batch/run.js';
export { batchCsv, BATCH_COLUMNS, type BatchRow, type BatchStatus } from './batch/batch-table.js';
export { folderNames, isSafeFolderName } from './batch/folder-names.js';
export { shardOf, parseShard, type Shard } from './batch/shard.js';
export { mergeBatches } from './batch/merge.js';
export { resultDocument, snakeKeys, RESULT_FORMAT, RESULT_VERSION, type ResultEntry } from './report/result-json.js';
export { resultSchema } from './report/result-schema.js';
