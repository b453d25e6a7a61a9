// The progress display of `run` and `collect --follow`, on stderr: a bar redrawn in place on a terminal, plain
// lines (at most one every few seconds) otherwise; colour only on a terminal and never when NO_COLOR is set
// (no-color.org). The ETA weighs jobs by their estimated cost, since the longest jobs run first.

/** What the display shows; `work*` are in any unit (estimated cell updates), for a cost-weighted ETA. */
export interface ProgressState {
  readonly total: number;
  readonly done: number;
  readonly failed: number;
  readonly running: number;
  /** Work of the whole sweep, and the work finished so far (finished jobs plus the solved part of running ones). */
  readonly workTotal: number;
  readonly workDone: number;
}

export interface ProgressBarOptions {
  readonly stream: NodeJS.WritableStream & { isTTY?: boolean; columns?: number };
  /** Redraw in place (a terminal). @defaultValue stream.isTTY */
  readonly inPlace?: boolean;
  /** Use colour. @defaultValue inPlace and NO_COLOR unset */
  readonly color?: boolean;
  /** Least time between two plain lines, ms. @defaultValue 5000 */
  readonly plainIntervalMs?: number;
  /**
   * A plain line also when no job finished for this long but the solved share moved by a whole percent, so that a
   * log of hours-long jobs shows they advance. @defaultValue 60000
   */
  readonly plainHeartbeatMs?: number;
  /** Clock, ms (tests give their own). @defaultValue Date.now */
  readonly nowMs?: () => number;
}

/** `1h02m`, `3m05s`, `12s`; `--` when unknown. */
export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return '--';
  const s = Math.round(seconds);
  if (s < 60) return `${s}s`;
  const m = Math.floor(s / 60);
  if (m < 60) return `${m}m${String(s % 60).padStart(2, '0')}s`;
  return `${Math.floor(m / 60)}h${String(m % 60).padStart(2, '0')}m`;
}

/**
 * Seconds left, extrapolating the work rate seen since `startMs` (work done before then, e.g. by an earlier run
 * that was resumed, does not count as speed): remaining work / (work done since start / elapsed).
 */
export function etaSeconds(state: ProgressState, workAtStart: number, startMs: number, nowMs: number): number {
  const elapsedS = (nowMs - startMs) / 1000;
  const gained = state.workDone - workAtStart;
  if (elapsedS <= 0 || gained <= 0) return Number.NaN;
  return (state.workTotal - state.workDone) / (gained / elapsedS);
}

/** The solved share of the sweep: by work when it is known, else by finished jobs. */
function solvedFraction(state: ProgressState): number {
  const finishedJobs = state.done + state.failed;
  return state.workTotal > 0 ? Math.min(1, state.workDone / state.workTotal) : finishedJobs / Math.max(1, state.total);
}

/** The solved share in whole percent, as shown. */
function percentText(state: ProgressState): string {
  return (solvedFraction(state) * 100).toFixed(0);
}

const ESC = '\u001b[';
const paint = (on: boolean, code: string, text: string) => (on ? `${ESC}${code}m${text}${ESC}0m` : text);

export class ProgressBar {
  private readonly inPlace: boolean;
  private readonly color: boolean;
  private readonly now: () => number;
  private readonly startMs: number;
  private workAtStart: number | undefined;
  private doneAtStart: number | undefined;
  private lastPlainMs = -Infinity;
  private lastPlainText = '';
  private lastPlainPercent = '';
  private lastDrawMs = -Infinity;
  private finished = false;

  constructor(private readonly opts: ProgressBarOptions) {
    this.inPlace = opts.inPlace ?? opts.stream.isTTY === true;
    this.color = opts.color ?? (this.inPlace && !process.env.NO_COLOR);
    this.now = opts.nowMs ?? Date.now;
    this.startMs = this.now();
  }

  /** The one-line text for a state (without colour codes unless colour is on). */
  line(state: ProgressState): string {
    const now = this.now();
    this.workAtStart ??= state.workDone;
    this.doneAtStart ??= state.done + state.failed;
    const finishedJobs = state.done + state.failed;
    const fraction = solvedFraction(state);
    const width = 20;
    const filled = Math.round(fraction * width);
    const bar = '[' + '#'.repeat(filled) + '.'.repeat(width - filled) + ']';
    const elapsedMin = (now - this.startMs) / 60_000;
    const rate = elapsedMin > 0 ? (finishedJobs - this.doneAtStart) / elapsedMin : 0;
    const eta = finishedJobs === state.total ? 0 : etaSeconds(state, this.workAtStart, this.startMs, now);
    const parts = [
      `${bar} ${percentText(state).padStart(3)}%`,
      paint(this.color, '32', `${state.done}/${state.total} done`),
      state.failed > 0 ? paint(this.color, '31', `${state.failed} failed`) : undefined,
      `${state.running} running`,
      `${rate.toFixed(1)} jobs/min`,
      `ETA ${formatDuration(eta)}`,
    ];
    return parts.filter((p) => p !== undefined).join('  ');
  }

  /** Show a state: redrawn in place (at most 10 times a second), or a plain line when it changed and enough time passed. */
  update(state: ProgressState): void {
    if (this.finished) return;
    const now = this.now();
    if (this.inPlace) {
      if (now - this.lastDrawMs < 100) return;
      this.lastDrawMs = now;
      this.opts.stream.write(`\r${this.line(state)}${ESC}K`);
      return;
    }
    const counts = `${state.done}/${state.failed}`;
    const percent = percentText(state);
    const sinceMs = now - this.lastPlainMs;
    const countsDue = counts !== this.lastPlainText && sinceMs >= (this.opts.plainIntervalMs ?? 5000);
    const heartbeatDue = percent !== this.lastPlainPercent && sinceMs >= (this.opts.plainHeartbeatMs ?? 60_000);
    if (!countsDue && !heartbeatDue) return;
    this.lastPlainText = counts;
    this.lastPlainPercent = percent;
    this.lastPlainMs = now;
    this.opts.stream.write(this.line(state) + '\n');
  }

  /** Draw the final state once and end the line. Safe to call twice. */
  finish(state: ProgressState): void {
    if (this.finished) return;
    this.finished = true;
    if (this.inPlace) {
      this.opts.stream.write(`\r${this.line(state)}${ESC}K\n`);
      return;
    }
    // A plain line with the same counts was already printed: do not repeat it.
    if (`${state.done}/${state.failed}` !== this.lastPlainText) this.opts.stream.write(this.line(state) + '\n');
  }
}
