import { useId, type ReactNode } from 'react';
import { Alert } from '@/components/ui/alert';
import { Input, PasswordInput, Select, type InputProps, type SelectProps } from '@/components/ui/input';
import { cn } from '@/utils/cn';

/** What a field hands its control so label, hint and error are wired up for assistive tech. */
export interface FieldControlProps {
  id: string;
  'aria-describedby'?: string;
  'aria-invalid'?: true;
  invalid: boolean;
}

export interface FieldProps {
  label: ReactNode;
  hint?: ReactNode;
  error?: string | undefined;
  className?: string;
  /** Shown after the label, e.g. a "Forgot password?" link. */
  aside?: ReactNode;
  children: (control: FieldControlProps) => ReactNode;
}

export const FieldError = ({ id, children }: { id?: string; children: ReactNode }) => (
  <p id={id} className="flex items-start gap-1.5 text-xs font-medium text-danger">
    <svg viewBox="0 0 16 16" className="mt-px size-3.5 shrink-0" aria-hidden="true">
      <circle cx="8" cy="8" r="7" fill="currentColor" />
      <path d="M8 4.5v4.2M8 11v.5" stroke="white" strokeWidth="1.6" strokeLinecap="round" />
    </svg>
    <span>{children}</span>
  </p>
);

export const Field = ({ label, hint, error, className, aside, children }: FieldProps) => {
  const id = useId();
  const hintId = hint ? `${id}-hint` : undefined;
  const errorId = error ? `${id}-error` : undefined;
  const describedBy = [hintId, errorId].filter(Boolean).join(' ') || undefined;
  const control: FieldControlProps = { id, invalid: Boolean(error) };
  if (describedBy) control['aria-describedby'] = describedBy;
  if (error) control['aria-invalid'] = true;
  return (
    <div className={cn('flex flex-col gap-1', className)}>
      <div className="flex items-baseline justify-between gap-2">
        <label htmlFor={id} className="text-sm font-medium text-ink">
          {label}
        </label>
        {aside}
      </div>
      {children(control)}
      {hint ? (
        <p id={hintId} className="text-xs text-ink-muted">
          {hint}
        </p>
      ) : null}
      {error ? <FieldError id={errorId}>{error}</FieldError> : null}
    </div>
  );
};

export interface FieldSetProps {
  legend: ReactNode;
  hint?: ReactNode;
  error?: string | undefined;
  className?: string;
  children: ReactNode;
}

/** A group of checkboxes or radios under one legend. */
export const FieldSet = ({ legend, hint, error, className, children }: FieldSetProps) => {
  const id = useId();
  const describedBy = [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;
  return (
    <fieldset className={cn('flex flex-col gap-1', className)} aria-describedby={describedBy} aria-invalid={error ? true : undefined}>
      <legend className="mb-1 text-sm font-medium text-ink">{legend}</legend>
      {hint ? (
        <p id={`${id}-hint`} className="-mt-1 mb-1 text-xs text-ink-muted">
          {hint}
        </p>
      ) : null}
      {children}
      {error ? <FieldError id={`${id}-error`}>{error}</FieldError> : null}
    </fieldset>
  );
};

type FieldFrame = Omit<FieldProps, 'children'>;

/** The form kit's text box with its label, hint and error: `<InputField label="E-mail" error={…} {...register('email')} />`. */
export const InputField = ({
  label,
  hint,
  error,
  aside,
  className,
  inputClassName,
  ...input
}: FieldFrame & Omit<InputProps, 'className'> & { inputClassName?: string }) => (
  <Field label={label} hint={hint} error={error} aside={aside} className={className}>
    {({ invalid, ...control }) => <Input {...control} invalid={invalid} className={inputClassName} {...input} />}
  </Field>
);

/** {@link InputField} for an e-mail address: the e-mail keyboard, no capitals or spelling fixes; labelled "E-mail" unless told. */
export const EmailField = ({ label = 'E-mail', ...input }: Omit<FieldFrame, 'label'> & { label?: string } & Omit<InputProps, 'className' | 'type'>) => (
  <InputField label={label} type="email" inputMode="email" autoCapitalize="none" spellCheck={false} {...input} />
);

/** {@link InputField} for a password, with its Show/Hide switch. */
export const PasswordField = ({ label, hint, error, aside, className, ...input }: FieldFrame & Omit<InputProps, 'className' | 'type'>) => (
  <Field label={label} hint={hint} error={error} aside={aside} className={className}>
    {({ invalid, ...control }) => <PasswordInput {...control} invalid={invalid} {...input} />}
  </Field>
);

/** A labelled select with its error. */
export const SelectField = ({ label, hint, error, aside, className, children, ...select }: FieldFrame & Omit<SelectProps, 'className'>) => (
  <Field label={label} hint={hint} error={error} aside={aside} className={className}>
    {({ invalid, ...control }) => (
      <Select {...control} invalid={invalid} {...select}>
        {children}
      </Select>
    )}
  </Field>
);

/** The form's own message above its fields (from `useApiForm`): an error, or what was saved. */
export const FormMessageAlert = ({ message }: { message: { tone: 'success' | 'error'; text: string } | null }) =>
  message ? <Alert tone={message.tone}>{message.text}</Alert> : null;
