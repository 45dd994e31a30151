import { z } from 'zod';

/**
 * What follows the beer from a batch onto its kegs, the tap board and the member who takes a keg:
 * allergen notes, what the finings add to them, whether the beer is vegan, and its best-before.
 *
 * Finings, by kind (matched on the name the brewer wrote, case-insensitively). Sources:
 * "common practice" unless marked otherwise; no figure here is a published check value.
 *   - gelatin: made from animal collagen (pork or beef) → not vegan; not one of the listed food
 *     allergens (common practice).
 *   - isinglass: made from fish swim bladders → not vegan; a fish product (common practice; some
 *     labelling rules exempt isinglass used as a fining agent in beer from the fish allergen label —
 *     from memory, so the note says "fish (isinglass)" and local rules decide the label).
 *   - egg white (albumen) → not vegan; egg.  Casein / skim milk → not vegan; milk.
 *   - chitosan: made from crustacean shells (or from fungi) → not vegan unless the maker says
 *     otherwise; crustaceans (common practice).
 *   - silica finings (silica sol), PVPP, bentonite, carrageenan / Irish moss (a seaweed, used in the
 *     kettle): mineral, synthetic or plant → vegan, no listed allergen (common practice).
 *   - anything else: unknown, so the beer is not called vegan (a vegan claim needs every finings
 *     known to be animal-free).
 * A batch's own allergen notes that name milk (lactose), egg, fish, crustaceans, molluscs or honey
 * also make it not vegan.
 */
export interface FiningsFacts {
  /** What the finings are called on screens. */
  label: string;
  /** null: not known to be either. */
  animalDerived: boolean | null;
  /** Allergen notes the finings add to the beer's. */
  allergens: string[];
}

const finingsTable: { match: RegExp; facts: FiningsFacts }[] = [
  { match: /gelatin/i, facts: { label: 'gelatin', animalDerived: true, allergens: [] } },
  { match: /isinglass|fish/i, facts: { label: 'isinglass', animalDerived: true, allergens: ['fish (isinglass)'] } },
  { match: /albumen|egg/i, facts: { label: 'egg white', animalDerived: true, allergens: ['egg'] } },
  { match: /casein|milk/i, facts: { label: 'casein', animalDerived: true, allergens: ['milk'] } },
  { match: /chitosan/i, facts: { label: 'chitosan', animalDerived: true, allergens: ['crustaceans (chitosan)'] } },
  { match: /silica|pvpp|bentonite|carrageenan|irish moss|kieselsol/i, facts: { label: 'mineral or plant', animalDerived: false, allergens: [] } },
];

/** What a finings kind means for allergens and a vegan claim (see the table above). */
export function finingsFacts(kind: string): FiningsFacts {
  const hit = finingsTable.find((f) => f.match.test(kind));
  return hit ? hit.facts : { label: 'unknown', animalDerived: null, allergens: [] };
}

/** Allergen notes the product suggests (the list stays free: a batch may note anything). */
export const allergenSuggestions = [
  'gluten (barley)',
  'gluten (wheat)',
  'gluten (rye)',
  'gluten (oats)',
  'lactose (milk)',
  'nuts',
  'peanuts',
  'soy',
  'sulphites',
  'egg',
  'honey',
] as const;

/** A note of the batch's own that comes from an animal. */
const animalAllergen = /milk|lactose|whey|egg|fish|isinglass|crustacean|shellfish|mollusc|honey|gelatin/i;

/** One allergen note: trimmed, single-spaced, lower case (so "Lactose (milk)" and "lactose (milk)" are one). */
export const normaliseAllergen = (note: string) => note.trim().replace(/\s+/g, ' ').toLowerCase();

export const allergenListSchema = z
  .array(z.string().trim().min(1, 'Write the allergen').max(60, 'Keep each allergen under 60 characters'))
  .max(20, 'At most 20 allergen notes')
  .transform((list) => [...new Set(list.map(normaliseAllergen))]);

export interface FiningsDose {
  kind: string;
  dose: number;
  unit: string;
}

export interface BeerFacts {
  finings: FiningsDose[];
  /** The batch's notes and what its finings add, each once, in that order. */
  allergens: string[];
  vegan: boolean;
}

/** The allergens and vegan flag of beer with these notes and finings. */
export function beerFacts(batchAllergens: readonly string[], finings: readonly FiningsDose[]): BeerFacts {
  const allergens = [...batchAllergens.map(normaliseAllergen)];
  let vegan = !allergens.some((a) => animalAllergen.test(a));
  for (const f of finings) {
    const facts = finingsFacts(f.kind);
    if (facts.animalDerived !== false) vegan = false;
    for (const a of facts.allergens) allergens.push(a);
  }
  return { finings: [...finings], allergens: [...new Set(allergens)], vegan };
}

/**
 * Shelf life and best-before. The co-op's default and per-style figures live in Settings
 * ("shelf_life"); a batch may override them. Defaults (common practice for unpasteurised draught
 * beer kept cold): 60 days, hoppy pale styles 45, strong dark styles 120. Kegs count as "near"
 * their best-before within 7 days of it (common practice: a week's warning lets the co-op pour or
 * sell the keg first).
 */
export const shelfLifeSettingsSchema = z.object({
  defaultDays: z.number().int('Whole days').min(1, 'At least 1 day').max(3650, 'At most 10 years'),
  /** Kegs whose best-before is within this many days show on Today. */
  nearDays: z.number().int('Whole days').min(0, 'At least 0 days').max(90, 'At most 90 days'),
  /** The first entry whose text appears in a batch's style applies. */
  byStyle: z
    .array(
      z.object({
        style: z.string().trim().min(1, 'Name the style').max(80, 'Keep the style under 80 characters'),
        days: z.number().int('Whole days').min(1, 'At least 1 day').max(3650, 'At most 10 years'),
      }),
    )
    .max(50, 'At most 50 styles'),
});
export type ShelfLifeSettings = z.infer<typeof shelfLifeSettingsSchema>;

export const defaultShelfLifeSettings: ShelfLifeSettings = {
  defaultDays: 60,
  nearDays: 7,
  byStyle: [
    { style: 'IPA', days: 45 },
    { style: 'Pale ale', days: 45 },
    { style: 'Imperial stout', days: 120 },
    { style: 'Barley wine', days: 120 },
  ],
};

/** The shelf life that applies to a batch: its own, else its style's, else the co-op's default. */
export function shelfLifeDays(
  batch: { style: string; shelfLifeDays: number | null },
  settings: ShelfLifeSettings,
): { days: number; from: 'batch' | 'style' | 'default' } {
  if (batch.shelfLifeDays) return { days: batch.shelfLifeDays, from: 'batch' };
  const style = batch.style.toLowerCase();
  const hit = settings.byStyle.find((s) => style.includes(s.style.toLowerCase()));
  return hit ? { days: hit.days, from: 'style' } : { days: settings.defaultDays, from: 'default' };
}

const DAY_MS = 86_400_000;

/** A fill's best-before: the time it was filled plus the shelf life in days. */
export const bestBeforeFrom = (filledAt: Date, days: number) => new Date(filledAt.getTime() + days * DAY_MS);

export type BestBeforeState = 'ok' | 'near' | 'past';

/** Whether a best-before is past, within `nearDays` of `now`, or further off. */
export function bestBeforeState(bestBefore: Date | string, now: Date, nearDays: number): BestBeforeState {
  const t = new Date(bestBefore).getTime();
  if (t <= now.getTime()) return 'past';
  return t <= now.getTime() + nearDays * DAY_MS ? 'near' : 'ok';
}
