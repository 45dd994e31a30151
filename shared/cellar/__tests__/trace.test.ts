import { describe, expect, it } from 'vitest';
import { beerFacts, bestBeforeFrom, bestBeforeState, defaultShelfLifeSettings, finingsFacts, shelfLifeDays } from '../trace.ts';

describe('finings, allergens and vegan (common practice; see the table in shared/cellar/trace.ts)', () => {
  it('gelatin and isinglass are animal-derived; silica finings are not', () => {
    expect(finingsFacts('Gelatin')).toMatchObject({ animalDerived: true, allergens: [] });
    expect(finingsFacts('isinglass (liquid)')).toMatchObject({ animalDerived: true, allergens: ['fish (isinglass)'] });
    expect(finingsFacts('silica finings')).toMatchObject({ animalDerived: false });
    expect(finingsFacts('something new')).toMatchObject({ animalDerived: null });
  });

  it('a beer is vegan only when every finings is known animal-free and no note of its own is animal', () => {
    expect(beerFacts(['gluten (barley)'], [])).toEqual({ finings: [], allergens: ['gluten (barley)'], vegan: true });
    expect(beerFacts([], [{ kind: 'silica finings', dose: 20, unit: 'mL' }]).vegan).toBe(true);
    expect(beerFacts([], [{ kind: 'gelatin', dose: 5, unit: 'g' }]).vegan).toBe(false);
    expect(beerFacts([], [{ kind: 'a house mix', dose: 5, unit: 'g' }]).vegan).toBe(false);
    expect(beerFacts(['Lactose (milk)'], []).vegan).toBe(false);
    expect(beerFacts(['honey'], []).vegan).toBe(false);
    const both = beerFacts(
      ['gluten (barley)', 'Gluten  (barley)'],
      [
        { kind: 'isinglass', dose: 10, unit: 'mL' },
        { kind: 'isinglass', dose: 5, unit: 'mL' },
      ],
    );
    expect(both.allergens).toEqual(['gluten (barley)', 'fish (isinglass)']);
    expect(both.finings).toHaveLength(2);
  });
});

describe('shelf life and best-before', () => {
  it('the batch’s own days, else the first style that matches, else the default', () => {
    expect(shelfLifeDays({ style: 'West coast IPA', shelfLifeDays: 20 }, defaultShelfLifeSettings)).toEqual({ days: 20, from: 'batch' });
    expect(shelfLifeDays({ style: 'West coast IPA', shelfLifeDays: null }, defaultShelfLifeSettings)).toEqual({ days: 45, from: 'style' });
    expect(shelfLifeDays({ style: 'Dry stout', shelfLifeDays: null }, defaultShelfLifeSettings)).toEqual({ days: 60, from: 'default' });
  });

  it('best-before is the fill time plus whole days; near within the warning days, past at or after it', () => {
    const filled = new Date('2027-03-27T10:00:00Z');
    const bb = bestBeforeFrom(filled, 45);
    expect(bb.toISOString()).toBe('2027-05-11T10:00:00.000Z');
    expect(bestBeforeState(bb, new Date('2027-05-01T10:00:00Z'), 7)).toBe('ok');
    expect(bestBeforeState(bb, new Date('2027-05-04T10:00:00Z'), 7)).toBe('near');
    expect(bestBeforeState(bb, bb, 7)).toBe('past');
  });
});
