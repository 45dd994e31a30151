import { describe, expect, it } from 'vitest';
import { defineAbilityFor, subject, type Action, type SubjectName } from '../ability.ts';
import type { Role } from '../roles.ts';

const me = 'user-me';
const other = 'user-other';
const actor = (...roles: Role[]) => ({ id: me, roles });

type Case = [action: Action, subj: SubjectName, facts: Record<string, string> | null, expected: Record<Role, boolean>];
const all = (v: boolean): Record<Role, boolean> => ({ member: v, brewer_on_duty: v, treasurer: v, admin: v });
const only = (...roles: Role[]): Record<Role, boolean> => ({ ...all(false), ...Object.fromEntries(roles.map((r) => [r, true])) });

// One row per rule of PRODUCT.md's roles; `facts` null means "any record of that kind".
const table: Case[] = [
  ['read', 'Equipment', null, all(true)],
  ['create', 'Equipment', null, only('admin')],
  ['delete', 'Equipment', null, only('admin')],
  ['update', 'Equipment', null, only('brewer_on_duty', 'admin')],
  ['read', 'Booking', { ownerId: other }, all(true)], // the calendar shows others' bookings as taken
  ['readOwner', 'Booking', { ownerId: other }, only('brewer_on_duty', 'treasurer', 'admin')],
  ['readOwner', 'Booking', { ownerId: me }, all(true)],
  ['create', 'Booking', { ownerId: me }, only('member', 'admin')],
  ['create', 'Booking', { ownerId: other }, only('admin')],
  ['cancel', 'Booking', { ownerId: me }, only('member', 'admin')],
  ['cancel', 'Booking', { ownerId: other }, only('admin')],
  ['create', 'Batch', null, only('member', 'admin')],
  ['read', 'Batch', { ownerId: me }, all(true)],
  ['read', 'Batch', { ownerId: other }, only('brewer_on_duty', 'treasurer', 'admin')],
  ['update', 'Batch', { ownerId: other }, only('admin')],
  ['create', 'Reading', { ownerId: me }, only('member', 'brewer_on_duty', 'admin')],
  ['create', 'Reading', { ownerId: other }, only('brewer_on_duty', 'admin')],
  ['import', 'Reading', { ownerId: other }, only('brewer_on_duty', 'admin')],
  ['delete', 'Reading', { ownerId: me }, only('member', 'brewer_on_duty', 'admin')],
  ['delete', 'Reading', { ownerId: other }, only('brewer_on_duty', 'admin')],
  ['read', 'ProductionRecord', { memberId: other }, only('brewer_on_duty', 'treasurer', 'admin')],
  ['create', 'SanitationCycle', null, only('brewer_on_duty', 'admin')],
  ['read', 'SanitationCycle', null, only('brewer_on_duty', 'treasurer', 'admin')],
  ['create', 'Transfer', null, only('brewer_on_duty', 'admin')],
  ['checkout', 'Keg', { memberId: other }, only('brewer_on_duty', 'admin')],
  ['read', 'Keg', { memberId: me }, all(true)],
  ['read', 'CarbonationPlan', { memberId: me }, all(true)],
  ['update', 'CarbonationPlan', { memberId: me }, only('brewer_on_duty', 'admin')],
  ['read', 'SanitationAudit', null, only('brewer_on_duty', 'treasurer', 'admin')],
  ['export', 'ProductionRecord', null, only('brewer_on_duty', 'treasurer', 'admin')],
  ['read', 'Invoice', { memberId: me }, only('member', 'treasurer', 'admin')],
  ['read', 'Invoice', { memberId: other }, only('treasurer', 'admin')],
  ['pay', 'Invoice', { memberId: me }, only('member', 'treasurer', 'admin')],
  ['send', 'Invoice', { memberId: other }, only('treasurer', 'admin')],
  ['run', 'InvoiceRun', null, only('treasurer', 'admin')],
  ['export', 'Invoice', null, only('treasurer', 'admin')],
  ['create', 'Payment', { memberId: other }, only('treasurer', 'admin')],
  ['read', 'Payment', { memberId: me }, only('member', 'treasurer', 'admin')],
  ['create', 'CreditNote', { memberId: other }, only('treasurer', 'admin')],
  ['update', 'PriceList', null, only('treasurer', 'admin')],
  ['update', 'Setting', null, only('admin')],
  ['read', 'Setting', null, only('brewer_on_duty', 'treasurer', 'admin')],
  ['create', 'User', null, only('admin')],
  ['manage', 'User', null, only('admin')],
  ['update', 'User', { id: me }, all(true)],
  ['update', 'User', { id: other }, only('admin')],
  ['read', 'User', { id: other }, only('brewer_on_duty', 'treasurer', 'admin')],
  ['read', 'AuditLog', null, only('admin')],
  ['read', 'Mailbox', null, only('admin')],
];

describe('the shared ability definition, role by role', () => {
  for (const [action, subj, facts, expected] of table) {
    for (const role of Object.keys(expected) as Role[]) {
      it(`${role} ${expected[role] ? 'may' : 'may not'} ${action} ${subj}${facts ? ` ${JSON.stringify(facts)}` : ''}`, () => {
        const ability = defineAbilityFor(actor(role));
        const target = facts ? subject(subj, { ...facts } as never) : subj;
        expect(ability.can(action, target as never)).toBe(expected[role]);
      });
    }
  }

  it('denies everything to nobody', () => {
    const ability = defineAbilityFor(null);
    for (const [action, subj] of table) expect(ability.can(action, subj)).toBe(false);
  });

  it('adds up the rules of several roles', () => {
    const ability = defineAbilityFor(actor('member', 'brewer_on_duty'));
    expect(ability.can('create', subject('Booking', { ownerId: me }))).toBe(true);
    expect(ability.can('create', 'SanitationCycle')).toBe(true);
    expect(ability.can('read', subject('Invoice', { memberId: other }))).toBe(false);
  });

  it('keeps invoice amounts from the brewer-on-duty', () => {
    const ability = defineAbilityFor(actor('brewer_on_duty'));
    for (const s of ['Invoice', 'Payment', 'CreditNote', 'Charge', 'PriceList', 'InvoiceRun'] as const) {
      expect(ability.can('read', s)).toBe(false);
    }
  });
});
