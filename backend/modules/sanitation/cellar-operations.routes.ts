import type { Express } from 'express';
import type { Deps } from '../../lib/deps.ts';
import { carbonationRoutes } from '../carbonation/carbonation.routes.ts';
import { kegsRoutes } from '../kegs/kegs.routes.ts';
import { transfersRoutes } from '../transfers/transfers.routes.ts';
import { sanitationCycleRoutes, sanitationReportRoutes, sanitationStatusRoutes } from './sanitation.routes.ts';

/** Cellar operations' routes: sanitation log and audit, transfers, kegs, carbonation plans. */
export function mountCellarOperations(app: Express, deps: Deps): void {
  app.use('/api/sanitation-cycles', sanitationCycleRoutes(deps));
  app.use('/api/sanitation-status', sanitationStatusRoutes(deps));
  app.use('/api/reports', sanitationReportRoutes(deps));
  app.use('/api/transfers', transfersRoutes(deps));
  app.use('/api/kegs', kegsRoutes(deps));
  app.use('/api/carbonation-plans', carbonationRoutes(deps));
}
