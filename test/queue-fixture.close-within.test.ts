// The queue tests' clean-up helper: a close that hangs fails naming what hung once its time limit passes, instead
// of holding the hook until vitest's own timeout; a close that ends or throws in time passes its outcome through.
import { describe, expect, it } from 'vitest';
import { closeWithin } from './helpers/queue-fixture.js';

describe('closeWithin', () => {
  it('when the close never finishes then it fails naming the step after the limit', async () => {
    const t0 = Date.now();
    await expect(closeWithin('closing queue sweep-hung', () => new Promise(() => undefined), 100)).rejects.toThrow(
      'closing queue sweep-hung did not finish within 100 ms',
    );
    // setTimeout fires no earlier than asked (Node.js timers docs); 5 ms of slack for timer rounding.
    expect(Date.now() - t0).toBeGreaterThanOrEqual(95);
  });

  it('when the close finishes in time then it resolves, and when it throws then that error comes through', async () => {
    await expect(closeWithin('a quick close', () => new Promise((r) => setTimeout(r, 10)), 1000)).resolves.toBeUndefined();
    await expect(closeWithin('a failing close', () => Promise.reject(new Error('connection reset')), 1000)).rejects.toThrow('connection reset');
    await expect(closeWithin('a synchronous close', () => {
      throw new Error('already gone');
    }, 1000)).rejects.toThrow('already gone');
  });
});
