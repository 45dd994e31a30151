import { ForbiddenError } from '@casl/ability';
import { Router, type Request, type Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import {
  batchListQuerySchema,
  createBatchSchema,
  createReadingSchema,
  importQuerySchema,
  readingListQuerySchema,
  updateBatchSchema,
} from '../../../shared/schemas/batches.ts';
import type { Deps } from '../../lib/deps.ts';
import { HttpProblem, badRequest, notFound } from '../../lib/http-problem.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { batchDetail, createBatch, findVisibleBatch, listBatches, updateBatch } from './batches.service.ts';
import { coopTimeZone } from '../settings/settings.service.ts';
import { loadFermentationSettings } from './figures.ts';
import { addReading, deleteReading, listReadings } from './readings.service.ts';
import { findImportProgress, importReadings, pruneImportProgress } from './readings-import.service.ts';
import { addBatchTraceRoutes } from './trace.routes.ts';

/** Largest file one import takes (100,000 readings are about 5 MB of CSV). */
export const IMPORT_MAX_BYTES = 16 * 1024 * 1024;

const upload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: IMPORT_MAX_BYTES, files: 1, fields: 10, fieldSize: 64 * 1024, parts: 12 },
}).single('file');

const sendInFileField = 'Send the readings file in the multipart form field “file”.';

/** Receives the upload; a malformed, cut-short or oversized form is a 400 or 413 problem in our words. */
function receiveFile(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) =>
    upload(req, res, (err: unknown) => {
      if (!err) return resolve();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') {
          return reject(
            new HttpProblem(
              413,
              'File too large',
              `One import takes a file of at most ${IMPORT_MAX_BYTES / 1024 / 1024} MiB; split the readings into smaller files.`,
            ),
          );
        }
        if (err.code === 'LIMIT_UNEXPECTED_FILE')
          return reject(badRequest(`A file came in the form field “${String(err.field ?? '').slice(0, 60)}”. ${sendInFileField}`));
        if (err.code === 'LIMIT_FILE_COUNT') return reject(badRequest(`Send one file only. ${sendInFileField}`));
        return reject(badRequest(`The upload has more form fields or larger ones than an import takes. ${sendInFileField}`));
      }
      // Busboy's own errors: no boundary, a body cut short, a malformed part.
      return reject(badRequest(`The upload is not a complete multipart form (it is cut short or malformed). ${sendInFileField}`));
    }),
  );
}

const progressIdSchema = z.uuid('progressId must be a uuid').optional();

export function batchesRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Batch', readingId: 'Reading', progressId: 'Import' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    const q = batchListQuerySchema.parse(req.query);
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Batch');
    res.json(await listBatches(db, req.ability, userOf(req), q));
  });

  router.post('/', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('create', 'Batch');
    const input = createBatchSchema.parse(req.body ?? {});
    const row = await createBatch(db, req.ability, input, userOf(req), clock.now());
    res.status(201).json({ batch: await batchDetail(db, req.ability, row, clock.now()) });
  });

  router.get('/:id', async (req, res) => {
    const row = await findVisibleBatch(db, req.ability, req.params.id);
    const detail = await batchDetail(db, req.ability, row, clock.now());
    // The batch's fields at the top level, and under `batch` like the other batch answers.
    res.json({ ...detail, batch: detail });
  });

  router.patch('/:id', async (req, res) => {
    const row = await findVisibleBatch(db, req.ability, req.params.id);
    ForbiddenError.from(req.ability).throwUnlessCan('update', subject('Batch', { ownerId: row.owner_id }));
    const input = updateBatchSchema.parse(req.body ?? {});
    const updated = await updateBatch(db, row, input, userOf(req), clock.now());
    res.json({ batch: await batchDetail(db, req.ability, updated, clock.now()) });
  });

  router.get('/:id/readings', async (req, res) => {
    const q = readingListQuerySchema.parse(req.query);
    const row = await findVisibleBatch(db, req.ability, req.params.id);
    ForbiddenError.from(req.ability).throwUnlessCan('read', subject('Reading', { ownerId: row.owner_id }));
    res.json(await listReadings(db, row.id, q));
  });

  router.post('/:id/readings', async (req, res) => {
    const row = await findVisibleBatch(db, req.ability, req.params.id);
    ForbiddenError.from(req.ability).throwUnlessCan('create', subject('Reading', { ownerId: row.owner_id }));
    const input = createReadingSchema.parse(req.body ?? {});
    const settings = await loadFermentationSettings(db);
    const reading = await addReading(db, row, input, settings, userOf(req), clock.now());
    res.status(201).json({ reading });
  });

  router.delete('/:id/readings/:readingId', async (req, res) => {
    const row = await findVisibleBatch(db, req.ability, req.params.id);
    ForbiddenError.from(req.ability).throwUnlessCan('delete', subject('Reading', { ownerId: row.owner_id }));
    const settings = await loadFermentationSettings(db);
    await deleteReading(db, row, req.params.readingId, settings, userOf(req));
    res.status(204).end();
  });

  router.post('/:id/readings/import', async (req, res) => {
    const { dryRun } = importQuerySchema.parse(req.query);
    // Who may import is settled before the upload is read.
    const row = await findVisibleBatch(db, req.ability, req.params.id);
    ForbiddenError.from(req.ability).throwUnlessCan('import', subject('Reading', { ownerId: row.owner_id }));
    await receiveFile(req, res);
    const file = req.file;
    if (!file) throw badRequest(sendInFileField);
    const body = (req.body ?? {}) as Record<string, unknown>;
    const progressId = progressIdSchema.parse(typeof body.progressId === 'string' && body.progressId ? body.progressId : req.query.progressId);
    const mappingField = typeof body.mapping === 'string' ? body.mapping : body.mapping !== undefined ? JSON.stringify(body.mapping) : undefined;
    const [settings, timeZone] = await Promise.all([loadFermentationSettings(db), coopTimeZone(db)]);
    const now = clock.now();
    void pruneImportProgress(db, now).catch(() => undefined);
    const result = await importReadings(db, { batch: row, file, mappingField, dryRun, progressId, actor: userOf(req), settings, timeZone, now });
    res.json(result);
  });

  addBatchTraceRoutes(router, { db, clock });

  router.get('/:id/readings/import/progress/:progressId', async (req, res) => {
    const row = await findVisibleBatch(db, req.ability, req.params.id);
    const id = z.uuid().safeParse(req.params.progressId);
    if (!id.success) throw notFound('Import');
    const progress = await findImportProgress(db, { id: id.data, userId: userOf(req).id, batchId: row.id });
    if (!progress) throw notFound('Import');
    res.json({ progress });
  });

  return router;
}
