/**
 * Transactions MariaDB chose as a deadlock's victim are started again (its own advice for error 1213, ER_LOCK_DEADLOCK:
 * "try restarting transaction", MariaDB error reference); every other error goes to the caller at once.
 */
import { describe, expect, it } from 'vitest';
import { retryOnDeadlock } from '../../server/db/retry';

const deadlock = () => Object.assign(new Error('Deadlock found when trying to get lock'), { parent: { errno: 1213 } });

describe('retryOnDeadlock', () => {
  it('starts the write again after a deadlock and returns what the next attempt returns', async () => {
    let calls = 0;
    const value = await retryOnDeadlock(async () => {
      calls += 1;
      if (calls < 3) throw deadlock();
      return 'stored';
    });
    expect([value, calls]).toEqual(['stored', 3]);
  });

  it('gives up after the last attempt with the deadlock error', async () => {
    let calls = 0;
    await expect(
      retryOnDeadlock(async () => {
        calls += 1;
        throw deadlock();
      }, 2),
    ).rejects.toThrow(/Deadlock/);
    expect(calls).toBe(2);
  });

  it('passes any other error straight through, without a second attempt', async () => {
    let calls = 0;
    const quota = Object.assign(new Error('over the quota'), { status: 413 });
    await expect(
      retryOnDeadlock(async () => {
        calls += 1;
        throw quota;
      }),
    ).rejects.toBe(quota);
    expect(calls).toBe(1);
  });
});
