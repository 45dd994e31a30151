import { addDays, daysBetween } from '../../../../shared/billing/dates.ts';
import { priceItemInfo, type ChargePreviewLine, type PriceItem } from '../../../../shared/schemas/billing.ts';
import type { Database } from '../../../db/database.ts';
import type { PriceBook } from '../price-book.ts';

export interface ChargeContext {
  period: string;
  /** First day of the period, last day, first day of the next period ('YYYY-MM-DD'). */
  first: string;
  last: string;
  next: string;
  timeZone: string;
  book: PriceBook;
  /** Only these members (a preview for one member); all when absent. */
  memberIds?: string[];
}

/** One charge before tax: derived from a record, pointing back to it, for a member, at a price (or none). */
export interface ChargeDraft extends Omit<ChargePreviewLine, 'amountCents' | 'taxRateBp' | 'taxCents'> {
  memberId: string;
  priceId: string | null;
  /** False for a manual charge or credit marked as outside tax. */
  taxable: boolean;
}

export interface SourceResult {
  charges: ChargeDraft[];
  /** Use that cannot be billed as things stand (a missing price), named for the treasurer. */
  problems: string[];
}

/** One kind of record that gives rise to charges. Each derives its charges for a period on its own. */
export interface ChargeSource {
  key: string;
  label: string;
  derive(db: Database, ctx: ChargeContext): Promise<SourceResult>;
}

/**
 * A charge at a price from the price book: the line's unit price, the price it came from and its
 * label (unless the source names it more closely) follow from the price; such charges are taxable.
 */
export function pricedCharge(
  item: PriceItem,
  price: { id: string; unitCents: number },
  line: Omit<ChargeDraft, 'item' | 'description' | 'unitPriceCents' | 'priceId' | 'taxable'> & { description?: string },
): ChargeDraft {
  return {
    ...line,
    item,
    description: line.description ?? priceItemInfo[item].label,
    unitPriceCents: price.unitCents,
    priceId: price.id,
    taxable: true,
  };
}

/** A charge for one day's service: a fill, a dose, a cleaning (one of each unless `quantity` says more). */
export function dayCharge(
  item: PriceItem,
  price: { id: string; unitCents: number },
  day: string,
  line: Omit<ChargeDraft, 'item' | 'description' | 'unitPriceCents' | 'priceId' | 'taxable' | 'serviceFrom' | 'serviceTo' | 'quantity'> & {
    description?: string;
    quantity?: number;
  },
): ChargeDraft {
  return pricedCharge(item, price, { quantity: 1, ...line, serviceFrom: day, serviceTo: day });
}

/**
 * A source whose records come from one query, each record giving its charges (and naming what
 * cannot be billed) on its own.
 */
export function chargeSource<R>(def: {
  key: string;
  label: string;
  records: (db: Database, ctx: ChargeContext) => Promise<R[]>;
  charge: (record: R, ctx: ChargeContext, out: SourceResult) => void;
}): ChargeSource {
  return {
    key: def.key,
    label: def.label,
    async derive(db, ctx) {
      const out: SourceResult = { charges: [], problems: [] };
      for (const record of await def.records(db, ctx)) def.charge(record, ctx, out);
      return out;
    },
  };
}

/** A charge for the days from `from` up to `to` (the day after the last), `quantity` of `unit`s. */
export function spanCharge(
  item: PriceItem,
  price: { id: string; unitCents: number },
  span: { from: string; to: string; quantity: number; unit: string },
  line: Omit<ChargeDraft, 'item' | 'description' | 'unitPriceCents' | 'priceId' | 'taxable' | 'serviceFrom' | 'serviceTo' | 'quantity' | 'unit'> & {
    description?: string;
  },
): ChargeDraft {
  return pricedCharge(item, price, { ...line, serviceFrom: span.from, serviceTo: addDays(span.to, -1), quantity: span.quantity, unit: span.unit });
}

/** "1 day", "3 weeks". */
export const plural = (n: number, one: string) => `${n} ${one}${n === 1 ? '' : 's'}`;

/**
 * Adds the charge `make` builds at the price of `item` in effect on `day`, or names `missing` for the
 * treasurer when the price list has no such price.
 */
export function chargeAtPrice(
  ctx: ChargeContext,
  out: SourceResult,
  at: { item: PriceItem; day: string; missing: string },
  make: (price: { id: string; unitCents: number }) => ChargeDraft,
): void {
  const price = ctx.book.priceOn(at.item, at.day);
  if (price) out.charges.push(make(price));
  else out.problems.push(at.missing);
}

/** Per-day charges for each stretch of days at one price (the price book's `segments`), `line` naming each. */
export function dayCharges(
  item: PriceItem,
  segments: { from: string; to: string; price: { id: string; unitCents: number } }[],
  line: (days: number, s: { from: string; to: string }) => Parameters<typeof spanCharge>[3],
): ChargeDraft[] {
  return segments.map((s) => {
    const days = daysBetween(s.from, s.to);
    return spanCharge(item, s.price, { from: s.from, to: s.to, quantity: days, unit: 'day' }, line(days, s));
  });
}
