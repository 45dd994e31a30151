import { ForbiddenError } from '@casl/ability';
import { Router, type Request } from 'express';
import { z } from 'zod';
import { subject, type Action } from '../../../shared/permissions/ability.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { forbidden, notFound } from '../../lib/http-problem.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser } from '../../middleware/authenticate.ts';
import { findInvoiceRow } from './invoice-queries.service.ts';

/** What the billing routes share: the `:id` parameter, the ability check, and who may see which invoice. */
export const idParam = z.object({ id: z.string() });
export const can = (req: Request) => ForbiddenError.from(req.ability);

/** A router for signed-in people whose id parameters are checked as UUIDs (`uuidParams`) before any handler runs. */
export function signedInRouter(ids: Record<string, string> = {}): Router {
  const router = Router();
  uuidParams(router, ids);
  router.use(requireUser);
  return router;
}

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

/**
 * A change to the invoice named by `:id`, in the order its answers take: the caller may make such changes
 * at all (else 403), the body is valid (else 422), the invoice is one they see (else 404), and they may
 * make the change for its member (else 403).
 */
export async function invoiceChange<T>(
  req: Request,
  db: Deps['db'],
  may: [Action, 'Invoice' | 'Payment' | 'CreditNote'],
  body: z.ZodType<T>,
  forMember: [Action, 'Invoice' | 'Payment' | 'CreditNote'],
): Promise<{ row: Awaited<ReturnType<typeof visibleInvoice>>; input: T }> {
  const { id } = idParam.parse(req.params);
  can(req).throwUnlessCan(...may);
  const input = body.parse(req.body ?? {});
  const row = await visibleInvoice(req, db, id);
  can(req).throwUnlessCan(forMember[0], subject(forMember[1], { memberId: row.member_id }));
  return { row, input };
}
