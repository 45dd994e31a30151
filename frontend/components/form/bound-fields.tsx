import type { ComponentProps, ReactNode } from 'react';
import type { FieldValues, Path, RegisterOptions, UseFormReturn } from 'react-hook-form';
import { EmailField, Field, InputField, PasswordField, SelectField } from '@/components/ui/field';

/**
 * Any react-hook-form form over `T`: the third parameter (what a submit hands on) differs from form to
 * form, and only fields are read here.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- as above
export type AnyForm<T extends FieldValues> = UseFormReturn<T, unknown, any>;

/** The message of a field's error: its own, or that of a list's root (a checkbox group's "pick one"). */
export function fieldError<T extends FieldValues>(form: AnyForm<T>, name: Path<T>): string | undefined {
  const error = form.getFieldState(name, form.formState).error as { message?: string; root?: { message?: string } } | undefined;
  return error?.message ?? error?.root?.message;
}

interface Bound<T extends FieldValues> {
  form: AnyForm<T>;
  name: Path<T>;
  /** `register` options, e.g. `{ setValueAs }` for a value read from text. */
  options?: RegisterOptions<T, Path<T>>;
}

type InputFieldProps = Omit<ComponentProps<typeof InputField>, 'error' | 'name' | 'form'>;

const textControls = { text: InputField, email: EmailField, password: PasswordField } as const;

export interface TextFieldProps<T extends FieldValues> extends Bound<T>, Omit<InputFieldProps, 'type'> {
  /** A plain box with any `type`, an e-mail box (its keyboard, no capitals) or a password box with Show/Hide. */
  kind?: keyof typeof textControls;
  type?: InputFieldProps['type'];
}

/** A labelled text box registered on a form field, with the field's error beside it: `<TextField form={form} name="reason" label="Reason" />`. */
export const TextField = <T extends FieldValues>({ form, name, options, kind = 'text', ...input }: TextFieldProps<T>) => {
  const Control = textControls[kind] as typeof InputField;
  return <Control {...input} error={fieldError(form, name)} {...form.register(name, options)} />;
};

export interface ChoiceFieldProps<T extends FieldValues> extends Bound<T>, Omit<ComponentProps<typeof SelectField>, 'error' | 'name' | 'form'> {}

/** A labelled select registered on a form field, with the field's error beside it; its options are the children (see {@link OptionList}). */
export const ChoiceField = <T extends FieldValues>({ form, name, options, children, ...select }: ChoiceFieldProps<T>) => (
  <SelectField {...select} error={fieldError(form, name)} {...form.register(name, options)}>
    {children}
  </SelectField>
);

export interface TextAreaFieldProps<T extends FieldValues> extends Bound<T>, Omit<ComponentProps<'textarea'>, 'name' | 'form' | 'className'> {
  label: ReactNode;
  hint?: ReactNode;
  /** Classes for the field (the label, box and error together). */
  className?: string;
}

/** A labelled text area (several lines: notes, an address) registered on a form field, with the field's error beside it. */
export const TextAreaField = <T extends FieldValues>({ form, name, options, label, hint, className, rows = 3, ...area }: TextAreaFieldProps<T>) => (
  <Field label={label} hint={hint} error={fieldError(form, name)} className={className}>
    {({ invalid, ...control }) => (
      <textarea
        {...control}
        {...area}
        rows={rows}
        aria-invalid={invalid || undefined}
        className="block w-full rounded-md border border-line-strong bg-surface px-3 py-2 text-sm text-ink"
        {...form.register(name, options)}
      />
    )}
  </Field>
);

export interface OptionListProps<V extends string> {
  values: readonly V[];
  /** Each value's words: a table of labels (`labelsOf` in shared/schemas) or a function. */
  labels: Readonly<Record<V, ReactNode>> | ((value: V) => ReactNode);
  disabled?: (value: V) => boolean;
}

/** The `<option>`s of a closed set, in the set's order, each labelled in words. */
export const OptionList = <V extends string>({ values, labels, disabled }: OptionListProps<V>) => (
  <>
    {values.map((value) => (
      <option key={value} value={value} disabled={disabled?.(value)}>
        {typeof labels === 'function' ? labels(value) : labels[value]}
      </option>
    ))}
  </>
);
