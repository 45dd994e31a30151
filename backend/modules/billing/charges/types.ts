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
