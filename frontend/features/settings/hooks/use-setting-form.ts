import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useForm, type DefaultValues, type FieldValues, type Path, type Resolver } from 'react-hook-form';
import type { z } from 'zod';
import type { SettingKey } from '../../../../shared/schemas/settings.ts';
import { useSaveSetting } from '@/features/settings/api/setting';
import { applyProblemToForm } from '@/utils/problem-form';

export interface SettingFormMessage {
  tone: 'success' | 'error';
  text: string;
}

/**
 * One Settings section's form: react-hook-form over the section's shared schema, saved with PUT;
 * the saved value becomes the form's new start, problems land on `fields` and anything else is the
 * form's error message. "Saved" speaks only of what was saved: it goes as soon as a field changes or
 * a save is tried again, so it never stands beside a validation error.
 */
export function useSettingForm<T extends FieldValues>(
  key: SettingKey,
  schema: z.ZodType<T>,
  value: T,
  { savedText, fields }: { savedText: string; fields: readonly Path<T>[] },
) {
  const save = useSaveSetting<T>(key);
  const [message, setMessage] = useState<SettingFormMessage | null>(null);
  const form = useForm<T>({ resolver: zodResolver(schema as never) as unknown as Resolver<T>, defaultValues: value as DefaultValues<T> });
  useEffect(() => {
    const subscription = form.watch((_values, { type }) => {
      if (type === 'change') setMessage(null);
    });
    return () => subscription.unsubscribe();
  }, [form]);
  const onSubmit = form.handleSubmit(
    async (values) => {
      setMessage(null);
      try {
        const saved = await save.mutateAsync(values);
        form.reset(saved.value);
        setMessage({ tone: 'success', text: savedText });
      } catch (error) {
        const left = applyProblemToForm(error, form.setError, fields);
        if (left.length) setMessage({ tone: 'error', text: left.join(' ') });
      }
    },
    () => setMessage(null),
  );
  return { form, save, message, onSubmit };
}
