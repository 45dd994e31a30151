import { useEffect, useRef, useState } from 'react';
import type { SetListQueryOptions } from '@/components/list-kit/list-query';

export const searchDelayMs = 300;

/**
 * The text of a search box that follows the list's `q`: what is typed goes to `onSearch` a moment
 * after the last key (replacing the history entry), at once on `flush` (Enter); when `q` changes
 * underneath (Back, a cleared filter) the box shows it.
 */
export function useDebouncedSearch(
  value: string | undefined,
  onSearch: (q: string | undefined, options: SetListQueryOptions) => void,
  delay: number = searchDelayMs,
) {
  const [text, setText] = useState(value ?? '');
  const latest = useRef(onSearch);
  useEffect(() => {
    latest.current = onSearch;
  });
  useEffect(() => setText(value ?? ''), [value]);
  useEffect(() => {
    const trimmed = text.trim();
    if (trimmed === (value ?? '')) return;
    const timer = setTimeout(() => latest.current(trimmed || undefined, { replace: true }), delay);
    return () => clearTimeout(timer);
  }, [text, value, delay]);
  const flush = () => {
    const trimmed = text.trim();
    if (trimmed !== (value ?? '')) latest.current(trimmed || undefined, { replace: false });
  };
  return { text, setText, flush };
}
