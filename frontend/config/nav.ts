import type { AppAbility } from '../../shared/permissions/ability.ts';
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

/**
 * The main navigation, in its fixed order. Members is for whoever may update every User without
 * conditions (the admin): a member or brewer may update only themself, so `can('update', 'User')`
 * alone would be true for them too. The Outbox is the development mailbox (admin: `read Mailbox`).
 */
export const mainNav: NavEntry[] = [
  { key: 'today', label: 'Today', to: paths.today, ready: true, end: true, allowed: () => true },
  { key: 'cellar', label: 'Cellar', to: paths.cellar, ready: true, allowed: (a) => a.can('read', 'Equipment') },
  { key: 'bookings', label: 'Bookings', to: paths.bookings, ready: true, allowed: (a) => a.can('read', 'Booking') },
  {
    key: 'batches',
    label: 'Batches',
    to: paths.batches,
    ready: true,
    allowed: (a) => a.can('read', 'Batch'),
    children: [
      {
        key: 'production-records',
        label: 'Production records',
        to: paths.productionRecords,
        ready: true,
        allowed: (a) => a.can('read', 'ProductionRecord'),
      },
      { key: 'trace-report', label: 'Trace report', to: paths.traceReport, ready: true, allowed: (a) => a.can('read', 'Batch') },
    ],
  },
  { key: 'kegs', label: 'Kegs', to: paths.kegs, ready: true, allowed: (a) => a.can('read', 'Keg') },
  {
    key: 'sanitation',
    label: 'Sanitation',
    to: paths.sanitation,
    ready: true,
    allowed: (a) => a.can('read', 'SanitationCycle'),
  },
  { key: 'billing', label: 'Billing', to: paths.billing, ready: true, allowed: (a) => a.can('read', 'Invoice') },
  {
    key: 'members',
    label: 'Members',
    to: paths.members,
    ready: true,
    end: true,
    allowed: (a) => canOnEvery(a, 'update', 'User'),
    children: [{ key: 'outbox', label: 'Outbox', to: paths.outbox, ready: true, allowed: (a) => a.can('read', 'Mailbox') }],
  },
  {
    key: 'settings',
    label: 'Settings',
    to: paths.settings,
    ready: true,
    allowed: (a) => a.can('update', 'Setting'),
    children: [{ key: 'audit', label: 'Audit trail', to: paths.audit, ready: true, allowed: (a) => a.can('read', 'AuditLog') }],
  },
];

export const accountNav: NavEntry[] = [{ key: 'profile', label: 'Profile', to: paths.profile, ready: true, allowed: () => true }];

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
