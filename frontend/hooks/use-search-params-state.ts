import { useCallback } from 'react';
import { useSearchParams, type NavigateOptions } from 'react-router-dom';

/**
 * `useSearchParams` plus an updater that always starts from the URL as it is now.
 * React Router's own functional updater starts from the params of the last committed render;
 * while a navigation is still rendering (routes render in transitions), a quick second change
 * would build on stale params and undo the first one.
 */
export function useSearchParamsState() {
  const [searchParams, setSearchParams] = useSearchParams();
  const updateSearchParams = useCallback(
    (update: (current: URLSearchParams) => URLSearchParams, options?: NavigateOptions) =>
      setSearchParams(update(new URLSearchParams(window.location.search)), options),
    [setSearchParams],
  );
  return [searchParams, updateSearchParams] as const;
}
