/**
 * A progress bar on standard error while a search runs, only when stderr is a terminal (never in
 * pipes, logs or CI), drawn by cli-progress.
 */
import cliProgress from 'cli-progress';
import type { CliIO } from './main.js';

export class ProgressReporter {
  private bar: cliProgress.SingleBar | null = null;

  constructor(
    private readonly io: CliIO,
    private readonly label: string,
  ) {}

  /** A callback for `SearchOptions.onProgress`, or undefined when nothing is to be drawn. */
  callback(): ((done: number, total: number) => void) | undefined {
    if (!this.io.isTTY) return undefined;
    return (done, total) => {
      if (!this.bar) {
        this.bar = new cliProgress.SingleBar(
          { format: `${this.label} [{bar}] {value}/{total} candidates`, stream: process.stderr, clearOnComplete: true, hideCursor: true },
          cliProgress.Presets.shades_classic,
        );
        this.bar.start(total, 0);
      }
      this.bar.update(done);
    };
  }

  stop(): void {
    this.bar?.stop();
    this.bar = null;
  }
}

/**
 * "series k of n, about 2 min left" on standard error while a batch runs, rewritten in place,
 * only when stderr is a terminal. The time left is the mean time per finished series so far
 * times the series still to do.
 */
export class BatchProgress {
  private readonly started: number;
  private shown = false;

  constructor(
    private readonly io: CliIO,
    private readonly total: number,
    private readonly now: () => number = Date.now,
  ) {
    this.started = now();
  }

  update(done: number): void {
    if (!this.io.isTTY) return;
    const elapsed = this.now() - this.started;
    const left = done > 0 ? (elapsed / done) * (this.total - done) : NaN;
    const text = `series ${done} of ${this.total}${Number.isFinite(left) && done < this.total ? `, about ${durationText(left)} left` : ''}`;
    this.io.err(`\r${text.padEnd(48)}`);
    this.shown = true;
  }

  stop(): void {
    if (this.shown) this.io.err(`\r${' '.repeat(48)}\r`);
    this.shown = false;
  }
}

/** A duration for people: seconds under two minutes, then minutes, then hours and minutes. */
export function durationText(ms: number): string {
  const s = Math.round(ms / 1000);
  if (s < 120) return `${s} s`;
  const m = Math.round(s / 60);
  if (m < 120) return `${m} min`;
  return `${Math.floor(m / 60)} h ${m % 60} min`;
}
