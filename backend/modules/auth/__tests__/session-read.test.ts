import { describe, expect, it } from 'vitest';
import type { Deps } from '../../../lib/deps.ts';
import { readSessionRow } from '../session-store.ts';

/** A pool whose prepared read fails with `code`, and whose unprepared read answers one row; what it was asked, in order. */
function poolFailingWith(code: string) {
  const asked: string[] = [];
  const pool = {
    query(q: string | { name?: string }) {
      if (typeof q === 'object' && q.name) {
        asked.push(`prepared ${q.name}`);
        return Promise.reject(Object.assign(new Error(code), { code }));
      }
      asked.push('unprepared');
      return Promise.resolve({ rows: [{ sess: {} }] });
    },
  };
  return { pool: pool as unknown as Deps['pool'], asked };
}

describe('the session read', () => {
  it.each(['0A000', '26000', '42P05'])('reads once more unprepared when the prepared statement fails with %s', async (code) => {
    const { pool, asked } = poolFailingWith(code);
    const res = await readSessionRow(pool, ['sid', 0]);
    expect(res.rows).toHaveLength(1);
    expect(asked).toEqual(['prepared cw-read-session', 'unprepared']);
  });

  it('passes any other error on (a database that is down answers 503 elsewhere)', async () => {
    const { pool, asked } = poolFailingWith('57P01');
    await expect(readSessionRow(pool, ['sid', 0])).rejects.toMatchObject({ code: '57P01' });
    expect(asked).toEqual(['prepared cw-read-session']);
  });
});
