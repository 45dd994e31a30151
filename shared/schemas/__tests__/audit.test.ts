import { describe, expect, it } from 'vitest';
import { auditChanges } from '../audit.ts';

describe('auditChanges', () => {
  it('gives only the fields that differ between before and after, nested ones as dotted paths', () => {
    expect(
      auditChanges({
        before: { nearDays: 7, rules: { maxDays: 14, minDays: 1 }, list: ['a'] },
        after: { nearDays: 10, rules: { maxDays: 21, minDays: 1 }, list: ['a', 'b'] },
      }),
    ).toEqual([
      { field: 'nearDays', before: 7, after: 10 },
      { field: 'rules.maxDays', before: 14, after: 21 },
      { field: 'list', before: ['a'], after: ['a', 'b'] },
    ]);
  });

  it('shows a field only before or only after with null on the other side', () => {
    expect(auditChanges({ before: { tapId: 't1' }, after: {} })).toEqual([{ field: 'tapId', before: 't1', after: null }]);
    expect(auditChanges({ before: 'a', after: 'b' })).toEqual([{ field: 'value', before: 'a', after: 'b' }]);
  });

  it('reads from and to as one change, and anything else as the values set', () => {
    expect(auditChanges({ code: 'F-01', from: 'ready', to: 'holding' })).toEqual([
      { field: 'from → to', before: 'ready', after: 'holding' },
      { field: 'code', before: null, after: 'F-01' },
    ]);
    expect(auditChanges({ amountCents: 4200 })).toEqual([{ field: 'amountCents', before: null, after: 4200 }]);
    expect(auditChanges(null)).toEqual([]);
    expect(auditChanges({})).toEqual([]);
  });
});
