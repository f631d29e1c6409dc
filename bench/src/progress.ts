/**
 * Progress display for sweeps: a bar with ETA redrawn in place on a terminal, plain lines
 * otherwise (CI logs, files), at most one line every few seconds plus the final one.
 *
 * @module
 */

/** Where progress goes: a stream with `write` and an `isTTY` flag (process.stderr by default). */
export interface ProgressSink {
  write(text: string): unknown;
  readonly isTTY?: boolean;
  readonly columns?: number;
}

/** Format seconds as `1h02m`, `3m05s` or `42s`. */
export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return "?";
  const s = Math.max(0, Math.round(seconds));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const r = s % 60;
  if (h > 0) return `${h}h${String(m).padStart(2, "0")}m`;
  if (m > 0) return `${m}m${String(r).padStart(2, "0")}s`;
  return `${r}s`;
}

/** Counts finished runs and shows progress with an ETA from the mean time per run so far. */
export class Progress {
  private done = 0;
  private failed = 0;
  private readonly start = Date.now();
  private lastLine = 0;

  constructor(
    private readonly total: number,
    private readonly sink: ProgressSink,
    private readonly label = "runs",
    private readonly intervalMs = 5000,
  ) {}

  /** Record a finished run (with its key, shown on plain lines). */
  tick(key: string, ok: boolean): void {
    this.done++;
    if (!ok) this.failed++;
    const now = Date.now();
    const elapsed = (now - this.start) / 1000;
    const eta = this.done > 0 ? (elapsed / this.done) * (this.total - this.done) : Number.NaN;
    const pct = this.total > 0 ? Math.floor((100 * this.done) / this.total) : 100;
    const fails = this.failed > 0 ? `, ${this.failed} failed` : "";
    if (this.sink.isTTY) {
      const width = Math.max(10, Math.min(40, (this.sink.columns ?? 80) - 50));
      const filled = Math.round((width * this.done) / Math.max(1, this.total));
      const bar = `${"█".repeat(filled)}${"░".repeat(width - filled)}`;
      this.sink.write(
        `\r${bar} ${this.done}/${this.total} ${this.label} ${pct}% · ETA ${formatDuration(eta)}${fails}\x1b[K`,
      );
      if (this.done === this.total) this.sink.write("\n");
    } else if (now - this.lastLine >= this.intervalMs || this.done === this.total) {
      this.lastLine = now;
      this.sink.write(
        `progress ${this.done}/${this.total} ${this.label} (${pct}%), elapsed ${formatDuration(elapsed)}, ETA ${formatDuration(eta)}${fails}; last: ${key}\n`,
      );
    }
  }
}
