import { AbilityBuilder, createMongoAbility, type ForcedSubject, type MongoAbility } from '@casl/ability';
import type { Actor, Role } from './roles.ts';

/**
 * The whole permission policy of Cellarwright, for every role and every subject.
 * The server builds one ability per request from this file and checks every route through it;
 * the client builds the same ability to hide what a person may not do. Nothing is allowed unless
 * a rule below allows it.
 */
export const actions = [
  'manage', // any action
  'create',
  'read',
  'update',
  'delete',
  'cancel', // bookings
  'readOwner', // see who holds a booking / keg
  'import', // readings from files
  'checkout', // kegs out to members and back
  'pay', // invoices, online
  'send', // invoices by e-mail
  'export', // ledgers and records for the accountant or the licensing office
  'run', // invoice runs
  'remind', // overdue invoices and kegs, by e-mail
] as const;
export type Action = (typeof actions)[number];

type OwnedFacts = { ownerId: string };
type MemberFacts = { memberId: string };
type UserFacts = { id: string };
type FeedFacts = { ownerId: string; kind: 'member' | 'rota' };

export const subjectNames = [
  'User',
  'AuditLog',
  'Mailbox',
  'Setting',
  'Equipment',
  'Booking',
  'Batch',
  'Reading',
  'SanitationCycle',
  'Transfer',
  'Keg',
  'CarbonationPlan',
  'SanitationAudit',
  'ProductionRecord',
  'PriceList',
  'Charge',
  'InvoiceRun',
  'Invoice',
  'Payment',
  'CreditNote',
  'CalendarFeed',
] as const;
export type SubjectName = (typeof subjectNames)[number];

export type Subjects =
  | 'all'
  | SubjectName
  | (UserFacts & ForcedSubject<'User'>)
  | (OwnedFacts & ForcedSubject<'Booking'>)
  | (OwnedFacts & ForcedSubject<'Batch'>)
  | (OwnedFacts & ForcedSubject<'Reading'>)
  | (MemberFacts & ForcedSubject<'Keg'>)
  | (MemberFacts & ForcedSubject<'CarbonationPlan'>)
  | (MemberFacts & ForcedSubject<'Invoice'>)
  | (MemberFacts & ForcedSubject<'Payment'>)
  | (MemberFacts & ForcedSubject<'CreditNote'>)
  | (MemberFacts & ForcedSubject<'Charge'>)
  | (FeedFacts & ForcedSubject<'CalendarFeed'>);

export type AppAbility = MongoAbility<[Action, Subjects]>;
type Builder = AbilityBuilder<AppAbility>;

/** Cellar records anyone who keeps the books may read but never change. */
const cellarRecords: SubjectName[] = ['Equipment', 'Booking', 'Batch', 'Reading', 'SanitationCycle', 'Transfer', 'Keg', 'CarbonationPlan'];

const rolePermissions: Record<Role, (actor: Actor, b: Builder) => void> = {
  member: (actor, { can }) => {
    const own = { ownerId: actor.id };
    const mine = { memberId: actor.id };
    can('read', 'User', { id: actor.id });
    can('update', 'User', { id: actor.id });
    can('read', 'Equipment');
    // Everyone sees the calendar; only their own bookings show who holds them.
    can('read', 'Booking');
    can(['create', 'cancel', 'readOwner'], 'Booking', own);
    can('create', 'Batch');
    can(['read', 'update'], 'Batch', own);
    can(['create', 'read', 'import', 'delete'], 'Reading', own); // delete: a mistyped reading
    can('read', 'Keg', mine);
    can('read', 'CarbonationPlan', mine);
    can('read', ['Invoice', 'Payment', 'CreditNote', 'Charge'], mine);
    can('pay', 'Invoice', mine);
    can('read', 'ProductionRecord', mine);
    can(['read', 'update'], 'CalendarFeed', { ownerId: actor.id, kind: 'member' });
  },
  brewer_on_duty: (actor, { can }) => {
    can(['read', 'update'], 'User', { id: actor.id });
    can('read', 'User'); // names on the rota, keg check-out to a member
    can('read', 'Equipment');
    can('update', 'Equipment'); // state changes, not the registry's details (see below)
    can(['read', 'readOwner'], 'Booking');
    can('read', 'Batch');
    can(['create', 'read', 'import', 'delete'], 'Reading');
    can(['create', 'read'], 'SanitationCycle');
    can(['create', 'read'], 'Transfer');
    can(['read', 'checkout', 'readOwner', 'remind'], 'Keg');
    can(['create', 'read', 'update'], 'CarbonationPlan');
    can('read', 'SanitationAudit');
    can(['read', 'export'], 'ProductionRecord');
    can('read', 'Setting');
    can(['read', 'update'], 'CalendarFeed', { ownerId: actor.id }); // their own and the rota's
  },
  treasurer: (actor, { can }) => {
    can('update', 'User', { id: actor.id });
    can('read', 'User');
    can('read', cellarRecords);
    can(['read', 'readOwner'], ['Booking', 'Keg']);
    can('read', 'SanitationAudit');
    can(['read', 'export'], 'ProductionRecord');
    can('manage', ['PriceList', 'Charge', 'InvoiceRun', 'Invoice', 'Payment', 'CreditNote']);
    can('read', 'Setting');
  },
  admin: (_actor, { can }) => {
    can('manage', 'all');
  },
};

export function defineAbilityFor(actor: Actor | null | undefined): AppAbility {
  const builder = new AbilityBuilder<AppAbility>(createMongoAbility);
  if (actor) {
    for (const role of new Set(actor.roles)) rolePermissions[role](actor, builder);
    // A brewer-on-duty changes equipment states but not the registry itself.
    if (!actor.roles.includes('admin')) {
      builder.cannot(['create', 'delete'], 'Equipment');
    }
  }
  return builder.build();
}

export { subject } from '@casl/ability';
