import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import session from 'express-session';
import helmet from 'helmet';
import type { Deps } from './lib/deps.ts';
import { projectRoot } from './lib/project-root.ts';
import { requestLogger } from './lib/request-log.ts';
import { authenticate, csrfProtection } from './middleware/authenticate.ts';
import { inputHygiene } from './middleware/input-hygiene.ts';
import { apiNotFound, problemHandler } from './middleware/problem-handler.ts';
import { reportLateSessionErrors } from './middleware/session-errors.ts';
import { authRoutes } from './modules/auth/auth.routes.ts';
import { sessionStore } from './modules/auth/session-store.ts';
import { auditRoutes } from './modules/audit/audit.routes.ts';
import { batchesRoutes } from './modules/batches/batches.routes.ts';
import { productionRecordsRoutes } from './modules/batches/production-records.routes.ts';
import { traceReportRoutes } from './modules/batches/trace.routes.ts';
import { readingsRoutes } from './modules/batches/readings.routes.ts';
import { billingExportsRoutes } from './modules/billing/billing-exports.routes.ts';
import { billingProfileRoutes } from './modules/billing/billing-profile.routes.ts';
import { billingReportsRoutes } from './modules/billing/billing-reports.routes.ts';
import { creditNotesRoutes, invoiceCreditsRoutes } from './modules/billing/credit-notes.routes.ts';
import { invoiceRunsRoutes } from './modules/billing/invoice-runs.routes.ts';
import { invoicesRoutes } from './modules/billing/invoices.routes.ts';
import { manualChargesRoutes } from './modules/billing/manual-charges.routes.ts';
import { overpaymentsRoutes } from './modules/billing/overpayments.routes.ts';
import { paymentWebhookRoutes } from './modules/billing/payment-webhook.routes.ts';
import { paymentsRoutes } from './modules/billing/payments.routes.ts';
import { pricesRoutes } from './modules/billing/prices.routes.ts';
import { taxRatesRoutes } from './modules/billing/tax-rates.routes.ts';
import { bookingsRoutes } from './modules/bookings/bookings.routes.ts';
import { carbonationRoutes } from './modules/carbonation/carbonation.routes.ts';
import { calendarFeedPublicRoutes, calendarFeedsRoutes } from './modules/calendar/calendar-feed.routes.ts';
import { mailboxRoutes } from './modules/dev/mailbox.routes.ts';
import { equipmentRoutes } from './modules/equipment/equipment.routes.ts';
import { healthRoutes } from './modules/health/health.routes.ts';
import { kegsRoutes } from './modules/kegs/kegs.routes.ts';
import { invoiceRemindersRoutes, kegRemindersRoutes } from './modules/reminders/reminders.routes.ts';
import { sanitationCycleRoutes, sanitationReportRoutes, sanitationStatusRoutes } from './modules/sanitation/sanitation.routes.ts';
import { settingsRoutes } from './modules/settings/settings.routes.ts';
import { todayRoutes } from './modules/today/today.routes.ts';
import { transfersRoutes } from './modules/transfers/transfers.routes.ts';
import { usersRoutes } from './modules/users/users.routes.ts';

const distDir = path.join(projectRoot, 'dist', 'app');

/** Builds the Express app; never listens (main.ts does, tests use supertest). */
export function createApp(deps: Deps): Express {
  const { config, db } = deps;
  const app = express();
  app.disable('x-powered-by');
  const instance = config.INSTANCE_NAME;
  if (instance) {
    app.use((_req, res, next) => {
      res.setHeader('X-Instance', instance);
      next();
    });
  }
  if (config.TRUST_PROXY) app.set('trust proxy', /^\d+$/.test(config.TRUST_PROXY) ? Number(config.TRUST_PROXY) : config.TRUST_PROXY);

  app.use(requestLogger(config));
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          frameSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'self'"],
          ...(config.isProduction ? { upgradeInsecureRequests: [] } : {}),
        },
      },
      strictTransportSecurity: config.isProduction,
    }),
  );

  // Health answers before sessions so a load balancer's probes create none.
  app.use('/api/health', healthRoutes(deps));
  // Private calendar feeds for calendar programs: the token in the address is the credential, no session.
  app.use('/ical', calendarFeedPublicRoutes(deps));

  // Bodies: JSON everywhere except the payment webhook, which must see the raw bytes it was signed over.
  app.use('/api/webhooks', express.raw({ type: '*/*', limit: '1mb' }));
  app.use(express.json({ limit: '100kb' }));

  app.use(
    reportLateSessionErrors(
      session({
        name: 'cw.sid',
        store: sessionStore(deps),
        secret: config.sessionSecret,
        resave: false,
        saveUninitialized: false,
        rolling: true,
        cookie: { httpOnly: true, sameSite: 'lax', secure: config.cookieSecure, maxAge: 12 * 3600_000, path: '/' },
      }),
    ),
  );
  app.use(authenticate(db));
  app.use('/api', csrfProtection(config.sessionSecret, ['/webhooks/']));
  // Control characters in any text sent (body, query, address) are refused before a handler sees them.
  app.use('/api', inputHygiene);

  app.use('/api/auth', authRoutes(deps));
  app.use('/api/users', usersRoutes(deps));
  app.use('/api/today', todayRoutes(deps));
  app.use('/api/audit', auditRoutes(deps));
  app.use('/api/dev', mailboxRoutes(deps));
  app.use('/api/equipment', equipmentRoutes(deps));
  app.use('/api/bookings', bookingsRoutes(deps));
  app.use('/api/calendar-feeds', calendarFeedsRoutes(deps));
  app.use('/api/settings', settingsRoutes(deps));
  app.use('/api/batches', batchesRoutes(deps));
  app.use('/api/readings', readingsRoutes(deps));
  app.use('/api/production-records', productionRecordsRoutes(deps));
  app.use('/api/reports/trace', traceReportRoutes(deps));
  app.use('/api/invoice-runs', invoiceRunsRoutes(deps));
  app.use('/api/invoices', invoiceRemindersRoutes(deps));
  // Before the invoices' /:id, so "export" is not taken for an id.
  app.use('/api/invoices/export', billingExportsRoutes(deps));
  app.use('/api/invoices', invoicesRoutes(deps));
  app.use('/api/invoices', paymentsRoutes(deps));
  app.use('/api/invoices', invoiceCreditsRoutes(deps));
  app.use('/api/prices', pricesRoutes(deps));
  app.use('/api/tax-rates', taxRatesRoutes(deps));
  app.use('/api/manual-charges', manualChargesRoutes(deps));
  app.use('/api/billing', billingReportsRoutes(deps));
  app.use('/api/billing/overpayments', overpaymentsRoutes(deps));
  app.use('/api/billing/profile', billingProfileRoutes(deps));
  app.use('/api/credit-notes', creditNotesRoutes(deps));
  app.use('/api/webhooks', paymentWebhookRoutes(deps));
  app.use('/api/kegs', kegRemindersRoutes(deps));
  app.use('/api/sanitation-cycles', sanitationCycleRoutes(deps));
  app.use('/api/sanitation-status', sanitationStatusRoutes(deps));
  app.use('/api/reports', sanitationReportRoutes(deps));
  app.use('/api/transfers', transfersRoutes(deps));
  app.use('/api/kegs', kegsRoutes(deps));
  app.use('/api/carbonation-plans', carbonationRoutes(deps));
  app.use('/api', apiNotFound);

  // The built front end (dist/app, never the built server beside it), with client-side routes falling back to index.html.
  if (fs.existsSync(path.join(distDir, 'index.html'))) {
    app.use(express.static(distDir, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (_req, res) => res.sendFile(path.join(distDir, 'index.html')));
  }
  app.use(problemHandler);
  return app;
}
