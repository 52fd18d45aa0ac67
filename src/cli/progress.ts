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
