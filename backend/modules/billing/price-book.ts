import type { PriceItem } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { priceBookPrices, priceBookTaxRates } from './prices.repository.ts';

export interface PriceRow {
  id: string;
  item: PriceItem;
  bandMaxLiters: number | null;
  unitCents: number;
  effectiveFrom: string;
}

export interface TaxRateRow {
  id: string;
  rateBp: number;
  label: string;
  effectiveFrom: string;
}

/** One stretch of days [from, to) billed at one price. */
export interface PricedSegment {
  from: string;
  to: string;
  price: PriceRow;
}

/**
 * The price list and tax rates as the database holds them, answering "what did this cost on that
 * day". A price applies from its effective date until the next one for the same item (and band);
 * nothing ever applies before its date.
 */
export class PriceBook {
  private readonly byKey = new Map<string, PriceRow[]>();
  private readonly bands: number[];

  constructor(
    prices: PriceRow[],
    private readonly taxRates: TaxRateRow[],
  ) {
    for (const p of prices) {
      const key = `${p.item}:${p.bandMaxLiters ?? ''}`;
      const list = this.byKey.get(key) ?? [];
      list.push(p);
      this.byKey.set(key, list);
    }
    for (const list of this.byKey.values()) list.sort((a, b) => a.effectiveFrom.localeCompare(b.effectiveFrom));
    this.taxRates = [...taxRates].sort((a, b) => a.effectiveFrom.localeCompare(b.effectiveFrom));
    this.bands = [...new Set(prices.filter((p) => p.item === 'fermenter_day').map((p) => p.bandMaxLiters!))].sort((a, b) => a - b);
  }

  static async load(db: Database): Promise<PriceBook> {
    const [prices, taxes] = await Promise.all([priceBookPrices(db), priceBookTaxRates(db)]);
    return new PriceBook(
      prices.map((p) => ({ id: p.id, item: p.item, bandMaxLiters: p.band_max_liters, unitCents: p.unit_cents, effectiveFrom: p.effective_from })),
      taxes.map((t) => ({ id: t.id, rateBp: t.rate_bp, label: t.label, effectiveFrom: t.effective_from })),
    );
  }

  /** The capacity band (its upper bound in litres) a fermenter of this size falls in, or null if none is that large. */
  bandFor(capacityLiters: number): number | null {
    return this.bands.find((b) => capacityLiters <= b) ?? null;
  }

  private list(item: PriceItem, band: number | null): PriceRow[] {
    return this.byKey.get(`${item}:${band ?? ''}`) ?? [];
  }

  /** The price in effect on `date`, or null when none had started by then. */
  priceOn(item: PriceItem, date: string, band: number | null = null): PriceRow | null {
    let found: PriceRow | null = null;
    for (const p of this.list(item, band)) if (p.effectiveFrom <= date) found = p;
    return found;
  }

  /**
   * Splits the days [from, to) wherever a price changes. Returns null when some day in the span has
   * no price yet (the caller reports it rather than billing nothing).
   */
  segments(item: PriceItem, from: string, to: string, band: number | null = null): PricedSegment[] | null {
    const first = this.priceOn(item, from, band);
    if (!first) return null;
    const out: PricedSegment[] = [];
    let current = first;
    let start = from;
    for (const p of this.list(item, band)) {
      if (p.effectiveFrom > from && p.effectiveFrom < to) {
        out.push({ from: start, to: p.effectiveFrom, price: current });
        start = p.effectiveFrom;
        current = p;
      }
    }
    out.push({ from: start, to, price: current });
    return out;
  }

  /** The tax rate in effect on `date`; no rate on record means zero. */
  taxOn(date: string): TaxRateRow | null {
    let found: TaxRateRow | null = null;
    for (const t of this.taxRates) if (t.effectiveFrom <= date) found = t;
    return found;
  }
}
