import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { isApiProblem, problemMessage } from '@/lib/api-client';

/** `/email`, `body.email`, `email` and `["email"]` all name the field `email`. */
export function fieldOfPath(path: string): string {
  const clean = path
    .replace(/^#?\//, '')
    .replace(/\//g, '.')
    .replace(/^body\./, '');
  return clean.split('.')[0] ?? '';
}

/**
 * Put a problem's `errors[]` next to the form's own fields; return what could not be placed
 * (other paths, or the problem's title/detail when it named no field) for a message at the top.
 */
export function applyProblemToForm<T extends FieldValues>(error: unknown, setError: UseFormSetError<T>, fields: readonly Path<T>[]): string[] {
  if (!isApiProblem(error)) return [problemMessage(error)];
  const leftovers: string[] = [];
  let placed = 0;
  const seen = new Set<string>();
  for (const item of error.errors) {
    const field = fieldOfPath(item.path) as Path<T>;
    if (fields.includes(field)) {
      if (!seen.has(field)) setError(field, { type: 'server', message: item.message });
      seen.add(field);
      placed += 1;
    } else {
      leftovers.push(item.path ? `${item.path}: ${item.message}` : item.message);
    }
  }
  if (placed === 0 && leftovers.length === 0) leftovers.push(problemMessage(error));
  return leftovers;
}
