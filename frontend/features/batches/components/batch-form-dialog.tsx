import { useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { allergenSuggestions } from '../../../../shared/cellar/trace.ts';
import type { BatchDetail } from '../../../../shared/schemas/batches.ts';
import type { Booking } from '../../../../shared/schemas/booking.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { ChoiceField, TextAreaField, TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { NumberField } from '@/components/form/number-field';
import { UnitNumberField } from '@/components/form/unit-number-input';
import { useApiForm } from '@/components/form/use-api-form';
import { FormDialog } from '@/components/ui/form-dialog';
import { useCreateBatch, useUpdateBatch } from '@/features/batches/api/save-batch';
import { useUnits } from '@/hooks/use-units';
import { api } from '@/lib/api-client';
import { formatDate } from '@/utils/format';
import { bookingKeys } from '@/features/bookings/api/keys';

/** What the form holds: the volume in litres (typed in the person's units), the allergens as one text. */
const formSchema = z
  .object({
    name: z.string().trim().min(1, 'Name the batch').max(120, 'Keep the name under 120 characters'),
    style: z.string().trim().max(80, 'Keep the style under 80 characters'),
    volumeLiters: z.number({ error: 'Enter the volume' }).positive('The volume must be above 0'),
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

const BatchForm = ({ batch, onClose, onSaved }: Omit<BatchFormDialogProps, 'open'>) => {
  const units = useUnits();
  const create = useCreateBatch();
  const update = useUpdateBatch(batch?.id ?? '');
  const saving = create.isPending || update.isPending;
  const bookings = useFermenterBookings(batch?.ownerId, !batch);
  const linked = batch?.bookings[0]?.id ?? '';
  const { form, message, showProblem, submit } = useApiForm<FormValues>(formSchema, {
    fields: ['name', 'style', 'volumeLiters', 'targetOg', 'targetFg', 'notes', 'allergens', 'shelfLifeDays', 'bookingId'],
    defaultValues: {
      name: batch?.name ?? '',
      style: batch?.style ?? '',
      volumeLiters: batch?.volumeLiters,
      targetOg: batch?.targetOg ?? null,
      targetFg: batch?.targetFg ?? null,
      notes: batch?.notes ?? '',
      allergens: batch?.allergens.join(', ') ?? '',
      shelfLifeDays: batch?.shelfLifeDays ?? null,
      bookingId: linked,
    },
  });
  const addAllergen = (a: string) => {
    const list = form
      .getValues('allergens')
      .split(',')
      .map((x) => x.trim())
      .filter(Boolean);
    if (!list.some((x) => x.toLowerCase() === a)) form.setValue('allergens', [...list, a].join(', '), { shouldDirty: true });
  };
  const choices = (bookings.data?.items ?? []).filter((b) => b.state !== 'cancelled' && (!b.batchId || b.batchId === batch?.id));

  const onSubmit = submit((v) => {
    const body = {
      name: v.name,
      style: v.style,
      volumeLiters: v.volumeLiters,
      targetOg: v.targetOg,
      targetFg: v.targetFg,
      notes: v.notes,
      allergens: v.allergens
        .split(',')
        .map((x) => x.trim())
        .filter(Boolean),
      shelfLifeDays: v.shelfLifeDays,
    };
    const onError = showProblem;
    if (batch) {
      const bookingChange = v.bookingId !== linked ? { bookingId: v.bookingId || null } : {};
      update.mutate({ ...body, ...bookingChange }, { onSuccess: onSaved, onError });
    } else {
      create.mutate({ ...body, ...(v.bookingId ? { bookingId: v.bookingId } : {}) }, { onSuccess: onSaved, onError });
    }
  });

  return (
    <FormFrame onSubmit={onSubmit} message={message} pending={saving} onCancel={onClose} submitLabel={batch ? 'Save' : 'Create the batch'}>
      <TextField form={form} name="name" label="Name" autoFocus autoComplete="off" />
      <TextField form={form} name="style" label="Style" autoComplete="off" placeholder="e.g. Pale ale" />
      <div className="grid gap-4 sm:grid-cols-3">
        <UnitNumberField control={form.control} name="volumeLiters" kind="volume" apiDigits={2} label={`Volume (${units.labels.volume})`} />
        <NumberField form={form} name="targetOg" label="Target OG" hint="e.g. 1.052" inputMode="decimal" empty="null" />
        <NumberField form={form} name="targetFg" label="Target FG" hint="e.g. 1.012" inputMode="decimal" empty="null" />
      </div>
      <TextField
        form={form}
        name="allergens"
        label="Allergens"
        hint="Comma-separated; finings recorded at transfer add theirs (gelatin and isinglass make the beer not vegan)."
        autoComplete="off"
        placeholder="e.g. gluten (barley), lactose (milk)"
      />
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
      <NumberField
        form={form}
        name="shelfLifeDays"
        label="Shelf life (days)"
        hint="Leave empty for the co-op’s shelf life for this style (Settings). Each keg filled gets a best-before from it."
        inputMode="numeric"
        inputClassName="w-32"
        empty="null"
      />
      <ChoiceField form={form} name="bookingId" label="Fermenter booking" hint="The fermenter booking that holds this batch.">
        <option value="">None</option>
        {choices.map((b) => (
          <option key={b.id} value={b.id}>
            {b.equipment.code} {b.equipment.name} · {formatDate(b.startsAt)} – {formatDate(b.endsAt)}
          </option>
        ))}
      </ChoiceField>
      <TextAreaField form={form} name="notes" label="Notes" />
    </FormFrame>
  );
};

export const BatchFormDialog = ({ open, onClose, batch, onSaved }: BatchFormDialogProps) => (
  <FormDialog open={open} onClose={onClose} title={batch ? `Edit ${batch.name}` : 'New batch'} className="w-[min(100vw-1.5rem,40rem)]">
    <BatchForm batch={batch} onClose={onClose} onSaved={onSaved} />
  </FormDialog>
);
