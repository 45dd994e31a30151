import { useQueryClient } from '@tanstack/react-query';
import { createContext, useCallback, useContext, useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import { useLocation } from 'react-router-dom';
import { Alert, type AlertTone } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';

/**
 * The app's one notice: the message after an action ("Payment recorded", "Roles saved"), shown at the
 * top of the page until it is stale. It belongs to the page it was shown on (or the one named in
 * `path`, for an action that goes on to another page) and clears when the person goes elsewhere, when
 * they start the next action (any mutation) or when they dismiss it. A newer notice replaces it.
 */
export interface NoticeInput {
  tone?: AlertTone;
  title?: ReactNode;
  text: ReactNode;
  /** The page the notice is for, when the action goes on to another page. */
  path?: string;
}

interface Notice extends Required<Pick<NoticeInput, 'tone' | 'path'>> {
  id: number;
  title?: ReactNode;
  text: ReactNode;
}

interface NoticeApi {
  show: (notice: NoticeInput) => void;
  clear: () => void;
}

const NoticeContext = createContext<{ notice: Notice | null; api: NoticeApi } | null>(null);

export const NoticeProvider = ({ children }: { children: ReactNode }) => {
  const location = useLocation();
  const queryClient = useQueryClient();
  const [notice, setNotice] = useState<Notice | null>(null);
  const nextId = useRef(1);

  const api = useMemo<NoticeApi>(
    () => ({
      show: ({ tone = 'success', title, text, path }) => {
        setNotice({ id: nextId.current++, tone, title, text, path: path ?? window.location.pathname });
      },
      clear: () => setNotice(null),
    }),
    [],
  );

  // Elsewhere now: yesterday's news.
  useEffect(() => {
    setNotice((current) => (current && current.path !== location.pathname ? null : current));
  }, [location.pathname]);

  // The next action begins (the one that showed the notice began before it): the last one's message
  // no longer speaks of what is on screen.
  useEffect(
    () =>
      queryClient.getMutationCache().subscribe((event) => {
        if (event.type === 'added') setNotice(null);
      }),
    [queryClient],
  );

  const value = useMemo(() => ({ notice, api }), [notice, api]);
  return <NoticeContext.Provider value={value}>{children}</NoticeContext.Provider>;
};

const noop: NoticeApi = { show: () => undefined, clear: () => undefined };

/** `show({ text })` after an action succeeds; `clear()` when what it said no longer holds. */
export function useNotice(): NoticeApi {
  return useContext(NoticeContext)?.api ?? noop;
}

/** Where the notice appears: once, at the top of the signed-in page. */
export const NoticeOutlet = () => {
  const context = useContext(NoticeContext);
  const location = useLocation();
  const ref = useRef<HTMLDivElement>(null);
  // Never shown on another page, even for the moment before the provider lets it go.
  const notice = context?.notice && context.notice.path === location.pathname ? context.notice : null;
  const clear = context?.api.clear;
  const id = notice?.id;
  useEffect(() => {
    if (id !== undefined) ref.current?.scrollIntoView?.({ block: 'nearest' });
  }, [id]);
  const onDismiss = useCallback(() => clear?.(), [clear]);
  if (!notice) return null;
  return (
    <div ref={ref} className="mb-4 scroll-mt-16" data-notice={notice.tone}>
      <Alert tone={notice.tone} title={notice.title}>
        <div className="flex flex-wrap items-center justify-between gap-2">
          <div className="min-w-0 flex-1">{notice.text}</div>
          <Button variant="ghost" size="sm" onClick={onDismiss}>
            Dismiss
          </Button>
        </div>
      </Alert>
    </div>
  );
};
