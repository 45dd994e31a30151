import type { AppAbility, SubjectName } from '../../shared/permissions/ability.ts';
import { paths } from '@/config/paths';
import { canOnEvery } from '@/lib/ability';

export interface NavEntry {
  key: string;
  label: string;
  to: string;
  /** Built and usable. Entries that are not ready never show, whatever the ability says. */
  ready: boolean;
  /** Who may see it; the server still checks every request. */
  allowed: (ability: AppAbility) => boolean;
  /** Only exact matches count as "current" (for the index route). */
  end?: boolean;
  /** Shown indented under this entry. */
  children?: NavEntry[];
}

type Allowed = NavEntry['allowed'];
type More = Pick<NavEntry, 'end' | 'children'>;
/** An entry that is built and usable, with what else it needs (`end`, `children`). */
const entry = (key: string, label: string, to: string, allowed: Allowed, more: More = {}): NavEntry => ({ key, label, to, ready: true, allowed, ...more });
/** Whoever may read this kind of record. */
const reads =
  (name: SubjectName): Allowed =>
  (a) =>
    a.can('read', name);

/**
 * The main navigation, in its fixed order. Members is for whoever may update every User without
 * conditions (the admin): a member or brewer may update only themself, so `can('update', 'User')`
 * alone would be true for them too. The Outbox is the development mailbox (admin: `read Mailbox`).
 */
export const mainNav: NavEntry[] = [
  entry('today', 'Today', paths.today, () => true, { end: true }),
  entry('cellar', 'Cellar', paths.cellar, reads('Equipment')),
  entry('bookings', 'Bookings', paths.bookings, reads('Booking')),
  entry('batches', 'Batches', paths.batches, reads('Batch'), {
    children: [
      entry('production-records', 'Production records', paths.productionRecords, reads('ProductionRecord')),
      entry('trace-report', 'Trace report', paths.traceReport, reads('Batch')),
    ],
  }),
  entry('kegs', 'Kegs', paths.kegs, reads('Keg')),
  entry('sanitation', 'Sanitation', paths.sanitation, reads('SanitationCycle')),
  entry('billing', 'Billing', paths.billing, reads('Invoice')),
  entry('members', 'Members', paths.members, (a) => canOnEvery(a, 'update', 'User'), {
    end: true,
    children: [entry('outbox', 'Outbox', paths.outbox, reads('Mailbox'))],
  }),
  entry('settings', 'Settings', paths.settings, (a) => a.can('update', 'Setting'), {
    children: [entry('audit', 'Audit trail', paths.audit, reads('AuditLog'))],
  }),
];

export const accountNav: NavEntry[] = [entry('profile', 'Profile', paths.profile, () => true)];

/** The entries a person sees: ready, allowed, and (for the outbox) available on this server. */
export function visibleNav(entries: NavEntry[], ability: AppAbility, hidden: ReadonlySet<string> = new Set()): NavEntry[] {
  return entries
    .filter((entry) => entry.ready && !hidden.has(entry.key) && entry.allowed(ability))
    .map((entry) => {
      if (!entry.children) return entry;
      const { children, ...rest } = entry;
      const shown = visibleNav(children, ability, hidden);
      return shown.length ? { ...rest, children: shown } : rest;
    });
}
