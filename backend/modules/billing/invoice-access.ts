import { ForbiddenError } from '@casl/ability';
import type { Request } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { forbidden, notFound } from '../../lib/http-problem.ts';
import { findInvoiceRow } from './invoice-queries.service.ts';

/** What the billing routes share: the `:id` parameter, the ability check, and who may see which invoice. */
export const idParam = z.object({ id: z.string() });
export const can = (req: Request) => ForbiddenError.from(req.ability);

/**
 * An invoice as the person asking may see it, or a 404: a member sees only their own, and not
 * while it is still a draft. Someone who may read no invoices at all (the brewer-on-duty) gets 403.
 */
export async function visibleInvoice(req: Request, db: Deps['db'], id: string) {
  can(req).throwUnlessCan('read', 'Invoice');
  const row = await findInvoiceRow(db, id);
  if (!row || !req.ability.can('read', subject('Invoice', { memberId: row.member_id }))) throw notFound('Invoice');
  if (row.status === 'draft' && !canAll(req.ability, 'read', 'Invoice')) throw notFound('Invoice');
  return row;
}

export function requireEveryInvoice(req: Request) {
  can(req).throwUnlessCan('read', 'Invoice');
  if (!canAll(req.ability, 'read', 'Invoice')) throw forbidden('Only the treasurer sees every member’s invoices.');
}
