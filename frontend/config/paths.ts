/** Every URL the client builds comes from here. */
export const paths = {
  today: '/',
  profile: '/profile',
  login: '/login',
  forgotPassword: '/forgot-password',
  resetPassword: '/reset-password',
  invitation: '/invitation',
  unlock: '/unlock',
  members: '/members',
  outbox: '/members/outbox',
  // Screens still to come; their nav entries stay hidden until `ready`.
  cellar: '/cellar',
  bookings: '/bookings',
  batches: '/batches',
  productionRecords: '/production-records',
  traceReport: '/trace-report',
  kegs: '/kegs',
  sanitation: '/sanitation',
  billing: '/billing',
  billingInvoices: '/billing/invoices',
  billingRun: '/billing/run',
  billingPrices: '/billing/prices',
  billingExports: '/billing/exports',
  myInvoices: '/billing/my-invoices',
  settings: '/settings',
  audit: '/audit',
} as const;

export const invoiceHref = (id: string) => `${paths.billingInvoices}/${id}`;
export const myInvoiceHref = (id: string) => `${paths.myInvoices}/${id}`;

export function loginHref(next?: string): string {
  if (!next || next === paths.today) return paths.login;
  return `${paths.login}?${new URLSearchParams({ next })}`;
}

/** The pages a detail or report page sits under: the crumb back above its title. */
export const parentPages = {
  batches: { to: paths.batches, label: 'Batches' },
  cellar: { to: paths.cellar, label: 'Cellar' },
  kegs: { to: paths.kegs, label: 'Kegs' },
} as const;
