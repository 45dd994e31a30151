import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { allergenSuggestions } from '../../../../shared/cellar/trace.ts';
import type { BatchDetail } from '../../../../shared/schemas/batches.ts';
import type { Booking } from '../../../../shared/schemas/booking.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog, DialogActions } from '@/components/ui/dialog';
import { Field, InputField, SelectField } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { useCreateBatch, useUpdateBatch } from '@/features/batches/api/save-batch';
import { useUnits } from '@/hooks/use-units';
import { api } from '@/lib/api-client';
import { fromDisplay, toDisplay } from '@/lib/units';
import { formatDate } from '@/utils/format';
import { applyProblemToForm } from '@/utils/problem-form';
import { bookingKeys } from '@/features/bookings/api/keys';

/** What the form holds: the volume in the person's units, gravities as typed. */
const formSchema = z
  .object({
    name: z.string().trim().min(1, 'Name the batch').max(120, 'Keep the name under 120 characters'),
    style: z.string().trim().max(80, 'Keep the style under 80 characters'),
    volume: z.number({ error: 'Enter the volume' }).positive('The volume must be above 0'),
    targetOg: z.number().min(0.98, 'From 0.980 to 1.200').max(1.2, 'From 0.980 to 1.200').nullable(),
    targetFg: z.number().min(0.98, 'From 0.980 to 1.200').max(1.2, 'From 0.980 to 1.200').nullable(),
    notes: z.string().max(4000, 'Keep the notes under 4,000 characters'),
    /** Comma-separated allergen notes. */
    allergens: z.string().max(1200, 'Keep the allergen notes shorter'),
    shelfLifeDays: z.number().int('Whole days').min(1, 'At least 1 day').max(3650, 'At most 10 years').nullable(),
    bookingId: z.string(),
  })
  .refine((v) => v.targetOg == null || v.targetFg == null || v.targetFg < v.targetOg, {
    path: ['targetFg'],
    message: 'The target FG must be below the target OG',
  });
type FormValues = z.infer<typeof formSchema>;

const numberOrNull = (v: unknown) =>
  v === '' || v === null || v === undefined || Number.isNaN(v) ? null : typeof v === 'number' ? v : typeof v === 'string' ? Number(v.replace(',', '.')) : NaN;

function useFermenterBookings(ownerId: string | undefined, mine: boolean) {
  return useQuery({
    queryKey: bookingKeys.fermentersForBatch(ownerId),
    queryFn: ({ signal }) =>
      api.get<Page<Booking>>('/api/bookings', {
        query: { kind: 'fermenter', pageSize: 100, sort: 'startsAt', order: 'desc', ...(mine ? { mine: 1 } : { ownerId }) },
        signal,
      }),
  });
}

export interface BatchFormDialogProps {
  open: boolean;
  onClose: () => void;
  /** Editing this batch; creating a new one without it. */
  batch?: BatchDetail;
  onSaved: (batch: BatchDetail) => void;
}

const BatchForm = ({ batch, onClose, onSaved, onBusy }: Omit<BatchFormDialogProps, 'open'> & { onBusy: (b: boolean) => void }) => {
  const units = useUnits();
  const create = useCreateBatch();
  const update = useUpdateBatch(batch?.id ?? '');
  const saving = create.isPending || update.isPending;
  useEffect(() => onBusy(saving), [saving, onBusy]);
  const [formError, setFormError] = useState<string | null>(null);
  const bookings = useFermenterBookings(batch?.ownerId, !batch);
  const linked = batch?.bookings[0]?.id ?? '';
  const {
    register,
    handleSubmit,
    setError,
    getValues,
    setValue,
    formState: { errors },
  } = useForm<FormValues>({
    resolver: zodResolver(formSchema),
    defaultValues: {
      name: batch?.name ?? '',
      style: batch?.style ?? '',
      volume: batch ? Math.round(toDisplay.volume(batch.volumeLiters, units.units) * 100) / 100 : undefined,
      targetOg: batch?.targetOg ?? null,
      targetFg: batch?.targetFg ?? null,
      notes: batch?.notes ?? '',
      allergens: batch?.allergens.join(', ') ?? '',
      shelfLifeDays: batch?.shelfLifeDays ?? null,
      bookingId: linked,
    },
  });
  const addAllergen = (a: string) => {
    const list = getValues('allergens')
      .split(',')
      .map((x) => x.trim())
      .filter(Boolean);
    if (!list.some((x) => x.toLowerCase() === a)) setValue('allergens', [...list, a].join(', '), { shouldDirty: true });
  };
  const choices = (bookings.data?.items ?? []).filter((b) => b.state !== 'cancelled' && (!b.batchId || b.batchId === batch?.id));

  const onSubmit = handleSubmit((v) => {
    setFormError(null);
    const body = {
      name: v.name,
      style: v.style,
      volumeLiters: Math.round(fromDisplay.volume(v.volume, units.units) * 100) / 100,
      targetOg: v.targetOg,
      targetFg: v.targetFg,
      notes: v.notes,
      allergens: v.allergens
        .split(',')
        .map((x) => x.trim())
        .filter(Boolean),
      shelfLifeDays: v.shelfLifeDays,
    };
    const onError = (error: unknown) => {
      const rest = applyProblemToForm(error, setError, ['name', 'style', 'targetOg', 'targetFg', 'notes', 'allergens', 'shelfLifeDays', 'bookingId']);
      if (rest.length) setFormError(rest.join(' '));
    };
    if (batch) {
      const bookingChange = v.bookingId !== linked ? { bookingId: v.bookingId || null } : {};
      update.mutate({ ...body, ...bookingChange }, { onSuccess: onSaved, onError });
    } else {
      create.mutate({ ...body, ...(v.bookingId ? { bookingId: v.bookingId } : {}) }, { onSuccess: onSaved, onError });
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      <InputField label="Name" error={errors.name?.message} autoFocus autoComplete="off" {...register('name')} />
      <InputField label="Style" error={errors.style?.message} autoComplete="off" placeholder="e.g. Pale ale" {...register('style')} />
      <div className="grid gap-4 sm:grid-cols-3">
        <InputField
          label={`Volume (${units.labels.volume})`}
          error={errors.volume?.message}
          inputMode="decimal"
          {...register('volume', { setValueAs: numberOrNull })}
        />
        <InputField
          label="Target OG"
          hint="e.g. 1.052"
          error={errors.targetOg?.message}
          inputMode="decimal"
          {...register('targetOg', { setValueAs: numberOrNull })}
        />
        <InputField
          label="Target FG"
          hint="e.g. 1.012"
          error={errors.targetFg?.message}
          inputMode="decimal"
          {...register('targetFg', { setValueAs: numberOrNull })}
        />
      </div>
      <Field
        label="Allergens"
        hint="Comma-separated; finings recorded at transfer add theirs (gelatin and isinglass make the beer not vegan)."
        error={errors.allergens?.message}
      >
        {({ invalid, ...c }) => (
          <Input {...c} invalid={invalid} autoComplete="off" placeholder="e.g. gluten (barley), lactose (milk)" {...register('allergens')} />
        )}
      </Field>
      <div className="-mt-2 flex flex-wrap gap-1.5" aria-label="Suggested allergens">
        {allergenSuggestions.map((a) => (
          <button
            key={a}
            type="button"
            className="rounded-sm border border-line-strong px-1.5 py-px text-xs text-ink-muted hover:text-ink"
            onClick={() => addAllergen(a)}
          >
            + {a}
          </button>
        ))}
      </div>
      <Field
        label="Shelf life (days)"
        hint="Leave empty for the co-op’s shelf life for this style (Settings). Each keg filled gets a best-before from it."
        error={errors.shelfLifeDays?.message}
      >
        {({ invalid, ...c }) => (
          <Input {...c} invalid={invalid} inputMode="numeric" className="w-32" {...register('shelfLifeDays', { setValueAs: numberOrNull })} />
        )}
      </Field>
      <SelectField label="Fermenter booking" hint="The fermenter booking that holds this batch." error={errors.bookingId?.message} {...register('bookingId')}>
        <option value="">None</option>
        {choices.map((b) => (
          <option key={b.id} value={b.id}>
            {b.equipment.code} {b.equipment.name} · {formatDate(b.startsAt)} – {formatDate(b.endsAt)}
          </option>
        ))}
      </SelectField>
      <Field label="Notes" error={errors.notes?.message}>
        {({ invalid, ...c }) => (
          <textarea
            {...c}
            aria-invalid={invalid || undefined}
            rows={3}
            className="block w-full rounded-md border border-line-strong bg-surface px-3 py-2 text-sm text-ink"
            {...register('notes')}
          />
        )}
      </Field>
      <DialogActions>
        <Button variant="secondary" onClick={onClose} disabled={saving}>
          Cancel
        </Button>
        <Button type="submit" pending={saving}>
          {batch ? 'Save' : 'Create the batch'}
        </Button>
      </DialogActions>
    </form>
  );
};

export const BatchFormDialog = ({ open, onClose, batch, onSaved }: BatchFormDialogProps) => {
  const [busy, setBusy] = useState(false);
  return (
    <Dialog open={open} onClose={onClose} busy={busy} title={batch ? `Edit ${batch.name}` : 'New batch'} className="w-[min(100vw-1.5rem,40rem)]">
      <BatchForm batch={batch} onClose={onClose} onSaved={onSaved} onBusy={setBusy} />
    </Dialog>
  );
};
