import type { Database } from '../../db/database.ts';
import { bumpCounter } from './invoice-commands.repository.ts';

export type NumberSeries = 'invoice' | 'credit_note';
const prefixes: Record<NumberSeries, string> = { invoice: 'INV', credit_note: 'CN' };

/**
 * Takes the next number of a series for a year. The counter row is created or incremented with
 * one statement, which holds its row lock until the calling transaction ends: a second transaction
 * wanting a number waits, and a rolled-back one gives its number back. So numbers run 1, 2, 3 …
 * per year with no gaps and no duplicates. Call inside the transaction that uses the number.
 */
export async function takeNumber(trx: Database, series: NumberSeries, year: number): Promise<{ number: string; seq: number; year: number }> {
  const seq = await bumpCounter(trx, series, year);
  return { number: `${prefixes[series]}-${year}-${String(seq).padStart(4, '0')}`, seq, year };
}
