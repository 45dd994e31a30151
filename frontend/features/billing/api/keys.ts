import type { InvoiceListQuery } from '../../../../shared/schemas/billing.ts';

/** Every billing query hangs under ['billing']; a change to money invalidates it all. */
export const billingKeys = {
  all: ['billing'] as const,
  invoices: () => [...billingKeys.all, 'invoices'] as const,
  invoiceList: (query: InvoiceListQuery) => [...billingKeys.invoices(), 'list', query] as const,
  invoice: (id: string) => [...billingKeys.invoices(), 'detail', id] as const,
  summary: () => [...billingKeys.all, 'summary'] as const,
  ageing: (asOf?: string) => [...billingKeys.all, 'ageing', asOf ?? 'today'] as const,
  runs: () => [...billingKeys.all, 'runs'] as const,
  preview: (period: string) => [...billingKeys.all, 'preview', period] as const,
  prices: () => [...billingKeys.all, 'prices'] as const,
  profile: () => [...billingKeys.all, 'profile'] as const,
  manualCharges: (period?: string) => [...billingKeys.all, 'manual-charges', period ?? 'all'] as const,
  balance: (memberId?: string) => [...billingKeys.all, 'balance', memberId ?? 'me'] as const,
  reminders: () => [...billingKeys.all, 'reminders'] as const,
  openOverpayments: () => [...billingKeys.all, 'overpayments', 'open'] as const,
};
