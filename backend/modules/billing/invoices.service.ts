/**
 * Invoices: what the rest of the back end uses of them. Reads and lists live in invoice-queries.service.ts,
 * changes of an invoice in invoice-commands.service.ts, voids and credits in credit-notes.service.ts.
 */
export { findInvoiceRow, getDetail, getSummary, listInvoices, memberBalance, toSummary, type InvoiceScope } from './invoice-queries.service.ts';
export { appendToDraft, createInvoice, issueInvoice, lockInvoice, markSent, recordManualPayment, recordPayment } from './invoice-commands.service.ts';
export { refundInvoice, voidInvoice } from './credit-notes.service.ts';
