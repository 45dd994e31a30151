import { useState, type ComponentProps, type ReactNode } from 'react';
import { cn } from '@/utils/cn';

const control =
  'block w-full rounded-md border bg-surface px-3 text-sm text-ink placeholder:text-ink-faint ' +
  'min-h-11 md:min-h-9 pointer-coarse:min-h-11 ' +
  'focus-visible:outline-2 focus-visible:outline-offset-1 focus-visible:outline-copper-strong ' +
  'disabled:cursor-not-allowed disabled:bg-ground-deep disabled:text-ink-muted';

const borderFor = (invalid?: boolean) => (invalid ? 'border-danger' : 'border-line-strong hover:border-ink-faint');

export interface InputProps extends ComponentProps<'input'> {
  invalid?: boolean;
}

export const Input = ({ invalid, className, ...props }: InputProps) => (
  <input className={cn(control, borderFor(invalid), 'read-only:bg-ground', className)} aria-invalid={invalid || undefined} {...props} />
);

export interface SelectProps extends ComponentProps<'select'> {
  invalid?: boolean;
}

export const Select = ({ invalid, className, children, ...props }: SelectProps) => (
  <select className={cn(control, borderFor(invalid), 'pr-8', className)} aria-invalid={invalid || undefined} {...props}>
    {children}
  </select>
);

export interface OptionsProps<V extends string> {
  /** The values to choose from, in order. */
  values: readonly V[];
  /** Each value's label; the value itself where left out. */
  labels?: Readonly<Partial<Record<V, ReactNode>>>;
}

/** A select's choices from a closed set and its labels. */
export const Options = <V extends string>({ values, labels }: OptionsProps<V>) => (
  <>
    {values.map((value) => (
      <option key={value} value={value}>
        {labels?.[value] ?? value}
      </option>
    ))}
  </>
);

export interface ChoiceProps extends Omit<ComponentProps<'input'>, 'type'> {
  label: ReactNode;
  description?: ReactNode;
}

const choiceRow =
  'flex min-h-11 cursor-pointer items-start gap-3 rounded-md px-2 py-2 hover:bg-ground-deep md:min-h-8 md:py-1.5 pointer-coarse:min-h-11 ' +
  'has-[:disabled]:cursor-not-allowed has-[:disabled]:opacity-60';
const choiceBox = 'mt-0.5 size-4 shrink-0 accent-copper';

const choice = (type: 'checkbox' | 'radio') => {
  const Choice = ({ label, description, className, ...props }: ChoiceProps) => (
    <label className={cn(choiceRow, className)}>
      <input type={type} className={choiceBox} {...props} />
      <span className="flex flex-col">
        <span className="text-ink">{label}</span>
        {description ? <span className="text-xs text-ink-muted">{description}</span> : null}
      </span>
    </label>
  );
  return Choice;
};

export const Checkbox = choice('checkbox');
export const Radio = choice('radio');

export type PasswordInputProps = Omit<InputProps, 'type'>;

/** A password box with a Show/Hide switch (typing on a phone in a wet cellar is hard enough). */
export const PasswordInput = ({ className, ...props }: PasswordInputProps) => {
  const [visible, setVisible] = useState(false);
  return (
    <div className="relative">
      <Input type={visible ? 'text' : 'password'} className={cn('pr-16', className)} {...props} />
      <button
        type="button"
        onClick={() => setVisible((shown) => !shown)}
        aria-pressed={visible}
        aria-label={visible ? 'Hide password' : 'Show password'}
        className="absolute inset-y-0 right-0 flex min-w-14 items-center justify-center rounded-r-md px-2 text-xs font-medium text-copper-strong hover:bg-copper-soft/60"
      >
        {visible ? 'Hide' : 'Show'}
      </button>
    </div>
  );
};
