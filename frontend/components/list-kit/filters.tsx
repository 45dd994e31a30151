import type { KeyboardEvent, ReactNode } from 'react';
import { useDebouncedSearch } from '@/components/list-kit/use-debounced-search';
import type { ListPatch, SetListQueryOptions } from '@/components/list-kit/list-query';
import { Input, Select, type InputProps } from '@/components/ui/input';
import { cn } from '@/utils/cn';

/** A list filter's label above its control. */
export const filterLabelClass = 'flex flex-col gap-1 text-sm font-medium';
/** The quieter label of the Cellar and Batches toolbars. */
export const filterLabelMutedClass = 'flex flex-col gap-1 text-xs font-medium text-ink-muted';

export interface FilterFieldProps {
  label: ReactNode;
  /** The quieter, smaller label. */
  muted?: boolean;
  className?: string;
  children: ReactNode;
}

export const FilterField = ({ label, muted = false, className, children }: FilterFieldProps) => (
  <label className={cn(muted ? filterLabelMutedClass : filterLabelClass, className)}>
    {label}
    {children}
  </label>
);

export interface SearchInputProps extends Omit<InputProps, 'value' | 'onChange' | 'type' | 'defaultValue'> {
  /** The list's `q` as it is in the URL. */
  value: string | undefined;
  onSearch: (q: string | undefined, options: SetListQueryOptions) => void;
  delay?: number;
}

/** A search box that searches as you type, a moment after the last key, and at once on Enter. */
export const SearchInput = ({ value, onSearch, delay, onKeyDown, ...props }: SearchInputProps) => {
  const { text, setText, flush } = useDebouncedSearch(value, onSearch, delay);
  return (
    <Input
      autoComplete="off"
      {...props}
      type="search"
      value={text}
      onChange={(event) => setText(event.target.value)}
      onKeyDown={(event: KeyboardEvent<HTMLInputElement>) => {
        if (event.key === 'Enter') {
          event.preventDefault();
          flush();
        }
        onKeyDown?.(event);
      }}
    />
  );
};

export interface FilterSelectProps<V extends string> {
  label: ReactNode;
  value: V | undefined;
  /** `undefined` for the "any" choice. */
  onChange: (value: V | undefined) => void;
  /** The values to choose from with their labels, in order. */
  options: readonly V[] | Readonly<Record<V, string>>;
  labels?: Readonly<Partial<Record<V, string>>>;
  /** The first choice, meaning "no filter" (omitted when `null`). */
  anyLabel: string | null;
  muted?: boolean;
  className?: string;
  selectClassName?: string;
}

/** A filter that picks one of a few values, or any. Only listed values are ever passed on. */
export const FilterSelect = <V extends string>({
  label,
  value,
  onChange,
  options,
  labels,
  anyLabel,
  muted,
  className,
  selectClassName,
}: FilterSelectProps<V>) => {
  const values: readonly V[] = Array.isArray(options) ? (options as readonly V[]) : (Object.keys(options) as V[]);
  const labelOf = (v: V) => labels?.[v] ?? (Array.isArray(options) ? v : (options as Readonly<Record<V, string>>)[v]);
  return (
    <FilterField label={label} muted={muted} className={className}>
      <Select value={value ?? ''} onChange={(event) => onChange(values.find((v) => v === event.target.value))} className={selectClassName}>
        {anyLabel !== null ? <option value="">{anyLabel}</option> : null}
        {values.map((v) => (
          <option key={v} value={v}>
            {labelOf(v)}
          </option>
        ))}
      </Select>
    </FilterField>
  );
};

export interface QueryFilterProps<Q> extends Omit<FilterSelectProps<string>, 'value' | 'onChange'> {
  /** The key of the list's query the filter sets. */
  name: keyof Q & string;
  query: Q;
  onQueryChange: (patch: ListPatch<Q>) => void;
}

/**
 * A `FilterSelect` bound to one key of the list's query, so a screen declares each filter once as
 * data (name, label, options, labels) beside its columns.
 */
export const QueryFilter = <Q,>({ name, query, onQueryChange, ...select }: QueryFilterProps<Q>) => (
  <FilterSelect {...select} value={query[name] as string | undefined} onChange={(value) => onQueryChange({ [name]: value } as ListPatch<Q>)} />
);

/** The row of filters above a cellar list: two choices and a search. */
export const FilterGrid = ({ children }: { children: ReactNode }) => <div className="grid gap-2 sm:grid-cols-[12rem_12rem_1fr]">{children}</div>;

export interface ListSearchProps extends Omit<SearchInputProps, 'value' | 'onSearch'> {
  label: ReactNode;
  muted?: boolean;
  /** Classes for the label around the box. */
  fieldClassName?: string;
  query: { q?: string | undefined };
  onQueryChange: (patch: { q: string | undefined }, options: SetListQueryOptions) => void;
}

/** A list's search box under its label, bound to the list's `q`. */
export const ListSearch = ({ label, muted, fieldClassName, query, onQueryChange, ...input }: ListSearchProps) => (
  <FilterField label={label} muted={muted} className={fieldClassName}>
    <SearchInput {...input} value={query.q} onSearch={(q, options) => onQueryChange({ q }, options)} />
  </FilterField>
);
