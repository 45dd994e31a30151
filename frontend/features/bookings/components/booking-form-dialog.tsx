import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Controller } from 'react-hook-form';
import type { Booking, CreateBookingInput } from '../../../../shared/schemas/booking.ts';
import { equipmentKindLabels, type Equipment } from '../../../../shared/schemas/equipment.ts';
import { ChoiceField, TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { Alert } from '@/components/ui/alert';
import { Field } from '@/components/ui/field';
import { FormDialog } from '@/components/ui/form-dialog';
import { Input } from '@/components/ui/input';
import { createBookingSchema, useCreateBooking } from '@/features/bookings/api/create-booking';
import { useBookingRules } from '@/features/bookings/api/get-booking-rules';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { api, isApiProblem } from '@/lib/api-client';
import { useSessionUser } from '@/lib/auth';
import { applyProblemToForm } from '@/utils/problem-form';
import { userKeys } from '@/features/users/api/keys';

/** `2026-12-07T09:00` in the browser's time zone, as a datetime-local input shows it. */
export function toLocalInput(iso: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return '';
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}
const fromLocalInput = (value: string) => {
  const d = new Date(value);
  return Number.isNaN(d.getTime()) ? value : d.toISOString();
};

const bookingFields = ['equipmentId', 'startsAt', 'endsAt', 'notes', 'ownerId'] as const;

export interface BookingDraft {
  equipmentId: string;
  startsAt: string;
  endsAt: string;
}

export interface BookingFormDialogProps {
  draft: BookingDraft | null;
  items: Equipment[];
  onClose: () => void;
  onBooked: (booking: Booking) => void;
}

/** The booking form, opened from a free slot on the calendar (react-hook-form + the shared schema). */
export const BookingFormDialog = ({ draft, items, onClose, onBooked }: BookingFormDialogProps) => (
  <FormDialog
    open={Boolean(draft)}
    onClose={onClose}
    title="Book equipment"
    description="The item stays free for cleaning for the co-op's buffer after your booking."
  >
    {draft ? <BookingForm draft={draft} items={items} onBooked={onBooked} onCancel={onClose} /> : null}
  </FormDialog>
);

const BookingForm = ({
  draft,
  items,
  onBooked,
  onCancel,
}: {
  draft: BookingDraft;
  items: Equipment[];
  onBooked: (b: Booking) => void;
  onCancel: () => void;
}) => {
  const mutation = useCreateBooking();
  const rules = useBookingRules();
  const me = useSessionUser();
  // The admin may book for any member; everyone else books for themself.
  const forAnyone = canOnEvery(useAppAbility(), 'create', 'Booking');
  const members = useQuery({
    queryKey: userKeys.list({ role: 'member', active: true, pageSize: 100, for: 'booking' }),
    queryFn: ({ signal }) =>
      api.get<{ items: { id: string; name: string; email: string }[] }>('/api/users', {
        query: { role: 'member', active: 'true', pageSize: 100, sort: 'name' },
        signal,
      }),
    enabled: forAnyone,
  });
  const [problem, setProblem] = useState<{ title: string; lines: string[] } | null>(null);
  const { form } = useApiForm<CreateBookingInput>(createBookingSchema, {
    defaultValues: { equipmentId: draft.equipmentId, startsAt: draft.startsAt, endsAt: draft.endsAt, notes: '' },
    fields: bookingFields,
  });
  const errors = form.formState.errors;
  const selected = items.find((i) => i.id === form.watch('equipmentId'));

  const onSubmit = form.handleSubmit(async (values) => {
    setProblem(null);
    try {
      const { booking } = await mutation.mutateAsync(values);
      onBooked(booking);
    } catch (error) {
      const lines = applyProblemToForm(error, form.setError, bookingFields);
      if (isApiProblem(error) && (error.status === 409 || error.status === 422)) {
        setProblem({ title: error.status === 409 ? 'That slot is taken' : error.title, lines: error.status === 409 ? [error.detail ?? error.title] : lines });
      } else if (lines.length) setProblem({ title: 'The booking was not made', lines });
    }
  });

  return (
    <FormFrame
      onSubmit={onSubmit}
      aria-label="Booking"
      pending={mutation.isPending}
      onCancel={onCancel}
      cancelLabel="Close"
      submitLabel="Book"
      intro={
        problem ? (
          <Alert tone="error" title={problem.title}>
            {problem.lines.join(' ')}
          </Alert>
        ) : null
      }
    >
      <ChoiceField form={form} name="equipmentId" label="Item">
        {items.map((i) => (
          <option key={i.id} value={i.id} disabled={i.state === 'out_of_service'}>
            {i.code} · {i.name}
            {i.state === 'out_of_service' ? ' (out of service)' : ''}
          </option>
        ))}
      </ChoiceField>
      {forAnyone ? (
        <ChoiceField
          form={form}
          name="ownerId"
          label="For"
          hint="The member gets the confirmation e-mail."
          options={{ setValueAs: (v: string) => v || undefined }}
        >
          <option value="">{me ? `${me.name} (you)` : 'Yourself'}</option>
          {members.data?.items
            .filter((m) => m.id !== me?.id)
            .map((m) => (
              <option key={m.id} value={m.id}>
                {m.name} · {m.email}
              </option>
            ))}
        </ChoiceField>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-2">
        {(['startsAt', 'endsAt'] as const).map((name) => (
          <Controller
            key={name}
            control={form.control}
            name={name}
            render={({ field }) => (
              <Field label={name === 'startsAt' ? 'From' : 'Until'} error={errors[name]?.message}>
                {(c) => (
                  <Input
                    {...c}
                    type="datetime-local"
                    value={toLocalInput(field.value)}
                    onChange={(e) => field.onChange(fromLocalInput(e.target.value))}
                    onBlur={field.onBlur}
                  />
                )}
              </Field>
            )}
          />
        ))}
      </div>
      <TextField form={form} name="notes" label="Notes" hint="Optional: the beer, a batch name, anything the brewer on duty should know." autoComplete="off" />
      {rules.data && selected ? (
        <p className="text-xs text-ink-muted">
          Co-op rules: a {equipmentKindLabels[selected.kind].toLowerCase()} for at most {rules.data.maxDays[selected.kind]} days, starting within{' '}
          {rules.data.maxAdvanceDays} days; at most {rules.data.maxActiveBookingsPerMember} bookings at once; {rules.data.cleaningBufferHours} h kept free for
          cleaning after each booking.
        </p>
      ) : null}
    </FormFrame>
  );
};
