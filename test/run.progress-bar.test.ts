// The progress display: durations read as a person would write them, the ETA extrapolates the work rate of this
// run only, a pipe gets plain throttled lines, a terminal gets one line redrawn in place, NO_COLOR means no colour.
import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { etaSeconds, formatDuration, ProgressBar, type ProgressState } from '../coordinator/dispatch/progress-bar.js';

class Capture extends Writable {
  text = '';
  isTTY?: boolean;
  constructor(tty: boolean) {
    super();
    if (tty) this.isTTY = true;
  }
  override _write(chunk: Buffer, _enc: BufferEncoding, done: () => void): void {
    this.text += chunk.toString();
    done();
  }
}

const state = (done: number, workDone: number, over: Partial<ProgressState> = {}): ProgressState => ({
  total: 10,
  done,
  failed: 0,
  running: 1,
  workTotal: 100,
  workDone,
  ...over,
});

describe('formatDuration', () => {
  it.each<[number, string]>([
    [0, '0s'],
    [12.4, '12s'],
    [59.6, '1m00s'],
    [185, '3m05s'],
    [3720, '1h02m'],
    [Number.NaN, '--'],
    [-1, '--'],
    [Infinity, '--'],
  ])('when %s seconds are left then it reads %s', (s, text) => {
    expect(formatDuration(s)).toBe(text);
  });
});

describe('etaSeconds', () => {
  // Constant-rate extrapolation (common practice): remaining / (gained / elapsed).
  it.each<[string, number, number, number, number]>([
    ['half the work in 60 s', 0, 50, 60_000, 60],
    ['work resumed at 40, 10 more in 30 s', 40, 50, 30_000, 150],
    ['nothing gained yet', 50, 50, 30_000, Number.NaN],
  ])('when %s then the ETA is %s s', (_what, atStart, doneNow, elapsedMs, expected) => {
    const eta = etaSeconds(state(5, doneNow), atStart, 1_000, 1_000 + elapsedMs);
    if (Number.isNaN(expected)) expect(eta).toBeNaN();
    else expect(eta).toBeCloseTo(expected, 9);
  });
});

describe('ProgressBar', () => {
  it('when stderr is a pipe then lines are plain, printed on change at most every interval, and the last is not repeated', () => {
    let now = 0;
    const out = new Capture(false);
    const bar = new ProgressBar({ stream: out, nowMs: () => now, plainIntervalMs: 5_000 });
    bar.update(state(0, 0));
    now = 1_000;
    bar.update(state(1, 10)); // changed, but too soon
    now = 6_000;
    bar.update(state(2, 20)); // changed and due
    now = 12_000;
    bar.update(state(2, 25)); // due but unchanged counts
    bar.finish(state(2, 25));
    const lines = out.text.trim().split('\n');
    expect(lines).toHaveLength(2);
    expect(lines[1]).toContain('2/10 done');
    expect(out.text).not.toMatch(/\u001b|\r/);
  });

  it('when one long job runs in a log then a line appears each heartbeat while its solved share moves, and none while it stands', () => {
    let now = 0;
    const out = new Capture(false);
    const bar = new ProgressBar({ stream: out, nowMs: () => now, plainIntervalMs: 5_000, plainHeartbeatMs: 60_000 });
    bar.update(state(0, 0)); // the first line
    now = 30_000;
    bar.update(state(0, 3)); // moved, heartbeat not due
    now = 61_000;
    bar.update(state(0, 4)); // moved and due: 4 %
    now = 200_000;
    bar.update(state(0, 4)); // due, but nothing moved
    now = 260_000;
    bar.update(state(0, 9)); // moved and due: 9 %
    const lines = out.text.trim().split('\n');
    expect(lines).toHaveLength(3);
    expect(lines[1]).toContain(' 4%');
    expect(lines[2]).toContain(' 9%');
    expect(lines[2]).toContain('0/10 done');
  });

  it('when stderr is a terminal then one line is redrawn in place with an ETA, and NO_COLOR turns colour off', () => {
    let now = 0;
    const tty = new Capture(true);
    const bar = new ProgressBar({ stream: tty, nowMs: () => now, color: false });
    bar.update(state(0, 0));
    now = 60_000;
    bar.update(state(5, 50, { failed: 1 }));
    bar.finish(state(5, 50, { failed: 1 }));
    expect(tty.text.startsWith('\r')).toBe(true);
    expect(tty.text).toContain('\u001b[K');
    expect(tty.text).toContain('ETA 1m00s');
    expect(tty.text).toContain('1 failed');
    expect(tty.text).not.toMatch(/\u001b\[3\dm/);
    expect(tty.text.endsWith('\n')).toBe(true);

    const previous = process.env.NO_COLOR;
    try {
      process.env.NO_COLOR = '1';
      const t2 = new Capture(true);
      new ProgressBar({ stream: t2 }).finish(state(3, 30));
      expect(t2.text).not.toMatch(/\u001b\[3\dm/);
      delete process.env.NO_COLOR;
      const t3 = new Capture(true);
      new ProgressBar({ stream: t3 }).finish(state(3, 30));
      expect(t3.text).toMatch(/\u001b\[32m3\/10 done/);
    } finally {
      if (previous === undefined) delete process.env.NO_COLOR;
      else process.env.NO_COLOR = previous;
    }
  });
});
