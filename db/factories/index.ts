/**
 * Typed factories over the Kysely `Database` (or a transaction): tests, benchmarks and seeds make
 * the records they need with these. Each takes `(db, overrides)`, fills sensible defaults (the next
 * free equipment code, e-mails unique within the process, example.org addresses only), inserts, and returns the
 * typed row with its id. They never read the clock: every time is a parameter (`at`, `now`,
 * `startsAt`, `readyAt`, `today`, …) or, where nobody asked, the fixed LONG_AGO (2026-01-01).
 * Multi-row factories run in the caller's transaction, or in their own when given the database.
 *
 * Accounts (users.ts)
 *   createUser(db, { email?, name?, roles? = ['member'], units?, isActive?, password? = 'cellar-demo' | null, createdAt?, id? }) → app_user row
 *   createMember(db, same)                       — a member (`member.<n>@example.org`)
 * Equipment (equipment.ts)
 *   createEquipment(db, kind, { code?, name?, capacityLiters?, attributes?, state?, notes?, at?, actorId?, id? }) → equipment row
 *     defaults: the kind's next free code (F-05, K-013, …), 30 L fermenter / 19 L keg, the kind's attributes (checked with
 *     shared/schemas/equipment.ts), state `needs_cleaning` for fermenters and kegs, `ready` for taps and cylinders
 *   createFermenter / createKeg / createTap / createCo2Cylinder(db, overrides)
 *   setEquipmentState(db, equipmentId, state, { at, reason?, actorId? })   — state + history row at `at`
 * Bookings (bookings.ts)
 *   createBooking(db, { startsAt, endsAt, equipmentId?, ownerId?, batchId?, state?, now?, bufferHours?, notes?, createdAt?, cancelledAt? })
 *     blocked_until = endsAt + the co-op's cleaning buffer; state from `now` when given, else `booked`
 * Batches and readings (batches.ts)
 *   createBatch(db, { ownerId?, name?, style?, volumeLiters?, targetOg?, targetFg?, status?, discardedAt?, createdAt?, allergens?, shelfLifeDays?,
 *                     readings?: [{ takenAt, value, unit? = 'sg', temperatureC?, correctTemperature?, note?, source?, method?, confirm? }],
 *                     fermenter?: { equipmentId, startsAt, endsAt, now? } }) → batch row + readings + bookingId
 *     readings are normalised to SG exactly as the readings service does; a fermenter books it and sets it `holding`
 *   addReadings(db, batchId, readings, { actorId? }) → reading rows
 * Sanitation (sanitation.ts)
 *   createSanitationCycle(db, { equipmentId, readyAt | steps, until? = 'ready' | 'cleaned', recordedBy?, notes?, createdAt? })
 *     → cycle row + steps + evaluation; evaluated by the co-op's rules, fresh_until set, the vessel's state
 *     changed at the cycle's end with a history row; steps the API would refuse throw (give a step that breaks an
 *     exceptable rule an `exceptionReason` to record it as an exception, as the checklist does)
 *   cycleSteps(readyAt, { until?, performedBy? })  — the checklist steps of a good cycle ending at readyAt (for the API too)
 * Transfers and kegs (transfers.ts, kegs.ts)
 *   createTransfer(db, { batchId, fromEquipmentId, kegIds, at, kegVolumesLiters? | volumeLiters?, lossLiters?, recordedBy?,
 *                        sanitizeKegs? = true, whereabouts? = 'cellar', co2Grams?, finings?, notes?,
 *                        startedAt? = at − 40 min | null, unstableGravityReason?, dissolvedOxygenPpb?, kegDissolvedOxygenPpb? }) → { transfer, fills }
 *     kegs without a fresh cycle at `at` get one an hour before; kegs `holding`, fermenter `needs_cleaning`, batch packaged;
 *     `at` is the end (ended_at = transferred_at); the stable-gravity guard is the service's, not applied here;
 *     each fill's best_before from the batch's shelf life (backend/modules/batches/shelf-life.ts)
 *   fillKeg(db, { kegId, at, batchId?, ownerId?, fromEquipmentId?, volumeLiters? = 18, recordedBy?, whereabouts? })
 *     → { transfer, fills, batchId, fermenterId } — a one-keg transfer, making a batch (OG 1.050 → 1.010) and fermenter if not given
 *   createKegCheckout(db, { kegId, memberId, at, dueAt, actorId?, note? }) → keg_whereabouts row (+ movement)
 * Billing (billing.ts)
 *   createPrice(db, { item, bandMaxLiters?, unitCents, effectiveFrom, note?, createdBy?, createdAt? })
 *   createTaxRate(db, { rateBp, effectiveFrom, label? = 'VAT' })
 *   createManualCharge(db, { memberId, period, amountCents, description?, reason?, taxable?, createdBy?, createdAt? })
 *   createInvoice(db, { memberId, period, today, issue? = true, actorId?, at? = noon UTC on today }) → invoice row + lines
 *     the real charge sources for that member and period, priced, then issued on `today` (a draft with issue: false)
 *   createInvoicePayment(db, { invoiceId, amountCents, receivedOn, method? = 'bank_transfer', reference?, note?, actorId, at? = noon UTC on receivedOn })
 *     → payment — received by hand on an issued invoice, whole or part (a part payment leaves it issued)
 * Settings (settings.ts)
 *   setSetting(db, key, patch)                    — merge fields into a settings section (e.g. booking_rules)
 * Inspections and CO2 cylinders (inspections.ts)
 *   createInspection(db, { equipmentId, kind, at, passed? = true, nextDueAt? (a year after `at` when passed), note?, recordedBy? })
 *   setCylinderSupply(db, { cylinderId, remainingKg, connected? = false, at })   — contents; `connected` puts it on the gas line
 * Audit trail (audit.ts)
 *   createAuditEntry(db, { at, action? = 'updated', subjectType? = 'Batch', subjectId?, actorId?, detail? }) → audit_log row
 * Shared (common.ts)
 *   DEMO_PASSWORD, LONG_AGO, MINUTE, HOUR, DAY, addMs(at, ms), noonOf(day)
 */
export * from './common.ts';
export * from './users.ts';
export * from './equipment.ts';
export * from './bookings.ts';
export * from './batches.ts';
export * from './sanitation.ts';
export * from './transfers.ts';
export * from './kegs.ts';
export * from './billing.ts';
export * from './settings.ts';
export * from './inspections.ts';
export * from './audit.ts';
