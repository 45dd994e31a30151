import { zodResolver } from '@hookform/resolvers/zod';
import { useCallback, useEffect, useState } from 'react';
import { useForm, type DefaultValues, type FieldValues, type Path, type Resolver } from 'react-hook-form';
import type { z } from 'zod';
import { applyProblemToForm } from '@/utils/problem-form';

/** The line above a form's fields: what went wrong as a whole, or that it was saved. */
export interface FormMessage {
  tone: 'success' | 'error';
  text: string;
}

export interface ApiFormOptions<T extends FieldValues> {
  defaultValues: DefaultValues<T>;
  /** The fields a 422 problem's `errors[]` may name; any other path goes into the message. */
  fields: readonly Path<T>[];
  /** Drop the message as soon as a field changes (a "saved" never stands beside a newer edit). */
  clearMessageOnChange?: boolean;
}

/**
 * A form over a shared zod schema that is sent to the API: react-hook-form with the schema's
 * resolver, one message for the form as a whole, and `showProblem(error)` — the one way a failed
 * request lands on the form (a 422's `errors[]` beside the fields it names, the rest in the message).
 */
export function useApiForm<T extends FieldValues>(schema: z.ZodType<T>, { defaultValues, fields, clearMessageOnChange = false }: ApiFormOptions<T>) {
  const form = useForm<T>({ resolver: zodResolver(schema as never) as unknown as Resolver<T>, defaultValues });
  const [message, setMessage] = useState<FormMessage | null>(null);
  useEffect(() => {
    if (!clearMessageOnChange) return;
    const subscription = form.watch((_values, { type }) => {
      if (type === 'change') setMessage(null);
    });
    return () => subscription.unsubscribe();
  }, [form, clearMessageOnChange]);
  const { setError } = form;
  const showProblem = useCallback(
    (error: unknown) => {
      const left = applyProblemToForm(error, setError, fields);
      if (left.length) setMessage({ tone: 'error', text: left.join(' ') });
    },
    [setError, fields],
  );
  const showError = useCallback((text: string) => setMessage({ tone: 'error', text }), []);
  /** `form.handleSubmit` that first clears the message; a form the schema refuses shows no message. */
  const submit = useCallback(
    (onValid: (values: T) => unknown) =>
      form.handleSubmit(
        async (values) => {
          setMessage(null);
          await onValid(values);
        },
        () => setMessage(null),
      ),
    [form],
  );
  /**
   * The `FormFrame` wiring of a form that sends one request: on a valid submit `send(values)` runs (a
   * mutation's `mutateAsync` and what follows it); if it fails, the problem lands on the form.
   */
  const frame = (send: (values: T) => Promise<unknown>, pending: boolean) => ({
    onSubmit: submit(async (values) => {
      try {
        await send(values);
      } catch (error) {
        showProblem(error);
      }
    }),
    message,
    pending,
  });
  return { form, message, setMessage, showError, showProblem, submit, frame };
}
